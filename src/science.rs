//! Small pure functions of transit physics, each with its equation and
//! source. Units are in the names; constants come from [`crate::constants`].

use std::f64::consts::PI;

use crate::constants::{DAY_S, GM_SUN, R_EARTH_M, R_SUN_M};

/// Semi-major axis, m, from Kepler's third law:
/// a = [G(M★ + M_p) P² / 4π²]^{1/3}, with G M★ = GM☉ · M★/M☉ (IAU 2015 B3
/// nominal GM☉). `planet_gm` is G M_p in m³ s⁻² (0 for a test particle).
pub fn semi_major_axis_m(period_d: f64, star_mass_msun: f64, planet_gm: f64) -> f64 {
    let p = period_d * DAY_S;
    ((GM_SUN * star_mass_msun + planet_gm) * p * p / (4.0 * PI * PI)).cbrt()
}

/// a/R★ for a circular orbit of a massless planet.
pub fn a_over_rstar(period_d: f64, star_mass_msun: f64, star_radius_rsun: f64) -> f64 {
    semi_major_axis_m(period_d, star_mass_msun, 0.0) / (star_radius_rsun * R_SUN_M)
}

/// Total (T₁₄) and full (T₂₃) transit durations, hours, for a circular orbit
/// (Winn 2010, arXiv:1001.2010, §2, eqs. 14–15; equation numbers from memory):
/// T = (P/π) asin[(R★/a) √((1 ± k)² − b²) / sin i], with b = (a/R★) cos i.
/// T₂₃ is 0 for a grazing transit (b > 1 − k); both are `None` when b ≥ 1 + k.
pub fn durations_h(period_d: f64, a_rstar: f64, ror: f64, impact: f64) -> Option<(f64, f64)> {
    let cos_i = impact / a_rstar;
    if !(0.0..1.0).contains(&cos_i) {
        return None;
    }
    let sin_i = (1.0 - cos_i * cos_i).sqrt();
    let chord = |x: f64| -> f64 {
        let s = (x * x - impact * impact).max(0.0).sqrt() / (a_rstar * sin_i);
        period_d * 24.0 / PI * s.min(1.0).asin()
    };
    if impact >= 1.0 + ror {
        return None;
    }
    let t14 = chord(1.0 + ror);
    let t23 = if impact > 1.0 - ror {
        0.0
    } else {
        chord(1.0 - ror)
    };
    Some((t14, t23))
}

/// Transit depth (ppm) of a small planet on a quadratically limb-darkened
/// star: δ ≈ k² I(μ) / (1 − u₁/3 − u₂/6), with I(μ) = 1 − u₁(1−μ) − u₂(1−μ)²
/// and μ = √(1 − b²) (Mandel & Agol 2002, ApJ 580, L171, small-planet limit;
/// METHODS.md §2). Outside the disc (b ≥ 1) the limb value μ = 0 is used.
pub fn small_planet_depth_ppm(ror: f64, impact: f64, u1: f64, u2: f64) -> f64 {
    let mu = (1.0 - impact * impact).max(0.0).sqrt();
    let i_mu = 1.0 - u1 * (1.0 - mu) - u2 * (1.0 - mu).powi(2);
    ror * ror * i_mu / (1.0 - u1 / 3.0 - u2 / 6.0) * 1e6
}

/// Planet radius in Earth radii from R_p/R★ and R★ in solar radii (IAU 2015
/// B3 nominal R☉ and equatorial R⊕).
pub fn radius_rearth(ror: f64, star_radius_rsun: f64) -> f64 {
    ror * star_radius_rsun * R_SUN_M / R_EARTH_M
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::constants::{AU_M, GM_EARTH, SIDEREAL_YEAR_D};

    #[test]
    fn kepler_third_law() {
        // METHODS.md §2 [D]: a sidereal year with GM☉ + GM⊕ gives 1.0000000 au.
        let a = semi_major_axis_m(SIDEREAL_YEAR_D, 1.0, GM_EARTH) / AU_M;
        assert!((a - 1.0).abs() < 5e-7, "{a}");
        // P = 10 d around 1 M☉: a = 0.090838 au, a/R★ = 19.533 [D].
        assert!((semi_major_axis_m(10.0, 1.0, 0.0) / AU_M - 0.090838).abs() < 1e-6);
        assert!((a_over_rstar(10.0, 1.0, 1.0) - 19.533).abs() < 1e-3);
    }

    #[test]
    fn winn_durations() {
        // METHODS.md §2 checks [D]; formula Winn 2010 §2.
        let a_earth = semi_major_axis_m(SIDEREAL_YEAR_D, 1.0, GM_EARTH) / R_SUN_M;
        let k = R_EARTH_M / R_SUN_M;
        let (t14, t23) = durations_h(SIDEREAL_YEAR_D, a_earth, k, 0.0).unwrap();
        assert!(
            (t14 - 13.095).abs() < 2e-3 && (t23 - 12.858).abs() < 2e-3,
            "{t14} {t23}"
        );
        let (t14, t23) = durations_h(SIDEREAL_YEAR_D, a_earth, k, 0.5).unwrap();
        assert!(
            (t14 - 11.375).abs() < 2e-3 && (t23 - 11.100).abs() < 2e-3,
            "{t14} {t23}"
        );
        // Hot Jupiter: P = 3 d, 1 M☉, 1 R☉, k = 0.1 (a/R★ = 8.7536).
        let a = a_over_rstar(3.0, 1.0, 1.0);
        assert!((a - 8.7536).abs() < 1e-3, "{a}");
        let (t14, t23) = durations_h(3.0, a, 0.1, 0.0).unwrap();
        assert!(
            (t14 - 2.888).abs() < 1e-3 && (t23 - 2.361).abs() < 1e-3,
            "{t14} {t23}"
        );
        let (t14, t23) = durations_h(3.0, a, 0.1, 0.7).unwrap();
        assert!(
            (t14 - 2.232).abs() < 1e-3 && (t23 - 1.487).abs() < 1e-3,
            "{t14} {t23}"
        );
        assert!(durations_h(3.0, a, 0.1, 1.2).is_none());
        assert_eq!(durations_h(3.0, a, 0.1, 0.95).unwrap().1, 0.0);
    }

    #[test]
    fn earth_radius_from_depth() {
        // METHODS.md §2 [D]: 84.05 ppm on 1 R☉ is 1.000 R⊕ (uniform disc, k = √δ).
        let r = radius_rearth((84.05e-6f64).sqrt(), 1.0);
        assert!((r - 1.000).abs() < 1e-3, "{r}");
        // Quadratic LD small-planet limit at b = 0 with u = (0.4, 0.26):
        // δ = k²/(1 − 0.4/3 − 0.26/6); METHODS.md §4 gives F = 0.9878543 for p = 0.1.
        let d = small_planet_depth_ppm(0.1, 0.0, 0.4, 0.26);
        assert!((1.0 - d * 1e-6 - 0.9878543).abs() < 1e-7, "{d}");
    }
}

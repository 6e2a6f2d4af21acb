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
/// docs/science.md §2). Outside the disc (b ≥ 1) the limb value μ = 0 is used.
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

/// Planet radius in Earth radii from the observed depth (ppm), the stellar
/// radius and the fraction `c` of aperture flux from other sources:
/// δ_true = δ_obs/(1−c), R_p = R★ √δ_true (uniform disc; docs/science.md §2).
pub fn radius_from_depth_rearth(depth_ppm: f64, star_radius_rsun: f64, contamination: f64) -> f64 {
    let c = contamination.clamp(0.0, 0.999);
    let k = (depth_ppm * 1e-6 / (1.0 - c)).sqrt();
    radius_rearth(k, star_radius_rsun)
}

/// Planet-to-star radius ratio k from an observed central depth (ppm) with
/// quadratic limb darkening (u₁, u₂): in the small-planet limit the depth at
/// impact b is k² I(μ)/(1 − u₁/3 − u₂/6) with I(μ) = 1 − u₁(1−μ) − u₂(1−μ)²,
/// μ = √(1−b²) (Mandel & Agol 2002, ApJ 580, L171, §5; docs/science.md §2),
/// so k = √[δ/(1−c) · (1 − u₁/3 − u₂/6)/I(μ)], with δ/(1−c) the undiluted
/// depth for contamination c. b above 0.99 is read as 0.99.
pub fn ror_from_depth(depth_ppm: f64, contamination: f64, impact: f64, ld: (f64, f64)) -> f64 {
    let (u1, u2) = ld;
    let c = contamination.clamp(0.0, 0.999);
    let mu = (1.0 - impact.clamp(0.0, 0.99).powi(2)).sqrt();
    let i_mu = 1.0 - u1 * (1.0 - mu) - u2 * (1.0 - mu).powi(2);
    (depth_ppm * 1e-6 / (1.0 - c) * (1.0 - u1 / 3.0 - u2 / 6.0) / i_mu).sqrt()
}

/// Equilibrium temperature, K: T_eq = T_eff √(R★/a) [f_r (1 − A_B)]^{1/4},
/// with f_r = 1/4 for full redistribution, 1/2 for the dayside only
/// (standard radiative balance; docs/science.md §2, from memory).
pub fn equilibrium_temperature_k(
    teff_k: f64,
    a_rstar: f64,
    albedo: f64,
    redistribution: f64,
) -> f64 {
    teff_k * (1.0 / a_rstar).sqrt() * (redistribution * (1.0 - albedo)).powf(0.25)
}

/// Insolation relative to Earth: S/S⊕ = (R★/R☉)² (T_eff/5772 K)⁴ (a/au)⁻²
/// (docs/science.md §2; T_eff☉ nominal, IAU 2015 B3).
pub fn insolation_earth(star_radius_rsun: f64, teff_k: f64, a_au: f64) -> f64 {
    star_radius_rsun.powi(2) * (teff_k / crate::constants::TEFF_SUN_K).powi(4) / (a_au * a_au)
}

/// Mean stellar density, kg m⁻³, from a/R★ and the period:
/// ρ★ = 3π (a/R★)³ / (G P²) (Seager & Mallén-Ornelas 2003, ApJ 585, 1038, in
/// Winn's 2010 form without the planet term; docs/science.md §2).
pub fn density_from_a_rstar(a_rstar: f64, period_d: f64) -> f64 {
    let p = period_d * DAY_S;
    3.0 * PI * a_rstar.powi(3) / (crate::constants::G * p * p)
}

/// a/R★ from the total duration, impact parameter and R_p/R★ of a circular
/// orbit: (a/R★)² = [(1+k)² − b²(1 − s_T²)] / s_T², s_T = sin(π T₁₄/P)
/// (Seager & Mallén-Ornelas 2003, docs/science.md §2). `None` for a
/// duration of half the period or more ([`longest_transit_h`]), which no
/// orbit gives: the sine would read it as the shorter duration P − T₁₄.
pub fn a_rstar_from_duration(period_d: f64, t14_h: f64, ror: f64, impact: f64) -> Option<f64> {
    if !(t14_h > 0.0 && t14_h < longest_transit_h(period_d)) {
        return None;
    }
    let st = (PI * t14_h / (period_d * 24.0)).sin();
    let v = ((1.0 + ror).powi(2) - impact * impact * (1.0 - st * st)) / (st * st);
    (v > 0.0).then(|| v.sqrt())
}

/// Impact parameter and a/R★ from the total and full durations and the depth
/// (Seager & Mallén-Ornelas 2003; docs/science.md §2):
/// b² = [(1−√δ)² − (s_F/s_T)² (1+√δ)²] / [1 − (s_F/s_T)²].
pub fn impact_and_a_rstar(period_d: f64, t14_h: f64, t23_h: f64, depth: f64) -> Option<(f64, f64)> {
    let st = (PI * t14_h / (period_d * 24.0)).sin();
    let sf = (PI * t23_h / (period_d * 24.0)).sin();
    let k = depth.sqrt();
    let r2 = (sf / st).powi(2);
    let b2 = ((1.0 - k).powi(2) - r2 * (1.0 + k).powi(2)) / (1.0 - r2);
    if b2.is_nan() || b2 < 0.0 {
        return None;
    }
    let b = b2.sqrt();
    Some((b, a_rstar_from_duration(period_d, t14_h, k, b)?))
}

/// The longest transit any circular orbit of `period_d` days gives, hours:
/// T₁₄ = (P/π) asin[(R★/a)√((1+k)²−b²)/sin i] (Winn 2010, arXiv:1001.2010,
/// eq. 14) and the arcsine is at most π/2, so T₁₄ ≤ P/2, reached only by a
/// body grazing its star (docs/science.md §2).
pub fn longest_transit_h(period_d: f64) -> f64 {
    period_d * 24.0 / 2.0
}

/// The least mean density, kg m⁻³, of a star that a body of radius ratio
/// `ror` can orbit in `period_d` days without touching it: a/R★ = 1 + k in
/// ρ★ = 3π (a/R★)³ / (G P²) (Seager & Mallén-Ornelas 2003, ApJ 585, 1038;
/// docs/science.md §2). A star less dense than this has the orbit inside it.
pub fn least_density_for_orbit(period_d: f64, ror: f64) -> f64 {
    density_from_a_rstar(1.0 + ror.max(0.0), period_d)
}

/// Hours times (g cm⁻³)^½ in the least mean density a planet needs to
/// orbit in a period outside its Roche limit: ρ_p ≥ (C/P)². The limit
/// a_R ∝ R★(ρ★/ρ_p)^{1/3} and Kepler's law leave only the planet's density
/// and the period (Rappaport et al. 2013, ApJ 773, L15); their worked
/// value, a 4.245 h orbit needing ρ_p ≳ 7 g cm⁻³ (KOI 1843.03, the
/// abstract's numbers), gives C = 4.245 √7.
pub const ROCHE_PERIOD_H: f64 = 11.231;

/// The least mean density, g cm⁻³, of a planet on an orbit of `period_d`
/// days that its star's tides do not pull apart, whatever the star
/// ([`ROCHE_PERIOD_H`]; docs/science.md §2).
pub fn least_planet_density(period_d: f64) -> f64 {
    (ROCHE_PERIOD_H / (period_d * 24.0)).powi(2)
}

/// Mean density of a star from its mass and radius, kg m⁻³, with
/// M☉ = GM☉/G (IAU 2015 B3 nominal GM☉, CODATA 2018 G).
pub fn star_density(star_mass_msun: f64, star_radius_rsun: f64) -> f64 {
    let m = star_mass_msun * GM_SUN / crate::constants::G;
    let r = star_radius_rsun * R_SUN_M;
    m / (4.0 / 3.0 * PI * r.powi(3))
}

/// The least radius, R☉, that a star of mean density `density_kg_m3` can
/// have (docs/science.md §2). R★ = (M★/ρ★)^{1/3}, so the least radius goes
/// with the least mass a star of that density can have. On the main
/// sequence R★ ≥ 0.85 (ρ★/ρ☉)^{−1/2} R☉: the Sun, GJ 436, GJ 1214,
/// Barnard's star, Proxima Centauri and TRAPPIST-1 lie on or above it
/// (their published masses and radii, from memory; the coefficient is the
/// lowest of theirs, TRAPPIST-1's 0.87, rounded down). A star off the main
/// sequence has M★ ≥ 0.8 M☉ (no lighter star has left it in the age of
/// the Universe, from memory), so R★ ≥ (0.8 M☉/ρ★)^{1/3}. A star is one or
/// the other: the lesser bound holds for both. It fails for young
/// low-mass stars still contracting onto the main sequence, less dense
/// than a main-sequence star of their size: the bound can be half again
/// their radius (TOI-1227, 0.56 R☉ against 0.86, from memory); and for
/// brown dwarfs. White dwarfs are far smaller but far denser, and keep to
/// it. `None` for a density
/// that is not finite and positive.
pub fn least_star_radius_rsun(density_kg_m3: f64) -> Option<f64> {
    let rho = density_kg_m3 / star_density(1.0, 1.0);
    if !(rho.is_finite() && rho > 0.0) {
        return None;
    }
    let main_sequence = 0.85 / rho.sqrt();
    let evolved = (0.8 / rho).cbrt();
    Some(main_sequence.min(evolved))
}

/// Normalised transit duration ratio ξ = (T_in/T_out)(P_out/P_in)^{1/3}
/// (Fabrycky et al. 2014, ApJ 790, 146; definition from memory).
pub fn duration_ratio_xi(t_in_h: f64, p_in_d: f64, t_out_h: f64, p_out_d: f64) -> f64 {
    (t_in_h / t_out_h) * (p_out_d / p_in_d).cbrt()
}

/// Planet mass in Earth masses from radius (Earth radii): Weiss & Marcy
/// 2014 (ApJL 783, L6) below 4 R⊕ — ρ = 2.43 + 3.39 R g cm⁻³ below 1.5 R⊕,
/// M = 2.69 R^0.93 from 1.5 to 4 R⊕ — and the generic M = R^2.06 above
/// (a law fitting Earth and Saturn; docs/science.md §3, from memory).
pub fn mass_from_radius_mearth(r: f64) -> f64 {
    if r < 1.5 {
        (2.43 + 3.39 * r) / earth_density_g_cm3() * r.powi(3)
    } else if r < 4.0 {
        2.69 * r.powf(0.93)
    } else {
        r.powf(2.06)
    }
}

/// Mass from radius by Wolfgang et al. 2016 (ApJ 825, 19): M = 2.7 R^1.3 for
/// R < 4 R⊕ (docs/science.md §3).
pub fn mass_wolfgang_2016(r: f64) -> f64 {
    2.7 * r.powf(1.3)
}

/// Earth's mean density, g cm⁻³, from nominal GM⊕ and the equatorial radius
/// (IAU 2015 B3): 5.495 (docs/science.md §3).
pub fn earth_density_g_cm3() -> f64 {
    let m = crate::constants::GM_EARTH / crate::constants::G;
    m / (4.0 / 3.0 * PI * R_EARTH_M.powi(3)) / 1000.0
}

/// Separation of two orbits in mutual Hill radii (Gladman 1993, Icarus 106,
/// 247; docs/science.md §3): R_H = [(m₁+m₂)/(3M★)]^{1/3} (a₁+a₂)/2 and
/// Δ = (a₂−a₁)/R_H. Masses in Earth masses, periods in days; depends only on
/// the period ratio.
pub fn hill_separation(
    p1_d: f64,
    p2_d: f64,
    m1_mearth: f64,
    m2_mearth: f64,
    star_mass_msun: f64,
) -> f64 {
    let (p1, p2) = if p1_d <= p2_d {
        (p1_d, p2_d)
    } else {
        (p2_d, p1_d)
    };
    let x = (p2 / p1).powf(2.0 / 3.0); // a₂/a₁
    let mu = (m1_mearth + m2_mearth) / (crate::constants::M_SUN_PER_M_EARTH * star_mass_msun);
    (x - 1.0) / ((mu / 3.0).cbrt() * (1.0 + x) / 2.0)
}

/// Two-planet Hill stability limit in mutual Hill radii, 2√3 (Gladman 1993;
/// docs/science.md §3, from memory).
pub const HILL_CRITICAL: f64 = 3.464_101_615_137_754_6;

/// The period ratio at which two planets reach `delta` mutual Hill radii
/// (bisection on [`hill_separation`]).
pub fn period_ratio_for_hill(
    delta: f64,
    m1_mearth: f64,
    m2_mearth: f64,
    star_mass_msun: f64,
) -> f64 {
    let (mut lo, mut hi) = (1.0, 100.0);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if hill_separation(1.0, mid, m1_mearth, m2_mearth, star_mass_msun) < delta {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

/// The smallest main-sequence star, for the Hill test of candidates whose
/// star's radius is unknown (docs/science.md §3.2) and the ellipsoidal
/// ceiling where the star's mass is (§4.6): about the
/// hydrogen-burning limit, near 0.08 M☉ with a radius near 0.1 R☉ (from
/// memory); 0.1 R☉ and 0.1 M☉ are taken. Down the main sequence of small
/// stars radius and mass fall together (R ≈ M in solar units, from memory)
/// while the mass of a rocky planet of given depth falls as R★³, so the
/// smallest star gives the smallest planet-to-star mass ratio, the
/// smallest Hill spheres, and the fewest unstable pairs.
pub const SMALLEST_STAR_RSUN: f64 = 0.1;
pub const SMALLEST_STAR_MSUN: f64 = 0.1;

#[cfg(test)]
mod tests {
    use super::*;
    use crate::constants::{AU_M, GM_EARTH, SIDEREAL_YEAR_D};

    #[test]
    fn the_least_radius_of_a_star_of_a_density_bounds_real_stars() {
        // (name, M/M☉, R/R☉), published values from memory: the Sun; M
        // dwarfs GJ 436, GJ 1214, Barnard's star, Proxima Centauri,
        // TRAPPIST-1; stars off the main sequence Kepler-56 and Kepler-91.
        let stars = [
            ("Sun", 1.0, 1.0),
            ("GJ 436", 0.445, 0.417),
            ("GJ 1214", 0.178, 0.215),
            ("Barnard's star", 0.162, 0.187),
            ("Proxima Centauri", 0.122, 0.154),
            ("TRAPPIST-1", 0.0898, 0.1192),
            ("Kepler-56", 1.32, 4.23),
            ("Kepler-91", 1.31, 6.30),
        ];
        for (name, m, r) in stars {
            let least = least_star_radius_rsun(star_density(m, r)).unwrap();
            // Never above the star's radius, and not far below it.
            assert!(
                least <= r && least > 0.75 * r,
                "{name}: {least} against {r}"
            );
        }
        // The Sun's density: 0.85 R☉ (the main-sequence bound is the lesser).
        let sun = least_star_radius_rsun(star_density(1.0, 1.0)).unwrap();
        assert!((sun - 0.85).abs() < 1e-12);
        assert_eq!(least_star_radius_rsun(0.0), None);
        assert_eq!(least_star_radius_rsun(f64::NAN), None);
    }

    #[test]
    fn kepler_third_law() {
        // docs/science.md §2 [D]: a sidereal year with GM☉ + GM⊕ gives 1.0000000 au.
        let a = semi_major_axis_m(SIDEREAL_YEAR_D, 1.0, GM_EARTH) / AU_M;
        assert!((a - 1.0).abs() < 5e-7, "{a}");
        // P = 10 d around 1 M☉: a = 0.090838 au, a/R★ = 19.533 [D].
        assert!((semi_major_axis_m(10.0, 1.0, 0.0) / AU_M - 0.090838).abs() < 1e-6);
        assert!((a_over_rstar(10.0, 1.0, 1.0) - 19.533).abs() < 1e-3);
    }

    #[test]
    fn winn_durations() {
        // docs/science.md §2 checks [D]; formula Winn 2010 §2.
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
        // docs/science.md §2 [D]: 84.05 ppm on 1 R☉ is 1.000 R⊕ (uniform disc, k = √δ).
        let r = radius_rearth((84.05e-6f64).sqrt(), 1.0);
        assert!((r - 1.000).abs() < 1e-3, "{r}");
        // Quadratic LD small-planet limit at b = 0 with u = (0.4, 0.26):
        // δ = k²/(1 − 0.4/3 − 0.26/6); docs/science.md §4 gives F = 0.9878543 for p = 0.1.
        let d = small_planet_depth_ppm(0.1, 0.0, 0.4, 0.26);
        assert!((1.0 - d * 1e-6 - 0.9878543).abs() < 1e-7, "{d}");
    }

    #[test]
    fn dilution() {
        // docs/science.md §2 [D]: c = 0.5 turns 84.05 ppm on 1 R☉ into 1.414 R⊕.
        assert!((radius_from_depth_rearth(84.05, 1.0, 0.0) - 1.000).abs() < 1e-3);
        assert!((radius_from_depth_rearth(84.05, 1.0, 0.5) - 1.414).abs() < 1e-3);
    }

    #[test]
    fn limb_darkened_ratio() {
        // Uniform disc: k = √δ (Earth across the Sun, 84.05 ppm).
        assert!((ror_from_depth(84.05, 0.0, 0.0, (0.0, 0.0)) - 84.05e-6f64.sqrt()).abs() < 1e-12);
        // Quadratic law u = (0.4, 0.26) at b = 0: δ = k²/(1 − u₁/3 − u₂/6)
        // (Mandel & Agol 2002 small-planet limit), so √depth overstates k
        // by 1/√0.82333 = 1.1021; checked against the full model, which
        // agrees with an independent reference implementation.
        let k = ror_from_depth(1000.0, 0.0, 0.0, (0.4, 0.26));
        assert!((1000e-6f64.sqrt() / k - 1.1021).abs() < 1e-4, "{k}");
        let a_rstar = 15.0;
        let centre = crate::transit_model::model_flux(0.0, k, a_rstar, 0.0, 0.4, 0.26);
        assert!(
            ((1.0 - centre) * 1e6 / 1000.0 - 1.0).abs() < 0.02,
            "{centre}"
        );
    }

    #[test]
    fn earth_temperature_and_insolation() {
        // docs/science.md §2 checks [D]: Earth 278.33 K (A = 0), 254.59 K (A = 0.3),
        // 330.99 K (dayside only).
        let a = semi_major_axis_m(SIDEREAL_YEAR_D, 1.0, GM_EARTH) / R_SUN_M;
        assert!((equilibrium_temperature_k(5772.0, a, 0.0, 0.25) - 278.33).abs() < 0.01);
        assert!((equilibrium_temperature_k(5772.0, a, 0.3, 0.25) - 254.59).abs() < 0.01);
        assert!((equilibrium_temperature_k(5772.0, a, 0.0, 0.5) - 330.99).abs() < 0.01);
        // S/S⊕ = 1 at 1 au from a nominal Sun.
        assert!((insolation_earth(1.0, 5772.0, 1.0) - 1.0).abs() < 1e-12);
    }

    #[test]
    fn stellar_density_round_trips() {
        // docs/science.md §2 [D]: the solar mean density is 1409.8 kg m⁻³, and the
        // Earth transit at b = 0.3 (T14 = 12.5034 h, T23 = 12.2540 h)
        // recovers b = 0.300, a/R★ = 215.03 and ρ★ = 1409.8.
        assert!((star_density(1.0, 1.0) - 1409.8).abs() < 0.1);
        let k = R_EARTH_M / R_SUN_M;
        let (b, a) = impact_and_a_rstar(SIDEREAL_YEAR_D, 12.5034, 12.2540, k * k).unwrap();
        assert!((b - 0.300).abs() < 2e-3, "{b}");
        assert!((a - 215.03).abs() < 0.05, "{a}");
        let rho = density_from_a_rstar(a, SIDEREAL_YEAR_D);
        assert!((rho - 1409.8).abs() < 1.0, "{rho}");
        let a = a_rstar_from_duration(SIDEREAL_YEAR_D, 12.5034, k, 0.3).unwrap();
        assert!((density_from_a_rstar(a, SIDEREAL_YEAR_D) - 1409.8).abs() < 1.0);
        // Hot Jupiter b = 0.5 (2.5749 h / 1.9649 h) recovers b and a/R★ = 8.7536.
        let (b, a) = impact_and_a_rstar(3.0, 2.5749, 1.9649, 0.01).unwrap();
        assert!(
            (b - 0.5).abs() < 1e-3 && (a - 8.7536).abs() < 5e-3,
            "{b} {a}"
        );
    }

    #[test]
    fn no_orbit_outside_the_star_is_shorter_or_its_transit_longer() {
        // An orbit grazing the Sun (a = R☉) has the period 2πR☉/v with
        // v = v_esc/√2 and the Sun's surface escape velocity 617.7 km/s
        // (handbook value, from memory): 2.780 h. A Sun-dense star is the
        // least dense that a point mass can orbit in that time.
        let v = 617.7e3 / 2f64.sqrt();
        let p_d = 2.0 * PI * R_SUN_M / v / DAY_S;
        assert!((p_d * 24.0 - 2.780).abs() < 1e-3, "{}", p_d * 24.0);
        let least = least_density_for_orbit(p_d, 0.0);
        assert!(
            (least / star_density(1.0, 1.0) - 1.0).abs() < 1e-3,
            "{least}"
        );
        // And Kepler's law puts that orbit at a/R★ = 1 around the Sun.
        assert!((a_over_rstar(p_d, 1.0, 1.0) - 1.0).abs() < 1e-3);
        // A larger body needs (1 + k)³ the density.
        let ratio = least_density_for_orbit(p_d, 0.1) / least;
        assert!((ratio - 1.331).abs() < 1e-9, "{ratio}");
        // T₁₄ ≤ P/2 (Winn 2010 eq. 14, the arcsine at most π/2): a transit
        // of 0.7 P is no orbit, not the 0.3 P transit its sine equals.
        assert_eq!(longest_transit_h(1.0), 12.0);
        assert!(a_rstar_from_duration(1.0, 0.7 * 24.0, 0.02, 0.0).is_none());
        assert!(a_rstar_from_duration(1.0, 12.0, 0.02, 0.0).is_none());
        let a = a_rstar_from_duration(1.0, 0.3 * 24.0, 0.02, 0.0).unwrap();
        assert!((a - 1.02 / (0.3 * PI).sin()).abs() < 1e-12, "{a}");
    }

    #[test]
    fn the_roche_limit_sets_a_planets_least_density_by_its_period() {
        // Rappaport et al. 2013 (ApJ 773, L15), abstract: the 4.245 h orbit
        // of KOI 1843.03 needs a mean density ≳ 7 g cm⁻³.
        assert!((least_planet_density(4.245 / 24.0) - 7.0).abs() < 1e-3);
        // ρ_p ∝ P⁻²: twice the period, a quarter of the density; at 12.6 h
        // about 0.8 g cm⁻³, a Saturn's (0.69 g cm⁻³, from memory) at 13.5 h.
        let ratio = least_planet_density(0.5) / least_planet_density(1.0);
        assert!((ratio - 4.0).abs() < 1e-12);
        assert!((least_planet_density(13.5 / 24.0) - 0.692).abs() < 1e-3);
    }

    #[test]
    fn normalised_duration_ratio() {
        // docs/science.md §2 [D]: b_in = 0, b_out = 0.5 → ξ ≈ √(1/0.75) = 1.1547;
        // full formula with k = 0.02, P = 10 / 20 d: 1.1475.
        assert!(((1.0f64 / 0.75).sqrt() - 1.1547).abs() < 1e-4);
        let (ai, ao) = (a_over_rstar(10.0, 1.0, 1.0), a_over_rstar(20.0, 1.0, 1.0));
        let ti = durations_h(10.0, ai, 0.02, 0.0).unwrap().0;
        let to = durations_h(20.0, ao, 0.02, 0.5).unwrap().0;
        let xi = duration_ratio_xi(ti, 10.0, to, 20.0);
        assert!((xi - 1.1475).abs() < 5e-4, "{xi}");
    }

    #[test]
    fn hill_spacing() {
        // docs/science.md §3 checks [D] around 1 M☉ (M☉/M⊕ = 332,946.05, DE405).
        assert!((hill_separation(10.0, 15.0, 5.0, 5.0, 1.0) - 12.47).abs() < 0.01);
        assert!((hill_separation(10.0, 12.0, 5.0, 5.0, 1.0) - 5.63).abs() < 0.01);
        assert!((hill_separation(10.0, 20.0, 1.0, 1.0, 1.0) - 36.0).abs() < 0.05);
        // Critical ratios at Δ = 2√3 (Gladman 1993, from memory).
        assert!((HILL_CRITICAL - 2.0 * 3f64.sqrt()).abs() < 1e-15);
        let mj = crate::constants::M_SUN_PER_M_EARTH / crate::constants::M_SUN_PER_M_JUPITER;
        assert!((period_ratio_for_hill(HILL_CRITICAL, 1.0, 1.0, 1.0) - 1.0677).abs() < 1e-4);
        assert!((period_ratio_for_hill(HILL_CRITICAL, 10.0, 10.0, 1.0) - 1.1517).abs() < 1e-4);
        assert!((period_ratio_for_hill(HILL_CRITICAL, mj, mj, 1.0) - 1.5688).abs() < 1e-4);
        assert!((period_ratio_for_hill(10.0, 5.0, 5.0, 1.0) - 1.383).abs() < 1e-3);
        // 2√3/3^(1/3) = 2.4019 (docs/science.md §3, equivalent form).
        assert!((HILL_CRITICAL / 3f64.cbrt() - 2.4019).abs() < 1e-4);
    }

    #[test]
    fn mass_radius_table() {
        // docs/science.md §3 table [D]: Weiss & Marcy 2014, Wolfgang et al. 2016,
        // and R^2.06, with ρ⊕ = 5.495 g cm⁻³.
        assert!((earth_density_g_cm3() - 5.495).abs() < 1e-3);
        for (r, wm, wo, generic) in [
            (1.0, 1.059, 2.700, 1.000),
            (1.499, 4.604, 4.570, 2.302),
            (1.5, 3.922, 4.574, 2.305),
            (2.0, 5.125, 6.648, 4.170),
            (3.0, 7.473, 11.262, 9.613),
        ] {
            assert!(
                (mass_from_radius_mearth(r) - wm).abs() < 2e-3,
                "WM {r}: {}",
                mass_from_radius_mearth(r)
            );
            assert!((mass_wolfgang_2016(r) - wo).abs() < 2e-3, "Wolfgang {r}");
            assert!((r.powf(2.06) - generic).abs() < 2e-3, "R^2.06 {r}");
        }
    }
}

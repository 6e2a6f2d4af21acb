//! Out-of-transit light that varies with the orbit (docs/science.md §4.6):
//! a stellar companion raises tides on its star, which then shows the most
//! area, and is brightest, at quadrature and the least at both conjunctions
//! (ellipsoidal variation, at half the orbital period), and a companion as
//! bright as a star reflects and beams far more light than a planet can.
//! Each orbit is fitted on its own, against a line for the star's slow
//! drift, and the orbits' amplitudes are averaged with an error from their
//! own scatter, so red noise and spots widen the error instead of faking a
//! signal.

use statrs::distribution::{ContinuousCDF, StudentsT};

use super::{Ephemeris, LightCurve, Measure};

/// The most massive planet, in Jupiter masses: about the deuterium-burning
/// limit, 13 M_J (from memory); a heavier companion is no planet either.
pub const PLANET_MASS_MAX_MJUP: f64 = 13.0;

/// The largest ellipsoidal coefficient of a main-sequence star taken:
/// α = 0.15 (15 + u)(1 + τ)/(3 − u) (Morris 1985, ApJ 295, 143; Faigler &
/// Mazeh 2011, MNRAS 415, 3921, eq. 2; from memory) is about 1.0–1.5 for
/// limb darkening u = 0.3–0.8 and gravity darkening τ = 0.3–0.6; 2 is a
/// generous bound (common practice, no source).
pub const ALPHA_ELLIPSOIDAL_MAX: f64 = 2.0;

/// The one-sided false-alarm probability of the 3σ tests (docs/science.md
/// §4.3), Φ(−3).
const FALSE_ALARM: f64 = 0.0013499;

/// The fewest orbits whose amplitudes are averaged.
pub const MIN_ORBITS: usize = 4;

/// The fewest samples an orbit is fitted with, and per quarter of phase.
const MIN_SAMPLES: usize = 24;
const MIN_PER_QUARTER: usize = 3;

/// The largest semi-amplitude of ellipsoidal variation a planet could raise
/// on its star, ppm: A = α (M_p/M★)(R★/a)³ with sin i = 1, M_p = 13 M_J and
/// α = 2 (Faigler & Mazeh 2011, eq. 2; from memory).
pub fn ellipsoidal_ceiling_ppm(a_rstar: f64, star_mass_msun: f64) -> f64 {
    let mp_msun = PLANET_MASS_MAX_MJUP * crate::constants::GM_JUPITER / crate::constants::GM_SUN;
    ALPHA_ELLIPSOIDAL_MAX * mp_msun / star_mass_msun / a_rstar.powi(3) * 1e6
}

/// The orbit-locked variation out of transit: semi-amplitudes (ppm) of
/// flux that is lowest at the transit, at the orbital period (−cos 2πφ)
/// and at half of it (−cos 4πφ, ellipsoidal), each the mean over the orbits
/// fitted with its standard error, and the t a mean must reach to be
/// significant (one-sided 3σ for the orbits' count, Student's t).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PhaseVariation {
    pub at_period: Measure,
    pub at_half: Measure,
    pub orbits: usize,
    pub threshold_t: f64,
}

/// Sums of one orbit's normal equations for the model
/// flux = c₀ + c₁τ + c₂ cos 2πτ + c₃ sin 2πτ + c₄ cos 4πτ + c₅ sin 4πτ,
/// with τ the phase from mid-transit in (−½, ½].
#[derive(Default)]
struct Orbit {
    ata: [[f64; 6]; 6],
    atb: [f64; 6],
    quarters: [usize; 4],
    n: usize,
}

impl Orbit {
    fn add(&mut self, tau: f64, flux: f64) {
        let (c1, s1) = (
            (2.0 * std::f64::consts::PI * tau).cos(),
            (2.0 * std::f64::consts::PI * tau).sin(),
        );
        let x = [1.0, tau, c1, s1, c1 * c1 - s1 * s1, 2.0 * s1 * c1];
        for i in 0..6 {
            for j in 0..6 {
                self.ata[i][j] += x[i] * x[j];
            }
            self.atb[i] += x[i] * flux;
        }
        self.quarters[((tau + 0.5) * 4.0).clamp(0.0, 3.0) as usize] += 1;
        self.n += 1;
    }

    /// The two semi-amplitudes of flux lowest at the transit, relative,
    /// ppm; `None` when the orbit is too thinly sampled to fit.
    fn amplitudes(&self) -> Option<(f64, f64)> {
        if self.n < MIN_SAMPLES || self.quarters.iter().any(|&q| q < MIN_PER_QUARTER) {
            return None;
        }
        let c = solve6(self.ata, self.atb)?;
        (c[0] > 0.0).then(|| (-c[2] / c[0] * 1e6, -c[4] / c[0] * 1e6))
    }
}

/// Solves the 6×6 system a·x = b by Gaussian elimination with partial
/// pivoting; `None` when it is singular.
fn solve6(mut a: [[f64; 6]; 6], mut b: [f64; 6]) -> Option<[f64; 6]> {
    for col in 0..6 {
        let p = (col..6).max_by(|&i, &j| a[i][col].abs().total_cmp(&a[j][col].abs()))?;
        if a[p][col] == 0.0 || !a[p][col].is_finite() {
            return None;
        }
        a.swap(col, p);
        b.swap(col, p);
        let (pivot_row, pivot_b) = (a[col], b[col]);
        for (row, br) in a.iter_mut().zip(b.iter_mut()).skip(col + 1) {
            let f = row[col] / pivot_row[col];
            for (x, p) in row.iter_mut().zip(pivot_row).skip(col) {
                *x -= f * p;
            }
            *br -= f * pivot_b;
        }
    }
    let mut x = [0.0; 6];
    for r in (0..6).rev() {
        let s: f64 = (r + 1..6).map(|k| a[r][k] * x[k]).sum();
        x[r] = (b[r] - s) / a[r][r];
    }
    x.iter().all(|v| v.is_finite()).then_some(x)
}

/// Mean and standard error of `v`.
fn mean_and_error(v: &[f64]) -> Measure {
    let n = v.len() as f64;
    let mean = v.iter().sum::<f64>() / n;
    let var = v.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0);
    Measure {
        value: mean,
        err: (var / n).sqrt(),
    }
}

/// Measures the orbit-locked variation of `me` from the flux as read (each
/// segment normalised, no trend taken out: a trend window shorter than the
/// orbit would take the variation with it). Samples in `busy` (every
/// signal's transits) and within the transit's width of phase ½ (a
/// secondary eclipse) are left out. Each orbit of each stretch of data is
/// fitted alone. `None` with fewer than [`MIN_ORBITS`] orbits fitted.
pub fn measure(lc: &LightCurve, busy: &[bool], me: &Ephemeris) -> Option<PhaseVariation> {
    let half_width = 1.2 * me.half_d() / me.period_d;
    let mut orbits: std::collections::BTreeMap<(usize, i64), Orbit> = Default::default();
    for (s, r) in lc.stretches().enumerate() {
        for i in r {
            let t = lc.time[i];
            let tau = super::phase(t, me.period_d, me.epoch);
            if busy[i] || (0.5 - tau.abs()) < half_width || !lc.flux[i].is_finite() {
                continue;
            }
            orbits
                .entry((s, me.cycle(t)))
                .or_default()
                .add(tau, lc.flux[i]);
        }
    }
    let (full, half): (Vec<f64>, Vec<f64>) = orbits.values().filter_map(Orbit::amplitudes).unzip();
    if full.len() < MIN_ORBITS {
        return None;
    }
    let dof = (full.len() - 1) as f64;
    let threshold_t = StudentsT::new(0.0, 1.0, dof)
        .ok()?
        .inverse_cdf(1.0 - FALSE_ALARM);
    Some(PhaseVariation {
        at_period: mean_and_error(&full),
        at_half: mean_and_error(&half),
        orbits: full.len(),
        threshold_t,
    })
}

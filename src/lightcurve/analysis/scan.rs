//! Two searches over the whole orbit of a candidate: the deepest eclipse at
//! any phase outside the transit (an eccentric binary's secondary is not at
//! phase 0.5), and whether the catalogue's transit is in the light curve at
//! all (docs/science.md §4.3, §4.4).

use statrs::distribution::{ContinuousCDF, Normal};

use super::{Ephemeris, Measure};

/// The most significant dip at the candidate's period away from its
/// transit: where (phase in cycles, 0 = mid-transit), how deep, and the Z it
/// must reach to count after the number of phases searched.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Eclipse {
    pub phase: f64,
    pub depth: Measure,
    /// Z needed: the one-sided 3σ false-alarm probability shared over the
    /// independent phases searched (Bonferroni).
    pub threshold_z: f64,
}

/// The one-sided tail probability of a 3σ excess (Φ(−3) = 0.0013499,
/// standard normal tables).
const P_3SIGMA: f64 = 0.001_349_9;

/// Z a maximum over `trials` independent phases must reach to be as
/// unlikely as one 3σ excess: Φ⁻¹(1 − P₃/trials).
pub fn trials_threshold(trials: f64) -> f64 {
    let n = Normal::standard();
    n.inverse_cdf(1.0 - P_3SIGMA / trials.max(1.0))
}

/// The dips of the whole orbit at the candidate's period: the samples are
/// binned by orbital offset in steps of a quarter of the transit duration,
/// and a box of half the duration (two steps, as the transit's own depth
/// box) is slid a step at a time; boxes closer than 1.7 half-durations to
/// mid-transit (the transit and its wings) are passed over. Each box: its
/// phase (cycles) and depth = baseline − box mean with the white error
/// `sigma`/√n. Empty when the period is too short or too long to scan.
pub fn phase_boxes(
    time: &[f64],
    flux: &[f64],
    skip: &[bool],
    me: &Ephemeris,
    baseline: f64,
    sigma: f64,
) -> Vec<(f64, Measure)> {
    let (p, half) = (me.period_d, me.duration_h / 48.0);
    if !(p > 0.0 && half > 0.0 && sigma > 0.0) {
        return Vec::new();
    }
    let step = half / 2.0;
    let bins = (p / step).ceil();
    if !(8.0..=4.0e6).contains(&bins) {
        return Vec::new();
    }
    let bins = bins as usize;
    let (mut sum, mut count) = (vec![0.0; bins], vec![0u32; bins]);
    for i in 0..time.len() {
        if skip[i] {
            continue;
        }
        let x = me.offset_d(time[i]).rem_euclid(p);
        let b = ((x / step) as usize).min(bins - 1);
        sum[b] += flux[i];
        count[b] += 1;
    }
    (0..bins)
        .filter_map(|b| {
            let c = (b + 1) % bins;
            let centre = (b + 1) as f64 * step;
            let n = count[b] + count[c];
            (centre.min(p - centre) >= 1.7 * half && n >= 3).then(|| {
                (
                    centre / p,
                    Measure {
                        value: (baseline - (sum[b] + sum[c]) / n as f64) * 1e6,
                        err: sigma / (n as f64).sqrt() * 1e6,
                    },
                )
            })
        })
        .collect()
}

/// The same boxes as [`phase_boxes`], each measured against its own
/// neighbourhood instead of a fitted trend, so that no trend takes up part
/// of an eclipse anywhere in the orbit (a trend fitted through an unmasked
/// eclipse takes up to a third of it). The flux, not detrended, is binned
/// in time in steps of a quarter of the duration; at every step a core of
/// half the duration is compared with the ring 1.2–3 half-durations around
/// it (as a single transit's depth is in `diagnose`): depth = ring mean −
/// core mean, white variance σ²(1/n_core + 1/n_ring). Each such depth is
/// added, by inverse variance, to the orbital-phase box its core falls in.
/// `skip` marks samples of the candidate's own and the other signals'
/// transits. Empty when the time grid would be too fine (falls back to
/// [`phase_boxes`]).
pub fn phase_boxes_local(
    time: &[f64],
    flux: &[f64],
    skip: &[bool],
    me: &Ephemeris,
    sigma: f64,
) -> Vec<(f64, Measure)> {
    let (p, half) = (me.period_d, me.duration_h / 48.0);
    if time.is_empty() || !(p > 0.0 && half > 0.0 && sigma > 0.0) {
        return Vec::new();
    }
    let step = half / 2.0;
    let phase_bins = (p / step).ceil();
    let span = time[time.len() - 1] - time[0];
    let time_bins = (span / step).ceil() + 1.0;
    if !(8.0..=4.0e6).contains(&phase_bins) || !(16.0..=2.0e7).contains(&time_bins) {
        return Vec::new();
    }
    let (phase_bins, time_bins) = (phase_bins as usize, time_bins as usize);
    let (mut sum, mut count) = (vec![0.0; time_bins], vec![0u32; time_bins]);
    for i in 0..time.len() {
        if !skip[i] {
            let b = (((time[i] - time[0]) / step) as usize).min(time_bins - 1);
            sum[b] += flux[i];
            count[b] += 1;
        }
    }
    let (mut wsum, mut w) = (vec![0.0; phase_bins], vec![0.0; phase_bins]);
    for j in 5..time_bins.saturating_sub(7) {
        let (ci, ni) = (sum[j] + sum[j + 1], count[j] + count[j + 1]);
        let ring = (j - 5..=j - 2).chain(j + 3..=j + 6);
        let (co, no) = ring.fold((0.0, 0u32), |a, b| (a.0 + sum[b], a.1 + count[b]));
        if ni < 2 || no < 4 {
            continue;
        }
        let depth = co / no as f64 - ci / ni as f64;
        let var = sigma * sigma * (1.0 / ni as f64 + 1.0 / no as f64);
        let centre = time[0] + (j + 1) as f64 * step;
        let x = me.offset_d(centre).rem_euclid(p);
        // The phase box whose centre is nearest: box b spans bins b, b+1,
        // centred at (b + 1)·step.
        let b = (((x / step).round() as usize) + phase_bins - 1) % phase_bins;
        wsum[b] += depth / var;
        w[b] += 1.0 / var;
    }
    (0..phase_bins)
        .filter_map(|b| {
            let centre = (b + 1) as f64 * step;
            (centre.min(p - centre) >= 1.7 * half && w[b] > 0.0).then(|| {
                (
                    (centre / p).rem_euclid(1.0),
                    Measure {
                        value: wsum[b] / w[b] * 1e6,
                        err: 1e6 / w[b].sqrt(),
                    },
                )
            })
        })
        .collect()
}

/// The deepest of the [`phase_boxes`], its error multiplied by `factor`
/// (the noise factor of every box depth), with the Z it must reach.
pub fn deepest_eclipse(boxes: &[(f64, Measure)], factor: f64) -> Option<Eclipse> {
    let (phase, white) = boxes
        .iter()
        .copied()
        .max_by(|a, b| a.1.z().total_cmp(&b.1.z()))?;
    // Boxes overlap by half, so about half of them are independent.
    Some(Eclipse {
        phase,
        depth: Measure {
            value: white.value,
            err: white.err * factor,
        },
        threshold_z: trials_threshold(boxes.len() as f64 / 2.0),
    })
}

/// Whether the light curve shows the catalogue's signal.
#[derive(Clone, Debug, PartialEq)]
pub enum Recovery {
    /// The measured depth agrees with the catalogue's, or the test cannot
    /// tell.
    Shown,
    /// No sample of the light curve falls within a transit of the
    /// ephemeris (first and last time of the light curve).
    NoTransitInData { first: f64, last: f64 },
    /// Every transit in the data falls on another signal's transit, which
    /// is masked: the depth cannot be measured, which says nothing against
    /// the signal (not a flag).
    Hidden,
    /// The measured depth is below half the catalogue's and inconsistent
    /// with it: Z = (δ_cat − δ)/√(σ² + σ_cat²).
    TooShallow { catalogue_ppm: f64, z: f64 },
}

/// Compares the measured central depth with the catalogue's, whose error is
/// δ_cat/SNR when the catalogue gives an SNR (else the measurement's error
/// alone). Not recovered when Z ≥ `z_min` and the measured depth is below
/// half the catalogue's (a physical size as well as a significance: common
/// practice, no source). `in_transit` counts the samples in the central
/// half of the transits, and how many of them are not masked by another
/// signal.
pub fn recovery(
    measured: Measure,
    (in_transit, unmasked): (usize, usize),
    span: (f64, f64),
    catalogue_ppm: Option<f64>,
    catalogue_snr: Option<f64>,
    z_min: f64,
) -> Recovery {
    if in_transit == 0 {
        return Recovery::NoTransitInData {
            first: span.0,
            last: span.1,
        };
    }
    if unmasked == 0 {
        return Recovery::Hidden;
    }
    let Some(cat) = catalogue_ppm.filter(|d| *d > 0.0) else {
        return Recovery::Shown;
    };
    if !(measured.value.is_finite() && measured.err > 0.0) {
        return Recovery::Shown;
    }
    let cat_err = catalogue_snr.filter(|s| *s > 0.0).map_or(0.0, |s| cat / s);
    let z = (cat - measured.value) / (measured.err.powi(2) + cat_err.powi(2)).sqrt();
    if z >= z_min && measured.value < 0.5 * cat {
        Recovery::TooShallow {
            catalogue_ppm: cat,
            z,
        }
    } else {
        Recovery::Shown
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn trials_threshold_is_three_sigma_for_one_trial() {
        // Φ⁻¹(1 − 0.0013499) = 3.000 (standard normal tables).
        assert!((trials_threshold(1.0) - 3.0).abs() < 1e-3);
        // 100 trials: Φ⁻¹(1 − 1.3499e-5) = 4.1974 (Python's
        // statistics.NormalDist().inv_cdf, computed offline).
        let z = trials_threshold(100.0);
        assert!((z - 4.1974).abs() < 1e-3, "{z}");
    }

    #[test]
    fn recovery_needs_both_a_significance_and_a_size() {
        let m = |v, e| Measure { value: v, err: e };
        // 13 ± 9 ppm against 54.5 ppm at SNR 11: Z = 41.5/√(81 + 24.5) = 4.04.
        match recovery(
            m(13.0, 9.0),
            (100, 100),
            (0.0, 1.0),
            Some(54.5),
            Some(11.0),
            3.0,
        ) {
            Recovery::TooShallow { z, .. } => assert!((z - 4.04).abs() < 0.01, "{z}"),
            other => panic!("{other:?}"),
        }
        // 40 ± 2 ppm against 54.5: significant but not below half.
        assert_eq!(
            recovery(
                m(40.0, 2.0),
                (100, 100),
                (0.0, 1.0),
                Some(54.5),
                Some(11.0),
                3.0
            ),
            Recovery::Shown
        );
        // Below half but within the noise.
        assert_eq!(
            recovery(m(20.0, 30.0), (100, 100), (0.0, 1.0), Some(54.5), None, 3.0),
            Recovery::Shown
        );
        assert!(matches!(
            recovery(
                m(f64::NAN, f64::NAN),
                (0, 0),
                (1.0, 2.0),
                Some(54.5),
                None,
                3.0
            ),
            Recovery::NoTransitInData { .. }
        ));
        // Transits in the data, all under another signal's: not measured,
        // not a flag.
        assert_eq!(
            recovery(
                m(f64::NAN, f64::NAN),
                (24, 0),
                (1.0, 2.0),
                Some(54.5),
                None,
                3.0
            ),
            Recovery::Hidden
        );
    }
}

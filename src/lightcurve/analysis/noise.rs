//! How noisy a box depth really is: the white scatter times the largest of
//! four factors, each at least 1 — β of the binned residuals, the excess
//! scatter of the per-transit depths, the scatter of boxes slid over the
//! orbit, and "null transits" measured exactly as a transit is
//! (docs/science.md §4.1).

use super::{Ephemeris, Measure, median_of};

/// How much more the per-transit depths scatter than their white errors
/// allow: √(χ²/(n − 2)) about the mean of the odd and the mean of the even
/// transits separately (so that a binary's alternating depths do not count
/// as noise), at least 1; 1 with fewer than four transits. This catches
/// noise at the transit's own time scale that β, measured out of transit,
/// misses: a trend interpolated across a long masked transit, spots
/// (docs/science.md §4.1).
pub fn transit_scatter_factor(depths: &[Measure], odd: &[bool]) -> f64 {
    let n = depths.len();
    if n < 4 {
        return 1.0;
    }
    let mut chi2 = 0.0;
    for parity in [false, true] {
        let (mut sw, mut swx) = (0.0, 0.0);
        for (d, _) in depths.iter().zip(odd).filter(|(_, o)| **o == parity) {
            let w = 1.0 / (d.err * d.err);
            sw += w;
            swx += w * d.value;
        }
        if sw == 0.0 {
            continue;
        }
        let mean = swx / sw;
        chi2 += depths
            .iter()
            .zip(odd)
            .filter(|(_, o)| **o == parity)
            .map(|(d, _)| ((d.value - mean) / d.err).powi(2))
            .sum::<f64>();
    }
    let f = (chi2 / (n - 2) as f64).sqrt();
    if f.is_finite() { f.max(1.0) } else { 1.0 }
}

/// The time-averaging factor β of correlated noise (Pont, Zucker & Queloz
/// 2006, MNRAS 373, 231; the binning form of Winn et al. 2008, ApJ 683,
/// 1076; docs/science.md §4.1): the out-of-transit residuals (in time order)
/// are averaged in M bins of n samples for bins of ½, 1 and 2 transit
/// durations; β = σ_n / [σ₁/√n · √(M/(M−1))], averaged over the bin sizes,
/// never below 1. σ₁ is the white scatter (point to point).
pub fn red_noise_beta(residuals: &[f64], sigma1: f64, cadence_d: f64, t14_d: f64) -> f64 {
    if !(sigma1 > 0.0 && cadence_d > 0.0 && t14_d > 0.0) {
        return 1.0;
    }
    let mut betas = Vec::new();
    for width in [0.5, 1.0, 2.0] {
        let n = ((width * t14_d / cadence_d).round() as usize).max(2);
        let m = residuals.len() / n;
        if m < 8 {
            continue;
        }
        let means: Vec<f64> = residuals
            .chunks_exact(n)
            .map(|c| c.iter().sum::<f64>() / n as f64)
            .collect();
        let mean = means.iter().sum::<f64>() / m as f64;
        let var = means.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (m - 1) as f64;
        let expected = sigma1 / (n as f64).sqrt() * (m as f64 / (m - 1) as f64).sqrt();
        betas.push(var.sqrt() / expected);
    }
    if betas.is_empty() {
        return 1.0;
    }
    (betas.iter().sum::<f64>() / betas.len() as f64).max(1.0)
}

/// The median time step of a light curve, days.
pub(super) fn cadence_d(time: &[f64]) -> f64 {
    let mut d: Vec<f64> = time
        .windows(2)
        .map(|w| w[1] - w[0])
        .filter(|x| *x > 0.0)
        .collect();
    if d.is_empty() {
        return f64::NAN;
    }
    median_of(&mut d)
}

/// How much more the boxes of [`phase_boxes`] scatter than their white
/// errors say: 1.4826 × the median absolute deviation of their pulls,
/// at least 1 (a robust σ, untouched by a real eclipse at a few phases). An
/// empirical error for a box of the transit's width at this period, with
/// every kind of noise in it: red noise, trend residuals, spots
/// (docs/science.md §4.1). 1 with fewer than 16 boxes.
pub fn phase_scatter_factor(boxes: &[(f64, Measure)]) -> f64 {
    if boxes.len() < 16 {
        return 1.0;
    }
    let mut pulls: Vec<f64> = boxes.iter().map(|(_, m)| m.value / m.err).collect();
    robust_spread(&mut pulls)
}

/// The noise of a transit depth measured exactly as the transit's is, from
/// "null transits": up to six windows per orbit where the star shows no
/// known signal (at phases 1/8, 1/4, 3/8, 5/8, 3/4, 7/8, as many as leave
/// most of the light curve unmasked) are masked while the trend is fitted,
/// as a transit is; then each one's depth (1 − the mean detrended flux in
/// its central half, per orbit) is divided by its white error
/// `sigma`/√n. Returns 1.4826 × the MAD of these pulls, at least 1 (1 with
/// fewer than 24 of them). Red noise on the transit's time scale and the
/// trend's error across a masked window are both in it
/// (docs/science.md §4.1).
pub fn null_scatter_factor(
    lc: &crate::lightcurve::LightCurve,
    me: &Ephemeris,
    others: &[Ephemeris],
    settings: &super::DetrendSettings,
    sigma: f64,
) -> f64 {
    let half = me.duration_h / 48.0;
    if !(half > 0.0 && me.period_d > 0.0 && sigma > 0.0) {
        return 1.0;
    }
    // Each masked window is 2.4 half-durations wide; the transit and phase
    // 0.5 are masked already. Keep the masked share of an orbit under 40 %.
    let fits = ((0.4 * me.period_d / (2.4 * half)) as usize).saturating_sub(2);
    let phases: Vec<f64> = [0.25, 0.75, 0.125, 0.875, 0.375, 0.625]
        .into_iter()
        .take(fits.min(6))
        .collect();
    if phases.len() < 2 {
        return 1.0;
    }
    let nulls: Vec<Ephemeris> = phases
        .iter()
        .map(|ph| Ephemeris {
            epoch: me.epoch + ph * me.period_d,
            ..*me
        })
        .collect();
    let mut masked_for_trend = vec![*me];
    masked_for_trend.extend_from_slice(others);
    masked_for_trend.extend_from_slice(&nulls);
    let flux = super::detrend(lc, &masked_for_trend, settings);
    let busy = super::in_transit(&lc.time, others, 1.2);
    let mut per: std::collections::HashMap<(usize, i64), (f64, u32)> = Default::default();
    for (i, &t) in lc.time.iter().enumerate() {
        if busy[i] {
            continue;
        }
        for (k, e) in nulls.iter().enumerate() {
            if e.offset_d(t).abs() < half / 2.0 {
                let slot = per.entry((k, e.cycle(t))).or_insert((0.0, 0));
                slot.0 += 1.0 - flux[i];
                slot.1 += 1;
            }
        }
    }
    let mut pulls: Vec<f64> = per
        .values()
        .filter(|(_, n)| *n >= 2)
        .map(|(s, n)| (s / *n as f64) / (sigma / (*n as f64).sqrt()))
        .collect();
    if pulls.len() < 24 {
        return 1.0;
    }
    robust_spread(&mut pulls)
}

/// The spread of pulls that white noise would give as 1: 1.4826 × their
/// median absolute deviation (the MAD of a Gaussian times 1.4826 is its σ),
/// at least 1; 1 when it cannot be computed. Reorders `pulls`.
fn robust_spread(pulls: &mut [f64]) -> f64 {
    let centre = median_of(pulls);
    let mut dev: Vec<f64> = pulls.iter().map(|z| (z - centre).abs()).collect();
    let f = 1.4826 * median_of(&mut dev);
    if f.is_finite() { f.max(1.0) } else { 1.0 }
}

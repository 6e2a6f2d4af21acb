//! Detrending, folding, binning and the light-curve diagnostics of a
//! candidate: measured depth and SNR, odd/even depths, the secondary
//! eclipse, per-transit depth consistency and the transit's shape
//! (docs/science.md §4).

use statrs::distribution::{ChiSquared, ContinuousCDF};

use super::{LightCurve, median_of};
use crate::flags::Flag;

mod fold;
mod noise;
mod phase;
mod scan;
pub use fold::{Binned, SHAPE_CELLS, Views, fold_bin, keep_parity, shape_cells, views};
use noise::cadence_d;
pub use noise::{
    null_scatter_factor, phase_scatter_factor, red_noise_beta, transit_scatter_factor,
};
pub use phase::{MIN_ORBITS, PhaseVariation, ellipsoidal_ceiling_ppm};
pub use scan::{
    Eclipse, Recovery, deepest_eclipse, phase_boxes, phase_boxes_local, recovery, trials_threshold,
};

/// Period, epoch and total duration of one signal.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Ephemeris {
    pub period_d: f64,
    pub epoch: f64,
    pub duration_h: f64,
}

impl Ephemeris {
    /// Time from the nearest mid-transit, days.
    pub fn offset_d(&self, t: f64) -> f64 {
        let x = (t - self.epoch) / self.period_d;
        (x - x.round()) * self.period_d
    }

    /// The number of the nearest transit (0 at the epoch).
    pub fn cycle(&self, t: f64) -> i64 {
        ((t - self.epoch) / self.period_d).round() as i64
    }

    fn half_d(&self) -> f64 {
        self.duration_h / 48.0
    }
}

/// Phase in cycles, in [−0.5, 0.5), 0 at mid-transit.
pub fn phase(t: f64, period_d: f64, epoch: f64) -> f64 {
    let x = (t - epoch) / period_d + 0.5;
    x - x.floor() - 0.5
}

/// How to remove slow stellar and instrumental variability.
#[derive(Clone, Debug, PartialEq)]
pub struct DetrendSettings {
    pub enabled: bool,
    /// The running-median window as a multiple of the longest transit
    /// duration of the star's candidates (about 3, per the light-curve issue).
    pub window_factor: f64,
    /// The shortest window, hours.
    pub min_window_h: f64,
}

impl Default for DetrendSettings {
    fn default() -> DetrendSettings {
        DetrendSettings {
            enabled: true,
            window_factor: 3.0,
            min_window_h: 6.0,
        }
    }
}

/// True for samples inside any of the transits, widened by `widen` × the
/// half duration.
pub fn in_transit(time: &[f64], signals: &[Ephemeris], widen: f64) -> Vec<bool> {
    time.iter()
        .map(|&t| {
            signals
                .iter()
                .any(|s| s.offset_d(t).abs() < s.half_d() * widen)
        })
        .collect()
}

/// The slow trend under a light curve: on a grid every fifth of a window, a
/// straight line fitted to the unmasked samples within `window_d` days,
/// refitted once without the samples beyond 3σ (a robust running line, which
/// stays unbiased where masked transits leave samples on one side only),
/// read at the grid point and interpolated linearly between grid points.
pub fn running_median_trend(time: &[f64], flux: &[f64], mask: &[bool], window_d: f64) -> Vec<f64> {
    let n = time.len();
    if n == 0 {
        return Vec::new();
    }
    let step = window_d / 5.0;
    // A grid finer than the float spacing of the times could not advance.
    let nodes = (time[n - 1] - time[0]) / step;
    if step.is_nan() || step <= 0.0 || nodes.is_nan() || nodes >= 1e9 {
        return vec![1.0; n];
    }
    let (t0, t1) = (time[0], time[n - 1]);
    // Grid nodes are visited only where there are samples: a gap (or one
    // stray timestamp far away) is jumped over, so the work and memory are
    // bounded by the number of samples, never by the time span.
    let mut grid: Vec<(f64, f64)> = Vec::new();
    let (mut lo, mut hi) = (0usize, 0usize);
    let mut pts: Vec<(f64, f64)> = Vec::new();
    let mut g = 0.0_f64;
    while t0 + g * step <= t1 + step {
        let tc = t0 + g * step;
        g += 1.0;
        while lo < n && time[lo] < tc - window_d / 2.0 {
            lo += 1;
        }
        while hi < n && time[hi] <= tc + window_d / 2.0 {
            hi += 1;
        }
        if lo == hi {
            // No sample in this window: go to the first node whose window
            // reaches the next sample.
            match time.get(hi) {
                Some(&next) => {
                    let jump = ((next - window_d / 2.0 - t0) / step).floor();
                    g = g.max(jump);
                    continue;
                }
                None => break,
            }
        }
        pts.clear();
        pts.extend(
            (lo..hi)
                .filter(|&i| !mask[i])
                .map(|i| (time[i] - tc, flux[i])),
        );
        if let Some(v) = robust_line_at_zero(&mut pts) {
            grid.push((tc, v));
        }
    }
    if grid.is_empty() {
        return vec![1.0; n];
    }
    let mut j = 0;
    time.iter()
        .map(|&t| {
            while j + 1 < grid.len() && grid[j + 1].0 <= t {
                j += 1;
            }
            match grid.get(j + 1) {
                Some(&(tb, fb)) if grid[j].0 <= t => {
                    let (ta, fa) = grid[j];
                    fa + (fb - fa) * (t - ta) / (tb - ta)
                }
                _ => grid[j].1,
            }
        })
        .collect()
}

/// Least-squares line through (x, y), refitted once without points beyond
/// 3σ of the first fit; returns its value at x = 0. `None` with < 5 points.
fn robust_line_at_zero(pts: &mut Vec<(f64, f64)>) -> Option<f64> {
    let fit = |pts: &[(f64, f64)]| -> Option<(f64, f64)> {
        let n = pts.len() as f64;
        if pts.len() < 5 {
            return None;
        }
        let (sx, sy) = pts.iter().fold((0.0, 0.0), |a, p| (a.0 + p.0, a.1 + p.1));
        let (mx, my) = (sx / n, sy / n);
        let (sxx, sxy) = pts.iter().fold((0.0, 0.0), |a, p| {
            (a.0 + (p.0 - mx).powi(2), a.1 + (p.0 - mx) * (p.1 - my))
        });
        let slope = if sxx > 0.0 { sxy / sxx } else { 0.0 };
        Some((my - slope * mx, slope))
    };
    let (a, b) = fit(pts)?;
    let rms =
        (pts.iter().map(|p| (p.1 - a - b * p.0).powi(2)).sum::<f64>() / pts.len() as f64).sqrt();
    pts.retain(|p| (p.1 - a - b * p.0).abs() <= 3.0 * rms);
    Some(fit(pts).map_or(a, |f| f.0))
}

/// The light curve divided by its trend, with every known transit of the
/// star masked while the trend is estimated, and the window half an orbit
/// later too: a trend fitted through a secondary eclipse takes up part of
/// its depth (a third of it, for a 3 h eclipse under a 9 h window), and the
/// secondary check measures there. Segments are detrended each on its own.
pub fn detrend(lc: &LightCurve, signals: &[Ephemeris], s: &DetrendSettings) -> Vec<f64> {
    if !s.enabled {
        return lc.flux.clone();
    }
    let longest_h = signals.iter().map(|e| e.duration_h).fold(0.0, f64::max);
    let window_d = (s.window_factor * longest_h).max(s.min_window_h) / 24.0;
    let halves: Vec<Ephemeris> = signals
        .iter()
        .map(|e| Ephemeris {
            epoch: e.epoch + e.period_d / 2.0,
            ..*e
        })
        .collect();
    let mut mask = in_transit(&lc.time, signals, 1.2);
    for (m, h) in mask.iter_mut().zip(in_transit(&lc.time, &halves, 1.2)) {
        *m |= h;
    }
    // Each stretch (a segment, or segments that overlap in time) on its
    // own: a trend never bridges the gap between two segments.
    let mut out = Vec::with_capacity(lc.flux.len());
    for r in lc.stretches() {
        let (t, f) = (&lc.time[r.clone()], &lc.flux[r.clone()]);
        let trend = running_median_trend(t, f, &mask[r], window_d);
        out.extend(f.iter().zip(&trend).map(|(f, t)| f / t));
    }
    out
}

/// A measured quantity with its 1σ uncertainty.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Measure {
    pub value: f64,
    pub err: f64,
}

impl Measure {
    /// Significance value/err.
    pub fn z(&self) -> f64 {
        self.value / self.err
    }
}

/// Odd/even depth difference in σ: Z = |δ_odd − δ_even| / √(σ_odd² + σ_even²)
/// (docs/science.md §4).
pub fn odd_even_z(odd: Measure, even: Measure) -> f64 {
    (odd.value - even.value).abs() / (odd.err.powi(2) + even.err.powi(2)).sqrt()
}

/// Per-transit depth consistency: χ² = Σ (δᵢ − δ̄)²/σᵢ² about the
/// inverse-variance weighted mean δ̄, n − 1 degrees of freedom, and p from
/// the χ² survival function (statrs). `None` with fewer than two depths.
pub fn depth_consistency(depths: &[Measure]) -> Option<(f64, usize, f64)> {
    if depths.len() < 2 {
        return None;
    }
    let w: Vec<f64> = depths.iter().map(|d| 1.0 / (d.err * d.err)).collect();
    let mean = depths.iter().zip(&w).map(|(d, w)| d.value * w).sum::<f64>() / w.iter().sum::<f64>();
    let chi2: f64 = depths
        .iter()
        .map(|d| ((d.value - mean) / d.err).powi(2))
        .sum();
    let dof = depths.len() - 1;
    let p = ChiSquared::new(dof as f64).ok()?.sf(chi2);
    Some((chi2, dof, p))
}

/// Largest secondary-eclipse depth reflected light could give, ppm:
/// A_g k² (R★/a)² with A_g = 1 (docs/science.md §4).
pub fn reflected_ceiling_ppm(ror: f64, a_rstar: f64) -> f64 {
    ror * ror / (a_rstar * a_rstar) * 1e6
}

/// Thermal secondary-eclipse depth, ppm: k² B_λ(T_day)/B_λ(T_eff) at
/// wavelength `lambda_m`, with the dayside at T_day = T_eff √(R★/a) (2/3)^{1/4}
/// (no redistribution; docs/science.md §4, physics from Winn 2010).
pub fn thermal_depth_ppm(ror: f64, a_rstar: f64, teff_k: f64, lambda_m: f64) -> f64 {
    // Planck: B ∝ 1/(exp(hc/λkT) − 1); hc/k = 0.014387769 m K (CODATA 2018).
    let c2 = 0.014_387_769;
    let t_day = teff_k * (1.0 / a_rstar).sqrt() * (2.0f64 / 3.0).powf(0.25);
    let planck = |t: f64| 1.0 / ((c2 / (lambda_m * t)).exp_m1());
    ror * ror * planck(t_day) / planck(teff_k) * 1e6
}

/// What the star and the candidate are, for the diagnostics.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Context {
    /// R_p/R★ (from `ror`, else √depth).
    pub ror: f64,
    /// a/R★, if known.
    pub a_rstar: Option<f64>,
    pub teff_k: Option<f64>,
    /// The catalogue's depth (ppm) and SNR, which the light curve should
    /// reproduce.
    pub catalogue_depth_ppm: Option<f64>,
    pub catalogue_snr: Option<f64>,
    /// M★ in solar masses, if known (else its radius stands for it, as on
    /// the main sequence), for the ellipsoidal ceiling.
    pub star_mass_msun: Option<f64>,
}

/// The light-curve diagnostics of one candidate.
#[derive(Clone, Debug, PartialEq)]
pub struct Diagnostics {
    /// Depth from the central half of the transits, ppm.
    pub depth: Measure,
    pub snr: f64,
    pub odd: Measure,
    pub even: Measure,
    pub odd_even_z: f64,
    /// Depth at phase 0.5 with the transit's duration, ppm.
    pub secondary: Measure,
    /// The deepest dip anywhere else in the orbit, outside the transit.
    pub eclipse: Option<Eclipse>,
    /// Whether the catalogue's transit is in the light curve.
    pub recovery: Recovery,
    pub reflected_ceiling_ppm: Option<f64>,
    pub thermal_ppm: Option<f64>,
    /// The light out of transit that varies with the orbit (§4.6), and the
    /// most ellipsoidal variation a planet could raise, ppm.
    pub phase: Option<PhaseVariation>,
    pub ellipsoidal_ceiling_ppm: Option<f64>,
    /// (χ², degrees of freedom, p) of the per-transit depths.
    pub consistency: Option<(f64, usize, f64)>,
    pub transits_seen: usize,
    /// Best-fit flat-bottom fraction T₂₃/T₁₄ of a trapezoid (0 = V-shaped).
    pub flat_fraction: f64,
    /// χ² of the best flat-bottomed (T₂₃/T₁₄ ≥ 0.5) minus the best V-shaped
    /// (≤ 0.15) trapezoid: large and positive means V-shaped.
    pub v_shape_dchi2: f64,
    /// Point-to-point scatter of the detrended out-of-transit flux.
    pub scatter: f64,
    /// Flags raised, with the numbers behind them.
    pub findings: Vec<(Flag, String)>,
    /// Each transit's depth (ppm, white-noise error) with its mid-time:
    /// the per-transit depths the consistency test and the noise factor use.
    pub per_transit: Vec<(f64, Measure)>,
    /// The measured fold in [`SHAPE_CELLS`] cells across ± 2 durations of
    /// mid-transit: the mean relative drop (1 − flux) of each, NaN where no
    /// sample falls (for the browser's sparkline).
    pub shape: [f32; SHAPE_CELLS],
}

/// Z of the odd/even and secondary tests at which a flag fires (docs/science.md §4).
pub const FLAG_Z: f64 = 3.0;

/// Computes the diagnostics of signal `me` from a star's light curve;
/// `others` are the star's other signals, masked while `me` is measured.
pub fn diagnose(
    lc: &LightCurve,
    me: &Ephemeris,
    others: &[Ephemeris],
    ctx: &Context,
    detrend_settings: &DetrendSettings,
) -> Diagnostics {
    // The trend is estimated with every known transit masked, and the
    // phase-0.5 windows too (see `detrend`), so that a secondary eclipse is
    // not mistaken for variability; the folds the browser and `fold` draw
    // use the same trend.
    let mut all = vec![*me];
    all.extend_from_slice(others);
    let flux = detrend(lc, &all, detrend_settings);
    diagnose_detrended(lc, &flux, me, others, ctx, detrend_settings)
}

/// `diagnose` on a flux already detrended with every signal of the star
/// (the trend is the star's, shared by its candidates).
pub fn diagnose_detrended(
    lc: &LightCurve,
    flux: &[f64],
    me: &Ephemeris,
    others: &[Ephemeris],
    ctx: &Context,
    settings: &DetrendSettings,
) -> Diagnostics {
    let half = me.half_d();
    let dt: Vec<f64> = lc.time.iter().map(|&t| me.offset_d(t)).collect();
    // The star's other signals are masked, except those that share the
    // transits of this one (a copy, or a harmonic of it): masking them
    // would hide this signal itself.
    let core_samples: Vec<usize> = (0..dt.len())
        .filter(|&i| dt[i].abs() < half / 2.0)
        .collect();
    let apart: Vec<Ephemeris> = others
        .iter()
        .filter(|o| !shares_transits(me, o))
        .copied()
        .collect();
    let masked_others = in_transit(&lc.time, &apart, 1.2);
    // Baseline and per-sample scatter from the out-of-transit, detrended
    // flux; the scatter from neighbour differences, which a running-median
    // trend cannot absorb (a scatter about the trend would be too small).
    let mut out_of_transit: Vec<f64> = (0..flux.len())
        .filter(|&i| !masked_others[i] && dt[i].abs() > 1.2 * half)
        .map(|i| flux[i])
        .collect();
    let scatter = super::point_to_point_sigma(&out_of_transit);
    let beta = red_noise_beta(&out_of_transit, scatter, cadence_d(&lc.time), 2.0 * half);
    let baseline = median_of(&mut out_of_transit);
    // Per-transit depths against each transit's own neighbourhood
    // (1.2–3 half-durations from mid-transit), so that what the trend left
    // locally cancels; transits with at least three samples in each.
    let mut per: std::collections::BTreeMap<i64, [(f64, usize); 2]> = Default::default();
    for i in 0..flux.len() {
        let a = dt[i].abs();
        if masked_others[i] || a >= 3.0 * half || (a >= half / 2.0 && a <= 1.2 * half) {
            continue;
        }
        let e = per.entry(me.cycle(lc.time[i])).or_insert([(0.0, 0); 2]);
        let k = usize::from(a > half);
        e[k].0 += flux[i];
        e[k].1 += 1;
    }
    let measured: Vec<(i64, Measure)> = per
        .iter()
        .filter(|(_, [inner, outer])| inner.1 >= 3 && outer.1 >= 3)
        .map(|(cycle, [(si, ni), (so, no)])| {
            let m = Measure {
                value: (so / *no as f64 - si / *ni as f64) * 1e6,
                err: scatter * (1.0 / *ni as f64 + 1.0 / *no as f64).sqrt() * 1e6,
            };
            (*cycle, m)
        })
        .collect();
    let (depths, odd_cycle): (Vec<Measure>, Vec<bool>) = measured
        .iter()
        .map(|(cycle, m)| (*m, cycle.rem_euclid(2) == 1))
        .unzip();
    // Noise as it is: every box error is the white error times the larger
    // of β and the excess scatter of the per-transit depths.
    let boxes = phase_boxes(&lc.time, flux, &masked_others, me, baseline, scatter);
    let noise_factor = beta
        .max(transit_scatter_factor(&depths, &odd_cycle))
        .max(phase_scatter_factor(&boxes))
        .max(null_scatter_factor(lc, me, &apart, settings, scatter));
    // A box depth from the samples `pick` selects, against the baseline.
    let box_depth = |pick: &dyn Fn(usize) -> bool| -> Measure {
        let (mut s, mut n) = (0.0, 0usize);
        for i in 0..flux.len() {
            if !masked_others[i] && pick(i) {
                s += flux[i];
                n += 1;
            }
        }
        if n == 0 {
            return Measure {
                value: f64::NAN,
                err: f64::NAN,
            };
        }
        Measure {
            value: (baseline - s / n as f64) * 1e6,
            err: noise_factor * scatter / (n as f64).sqrt() * 1e6,
        }
    };
    let core = |i: usize| dt[i].abs() < half / 2.0;
    let depth = box_depth(&core);
    let in_transit_samples = core_samples.iter().filter(|&&i| !masked_others[i]).count();
    let recovered = recovery(
        depth,
        (core_samples.len(), in_transit_samples),
        (lc.time[0], lc.time[lc.time.len() - 1]),
        ctx.catalogue_depth_ppm,
        ctx.catalogue_snr,
        FLAG_Z,
    );
    // The search over the whole orbit measures each box against its own
    // neighbourhood in the flux as read (no trend takes up an eclipse), with
    // errors from the larger of the noise factor and the boxes' own scatter.
    let mut mine_and_others = apart.clone();
    mine_and_others.push(*me);
    let busy = in_transit(&lc.time, &mine_and_others, 1.2);
    let local = phase_boxes_local(&lc.time, &lc.flux, &busy, me, scatter);
    let eclipse = if local.is_empty() {
        deepest_eclipse(&boxes, noise_factor)
    } else {
        deepest_eclipse(&local, noise_factor.max(phase_scatter_factor(&local)))
    };
    let odd = box_depth(&|i| core(i) && me.cycle(lc.time[i]).rem_euclid(2) == 1);
    let even = box_depth(&|i| core(i) && me.cycle(lc.time[i]).rem_euclid(2) == 0);
    let sec_eph = Ephemeris {
        epoch: me.epoch + me.period_d / 2.0,
        ..*me
    };
    let secondary = box_depth(&|i| sec_eph.offset_d(lc.time[i]).abs() < half / 2.0);
    let consistency = depth_consistency(&depths);
    let (flat_fraction, v_shape_dchi2) =
        shape_fit(&lc.time, flux, &masked_others, me, scatter, baseline);
    let reflected = ctx.a_rstar.map(|a| reflected_ceiling_ppm(ctx.ror, a));
    let thermal = match (ctx.a_rstar, ctx.teff_k) {
        (Some(a), Some(t)) => Some(thermal_depth_ppm(ctx.ror, a, t, 0.6e-6)),
        _ => None,
    };
    let mut d = Diagnostics {
        depth,
        snr: depth.z(),
        odd,
        even,
        odd_even_z: odd_even_z(odd, even),
        secondary,
        eclipse,
        recovery: recovered,
        reflected_ceiling_ppm: reflected,
        thermal_ppm: thermal,
        phase: phase::measure(lc, &busy, me),
        // The smallest main-sequence star where the mass is unknown: the
        // highest ceiling.
        ellipsoidal_ceiling_ppm: ctx.a_rstar.map(|a| {
            ellipsoidal_ceiling_ppm(
                a,
                ctx.star_mass_msun
                    .unwrap_or(crate::science::SMALLEST_STAR_MSUN),
            )
        }),
        consistency,
        transits_seen: depths.len(),
        flat_fraction,
        v_shape_dchi2,
        scatter,
        findings: Vec::new(),
        shape: shape_cells(&dt, flux, &masked_others, me.duration_h / 24.0),
        per_transit: measured
            .iter()
            .map(|(cycle, m)| (me.epoch + *cycle as f64 * me.period_d, *m))
            .collect(),
    };
    d.findings = findings(&d);
    d
}

/// True when `other` transits at the same times as `me` or at a subset or
/// superset of them: its period is n or 1/n times this one's (n ≤ 5, within
/// 0.2 %, common practice, no source) and one of its transits falls within
/// a half-duration of one of this one's. A copy or alias of a signal, not a
/// second body; chance overlaps of unrelated orbits do not qualify.
pub fn shares_transits(me: &Ephemeris, other: &Ephemeris) -> bool {
    let (a, b) = (me.period_d, other.period_d);
    if !(a > 0.0 && b > 0.0) {
        return false;
    }
    let ratio = if a > b { a / b } else { b / a };
    let n = ratio.round();
    if !(1.0..=5.0).contains(&n) || (ratio / n - 1.0).abs() > 2e-3 {
        return false;
    }
    // Every transit of the longer period is one of the shorter's.
    let (short, long) = if a <= b { (me, other) } else { (other, me) };
    short.offset_d(long.epoch).abs() < me.half_d().max(other.half_d())
}

/// The smallest odd/even difference that can fire the flag, as a fraction of
/// the deeper of the two: a planet's transits are identical, an eclipsing
/// binary at twice its period alternates two different stars' eclipses
/// (common practice, no source: a physical size as well as a significance).
pub const ODD_EVEN_MIN_FRACTION: f64 = 0.05;

/// Z of an odd/even difference beyond any chance excursion of a planet's
/// identical transits: 5σ, where the 3σ of [`FLAG_Z`] is reached by real
/// planets now and then (common practice, no source: the usual threshold
/// for a firm detection). With both eclipses present, the candidate is an
/// eclipsing binary at twice its period (docs/science.md §4.2).
pub const ODD_EVEN_BINARY_Z: f64 = 5.0;

/// The flags the diagnostics raise.
fn findings(d: &Diagnostics) -> Vec<(Flag, String)> {
    let mut out = Vec::new();
    let odd_even_size =
        (d.odd.value - d.even.value).abs() >= ODD_EVEN_MIN_FRACTION * d.odd.value.max(d.even.value);
    if d.odd_even_z >= FLAG_Z && odd_even_size {
        out.push((
            Flag::OddEven,
            format!(
                "odd transits {:.0} ± {:.0} ppm, even {:.0} ± {:.0} ppm: Z = {:.1} ≥ {FLAG_Z}",
                d.odd.value, d.odd.err, d.even.value, d.even.err, d.odd_even_z
            ),
        ));
    }
    let ceiling = d
        .reflected_ceiling_ppm
        .unwrap_or(0.0)
        .max(d.thermal_ppm.unwrap_or(0.0));
    // "Well above" the planetary ceilings: twice the larger (common practice, no source).
    if d.secondary.z() >= FLAG_Z && d.secondary.value > 2.0 * ceiling {
        out.push((Flag::Secondary, format!(
            "eclipse at phase 0.5: {:.0} ± {:.0} ppm (Z = {:.1}), above twice the planetary ceiling {:.0} ppm (reflected {}, thermal {})",
            d.secondary.value, d.secondary.err, d.secondary.z(), ceiling,
            d.reflected_ceiling_ppm.map_or("unknown".into(), |v| format!("{v:.0}")),
            d.thermal_ppm.map_or("unknown".into(), |v| format!("{v:.0}")),
        )));
    }
    // The same test anywhere else in the orbit, at the Z the number of
    // phases searched demands (docs/science.md §4.3): an eccentric binary.
    // When the transit itself is missing, the deepest dip elsewhere is more
    // likely the transit at another epoch than a secondary eclipse: it is
    // named in the not-recovered finding instead.
    let shown = matches!(d.recovery, Recovery::Shown | Recovery::Hidden);
    if let (Some(e), true) = (d.eclipse, shown)
        && !out.iter().any(|(f, _)| *f == Flag::Secondary)
        && e.depth.z() >= e.threshold_z
        && e.depth.value > 2.0 * ceiling
    {
        out.push((Flag::Secondary, format!(
                "eclipse at phase {:.3}: {:.0} ± {:.0} ppm (Z = {:.1} ≥ {:.1}, the threshold for the phases searched), above twice the planetary ceiling {:.0} ppm",
                e.phase, e.depth.value, e.depth.err, e.depth.z(), e.threshold_z, ceiling,
            )));
    }
    // Two different eclipses, both there, beyond chance: at twice the
    // period, a binary's primary and secondary. The shallower is far above
    // a planet's occultation (the ceiling at this period, higher than at
    // twice it). A planet at twice the period has no second eclipse at all.
    let shallower = if d.odd.value <= d.even.value {
        d.odd
    } else {
        d.even
    };
    if shown
        && !out.iter().any(|(f, _)| *f == Flag::Secondary)
        && d.odd_even_z >= ODD_EVEN_BINARY_Z
        && odd_even_size
        && shallower.z() >= FLAG_Z
        && shallower.value > 2.0 * ceiling
    {
        out.push((Flag::Secondary, format!(
            "odd and even eclipses differ at Z = {:.1} ≥ {ODD_EVEN_BINARY_Z}, both present ({:.0} ± {:.0} and {:.0} ± {:.0} ppm): at twice the period, a binary's two eclipses; the shallower is above twice the planetary ceiling {:.0} ppm",
            d.odd_even_z, d.odd.value, d.odd.err, d.even.value, d.even.err, ceiling,
        )));
    }
    let elsewhere = match d.eclipse {
        Some(e) if e.depth.z() >= e.threshold_z => format!(
            "; the deepest dip at this period is {:.0} ± {:.0} ppm at phase {:.3}: the transit may be there, the epoch off",
            e.depth.value, e.depth.err, e.phase,
        ),
        _ => String::new(),
    };
    match &d.recovery {
        Recovery::Shown | Recovery::Hidden => {}
        Recovery::NoTransitInData { first, last } => out.push((
            Flag::NotRecovered,
            format!(
                "no transit of the ephemeris falls in the light curve (times {first:.4} to {last:.4}); \
                 check that the catalogue epochs and the light-curve times count from the same zero{elsewhere}"
            ),
        )),
        Recovery::TooShallow { catalogue_ppm, z } => out.push((
            Flag::NotRecovered,
            format!(
                "the light curve shows {:.0} ± {:.0} ppm at the ephemeris, the catalogue {catalogue_ppm:.0} ppm: \
                 below half and Z = {z:.1} ≥ {FLAG_Z} from it{elsewhere}",
                d.depth.value, d.depth.err
            ),
        )),
    }
    if let Some(text) = orbit_variation(d, ceiling) {
        out.push((Flag::Ellipsoidal, text));
    }
    if d.v_shape_dchi2 >= 9.0 && d.flat_fraction <= 0.15 {
        out.push((Flag::VShape, format!(
            "a V-shaped trapezoid (flat fraction {:.2}) fits better than any flat-bottomed one by Δχ² = {:.0}",
            d.flat_fraction, d.v_shape_dchi2
        )));
    }
    out
}

/// The finding of light varying with the orbit more than a planet can make
/// it (docs/science.md §4.6), or `None`: at half the period above the
/// ellipsoidal ceiling, or at the period above twice the ceiling of a
/// planet's own light (reflected and thermal, `ceiling`; an ellipsoidal
/// binary whose two eclipses the catalogue folds as one), each with t
/// beyond the one-sided 3σ threshold for the orbits fitted.
fn orbit_variation(d: &Diagnostics, ceiling: f64) -> Option<String> {
    let p = d.phase?;
    let strong = |m: Measure, above: f64| m.z() >= p.threshold_t && m.value > above;
    if let Some(ell) = d.ellipsoidal_ceiling_ppm.filter(|&c| strong(p.at_half, c)) {
        return Some(format!(
            "light out of transit varies at half the period, faintest at the transit and half an orbit later: {:.0} ± {:.0} ppm over {} orbits (t = {:.1} ≥ {:.1}), above the {:.0} ppm a planet of 13 M_J could raise (ellipsoidal variation: a stellar companion)",
            p.at_half.value,
            p.at_half.err,
            p.orbits,
            p.at_half.z(),
            p.threshold_t,
            ell
        ));
    }
    strong(p.at_period, 2.0 * ceiling).then(|| {
        format!(
            "light out of transit varies with the period, faintest at the transit: {:.0} ± {:.0} ppm over {} orbits (t = {:.1} ≥ {:.1}), above twice the {:.0} ppm a planet's own light could vary (a binary at twice this period, or a companion as bright as a star)",
            p.at_period.value, p.at_period.err, p.orbits, p.at_period.z(), p.threshold_t, ceiling
        )
    })
}

/// Fits trapezoids of total duration T₁₄ and flat fraction f = T₂₃/T₁₄
/// (grid 0, 0.05, …, 1; depth by linear least squares) to the samples within
/// ±T₁₄ of mid-transit. Returns the best f and χ²(best f ≥ 0.5) − χ²(best
/// f ≤ 0.15).
fn shape_fit(
    time: &[f64],
    flux: &[f64],
    skip: &[bool],
    me: &Ephemeris,
    sigma: f64,
    baseline: f64,
) -> (f64, f64) {
    let half = me.half_d();
    let pts: Vec<(f64, f64)> = (0..time.len())
        .filter(|&i| !skip[i])
        .filter_map(|i| {
            let dt = me.offset_d(time[i]);
            (dt.abs() < 2.0 * half).then(|| (dt.abs() / half, baseline - flux[i]))
        })
        .collect();
    if pts.len() < 10 || sigma.is_nan() || sigma <= 0.0 {
        return (f64::NAN, 0.0);
    }
    let mut best = (f64::INFINITY, f64::NAN);
    let (mut best_v, mut best_u) = (f64::INFINITY, f64::INFINITY);
    for step in 0..=20 {
        let f = step as f64 / 20.0;
        // Shape s(x) for x = |dt|/half: 1 inside the flat part, linear to 0 at x = 1.
        let shape = |x: f64| {
            if x >= 1.0 {
                0.0
            } else if x <= f {
                1.0
            } else {
                (1.0 - x) / (1.0 - f)
            }
        };
        let (mut sy, mut ss) = (0.0, 0.0);
        for &(x, y) in &pts {
            let s = shape(x);
            sy += s * y;
            ss += s * s;
        }
        if ss == 0.0 {
            continue;
        }
        let depth = sy / ss;
        let chi2: f64 = pts
            .iter()
            .map(|&(x, y)| ((y - depth * shape(x)) / sigma).powi(2))
            .sum();
        if chi2 < best.0 {
            best = (chi2, f);
        }
        if f <= 0.15 {
            best_v = best_v.min(chi2);
        }
        if f >= 0.5 {
            best_u = best_u.min(chi2);
        }
    }
    (best.1, best_u - best_v)
}

#[cfg(test)]
mod tests;

//! Folding and binning: the binned fold of any phase window, the parity
//! folds (odd and even transits), the four views the browser and the
//! figures draw, and the eight-cell fold of the Systems sparkline.

use super::*;

/// A folded, binned light curve: per bin its centre (phase, cycles), mean,
/// inverse-variance weighted mean, median, the standard error of the mean
/// and the number of samples.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Binned {
    pub centre: Vec<f64>,
    pub mean: Vec<f64>,
    pub weighted_mean: Vec<f64>,
    pub median: Vec<f64>,
    pub err: Vec<f64>,
    pub count: Vec<u32>,
}

/// Folds on `period` and `epoch` and bins phases in [lo, hi) (cycles; the
/// phase is taken about `centre`, 0 for the transit, 0.5 for the secondary).
/// Samples with `skip[i]` set are left out.
#[allow(clippy::too_many_arguments)]
pub fn fold_bin(
    time: &[f64],
    flux: &[f64],
    err: &[f64],
    skip: Option<&[bool]>,
    period_d: f64,
    epoch: f64,
    centre: f64,
    (lo, hi): (f64, f64),
    bins: usize,
) -> Binned {
    let bins = bins.max(1);
    let width = (hi - lo) / bins as f64;
    let inv = 1.0 / width;
    let e0 = epoch + centre * period_d;
    let mut which = vec![u32::MAX; time.len()];
    let mut count = vec![0u32; bins];
    let (mut sum, mut wsum, mut wf, mut sq) = (
        vec![0.0; bins],
        vec![0.0; bins],
        vec![0.0; bins],
        vec![0.0; bins],
    );
    let inv_p = 1.0 / period_d;
    let nb = bins as f64;
    for i in 0..time.len() {
        if let Some(s) = skip
            && s[i]
        {
            continue;
        }
        // The phase of `phase()`, in one multiply: x − ⌊x⌋ − ½ with x = (t − e₀)/P + ½.
        let x = (time[i] - e0) * inv_p + 0.5;
        let b = ((x - x.floor() - 0.5 - lo) * inv).floor();
        if !(0.0..nb).contains(&b) {
            continue;
        }
        let b = b as usize;
        which[i] = b as u32;
        let f = flux[i];
        count[b] += 1;
        sum[b] += f;
        sq[b] += f * f;
        let w = if err[i] > 0.0 {
            1.0 / (err[i] * err[i])
        } else {
            0.0
        };
        wsum[b] += w;
        wf[b] += w * f;
    }
    // Medians: samples grouped by bin with a counting sort, then selection.
    let mut start = vec![0usize; bins + 1];
    for b in 0..bins {
        start[b + 1] = start[b] + count[b] as usize;
    }
    let mut fill = start.clone();
    let mut grouped = vec![0.0; start[bins]];
    for (i, &b) in which.iter().enumerate() {
        if b != u32::MAX {
            grouped[fill[b as usize]] = flux[i];
            fill[b as usize] += 1;
        }
    }
    let mut out = Binned::default();
    for b in 0..bins {
        let n = count[b] as f64;
        out.centre.push(lo + (b as f64 + 0.5) * width);
        out.count.push(count[b]);
        if count[b] == 0 {
            for v in [
                &mut out.mean,
                &mut out.weighted_mean,
                &mut out.median,
                &mut out.err,
            ] {
                v.push(f64::NAN);
            }
            continue;
        }
        let mean = sum[b] / n;
        out.mean.push(mean);
        out.weighted_mean
            .push(if wsum[b] > 0.0 { wf[b] / wsum[b] } else { mean });
        out.median
            .push(median_of(&mut grouped[start[b]..start[b + 1]]));
        let var = if count[b] > 1 {
            ((sq[b] - n * mean * mean) / (n - 1.0)).max(0.0)
        } else {
            0.0
        };
        out.err.push((var / n).sqrt());
    }
    out
}

/// Adds to `skip` every sample of a transit of the other parity: keeps the
/// odd transits when `odd`, else the even ones (transit 0, at the epoch, is
/// even).
pub fn keep_parity(time: &[f64], me: &Ephemeris, odd: bool, skip: &mut [bool]) {
    let want = i64::from(odd);
    for (s, &t) in skip.iter_mut().zip(time) {
        *s |= me.cycle(t).rem_euclid(2) != want;
    }
}

/// The folds a vetter compares, each ± `zoom` cycles wide: all transits,
/// the odd and the even ones apart, and the window half an orbit later
/// where a secondary eclipse would be.
#[derive(Clone, Debug, PartialEq)]
pub struct Views {
    pub transit: Binned,
    pub odd: Binned,
    pub even: Binned,
    pub secondary: Binned,
}

/// Bins the four views of one candidate; `skip` masks the other
/// candidates' transits.
pub fn views(
    time: &[f64],
    flux: &[f64],
    err: &[f64],
    skip: &[bool],
    me: &Ephemeris,
    zoom: f64,
    bins: usize,
) -> Views {
    let fold = |skip: &[bool], centre| {
        fold_bin(
            time,
            flux,
            err,
            Some(skip),
            me.period_d,
            me.epoch,
            centre,
            (-zoom, zoom),
            bins,
        )
    };
    let parity = |odd| {
        let mut s = skip.to_vec();
        keep_parity(time, me, odd, &mut s);
        fold(&s, 0.0)
    };
    Views {
        transit: fold(skip, 0.0),
        odd: parity(true),
        even: parity(false),
        secondary: fold(skip, 0.5),
    }
}

/// Cells of [`Diagnostics::shape`].
pub const SHAPE_CELLS: usize = 8;

/// The mean drop (1 − flux) of the detrended flux in [`SHAPE_CELLS`] equal
/// cells spanning ± 2 transit durations of mid-transit; `skip` marks
/// samples to leave out (the other signals' transits).
pub fn shape_cells(dt: &[f64], flux: &[f64], skip: &[bool], duration_d: f64) -> [f32; SHAPE_CELLS] {
    let span = 2.0 * duration_d;
    let width = 2.0 * span / SHAPE_CELLS as f64;
    let mut sum = [0.0f64; SHAPE_CELLS];
    let mut n = [0u32; SHAPE_CELLS];
    for i in 0..dt.len().min(flux.len()) {
        if skip.get(i).copied().unwrap_or(false) || !flux[i].is_finite() {
            continue;
        }
        let x = (dt[i] + span) / width;
        if x >= 0.0 && x < SHAPE_CELLS as f64 {
            let k = x as usize;
            sum[k] += 1.0 - flux[i];
            n[k] += 1;
        }
    }
    std::array::from_fn(|k| {
        if n[k] > 0 {
            (sum[k] / n[k] as f64) as f32
        } else {
            f32::NAN
        }
    })
}

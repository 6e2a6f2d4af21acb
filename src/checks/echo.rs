//! Signals that repeat on another star: the same period and epoch within
//! their uncertainties (the ephemeris matching of Coughlin et al. 2014, AJ
//! 147, 119), and within an angular radius when positions exist. One sort by
//! period, then a sweep over a bounded window: O(n log n).

use super::{CheckSettings, Checks};
use crate::catalogue::{CandidateId, Catalogue, Field};
use crate::flags::Flag;

/// Angular distance, arcsec, by the haversine formula.
pub fn separation_arcsec(ra1: f64, dec1: f64, ra2: f64, dec2: f64) -> f64 {
    let (d1, d2) = (dec1.to_radians(), dec2.to_radians());
    let h = ((d2 - d1) / 2.0).sin().powi(2)
        + d1.cos() * d2.cos() * ((ra2 - ra1).to_radians() / 2.0).sin().powi(2);
    2.0 * h.sqrt().min(1.0).asin().to_degrees() * 3600.0
}

struct Sig {
    c: CandidateId,
    star: u32,
    period: f64,
    period_err: f64,
    epoch: f64,
    epoch_err: f64,
    t14_d: f64,
}

pub(super) fn check(cat: &Catalogue, s: &CheckSettings, out: &mut Checks) {
    let col = |f: Field| cat.column(f);
    let (Some(periods), Some(epochs), Some(durations)) = (
        col(Field::PeriodD),
        col(Field::Epoch),
        col(Field::DurationH),
    ) else {
        return;
    };
    let per_err = col(Field::PeriodErrD);
    let ep_err = col(Field::EpochErrD);
    let nan_to_zero = |v: f64| if v.is_finite() { v } else { 0.0 };
    let mut sigs: Vec<Sig> = (0..cat.len())
        .map(|i| Sig {
            c: i as CandidateId,
            star: cat.star_of(i as CandidateId),
            period: periods[i],
            period_err: per_err.map_or(0.0, |e| nan_to_zero(e[i])),
            epoch: epochs[i],
            epoch_err: ep_err.map_or(0.0, |e| nan_to_zero(e[i])),
            t14_d: durations[i] / 24.0,
        })
        .collect();
    // Ties in period are broken by a hash of the candidate, so that copies
    // of one ephemeris on many stars interleave and each signal's nearest
    // neighbours are mostly on other stars (deterministic).
    let shuffle = |c: CandidateId| c.wrapping_mul(2_654_435_761);
    sigs.sort_unstable_by(|a, b| {
        a.period
            .total_cmp(&b.period)
            .then(shuffle(a.c).cmp(&shuffle(b.c)))
    });
    let ra = col(Field::RaDeg);
    let dec = col(Field::DecDeg);
    let mag = col(Field::Mag);
    let depth = col(Field::DepthPpm);
    // What each candidate is, gathered over all its matches and written out
    // once at the end: the deepest source it copies, and the copies it
    // feeds. Memory stays linear in the catalogue whatever the matches.
    let mut copy_of: Vec<Option<Match>> = vec![None; cat.len()];
    let mut feeds: Vec<(u32, Option<Match>)> = vec![(0, None); cat.len()];
    let depth_of = |c: CandidateId| depth.map_or(f64::NAN, |d| d[c as usize]);
    // One match: b's transits fall on a's (b's period n·P_a, n = 1 or 2,
    // or a's is twice b's: swap). `a` has the shorter period.
    let mut matched = |a: &Sig, b: &Sig, n: f64| -> bool {
        if a.star == b.star {
            return false;
        }
        let dp = (b.period - n * a.period).abs();
        let sigma_p = (b.period_err.powi(2) + (n * a.period_err).powi(2)).sqrt();
        let p_tol = if sigma_p > 0.0 {
            3.0 * sigma_p
        } else {
            0.5 * s.echo_max_rel * b.period
        };
        if dp > p_tol.min(s.echo_max_rel * b.period) {
            return false;
        }
        // b's transit nearest a's epoch, against a's transits.
        let nb = ((a.epoch - b.epoch) / b.period).round();
        let diff = b.epoch + nb * b.period - a.epoch;
        let na = (diff / a.period).round();
        let off = diff - na * a.period;
        let sigma_t = (a.epoch_err.powi(2) + b.epoch_err.powi(2) + (nb * sigma_p).powi(2)).sqrt();
        let t_tol = (3.0 * sigma_t).max(0.25 * a.t14_d.min(b.t14_d));
        if off.abs() > t_tol {
            return false;
        }
        let sep = match (ra, dec) {
            (Some(ra), Some(dec)) => {
                let (i1, i2) = (a.c as usize, b.c as usize);
                let v = separation_arcsec(ra[i1], dec[i1], ra[i2], dec[i2]);
                if v.is_finite() && v > s.echo_radius_arcsec {
                    return false;
                }
                v.is_finite().then_some(v)
            }
            _ => None,
        };
        // Dilution only makes a copy shallower: the deeper eclipse is the
        // source (docs/science.md §3.3); magnitudes decide only without depths.
        let (da, db) = (depth_of(a.c), depth_of(b.c));
        let (copy, source, fainter) = if da.is_finite() && db.is_finite() && da != db {
            if da < db {
                (a.c, b.c, false)
            } else {
                (b.c, a.c, false)
            }
        } else {
            let (ma, mb) = mag.map_or((f64::NAN, f64::NAN), |m| (m[a.c as usize], m[b.c as usize]));
            if ma.is_finite() && mb.is_finite() && ma > mb {
                (a.c, b.c, true)
            } else {
                (b.c, a.c, true)
            }
        };
        let m = Match {
            other: source,
            dp,
            off_h: off.abs() * 24.0,
            n,
            sep,
            fainter,
        };
        let slot = &mut copy_of[copy as usize];
        if slot.is_none_or(|old| depth_of(source) > depth_of(old.other)) {
            *slot = Some(m);
        }
        let fed = &mut feeds[source as usize];
        fed.0 += 1;
        fed.1.get_or_insert(Match { other: copy, ..m });
        true
    };
    // Each signal is compared with at most ECHO_WINDOW neighbours in period
    // on either side of each window: a catalogue with thousands of copies
    // of one ephemeris stays O(n log n) (each still meets a copy).
    let mut crowded_window = vec![false; cat.len()];
    for i in 0..sigs.len() {
        let a = &sigs[i];
        // The same period (the signals after this one in the sorted list),
        // then twice it (a bounded window found by bisection).
        let lo = 2.0 * a.period * (1.0 - s.echo_max_rel);
        let windows = [
            (i + 1, a.period * (1.0 + s.echo_max_rel), 1.0),
            (
                sigs.partition_point(|x| x.period < lo),
                2.0 * a.period * (1.0 + s.echo_max_rel),
                2.0,
            ),
        ];
        for (start, hi, n) in windows {
            let others = sigs[start..]
                .iter()
                .take_while(|b| b.period <= hi)
                .take(8 * ECHO_WINDOW)
                .filter(|b| b.star != a.star);
            let mut found = 0;
            for (k, b) in others.enumerate() {
                if k == ECHO_WINDOW || found == ECHO_MATCHES {
                    crowded_window[a.c as usize] = true;
                    break;
                }
                found += usize::from(matched(a, b, n));
            }
        }
    }
    let star = |c: CandidateId| cat.star_id(cat.star_of(c)).to_string();
    let ratio = |n: f64| {
        if n == 1.0 {
            String::new()
        } else {
            format!(", period ratio {n:.0}:1")
        }
    };
    let place = |sep: Option<f64>| {
        sep.map_or(", no positions to say how close".to_string(), |v| {
            format!(", {v:.1}″ apart")
        })
    };
    for c in 0..cat.len() as CandidateId {
        if let Some(m) = copy_of[c as usize] {
            // Without positions a match is only a hint (chance coincidences
            // in a large catalogue): a warning, never blocking.
            out.add(c, Flag::Echo, m.sep.is_none(), format!(
                "same ephemeris as {} on {} (ΔP = {:.2e} d, Δt = {:.2} h{}{}); this is the {} copy: likely light from {}",
                cat.candidate_id(m.other), star(m.other), m.dp, m.off_h, ratio(m.n), place(m.sep),
                if m.fainter { "fainter" } else { "shallower" }, star(m.other)
            ));
        }
        // A copy that also feeds others is said once, as a copy.
        if let (count, Some(m), None) = (
            feeds[c as usize].0,
            feeds[c as usize].1,
            copy_of[c as usize],
        ) {
            let more = if count > 1 {
                format!(" and {} more", count - 1)
            } else {
                String::new()
            };
            out.add(
                c,
                Flag::Echo,
                true,
                format!(
                    "its signal also appears as {} on {}{more}{}{}: likely leaking into that star",
                    cat.candidate_id(m.other),
                    star(m.other),
                    ratio(m.n),
                    place(m.sep)
                ),
            );
        }
    }
    // The bound is said once per run of crowded signals (in period order),
    // on the first of them.
    let mut previous = false;
    for sig in &sigs {
        let crowded = crowded_window[sig.c as usize];
        if crowded && !previous {
            out.add(sig.c, Flag::Echo, true, format!(
                "more than {ECHO_MATCHES} signals on other stars share this ephemeris: each of them was compared with its nearest in period only (at most {ECHO_WINDOW}, stopping at {ECHO_MATCHES} matches)"
            ));
        }
        previous = crowded;
    }
}

/// The most neighbours in period each signal is compared with, and the
/// most matches it collects in each window (a signal copied onto dozens of
/// stars is an echo whichever of them it is compared with).
const ECHO_WINDOW: usize = 256;
const ECHO_MATCHES: usize = 16;

/// One echo match as the candidate sees it.
#[derive(Clone, Copy, Debug)]
struct Match {
    other: CandidateId,
    dp: f64,
    off_h: f64,
    n: f64,
    sep: Option<f64>,
    fainter: bool,
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn haversine_separation() {
        // One arcminute of declination is 60″; along a parallel at dec 60°
        // one degree of right ascension spans cos 60° = 0.5 degree.
        assert!((separation_arcsec(10.0, 20.0, 10.0, 20.0 + 1.0 / 60.0) - 60.0).abs() < 1e-6);
        assert!((separation_arcsec(10.0, 60.0, 11.0, 60.0) - 1800.0).abs() < 1.0);
    }
}

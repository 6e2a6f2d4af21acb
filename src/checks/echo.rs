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
    sigs.sort_unstable_by(|a, b| a.period.total_cmp(&b.period).then(a.c.cmp(&b.c)));
    let ra = col(Field::RaDeg);
    let dec = col(Field::DecDeg);
    let mag = col(Field::Mag);
    let depth = col(Field::DepthPpm);
    // One match: b's transits fall on a's (b's period n·P_a, n = 1 or 2,
    // or a's is twice b's: swap). `a` has the shorter period.
    let mut matched = |a: &Sig, b: &Sig, n: f64| {
        if a.star == b.star {
            return;
        }
        let dp = (b.period - n * a.period).abs();
        let sigma_p = (b.period_err.powi(2) + (n * a.period_err).powi(2)).sqrt();
        let p_tol = if sigma_p > 0.0 {
            3.0 * sigma_p
        } else {
            0.5 * s.echo_max_rel * b.period
        };
        if dp > p_tol.min(s.echo_max_rel * b.period) {
            return;
        }
        // b's transit nearest a's epoch, against a's transits.
        let nb = ((a.epoch - b.epoch) / b.period).round();
        let diff = b.epoch + nb * b.period - a.epoch;
        let na = (diff / a.period).round();
        let off = diff - na * a.period;
        let sigma_t = (a.epoch_err.powi(2) + b.epoch_err.powi(2) + (nb * sigma_p).powi(2)).sqrt();
        let t_tol = (3.0 * sigma_t).max(0.25 * a.t14_d.min(b.t14_d));
        if off.abs() > t_tol {
            return;
        }
        let sep = match (ra, dec) {
            (Some(ra), Some(dec)) => {
                let (i1, i2) = (a.c as usize, b.c as usize);
                let v = separation_arcsec(ra[i1], dec[i1], ra[i2], dec[i2]);
                if v.is_finite() && v > s.echo_radius_arcsec {
                    return;
                }
                v.is_finite().then_some(v)
            }
            _ => None,
        };
        // Dilution only makes a copy shallower: the deeper eclipse is the
        // source (docs/science.md §3.3); magnitudes decide only without depths.
        let (da, db) = depth.map_or((f64::NAN, f64::NAN), |d| (d[a.c as usize], d[b.c as usize]));
        let (copy, source, by) = if da.is_finite() && db.is_finite() && da != db {
            if da < db {
                (a.c, b.c, "shallower")
            } else {
                (b.c, a.c, "shallower")
            }
        } else {
            let (ma, mb) = mag.map_or((f64::NAN, f64::NAN), |m| (m[a.c as usize], m[b.c as usize]));
            if ma.is_finite() && mb.is_finite() && ma > mb {
                (a.c, b.c, "fainter")
            } else {
                (b.c, a.c, "fainter")
            }
        };
        let ratio = if n == 1.0 {
            String::new()
        } else {
            format!(", period ratio {n:.0}:1")
        };
        let place = sep.map_or(", no positions to say how close".to_string(), |v| {
            format!(", {v:.1}″ apart")
        });
        let star = |c: CandidateId| cat.star_id(cat.star_of(c)).to_string();
        // Without positions a match is only a hint (chance coincidences in a
        // large catalogue): a warning, never blocking.
        let firm = sep.is_some();
        out.add(copy, Flag::Echo, !firm, format!(
            "same ephemeris as {} on {} (ΔP = {dp:.2e} d, Δt = {:.2} h{ratio}{place}); this is the {by} copy: likely light from {}",
            cat.candidate_id(source), star(source), off.abs() * 24.0, star(source)
        ));
        out.add(
            source,
            Flag::Echo,
            true,
            format!(
                "its signal also appears as {} on {}{ratio}{place}: likely leaking into that star",
                cat.candidate_id(copy),
                star(copy)
            ),
        );
    };
    for i in 0..sigs.len() {
        let a = &sigs[i];
        let limit = a.period * (1.0 + s.echo_max_rel);
        for b in sigs[i + 1..].iter().take_while(|b| b.period <= limit) {
            matched(a, b, 1.0);
        }
        // Twice the period: a bounded window of the sorted list.
        let (lo, hi) = (
            2.0 * a.period * (1.0 - s.echo_max_rel),
            2.0 * a.period * (1.0 + s.echo_max_rel),
        );
        let start = sigs.partition_point(|x| x.period < lo);
        for b in sigs[start..].iter().take_while(|b| b.period <= hi) {
            matched(a, b, 2.0);
        }
    }
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

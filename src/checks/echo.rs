//! Signals that repeat on another star: the same period and epoch within
//! their uncertainties (the ephemeris matching of Coughlin et al. 2014, AJ
//! 147, 119), and within an angular radius when positions exist. One sort by
//! period, then a search of bounded windows in period and, where positions
//! exist, in cells of the sky (`cells`, `sweep`): O(n log n).

mod cells;
#[cfg(test)]
mod chance_tests;
mod shared;
mod sweep;

use std::collections::HashMap;

use super::CheckSettings;
use crate::catalogue::{CandidateId, Catalogue, Column, Field};

/// Whether (ra, dec) in degrees is a real position: finite, and a
/// declination within ±90°.
pub(super) fn real_position(ra: f64, dec: f64) -> bool {
    ra.is_finite() && dec.abs() <= 90.0
}

/// Angular distance, arcsec, by the haversine formula; NaN when a
/// coordinate is missing (NaN).
pub fn separation_arcsec(ra1: f64, dec1: f64, ra2: f64, dec2: f64) -> f64 {
    let (d1, d2) = (dec1.to_radians(), dec2.to_radians());
    let h = ((d2 - d1) / 2.0).sin().powi(2)
        + d1.cos() * d2.cos() * ((ra2 - ra1).to_radians() / 2.0).sin().powi(2);
    // Rounding can take √h a hair above 1; `min` would also turn a NaN
    // into 1 (half the sky), so the bound is applied only to a number.
    let root = h.sqrt();
    let root = if root > 1.0 { 1.0 } else { root };
    2.0 * root.asin().to_degrees() * 3600.0
}

#[derive(Clone, Copy)]
struct Sig {
    c: CandidateId,
    star: u32,
    /// Place in the period order (see [`order_key`]).
    rank: u32,
    period: f64,
    period_err: f64,
    epoch: f64,
    epoch_err: f64,
    t14_d: f64,
    /// Position, degrees (NaN without positions): kept here so the sweep
    /// reads neighbours in period order, not the columns at random.
    ra: f64,
    dec: f64,
}

/// What the first tests of a comparison read of a signal
/// ([`Pair::plausible`]).
#[derive(Clone, Copy)]
struct Quick {
    star: u32,
    period: f64,
    period_err: f64,
    /// Whether it has a real position.
    placed: bool,
}

impl Sig {
    fn quick(&self) -> Quick {
        Quick {
            star: self.star,
            period: self.period,
            period_err: self.period_err,
            placed: sweep::placed(self),
        }
    }
}

/// One echo finding: (candidate, soft, why), in the order they are added.
pub(super) type Finding = (CandidateId, bool, String);

/// The echo search's findings, and what it says of the catalogue as a
/// whole: how many of its matches without positions chance explains.
pub(super) struct Echoes {
    pub findings: Vec<Finding>,
    pub chance: Chance,
    /// The rows whose signal is repeated on another star id, a set per
    /// signal (`copies::find`, from the same period order).
    pub copies: Vec<Vec<CandidateId>>,
}

/// The echo findings of the catalogue: each copy, each source it feeds,
/// and the runs of signals whose window filled up.
/// Its work is counted into `progress` in four stages of a quarter of the
/// candidates each: the period order, the signals, the index, the search.
pub(super) fn check(cat: &Catalogue, s: &CheckSettings, progress: &super::CheckProgress) -> Echoes {
    let quarter = cat.len() / 4;
    let stage = |last: bool| {
        progress.add(if last {
            cat.len() - 3 * quarter
        } else {
            quarter
        })
    };
    let col = |f: Field| cat.column(f);
    let (Some(periods), Some(epochs), Some(durations)) = (
        col(Field::PeriodD),
        col(Field::Epoch),
        col(Field::DurationH),
    ) else {
        progress.add(cat.len());
        return Echoes {
            findings: Vec::new(),
            chance: Chance::new(0, 0),
            copies: Vec::new(),
        };
    };
    let per_err = col(Field::PeriodErrD);
    let ep_err = col(Field::EpochErrD);
    let nan_to_zero = |v: f64| if v.is_finite() { v } else { 0.0 };
    let (ra, dec) = match (col(Field::RaDeg), col(Field::DecDeg)) {
        (Some(ra), Some(dec)) => (Some(ra), Some(dec)),
        _ => (None, None),
    };
    // The period order, with ties broken by a hash of the candidate so that
    // copies of one ephemeris on many stars interleave and each signal's
    // nearest neighbours are mostly on other stars (deterministic). Sorted
    // as one integer per signal: the order of `f64::total_cmp`, then the
    // hash, then the candidate.
    let mut order: Vec<u128> = (0..cat.len())
        .map(|i| order_key(periods.get(i), i as CandidateId))
        .collect();
    order.sort_unstable();
    let copies = super::copies::find(cat, &order);
    let period_order: Vec<CandidateId> = order.into_iter().map(|k| k as CandidateId).collect();
    stage(false);
    let mut rank = vec![0u32; cat.len()];
    for (r, &c) in period_order.iter().enumerate() {
        rank[c as usize] = r as u32;
    }
    let pair = Pair {
        s,
        positions: ra.is_some(),
        mag: col(Field::Mag),
        depth: col(Field::DepthPpm),
        copies: (!copies.is_empty()).then(|| super::copies::SameRow::of(cat)),
    };
    // The search is pure: each part finds its matches on a thread of its
    // own, and they are applied below in the order of a search of one
    // signal after another in period order, so the result is the same
    // whichever thread found what.
    // The i-th signal in file order, from the columns (the index builds
    // each in file order, and keeps no copy of them all in another).
    let sig = |i: usize| Sig {
        c: i as CandidateId,
        star: cat.star_of(i as CandidateId),
        rank: rank[i],
        period: periods.get(i),
        period_err: per_err.map_or(0.0, |e| nan_to_zero(e.get(i))),
        epoch: epochs.get(i),
        epoch_err: ep_err.map_or(0.0, |e| nan_to_zero(e.get(i))),
        t14_d: durations.get(i) / 24.0,
        ra: ra.map_or(f64::NAN, |r| r.get(i)),
        dec: dec.map_or(f64::NAN, |d| d.get(i)),
    };
    let index = sweep::Index::new(s.echo_radius_arcsec, sig, period_order);
    // The signals and the index: two of the four stages.
    stage(false);
    stage(false);
    let mut swept =
        crate::parallel::in_parts(index.cells_len(), |r| index.sweep_cells(r, &pair, &sig));
    swept.extend(crate::parallel::in_parts(index.unplaced_len(), |r| {
        index.sweep_unplaced(r, &pair, &sig)
    }));
    // The index's memory goes; its period order stays.
    let period_order = index.into_order();
    // One ephemeris on many stars anywhere: searched once the index is
    // gone, so its keys never add to the index's memory.
    let shared = shared::find(cat, &pair, (periods, epochs), &sig, &copies);
    stage(true);
    let mut matches: Vec<sweep::Found> = Vec::new();
    let mut crowded_window = vec![false; cat.len()];
    let mut control = 0;
    for part in swept {
        matches.extend(part.matches);
        for c in part.crowded {
            crowded_window[c as usize] = true;
        }
        control += part.control;
    }
    matches.sort_unstable_by_key(|m| m.0);
    let chance = Chance::new(
        matches.iter().filter(|m| m.1.1.sep.is_none()).count() as u64,
        control,
    );
    // What each candidate is, gathered over all its matches: the deepest
    // source it copies, and the copies it feeds (the first one found and
    // how many). Kept only for candidates with a match.
    let mut copy_of: HashMap<CandidateId, Match> = HashMap::new();
    let mut feeds: HashMap<CandidateId, (u32, Match)> = HashMap::new();
    for &(_, (copy, m)) in &matches {
        let source = m.other;
        let keep = copy_of
            .get(&copy)
            .is_none_or(|old| pair.depth_of(source) > pair.depth_of(old.other));
        if keep {
            copy_of.insert(copy, m);
        }
        feeds
            .entry(source)
            .or_insert((0, Match { other: copy, ..m }))
            .0 += 1;
    }
    drop(matches);
    let mut found: Vec<CandidateId> = copy_of.keys().chain(feeds.keys()).copied().collect();
    found.sort_unstable();
    found.dedup();
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
    let mut out = Vec::new();
    for c in found {
        let copy = copy_of.get(&c);
        if let Some(m) = copy {
            // Without positions a match is only a hint (chance coincidences
            // in a large catalogue): a warning, never blocking.
            out.push((c, m.sep.is_none(), format!(
                "same ephemeris as {} on {} (ΔP = {:.2e} d, Δt = {:.2} h{}{}); this is the {} copy: {}light from {}{}",
                cat.candidate_id(m.other), star(m.other), m.dp, m.off_h, ratio(m.n), place(m.sep),
                if m.fainter { "fainter" } else { "shallower" }, chance.likely(m.sep), star(m.other),
                chance.or_chance(m.sep)
            )));
        }
        // A copy that also feeds others is said once, as a copy.
        if let (Some(&(count, m)), None) = (feeds.get(&c), copy) {
            let more = if count > 1 {
                format!(" and {} more", count - 1)
            } else {
                String::new()
            };
            out.push((
                c,
                true,
                format!(
                    "its signal also appears as {} on {}{more}{}{}: {}leaking into that star{}",
                    cat.candidate_id(m.other),
                    star(m.other),
                    ratio(m.n),
                    place(m.sep),
                    chance.likely(m.sep),
                    chance.or_chance(m.sep)
                ),
            ));
        }
    }
    // The bound is said once per run of crowded signals (in period order),
    // on the first of them.
    let mut previous = false;
    for &c in &period_order {
        let crowded = crowded_window[c as usize];
        if crowded && !previous {
            out.push((c, true, format!(
                "more than {ECHO_MATCHES} signals on other stars share this ephemeris: each of them was compared with its nearest in period only (at most {ECHO_WINDOW}, stopping at {ECHO_MATCHES} matches)"
            )));
        }
        previous = crowded;
    }
    for f in shared {
        let why = format!(
            "the same ephemeris as {}{} signals on other stars, anywhere on the sky ({} on {} among them; period and epoch within their errors), where chance gives a signal of its period {:.1e} such matches and {} or more would be one catalogue in a hundred: the instrument's own signal, or one eclipse's light carried across the detector",
            f.n,
            if f.more { " or more" } else { "" },
            cat.candidate_id(f.first),
            star(f.first),
            f.chance,
            f.needed
        );
        let c = f.c;
        out.push(if f.source {
            (c, true, format!("{why}; it is more than twice as deep as any of them: perhaps the eclipse whose light they carry"))
        } else {
            (c, false, format!("{why}: no planet of this star"))
        });
    }
    Echoes {
        findings: out,
        chance,
        copies,
    }
}

/// How many of the matches without a separation chance explains: the
/// pairs the control matches ([`Pair::control`]) against the pairs matched.
pub(super) struct Chance {
    /// Pairs matched without a separation.
    pub matched: u64,
    /// Pairs the control matches.
    pub control: u64,
}

impl Chance {
    fn new(matched: u64, control: u64) -> Chance {
        Chance { matched, control }
    }

    /// The share of the matches without a separation to expect by chance,
    /// in percent (at most 100); `None` when the control matched nothing.
    fn percent(&self) -> Option<f64> {
        (self.control > 0 && self.matched > 0)
            .then(|| (100.0 * self.control as f64 / self.matched as f64).min(100.0))
    }

    /// "likely " before the source, unless the match has no separation and
    /// chance explains half or more of those: then a match is as likely
    /// chance as light from the other star, or more.
    fn likely(&self, sep: Option<f64>) -> &'static str {
        if sep.is_none() && self.percent().is_some_and(|p| p >= 50.0) {
            ""
        } else {
            "likely "
        }
    }

    /// What chance explains, after a match without a separation.
    fn or_chance(&self, sep: Option<f64>) -> String {
        match (sep, self.percent()) {
            (None, Some(p)) => format!(
                ", or chance: {} of this catalogue's matches without positions are",
                share(p)
            ),
            _ => String::new(),
        }
    }

    /// The catalogue's note, when the control matched any pair.
    pub fn note(&self) -> Option<String> {
        let p = self.percent()?;
        Some(format!(
            "echo: {} pair{} of signals on different stars match in period and epoch with no positions to say how close; with every epoch moved half a period, {} pair{} match: {} of the matches are chance coincidences (docs/science.md §3.3)",
            self.matched,
            if self.matched == 1 { "" } else { "s" },
            self.control,
            if self.control == 1 { "" } else { "s" },
            share(p)
        ))
    }
}

/// A percentage in words: "under 1 %", "about 37 %".
fn share(p: f64) -> String {
    if p < 1.0 {
        "under 1 %".into()
    } else {
        format!("about {p:.0} %")
    }
}

/// What comparing two signals needs besides them.
struct Pair<'a> {
    s: &'a CheckSettings,
    /// Whether the catalogue gives positions (each Sig carries its own).
    positions: bool,
    mag: Option<&'a Column>,
    depth: Option<&'a Column>,
    /// Where some row is listed on two star ids (`copies`): a row matched
    /// with itself under another id is one signal, no echo.
    copies: Option<super::copies::SameRow<'a>>,
}

impl Pair<'_> {
    /// Whether a and b are one row listed on two star ids (`copies`).
    fn same_row(&self, a: CandidateId, b: CandidateId) -> bool {
        self.copies.as_ref().is_some_and(|k| k.same(a, b))
    }

    /// The widest relative difference in period ever matched between a and
    /// b: `echo_max_rel`, or [`ECHO_PLACED_REL`] when both have positions
    /// and the echo radius is at most [`ECHO_PLACED_RADIUS`] (their
    /// neighbours on the sky are then few, so a wide window costs little;
    /// the periods' own errors still decide).
    fn widest_rel(&self, a_placed: bool, b_placed: bool) -> f64 {
        if self.wide_for_placed() && a_placed && b_placed {
            self.s.echo_max_rel.max(ECHO_PLACED_REL)
        } else {
            self.s.echo_max_rel
        }
    }

    /// Whether placed signals are matched within [`ECHO_PLACED_REL`].
    fn wide_for_placed(&self) -> bool {
        self.positions && self.s.echo_radius_arcsec <= ECHO_PLACED_RADIUS
    }

    fn depth_of(&self, c: CandidateId) -> f64 {
        self.depth.map_or(f64::NAN, |d| d.get(c as usize))
    }

    /// The first tests of [`Pair::compare`], on what they read of the two
    /// signals: other stars, and b's period n·P_a within the widest
    /// relative difference and then within 3σ of the combined period error
    /// (or half the relative bound when no errors are given).
    fn plausible(&self, a: &Quick, b: &Quick, n: f64) -> bool {
        if a.star == b.star {
            return false;
        }
        let dp = (b.period - n * a.period).abs();
        // The wider bound first: it needs no square root.
        if dp > self.widest_rel(a.placed, b.placed) * b.period {
            return false;
        }
        // Squared, so no root is taken.
        let var_p = b.period_err.powi(2) + (n * a.period_err).powi(2);
        if var_p > 0.0 {
            dp * dp <= 9.0 * var_p
        } else {
            dp <= 0.5 * self.s.echo_max_rel * b.period
        }
    }

    /// The control of a match without a separation (a warning): whether
    /// b's transits would fall on a's with b's epoch moved half of a's
    /// period, which no copy of a's light does. An unrelated pair of
    /// matching period has its transits at a random phase, as likely in
    /// the half-period window as in the real one, so the pairs the control
    /// matches count the chance matches to expect (docs/science.md §3.3:
    /// background by shifted times). Pairs with a separation (both placed,
    /// in a table that gives positions) are not counted: their radius
    /// makes chance rare, and their matches are flags. For a pair
    /// [`Pair::plausible`] let through.
    fn control(&self, a: &Sig, b: &Sig, n: f64) -> bool {
        if self.positions && sweep::placed(a) && sweep::placed(b) {
            return false;
        }
        let var_p = b.period_err.powi(2) + (n * a.period_err).powi(2);
        in_time(a, b, 0.5 * a.period, var_p).is_some()
    }

    /// One match: b's transits fall on a's (b's period n·P_a, n = 1 or 2).
    /// `a` has the shorter period. Returns the copy and the match with its
    /// source.
    fn compare(&self, a: &Sig, b: &Sig, n: f64) -> Option<(CandidateId, Match)> {
        let s = self.s;
        if !self.plausible(&a.quick(), &b.quick(), n) {
            return None;
        }
        let dp = (b.period - n * a.period).abs();
        let var_p = b.period_err.powi(2) + (n * a.period_err).powi(2);
        // Two stars farther apart in declination alone than the radius are
        // farther apart on the sky (the arc is at least the difference in
        // latitude): no trigonometry and no timing needed. Only for real
        // positions, where the haversine below would say the same.
        if self.positions
            && sweep::placed(a)
            && sweep::placed(b)
            && (a.dec - b.dec).abs() * 3600.0 > s.echo_radius_arcsec * (1.0 + 1e-9)
        {
            return None;
        }
        let off = in_time(a, b, 0.0, var_p)?;
        // A separation only between two real positions: a signal without
        // one (an empty cell in a table that gives positions) is matched
        // as in a table without them, a warning.
        let sep = if self.positions && sweep::placed(a) && sweep::placed(b) {
            let v = separation_arcsec(a.ra, a.dec, b.ra, b.dec);
            if v.is_finite() && v > s.echo_radius_arcsec {
                return None;
            }
            v.is_finite().then_some(v)
        } else {
            None
        };
        // Dilution only makes a copy shallower: the deeper eclipse is the
        // source (docs/science.md §3.3); magnitudes decide only without depths.
        let (da, db) = (self.depth_of(a.c), self.depth_of(b.c));
        let (copy, source, fainter) = if da.is_finite() && db.is_finite() && da != db {
            if da < db {
                (a.c, b.c, false)
            } else {
                (b.c, a.c, false)
            }
        } else {
            let (ma, mb) = self.mag.map_or((f64::NAN, f64::NAN), |m| {
                (m.get(a.c as usize), m.get(b.c as usize))
            });
            if ma.is_finite() && mb.is_finite() && ma > mb {
                (a.c, b.c, true)
            } else {
                (b.c, a.c, true)
            }
        };
        Some((
            copy,
            Match {
                other: source,
                dp,
                off_h: off * 24.0,
                n,
                sep,
                fainter,
            },
        ))
    }
}

/// How far b's transits fall from a's (days), when within the timing
/// tolerance: a quarter of the shorter duration, or 3σ of the combined
/// timing error, the period's error (variance `var_p`) carried over the
/// cycles between the epochs. `shift` (days) moves b's epoch, for the
/// control ([`Pair::control`]); 0 otherwise.
fn in_time(a: &Sig, b: &Sig, shift: f64, var_p: f64) -> Option<f64> {
    let epoch = b.epoch + shift;
    // b's transit nearest a's epoch, against a's transits.
    // Multiplied by the reciprocal periods (as the results always were).
    let nb = nearest((a.epoch - epoch) * (1.0 / b.period));
    let diff = epoch + nb * b.period - a.epoch;
    let off = (diff - nearest(diff * (1.0 / a.period)) * a.period).abs();
    // Squared again: no root taken.
    (off <= 0.25 * a.t14_d.min(b.t14_d)
        || off * off <= 9.0 * (a.epoch_err.powi(2) + b.epoch_err.powi(2) + nb * nb * var_p))
        .then_some(off)
}

/// The period order as one integer: the order of `f64::total_cmp` on the
/// period, then a hash of the candidate (so that copies of one ephemeris on
/// many stars interleave), then the candidate.
fn order_key(period: f64, c: CandidateId) -> u128 {
    (u128::from(total_order_bits(period)) << 64)
        | (u128::from(c.wrapping_mul(2_654_435_761)) << 32)
        | u128::from(c)
}

/// The period of an [`order_key`]: its high 64 bits turned back
/// ([`total_order_bits`] undone).
pub(super) fn period_of_key(k: u128) -> f64 {
    let bits = (k >> 64) as u64;
    f64::from_bits(if bits >> 63 == 1 {
        bits ^ (1 << 63)
    } else {
        !bits
    })
}

/// An integer whose order is that of [`f64::total_cmp`]: the sign bit
/// flipped for positive numbers, every bit for negative ones.
fn total_order_bits(x: f64) -> u64 {
    let bits = x.to_bits();
    if bits >> 63 == 1 {
        !bits
    } else {
        bits | 1 << 63
    }
}

/// The whole number nearest `x`, halves to even (`f64::round_ties_even`):
/// adding 2^52 leaves no room for a fraction, and taking it away again gives
/// the rounded value. On the baseline x86-64 target this is two additions,
/// where `round` is a library call. Which way a half goes does not matter
/// here: the offset from a transit is then half a period either way.
fn nearest(x: f64) -> f64 {
    const TWO_52: f64 = 4_503_599_627_370_496.0;
    let a = x.abs();
    // At 2^52 and beyond every f64 is whole (NaN and infinities stay).
    if x.is_nan() || a >= TWO_52 {
        return x;
    }
    ((a + TWO_52) - TWO_52).copysign(x)
}

/// The most neighbours in period each signal is compared with, and the
/// most matches it collects in each window (a signal copied onto dozens of
/// stars is an echo whichever of them it is compared with).
const ECHO_WINDOW: usize = 256;
const ECHO_MATCHES: usize = 16;

/// The widest relative difference in period matched between two signals
/// with positions, within 3σ of their errors: one sector's search gives
/// periods to 10⁻⁴–10⁻³ of themselves (from memory), and a neighbour's
/// light in the same pixels is found with the same uncertainty. Without
/// positions every signal is a neighbour, and `echo_max_rel` bounds the
/// search instead.
const ECHO_PLACED_REL: f64 = 5e-3;
/// The widest echo radius, arcsec, at which [`ECHO_PLACED_REL`] applies
/// (one degree: bands of the sky that narrow hold few signals).
const ECHO_PLACED_RADIUS: f64 = 3600.0;

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
        // A missing coordinate is no distance, not half the sky.
        assert!(separation_arcsec(f64::NAN, f64::NAN, 10.0, 20.0).is_nan());
        // Antipodes: √h rounds to 1 or a hair above; the bound keeps 180°.
        assert!((separation_arcsec(0.0, 0.0, 180.0, 0.0) - 648_000.0).abs() < 1e-6);
    }

    #[test]
    fn a_period_order_key_gives_back_its_period() {
        for p in [3.7123, 0.5, 1e-300, 1234.5678, -2.5, 0.0, -0.0] {
            assert_eq!(period_of_key(order_key(p, 7)).to_bits(), p.to_bits(), "{p}");
        }
    }

    #[test]
    fn total_order_bits_orders_as_total_cmp() {
        let xs = [
            f64::NEG_INFINITY,
            -1e300,
            -2.5,
            -f64::MIN_POSITIVE,
            -0.0,
            0.0,
            f64::MIN_POSITIVE,
            1.0,
            1.0 + f64::EPSILON,
            3.5,
            f64::MAX,
            f64::INFINITY,
            f64::NAN,
            -f64::NAN,
        ];
        for a in xs {
            for b in xs {
                assert_eq!(
                    total_order_bits(a).cmp(&total_order_bits(b)),
                    a.total_cmp(&b),
                    "{a} against {b}"
                );
            }
        }
    }

    #[test]
    fn nearest_is_round_ties_even() {
        // The halves, the edges of the integer range, tiny and huge values,
        // non-finite ones, and a sweep of ordinary values.
        let mut xs = vec![
            0.5,
            -0.5,
            1.5,
            -1.5,
            2.5,
            -2.5,
            0.49999999999999994,
            -0.49999999999999994,
            4503599627370495.5,
            -4503599627370495.5,
            4503599627370496.0,
            9.1e18,
            -9.3e18,
            1e300,
            1e-300,
            f64::MIN_POSITIVE,
            f64::INFINITY,
            f64::NEG_INFINITY,
            0.0,
            2.0,
        ];
        let mut x = -1000.0_f64;
        while x < 1000.0 {
            xs.push(x);
            x += 0.123_456_789;
        }
        for x in xs {
            let (got, want) = (nearest(x), x.round_ties_even());
            // Bitwise: the sign of a zero result too.
            assert!(got.to_bits() == want.to_bits(), "{x}: {got} against {want}");
        }
        assert!(nearest(f64::NAN).is_nan());
    }
}

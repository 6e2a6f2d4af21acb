//! One ephemeris on many stars, wherever they lie: the same period and
//! epoch, within their errors, on more stars than chance allows. A
//! neighbour's light is sought within the echo radius (`sweep`); this is
//! the instrument's own signal, which falls at the same times on stars all
//! over the detector, or a bright eclipse's light carried across it
//! (Coughlin et al. 2014, AJ 147, 119, *from memory*: ephemeris matches at
//! large separations through the detector's column anomalies and
//! cross-talk). By chance a signal's neighbours in period fall at random
//! phases, so the count near its own is Poisson, and the count that
//! flags it is one chance would give at most once in a hundred
//! catalogues (docs/science.md §3.3).
//!
//! Only a candidate that shares its star with another is judged (no other
//! can be validated), against every signal of the catalogue. Signals are
//! counted into bins of the period's bits at least as wide as the widest
//! relative difference the echo search matches, and sorted by phase
//! within each: the others a signal can match lie in its bin and the two
//! beside it, within a narrow phase window, counted by pointers that only
//! move forward; the matches themselves are sought only where the window
//! holds enough rows, nearest in phase first and no further than a flag
//! needs ([`ENOUGH`], [`COMPARED`]). O(n) but for the sorts of the bins.

use super::{Pair, Quick, Sig, in_time};
use crate::catalogue::{CandidateId, Catalogue, Column};

/// A catalogue-wide chance of a false flag this small or smaller: the
/// count of matches a signal needs is the least whose Poisson tail, at the
/// chance matches a signal has, times the signals judged, is below it
/// *(common practice, no source)*.
const FALSE_FLAGS: f64 = 0.01;

/// The matches past which a flagged signal's are not sought further
/// (unless it may be their source): its verdict is the same with more.
const ENOUGH: usize = 16;

/// The rows of its window a signal is compared with at most, nearest in
/// phase first, beside four per match it needs: where more rows than
/// that lie about a phase, a shared signal's (the same to its errors)
/// are the nearest.
const COMPARED: usize = 256;

/// Never fewer matches than this: two signals of one ephemeris are the echo
/// search's to judge (a neighbour's light, or chance).
const LEAST_MATCHES: usize = 3;

/// The phase window searched either side of a signal, cycles: a shared
/// signal's times are the instrument's, the same to a few minutes, and a
/// quarter of a transit is 0.003 of the period of a 3 h transit at 10 d;
/// the echo search's own tests then decide. Matches farther apart in phase
/// are not counted.
const COARSE_PHASE: f64 = 0.004;

/// A candidate whose ephemeris more stars share than chance allows.
pub(super) struct Found {
    pub c: CandidateId,
    /// How many signals on other stars share it, and the nearest in phase.
    pub n: usize,
    pub first: CandidateId,
    /// Whether rows of its window were left uncompared once it was
    /// flagged past doubt (`n` is then a least count).
    pub more: bool,
    /// Whether it is more than twice as deep as any of them (the possible
    /// source of their light).
    pub source: bool,
    /// The matches chance gives a signal of its period range, and the
    /// fewest that flag it.
    pub chance: f64,
    pub needed: usize,
}

/// The search (module docs). `sig(i)` is the i-th signal in file order;
/// `periods` and `epochs` its columns, read alone where the rest is not
/// needed.
pub(super) fn find(
    cat: &Catalogue,
    pair: &Pair,
    (periods, epochs): (&Column, &Column),
    sig: &impl Fn(usize) -> Sig,
    copies: &[Vec<CandidateId>],
) -> Vec<Found> {
    let n = cat.len();
    // The judged: candidates that share their star, a bit each by row. A
    // row listed on several star ids (`copies`) is one signal, judged once
    // under the first of its ids judged, and its finding is each such id's.
    let shares_star = |c: CandidateId| cat.members(cat.star_of(c)).len() >= 2;
    let mut judged = vec![0u64; n.div_ceil(64)];
    for star in 0..cat.star_count() as u32 {
        let members = cat.members(star);
        if members.len() >= 2 {
            for &c in members {
                judged[c as usize / 64] |= 1 << (c % 64);
            }
        }
    }
    let mut judged_for: Vec<(CandidateId, &[CandidateId])> = Vec::new();
    for set in copies {
        let mut ids = set.iter().copied().filter(|&c| shares_star(c));
        if let Some(first) = ids.next() {
            for c in ids {
                judged[c as usize / 64] &= !(1 << (c % 64));
            }
            judged_for.push((first, set));
        }
    }
    if judged.iter().all(|&w| w == 0) {
        return Vec::new();
    }
    let is_judged = |c: u32| judged[c as usize / 64] >> (c % 64) & 1 == 1;
    // Bins of the period's bits: 2^shift of them span a relative width of
    // 2^(shift − 53) to 2^(shift − 52) of the period, at least the widest
    // relative difference the echo search matches.
    let shift = (53.0 + pair.s.echo_max_rel.log2()).ceil().clamp(1.0, 62.0) as u32;
    // Phases from an epoch near the data: the middle of the signals'.
    let mut sample: Vec<f64> = (0..n)
        .step_by((n / 4096).max(1))
        .map(|i| epochs.get(i))
        .collect();
    sample.sort_by(f64::total_cmp);
    let zero = sample[sample.len() / 2];
    let bin = |i: usize| {
        let p = periods.get(i);
        (p > 0.0 && p.is_finite() && epochs.get(i).is_finite()).then(|| p.to_bits() >> shift)
    };
    // The signals by bin (a counting sort: bins are few and dense), each
    // bin's by phase: a key each, the phase in 2³² steps and the row.
    let bins: Vec<u64> = (0..n).map(|i| bin(i).unwrap_or(u64::MAX)).collect();
    let (first_bin, last_bin) = (bins.iter().copied())
        .filter(|&b| b != u64::MAX)
        .fold((u64::MAX, 0), |(lo, hi), b| (lo.min(b), hi.max(b)));
    if first_bin > last_bin || last_bin - first_bin > 64 * n as u64 + (1 << 20) {
        return Vec::new();
    }
    let mut starts = vec![0usize; (last_bin - first_bin) as usize + 2];
    for &b in bins.iter().filter(|&&b| b != u64::MAX) {
        starts[(b - first_bin) as usize + 1] += 1;
    }
    for i in 1..starts.len() {
        starts[i] += starts[i - 1];
    }
    let mut keys = vec![0u64; starts[starts.len() - 1]];
    let mut fill = starts.clone();
    for (i, &b) in bins.iter().enumerate() {
        if b != u64::MAX {
            let phase = ((epochs.get(i) - zero) / periods.get(i)).rem_euclid(1.0);
            let slot = &mut fill[(b - first_bin) as usize];
            keys[*slot] = key(phase, i as u32);
            *slot += 1;
        }
    }
    drop((fill, bins));
    // The bins that hold signals: (bin, where its keys start), sorted by
    // phase; one entry more for the end.
    let mut runs: Vec<(u64, usize)> = Vec::new();
    for b in 0..starts.len() - 1 {
        if starts[b + 1] > starts[b] {
            keys[starts[b]..starts[b + 1]].sort_unstable();
            runs.push((b as u64, starts[b]));
        }
    }
    runs.push((u64::MAX, keys.len()));
    drop(starts);
    let count = runs.len() - 1;
    let (keys, runs) = (&keys, &runs);
    let run = |r: usize| &keys[runs[r].1..runs[r + 1].1];
    // The runs beside run r: its own and those of the bins next to it.
    let beside = move |r: usize| {
        let b = runs[r].0;
        [r.wrapping_sub(1), r, r + 1]
            .into_iter()
            .filter(move |&q| q < count && runs[q].0.abs_diff(b) <= 1)
    };
    // Whether signals a and b share an ephemeris: the echo search's own
    // tests at one period, as if neither had a position.
    let shares = |a: &Sig, b: &Sig| {
        let (a, b) = if a.period <= b.period { (a, b) } else { (b, a) };
        let quick = |s: &Sig| Quick {
            placed: false,
            ..s.quick()
        };
        pair.plausible(&quick(a), &quick(b), 1.0)
            && in_time(a, b, 0.0, b.period_err.powi(2) + a.period_err.powi(2)).is_some()
    };
    // Candidate c's matches among the rows of the runs beside r within the
    // phase window of `at`, nearest in phase first: (how many, the nearest,
    // the deepest's depth, whether more were left unsought). Sought until
    // the count flags it past doubt: [`ENOUGH`] of them (or all its window
    // holds), and one at least half as deep as itself (it is then no
    // source); and among [`COMPARED`] rows and four per match needed at
    // most. One ephemeris on a hundred thousand stars costs a few dozen
    // comparisons a signal, not a hundred thousand.
    let half = (COARSE_PHASE * CYCLE as f64) as i64;
    let same_row = crate::checks::copies::SameRow::of(cat);
    let matches = |c: u32, r: usize, at: i64, needed: usize| {
        let s = sig(c as usize);
        let own = pair.depth_of(c);
        let budget = COMPARED.saturating_add(needed.saturating_mul(4));
        let (mut count, mut first, mut deepest) = (0, None, f64::NAN);
        let mut compared = 0;
        let mut nearest = Nearest::new(beside(r).map(run), at, half);
        while let Some(o) = nearest.next() {
            if o == c {
                continue;
            }
            if compared == budget {
                return (count, first, deepest, true);
            }
            compared += 1;
            let other = sig(o as usize);
            // Its own row listed under another star id (`copies`): itself,
            // no match.
            if other.star == s.star || !shares(&s, &other) || same_row.same(c, o) {
                continue;
            }
            count += 1;
            first.get_or_insert(o);
            deepest = deepest.max(pair.depth_of(o));
            // Its source, perhaps, while more than twice as deep as all.
            let source = own > 2.0 * deepest;
            if count >= needed.max(ENOUGH) && !source {
                return (count, first, deepest, nearest.more());
            }
        }
        (count, first, deepest, false)
    };
    let judged_count = judged
        .iter()
        .map(|w| w.count_ones() as usize)
        .sum::<usize>();
    // Each judged signal, against the chance of its own period range:
    // by chance the rows about it fall at random phases, so its window
    // holds a Poisson number of them, the rows about it times the window's
    // width; every one of them a match is the most chance can give (the
    // tests of a match only remove). How many rows its window holds is
    // counted with pointers that only move forward; the matches
    // themselves are sought only where that many could be enough.
    let mut found = Vec::new();
    // The matches needed, by the rows about a signal (worked out once each).
    let mut needs: Vec<usize> = Vec::new();
    for r in 0..count {
        let about = beside(r).map(|q| run(q).len()).sum::<usize>() - 1;
        let chance = about as f64 * 2.0 * COARSE_PHASE;
        if needs.len() <= about {
            needs.resize(about + 1, 0);
        }
        if needs[about] == 0 {
            needs[about] = needed(chance, judged_count);
        }
        let needed = needs[about];
        let mut windows: Vec<Window> = beside(r).map(|q| Window::new(run(q))).collect();
        for &k in run(r).iter().filter(|&&k| is_judged(k as u32)) {
            let coarse: usize = windows.iter_mut().map(|w| w.count(phase(k), half)).sum();
            // Itself is in its own run's window.
            if coarse > needed {
                let c = k as u32;
                let (n, first, deepest, more) = matches(c, r, phase(k), needed);
                if let Some(first) = first.filter(|_| n >= needed) {
                    let source = pair.depth_of(c) > 2.0 * deepest;
                    found.push(Found {
                        c,
                        n,
                        first,
                        more,
                        source,
                        chance,
                        needed,
                    });
                }
            }
        }
    }
    found.sort_unstable_by_key(|f| f.c);
    // A row listed on several star ids: the finding of the id judged is
    // each judged id's.
    let mut each = Vec::new();
    for (first, set) in judged_for {
        if let Ok(i) = found.binary_search_by_key(&first, |f| f.c) {
            let others = set
                .iter()
                .copied()
                .filter(|&c| c != first && shares_star(c));
            each.extend(others.map(|c| Found { c, ..found[i] }));
        }
    }
    found.extend(each);
    found.sort_unstable_by_key(|f| f.c);
    found
}

/// The rows of one run (one bin's keys, by phase) within a window about a
/// phase that only grows: pointers that only move forward. Phases in 2³²
/// steps, compared as integers.
struct Window<'a> {
    run: &'a [u64],
    /// First row at or after the window's start; first after its end.
    from: usize,
    to: usize,
    /// The rows the window takes past phase 1, wrapping to 0 (the first
    /// after them), and before phase 0, wrapping to 1 (the first of them).
    head: usize,
    tail: usize,
}

/// One cycle of phase in the keys' steps.
const CYCLE: i64 = 1 << 32;

impl<'a> Window<'a> {
    fn new(run: &'a [u64]) -> Window<'a> {
        Window {
            run,
            from: 0,
            to: 0,
            head: 0,
            tail: 0,
        }
    }

    /// How many rows lie within `half` of phase `at` (both in the keys'
    /// steps; `at` at least the last call's), the window wrapping through 0.
    fn count(&mut self, at: i64, half: i64) -> usize {
        let run = self.run;
        let phase = |i: usize| phase(run[i]);
        let (lo, hi) = (at - half, at + half);
        while self.from < run.len() && phase(self.from) < lo {
            self.from += 1;
        }
        self.to = self.to.max(self.from);
        while self.to < run.len() && phase(self.to) <= hi {
            self.to += 1;
        }
        let mut n = self.to - self.from;
        if hi >= CYCLE {
            while self.head < run.len() && phase(self.head) <= hi - CYCLE {
                self.head += 1;
            }
            n += self.head.min(self.from);
        }
        if lo < 0 {
            while self.tail < run.len() && phase(self.tail) < lo + CYCLE {
                self.tail += 1;
            }
            n += run.len() - self.tail.max(self.to);
        }
        n
    }
}

/// The rows of a few runs (each one bin's keys, by phase) within `half`
/// of phase `at`, nearest first, the window wrapping through 0: those
/// [`Window::count`] counts (phases in the keys' steps). Each run is walked
/// both ways from `at`, and the nearer of all their next rows taken.
struct Nearest<'a> {
    sides: [Side<'a>; 3],
    at: i64,
    half: i64,
}

/// One run walked both ways from a phase: the next row up and the next
/// down (wrapping), and how many rows are left to take.
#[derive(Default)]
struct Side<'a> {
    run: &'a [u64],
    up: usize,
    down: usize,
    left: usize,
}

impl<'a> Side<'a> {
    fn new(run: &'a [u64], at: i64) -> Side<'a> {
        let n = run.len();
        let from = run.partition_point(|&k| phase(k) < at);
        Side {
            run,
            up: if n == 0 { 0 } else { from % n },
            down: (from + n).saturating_sub(1) % n.max(1),
            left: n,
        }
    }

    /// How far row i lies from `at` in phase, either way round.
    fn distance(&self, i: usize, at: i64) -> i64 {
        let d = (phase(self.run[i]) - at).rem_euclid(CYCLE);
        d.min(CYCLE - d)
    }

    /// The distance of the nearer next row, and whether it is the one up.
    fn next(&self, at: i64) -> Option<(i64, bool)> {
        (self.left > 0).then(|| {
            let (up, down) = (self.distance(self.up, at), self.distance(self.down, at));
            if up <= down {
                (up, true)
            } else {
                (down, false)
            }
        })
    }

    fn take(&mut self, up: bool) -> u32 {
        let n = self.run.len();
        let i = if up { self.up } else { self.down };
        if up {
            self.up = (i + 1) % n;
        } else {
            self.down = (i + n - 1) % n;
        }
        self.left -= 1;
        self.run[i] as u32
    }
}

impl<'a> Nearest<'a> {
    fn new(runs: impl Iterator<Item = &'a [u64]>, at: i64, half: i64) -> Nearest<'a> {
        let mut sides: [Side<'a>; 3] = Default::default();
        for (side, run) in sides.iter_mut().zip(runs) {
            *side = Side::new(run, at);
        }
        Nearest { sides, at, half }
    }

    /// The side whose next row is nearest, and which way, if within the window.
    fn nearest(&self) -> Option<(usize, bool)> {
        (self.sides.iter().enumerate())
            .filter_map(|(i, s)| s.next(self.at).map(|(d, up)| (d, i, up)))
            .min()
            .filter(|&(d, _, _)| d <= self.half)
            .map(|(_, i, up)| (i, up))
    }

    /// Whether rows are left within the window.
    fn more(&self) -> bool {
        self.nearest().is_some()
    }
}

impl Iterator for Nearest<'_> {
    type Item = u32;

    fn next(&mut self) -> Option<u32> {
        let (i, up) = self.nearest()?;
        Some(self.sides[i].take(up))
    }
}

/// A key's phase, in its steps (2³² a cycle).
fn phase(k: u64) -> i64 {
    (k >> 32) as i64
}

/// A signal's key within its bin: its phase in 2³² steps, then its row.
fn key(phase: f64, row: u32) -> u64 {
    let phase = (phase * 4_294_967_296.0).min(4_294_967_295.0) as u32;
    (u64::from(phase) << 32) | u64::from(row)
}

/// The fewest matches that flag a signal: the least m ≥ [`LEAST_MATCHES`]
/// with `signals` · P(X ≥ m) < [`FALSE_FLAGS`] for X Poisson of mean
/// `chance`.
fn needed(chance: f64, signals: usize) -> usize {
    (LEAST_MATCHES..)
        .find(|&m| signals as f64 * poisson_tail(chance, m) < FALSE_FLAGS)
        .unwrap_or(usize::MAX)
}

/// P(X ≥ m) for X Poisson of mean `mean`: the terms from m summed (no
/// cancellation for a small tail).
fn poisson_tail(mean: f64, m: usize) -> f64 {
    if mean <= 0.0 {
        return if m == 0 { 1.0 } else { 0.0 };
    }
    // ln of the m-th term, e^-λ λ^m / m!.
    let ln_term = -mean + m as f64 * mean.ln() - (1..=m).map(|k| (k as f64).ln()).sum::<f64>();
    let mut term = ln_term.exp();
    let mut sum = 0.0;
    for k in m..m + 400 {
        sum += term;
        term *= mean / (k + 1) as f64;
        if term < sum * 1e-17 {
            break;
        }
    }
    sum.min(1.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_poisson_tail_is_statrs() {
        // Reference: statrs's Poisson distribution (1 − cdf(m − 1)).
        use statrs::distribution::{DiscreteCDF, Poisson};
        for mean in [1e-4, 0.01, 0.3, 2.0, 7.5] {
            let p = Poisson::new(mean).unwrap();
            for m in 1..12usize {
                let want = 1.0 - p.cdf(m as u64 - 1);
                let got = poisson_tail(mean, m);
                assert!(
                    (got - want).abs() <= 1e-12 + 1e-9 * want,
                    "{mean} {m}: {got} {want}"
                );
            }
        }
        // A tail too small for 1 − cdf: λ⁵/5! e^−λ to first order.
        let t = poisson_tail(1e-4, 5);
        assert!((t / (1e-20 / 120.0) - 1.0).abs() < 1e-3, "{t}");
    }

    #[test]
    fn the_matches_needed_grow_with_chance_and_signals() {
        // No chance at all: the floor. 1e5 signals with 0.01 chance
        // matches each: 1e5 · P(X ≥ 3) = 1e5 · 1.66e-7 = 0.017 is too many,
        // P(X ≥ 4) = 4.1e-10 is not.
        assert_eq!(needed(0.0, 1_000_000), LEAST_MATCHES);
        assert_eq!(needed(0.01, 100_000), 4);
        assert!(needed(0.5, 1_000_000) > needed(0.01, 1_000_000));
    }

    #[test]
    fn a_window_counts_the_rows_near_a_phase_through_zero() {
        // Rows at phases 0.001, 0.002, 0.5, 0.998, 0.999, by phase.
        let run: Vec<u64> = [0.001, 0.002, 0.5, 0.998, 0.999]
            .iter()
            .enumerate()
            .map(|(i, &p)| key(p, i as u32))
            .collect();
        let q = |p: f64| (p * CYCLE as f64) as i64;
        let mut w = Window::new(&run);
        // Within 0.002 of 0.0005: 0.001, 0.002 and, through 0, 0.999.
        assert_eq!(w.count(q(0.0005), q(0.002)), 3);
        // Of 0.4995: 0.5 alone.
        assert_eq!(w.count(q(0.4995), q(0.002)), 1);
        // Of 0.9985: 0.998, 0.999, and nothing past 1 (0.0005 and below).
        assert_eq!(w.count(q(0.9985), q(0.002)), 2);
        // Of 0.9995: 0.998, 0.999 and, through 1, 0.001.
        assert_eq!(w.count(q(0.9995), q(0.002)), 3);
        // The same counts as a search of every row.
        let every = |at: f64, half: f64| {
            [0.001, 0.002, 0.5, 0.998, 0.999]
                .iter()
                .filter(|&&p: &&f64| {
                    let d = (p - at).rem_euclid(1.0);
                    d.min(1.0 - d) <= half
                })
                .count()
        };
        let mut w = Window::new(&run);
        for at in [0.0, 0.0015, 0.2, 0.4985, 0.997, 0.9999] {
            assert_eq!(w.count(q(at), q(0.0025)), every(at, 0.0025), "{at}");
            // And `Nearest` gives those same rows, nearest first.
            let rows: Vec<u32> = Nearest::new([&run[..]].into_iter(), q(at), q(0.0025)).collect();
            assert_eq!(rows.len(), every(at, 0.0025), "{at}");
            let far = |r: &u32| {
                let d = ([0.001, 0.002, 0.5, 0.998, 0.999][*r as usize] - at).rem_euclid(1.0);
                d.min(1.0 - d)
            };
            assert!(
                rows.windows(2).all(|w| far(&w[0]) <= far(&w[1])),
                "{at}: {rows:?}"
            );
        }
    }

    #[test]
    fn keys_sort_by_phase_then_row() {
        let mut k = [key(0.1, 9), key(0.9, 1), key(0.05, 10), key(0.9, 0)];
        k.sort_unstable();
        assert_eq!(k, [key(0.05, 10), key(0.1, 9), key(0.9, 0), key(0.9, 1)]);
        assert!(key(1.0, 0) > key(0.999_999, u32::MAX));
        assert_eq!(phase(key(0.25, 7)), CYCLE / 4);
    }
}

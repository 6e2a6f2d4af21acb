//! One row under two star ids. A table merged from two sources, or one
//! star listed under two catalogues' ids, can carry the same row twice: the
//! same period, epoch, depth and duration, to the last digit written (one
//! source may write fewer digits, or the epoch from another zero or moved
//! whole periods to a later transit), on two
//! star ids. That is no neighbour's light (§3.3: a neighbour's copy is diluted,
//! so shallower, and measured anew), it is one entry named twice. Which
//! star it is on cannot be known: each copy is flagged `mixed-host` and
//! counts towards neither system; the copies are one signal group (one
//! verdict); and the two star ids are tied, so a false positive at one
//! holds the candidates of the other, as a split family or one place does
//! (docs/science.md §3.4).

use super::Checks;
use super::system::Link;
use crate::catalogue::{CandidateId, Catalogue, Column, Field, StarId};
use crate::flags::Flag;

/// What makes a row's signal, as read, but its epoch: the bit patterns of
/// its period, depth and duration (a missing duration as one NaN).
type Key = [u64; 3];

/// Two epochs this close, days, once counted from one zero, are one epoch
/// as two tables wrote it: rounding to the 3–6 decimals catalogues write
/// leaves them closer; 0.001 d is 86 s, far below any epoch's error
/// (common practice, no source).
const EPOCH_TOLERANCE_D: f64 = 1e-3;

/// The widest rounding of a period compared: written to two decimals. A
/// period written with fewer is compared only with its equal.
const PERIOD_WINDOW_D: f64 = 0.005;

/// How many rows of the period order each row is compared with on either
/// side for a copy written with other digits, and rows of one period by
/// depth.
const NEIGHBOURS: usize = 8;

/// How far apart two depths of one period may always be, ppm, to be
/// compared as one written with other digits: an integer ppm's rounding
/// (wider where the table wrote fewer digits, `Written::half_digit`).
const DEPTH_WINDOW_PPM: f64 = 0.5;

/// The amounts, days, by which two writings of one epoch differ when each
/// counts from its own zero: 0, and the differences of the common zeros
/// and of each from the full Julian date (BJD − 2457000 against BJD is
/// 2457000; against BJD − 2454833, 2167). Computed once.
fn zero_shifts() -> &'static [f64] {
    static SHIFTS: std::sync::LazyLock<Vec<f64>> = std::sync::LazyLock::new(|| {
        let zeros: Vec<f64> = std::iter::once(0.0)
            .chain(crate::lightcurve::timezero::COMMON_ZEROS)
            .collect();
        let mut out: Vec<f64> = zeros
            .iter()
            .flat_map(|a| zeros.iter().map(move |b| a - b))
            .filter(|d| *d >= 0.0)
            .collect();
        out.sort_by(f64::total_cmp);
        out.dedup();
        out
    });
    &SHIFTS
}

/// A column and what the table's values were multiplied by to be stored
/// in it (`Catalogue::written_scale`: 10⁴ for a depth in percent), so that
/// a value's digits are counted as the table wrote them.
#[derive(Clone, Copy)]
struct Written<'a> {
    col: &'a Column,
    scale: f64,
}

impl<'a> Written<'a> {
    fn of(cat: &'a Catalogue, field: Field) -> Option<Written<'a>> {
        Some(Written {
            col: cat.column(field)?,
            scale: cat.written_scale(field),
        })
    }

    fn get(&self, i: usize) -> f64 {
        self.col.get(i)
    }

    /// The decimals the i-th value is written with in the table, its zeros
    /// at the end after the point left out (`3000` has 0, `3.70` 1, a depth
    /// of `0.30` % 1); `None` for a value that is no short decimal (kept
    /// whole, or converted by no factor: compared exactly).
    fn decimals(&self, i: usize) -> Option<i32> {
        if self.scale == 1.0 {
            return Some(self.col.decimal(i)?.trimmed().scale as i32);
        }
        if !self.scale.is_finite() || self.scale == 0.0 {
            return None;
        }
        written_decimals(self.col.get(i) / self.scale)
    }

    /// Half a unit in the last decimal the i-th value is written with, in
    /// the stored unit: how far the value it rounds may lie; zero for a
    /// value kept whole ([`Written::decimals`]).
    fn half_digit(&self, i: usize) -> f64 {
        self.decimals(i)
            .map_or(0.0, |k| 0.5 * 10f64.powi(-k) * self.scale.abs())
    }

    /// How far values `a` and `b` may lie apart and be one value as two
    /// tables wrote it: the coarser's rounding, at least `floor` and at
    /// most `cap` (and a hair more, for the arithmetic).
    fn tolerance(&self, a: usize, b: usize, (floor, cap): (f64, f64)) -> f64 {
        (self.half_digit(a))
            .max(self.half_digit(b))
            .max(floor)
            .min(cap)
            * (1.0 + 1e-9)
    }
}

/// The decimals of `w`, a value divided back into the unit its table
/// wrote it in, as the table wrote it: its digits to 15 significant
/// figures (the division leaves an error far below them), the zeros at
/// the end left out.
fn written_decimals(w: f64) -> Option<i32> {
    if !w.is_finite() {
        return None;
    }
    let text = format!("{:.14e}", w.abs());
    let (mantissa, exp) = text.split_once('e')?;
    let exp: i32 = exp.parse().ok()?;
    let after = mantissa.split_once('.').map_or("", |(_, f)| f);
    Some((after.trim_end_matches('0').len() as i32 - exp).max(0))
}

/// Whether values `a` and `b` of `col` are one value as two tables wrote
/// it: equal, or one the other rounded to the coarser's last decimal
/// (`3.7123` and `3.712345`; `3000` and `3000.4`; `0.30` % and `0.3012` %),
/// the rounding within `bounds` ([`Written::tolerance`]). `shifts`:
/// amounts the two may also differ by (an epoch's zeros).
fn one_value(col: Written, a: usize, b: usize, shifts: &[f64], bounds: (f64, f64)) -> bool {
    let (x, y) = (col.get(a), col.get(b));
    if x.to_bits() == y.to_bits() {
        return true;
    }
    let tolerance = col.tolerance(a, b, bounds);
    let d = (x - y).abs();
    shifts.iter().any(|s| (d - s).abs() <= tolerance)
}

/// The columns a row's signal is read from.
struct Cols<'a> {
    period: Written<'a>,
    epoch: Written<'a>,
    depth: Written<'a>,
    duration: Option<Written<'a>>,
    shifts: &'static [f64],
}

impl<'a> Cols<'a> {
    fn of(cat: &'a Catalogue) -> Option<Cols<'a>> {
        Some(Cols {
            period: Written::of(cat, Field::PeriodD)?,
            epoch: Written::of(cat, Field::Epoch)?,
            depth: Written::of(cat, Field::DepthPpm)?,
            duration: Written::of(cat, Field::DurationH),
            shifts: zero_shifts(),
        })
    }

    /// Row `c`'s key and epoch; `None` when its period, epoch or depth is
    /// missing or its depth is not above zero (nothing to be the same of).
    fn key(&self, c: CandidateId) -> Option<(Key, f64)> {
        let i = c as usize;
        let (p, e, d) = (self.period.get(i), self.epoch.get(i), self.depth.get(i));
        if !(p.is_finite() && e.is_finite() && d > 0.0 && d.is_finite()) {
            return None;
        }
        let t = self.duration.map_or(f64::NAN, |t| t.get(i));
        let t = if t.is_nan() { f64::NAN } else { t };
        Some(([p.to_bits(), d.to_bits(), t.to_bits()], e))
    }

    /// Whether rows `a` and `b` carry the same signal: period, depth,
    /// duration and epoch each one value as written ([`one_value`]; the
    /// period within [`PERIOD_WINDOW_D`] at most; the epoch as
    /// [`Cols::epoch_relation`] says).
    fn same(&self, a: CandidateId, b: CandidateId) -> bool {
        let (i, j) = (a as usize, b as usize);
        let any = (0.0, f64::INFINITY);
        // The depth first: it tells most rows of one period apart.
        one_value(self.depth, i, j, &[0.0], any)
            && one_value(self.period, i, j, &[0.0], (0.0, PERIOD_WINDOW_D))
            && (self.duration).is_none_or(|t| one_value(t, i, j, &[0.0], any))
            && self.epoch_relation(i, j).is_some()
            && self.key(a).is_some()
            && self.key(b).is_some()
    }

    /// How the epochs of rows `i` and `j` (whose periods are one value as
    /// written) are one ephemeris: `(shift, n)` when they differ by the
    /// difference `shift` of two common zeros and `n` whole periods, within
    /// the epochs' rounding (at least [`EPOCH_TOLERANCE_D`]) and `n` times
    /// the period's; `None` otherwise. A table that moved the epoch to a
    /// later transit (`n` ≠ 0) is matched only where that allowance stays
    /// within a quarter of the transit's duration, so that it still names
    /// one transit (*common practice, no source*): at most hundreds of
    /// periods for a period written to four decimals, a few for one
    /// written to two.
    fn epoch_relation(&self, i: usize, j: usize) -> Option<(f64, i64)> {
        let (x, y) = (self.epoch.get(i), self.epoch.get(j));
        if x.to_bits() == y.to_bits() {
            return Some((0.0, 0));
        }
        let tolerance = (self.epoch).tolerance(i, j, (EPOCH_TOLERANCE_D, f64::INFINITY));
        let d = (x - y).abs();
        if let Some(&s) = self.shifts.iter().find(|&&s| (d - s).abs() <= tolerance) {
            return Some((s, 0));
        }
        let period = self.period.get(i);
        let period_rounding = (self.period.half_digit(i))
            .max(self.period.half_digit(j))
            .min(PERIOD_WINDOW_D);
        let quarter = self
            .duration
            .map_or(f64::NAN, |t| t.get(i).min(t.get(j)) / 24.0 / 4.0);
        if !(period > 0.0 && quarter > 0.0) {
            return None;
        }
        self.shifts.iter().find_map(|&s| {
            let from = d - s;
            let n = (from / period).round();
            let allowed = (tolerance + n.abs() * period_rounding) * (1.0 + 1e-9);
            (n != 0.0 && (from - n * period).abs() <= allowed && allowed <= quarter)
                .then_some((s, n as i64))
        })
    }

    /// How far from row `c`'s period another row's may lie and still be
    /// the same value as written ([`Written::half_digit`], at most
    /// [`PERIOD_WINDOW_D`]).
    fn period_window(&self, c: CandidateId) -> f64 {
        self.period.half_digit(c as usize).min(PERIOD_WINDOW_D)
    }
}

/// Whether two rows carry the same signal, as written (the epoch perhaps
/// counted from another common zero), the catalogue's columns looked up
/// once for the many pairs a search asks about.
pub(super) struct SameRow<'a>(Option<Cols<'a>>);

impl<'a> SameRow<'a> {
    pub(super) fn of(cat: &'a Catalogue) -> SameRow<'a> {
        SameRow(Cols::of(cat))
    }

    /// Whether rows `a` and `b` carry the same signal.
    pub(super) fn same(&self, a: CandidateId, b: CandidateId) -> bool {
        self.0.as_ref().is_some_and(|k| k.same(a, b))
    }
}

/// The rows whose signal is repeated on another star id, in sets of one
/// signal (each in the order of star, then row), from the echo search's
/// period order (keys whose high 64 bits order the periods, the candidate
/// in the low 32). Rows of one period lie together there: those of one
/// key are compared by their epochs (O(r log r) for a run of r), and each
/// row with its [`NEIGHBOURS`] on either side within its period's
/// rounding, for the same row written with other digits. O(n) in all.
pub(super) fn find(cat: &Catalogue, period_order: &[u128]) -> Vec<Vec<CandidateId>> {
    let Some(cols) = Cols::of(cat) else {
        return Vec::new();
    };
    let mut pairs: Vec<(CandidateId, CandidateId)> = Vec::new();
    let mut run: Vec<(Key, f64, StarId, CandidateId)> = Vec::new();
    for same_period in period_order.chunk_by(|a, b| a >> 64 == b >> 64) {
        if same_period.len() < 2 {
            continue;
        }
        run.clear();
        run.extend(same_period.iter().filter_map(|&k| {
            let c = k as CandidateId;
            let (key, epoch) = cols.key(c)?;
            Some((key, epoch, cat.star_of(c), c))
        }));
        run.sort_unstable_by_key(|r| (r.0, r.2, r.3));
        for same in run.chunk_by(|a, b| a.0 == b.0) {
            if same.len() < 2 || same.iter().all(|r| r.2 == same[0].2) {
                continue;
            }
            pairs.extend(one_epoch_pairs(same, cols.shifts));
        }
        // One period, the depths (or durations) written with other digits:
        // by depth, each row against the next few on either side within
        // its depth's rounding as written, an integer ppm's at least (the
        // values at hand; `same` decides).
        let depth = |r: &(Key, f64, StarId, CandidateId)| f64::from_bits(r.0[1]);
        run.sort_unstable_by(|a, b| depth(a).total_cmp(&depth(b)));
        for (i, a) in run.iter().enumerate() {
            let window = cols.depth.half_digit(a.3 as usize).max(DEPTH_WINDOW_PPM) * (1.0 + 1e-9);
            let after = run[i + 1..].iter().take(NEIGHBOURS);
            let before = run[..i].iter().rev().take(NEIGHBOURS);
            let near = (after.take_while(|b| depth(b) - depth(a) <= window))
                .chain(before.take_while(|b| depth(a) - depth(b) <= window));
            for b in near {
                if a.2 != b.2 && cols.same(a.3, b.3) {
                    pairs.push((a.3.min(b.3), a.3.max(b.3)));
                }
            }
        }
    }
    // The same row written with other digits: a row and its neighbours
    // in the period order within its period's rounding. The decimals of
    // every period first, in row order (one pass through the column); the
    // order's periods from its keys.
    let written: Vec<i8> = (0..cat.len())
        .map(|i| (cols.period.decimals(i)).map_or(i8::MAX, |k| k.clamp(0, 20) as i8))
        .collect();
    // Within the rounding (and a hair more: `same` decides exactly), by
    // the decimals written.
    let windows: Vec<f64> = (0..=20)
        .map(|k| {
            (0.5 * 10f64.powi(-k) * cols.period.scale.abs()).min(PERIOD_WINDOW_D) * (1.0 + 1e-9)
        })
        .collect();
    for (at, &k) in period_order.iter().enumerate() {
        let c = k as CandidateId;
        let Some(&window) = windows.get(written[c as usize] as usize) else {
            continue;
        };
        let p = super::echo::period_of_key(k);
        // A window that holds more rows than are compared (a coarsely
        // written period in a dense table) is not searched; rows of the
        // very same period were compared above.
        let (lo, hi) = (
            at.checked_sub(NEIGHBOURS),
            period_order.get(at + NEIGHBOURS),
        );
        if lo.is_some_and(|lo| p - super::echo::period_of_key(period_order[lo]) <= window)
            && hi.is_some_and(|&h| super::echo::period_of_key(h) - p <= window)
        {
            continue;
        }
        let near = period_order[at.saturating_sub(NEIGHBOURS)..at]
            .iter()
            .rev()
            .take_while(|&&o| p - super::echo::period_of_key(o) <= window)
            .chain(
                period_order[at + 1..]
                    .iter()
                    .take(NEIGHBOURS)
                    .take_while(|&&o| super::echo::period_of_key(o) - p <= window),
            );
        for &o in near {
            if o >> 64 == k >> 64 {
                continue;
            }
            let o = o as CandidateId;
            if cat.star_of(o) != cat.star_of(c) && cols.same(c, o) {
                pairs.push((c.min(o), c.max(o)));
            }
        }
    }
    sets_of(cat, pairs)
}

/// The sets the `pairs` of one signal join (union by pair), each in the
/// order of star, then row, sets on one star alone left out, in the order
/// of their first row.
fn sets_of(cat: &Catalogue, pairs: Vec<(CandidateId, CandidateId)>) -> Vec<Vec<CandidateId>> {
    let mut rows: Vec<CandidateId> = pairs.iter().flat_map(|&(a, b)| [a, b]).collect();
    rows.sort_unstable();
    rows.dedup();
    let place = |c: CandidateId| rows.binary_search(&c).unwrap_or(0);
    let mut root: Vec<usize> = (0..rows.len()).collect();
    for &(a, b) in &pairs {
        let (ra, rb) = (
            find_root(&mut root, place(a)),
            find_root(&mut root, place(b)),
        );
        root[ra.max(rb)] = ra.min(rb);
    }
    let mut sets: Vec<Vec<CandidateId>> = vec![Vec::new(); rows.len()];
    for (i, &c) in rows.iter().enumerate() {
        let r = find_root(&mut root, i);
        sets[r].push(c);
    }
    sets.retain(|s| s.len() > 1);
    for s in &mut sets {
        s.sort_unstable_by_key(|&c| (cat.star_of(c), c));
    }
    sets.retain(|s| cat.star_of(s[0]) != cat.star_of(s[s.len() - 1]));
    sets.sort_unstable_by_key(|s| (cat.star_of(s[0]), s[0]));
    sets
}

/// The root of `i` in a union-find forest, its path halved.
fn find_root(root: &mut [usize], mut i: usize) -> usize {
    while root[i] != i {
        root[i] = root[root[i]];
        i = root[i];
    }
    i
}

/// Pairs of rows of `same` (one key) that carry one epoch (within
/// [`EPOCH_TOLERANCE_D`], perhaps a zero's shift away), enough for
/// [`sets_of`] to join every such row: epochs sorted, each row is paired
/// with the next within the tolerance and with the nearest a zero's shift
/// away. O(r log r) for r rows, however many repeat one epoch.
fn one_epoch_pairs(
    same: &[(Key, f64, StarId, CandidateId)],
    shifts: &[f64],
) -> Vec<(CandidateId, CandidateId)> {
    let mut by_epoch: Vec<usize> = (0..same.len()).collect();
    by_epoch.sort_by(|&a, &b| same[a].1.total_cmp(&same[b].1));
    let epoch = |j: usize| same[by_epoch[j]].1;
    let row = |j: usize| same[by_epoch[j]].3;
    let mut out = Vec::new();
    for j in 0..by_epoch.len() {
        if j + 1 < by_epoch.len() && epoch(j + 1) - epoch(j) <= EPOCH_TOLERANCE_D {
            out.push((row(j), row(j + 1)));
        }
        for &s in shifts.iter().filter(|s| **s > 0.0) {
            let at = epoch(j) + s;
            let k = by_epoch.partition_point(|&i| same[i].1 < at - EPOCH_TOLERANCE_D);
            if k < by_epoch.len() && epoch(k) <= at + EPOCH_TOLERANCE_D {
                out.push((row(j), row(k)));
            }
        }
    }
    out
}

/// The signal-group links of the sets [`find`] found, for
/// `checks::group_flags`: one signal, one verdict.
pub(super) fn links(cat: &Catalogue, sets: &[Vec<CandidateId>]) -> Vec<Link> {
    let mut out = Vec::new();
    for set in sets {
        for &c in &set[1..] {
            let other = on_another_star(cat, set, c);
            out.push(Link {
                a: other,
                b: c,
                flag: Flag::NearTwin,
                detail: if cat.star_of(other) == cat.star_of(c) {
                    format!("the same row on this star{}", zeros(cat, other, c))
                } else {
                    format!(
                        "the same row under another star id ({}): period, epoch, depth and duration equal to the digits written{}",
                        crate::sanitize::clean(cat.star_id(cat.star_of(other))),
                        zeros(cat, other, c)
                    )
                },
            });
        }
    }
    out
}

/// What the words "epoch equal" leave out for rows `a` and `b`: that one
/// epoch is written from another zero, or moved whole periods, when it is
/// ([`Cols::epoch_relation`]).
fn zeros(cat: &Catalogue, a: CandidateId, b: CandidateId) -> String {
    let relation = Cols::of(cat).and_then(|k| k.epoch_relation(a as usize, b as usize));
    let what = match relation {
        None | Some((0.0, 0)) => return String::new(),
        Some((_, 0)) => "once counted from another zero".to_string(),
        Some((0.0, n)) => format!("moved {} periods", n.abs()),
        Some((_, n)) => format!("counted from another zero and moved {} periods", n.abs()),
    };
    let epoch = |c: CandidateId| cat.value(Field::Epoch, c).unwrap_or(f64::NAN);
    let (ea, eb) = (epoch(a), epoch(b));
    format!(
        " (the epoch {what}: {} as {}, {} as {}, {} days apart)",
        crate::sanitize::clean(cat.candidate_id(a)),
        crate::output::exact(Some(ea)),
        crate::sanitize::clean(cat.candidate_id(b)),
        crate::output::exact(Some(eb)),
        crate::output::num(Some((ea - eb).abs()), 8),
    )
}

/// The first row of `set` on another star than `c`'s (every set spans two
/// stars or more).
fn on_another_star(cat: &Catalogue, set: &[CandidateId], c: CandidateId) -> CandidateId {
    let star = cat.star_of(c);
    set.iter()
        .copied()
        .find(|&m| cat.star_of(m) != star)
        .unwrap_or(set[0])
}

/// Flags every row of the sets `mixed-host`, naming a row of another star
/// id it repeats.
pub(super) fn flag(cat: &Catalogue, sets: &[Vec<CandidateId>], out: &mut Checks) {
    for set in sets {
        for &c in set {
            let other = on_another_star(cat, set, c);
            out.add(
                c,
                Flag::MixedHost,
                false,
                format!(
                    "the same row (period, epoch, depth and duration equal to the digits written{}) is also listed as {} on star {}: one row under two star ids, from a merged table or one star under two catalogues' ids, and no neighbour's light, which would be shallower; which star it is on cannot be known, so it counts towards neither (docs/science.md §3.4)",
                    zeros(cat, c, other),
                    crate::sanitize::clean(cat.candidate_id(other)),
                    crate::sanitize::clean(cat.star_id(cat.star_of(other)))
                ),
            );
        }
    }
}

/// Every row of another star id that repeats the signal of one of
/// `targets`: (the first such target, the row). One pass over the
/// catalogue; `targets` are few.
pub(super) fn ties(cat: &Catalogue, targets: &[CandidateId]) -> Vec<(CandidateId, CandidateId)> {
    let Some(cols) = Cols::of(cat) else {
        return Vec::new();
    };
    // The targets by their period's bin, 2·PERIOD_WINDOW_D wide: a row's
    // copy lies in its own bin or the next (the windows are no wider).
    let bin = |p: f64| (p / (2.0 * PERIOD_WINDOW_D)).floor() as i64;
    let mut of: hashbrown::HashMap<i64, Vec<(CandidateId, f64, f64)>> = hashbrown::HashMap::new();
    for &t in targets {
        if cols.key(t).is_some() {
            let p = cols.period.get(t as usize);
            of.entry(bin(p))
                .or_default()
                .push((t, p, cols.period_window(t)));
        }
    }
    if of.is_empty() {
        return Vec::new();
    }
    crate::parallel::in_parts(cat.len(), |rows| {
        rows.filter_map(|c| {
            let c = c as CandidateId;
            let p = cols.period.get(c as usize);
            if !p.is_finite() {
                return None;
            }
            let star = cat.star_of(c);
            let (lo, hi) = (bin(p - PERIOD_WINDOW_D), bin(p + PERIOD_WINDOW_D));
            // The periods first: equal, or within either's rounding.
            let mut own = None;
            let (t, ..) = (lo..=hi)
                .filter_map(|b| of.get(&b))
                .flatten()
                .copied()
                .find(|&(t, pt, wt)| {
                    let d = (pt - p).abs();
                    (d <= wt || d <= *own.get_or_insert_with(|| cols.period_window(c)))
                        && cat.star_of(t) != star
                        && cols.same(t, c)
                })?;
            Some((t, c))
        })
        .collect::<Vec<_>>()
    })
    .concat()
}

/// Holds each star that repeats a row of a false positive on another star
/// id (`fps`: `checks::shows_false_positive`), and says so; as
/// `families::flag` does.
pub(super) fn hold(cat: &Catalogue, out: &mut Checks, fps: &[CandidateId]) {
    if fps.is_empty() {
        return;
    }
    let why = |out: &Checks, fp, c| {
        format!(
            "{}, on star {}, is the same row as this star's {} (period, epoch, depth and duration equal to the digits written{}) and {}; one row under two star ids names one star",
            crate::sanitize::clean(cat.candidate_id(fp)),
            crate::sanitize::clean(cat.star_id(cat.star_of(fp))),
            crate::sanitize::clean(cat.candidate_id(c)),
            zeros(cat, fp, c),
            super::false_positive_words(out, fp),
        )
    };
    out.hold_pairs(cat, ties(cat, fps), why, |n, listed| {
        format!(
            "{n} star{} repeat{} a row of a false positive on another star id ({listed}): held back, as one star with it; check the star ids (docs/science.md §3.4)",
            if n == 1 { "" } else { "s" },
            if n == 1 { "s" } else { "" },
        )
    });
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks::{CheckSettings, run};

    #[test]
    fn only_the_same_row_on_another_star_id_is_a_copy() {
        // Invented rows. A's row is repeated on B, on C written with other
        // digits of the same numbers (`3.71230`, `100.54320`), and a
        // second time on A (one star's own repeat: `near-twin`, not a
        // copy); on F and G with the epoch written as BJD and as
        // BJD − 2454833, where A's counts from 2457000 (G's rounded
        // otherwise, 0.00004 d); on J written with fewer digits, its
        // period and epoch A's rounded; on L with its depth to 0.1 ppm
        // (A's is to the ppm). D differs by 1 ppm in depth, E by 0.01 h in
        // duration, H by 0.01 d in epoch, I by 0.1 d once the zeros are
        // taken away, K's duration is no rounding of A's: each a
        // measurement of its own.
        let text = "star,candidate,period_d,epoch,depth_ppm,duration_h\n\
A,A-1,3.7123,100.5432,3000,2.51\n\
B,B-1,3.7123,100.5432,3000,2.51\n\
C,C-1,3.71230,100.54320,3000.0,2.510\n\
A,A-2,3.7123,100.5432,3000,2.51\n\
D,D-1,3.7123,100.5432,3001,2.51\n\
E,E-1,3.7123,100.5432,3000,2.52\n\
F,F-1,3.7123,2457100.5432,3000,2.51\n\
G,G-1,3.7123,2454933.54324,3000,2.51\n\
H,H-1,3.7123,100.5532,3000,2.51\n\
I,I-1,3.7123,2457100.6432,3000,2.51\n\
J,J-1,3.712,100.543,3000,2.51\n\
K,K-1,3.712,100.543,3000,2.6\n\
L,L-1,3.7123,100.5432,3000.4,2.51\n";
        let cat = Catalogue::from_text("t.csv", text);
        let id = |s: &str| cat.find_candidate(s).unwrap();
        let ch = run(&cat, &CheckSettings::default());
        for s in ["A-1", "B-1", "C-1", "A-2", "F-1", "G-1", "J-1", "L-1"] {
            assert!(
                ch.flags(id(s)).contains(Flag::MixedHost),
                "{s}: {}",
                ch.why(id(s))
            );
        }
        for s in ["D-1", "E-1", "H-1", "I-1", "K-1"] {
            assert!(
                !ch.flags(id(s)).contains(Flag::MixedHost),
                "{s}: {}",
                ch.why(id(s))
            );
        }
        // One signal group: A-1 stands for it, every other copy follows.
        let g = ch.groups().group_of(id("A-1")).unwrap();
        assert_eq!(ch.groups().members(g).len(), 8);
        assert!(ch.why(id("C-1")).contains("also listed as A-1 on star A"));
        assert!(ch.why(id("A-1")).contains("also listed as B-1 on star B"));
        // The ties a false positive at B holds: A and C (each once).
        let mut tied: Vec<&str> = ties(&cat, &[id("B-1")])
            .into_iter()
            .map(|(_, c)| cat.candidate_id(c))
            .collect();
        tied.sort_unstable();
        assert_eq!(tied, ["A-1", "A-2", "C-1", "F-1", "G-1", "J-1", "L-1"]);
        assert!(
            ch.why(id("F-1"))
                .contains("F-1 as 2457100.5432, A-1 as 100.5432, 2457000 days apart"),
            "{}",
            ch.why(id("F-1"))
        );
        let same = SameRow::of(&cat);
        assert!(same.same(id("A-1"), id("G-1")));
        assert!(!same.same(id("A-1"), id("I-1")));
    }

    #[test]
    fn an_epoch_moved_whole_periods_is_the_same_row_while_the_period_pins_it() {
        // Invented rows: A's row with the epoch moved to a later transit,
        // 100 periods on (M; 100 × 3.7123 = 371.23 d) and from BJD with 10
        // periods on (P). N is moved 1000 periods: a period written to
        // four decimals (± 0.00005 d) leaves 0.05 d of doubt there, more
        // than a quarter of the 2.51 h transit, so it no longer names one
        // transit. O is 100 periods on and 0.01 d off: another epoch.
        let text = "star,candidate,period_d,epoch,depth_ppm,duration_h\n\
A,A-1,3.7123,100.5432,3000,2.51\n\
M,M-1,3.7123,471.7732,3000,2.51\n\
P,P-1,3.7123,2457137.6662,3000,2.51\n\
N,N-1,3.7123,3812.8432,3000,2.51\n\
O,O-1,3.7123,471.7832,3000,2.51\n";
        let cat = Catalogue::from_text("t.csv", text);
        let id = |s: &str| cat.find_candidate(s).unwrap();
        let ch = run(&cat, &CheckSettings::default());
        let copy = |s: &str| ch.flags(id(s)).contains(Flag::MixedHost);
        for s in ["A-1", "M-1", "P-1"] {
            assert!(copy(s), "{s}: {}", ch.why(id(s)));
        }
        for s in ["N-1", "O-1"] {
            assert!(!copy(s), "{s}: {}", ch.why(id(s)));
        }
        assert!(
            ch.why(id("M-1"))
                .contains("the epoch moved 100 periods: M-1 as 471.7732, A-1 as 100.5432"),
            "{}",
            ch.why(id("M-1"))
        );
        assert!(
            ch.why(id("P-1"))
                .contains("counted from another zero and moved 10 periods"),
            "{}",
            ch.why(id("P-1"))
        );
    }

    #[test]
    fn digits_are_counted_in_the_unit_the_table_wrote() {
        // A value stored in another unit, divided back: its decimals as
        // written (hand-counted), the division's error far below them.
        assert_eq!(written_decimals(3000.0 / 1e4), Some(1)); // 0.3 (%)
        assert_eq!(written_decimals(3012.0 / 1e4), Some(4)); // 0.3012 (%)
        assert_eq!(written_decimals(0.104 * 24.0 / 24.0), Some(3)); // 0.104 (d)
        assert_eq!(written_decimals(0.1 * 24.0 / 24.0), Some(1));
        assert_eq!(written_decimals(3000.0), Some(0));
        assert_eq!(written_decimals(-2.5), Some(1));
        assert_eq!(written_decimals(f64::NAN), None);
        // Loaded: the factors from the header's units, and the rounding
        // in the stored unit that half a written digit is.
        let cat = Catalogue::from_text(
            "t.csv",
            "star,candidate,period_d,epoch,depth (%),duration (d)\nA,A-1,3.7,100.5,0.30,0.104\n",
        );
        assert_eq!(cat.written_scale(Field::DepthPpm), 1e4);
        assert_eq!(cat.written_scale(Field::DurationH), 24.0);
        assert_eq!(cat.written_scale(Field::PeriodD), 1.0);
        let cols = Cols::of(&cat).unwrap();
        assert!((cols.depth.half_digit(0) - 500.0).abs() < 1e-9);
        assert!((cols.duration.unwrap().half_digit(0) - 0.012).abs() < 1e-12);
        assert!((cols.period.half_digit(0) - 0.05).abs() < 1e-15);
    }
}

//! Where the echo search looks. Every signal is compared with the signals
//! after it in period order whose period is the same or twice its own
//! (within the widest relative difference ever matched). A signal with a
//! position is compared only with signals that could be within the echo
//! radius of it on the sky, and with every signal that has no position. The
//! sky is cut into bands of declination as wide as the radius, and each
//! band into cells of right ascension at least as wide as two positions
//! within the radius can differ in right ascension in that band or the two
//! beside it; a signal is compared with the cells of its band and the two
//! beside it that reach that far. A signal without a position is compared
//! with all. The pairs left out are pairs the comparison would refuse, so
//! the matches are those of a search of every pair in the period windows,
//! and windows stay small in a catalogue of millions, spread over the sky
//! or crowded into one field.

use super::cells::{band_number, cell_number, cells_in_band, cells_near, reach};
use super::{ECHO_MATCHES, ECHO_PLACED_REL, ECHO_WINDOW, Match, Pair, Quick, Sig};
use crate::catalogue::CandidateId;
use crate::sorted::advance;

/// A signal as the search holds it: what the first tests of a comparison
/// read ([`Pair::plausible`]), its place in the period order (which names
/// the candidate, `Index::order`), and its cell. The rest of a signal
/// (epoch, duration, position) is read from the columns only for the pairs
/// those tests let through, which are few: 24 bytes a signal instead of a
/// whole [`Sig`]'s 72, at the peak of the checks' memory. The period's
/// error is rounded up to an `f32`: the first tests then let through a
/// pair or two more (they only widen as the errors grow), never fewer, and
/// the comparison that decides reads the exact error.
#[derive(Clone, Copy, Debug)]
pub(super) struct Entry {
    period: f64,
    period_err: f32,
    star: u32,
    /// Place in the period order.
    rank: u32,
    /// Its cell's number in its band; [`UNPLACED`] without a position.
    cell: u32,
}

/// A signal as a search window holds it: an [`Entry`], or a whole [`Sig`].
trait Held {
    fn quick(&self) -> Quick;
    fn rank(&self) -> u32;
    fn period(&self) -> f64;
    /// The candidate; `order` is every candidate in period order.
    fn candidate(&self, order: &[CandidateId]) -> CandidateId;
    /// The whole signal; `sig(i)` is the i-th in file order.
    fn whole(&self, sig: &impl Fn(usize) -> Sig, order: &[CandidateId]) -> Sig;
}

/// `x` rounded up to an `f32` (never below it; infinity above the largest).
/// For x ≥ 0 (an error's size; only its square is read): the next `f32`
/// up is the next bit pattern.
fn f32_up(x: f64) -> f32 {
    let f = x as f32;
    if f64::from(f) < x && f >= 0.0 {
        f32::from_bits(f.to_bits() + 1)
    } else {
        f
    }
}

impl Held for Entry {
    fn quick(&self) -> Quick {
        Quick {
            star: self.star,
            period: self.period,
            period_err: f64::from(self.period_err),
            placed: self.cell != UNPLACED,
        }
    }
    fn rank(&self) -> u32 {
        self.rank
    }
    fn period(&self) -> f64 {
        self.period
    }
    fn candidate(&self, order: &[CandidateId]) -> CandidateId {
        order[self.rank as usize]
    }
    fn whole(&self, sig: &impl Fn(usize) -> Sig, order: &[CandidateId]) -> Sig {
        sig(self.candidate(order) as usize)
    }
}

impl Held for Sig {
    fn quick(&self) -> Quick {
        Sig::quick(self)
    }
    fn rank(&self) -> u32 {
        self.rank
    }
    fn period(&self) -> f64 {
        self.period
    }
    fn candidate(&self, _: &[CandidateId]) -> CandidateId {
        self.c
    }
    fn whole(&self, _: &impl Fn(usize) -> Sig, _: &[CandidateId]) -> Sig {
        *self
    }
}

/// The signals, laid out in the order the search reads them.
pub(super) struct Index {
    /// Every candidate in period order (the ranks' candidates).
    order: Vec<CandidateId>,
    /// Every signal in period order; kept only when some signal has no
    /// position (their search reads all signals).
    all: InPeriodOrder,
    /// The signals with a position, cell by cell (band by band, each band's
    /// cells by number), each cell in period order.
    placed: Vec<Entry>,
    /// The bands of declination that hold signals, in order.
    bands: Vec<Band>,
    /// The cells that hold signals, in the order of `placed`: the cell's
    /// number in its band, and where its signals start in `placed` (they
    /// end where the next cell's start, or at its band's `stop`).
    cells: Vec<(u32, u32)>,
    /// The bands' width, degrees.
    width: f64,
    /// The places in `all` of the signals without a position.
    unplaced: Vec<u32>,
    /// Those signals themselves, in period order, when some signals have a
    /// position (their search reads them); empty otherwise.
    unplaced_sigs: Vec<Entry>,
}

/// Every signal in period order, for the search of the signals without a
/// position: whole when those are many (without positions most pairs in a
/// window pass the first tests, and each would read the columns), as
/// entries when they are few (a catalogue with a few positions missing:
/// 24 bytes a signal instead of 72, and few pairs read whole). The search
/// is the same either way (tested).
enum InPeriodOrder {
    Whole(Vec<Sig>),
    Entries(Vec<Entry>),
}

/// A band of declination that holds signals.
#[derive(Clone, Copy, Debug)]
struct Band {
    /// Its number: the band from -90° + number·width to one width north.
    number: u32,
    /// How many cells of right ascension it is cut into, numbered from 0
    /// at right ascension 0°, each 360°/cells wide.
    cells: u32,
    /// Its cells that hold signals, in `Index::cells`.
    first: usize,
    end: usize,
    /// Where its signals end in `Index::placed`.
    stop: u32,
}

/// One match as found, with where it stands in the order of a search of
/// one signal after another: (position of the earlier signal, window n,
/// position of the later one).
pub(super) type Found = ((u32, u8, u32), (CandidateId, Match));

/// What a part of the search found: its matches, and the signals whose
/// window filled up.
#[derive(Default)]
pub(super) struct Swept {
    pub matches: Vec<Found>,
    pub crowded: Vec<CandidateId>,
    /// Pairs without a separation that match with one epoch moved half a
    /// period ([`super::Pair::control`]): the chance matches to expect.
    pub control: u64,
}

/// Whether a signal has a real position: the bands hold these, and the
/// comparison's declination test applies only to them.
pub(super) fn placed(s: &Sig) -> bool {
    super::real_position(s.ra, s.dec)
}

/// The band of a signal without a position.
const UNPLACED: u32 = u32::MAX;

/// Signals gathered by band before they are written to their bands
/// ([`Index::new`]): 2.3 MB of them.
const FILL_BLOCK: usize = 1 << 16;

/// The signals in period order are held whole when more than one in this
/// many has no position ([`InPeriodOrder`]). Measured on the 1M bench
/// catalogue (`odds`): with 1 % of positions missing, entries saved 90 MB
/// and took 0.02 s longer; with 10 % missing, 0.3 s longer (the pairs read
/// whole from the columns).
const WHOLE_WHEN_ONE_IN: usize = 50;

impl Index {
    /// The index of the signals, for an echo radius in arcsec: `sig(i)` is
    /// the i-th in file order, with its place in the period order (`rank`,
    /// a permutation of 0..n).
    ///
    /// Laid out without reading anything out of file order: each signal is
    /// built from the columns in file order and written to the end of its
    /// band, and then each band, a few thousand signals at most when spread
    /// over the sky, is sorted by cell and period. A layout that read the
    /// signals in the index's order waited on memory at every signal.
    /// `order` is every candidate in period order (rank r is `order[r]`).
    pub fn new(radius_arcsec: f64, sig: impl Fn(usize) -> Sig, order: Vec<CandidateId>) -> Index {
        let n = order.len();
        Index::in_blocks(radius_arcsec, sig, order, FILL_BLOCK, n / WHOLE_WHEN_ONE_IN)
    }

    /// Every candidate in period order, as given to [`Index::new`]; the
    /// rest of the index is let go.
    pub fn into_order(self) -> Vec<CandidateId> {
        self.order
    }

    /// [`Index::new`], the signals written to their bands `block` at a
    /// time (the result is the same for every `block`), and held whole in
    /// period order when more than `whole_above` have no position (the
    /// result is the same either way).
    fn in_blocks(
        radius_arcsec: f64,
        sig: impl Fn(usize) -> Sig,
        order: Vec<CandidateId>,
        block: usize,
        whole_above: usize,
    ) -> Index {
        let n = order.len();
        // A little wider than the radius, so rounding in the band number
        // never parts two signals within it by more than one band; and at
        // least 1e-7 degree, so every band number fits in 32 bits (wider
        // bands only compare more pairs).
        let width = (radius_arcsec * (1.0 + 1e-6) / 3600.0).max(1e-7);
        // Each signal's band, worked out again where needed rather than
        // kept (4 bytes a signal at the peak of the checks' memory).
        let band = |s: &Sig| {
            if placed(s) {
                band_number(s.dec, width)
            } else {
                UNPLACED
            }
        };
        let band_of = |i: usize| band(&sig(i));
        // The bands that hold signals, in order: every band number up to
        // the largest where they are few beside the signals (a radius of
        // arcseconds or more: counted in the same pass), else the distinct
        // ones (counted in a second).
        let most = 4 * n + 4096;
        let (mut top, mut dense, mut counts) = (None, true, vec![0usize; 1]);
        for b in (0..n).map(band_of).filter(|&b| b != UNPLACED) {
            top = top.max(Some(b));
            if dense && b as usize >= most {
                dense = false;
            }
            if dense {
                if counts.len() < b as usize + 2 {
                    counts.resize(b as usize + 2, 0);
                }
                counts[b as usize + 1] += 1;
            }
        }
        let numbers: Vec<u32> = match top {
            None => Vec::new(),
            Some(t) if dense => (0..=t).collect(),
            Some(_) => {
                let mut v: Vec<u32> = (0..n).map(band_of).filter(|&b| b != UNPLACED).collect();
                v.sort_unstable();
                v.dedup();
                v
            }
        };
        let slot = |b: u32| {
            if dense {
                b as usize
            } else {
                numbers.partition_point(|&x| x < b)
            }
        };
        let mut start = if dense {
            counts.resize(numbers.len() + 1, 0);
            counts
        } else {
            let mut c = vec![0usize; numbers.len() + 1];
            for b in (0..n).map(band_of).filter(|&b| b != UNPLACED) {
                c[slot(b) + 1] += 1;
            }
            c
        };
        for k in 1..start.len() {
            start[k] += start[k - 1];
        }
        let split = start[numbers.len()];
        // How many cells each band is cut into, now that its signals are
        // counted.
        let cells_of: Vec<u32> = (0..numbers.len())
            .map(|k| cells_in_band(start[k + 1] - start[k], reach(width, numbers[k])))
            .collect();
        let entry = |s: &Sig, b: u32| Entry {
            period: s.period,
            period_err: f32_up(s.period_err.abs()),
            star: s.star,
            rank: s.rank,
            cell: if b == UNPLACED {
                UNPLACED
            } else {
                cell_number(s.ra, cells_of[slot(b)])
            },
        };
        // Signals with a position to the end of their band; where some
        // signal has none, every signal to its place in period order too.
        let mut placed_entries: Vec<Entry> = Vec::new();
        let whole = n - split > whole_above;
        let (mut all_whole, mut all_entries): (Vec<Sig>, Vec<Entry>) = (Vec::new(), Vec::new());
        if n > 0 {
            let s = sig(0);
            placed_entries.resize(split, entry(&s, band(&s)));
            if split < n && whole {
                all_whole.resize(n, s);
            } else if split < n {
                all_entries.resize(n, entry(&s, band(&s)));
            }
            let mut end = start.clone();
            // A block of signals at a time, gathered by band (a counting
            // sort) before they are written, where the bands are few beside
            // the block: each band then takes a run of entries at once, not
            // one entry at a time at thousands of places in turn, each
            // place a page of its own (a miss of the address cache a
            // signal: 0.3–0.8 s at 10M signals). A band's order is set by
            // the sort below, whatever order its entries come in.
            let block = block.max(1);
            let gather = numbers.len() * 4 <= block;
            let mut held: Vec<(u32, Entry)> = Vec::with_capacity(block.min(n));
            let mut by_band: Vec<Entry> = Vec::new();
            let mut runs = vec![0usize; if gather { numbers.len() + 1 } else { 0 }];
            for from in (0..n).step_by(block) {
                held.clear();
                for i in from..(from + block).min(n) {
                    let s = sig(i);
                    let b = band(&s);
                    if split < n && whole {
                        all_whole[s.rank as usize] = s;
                    } else if split < n {
                        all_entries[s.rank as usize] = entry(&s, b);
                    }
                    if b != UNPLACED {
                        held.push((slot(b) as u32, entry(&s, b)));
                    }
                }
                if !gather {
                    for &(k, e) in &held {
                        placed_entries[end[k as usize]] = e;
                        end[k as usize] += 1;
                    }
                    continue;
                }
                runs.fill(0);
                for &(k, _) in &held {
                    runs[k as usize + 1] += 1;
                }
                for k in 1..runs.len() {
                    runs[k] += runs[k - 1];
                }
                by_band.clear();
                by_band.extend(held.iter().map(|h| h.1));
                let mut at = runs.clone();
                for &(k, e) in &held {
                    by_band[at[k as usize]] = e;
                    at[k as usize] += 1;
                }
                for k in 0..numbers.len() {
                    let run = &by_band[runs[k]..runs[k + 1]];
                    placed_entries[end[k]..end[k] + run.len()].copy_from_slice(run);
                    end[k] += run.len();
                }
            }
        }
        // Each band by cell, and each cell by period; then the cells that
        // hold signals.
        let mut bands: Vec<Band> = Vec::new();
        let mut cells: Vec<(u32, u32)> = Vec::new();
        for (k, &number) in numbers.iter().enumerate() {
            let (a, b) = (start[k], start[k + 1]);
            if a == b {
                continue;
            }
            let band = &mut placed_entries[a..b];
            band.sort_unstable_by_key(|e| (e.cell, e.rank));
            let first = cells.len();
            for (at, e) in band.iter().enumerate() {
                if cells.len() == first || cells[cells.len() - 1].0 != e.cell {
                    cells.push((e.cell, (a + at) as u32));
                }
            }
            bands.push(Band {
                number,
                cells: cells_of[k],
                first,
                end: cells.len(),
                stop: b as u32,
            });
        }
        if split == n {
            // Every signal has a position: the cells are all there is.
            return Index {
                order,
                all: InPeriodOrder::Entries(Vec::new()),
                placed: placed_entries,
                bands,
                cells,
                width,
                unplaced: Vec::new(),
                unplaced_sigs: Vec::new(),
            };
        }
        // Some have no position: their search reads every signal, in
        // period order. Their ranks are their places in `all`.
        let unplaced_sigs: Vec<Entry> = if whole {
            (all_whole.iter())
                .filter(|s| !placed(s))
                .map(|s| entry(s, UNPLACED))
                .collect()
        } else {
            (all_entries.iter())
                .filter(|e| e.cell == UNPLACED)
                .copied()
                .collect()
        };
        let all = if whole {
            InPeriodOrder::Whole(all_whole)
        } else {
            InPeriodOrder::Entries(all_entries)
        };
        let unplaced = unplaced_sigs.iter().map(|e| e.rank).collect();
        // With no position anywhere, the cells and their search are empty.
        let unplaced_sigs = if split == 0 {
            Vec::new()
        } else {
            unplaced_sigs
        };
        Index {
            order,
            all,
            placed: placed_entries,
            bands,
            cells,
            width,
            unplaced,
            unplaced_sigs,
        }
    }

    /// The search from the signals without a position, those of
    /// `range` in `unplaced`: each against every later signal. `sig(i)` is
    /// the whole of the i-th signal in file order, as given to [`Index::new`].
    pub fn sweep_unplaced(
        &self,
        range: std::ops::Range<usize>,
        pair: &Pair,
        sig: &impl Fn(usize) -> Sig,
    ) -> Swept {
        match &self.all {
            InPeriodOrder::Whole(sigs) => self.sweep_unplaced_in(sigs, range, pair, sig),
            InPeriodOrder::Entries(entries) => self.sweep_unplaced_in(entries, range, pair, sig),
        }
    }

    /// [`Index::sweep_unplaced`] over `sigs`, every signal in period order.
    fn sweep_unplaced_in<T: Held>(
        &self,
        sigs: &[T],
        range: std::ops::Range<usize>,
        pair: &Pair,
        sig: &impl Fn(usize) -> Sig,
    ) -> Swept {
        let rel = pair.s.echo_max_rel;
        let mut out = Swept::default();
        // The periods rise, so the start of each twice-the-period window
        // only moves forward.
        let mut twice = range.clone().next().map_or(0, |u| {
            let p = sigs[self.unplaced[u] as usize].period();
            sigs.partition_point(|x| x.period() < 2.0 * p * (1.0 - rel))
        });
        for &ai in &self.unplaced[range] {
            let i = ai as usize;
            let a = &sigs[i];
            let lo = 2.0 * a.period() * (1.0 - rel);
            while twice < sigs.len() && sigs[twice].period() < lo {
                twice += 1;
            }
            let windows = [
                (i + 1, a.period() * (1.0 + rel), 1u8),
                (twice, 2.0 * a.period() * (1.0 + rel), 2u8),
            ];
            let mut crowded = false;
            for (start, hi, n) in windows {
                let others = sigs[start..]
                    .iter()
                    .take_while(|b| b.period() <= hi)
                    .take(8 * ECHO_WINDOW);
                crowded |= scan(a, n, others, pair, sig, &self.order, &mut out);
            }
            if crowded {
                out.crowded.push(a.candidate(&self.order));
            }
        }
        out
    }

    /// The signals of cell `ci` (in `cells`) of band `band`.
    fn cell(&self, band: &Band, ci: usize) -> &[Entry] {
        let start = self.cells[ci].1 as usize;
        let end = if ci + 1 < band.end {
            self.cells[ci + 1].1 as usize
        } else {
            band.stop as usize
        };
        &self.placed[start..end]
    }

    /// The search from the signals with a position, those of the cells of
    /// `range` in `cells`: each against the later signals of the cells of
    /// its band and the two beside it that reach it, and the later signals
    /// without a position. `sig` as for [`Index::sweep_unplaced`].
    pub fn sweep_cells(
        &self,
        range: std::ops::Range<usize>,
        pair: &Pair,
        sig: &impl Fn(usize) -> Sig,
    ) -> Swept {
        // Placed signals match within a wider relative difference
        // (`Pair::widest_rel`); the unplaced list (the last) within the
        // narrow one.
        let narrow = pair.s.echo_max_rel;
        let wide = if pair.wide_for_placed() {
            narrow.max(ECHO_PLACED_REL)
        } else {
            narrow
        };
        let rels = [wide, narrow];
        let mut out = Swept::default();
        let mut near: Vec<&Entry> = Vec::new();
        // The signals of the cells around one, in period order.
        let mut around: Vec<&Entry> = Vec::new();
        let unplaced: Vec<&Entry> = self.unplaced_sigs.iter().collect();
        let mut bi = self.bands.partition_point(|b| b.end <= range.start);
        for ci in range {
            while self.bands[bi].end <= ci {
                bi += 1;
            }
            let band = self.bands[bi];
            let own = self.cell(&band, ci);
            let number = self.cells[ci].0;
            let reach = reach(self.width, band.number);
            around.clear();
            let beside = [bi.checked_sub(1), Some(bi), bi.checked_add(1)];
            for other in beside.into_iter().flatten() {
                let Some(other) = self.bands.get(other) else {
                    continue;
                };
                if other.number.abs_diff(band.number) > 1 {
                    continue;
                }
                let theirs = &self.cells[other.first..other.end];
                for (lo, hi) in cells_near(reach, number, band.cells, other.cells) {
                    let from = theirs.partition_point(|c| c.0 < lo);
                    let to = theirs.partition_point(|c| c.0 <= hi).max(from);
                    for k in from..to {
                        around.extend(self.cell(other, other.first + k));
                    }
                }
            }
            around.sort_unstable_by_key(|e| e.rank);
            let lists: [&[&Entry]; 2] = [&around, &unplaced];
            // Where each list's windows start; the signals of the cell come
            // in period order, so these only move forward.
            let first = &own[0];
            let mut after = lists.map(|l| l.partition_point(|b| b.rank <= first.rank));
            let mut l = 0;
            let mut twice = lists.map(|list| {
                let rel = rels[l];
                l += 1;
                list.partition_point(|b| b.period < 2.0 * first.period * (1.0 - rel))
            });
            for a in own {
                let mut crowded = false;
                for n in [1u8, 2] {
                    near.clear();
                    for (l, list) in lists.iter().enumerate() {
                        let rel = rels[l];
                        let lo = 2.0 * a.period * (1.0 - rel);
                        let hi = f64::from(n) * a.period * (1.0 + rel);
                        let from = if n == 1 {
                            after[l] = advance(list, after[l], |b| b.rank <= a.rank);
                            after[l]
                        } else {
                            twice[l] = advance(list, twice[l], |b| b.period < lo);
                            twice[l]
                        };
                        near.extend(
                            list[from..]
                                .iter()
                                .take_while(|b| b.period <= hi)
                                .take(8 * ECHO_WINDOW)
                                .copied(),
                        );
                    }
                    // The two lists merged into period order.
                    near.sort_unstable_by_key(|b| b.rank);
                    near.truncate(8 * ECHO_WINDOW);
                    crowded |= scan(a, n, near.iter().copied(), pair, sig, &self.order, &mut out);
                }
                if crowded {
                    out.crowded.push(a.candidate(&self.order));
                }
            }
        }
        out
    }

    pub fn unplaced_len(&self) -> usize {
        self.unplaced.len()
    }

    pub fn cells_len(&self) -> usize {
        self.cells.len()
    }
}

/// Compares signal `a` with `others` (later signals, in period order) in
/// window `n`: at most [`ECHO_WINDOW`] of them on other stars, stopping at
/// [`ECHO_MATCHES`] matches (a catalogue with thousands of copies of one
/// ephemeris stays O(n log n), and each still meets a copy). Returns whether
/// the window filled up. A pair the first tests let through
/// ([`Pair::plausible`]) is compared whole, each signal read by `sig`, and
/// in the control ([`Pair::control`]).
fn scan<'s, T: Held + 's>(
    a: &impl Held,
    n: u8,
    others: impl Iterator<Item = &'s T>,
    pair: &Pair,
    sig: &impl Fn(usize) -> Sig,
    order: &[CandidateId],
    out: &mut Swept,
) -> bool {
    let (quick, nf) = (a.quick(), f64::from(n));
    let others = others.filter(|b| b.quick().star != quick.star);
    let mut whole: Option<Sig> = None;
    let mut found = 0;
    for (k, b) in others.enumerate() {
        if k == ECHO_WINDOW || found == ECHO_MATCHES {
            return true;
        }
        if !pair.plausible(&quick, &b.quick(), nf) {
            continue;
        }
        let a = *whole.get_or_insert_with(|| a.whole(sig, order));
        let whole_b = b.whole(sig, order);
        if let Some(m) = pair.compare(&a, &whole_b, nf) {
            // One row listed on two star ids is no neighbour's light
            // (`copies`): a match towards the window's cap, not kept.
            if !pair.same_row(m.0, m.1.other) {
                out.matches.push(((a.rank, n, b.rank()), m));
            }
            found += 1;
        }
        out.control += u64::from(pair.control(&a, &whole_b, nf));
    }
    false
}

#[cfg(test)]
mod tests;

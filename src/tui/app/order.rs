//! The orders of the systems and candidates: the sort keys, and one LSD
//! radix sort over (key, star) pairs with a stable tie-break, shared by
//! every sort of the browser.

use crate::catalogue::{Catalogue, Field, StarId};

/// How the systems are ordered.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SortKey {
    BestOdds,
    Multiplicity,
    Flags,
    Star,
    Period,
}

impl SortKey {
    pub const ALL: [SortKey; 5] = [
        SortKey::BestOdds,
        SortKey::Multiplicity,
        SortKey::Flags,
        SortKey::Star,
        SortKey::Period,
    ];

    pub fn name(self) -> &'static str {
        match self {
            SortKey::BestOdds => "best odds",
            SortKey::Multiplicity => "k",
            SortKey::Flags => "flags",
            SortKey::Star => "star",
            SortKey::Period => "shortest period",
        }
    }

    /// Whether this order reads the catalogue's values (not the ids alone,
    /// the odds or the checks).
    pub fn reads_values(self) -> bool {
        self == SortKey::Period
    }
}

/// How the candidates of the selected star are ordered.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum CandidateSort {
    /// As in the catalogue file.
    File,
    Period,
    Depth,
    Odds,
    Snr,
}

impl CandidateSort {
    pub const ALL: [CandidateSort; 5] = [
        CandidateSort::File,
        CandidateSort::Period,
        CandidateSort::Depth,
        CandidateSort::Odds,
        CandidateSort::Snr,
    ];

    pub fn name(self) -> &'static str {
        match self {
            CandidateSort::File => "file order",
            CandidateSort::Period => "period",
            CandidateSort::Depth => "depth",
            CandidateSort::Odds => "odds",
            CandidateSort::Snr => "SNR",
        }
    }

    /// Whether this order reads the catalogue's values.
    pub fn reads_values(self) -> bool {
        matches!(
            self,
            CandidateSort::Period | CandidateSort::Depth | CandidateSort::Snr
        )
    }
}

/// An f64 as a u64 whose unsigned order is the float's total order.
pub(super) fn sortable_bits(x: f64) -> u64 {
    let b = x.to_bits();
    if b >> 63 == 1 { !b } else { b | 1 << 63 }
}

/// Stable sort of (key, star) pairs by key, then by `tie` among equal
/// keys. An LSD radix sort, 11 bits a pass (2048 buckets: the counts stay in
/// L1), over the key's bits from `low` up; keys and stars in two arrays so a
/// pass moves 12 bytes an element; every digit's counts come from one read,
/// and a digit the same for every key is skipped. Runs that agree on those
/// bits are then put in full order by a stable sort on (key, tie): for
/// floats `low = 32` leaves three passes and short runs; for a string
/// prefix the tie compares the strings.
pub(super) fn sort_keyed(
    keys: &mut Vec<u64>,
    vals: &mut Vec<StarId>,
    scratch: &mut Scratch,
    low: u32,
    tie: Option<&dyn Fn(StarId, StarId) -> std::cmp::Ordering>,
) {
    const BITS: u32 = 11;
    const MASK: u64 = (1 << BITS) - 1;
    let n = keys.len();
    debug_assert_eq!(n, vals.len());
    if n < 2 {
        return;
    }
    let passes = (64 - low).div_ceil(BITS) as usize;
    let shift_of = |p: usize| (low + p as u32 * BITS).min(63);
    // The bits that differ between keys: a digit without any is skipped.
    let (all, any) = keys
        .iter()
        .fold((u64::MAX, 0u64), |(a, o), &k| (a & k, o | k));
    let varies: Vec<usize> = (0..passes)
        .filter(|&p| ((all ^ any) >> shift_of(p)) & MASK != 0)
        .collect();
    let mut count = vec![[0usize; 1 << BITS]; varies.len()];
    for &k in keys.iter() {
        for (&p, c) in varies.iter().zip(count.iter_mut()) {
            c[((k >> shift_of(p)) & MASK) as usize] += 1;
        }
    }
    // Reused buffers: fresh ones would cost a page fault every 4 KB.
    let (tk, tv) = (&mut scratch.keys, &mut scratch.stars);
    if !varies.is_empty() && tk.len() != n {
        tk.resize(n, 0);
        tv.resize(n, 0);
    }
    for (&p, c) in varies.iter().zip(count.iter_mut()) {
        let shift = shift_of(p);
        let mut at = 0;
        for slot in c.iter_mut() {
            let m = *slot;
            *slot = at;
            at += m;
        }
        for (&k, &v) in keys.iter().zip(vals.iter()) {
            let b = ((k >> shift) & MASK) as usize;
            tk[c[b]] = k;
            tv[c[b]] = v;
            c[b] += 1;
        }
        std::mem::swap(keys, tk);
        std::mem::swap(vals, tv);
    }
    if low == 0 && tie.is_none() {
        return;
    }
    let hi = |k: u64| k.checked_shr(low).unwrap_or(0);
    let less = |a: (u64, StarId), b: (u64, StarId)| {
        a.0.cmp(&b.0)
            .then_with(|| tie.map_or(std::cmp::Ordering::Equal, |t| t(a.1, b.1)))
    };
    let mut i = 0;
    while i < n {
        let mut j = i + 1;
        while j < n && hi(keys[j]) == hi(keys[i]) {
            j += 1;
        }
        if j - i <= 16 {
            // Short runs (the usual case): a stable insertion sort in place.
            for m in i + 1..j {
                let x = (keys[m], vals[m]);
                let mut at = m;
                while at > i && less(x, (keys[at - 1], vals[at - 1])).is_lt() {
                    keys[at] = keys[at - 1];
                    vals[at] = vals[at - 1];
                    at -= 1;
                }
                keys[at] = x.0;
                vals[at] = x.1;
            }
        } else if keys[i..j].is_sorted() && tie.is_none() {
            // Equal or ascending keys, catalogue order kept by the passes.
        } else {
            let mut run: Vec<(u64, StarId)> = keys[i..j]
                .iter()
                .copied()
                .zip(vals[i..j].iter().copied())
                .collect();
            // Stable and adaptive: an already ordered run costs one pass.
            run.sort_by(|a, b| less(*a, *b));
            for (o, (k, v)) in run.into_iter().enumerate() {
                keys[i + o] = k;
                vals[i + o] = v;
            }
        }
        i = j;
    }
}

/// Star orders the browser keeps sorted: one per (sort, direction).
pub(super) const ORDERS_KEPT: usize = 2 * SortKey::ALL.len();

/// Buffers the sort reuses between calls.
#[derive(Default)]
pub(super) struct Scratch {
    keys: Vec<u64>,
    stars: Vec<StarId>,
}

/// The first eight bytes as a big-endian integer, zero-padded: a smaller
/// prefix means a smaller byte string; equal prefixes need the strings.
pub(super) fn prefix_key(s: &[u8]) -> u64 {
    let mut b = [0u8; 8];
    let n = s.len().min(8);
    b[..n].copy_from_slice(&s[..n]);
    u64::from_be_bytes(b)
}

/// The length in bytes of the prefix every star id shares.
pub(super) fn id_common_of(cat: &Catalogue) -> usize {
    if cat.star_count() == 0 {
        return 0;
    }
    let first = cat.star_id(0).as_bytes();
    (1..cat.star_count() as StarId).fold(first.len(), |n, s| {
        let id = cat.star_id(s).as_bytes();
        first[..n]
            .iter()
            .zip(id)
            .take_while(|(a, b)| a == b)
            .count()
    })
}

/// The sort key of a star for the sorts no decision moves: by id (its
/// first eight bytes after the prefix all ids share; ties compare the ids)
/// and by the shortest period of its candidates. `None` for the others.
pub(super) fn static_key(cat: &Catalogue, common: usize, sort: SortKey, s: StarId) -> Option<u64> {
    Some(match sort {
        SortKey::Star => prefix_key(&cat.star_id(s).as_bytes()[common..]),
        SortKey::Period => {
            let period = cat.column(Field::PeriodD);
            sortable_bits(
                cat.members(s)
                    .iter()
                    .filter_map(|&c| period.map(|p| p.get(c as usize)))
                    .fold(f64::INFINITY, f64::min),
            )
        }
        _ => return None,
    })
}

/// Ties of the id sort: the ids (reversed when descending).
pub(super) fn id_tie(
    cat: &Catalogue,
    descending: bool,
    a: StarId,
    b: StarId,
) -> std::cmp::Ordering {
    let by_id = cat.star_id(a).cmp(cat.star_id(b));
    if descending { by_id.reverse() } else { by_id }
}

/// Bits of the key below which `sort_keyed` leaves the order to its run
/// fix-up (floats: the low half).
pub(super) fn low_bits_of(sort: SortKey, odds_by_size: bool) -> u32 {
    match sort {
        SortKey::BestOdds if !odds_by_size => 32,
        SortKey::Period => 32,
        _ => 0,
    }
}

/// Every star in the order of a sort no decision moves (`static_key`), as
/// the browser's own sort gives it; `None` for the other sorts. The
/// browser computes these on a thread at start-up (`Input::Orders`): on a
/// million stars each takes some 40 ms, too long for a keystroke.
pub fn static_order(cat: &Catalogue, sort: SortKey, descending: bool) -> Option<Vec<StarId>> {
    let common = if sort == SortKey::Star {
        id_common_of(cat)
    } else {
        0
    };
    let n = cat.star_count() as StarId;
    let mut keys = (0..n)
        .map(|s| static_key(cat, common, sort, s).map(|k| if descending { !k } else { k }))
        .collect::<Option<Vec<u64>>>()?;
    let mut stars: Vec<StarId> = (0..n).collect();
    let tie = |a, b| id_tie(cat, descending, a, b);
    let by_id: Option<&dyn Fn(StarId, StarId) -> std::cmp::Ordering> =
        (sort == SortKey::Star).then_some(&tie);
    sort_keyed(
        &mut keys,
        &mut stars,
        &mut Scratch::default(),
        low_bits_of(sort, false),
        by_id,
    );
    Some(stars)
}

#[cfg(test)]
mod sort_tests {
    use super::*;

    /// The reference is std's `sort_by`, which is stable (documented).
    fn check(
        v: Vec<(u64, StarId)>,
        low: u32,
        tie: Option<&dyn Fn(StarId, StarId) -> std::cmp::Ordering>,
    ) {
        let mut want = v.clone();
        want.sort_by(|a, b| {
            a.0.cmp(&b.0)
                .then_with(|| tie.map_or(std::cmp::Ordering::Equal, |t| t(a.1, b.1)))
        });
        let (mut k, mut s): (Vec<u64>, Vec<StarId>) = v.into_iter().unzip();
        sort_keyed(&mut k, &mut s, &mut Scratch::default(), low, tie);
        assert_eq!(k.into_iter().zip(s).collect::<Vec<_>>(), want, "low {low}");
    }

    #[test]
    fn sort_keyed_is_a_stable_sort_by_key_then_tie() {
        let mut rng = crate::demo::Rng::new(8);
        let floats = [
            -3.5,
            -0.0,
            0.0,
            1.0,
            1.0,
            2.5,
            f64::MAX,
            -1e300,
            7.25,
            1.0 + 1e-12,
        ];
        for n in [0, 1, 2, 7, 300, 5000] {
            for low in [0, 32] {
                // Few distinct floats (long runs of equal keys) ...
                let v = (0..n)
                    .map(|i| {
                        (
                            sortable_bits(floats[rng.below(floats.len() as u64) as usize]),
                            i,
                        )
                    })
                    .collect();
                check(v, low, None);
                // ... and keys whose every digit varies.
                let v = (0..n).map(|i| (rng.next_u64(), i)).collect();
                check(v, low, None);
            }
            // Strings by their prefix, ties by the whole string.
            let ids: Vec<String> = (0..n)
                .map(|_| {
                    format!(
                        "STAR-{:04}{}",
                        rng.below(50),
                        ["", "a", "\u{0}", "b"][rng.below(4) as usize]
                    )
                })
                .collect();
            let tie = |a: StarId, b: StarId| ids[a as usize].cmp(&ids[b as usize]);
            let v = (0..n)
                .map(|i| (prefix_key(ids[i as usize].as_bytes()), i))
                .collect();
            check(v, 0, Some(&tie));
            // The prefix keeps the string order.
            let mut sorted = ids.clone();
            sorted.sort();
            assert!(
                sorted
                    .windows(2)
                    .all(|w| prefix_key(w[0].as_bytes()) <= prefix_key(w[1].as_bytes()))
            );
            // Past a prefix every id shares, too.
            assert!(sorted.windows(2).all(|w| prefix_key(&w[0].as_bytes()[5..])
                <= prefix_key(&w[1].as_bytes()[5..])));
        }
        // The bits keep the float order.
        let mut f = floats.to_vec();
        f.sort_by(f64::total_cmp);
        assert!(
            f.windows(2)
                .all(|w| sortable_bits(w[0]) <= sortable_bits(w[1]))
        );
    }
}

//! Grouping ids: stars and candidates by a radix sort of 8-byte keys (hash
//! with the row in its low bits), then checked by text on two threads.

use super::*;

/// Rows grouped into stars: star ids in order of first appearance.
pub(super) struct StarGrouping {
    pub(super) star_of: Vec<StarId>,
    /// The first row of each star, by star id.
    pub(super) first_rows: Vec<u32>,
    pub(super) lookup: IdIndex,
}

impl StarGrouping {
    pub(super) fn build(rows: &StrPool, hashes: &[u64]) -> StarGrouping {
        let same = |a: u32, b: u32| rows.get(a as usize) == rows.get(b as usize);
        StarGrouping::number(IdIndex::build(hashes, same))
    }

    /// Stars numbered from (index, first row of each row).
    pub(super) fn number((mut lookup, mut star_of): (IdIndex, Vec<u32>)) -> StarGrouping {
        // star_of holds each row's first row; number the stars in row order,
        // in place: a first row comes before the rows that repeat it.
        let mut first_rows = Vec::with_capacity(lookup.keys.len());
        for r in 0..star_of.len() {
            let first = star_of[r] as usize;
            star_of[r] = if first == r {
                first_rows.push(r as u32);
                (first_rows.len() - 1) as StarId
            } else {
                star_of[first]
            };
        }
        // The index names each star by its first row: make it the star id.
        lookup.rename(|row| star_of[row as usize]);
        StarGrouping {
            star_of,
            first_rows,
            lookup,
        }
    }
}

/// Ids found by hash, in one sorted array of keys. A key is an id's hash
/// with its low bits replaced by the row (or star id) it names, so that one
/// sort of 8-byte keys orders rows by hash and, within a hash, by row.
#[derive(Debug, Default)]
pub(in crate::catalogue) struct IdIndex {
    pub(super) keys: Vec<u64>,
    /// How many low bits of a key hold the id.
    pub(super) id_bits: u32,
}

impl IdIndex {
    pub(super) fn mask(&self) -> u64 {
        (1u64 << self.id_bits) - 1
    }

    /// Groups rows by id: the index of each id's first row, and for every
    /// row the first row whose text is the same (`same` says), itself when
    /// it is the first. Rows whose keys share a hash part are taken as one
    /// id, then checked in row order, so that one side of every comparison
    /// is read in sequence; a collision (two texts, one hash part; rare)
    /// sends the build through the slower path that compares within each
    /// hash part.
    pub(super) fn build(hashes: &[u64], same: impl Fn(u32, u32) -> bool) -> (IdIndex, Vec<u32>) {
        let grouped = Grouped::new(hashes);
        let agreed = grouped.agrees(0..hashes.len(), &same);
        grouped.settle(agreed, hashes, same)
    }

    /// `build` when some hash part is shared by different texts: within
    /// each run of one hash part, every row is compared with the distinct
    /// texts before it.
    pub(super) fn build_comparing(
        mut self,
        keys: &[u64],
        mut first_of: Vec<u32>,
        same: impl Fn(u32, u32) -> bool,
    ) -> (IdIndex, Vec<u32>) {
        let (bits, mask) = (self.id_bits, self.mask());
        let mut i = 0;
        while i < keys.len() {
            let hash = keys[i] >> bits;
            let run_start = self.keys.len();
            while i < keys.len() && keys[i] >> bits == hash {
                let row = (keys[i] & mask) as u32;
                // Rows ascend within a run, so an equal earlier entry is the first.
                let earlier = self.keys[run_start..].iter().map(|k| (k & mask) as u32);
                match earlier.clone().find(|&r| same(r, row)) {
                    Some(first) => first_of[row as usize] = first,
                    None => {
                        first_of[row as usize] = row;
                        self.keys.push(keys[i]);
                    }
                }
                i += 1;
            }
        }
        self.keys.shrink_to_fit();
        (self, first_of)
    }

    /// Renames every id (a row, when built) by `to`.
    pub(super) fn rename(&mut self, to: impl Fn(u32) -> u32) {
        let mask = self.mask();
        for k in &mut self.keys {
            *k = (*k & !mask) | to((*k & mask) as u32) as u64;
        }
    }

    pub(in crate::catalogue) fn find(&self, h: u64, eq: impl Fn(u32) -> bool) -> Option<u32> {
        let (bits, mask) = (self.id_bits, self.mask());
        let hash = h >> bits;
        let start = self.keys.partition_point(|&k| k >> bits < hash);
        self.keys[start..]
            .iter()
            .take_while(|&&k| k >> bits == hash)
            .map(|&k| (k & mask) as u32)
            .find(|&id| eq(id))
    }
}

/// Rows grouped by hash alone, for `IdIndex::build`: the index of each
/// hash's first row, and each row's first row of the same hash.
pub(super) struct Grouped {
    pub(super) index: IdIndex,
    pub(super) first_of: Vec<u32>,
}

impl Grouped {
    pub(super) fn new(hashes: &[u64]) -> Grouped {
        let id_bits = (usize::BITS - hashes.len().leading_zeros()).max(1);
        let keys = sorted_keys(hashes, id_bits);
        let mut index = IdIndex {
            keys: Vec::with_capacity(keys.len()),
            id_bits,
        };
        let mask = index.mask();
        let mut first_of: Vec<u32> = (0..hashes.len() as u32).collect();
        let mut i = 0;
        while i < keys.len() {
            let (hash, first) = (keys[i] >> id_bits, (keys[i] & mask) as u32);
            index.keys.push(keys[i]);
            i += 1;
            while i < keys.len() && keys[i] >> id_bits == hash {
                first_of[(keys[i] & mask) as usize] = first;
                i += 1;
            }
        }
        Grouped { index, first_of }
    }

    /// True when each of these rows that is grouped with an earlier row
    /// has its text (`same` says), in row order: one side of every
    /// comparison is then read in sequence.
    pub(super) fn agrees(
        &self,
        rows: std::ops::Range<usize>,
        same: &impl Fn(u32, u32) -> bool,
    ) -> bool {
        (self.first_of[rows.clone()].iter().zip(rows))
            .all(|(&f, r)| f as usize == r || same(f, r as u32))
    }

    /// The index and first rows: as grouped when the texts `agreed`, else
    /// by the slower path that compares within each hash part (a collision:
    /// two texts, one hash part; rare).
    pub(super) fn settle(
        self,
        agreed: bool,
        hashes: &[u64],
        same: impl Fn(u32, u32) -> bool,
    ) -> (IdIndex, Vec<u32>) {
        let Grouped {
            mut index,
            first_of,
        } = self;
        if agreed {
            index.keys.shrink_to_fit();
            return (index, first_of);
        }
        // The keys again (they are not kept meanwhile: memory).
        let keys = sorted_keys(hashes, index.id_bits);
        index.keys.clear();
        index.build_comparing(&keys, first_of, same)
    }
}

/// True when `test` passes for every block of `0..n`, tried on two threads
/// (blocks handed out in turn, so uneven blocks still share the work).
pub(super) fn all_blocks(n: usize, test: impl Fn(std::ops::Range<usize>) -> bool + Sync) -> bool {
    use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
    const BLOCK: usize = 1 << 15;
    let next = AtomicUsize::new(0);
    let failed = AtomicBool::new(false);
    let work = || {
        loop {
            let start = next.fetch_add(1, Ordering::Relaxed) * BLOCK;
            if start >= n || failed.load(Ordering::Relaxed) {
                return;
            }
            if !test(start..(start + BLOCK).min(n)) {
                failed.store(true, Ordering::Relaxed);
            }
        }
    };
    std::thread::scope(|s| {
        s.spawn(work);
        work();
    });
    !failed.load(Ordering::Relaxed)
}

/// The keys of `hashes` (each hash with its low `id_bits` bits replaced by
/// its row), sorted. A radix sort on the top bits of the hash (which is
/// uniform, and seeded afresh in every process): one scatter by the top 8
/// bits, whose 256 write positions stay in cache and in the TLB, then each
/// bucket (in cache) by the next 11 bits through a small buffer, then one
/// insertion pass over the bucket for the key or two that share those bits.
pub(super) fn sorted_keys(hashes: &[u64], id_bits: u32) -> Vec<u64> {
    let key = |(row, &h): (usize, &u64)| (h >> id_bits << id_bits) | row as u64;
    if hashes.len() < 1 << 12 {
        let mut keys: Vec<u64> = hashes.iter().enumerate().map(key).collect();
        keys.sort_unstable();
        return keys;
    }
    const TOP: u32 = 8;
    const NEXT: u32 = 11;
    let top = |k: u64| (k >> (64 - TOP)) as usize;
    let next = |k: u64| ((k >> (64 - TOP - NEXT)) & ((1 << NEXT) - 1)) as usize;
    let mut start = vec![0usize; (1 << TOP) + 1];
    for &h in hashes {
        start[top(h) + 1] += 1;
    }
    for i in 1..start.len() {
        start[i] += start[i - 1];
    }
    let mut out = vec![0u64; hashes.len()];
    let mut fill = start.clone();
    for k in hashes.iter().enumerate().map(key) {
        let b = top(k);
        out[fill[b]] = k;
        fill[b] += 1;
    }
    let mut buf = Vec::new();
    let mut count = vec![0usize; (1 << NEXT) + 1];
    for w in start.windows(2) {
        let bucket = &mut out[w[0]..w[1]];
        count.fill(0);
        for &k in bucket.iter() {
            count[next(k) + 1] += 1;
        }
        for i in 1..count.len() {
            count[i] += count[i - 1];
        }
        buf.clear();
        buf.resize(bucket.len(), 0);
        for &k in bucket.iter() {
            let d = next(k);
            buf[count[d]] = k;
            count[d] += 1;
        }
        bucket.copy_from_slice(&buf);
        nearly_sorted(bucket);
    }
    out
}

/// Sorts keys already in order but for short runs: by insertion, which
/// costs one step per key plus one per key out of place. A run longer than
/// a uniform hash would give (many ids with one hash prefix) is sorted
/// whole instead, so no input costs more than O(n log n).
pub(super) fn nearly_sorted(v: &mut [u64]) {
    let mut moves = 0usize;
    for i in 1..v.len() {
        let x = v[i];
        let mut j = i;
        while j > 0 && v[j - 1] > x {
            v[j] = v[j - 1];
            j -= 1;
        }
        v[j] = x;
        moves += i - j;
        if moves > 8 * v.len() + 64 {
            v.sort_unstable();
            return;
        }
    }
}

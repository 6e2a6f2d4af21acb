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
    /// is read in sequence; the rows of a collision (two texts, one hash
    /// part) are then sorted out alone ([`Grouped::settle`]).
    pub(in crate::catalogue) fn build(
        hashes: &[u64],
        same: impl Fn(u32, u32) -> bool,
    ) -> (IdIndex, Vec<u32>) {
        let grouped = Grouped::new(hashes);
        let off = grouped.disagreeing(0..hashes.len(), &same);
        grouped.settle(&off, hashes, same)
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
        // The hashes are spread evenly: a key's share of the list is close
        // to its share of the hash space, and the search starts there.
        let guess = ((u128::from(hash) * self.keys.len() as u128) >> (64 - bits)) as usize;
        let start = crate::sorted::partition_point_near(&self.keys, guess, |&k| k >> bits < hash);
        self.keys[start..]
            .iter()
            .take_while(|&&k| k >> bits == hash)
            .map(|&k| (k & mask) as u32)
            .find(|&id| eq(id))
    }

    /// [`IdIndex::find`] for many hashes at once: every (id, query) pair
    /// whose hash part is the query's, sorted by id. The queries are sorted
    /// by hash and the keys walked beside them once, so that a lookup of a
    /// ledger's 500,000 candidates reads the index (and the caller its ids'
    /// text, in id order) in sequence: a lookup one by one reads three or
    /// four far-apart places per query (0.7 µs each at 1M candidates).
    pub(in crate::catalogue) fn find_each(&self, hashes: &[u64]) -> Vec<(u32, u32)> {
        let (bits, mask) = (self.id_bits, self.mask());
        let mut queries: Vec<(u64, u32)> = hashes
            .iter()
            .enumerate()
            .map(|(q, &h)| (h >> bits, q as u32))
            .collect();
        queries.sort_unstable();
        let mut pairs = Vec::with_capacity(queries.len());
        let mut at = 0;
        for (hash, q) in queries {
            at = crate::sorted::advance(&self.keys, at, |&k| k >> bits < hash);
            pairs.extend(
                self.keys[at..]
                    .iter()
                    .take_while(|&&k| k >> bits == hash)
                    .map(|&k| ((k & mask) as u32, q)),
            );
        }
        pairs.sort_unstable();
        pairs
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
        // The sorted keys become the index in place, the first of each hash
        // part kept: a second array of them would add 8 bytes a row at the
        // load's peak.
        let mut keys = sorted_keys(hashes, id_bits);
        let mut index = IdIndex {
            keys: Vec::new(),
            id_bits,
        };
        let mask = index.mask();
        let mut first_of: Vec<u32> = (0..hashes.len() as u32).collect();
        let (mut i, mut kept) = (0, 0);
        while i < keys.len() {
            let (hash, first) = (keys[i] >> id_bits, (keys[i] & mask) as u32);
            keys[kept] = keys[i];
            kept += 1;
            i += 1;
            while i < keys.len() && keys[i] >> id_bits == hash {
                first_of[(keys[i] & mask) as usize] = first;
                i += 1;
            }
        }
        keys.truncate(kept);
        index.keys = keys;
        Grouped { index, first_of }
    }

    /// The rows among these grouped with an earlier row whose text is
    /// not its (`same` says): rows of a hash part shared by two texts, a
    /// collision. Checked in row order, so that one side of every
    /// comparison is read in sequence. Rare below a million ids, a few
    /// dozen rows among ten million (the hash part keeps 64 − log₂ n bits).
    pub(super) fn disagreeing(
        &self,
        rows: std::ops::Range<usize>,
        same: &impl Fn(u32, u32) -> bool,
    ) -> Vec<u32> {
        (self.first_of[rows.clone()].iter().zip(rows))
            .filter(|&(&f, r)| f as usize != r && !same(f, r as u32))
            .map(|(_, r)| r as u32)
            .collect()
    }

    /// The index and first rows, with the rows `off` ([`Grouped::
    /// disagreeing`], ascending) sorted out: each takes the first row of
    /// its hash part with its text, or becomes one, whose key joins the
    /// index. Only those rows are compared again, however many ids share
    /// the catalogue.
    pub(super) fn settle(
        self,
        off: &[u32],
        hashes: &[u64],
        same: impl Fn(u32, u32) -> bool,
    ) -> (IdIndex, Vec<u32>) {
        let Grouped {
            mut index,
            mut first_of,
        } = self;
        if off.is_empty() {
            index.keys.shrink_to_fit();
            return (index, first_of);
        }
        let bits = index.id_bits;
        // Per hash part (named by its first row), the first rows of its
        // texts so far, in row order.
        let mut texts: hashbrown::HashMap<u32, Vec<u32>> = hashbrown::HashMap::new();
        let mut added: Vec<u64> = Vec::new();
        for &r in off {
            let part = first_of[r as usize];
            let firsts = texts.entry(part).or_insert_with(|| vec![part]);
            match firsts.iter().copied().find(|&f| same(f, r)) {
                Some(f) => first_of[r as usize] = f,
                None => {
                    firsts.push(r);
                    first_of[r as usize] = r;
                    added.push((hashes[r as usize] >> bits << bits) | r as u64);
                }
            }
        }
        // The new keys merged in: the index stays sorted, one key per text.
        added.sort_unstable();
        let old = std::mem::take(&mut index.keys);
        let mut keys = Vec::with_capacity(old.len() + added.len());
        let mut new = added.into_iter().peekable();
        for k in old {
            while let Some(a) = new.next_if(|&a| a < k) {
                keys.push(a);
            }
            keys.push(k);
        }
        keys.extend(new);
        index.keys = keys;
        (index, first_of)
    }
}

/// The rows `find` gives for the blocks of `0..n`, in order, found on two
/// threads (blocks handed out in turn, so uneven blocks still share the
/// work).
pub(super) fn all_blocks(
    n: usize,
    find: impl Fn(std::ops::Range<usize>) -> Vec<u32> + Sync,
) -> Vec<u32> {
    use std::sync::atomic::{AtomicUsize, Ordering};
    const BLOCK: usize = 1 << 15;
    let next = AtomicUsize::new(0);
    let work = || {
        let mut found: Vec<(usize, Vec<u32>)> = Vec::new();
        loop {
            let start = next.fetch_add(1, Ordering::Relaxed) * BLOCK;
            if start >= n {
                return found;
            }
            let rows = find(start..(start + BLOCK).min(n));
            if !rows.is_empty() {
                found.push((start, rows));
            }
        }
    };
    let mut found = std::thread::scope(|s| {
        let other = s.spawn(work);
        let mut mine = work();
        mine.extend(
            other
                .join()
                .unwrap_or_else(|e| std::panic::resume_unwind(e)),
        );
        mine
    });
    found.sort_unstable_by_key(|f| f.0);
    found.into_iter().flat_map(|f| f.1).collect()
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

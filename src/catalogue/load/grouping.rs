//! The rows grouped by their ids: candidate ids and star ids grouped by
//! hash (`ids`), rows that name no star placed (`hosts`), duplicate ids
//! removed, ids numbered per star, spellings of one star joined
//! (`spelling`), the stars' ids and the star index built; or the ids of an
//! earlier read of the same rows taken as they are.

use super::merge::Merger;
use super::*;
use std::sync::Arc;

/// A catalogue's ids and what groups them: the candidates' and stars'
/// ids, the star index, the lookups and the hasher they were built with,
/// shared (`Arc`) between two reads of the same rows; and what the
/// grouping said (`Catalogue::notes`).
pub(super) struct Ids {
    pub(super) candidates: Arc<StrPool>,
    pub(super) stars: Arc<StrPool>,
    pub(super) index: Arc<crate::catalogue::StarIndex>,
    pub(super) candidate_lookup: Arc<IdIndex>,
    pub(super) star_lookup: Arc<IdIndex>,
    pub(super) hasher: hashbrown::DefaultHashBuilder,
    pub(super) notes: Vec<String>,
}

impl Ids {
    /// The ids of `first`, shared.
    pub(super) fn of(first: &Catalogue) -> Ids {
        Ids {
            candidates: Arc::clone(&first.candidates),
            stars: Arc::clone(&first.stars),
            index: first.index(),
            candidate_lookup: Arc::clone(&first.candidate_lookup),
            star_lookup: Arc::clone(&first.star_lookup),
            hasher: first.hasher,
            notes: Vec::new(),
        }
    }
}

impl Merger {
    /// Whether the rows read name what `first`'s rows name, row by row:
    /// as many rows, each with `first`'s candidate id and star id as
    /// written, and every row naming its star. Then the ids' work would
    /// group them as `first` is grouped (it is a function of the ids' text
    /// and order alone) and say nothing (no note), and `first`'s grouping
    /// is taken. A row `first` dropped as a duplicate, a row naming no
    /// star, a star written several ways or ids named `star/id` make them
    /// differ, and the rows are grouped anew.
    pub(super) fn names_as(&self, first: &Catalogue) -> bool {
        let n = self.candidates.len();
        self.hostless == 0
            && self.zeros == 0
            && n == first.len()
            && self.row_stars.len() == n
            && self.candidates == *first.candidates
            // Each row's star read at random: on every core.
            && crate::parallel::in_parts(n, |rows| {
                rows.into_iter()
                    .all(|r| self.row_stars.get(r) == first.star_id(first.star_of(r as u32)))
            })
            .into_iter()
            .all(|same| same)
    }

    /// Each row's ids hashed, for their grouping, where the rows were read
    /// without (`Layout::hash_ids`): a row's star hash is its star text's,
    /// as the reader makes it (a row naming no star: the star it was given).
    pub(super) fn hash_rows(&mut self) {
        if self.candidate_hash.len() == self.candidates.len() {
            return;
        }
        let hasher = self.hasher;
        let hash_all = |ids: &StrPool| -> Vec<u64> {
            (0..ids.len())
                .map(|r| hasher.hash_one(ids.get(r).as_bytes()))
                .collect()
        };
        let (cands, stars) = std::thread::scope(|s| {
            let stars = s.spawn(|| hash_all(&self.row_stars));
            let cands = hash_all(&self.candidates);
            (
                cands,
                stars
                    .join()
                    .unwrap_or_else(|e| std::panic::resume_unwind(e)),
            )
        });
        self.candidate_hash = cands;
        self.star_hash = stars;
    }

    /// Groups the rows by their ids: rows that name no star placed,
    /// duplicate ids removed (with a skip each), ids numbered per star
    /// named `star/id`, spellings of one star joined; the stars' ids and
    /// the star index built. Takes the ids out of the merger.
    pub(super) fn group_ids(&mut self) -> Ids {
        // Rows that name no star: their family's star, else their own.
        let written = std::mem::take(&mut self.hostless_written);
        let hostless_note = self.place_hostless(&written, self.hostless, self.zeros);
        // Candidate ids and star ids are grouped by hash on two threads at
        // once, then checked by text on both (star ids repeat: most of the
        // work). Duplicate ids are rare; when there are some, their rows go
        // and the stars are grouped again without them.
        let (cands, stars) = std::thread::scope(|s| {
            let stars = s.spawn(|| Grouped::new(&self.star_hash));
            let cands = Grouped::new(&self.candidate_hash);
            let stars = stars
                .join()
                .unwrap_or_else(|e| std::panic::resume_unwind(e));
            (cands, stars)
        });
        let (cand_ids, star_ids) = (&self.candidates, &self.row_stars);
        let same_cand = |a: u32, b: u32| cand_ids.get(a as usize) == cand_ids.get(b as usize);
        let same_star = |a: u32, b: u32| star_ids.get(a as usize) == star_ids.get(b as usize);
        let cands_off = all_blocks(self.candidate_hash.len(), |r| {
            cands.disagreeing(r, &same_cand)
        });
        let stars_off = all_blocks(self.star_hash.len(), |r| stars.disagreeing(r, &same_star));
        let (candidate_lookup, first_of) =
            cands.settle(&cands_off, &self.candidate_hash, same_cand);
        let grouping = StarGrouping::number(stars.settle(&stars_off, &self.star_hash, same_star));
        let mut dups = repeats(&first_of);
        drop(first_of);
        let mut candidate_lookup = candidate_lookup;
        let mut id_note = None;
        if self.numbered_per_star(&dups) {
            // Ids that number the candidates of each star (`1`, `2`, or
            // `b`, `c`): the star's id and its own make one.
            let n = self.candidates.len();
            let mut ids = StrPool::with_capacity(
                n,
                self.candidates.byte_len() + self.row_stars.byte_len() + n,
            );
            let mut id = String::new();
            for r in 0..n {
                id.clear();
                id.push_str(self.row_stars.get(r));
                id.push('/');
                id.push_str(self.candidates.get(r));
                ids.push(&id);
            }
            self.candidate_hash = (0..n)
                .map(|r| self.hasher.hash_one(ids.get(r).as_bytes()))
                .collect();
            self.candidates = ids;
            let cands = &self.candidates;
            let (lookup, first_of) = IdIndex::build(&self.candidate_hash, |a, b| {
                cands.get(a as usize) == cands.get(b as usize)
            });
            candidate_lookup = lookup;
            id_note = Some(format!(
                "candidate ids repeat across stars ({} rows): read as numbered per star, each candidate named `star/id`",
                dups.len()
            ));
            dups = repeats(&first_of);
        }
        let (candidate_lookup, grouping) = if dups.is_empty() {
            (candidate_lookup, grouping)
        } else {
            self.remove_rows(&dups);
            let cands = &self.candidates;
            let (ids, _) = IdIndex::build(&self.candidate_hash, |a, b| {
                cands.get(a as usize) == cands.get(b as usize)
            });
            (ids, StarGrouping::build(&self.row_stars, &self.star_hash))
        };
        // One star written several ways is one star (`TIC 100`, `TIC100`).
        let mut notes: Vec<String> = hostless_note.into_iter().chain(id_note).collect();
        let grouping = match self.join_spellings(&grouping.first_rows, &grouping.star_of) {
            Some(note) => {
                notes.push(note);
                StarGrouping::build(&self.row_stars, &self.star_hash)
            }
            None => grouping,
        };
        notes.extend(super::spelling::rounded_note(
            &self.row_stars,
            &grouping.first_rows,
            &self.lines,
        ));
        // The grouping is final: the rows' hashes go before the stars' ids
        // and members are built, where a load's memory peaks.
        drop(std::mem::take(&mut self.candidate_hash));
        drop(std::mem::take(&mut self.star_hash));
        let row_stars = std::mem::take(&mut self.row_stars);
        let mut candidates = std::mem::take(&mut self.candidates);
        let StarGrouping {
            star_of,
            first_rows,
            lookup: star_lookup,
        } = grouping;
        // The stars' ids and the star → members rows, on two threads.
        let (stars, (member_start, members)) = std::thread::scope(|s| {
            let ids = s.spawn(|| {
                let mut stars = StrPool::with_capacity(first_rows.len(), row_stars.byte_len() / 2);
                for &r in &first_rows {
                    stars.push(row_stars.get(r as usize));
                }
                stars
            });
            let members = star_members(&star_of, first_rows.len());
            let stars = ids.join().unwrap_or_else(|e| std::panic::resume_unwind(e));
            (stars, members)
        });
        drop(row_stars);
        candidates.shrink_to_fit();
        Ids {
            candidates: Arc::new(candidates),
            stars: Arc::new(stars),
            index: Arc::new(crate::catalogue::StarIndex {
                star_of,
                member_start,
                members,
            }),
            candidate_lookup: Arc::new(candidate_lookup),
            star_lookup: Arc::new(star_lookup),
            hasher: self.hasher,
            notes,
        }
    }
}

/// The rows whose id an earlier row has: (row, that first row).
fn repeats(first_of: &[u32]) -> Vec<(u32, u32)> {
    (first_of.iter().enumerate())
        .filter(|&(r, &f)| f as usize != r)
        .map(|(r, &f)| (r as u32, f))
        .collect()
}

/// Star → members as compressed rows: where each star's members start in
/// the list of members (one more entry at the end), and the list, in file
/// order within a star (a counting sort by star).
pub(super) fn star_members(star_of: &[StarId], stars: usize) -> (Vec<u32>, Vec<CandidateId>) {
    let mut member_start = vec![0u32; stars + 1];
    for &s in star_of {
        member_start[s as usize + 1] += 1;
    }
    for i in 1..member_start.len() {
        member_start[i] += member_start[i - 1];
    }
    let mut fill = member_start.clone();
    let mut members = vec![0; star_of.len()];
    for (c, &s) in star_of.iter().enumerate() {
        members[fill[s as usize] as usize] = c as CandidateId;
        fill[s as usize] += 1;
    }
    (member_start, members)
}

//! What the browser shows: the systems the filter keeps, in the order of
//! the current sort (orders kept per sort key and reused), each star's
//! members in the candidate order, where the selection lands, and the
//! moves to the next open candidate or flagged star.

use super::*;

impl App {
    /// The sort key of stars as an integer whose order is the key's
    /// (inverted when descending); `low_bits` says how many of its low bits
    /// the radix passes may leave to the run fix-up (floats: 32). For the id
    /// sort the key is eight bytes of the id past the prefix every id shares;
    /// equal keys compare the ids.
    pub(super) fn sort_bits(&self) -> impl Fn(StarId) -> u64 + '_ {
        self.sort_bits_for(self.sort, self.descending)
    }

    /// `sort_bits` for any sort and direction (the cached orders'
    /// included).
    pub(super) fn sort_bits_for(
        &self,
        sort: SortKey,
        descending: bool,
    ) -> impl Fn(StarId) -> u64 + '_ {
        let common = match sort {
            SortKey::Star => self.id_common(),
            _ => 0,
        };
        // Without `fpp` a star's best odds depend on its size alone: rank the
        // few sizes' odds once, and the key is a small integer (one pass).
        let by_size = match sort {
            SortKey::BestOdds => self.odds_rank_by_size(),
            _ => None,
        };
        move |s| {
            let k = match sort {
                SortKey::BestOdds => match &by_size {
                    // A star with no counted candidate but a held one has
                    // the held one's prior odds, those of a single; at most
                    // 1:1 where every one held is no planet (the last rank).
                    // (Their odds are read only for the stars of size 0.)
                    Some(rank) => match self.live.star_k(s) {
                        0 => match self.live.best_odds(s) {
                            Some(best) if best <= 1.0 => rank[rank.len() - 1],
                            Some(_) => rank[1],
                            None => rank[0],
                        },
                        k => rank[k],
                    },
                    None => sortable_bits(self.live.best_odds(s).unwrap_or(-1.0)),
                },
                SortKey::Multiplicity => self.live.star_k(s) as u64,
                SortKey::Flags => self.star_flags(s).len() as u64,
                SortKey::Star | SortKey::Period => {
                    static_key(&self.cat, common, sort, s).unwrap_or(0)
                }
            };
            if descending { !k } else { k }
        }
    }

    /// The length in bytes of the prefix every star id shares.
    pub(super) fn id_common(&self) -> usize {
        *self.id_common.get_or_init(|| id_common_of(&self.cat))
    }

    /// For each system size 0..=k_max (at least 1), the rank of its odds
    /// among all sizes' (ties share a rank; 0 = every candidate rejected),
    /// when the odds depend on the size alone; and last, the rank of the
    /// odds of a held candidate that is no planet (a single's, at most 1:1;
    /// `Live::not_a_planet`).
    pub(super) fn odds_rank_by_size(&self) -> Option<Vec<u64>> {
        let single = self.live.uniform_odds(1)?;
        // The live histogram only grows, so it covers every star's size.
        let k_max = self.live.histogram().len().saturating_sub(1).max(1);
        let odds: Vec<f64> = (0..=k_max)
            .map(|k| self.live.uniform_odds(k).unwrap_or(-1.0))
            .chain([single.min(1.0)])
            .collect();
        Some(
            odds.iter()
                .map(|&o| odds.iter().filter(|&&x| x.total_cmp(&o).is_lt()).count() as u64)
                .collect(),
        )
    }

    pub(super) fn low_bits(&self) -> u32 {
        low_bits_of(self.sort, self.live.uniform_odds(1).is_some())
    }

    /// Ties of the sort: the ids for the id sort (reversed when
    /// descending), else catalogue order.
    pub(super) fn tie(&self, a: StarId, b: StarId) -> std::cmp::Ordering {
        self.tie_for(self.sort, self.descending, a, b)
    }

    pub(super) fn tie_for(
        &self,
        sort: SortKey,
        descending: bool,
        a: StarId,
        b: StarId,
    ) -> std::cmp::Ordering {
        match sort {
            SortKey::Star => id_tie(&self.cat, descending, a, b),
            _ => a.cmp(&b),
        }
    }

    /// After a decision on star `s` that moved the stars `moved` (`s`
    /// among them; `Live::stars_moved_by`): those the view shows move to
    /// their new places, found by binary search, O(log n) plus one memmove
    /// each, and `s` is selected. Stars of the same size keep their order
    /// (their odds all move by one factor); a change of the table can
    /// reorder stars of different sizes whose odds are close, and the view
    /// shows that at its next full sort (a sort or filter change), which is
    /// exact.
    pub(super) fn reposition(&mut self, s: StarId, moved: &[StarId]) {
        let mut stars = std::mem::take(&mut self.stars);
        let shown: Vec<StarId> = moved
            .iter()
            .copied()
            .filter(|&m| m == s || stars.contains(&m))
            .collect();
        self.place_all_of(&mut stars, &shown, self.sort, self.descending);
        self.star_row = stars.iter().position(|&x| x == s).unwrap_or(0);
        self.stars = stars;
    }

    /// [`App::place`] of several stars at once: all taken out first, so
    /// that each is placed among stars in order.
    pub(super) fn place_all_of(
        &self,
        order: &mut Vec<StarId>,
        stars: &[StarId],
        sort: SortKey,
        descending: bool,
    ) {
        if let [one] = stars {
            self.place(order, *one, sort, descending);
            return;
        }
        order.retain(|x| !stars.contains(x));
        for &s in stars {
            order.push(s);
            self.place(order, s, sort, descending);
        }
    }

    /// Moves star `s` to its place in `order` (sorted by `sort` in that
    /// direction, all but `s` in place): one scan to find it, a binary
    /// search, one memmove. Returns the new index.
    pub(super) fn place(
        &self,
        order: &mut Vec<StarId>,
        s: StarId,
        sort: SortKey,
        descending: bool,
    ) -> usize {
        if let Some(i) = order.iter().position(|&x| x == s) {
            order.remove(i);
        }
        let key = self.sort_bits_for(sort, descending);
        let ks = key(s);
        let at = order.partition_point(|&x| {
            key(x)
                .cmp(&ks)
                .then_with(|| self.tie_for(sort, descending, x, s))
                .is_lt()
        });
        order.insert(at, s);
        at
    }

    /// A star's members in the candidates pane's order (file order breaks
    /// ties; a missing value sorts last either way).
    pub fn members_of(&self, s: StarId) -> Vec<CandidateId> {
        let mut m = self.cat.members(s).to_vec();
        let key = |c: CandidateId| -> Option<f64> {
            match self.cand_sort {
                CandidateSort::File => None,
                CandidateSort::Period => self.cat.value(Field::PeriodD, c),
                CandidateSort::Depth => self.cat.value(Field::DepthPpm, c),
                CandidateSort::Odds => self.live.odds(c),
                CandidateSort::Snr => self.cat.value(Field::Snr, c),
            }
        };
        if self.cand_sort != CandidateSort::File {
            m.sort_by(|&a, &b| match (key(a), key(b)) {
                (Some(x), Some(y)) if self.cand_descending => y.total_cmp(&x),
                (Some(x), Some(y)) => x.total_cmp(&y),
                (Some(_), None) => std::cmp::Ordering::Less,
                (None, Some(_)) => std::cmp::Ordering::Greater,
                (None, None) => std::cmp::Ordering::Equal,
            });
        } else if self.cand_descending {
            m.reverse();
        }
        m
    }

    /// Every star in the current sort order, from the cache or sorted now:
    /// keys as order-preserving integers, then a stable radix sort, so ties
    /// keep catalogue order exactly as `order` says.
    pub(super) fn full_order(&mut self) -> Vec<StarId> {
        let at = (self.sort, self.descending);
        if let Some(i) = self.orders.iter().position(|(k, _)| *k == at) {
            return self.orders.remove(i).1;
        }
        let n = self.cat.star_count() as StarId;
        let mut buf = std::mem::take(&mut self.buffers);
        let mut stars = buf.spare.pop().unwrap_or_default();
        stars.clear();
        stars.extend(0..n);
        buf.keys.clear();
        buf.keys.extend((0..n).map(self.sort_bits()));
        let tie = |a, b| self.tie(a, b);
        let by_id: Option<&dyn Fn(StarId, StarId) -> std::cmp::Ordering> =
            (self.sort == SortKey::Star).then_some(&tie);
        sort_keyed(
            &mut buf.keys,
            &mut stars,
            &mut buf.scratch,
            self.low_bits(),
            by_id,
        );
        self.buffers = buf;
        stars
    }

    /// Forgets the cached orders by flags: the flags shown changed, the
    /// odds did not.
    pub(super) fn forget_flag_orders(&mut self) {
        let (keep, gone) = std::mem::take(&mut self.orders)
            .into_iter()
            .partition(|((k, _), _)| *k != SortKey::Flags);
        self.orders = keep;
        self.recycle(gone);
    }

    /// Forgets the cached orders whose keys a change of decisions (or, with
    /// `checks`, of flags) can move.
    pub(super) fn forget_orders(&mut self, checks: bool) {
        let (keep, gone) = std::mem::take(&mut self.orders)
            .into_iter()
            .partition(|((k, _), _)| match k {
                SortKey::BestOdds | SortKey::Multiplicity => false,
                SortKey::Flags => !checks,
                SortKey::Star | SortKey::Period => true,
            });
        self.orders = keep;
        self.recycle(gone);
    }

    /// After a decision that moved the stars `moved`, keeps the cached
    /// orders exact without sorting again where only their keys moved: by
    /// size always; by best odds when they depend on size alone (no `fpp`)
    /// and the sizes' ranks (`before`, from before the decision) still
    /// hold. The others whose keys a decision moves are forgotten, to be
    /// sorted afresh.
    pub(super) fn keep_orders(&mut self, moved: &[StarId], before: Option<Vec<u64>>) {
        let same_ranks = before.is_some() && before == self.odds_rank_by_size();
        let orders = std::mem::take(&mut self.orders);
        let mut gone = Vec::new();
        for ((key, descending), mut order) in orders {
            let exact = match key {
                SortKey::Multiplicity => true,
                SortKey::BestOdds => same_ranks,
                SortKey::Flags | SortKey::Star | SortKey::Period => {
                    self.orders.push(((key, descending), order));
                    continue;
                }
            };
            if !exact {
                gone.push(((key, descending), order));
                continue;
            }
            self.place_all_of(&mut order, moved, key, descending);
            self.orders.push(((key, descending), order));
        }
        self.recycle(gone);
    }

    /// Keeps up to two dropped orders' memory for the next sort.
    pub(super) fn recycle(&mut self, gone: Vec<((SortKey, bool), Vec<StarId>)>) {
        for (_, v) in gone {
            if self.buffers.spare.len() < 2 {
                self.buffers.spare.push(v);
            }
        }
    }

    /// Marks, one bit per star, the stars with a candidate the filter
    /// matches. Two passes, each reading columns in order and each split
    /// over two threads: the stars, judged whole where the star-level
    /// clauses (`k`, `star:`) decide; then the candidates of the stars left
    /// undecided, 64 at a time and one clause at a time.
    pub(super) fn shown_stars(&mut self, bits: &mut Vec<u64>) {
        let n = self.cat.star_count();
        let words = n.div_ceil(64);
        let mut undecided = std::mem::take(&mut self.buffers.undecided);
        let mut second = std::mem::take(&mut self.buffers.second);
        for v in [&mut *bits, &mut undecided, &mut second] {
            v.clear();
            v.resize(words, 0);
        }
        let two = n >= self.parallel_from;
        let shared = self.shared();
        let filter = &self.filter;
        let star_test = filter.star_test();
        let index = self.cat.index();
        let (ks, starts, star_of) = (self.live.star_ks(), &index.member_start, &index.star_of);
        let reads_star = star_test.reads_star();
        let mut mixed = true;
        if reads_star {
            // Returns whether an undecided star has a rejected candidate.
            let judge = |first_word: usize, hit: &mut [u64], open: &mut [u64]| {
                let mut mixed = false;
                for (w, (hit, open)) in hit.iter_mut().zip(open).enumerate() {
                    let base = (first_word + w) * 64;
                    let (mut h, mut o) = (0, 0);
                    for bit in 0..64.min(n - base) {
                        let s = base + bit;
                        let (k, members) = (ks[s] as usize, (starts[s + 1] - starts[s]) as usize);
                        match star_test.judge(k, members, || shared.cat.star_id(s as StarId)) {
                            Some(v) => h |= (v as u64) << bit,
                            None => {
                                o |= 1 << bit;
                                mixed |= k < members;
                            }
                        }
                    }
                    (*hit, *open) = (h, o);
                }
                mixed
            };
            mixed = if two {
                let half = words / 2;
                let (h1, h2) = bits.split_at_mut(half);
                let (o1, o2) = undecided.split_at_mut(half);
                std::thread::scope(|scope| {
                    let second = scope.spawn(|| judge(half, h2, o2));
                    judge(0, h1, o1) | second.join().expect("filter thread")
                })
            } else {
                judge(0, bits, &mut undecided)
            };
            if undecided.iter().all(|&w| w == 0) {
                self.buffers.undecided = undecided;
                self.buffers.second = second;
                return;
            }
        }
        let is_open = |s: StarId| !reads_star || undecided[s as usize / 64] >> (s % 64) & 1 == 1;
        let m = self.cat.len();
        // The star clauses held for every undecided star, and so did the
        // `k` clauses unless one has a rejected candidate (with k 0). Column
        // compares go first (they read in order), then whether the star is
        // undecided, then the rest, each over the candidates still in the
        // running.
        let (columns, others): (Vec<&Clause>, Vec<&Clause>) = filter
            .clauses
            .iter()
            .filter(|c| match c {
                Clause::Star(..) => !reads_star,
                Clause::Compare(NumField::K, ..) => !reads_star || mixed,
                _ => true,
            })
            .partition(|c| {
                matches!(c, Clause::Compare(f, ..) if column_field(*f).is_some() || *f == NumField::Radius)
            });
        let members = |words: std::ops::Range<usize>, hit: &mut [u64]| {
            for w in words {
                let first = w * 64;
                let len = 64.min(m - first);
                let cands = first..first + len;
                let mut live = u64::MAX >> (64 - len);
                for clause in &columns {
                    live &= shared.clause_bits(clause, cands.clone(), live);
                }
                let mut rest = live;
                while rest != 0 {
                    let i = rest.trailing_zeros();
                    if !is_open(star_of[first + i as usize]) {
                        live &= !(1 << i);
                    }
                    rest &= rest - 1;
                }
                for clause in &others {
                    if live == 0 {
                        break;
                    }
                    live &= shared.clause_bits(clause, cands.clone(), live);
                }
                while live != 0 {
                    let s = star_of[first + live.trailing_zeros() as usize];
                    hit[s as usize / 64] |= 1 << (s % 64);
                    live &= live - 1;
                }
            }
        };
        let cand_words = m.div_ceil(64);
        if two {
            std::thread::scope(|scope| {
                scope.spawn(|| members(cand_words / 2..cand_words, &mut second));
                members(0..cand_words / 2, bits);
            });
            bits.iter_mut().zip(&second).for_each(|(a, b)| *a |= b);
        } else {
            members(0..cand_words, bits);
        }
        self.buffers.undecided = undecided;
        self.buffers.second = second;
    }

    /// Rebuilds the index vector of shown stars from the filter and sort,
    /// keeping the selection on the same star where it is still shown.
    pub fn refresh_view(&mut self) {
        let keep = self.star();
        if self.pinned != keep {
            self.pinned = None;
        }
        let order = self.full_order();
        let mut stars = std::mem::take(&mut self.stars);
        stars.clear();
        if self.filter.is_empty() {
            stars.extend_from_slice(&order);
        } else {
            let mut shown = std::mem::take(&mut self.buffers.shown);
            self.shown_stars(&mut shown);
            if let Some(p) = self.pinned {
                shown[p as usize / 64] |= 1 << (p % 64);
            }
            stars.extend(
                order
                    .iter()
                    .copied()
                    .filter(|&s| shown[s as usize / 64] >> (s % 64) & 1 == 1),
            );
            self.buffers.shown = shown;
        }
        self.stars = stars;
        // Least recently used first. Room for every (sort, direction): ten
        // orders of 730,000 stars are 29 MB.
        if self.orders.len() >= ORDERS_KEPT {
            let gone = self.orders.remove(0);
            self.recycle(vec![gone]);
        }
        self.orders.push(((self.sort, self.descending), order));
        self.star_row = keep
            .and_then(|k| self.stars.iter().position(|&s| s == k))
            .unwrap_or(0)
            .min(self.stars.len().saturating_sub(1));
        self.cand_row = self.cand_row.min(self.members().len().saturating_sub(1));
    }

    /// Moves to the next (or previous) open candidate in view order,
    /// looking star by star from the selection (no pass over the whole view).
    pub(super) fn next_open(&mut self, forward: bool) {
        let n = self.stars.len();
        if n == 0 {
            return;
        }
        for step in 0..=n {
            let row = if forward {
                (self.star_row + step) % n
            } else {
                (self.star_row + n - step % n) % n
            };
            let members = self.members_of(self.stars[row]);
            let m = members.len();
            let picks: Vec<usize> = match (step, forward) {
                (0, true) => (self.cand_row + 1..m).collect(),
                (0, false) => (0..self.cand_row.min(m)).rev().collect(),
                (_, true) => (0..m).collect(),
                (_, false) => (0..m).rev().collect(),
            };
            if let Some(&i) = picks
                .iter()
                .find(|&&i| self.live.decision(members[i]) == Decision::Open)
            {
                self.star_row = row;
                self.cand_row = i;
                self.focus = Pane::Candidates;
                return;
            }
        }
        self.message = Some("no open candidate left in view".into());
    }

    pub(super) fn next_flagged(&mut self) {
        let n = self.stars.len();
        for step in 1..=n {
            let row = (self.star_row + step) % n;
            if !self.star_flags(self.stars[row]).is_empty() {
                self.star_row = row;
                self.cand_row = 0;
                return;
            }
        }
        self.message = Some("no flagged star in view".into());
    }
}

//! Where each candidate stands in the odds' counts: placing every star at
//! the start, and a star's candidates taken out and put back when a
//! decision or a flag changes it (status, system size, the histogram of
//! system sizes, the counts per prior class and the counted singles' f).

use super::*;
use std::collections::HashSet;

impl Live {
    /// Removes the stars' contributions, recomputes their statuses, adds
    /// them back.
    pub(super) fn replace_stars(&mut self, stars: &[StarId]) {
        let mut fresh = HashSet::new();
        for &s in stars {
            self.unplace_star(s);
            self.place_star(s, &mut fresh);
        }
        self.margins = OnceLock::new();
        self.refresh();
    }

    /// Places every star, as [`Live::place_star`] on each in turn would,
    /// but candidate by candidate in file order. A candidate's status
    /// depends on itself alone unless it is in an active signal group, so
    /// only the stars with such a member go through `place_star`; for the
    /// others, the same statuses, system sizes and integer counts are found
    /// in two passes that read the candidates in sequence, not star by star
    /// across a shuffled file (sums of integers: the order is free).
    pub(super) fn place_all(&mut self) {
        let index = Arc::clone(&self.index);
        let own_blocking = self.own_blocking();
        let mut k_of = vec![0u32; index.star_count()];
        let mut grouped = vec![false; index.star_count()];
        // Stars known to host a false positive no loaded row shows are
        // placed whole, as those with one among their members. (Disputes
        // come after the start, through `set_disputes`.)
        for u in self.unseen_fp.iter() {
            grouped[u.star as usize] = true;
        }
        // The stars' counts are read at random (rows in any order): each
        // asked for some rows ahead.
        const AHEAD: usize = 16;
        let star_of = &index.star_of;
        for (c, &s) in star_of.iter().enumerate() {
            if let Some(&ahead) = star_of.get(c + AHEAD) {
                crate::prefetch::value(&k_of, ahead as usize);
            }
            // A star with a member in an active group, or with a known false
            // positive (whose siblings are held), is placed whole.
            if self.active_group(c as CandidateId).is_some()
                || self.may_mark_fp(c as CandidateId, self.decision[c])
            {
                grouped[s as usize] = true;
                continue;
            }
            // As `statuses` says of a candidate outside any active group.
            let status = if self.decision[c].is_rejected() {
                Status::Rejected
            } else if self.flags[c].intersects(own_blocking) || self.unvetted(self.decision[c]) {
                Status::Held
            } else {
                Status::Counted
            };
            self.status[c] = status;
            // Outside any active group: its own flags, or an event not kept.
            self.no_planet[c] = status == Status::Held && self.no_planet_now(c as CandidateId);
            k_of[s as usize] += u32::from(status == Status::Counted);
        }
        for (s, &k) in k_of.iter().enumerate() {
            if !grouped[s] {
                self.k_of_star[s] = k as u16;
                self.bump_hist(k as usize, 1);
            }
        }
        for (c, &s) in star_of.iter().enumerate() {
            if let Some(&ahead) = star_of.get(c + AHEAD) {
                crate::prefetch::value(&grouped, ahead as usize);
                crate::prefetch::value(&k_of, ahead as usize);
            }
            if grouped[s as usize] {
                continue;
            }
            let k = k_of[s as usize] as usize;
            self.contribute(c as CandidateId, k, 1);
            // A star of one counted candidate: its f among the singles.
            if k == 1 && self.status[c] == Status::Counted {
                self.bump_single(self.f_of.get(c), 1);
            }
        }
        let mut fresh = HashSet::new();
        for (s, _) in grouped.iter().enumerate().filter(|g| *g.1) {
            self.place_star(s as StarId, &mut fresh);
        }
    }

    /// Places star s under the decisions of now. The standings of its
    /// members' active groups are worked out first, each once for the
    /// stars placed together (`fresh`: the decisions do not change among
    /// them), and read from there: a group of copies may span thousands of
    /// stars.
    fn place_star(&mut self, s: StarId, fresh: &mut HashSet<u32>) {
        let index = Arc::clone(&self.index);
        for &c in index.members(s) {
            if let Some(g) = self.active_group(c)
                && fresh.insert(g)
            {
                self.standings[g as usize] = self.group_standing(g, |m| self.decision[m as usize]);
            }
        }
        let st = self.statuses_under(
            s,
            |m| self.decision[m as usize],
            |g| self.standings[g as usize],
        );
        let k = st.iter().filter(|x| x.1 == Status::Counted).count();
        self.k_of_star[s as usize] = k as u16;
        self.bump_hist(k, 1);
        for &(c, status) in &st {
            self.status[c as usize] = status;
        }
        // Once every status and standing is in (a copy reads its group's).
        for (c, status) in st {
            self.no_planet[c as usize] = status == Status::Held && self.no_planet_now(c);
            self.contribute(c, k, 1);
        }
        if k == 1 {
            let f = self.star_single_f(s);
            self.bump_single(f, 1);
        }
    }

    fn unplace_star(&mut self, s: StarId) {
        let k = self.k_of_star[s as usize] as usize;
        if k == 1 {
            let f = self.star_single_f(s);
            self.bump_single(f, -1);
        }
        self.bump_hist(k, -1);
        let index = Arc::clone(&self.index);
        for &c in index.members(s) {
            self.contribute(c, k, -1);
        }
    }

    fn contribute(&mut self, c: CandidateId, k: usize, delta: i32) {
        let class = self.class_of.get(c as usize) as usize;
        match self.status[c as usize] {
            Status::Rejected => {
                self.rejected = self.rejected.wrapping_add_signed(delta as isize);
            }
            Status::Held if self.no_planet[c as usize] => {
                self.not_planets = self.not_planets.wrapping_add_signed(delta as isize);
            }
            Status::Held => self.held.add(class, delta),
            Status::Counted => {
                while self.buckets.len() <= k {
                    self.buckets.push(Fenwick::new(self.classes.len()));
                }
                self.buckets[k].add(class, delta);
            }
        }
    }

    fn bump_single(&mut self, f: f64, delta: i64) {
        if let Some(e) = self.singles_by_f.iter_mut().find(|e| e.0 == f) {
            e.1 += delta;
        }
    }

    fn bump_hist(&mut self, k: usize, delta: isize) {
        if k == 0 {
            return;
        }
        if self.hist.len() <= k {
            self.hist.resize(k + 1, 0);
        }
        self.hist[k] = self.hist[k].wrapping_add_signed(delta);
    }
}

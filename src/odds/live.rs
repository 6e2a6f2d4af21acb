//! The odds of a whole catalogue kept current as decisions change: a
//! rejection takes a candidate out of its system, its siblings move to the
//! next smaller multiplicity, the histogram changes, the model table is
//! rebuilt (O(k_max²), k_max ≈ 7) and the verdict counts are read from
//! per-multiplicity buckets, never from a pass over the catalogue.

use super::{
    Model, ModelError, Table, Verdict, check_inputs, posterior_odds, probability, table, verdict,
};
use std::sync::Arc;

use crate::catalogue::{CandidateId, Catalogue, Field, StarId, StarIndex};
use crate::decision::Decision;
use crate::flags::FlagSet;

/// Candidates per verdict.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct VerdictCounts {
    pub validated: usize,
    pub likely: usize,
    pub unlikely: usize,
    pub rejected: usize,
}

impl VerdictCounts {
    pub fn get(&self, v: Verdict) -> usize {
        match v {
            Verdict::Validated => self.validated,
            Verdict::Likely => self.likely,
            Verdict::Unlikely => self.unlikely,
            Verdict::Rejected => self.rejected,
        }
    }
}

/// A Fenwick tree of counts over prior ranks (Fenwick 1994, Software:
/// Practice and Experience 24, 327): add and prefix sum in O(log n).
#[derive(Clone, Debug, PartialEq)]
struct Fenwick(Vec<u32>);

impl Fenwick {
    fn new(n: usize) -> Fenwick {
        Fenwick(vec![0; n + 1])
    }

    fn add(&mut self, i: usize, delta: i32) {
        let mut i = i + 1;
        while i < self.0.len() {
            self.0[i] = self.0[i].wrapping_add_signed(delta);
            i += i & i.wrapping_neg();
        }
    }

    /// Sum over ranks 0..i.
    fn prefix(&self, i: usize) -> u32 {
        let (mut i, mut s) = (i, 0u32);
        while i > 0 {
            s = s.wrapping_add(self.0[i]);
            i &= i - 1;
        }
        s
    }
}

/// The non-rejected candidates in k-systems, split by whether a blocking
/// flag keeps them from `validated`.
#[derive(Clone, Debug, PartialEq)]
enum Bucket {
    /// Every candidate has the prior f: counts suffice.
    Uniform { unblocked: usize, blocked: usize },
    /// Per-candidate priors: counts over prior ranks (ascending FP probability).
    Ranked {
        unblocked: Box<Fenwick>,
        blocked: Box<Fenwick>,
        total_unblocked: usize,
        total_blocked: usize,
    },
}

/// Live odds for one catalogue under one model.
#[derive(Clone, Debug)]
pub struct Live {
    model: Model,
    index: Arc<StarIndex>,
    /// Per-candidate prior FP probability, when the catalogue has `fpp`.
    prior: Option<Vec<f64>>,
    /// Priors ascending and each candidate's rank among them.
    ranked: Option<(Vec<f64>, Vec<u32>)>,
    flags: Vec<FlagSet>,
    decision: Vec<Decision>,
    /// Non-rejected candidates per star.
    k_of_star: Vec<u16>,
    /// hist[k] = stars with k non-rejected candidates.
    hist: Vec<usize>,
    buckets: Vec<Bucket>,
    table: Table,
    /// Posterior odds at the prior f, per k (index 0 unused): the odds of
    /// every candidate when the catalogue has no `fpp`.
    odds_at_f: Vec<f64>,
    counts: VerdictCounts,
    rejected: usize,
    /// Cautions about the inputs (bad fpp values, clamps in the table).
    pub input_warnings: Vec<String>,
}

impl Live {
    /// Builds the live state with every candidate open and no flags.
    pub fn new(cat: &Catalogue, model: Model) -> Result<Live, ModelError> {
        Live::with_state(
            cat,
            model,
            vec![FlagSet::EMPTY; cat.len()],
            vec![Decision::Open; cat.len()],
        )
    }

    /// Builds the live state from given flags and decisions, from scratch.
    pub fn with_state(
        cat: &Catalogue,
        model: Model,
        flags: Vec<FlagSet>,
        decision: Vec<Decision>,
    ) -> Result<Live, ModelError> {
        check_inputs(&model, cat.star_count())?;
        let mut input_warnings = Vec::new();
        let prior = cat.column(Field::Fpp).map(|col| {
            let mut bad = 0;
            let p: Vec<f64> = col
                .iter()
                .map(|&v| {
                    if v.is_nan() {
                        model.fp_fraction
                    } else if (0.0..=1.0).contains(&v) {
                        v
                    } else {
                        bad += 1;
                        model.fp_fraction
                    }
                })
                .collect();
            if bad > 0 {
                input_warnings.push(format!(
                    "{bad} fpp values outside [0, 1] were replaced by f = {}",
                    model.fp_fraction
                ));
            }
            p
        });
        let ranked = prior.as_ref().map(|p| {
            let mut order: Vec<u32> = (0..p.len() as u32).collect();
            order.sort_by(|&a, &b| p[a as usize].total_cmp(&p[b as usize]).then(a.cmp(&b)));
            let mut rank = vec![0u32; p.len()];
            for (r, &c) in order.iter().enumerate() {
                rank[c as usize] = r as u32;
            }
            (order.iter().map(|&c| p[c as usize]).collect(), rank)
        });
        let mut live = Live {
            model,
            index: cat.index(),
            prior,
            ranked,
            flags,
            decision,
            k_of_star: vec![0; cat.star_count()],
            hist: vec![0],
            buckets: Vec::new(),
            table: Table {
                targets: None,
                fp_fraction: 0.0,
                lambda: 0.0,
                rows: Vec::new(),
                warnings: Vec::new(),
            },
            odds_at_f: Vec::new(),
            counts: VerdictCounts::default(),
            rejected: 0,
            input_warnings,
        };
        let index = Arc::clone(&live.index);
        for s in 0..index.star_count() {
            let members = index.members(s as StarId);
            let k = members
                .iter()
                .filter(|&&c| !live.decision[c as usize].is_rejected())
                .count();
            live.k_of_star[s] = k as u16;
            live.bump_hist(k, 1);
            for &c in members {
                if live.decision[c as usize].is_rejected() {
                    live.rejected += 1;
                } else {
                    live.bucket_add(k, c, 1);
                }
            }
        }
        live.refresh();
        Ok(live)
    }

    pub fn model(&self) -> &Model {
        &self.model
    }

    pub fn table(&self) -> &Table {
        &self.table
    }

    pub fn counts(&self) -> VerdictCounts {
        self.counts
    }

    /// Stars with k non-rejected candidates, indexed by k.
    pub fn histogram(&self) -> &[usize] {
        &self.hist
    }

    pub fn decision(&self, c: CandidateId) -> Decision {
        self.decision[c as usize]
    }

    pub fn flags(&self, c: CandidateId) -> FlagSet {
        self.flags[c as usize]
    }

    fn members_of(&self, s: StarId) -> &[CandidateId] {
        self.index.members(s)
    }

    fn star_of(&self, c: CandidateId) -> StarId {
        self.index.star_of[c as usize]
    }

    /// The size of the system the candidate belongs to; 0 once rejected.
    pub fn k(&self, c: CandidateId) -> usize {
        if self.decision[c as usize].is_rejected() {
            0
        } else {
            self.k_of_star[self.star_of(c) as usize] as usize
        }
    }

    /// The odds every candidate of a k-candidate system has when the
    /// catalogue has no `fpp` (all priors are f); `None` when it has.
    pub fn uniform_odds(&self, k: usize) -> Option<f64> {
        if self.prior.is_some() || k == 0 {
            return None;
        }
        Some(
            self.odds_at_f
                .get(k)
                .copied()
                .unwrap_or_else(|| posterior_odds(self.table.boost(k), self.model.fp_fraction)),
        )
    }

    /// The number of a star's candidates not rejected.
    #[inline]
    pub fn star_k(&self, s: StarId) -> usize {
        self.k_of_star[s as usize] as usize
    }

    /// `star_k` of every star, by star index.
    pub fn star_ks(&self) -> &[u16] {
        &self.k_of_star
    }

    /// Prior FP probability: the candidate's `fpp`, else f.
    pub fn prior(&self, c: CandidateId) -> f64 {
        self.prior
            .as_ref()
            .map_or(self.model.fp_fraction, |p| p[c as usize])
    }

    /// The factor on prior odds for the candidate's system; `None` once rejected.
    pub fn boost(&self, c: CandidateId) -> Option<f64> {
        match self.k(c) {
            0 => None,
            k => Some(self.table.boost(k)),
        }
    }

    /// Posterior odds planet : FP; `None` once rejected.
    pub fn odds(&self, c: CandidateId) -> Option<f64> {
        let k = self.k(c);
        if k == 0 {
            return None;
        }
        match &self.prior {
            None => self.uniform_odds(k),
            Some(p) => Some(posterior_odds(self.table.boost(k), p[c as usize])),
        }
    }

    /// The largest odds among a star's non-rejected candidates; `None` when
    /// all are rejected. Every member shares the star's boost and the odds
    /// fall as the prior rises, so this is the odds at the smallest prior:
    /// one pass over the members, no table lookups per member.
    #[inline]
    pub fn best_odds(&self, s: StarId) -> Option<f64> {
        let k = self.k_of_star[s as usize] as usize;
        if k == 0 {
            return None;
        }
        match &self.prior {
            None => self.uniform_odds(k),
            Some(p) => {
                let least = self
                    .index
                    .members(s)
                    .iter()
                    .filter(|&&c| !self.decision[c as usize].is_rejected())
                    .map(|&c| p[c as usize])
                    .fold(f64::INFINITY, f64::min);
                Some(posterior_odds(self.table.boost(k), least))
            }
        }
    }

    pub fn probability(&self, c: CandidateId) -> Option<f64> {
        self.odds(c).map(probability)
    }

    pub fn verdict(&self, c: CandidateId) -> Verdict {
        match self.odds(c) {
            None => Verdict::Rejected,
            Some(o) => verdict(
                o,
                self.model.threshold,
                false,
                self.flags[c as usize],
                self.model.blocking,
            ),
        }
    }

    /// Records a decision and updates everything it changes. Only a change
    /// into or out of `rejected` moves odds: O(k) for the system, O(k_max²)
    /// for the table, O(k_max log n) for the counts.
    pub fn set_decision(&mut self, c: CandidateId, d: Decision) {
        let old = std::mem::replace(&mut self.decision[c as usize], d);
        if old.is_rejected() == d.is_rejected() {
            return;
        }
        let s = self.star_of(c);
        let k = self.k_of_star[s as usize] as usize;
        let siblings: Vec<CandidateId> = self
            .members_of(s)
            .iter()
            .copied()
            .filter(|&m| m != c && !self.decision[m as usize].is_rejected())
            .collect();
        if d.is_rejected() {
            // c leaves a k-system; its siblings now form a (k−1)-system.
            self.bucket_add(k, c, -1);
            for &m in &siblings {
                self.bucket_add(k, m, -1);
                self.bucket_add(k - 1, m, 1);
            }
            self.bump_hist(k, -1);
            self.bump_hist(k - 1, 1);
            self.k_of_star[s as usize] -= 1;
            self.rejected += 1;
        } else {
            for &m in &siblings {
                self.bucket_add(k, m, -1);
                self.bucket_add(k + 1, m, 1);
            }
            self.bucket_add(k + 1, c, 1);
            self.bump_hist(k, -1);
            self.bump_hist(k + 1, 1);
            self.k_of_star[s as usize] += 1;
            self.rejected -= 1;
        }
        self.refresh();
    }

    /// Sets a candidate's flags (from the checks); a change of blocking
    /// status moves it between halves of its bucket.
    pub fn set_flags(&mut self, c: CandidateId, flags: FlagSet) {
        let k = self.k(c);
        if k > 0 {
            self.bucket_add(k, c, -1);
        }
        self.flags[c as usize] = flags;
        if k > 0 {
            self.bucket_add(k, c, 1);
        }
        self.refresh();
    }

    /// The odds each non-rejected sibling would have if `c` were rejected:
    /// (sibling, its new k, its new odds). Empty if `c` is already rejected.
    pub fn what_if_rejected(&self, c: CandidateId) -> Vec<(CandidateId, usize, f64)> {
        let k = self.k(c);
        if k == 0 {
            return Vec::new();
        }
        let mut hist = self.hist.clone();
        hist[k] -= 1;
        hist[k - 1] += 1;
        let t = table(&self.model, trimmed(&hist));
        let s = self.star_of(c);
        self.members_of(s)
            .iter()
            .copied()
            .filter(|&m| m != c && !self.decision[m as usize].is_rejected())
            .map(|m| (m, k - 1, posterior_odds(t.boost(k - 1), self.prior(m))))
            .collect()
    }

    /// The same state computed from nothing, for checks of the incremental path.
    pub fn rebuilt(&self, cat: &Catalogue) -> Result<Live, ModelError> {
        Live::with_state(
            cat,
            self.model.clone(),
            self.flags.clone(),
            self.decision.clone(),
        )
    }

    /// True when two states agree on everything the odds depend on.
    pub fn same_odds_state(&self, other: &Live) -> bool {
        self.k_of_star == other.k_of_star
            && trimmed(&self.hist) == trimmed(&other.hist)
            && self.table == other.table
            && self.counts == other.counts
            && self.rejected == other.rejected
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

    fn blocked(&self, c: CandidateId) -> bool {
        self.flags[c as usize].intersects(self.model.blocking)
    }

    fn bucket_add(&mut self, k: usize, c: CandidateId, delta: i32) {
        if k == 0 {
            return;
        }
        while self.buckets.len() <= k {
            let b = match &self.ranked {
                None => Bucket::Uniform {
                    unblocked: 0,
                    blocked: 0,
                },
                Some((sorted, _)) => Bucket::Ranked {
                    unblocked: Box::new(Fenwick::new(sorted.len())),
                    blocked: Box::new(Fenwick::new(sorted.len())),
                    total_unblocked: 0,
                    total_blocked: 0,
                },
            };
            self.buckets.push(b);
        }
        let blocked = self.blocked(c);
        let rank = self
            .ranked
            .as_ref()
            .map_or(0, |(_, r)| r[c as usize] as usize);
        match &mut self.buckets[k] {
            Bucket::Uniform {
                unblocked,
                blocked: b,
            } => {
                let n = if blocked { b } else { unblocked };
                *n = n.wrapping_add_signed(delta as isize);
            }
            Bucket::Ranked {
                unblocked,
                blocked: b,
                total_unblocked,
                total_blocked,
            } => {
                let (tree, total) = if blocked {
                    (b, total_blocked)
                } else {
                    (unblocked, total_unblocked)
                };
                tree.add(rank, delta);
                *total = total.wrapping_add_signed(delta as isize);
            }
        }
    }

    /// Rebuilds the table from the histogram and the counts from the buckets.
    fn refresh(&mut self) {
        self.table = table(&self.model, trimmed(&self.hist));
        let (t, f) = (self.model.threshold, self.model.fp_fraction);
        self.odds_at_f.clear();
        self.odds_at_f.push(f64::NAN);
        for r in &self.table.rows {
            self.odds_at_f.push(posterior_odds(r.boost, f));
        }
        let mut counts = VerdictCounts {
            rejected: self.rejected,
            ..VerdictCounts::default()
        };
        for (k, bucket) in self.buckets.iter().enumerate().skip(1) {
            let b = self.table.boost(k);
            match bucket {
                Bucket::Uniform { unblocked, blocked } => {
                    let o = posterior_odds(b, f);
                    if o >= t {
                        counts.validated += unblocked;
                        counts.likely += blocked;
                    } else if o >= 1.0 {
                        counts.likely += unblocked + blocked;
                    } else {
                        counts.unlikely += unblocked + blocked;
                    }
                }
                Bucket::Ranked {
                    unblocked,
                    blocked,
                    total_unblocked,
                    total_blocked,
                } => {
                    let sorted = self.ranked.as_ref().map_or(&[][..], |(s, _)| s.as_slice());
                    // Ranks ascend in FP probability, so odds descend: the
                    // candidates at or above a threshold are a prefix.
                    let upto = |x: f64| sorted.partition_point(|&p| posterior_odds(b, p) >= x);
                    let (at_t, at_1) = (upto(t), upto(1.0));
                    let v = unblocked.prefix(at_t) as usize;
                    let l_unblocked = unblocked.prefix(at_1) as usize - v;
                    let l_blocked = blocked.prefix(at_1) as usize;
                    counts.validated += v;
                    counts.likely += l_unblocked + l_blocked;
                    counts.unlikely +=
                        total_unblocked + total_blocked - v - l_unblocked - l_blocked;
                }
            }
        }
        self.counts = counts;
    }
}

/// The histogram without trailing zero rows.
fn trimmed(hist: &[usize]) -> &[usize] {
    let end = hist.iter().rposition(|&n| n > 0).map_or(1, |i| i + 1);
    &hist[..end.max(1)]
}

//! The odds of a whole catalogue kept current as decisions change. Only
//! *counted* candidates make a star's system (docs/science.md §1.1): not
//! rejected, no blocking flag, and the representative of their signal
//! group. A rejection or a new flag takes a candidate out of its system, its
//! siblings move to the next smaller multiplicity, the histogram changes,
//! the model table is rebuilt (O(k_max²), k_max ≈ 7) and the verdict counts
//! are read from per-multiplicity buckets, never from a pass over the
//! catalogue. Every verdict of every command and of the browser comes from
//! here.

use std::collections::HashMap;
use std::sync::{Arc, OnceLock};

use super::{
    Model, ModelError, Table, Verdict, check_inputs, posterior_odds, probability, table_with,
    verdict,
};
use crate::catalogue::{CandidateId, Catalogue, Field, StarId, StarIndex};
use crate::checks::{SignalGroups, StarLink, UnseenFp};
use crate::decision::{Decision, Reason};
use crate::flags::{Flag, FlagSet};

use super::fenwick::Fenwick;

mod disputes;
mod held;
mod links;
mod margins;
mod per_candidate;
mod place;
pub use disputes::Dispute;
pub use held::{Hold, names_false_positive};
use margins::Margins;
use per_candidate::PerCandidate;

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

/// Where a candidate stands in the model.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Status {
    /// Counted: one of its star's system, with the system's boost.
    Counted,
    /// Not rejected but held back: a blocking flag, or a copy of a signal
    /// its group's representative stands for. No boost; never validated.
    Held,
    Rejected,
}

/// Live odds for one catalogue under one model.
#[derive(Clone, Debug)]
pub struct Live {
    model: Model,
    index: Arc<StarIndex>,
    /// Whether the candidate's prior came from `fpp`.
    has_fpp: PerCandidate<bool>,
    /// Per-candidate f (by its planet radius when f depends on size).
    f_of: PerCandidate<f64>,
    /// Distinct priors ascending (a prior is the candidate's `fpp`, else
    /// its f), and each candidate's class among them.
    classes: Vec<f64>,
    class_of: PerCandidate<u32>,
    flags: Vec<FlagSet>,
    groups: SignalGroups,
    decision: Vec<Decision>,
    status: Vec<Status>,
    /// Counted candidates per star.
    k_of_star: Vec<u16>,
    /// hist[k] = stars with k counted candidates.
    hist: Vec<usize>,
    /// Σ f over the counted candidates of single-candidate stars, kept as
    /// counts per distinct f (exact under any order of updates).
    singles_by_f: Vec<(f64, i64)>,
    /// Counted candidates of k-systems, by prior class.
    buckets: Vec<Fenwick>,
    /// Held candidates, by prior class, but for those that are no planet
    /// (`no_planet`): those are `unlikely` whatever their prior, and only
    /// counted (`not_planets`).
    held: Fenwick,
    not_planets: usize,
    /// Per candidate, set where it was placed: held, and no planet of its
    /// star by its own blocking flags, or a copy of a signal that is none
    /// ([`Live::no_planet_now`]).
    no_planet: Vec<bool>,
    table: Table,
    counts: VerdictCounts,
    rejected: usize,
    margins: OnceLock<Margins>,
    /// Each signal group's standing under the decisions, kept per group so
    /// that a group of thousands costs one pass, not one per member.
    standings: Vec<GroupStanding>,
    /// Stars known to host a false positive that no loaded row shows, by
    /// star (docs/science.md §1.1, §3.5): a skipped row's, or a ledger
    /// rejection's of a candidate the catalogue no longer lists; their
    /// candidates are held back as any known false positive's siblings.
    unseen_fp: Arc<[UnseenFp]>,
    /// Other star ids of the same star (docs/science.md §3.4), both ways
    /// round, by `star`: a vetter's rejection of a candidate as a false
    /// positive holds the candidates of every id of its star.
    links: Vec<StarLink>,
    /// The stars whose other ids were looked for (`links` has theirs).
    links_asked: Vec<StarId>,
    /// Candidates whose vetters disagree whether they are a false
    /// positive, by star ([`Dispute`]): their stars are held back.
    disputes: Vec<Dispute>,
    /// The rows are threshold-crossing events ([`Catalogue::events`]): a
    /// candidate counts only once a vetter keeps it ([`Live::unvetted`]).
    events: bool,
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
            SignalGroups::none(),
            vec![Decision::Open; cat.len()],
        )
    }

    /// Builds the live state from the checks' flags and signal groups and
    /// the ledger's decisions, from scratch.
    pub fn with_state(
        cat: &Catalogue,
        model: Model,
        flags: Vec<FlagSet>,
        groups: SignalGroups,
        decision: Vec<Decision>,
    ) -> Result<Live, ModelError> {
        Live::with_evidence(cat, model, flags, groups, decision, Vec::new())
    }

    /// [`Live::with_state`], with the stars known to host a false positive
    /// that no loaded row shows (`Checks::unseen_fp`, and the ledger's
    /// `session::gone_false_positives`): all the evidence, as every command
    /// and the browser build it (`session::odds_with`).
    pub fn with_evidence(
        cat: &Catalogue,
        model: Model,
        flags: Vec<FlagSet>,
        groups: SignalGroups,
        decision: Vec<Decision>,
        mut unseen_fp: Vec<UnseenFp>,
    ) -> Result<Live, ModelError> {
        unseen_fp.sort_by_key(|u| u.star);
        unseen_fp.dedup_by_key(|u| u.star);
        check_inputs(&model, cat.star_count())?;
        let n = cat.len();
        let mut input_warnings = Vec::new();
        let f_of = if model.fp_by_radius.is_empty() {
            PerCandidate::All(model.fp_fraction)
        } else {
            PerCandidate::Each(
                crate::checks::planet_radii(cat)
                    .into_iter()
                    .map(|r| model.fp_for_radius(r))
                    .collect(),
            )
        };
        // Each candidate's prior, where the priors are not one value: with
        // an fpp column, or an f by size.
        let mut has_fpp = PerCandidate::All(false);
        let mut prior: Option<Vec<f64>> = match &f_of {
            PerCandidate::All(_) => None,
            PerCandidate::Each(f) => Some(f.clone()),
        };
        if let Some(col) = cat.column(Field::Fpp) {
            let mut has = vec![false; n];
            let prior = prior.get_or_insert_with(|| (0..n).map(|c| f_of.get(c)).collect());
            let (mut bad, mut zero) = (0, 0);
            for (c, v) in col.iter().enumerate() {
                if v.is_nan() {
                    continue;
                }
                // No validation gives a false-positive probability of
                // exactly 0: a zero is a gap filled with 0 or a number
                // rounded away, and would validate any single candidate
                // (docs/science.md §3.5). It is read as no fpp.
                if v == 0.0 {
                    zero += 1;
                } else if (0.0..=1.0).contains(&v) {
                    prior[c] = v;
                    has[c] = true;
                } else {
                    bad += 1;
                }
            }
            if bad > 0 {
                input_warnings.push(format!(
                    "{bad} fpp values outside [0, 1] were replaced by the candidate's f"
                ));
            }
            if zero > 0 {
                input_warnings.push(format!(
                    "{zero} fpp value{} of exactly 0 {} read as no fpp (the candidate's f): no validation gives a probability of 0, so a 0 is a gap filled with 0 or a value rounded away (docs/science.md §3.5)",
                    if zero == 1 { "" } else { "s" },
                    if zero == 1 { "was" } else { "were" },
                ));
            }
            has_fpp = PerCandidate::Each(has);
        }
        let (classes, class_of) = match &prior {
            None => (vec![f_of.get(0)], PerCandidate::All(0)),
            Some(prior) => {
                let classes = distinct_sorted(prior);
                let class_of = prior
                    .iter()
                    .map(|p| classes.partition_point(|c| c < p) as u32)
                    .collect();
                (classes, PerCandidate::Each(class_of))
            }
        };
        let singles_by_f: Vec<(f64, i64)> = match &f_of {
            PerCandidate::All(f) => vec![(*f, 0)],
            PerCandidate::Each(f) => distinct_sorted(f).into_iter().map(|f| (f, 0)).collect(),
        };
        let nclasses = classes.len();
        let ngroups = groups.len();
        let mut live = Live {
            model,
            index: cat.index(),
            has_fpp,
            f_of,
            classes,
            class_of,
            flags,
            groups,
            decision,
            status: vec![Status::Rejected; n],
            k_of_star: vec![0; cat.star_count()],
            hist: vec![0],
            singles_by_f,
            buckets: Vec::new(),
            held: Fenwick::new(nclasses),
            not_planets: 0,
            no_planet: vec![false; n],
            table: Table {
                targets: None,
                fp_fraction: 0.0,
                lambda: 0.0,
                rows: Vec::new(),
                warnings: Vec::new(),
            },
            counts: VerdictCounts::default(),
            rejected: 0,
            margins: OnceLock::new(),
            standings: vec![GroupStanding::default(); ngroups],
            unseen_fp: unseen_fp.into(),
            links: Vec::new(),
            links_asked: Vec::new(),
            disputes: Vec::new(),
            events: cat.events,
            input_warnings,
        };
        live.place_all();
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

    /// Stars with k counted candidates, indexed by k.
    pub fn histogram(&self) -> &[usize] {
        &self.hist
    }

    pub fn decision(&self, c: CandidateId) -> Decision {
        self.decision[c as usize]
    }

    pub fn flags(&self, c: CandidateId) -> FlagSet {
        self.flags[c as usize]
    }

    pub fn groups(&self) -> &SignalGroups {
        &self.groups
    }

    /// Where the candidate stands: counted, held back, or rejected.
    pub fn status(&self, c: CandidateId) -> Status {
        self.status[c as usize]
    }

    /// Whether the candidate is counted in its star's system.
    pub fn counted(&self, c: CandidateId) -> bool {
        self.status[c as usize] == Status::Counted
    }

    /// Candidates held back (not rejected, not counted).
    pub fn held_count(&self) -> usize {
        self.held.total + self.not_planets
    }

    /// Asks the memory for what a row of candidate `c` reads of its star
    /// (its system's size, and its id: see `Catalogue::prefetch_star_id`),
    /// ahead of reading it.
    #[inline]
    pub fn prefetch_star(&self, cat: &Catalogue, c: CandidateId, bytes: bool) {
        if !bytes && let Some(&s) = self.index.star_of.get(c as usize) {
            crate::prefetch::value(&self.k_of_star, s as usize);
        }
        cat.prefetch_star_id(c, bytes);
    }

    fn star_of(&self, c: CandidateId) -> StarId {
        self.index.star_of[c as usize]
    }

    /// The size of the system the candidate is counted in (its star's
    /// counted candidates); 0 when it is not counted (held back or
    /// rejected).
    pub fn k(&self, c: CandidateId) -> usize {
        match self.status[c as usize] {
            Status::Counted => self.k_of_star[self.star_of(c) as usize] as usize,
            _ => 0,
        }
    }

    /// The odds every counted candidate of a k-system has when every prior
    /// is the same f (no `fpp`, one f for all sizes); `None` otherwise.
    pub fn uniform_odds(&self, k: usize) -> Option<f64> {
        if self.classes.len() != 1 || k == 0 {
            return None;
        }
        Some(posterior_odds(self.table.boost(k), self.classes[0]))
    }

    /// The number of a star's counted candidates.
    #[inline]
    pub fn star_k(&self, s: StarId) -> usize {
        self.k_of_star[s as usize] as usize
    }

    /// `star_k` of every star, by star index.
    pub fn star_ks(&self) -> &[u16] {
        &self.k_of_star
    }

    /// Prior FP probability: the candidate's `fpp`, else its f.
    pub fn prior(&self, c: CandidateId) -> f64 {
        self.classes[self.class_of.get(c as usize) as usize]
    }

    /// The factor on prior odds the candidate gets: its system's boost when
    /// counted, 1 when held back; `None` once rejected.
    pub fn boost(&self, c: CandidateId) -> Option<f64> {
        match self.status[c as usize] {
            Status::Counted => Some(self.table.boost(self.k(c))),
            Status::Held => Some(1.0),
            Status::Rejected => None,
        }
    }

    /// Posterior odds planet : FP; `None` once rejected. A held candidate
    /// that is no planet ([`Live::not_a_planet`]) has at most 1:1 (the odds
    /// at which an `fpp` makes a candidate `known-fp`, docs/science.md
    /// §1.1): its prior is the model's, not evidence for it.
    pub fn odds(&self, c: CandidateId) -> Option<f64> {
        let odds = posterior_odds(self.boost(c)?, self.prior(c));
        Some(if self.not_a_planet(c) {
            odds.min(1.0)
        } else {
            odds
        })
    }

    /// Whether a held candidate is no planet of its star: its own blocking
    /// flags say so (`FlagSet::not_a_planet`: a false-positive sign,
    /// `known-artefact`, `echo`), or it is a copy of a signal that is none,
    /// or an event no vetter has kept, which is most likely none (docs/science.md §1.1).
    pub fn not_a_planet(&self, c: CandidateId) -> bool {
        self.no_planet[c as usize]
    }

    /// The blocking flags that say a candidate is no planet of its star.
    fn no_planet_flags(&self) -> FlagSet {
        self.model.blocking.intersection(FlagSet::not_a_planet())
    }

    /// [`Live::not_a_planet`] of candidate `c` held back, as it stands now:
    /// its own flags; or, a copy in an active signal group, the signal's
    /// word: its representative's own flags, the catalogue's word on any
    /// member (`known-fp`, `known-artefact`: on the signal, whichever entry
    /// carries it), or a member rejected as a false positive. A copy's
    /// other flags are not the signal's (an alias folded at twice the
    /// period shows the transit at phase 0.5), as for its siblings (§1.1).
    pub(super) fn no_planet_now(&self, c: CandidateId) -> bool {
        let signs = self.no_planet_flags();
        if self.flags[c as usize].intersects(signs) || self.unvetted(self.decision[c as usize]) {
            return true;
        }
        let Some(g) = self.active_group(c) else {
            return false;
        };
        let standing = self.standings[g as usize];
        if standing
            .rejected_by
            .is_some_and(|(_, r)| names_false_positive(r))
        {
            return true;
        }
        standing
            .rep
            .is_some_and(|r| r != c && self.flags[r as usize].intersects(signs))
            || standing.words.intersects(signs)
    }

    /// The largest odds among a star's candidates not rejected; `None` when
    /// all are rejected.
    #[inline]
    pub fn best_odds(&self, s: StarId) -> Option<f64> {
        self.index
            .members(s)
            .iter()
            .filter_map(|&c| self.odds(c))
            .reduce(f64::max)
    }

    pub fn probability(&self, c: CandidateId) -> Option<f64> {
        self.odds(c).map(probability)
    }

    pub fn verdict(&self, c: CandidateId) -> Verdict {
        match self.odds(c) {
            None => Verdict::Rejected,
            Some(_) if self.not_a_planet(c) => Verdict::Unlikely,
            Some(o) => verdict(
                o,
                self.model.threshold,
                false,
                self.status[c as usize] == Status::Counted,
            ),
        }
    }

    /// Records a decision and updates everything it changes: the statuses
    /// of its star and, when it is in an active signal group, of every star
    /// with a member of the group, whose standing (its representative, or a
    /// rejection that holds it back) the decision may move
    /// (O(members × group size) each); the table (O(k_max²)); the counts
    /// (O(k_max log n)).
    pub fn set_decision(&mut self, c: CandidateId, d: Decision) {
        let old = std::mem::replace(&mut self.decision[c as usize], d);
        if old == d {
            return;
        }
        let stars = self.stars_moved_by(c);
        self.replace_stars(&stars);
    }

    /// The stars a decision on `c` can move, ascending: its own, those of
    /// the members of its active signal group, and its star's other ids (a
    /// rejection as a false positive holds them too, docs/science.md §3.4;
    /// as far as `add_links` has asked for them).
    pub fn stars_moved_by(&self, c: CandidateId) -> Vec<StarId> {
        let mut stars = self.signal_stars(c);
        stars.extend(self.links_of(self.star_of(c)).iter().map(|l| l.other));
        stars.sort_unstable();
        stars.dedup();
        stars
    }

    /// The stars of `c`'s signal: its own, and those of the members of its
    /// active signal group (in no order, maybe repeated).
    fn signal_stars(&self, c: CandidateId) -> Vec<StarId> {
        let mut stars = vec![self.star_of(c)];
        if let Some(g) = self.active_group(c) {
            stars.extend(self.groups.members(g).iter().map(|&m| self.star_of(m)));
        }
        stars
    }

    /// Sets a candidate's flags (from the checks).
    pub fn set_flags(&mut self, c: CandidateId, flags: FlagSet) {
        if self.flags[c as usize] == flags {
            return;
        }
        // Flags move only the candidate's own status, and whether the copies
        // of its signal are planets (its group's standing holds the
        // catalogue's word on any member, worked out again as its stars
        // are placed).
        let mut stars = self.signal_stars(c);
        stars.sort_unstable();
        stars.dedup();
        self.flags[c as usize] = flags;
        self.replace_stars(&stars);
    }

    /// The odds each counted sibling would have if `c` were rejected for
    /// `reason`: (sibling, its new k, its new odds). Empty if `c` is already
    /// rejected, or if the rejection would leave no sibling counted (one as
    /// a false positive holds them back, §1.1).
    pub fn what_if_rejected(
        &self,
        c: CandidateId,
        reason: Reason,
    ) -> Vec<(CandidateId, usize, f64)> {
        if self.status[c as usize] == Status::Rejected {
            return Vec::new();
        }
        let s = self.star_of(c);
        let after = self.statuses(s, |m| {
            if m == c {
                Decision::Rejected(reason)
            } else {
                self.decision[m as usize]
            }
        });
        let k_old = self.k_of_star[s as usize] as usize;
        let k_new = after.iter().filter(|x| x.1 == Status::Counted).count();
        let mut hist = self.hist.clone();
        if hist.len() <= k_new {
            hist.resize(k_new + 1, 0);
        }
        if k_old > 0 {
            hist[k_old] -= 1;
        }
        if k_new > 0 {
            hist[k_new] += 1;
        }
        let mut fp_singles = self.fp_singles();
        if k_old == 1 {
            fp_singles -= self.star_single_f(s);
        }
        if k_new == 1 {
            let f = after
                .iter()
                .find(|x| x.1 == Status::Counted)
                .map_or(0.0, |x| self.f_of.get(x.0 as usize));
            fp_singles += f;
        }
        let t = table_with(&self.model, trimmed(&hist), fp_singles.max(0.0));
        after
            .iter()
            .filter(|&&(m, st)| m != c && st == Status::Counted)
            .map(|&(m, _)| (m, k_new, posterior_odds(t.boost(k_new), self.prior(m))))
            .collect()
    }

    /// The same state computed from nothing, for checks of the incremental path.
    pub fn rebuilt(&self, cat: &Catalogue) -> Result<Live, ModelError> {
        let mut live = Live::with_evidence(
            cat,
            self.model.clone(),
            self.flags.clone(),
            self.groups.clone(),
            self.decision.clone(),
            self.unseen_fp.to_vec(),
        )?;
        live.add_links(&self.links_asked, self.links.clone());
        live.set_disputes(self.disputes.clone());
        Ok(live)
    }

    /// True when two states agree on everything the odds depend on.
    pub fn same_odds_state(&self, other: &Live) -> bool {
        self.k_of_star == other.k_of_star
            && self.status == other.status
            && trimmed(&self.hist) == trimmed(&other.hist)
            && self.table == other.table
            && self.counts == other.counts
            && self.rejected == other.rejected
            && self.not_planets == other.not_planets
    }

    /// Blocking flags that hold a candidate back on their own (the group
    /// flags act through the group instead).
    fn own_blocking(&self) -> FlagSet {
        self.model.blocking.difference(FlagSet::group_flags())
    }

    /// Whether a candidate under `decision` is an event no vetter has kept
    /// yet, in a table of threshold-crossing events: a noisy star's false
    /// alarms come several to a star, so an event is held back until a
    /// vetter keeps it; and most events are no planet (of the 34,032 events
    /// of Kepler's last search about 4,000 became planet candidates,
    /// Thompson et al. 2018, ApJS 235, 38, from memory), so one not kept is
    /// `unlikely` at most 1:1 (docs/science.md §1.1).
    fn unvetted(&self, decision: Decision) -> bool {
        self.events && decision != Decision::Kept
    }

    /// The candidate's group, when its links are among the blocking flags.
    fn active_group(&self, c: CandidateId) -> Option<u32> {
        let g = self.groups.group_of(c)?;
        self.groups
            .kinds(g)
            .intersects(self.model.blocking)
            .then_some(g)
    }

    /// Each member of star s with its status under `decision`.
    fn statuses(
        &self,
        s: StarId,
        decision: impl Fn(CandidateId) -> Decision,
    ) -> Vec<(CandidateId, Status)> {
        let memo: std::cell::RefCell<HashMap<u32, GroupStanding>> = Default::default();
        let standing = |g: u32| {
            *memo
                .borrow_mut()
                .entry(g)
                .or_insert_with(|| self.group_standing(g, &decision))
        };
        self.statuses_under(s, &decision, standing)
    }

    /// [`Live::statuses`], each active group's standing under `decision`
    /// from `standing` (worked out once for many stars: a group's members
    /// may be on thousands).
    fn statuses_under(
        &self,
        s: StarId,
        decision: impl Fn(CandidateId) -> Decision,
        standing: impl Fn(u32) -> GroupStanding,
    ) -> Vec<(CandidateId, Status)> {
        let own_blocking = self.own_blocking();
        let members = self.index.members(s);
        let fp = self.known_fp_among(members, &decision, &standing);
        // A false positive no loaded row shows holds every member, as one
        // a vetter rejected under another id of the star does, and as one
        // rejected by a vetter while another decided otherwise (a dispute).
        let unseen = self.unseen_fp(s).is_some()
            || self.dispute_here_or_linked(s).is_some()
            || self.linked_fp(s, &decision).is_some();
        members
            .iter()
            .map(|&c| {
                let st = if decision(c).is_rejected() {
                    Status::Rejected
                } else if self.flags[c as usize].intersects(own_blocking)
                    || self.unvetted(decision(c))
                {
                    Status::Held
                } else if fp.is_some_and(|m| m != c) || unseen {
                    // A sibling of a known false positive (§1.1).
                    Status::Held
                } else if let Some(g) = self.active_group(c) {
                    let standing = standing(g);
                    if standing.rejected_by.is_none() && standing.rep == Some(c) {
                        Status::Counted
                    } else {
                        Status::Held
                    }
                } else {
                    Status::Counted
                };
                (c, st)
            })
            .collect()
    }

    /// Where signal group g stands under `decision`: a member rejected for
    /// what the signal is (not as a copy) holds the whole group back;
    /// otherwise the first member not rejected (best first) stands for it.
    fn group_standing(&self, g: u32, decision: impl Fn(CandidateId) -> Decision) -> GroupStanding {
        let members = self.groups.members(g);
        let word: FlagSet = [Flag::KnownFp, Flag::KnownArtefact].into_iter().collect();
        GroupStanding {
            words: (members.iter())
                .map(|&m| self.flags[m as usize].intersection(word))
                .fold(FlagSet::default(), |all, f| all.union(f)),
            rejected_by: members.iter().find_map(|&m| {
                let r = decision(m).reason()?;
                (!is_copy(r)).then_some((m, r))
            }),
            // Among events, the first a vetter kept, if any: an event
            // not kept counts for nothing, and would hold the group back.
            rep: members
                .iter()
                .copied()
                .find(|&m| !decision(m).is_rejected() && !self.unvetted(decision(m)))
                .or_else(|| {
                    members
                        .iter()
                        .copied()
                        .find(|&m| !decision(m).is_rejected())
                }),
        }
    }

    /// The f of the one counted member of a star whose system is a single.
    fn star_single_f(&self, s: StarId) -> f64 {
        self.index
            .members(s)
            .iter()
            .find(|&&m| self.status[m as usize] == Status::Counted)
            .map_or(0.0, |&m| self.f_of.get(m as usize))
    }

    /// Σ f over the counted singles.
    fn fp_singles(&self) -> f64 {
        self.singles_by_f.iter().map(|&(f, n)| f * n as f64).sum()
    }

    /// Rebuilds the table from the histogram and the counts from the buckets.
    fn refresh(&mut self) {
        self.table = table_with(&self.model, trimmed(&self.hist), self.fp_singles());
        let t = self.model.threshold;
        let mut counts = VerdictCounts {
            rejected: self.rejected,
            ..VerdictCounts::default()
        };
        // Classes ascend in FP probability, so odds descend: the candidates
        // at or above a threshold are a prefix.
        let upto = |b: f64, x: f64| self.classes.partition_point(|&p| posterior_odds(b, p) >= x);
        for (k, bucket) in self.buckets.iter().enumerate().skip(1) {
            let b = self.table.boost(k);
            let v = bucket.prefix(upto(b, t));
            let l = bucket.prefix(upto(b, 1.0)) - v;
            counts.validated += v;
            counts.likely += l;
            counts.unlikely += bucket.total - v - l;
        }
        let l = self.held.prefix(upto(1.0, 1.0));
        counts.likely += l;
        counts.unlikely += self.held.total - l + self.not_planets;
        self.counts = counts;
    }
}

/// See [`Live::group_standing`].
#[derive(Clone, Copy, Debug, Default)]
struct GroupStanding {
    rejected_by: Option<(CandidateId, Reason)>,
    rep: Option<CandidateId>,
    /// The catalogue's word on any member (`known-fp`, `known-artefact`):
    /// on the signal, whichever entry carries it.
    words: FlagSet,
}

/// A rejection that says "this entry is a copy" (the signal lives on in
/// another member of its group), not what the signal is.
fn is_copy(r: Reason) -> bool {
    matches!(r, Reason::Duplicate | Reason::Alias)
}

/// The histogram without trailing zero rows.
fn trimmed(hist: &[usize]) -> &[usize] {
    let end = hist.iter().rposition(|&n| n > 0).map_or(1, |i| i + 1);
    &hist[..end.max(1)]
}

/// The values in total order, equal ones once: what sorting them all and
/// dropping repeats gives, found from their distinct bit patterns instead
/// (a catalogue has a handful of distinct f among millions of candidates,
/// so nothing of the catalogue's size is sorted). With a NaN among them,
/// which equals nothing, by sorting them all.
pub(super) fn distinct_sorted(values: &[f64]) -> Vec<f64> {
    let mut out: Vec<f64> = if values.iter().any(|v| v.is_nan()) {
        values.to_vec()
    } else {
        let mut seen = hashbrown::HashSet::new();
        let mut last = None;
        for v in values {
            let bits = v.to_bits();
            if last != Some(bits) {
                seen.insert(bits);
                last = Some(bits);
            }
        }
        seen.into_iter().map(f64::from_bits).collect()
    };
    out.sort_by(f64::total_cmp);
    out.dedup();
    out
}

//! What the team decided while this browser is open: the ledger read again
//! on a background thread when another vetter has recorded a decision
//! (`background::Running`), and taken in here, so that the browser's
//! verdicts stay those every command reads from the ledger now.

use super::*;

impl App {
    /// Takes a read of the ledger (of this view's vetter, as at the start)
    /// made after another vetter recorded decisions: each candidate whose
    /// decision in force changed is set as a decision made here would be,
    /// and where vetters disagree (and whether on a false positive) is
    /// taken again. A candidate this browser decided on after that read
    /// keeps what it has: its own decision is the newer. A read no newer
    /// than what the odds hold already changes nothing.
    pub(super) fn take_team(&mut self, decided: crate::ledger::Decided) {
        if decided.newest <= self.ledger_seen {
            return;
        }
        let newest = decided.newest;
        let own = std::mem::take(&mut self.own_writes);
        let newer_here = |c: CandidateId| own.get(&c).is_some_and(|&id| id > newest);
        let changed: Vec<(CandidateId, Decision)> = (0..self.cat.len() as CandidateId)
            .filter(|&c| !newer_here(c))
            .map(|c| (c, decided.decisions[c as usize]))
            .filter(|&(c, d)| d != self.live.decision(c))
            .collect();
        decide::set_decisions(&mut self.live, &self.cat, &changed);
        let now = decisions_of(&self.cat, &self.live);
        let mut disputes = crate::session::disputes_in(&self.cat, &now, &decided);
        disputes.retain(|x| !newer_here(x.candidate));
        disputes.extend(
            (self.live.disputes().iter())
                .filter(|x| newer_here(x.candidate))
                .cloned(),
        );
        let stars: Vec<_> = disputes.iter().map(|x| x.star).collect();
        crate::session::link_stars(&mut self.live, &self.cat, stars);
        self.live.set_disputes(disputes);
        let mut disagree = crate::selection::disagreeing(&self.cat, &decided.disagreements);
        for (&c, _) in own.iter().filter(|(c, _)| newer_here(**c)) {
            if self.disagree.contains(&c) {
                disagree.insert(c);
            } else {
                disagree.remove(&c);
            }
        }
        self.disagree = disagree;
        // Only the writes newer than this read still need guarding.
        self.own_writes = own.into_iter().filter(|&(_, id)| id > newest).collect();
        self.ledger_seen = newest;
        if !changed.is_empty() {
            let first = crate::sanitize::clean(self.cat.candidate_id(changed[0].0)).into_owned();
            self.message = Some(format!(
                "{} decision{} by other vetters since the last look at the ledger ({first} {}{})",
                changed.len(),
                if changed.len() == 1 { "" } else { "s" },
                changed[0].1,
                if changed.len() > 1 { ", …" } else { "" }
            ));
        }
        self.forget_orders(false);
        self.refresh_view();
        self.refresh_history(true);
    }
}

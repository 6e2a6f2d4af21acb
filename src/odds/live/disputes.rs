//! Where vetters disagree whether a candidate is a false positive: one
//! vetter's latest decision rejects it as one (an eclipsing binary, a
//! blend, a stellar-size companion) and the decision in force does not
//! (another vetter kept it since, or parked it, or this view is another
//! vetter's). Until the vetters agree, the rejection stands as evidence:
//! the candidate and its siblings are held back, as on a star known to
//! host a false positive, but not rejected (docs/science.md §1.1). The
//! disputes come from the ledger (`session::disputes_of`); the browser
//! sets them again for the candidates it decides on.

use super::*;
use crate::checks::StarLink;

/// A candidate whose vetters disagree whether it is a false positive.
#[derive(Clone, Debug, PartialEq)]
pub struct Dispute {
    pub candidate: CandidateId,
    pub star: StarId,
    /// Who rejected it as what, and who decided otherwise, for people.
    pub why: String,
}

impl Live {
    /// The first dispute on a candidate of star s, if any.
    pub fn dispute(&self, s: StarId) -> Option<&Dispute> {
        let i = self.disputes.partition_point(|d| d.star < s);
        self.disputes.get(i).filter(|d| d.star == s)
    }

    /// The first dispute on a candidate of star s or of one of its other
    /// ids (as far as [`Live::add_links`] has them; docs/science.md §3.4),
    /// with the link it came by.
    pub(super) fn dispute_here_or_linked(
        &self,
        s: StarId,
    ) -> Option<(&Dispute, Option<&StarLink>)> {
        if self.disputes.is_empty() {
            return None;
        }
        self.dispute(s).map(|d| (d, None)).or_else(|| {
            self.links_of(s)
                .iter()
                .find_map(|l| Some((self.dispute(l.other)?, Some(l))))
        })
    }

    /// Every dispute this state holds, by star: what a rebuild takes again.
    pub fn disputes(&self) -> &[Dispute] {
        &self.disputes
    }

    /// Sets candidate c's dispute (`None`: the vetters agree, or no
    /// rejection as a false positive stands) and places its star again
    /// when it changed.
    pub fn set_dispute(&mut self, c: CandidateId, dispute: Option<Dispute>) {
        let old = self.disputes.iter().position(|d| d.candidate == c);
        if old.map(|i| &self.disputes[i]) == dispute.as_ref() {
            return;
        }
        if let Some(i) = old {
            self.disputes.remove(i);
        }
        if let Some(d) = dispute {
            let at = self
                .disputes
                .partition_point(|o| (o.star, o.candidate) < (d.star, d.candidate));
            self.disputes.insert(at, d);
        }
        let star = self.star_of(c);
        let mut stars = vec![star];
        stars.extend(self.links_of(star).iter().map(|l| l.other));
        stars.sort_unstable();
        stars.dedup();
        self.replace_stars(&stars);
    }

    /// Replaces every dispute, placing again the stars of the old and the
    /// new.
    pub fn set_disputes(&mut self, mut all: Vec<Dispute>) {
        all.sort_by_key(|d| (d.star, d.candidate));
        all.dedup_by_key(|d| d.candidate);
        if all == self.disputes {
            return;
        }
        // Every star of either list and their other ids: a few, and
        // placing one is cheap.
        let mut stars: Vec<StarId> = self.disputes.iter().chain(&all).map(|d| d.star).collect();
        let linked: Vec<StarId> = stars
            .iter()
            .flat_map(|&s| self.links_of(s).iter().map(|l| l.other))
            .collect();
        stars.extend(linked);
        self.disputes = all;
        stars.sort_unstable();
        stars.dedup();
        self.replace_stars(&stars);
    }
}

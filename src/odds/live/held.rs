//! Why a candidate is held back from its star's system, for people: its
//! own blocking flags, or the signal group it shares (docs/science.md
//! §3.1), one candidate at a time and summed over the catalogue.

use super::*;

/// Why a candidate is held back.
#[derive(Clone, Debug, PartialEq)]
pub enum Hold {
    /// Blocking flags of its own.
    Flags(FlagSet),
    /// A threshold-crossing event that no vetter has kept yet.
    Unvetted,
    /// One signal with `rep`, which stands for the group.
    Copy { rep: CandidateId, kind: Flag },
    /// One signal with `by`, which a vetter rejected for what it is.
    GroupRejected { by: CandidateId, reason: Reason },
    /// One signal with `rep`, which blocking flags hold back.
    GroupHeld { rep: CandidateId },
    /// A sibling of `fp`, a known false positive of the same star: rejected
    /// as one (`reason`), or flagged as one (`flags`, the signs it carries).
    Sibling {
        fp: CandidateId,
        reason: Option<Reason>,
        flags: FlagSet,
    },
    /// On a star known to host a false positive that no loaded row shows
    /// (`UnseenFp`: a skipped row, or a ledger decision on a candidate the
    /// catalogue no longer has), `why` for people.
    UnseenSibling { why: String },
    /// On a star where vetters disagree whether `fp` is a false positive:
    /// one rejected it as one, the decision in force does not (`why` for
    /// people; docs/science.md §1.1). `fp` is on another id of the star
    /// when `other` names it, with the tie that makes the two one star
    /// (§3.4).
    Disputed {
        fp: CandidateId,
        why: String,
        other: Option<(StarId, crate::checks::Tie)>,
    },
    /// On a star that is also star `other` (as `tie` shows), where a
    /// vetter rejected `fp` as a false positive (`reason`).
    OtherId {
        fp: CandidateId,
        reason: Reason,
        other: StarId,
        tie: crate::checks::Tie,
    },
}

impl Live {
    /// Why a candidate is held back; `None` when counted or rejected.
    pub fn hold(&self, c: CandidateId) -> Option<Hold> {
        if self.status[c as usize] != Status::Held {
            return None;
        }
        let own = self.flags[c as usize].intersection(self.own_blocking());
        if !own.is_empty() {
            return Some(Hold::Flags(own));
        }
        if self.unvetted(self.decision[c as usize]) {
            return Some(Hold::Unvetted);
        }
        if let Some(h) = self.group_hold(c) {
            return Some(h);
        }
        let members = self.index.members(self.star_of(c));
        let Some(fp) = self.known_fp_among(
            members,
            |m| self.decision[m as usize],
            |g| self.standings[g as usize],
        ) else {
            if let Some(u) = self.unseen_fp(self.star_of(c)) {
                return Some(Hold::UnseenSibling { why: u.why.clone() });
            }
            if let Some((d, link)) = self.dispute_here_or_linked(self.star_of(c)) {
                return Some(Hold::Disputed {
                    fp: d.candidate,
                    why: d.why.clone(),
                    other: link.map(|l| (l.other, l.tie.clone())),
                });
            }
            let (fp, reason, link) =
                self.linked_fp(self.star_of(c), |m| self.decision[m as usize])?;
            return Some(Hold::OtherId {
                fp,
                reason,
                other: link.other,
                tie: link.tie.clone(),
            });
        };
        // A rejected member marks its star only when rejected as a false
        // positive (`known_fp_among`): its reason is that one.
        let reason = self.decision[fp as usize].reason();
        let flags = self.flags[fp as usize].intersection(self.fp_signs());
        Some(Hold::Sibling { fp, reason, flags })
    }

    /// Why a held candidate is held by its signal group, if it is.
    fn group_hold(&self, c: CandidateId) -> Option<Hold> {
        let g = self.active_group(c)?;
        let standing = self.standings[g as usize];
        if let Some((by, reason)) = standing.rejected_by {
            return Some(Hold::GroupRejected { by, reason });
        }
        let rep = standing.rep?;
        if rep == c {
            return None;
        }
        if self.status[rep as usize] == Status::Held {
            return Some(Hold::GroupHeld { rep });
        }
        let kind = self.flags[c as usize]
            .intersection(FlagSet::group_flags())
            .iter()
            .next()
            .or_else(|| self.groups.kinds(g).iter().next())
            .unwrap_or(Flag::NearTwin);
        Some(Hold::Copy { rep, kind })
    }

    /// Counts of held-back candidates by cause, for "the cleaning held back
    /// N": one pass over the catalogue. A candidate with several blocking
    /// flags counts under each.
    pub fn held_summary(&self) -> Vec<(String, usize)> {
        let mut copies = 0;
        let mut unvetted = 0;
        let mut group_out = 0;
        let mut siblings = 0;
        let mut disputed = 0;
        let mut by_flag: std::collections::BTreeMap<&'static str, usize> = Default::default();
        for c in 0..self.status.len() as CandidateId {
            match self.hold(c) {
                Some(Hold::Flags(f)) => f
                    .iter()
                    .for_each(|f| *by_flag.entry(f.name()).or_default() += 1),
                Some(Hold::Copy { .. }) => copies += 1,
                Some(Hold::Unvetted) => unvetted += 1,
                Some(Hold::GroupRejected { .. } | Hold::GroupHeld { .. }) => group_out += 1,
                Some(Hold::Sibling { .. } | Hold::UnseenSibling { .. } | Hold::OtherId { .. }) => {
                    siblings += 1
                }
                Some(Hold::Disputed { .. }) => disputed += 1,
                None => {}
            }
        }
        let mut out = Vec::new();
        if copies > 0 {
            out.push((
                "copies of another signal (near-twin, harmonic, half-phase)".to_string(),
                copies,
            ));
        }
        if unvetted > 0 {
            out.push(("events not yet kept by a vetter".to_string(), unvetted));
        }
        if group_out > 0 {
            out.push((
                "one signal with a rejected or held-back candidate".to_string(),
                group_out,
            ));
        }
        if siblings > 0 {
            out.push((
                "on a star with a known false positive".to_string(),
                siblings,
            ));
        }
        if disputed > 0 {
            out.push((
                "on a star where vetters disagree on a false positive".to_string(),
                disputed,
            ));
        }
        out.extend(by_flag.into_iter().map(|(f, n)| (format!("flag {f}"), n)));
        out
    }

    /// One line: "N held back: a (cause), b (cause)…", or `None`.
    pub fn held_line(&self) -> Option<String> {
        let n = self.held_count();
        if n == 0 {
            return None;
        }
        let parts: Vec<String> = self
            .held_summary()
            .into_iter()
            .map(|(what, k)| format!("{k} {what}"))
            .collect();
        Some(format!(
            "{n} candidate{} held back from the count (not rejected, never validated): {}",
            if n == 1 { "" } else { "s" },
            parts.join("; ")
        ))
    }
}

/// Which stars are known to host a false positive (docs/science.md §1.1).
impl Live {
    /// What says star s hosts a false positive no loaded row shows (a
    /// skipped row, a decision on a candidate the catalogue no longer has).
    pub fn unseen_fp(&self, s: StarId) -> Option<&UnseenFp> {
        let i = self.unseen_fp.binary_search_by_key(&s, |u| u.star).ok()?;
        Some(&self.unseen_fp[i])
    }

    /// Every star known to host a false positive no loaded row shows, by
    /// star: what a rebuild of these odds takes again.
    pub fn unseen_fps(&self) -> &[UnseenFp] {
        &self.unseen_fp
    }

    /// The flags that name a candidate an astrophysical false positive on
    /// its star, among the blocking ones (docs/science.md §1.1): its
    /// siblings are held back with it.
    pub(super) fn fp_signs(&self) -> FlagSet {
        FlagSet::false_positive_signs().intersection(self.model.blocking)
    }

    /// Whether candidate c, under decision d, may be a known false positive
    /// of its star: rejected as one, or flagged as one. A superset of
    /// [`Live::known_fp_among`]'s answer (which also asks the group).
    pub(super) fn may_mark_fp(&self, c: CandidateId, d: Decision) -> bool {
        d.reason().is_some_and(names_false_positive)
            || self.flags[c as usize].intersects(self.fp_signs())
    }

    /// The first of `members` (one star's) that is a known false positive
    /// under `decision`: rejected as one, or, not rejected, flagged as one
    /// while standing for its signal. A copy's light-curve flags are not its
    /// own: an alias folded at twice the period shows its own transit at
    /// phase 0.5, a `secondary` that says nothing of the star. The
    /// catalogue's word (`known-fp`) is on the signal, whichever of its
    /// entries carries it: a binary listed twice, once called a false
    /// positive, is a false positive (docs/science.md §3.5).
    pub(super) fn known_fp_among(
        &self,
        members: &[CandidateId],
        decision: impl Fn(CandidateId) -> Decision,
        standing: impl Fn(u32) -> GroupStanding,
    ) -> Option<CandidateId> {
        members.iter().copied().find(|&m| {
            // A vetter's rejection says what the member is, over its flags:
            // rejected as an artefact, say, it marks nothing.
            if let Some(r) = decision(m).reason() {
                return names_false_positive(r);
            }
            let signs = self.flags[m as usize].intersection(self.fp_signs());
            if signs.is_empty() {
                return false;
            }
            if signs.contains(Flag::KnownFp) {
                return true;
            }
            match self.active_group(m) {
                Some(g) => standing(g).rep == Some(m),
                None => true,
            }
        })
    }
}

/// A rejection that says what the signal is: a false positive of its star
/// (an eclipsing binary, a blend, a stellar-size companion), whose siblings
/// are held back with it (docs/science.md §1.1).
pub fn names_false_positive(r: Reason) -> bool {
    matches!(
        r,
        Reason::EclipsingBinary | Reason::Blend | Reason::TooLarge
    )
}

//! A candidate family split over several stars. Archives number the
//! candidates of one host `<host's number>.<n>` (`TOI-902.01`, `.02`,
//! `.03`), so a family whose rows name two star ids names one star twice:
//! a typing slip, or one host under two catalogues' ids in a merged table.
//! Which id is right cannot be known, so a false positive the catalogue
//! names in the family holds every star the family sits on, as a skipped
//! row's does (docs/science.md §3.4, §3.5). Stars are not joined: that
//! would add multiplicity from a naming convention alone.

use super::Checks;
use crate::catalogue::{CandidateId, Catalogue, candidate_family as family};

/// Every row of another star id that shares a candidate family with one of
/// `targets`: (the first such target, the row). One pass over the
/// catalogue; `targets` are few.
pub(super) fn ties(cat: &Catalogue, targets: &[CandidateId]) -> Vec<(CandidateId, CandidateId)> {
    super::other_ids::rows_sharing(cat, targets, |c| family(cat.candidate_id(c)))
}

/// Holds each star a split family shares with a false positive: a
/// candidate the catalogue calls one (`known-fp` on a loaded row) or whose
/// checks show one's signs (`secondary`, `big-radius`, `ellipsoidal`: the
/// signs that hold its own star), and says so. Run again after the light
/// curves, whose findings add signs; a star already held stays as it was.
/// `fps`: those false positives (`checks::shows_false_positive`).
pub(super) fn flag(cat: &Catalogue, out: &mut Checks, fps: &[CandidateId]) {
    if fps.is_empty() {
        return;
    }
    let why = |out: &Checks, fp: CandidateId, _| {
        format!(
            "{}, on star {}, is of this star's candidate family ({}) and {}; archives number one star's candidates <star>.<n>, so both star ids name one star",
            crate::sanitize::clean(cat.candidate_id(fp)),
            crate::sanitize::clean(cat.star_id(cat.star_of(fp))),
            crate::sanitize::clean(family(cat.candidate_id(fp)).unwrap_or_default()),
            super::false_positive_words(out, fp),
        )
    };
    out.hold_pairs(cat, ties(cat, fps), why, |n, listed| {
        format!(
            "{n} star{} share{} a candidate family with a false positive on another star id ({listed}): held back, as one star with it; check the star ids (docs/science.md §3.4)",
            if n == 1 { "" } else { "s" },
            if n == 1 { "s" } else { "" },
        )
    });
}

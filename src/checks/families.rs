//! A candidate family split over several stars. Archives number the
//! candidates of one host `<host's number>.<n>` (`TOI-902.01`, `.02`,
//! `.03`), so a family whose rows name two star ids names one star twice:
//! a typing slip, or one host under two catalogues' ids in a merged table.
//! Which id is right cannot be known, so a false positive the catalogue
//! names in the family holds every star the family sits on, as a skipped
//! row's does (docs/science.md §3.4, §3.5). Stars are not joined: that
//! would add multiplicity from a naming convention alone.

use super::{Checks, UnseenFp};
use crate::catalogue::{CandidateId, Catalogue, StarId, candidate_family as family};
use crate::flags::Flag;

/// Holds each star a split family shares with a false positive: a
/// candidate the catalogue calls one (`known-fp` on a loaded row) or whose
/// checks show one's signs (`secondary`, `big-radius`, `ellipsoidal`: the
/// signs that hold its own star), and says so. Run again after the light
/// curves, whose findings add signs; a star already held stays as it was.
pub(super) fn flag(cat: &Catalogue, out: &mut Checks) {
    // The families of the false positives: few, usually none.
    let mut fp_of: hashbrown::HashMap<&str, Vec<CandidateId>> = hashbrown::HashMap::new();
    for c in 0..cat.len() as CandidateId {
        if super::shows_false_positive(out, c) || out.warnings(c).contains(Flag::KnownFp) {
            if let Some(f) = family(cat.candidate_id(c)) {
                fp_of.entry(f).or_default().push(c);
            }
        }
    }
    if fp_of.is_empty() {
        return;
    }
    // Every other star of those families.
    let mut held: Vec<UnseenFp> = Vec::new();
    for c in 0..cat.len() as CandidateId {
        let Some((f, fps)) = family(cat.candidate_id(c)).and_then(|f| fp_of.get_key_value(f))
        else {
            continue;
        };
        let star: StarId = cat.star_of(c);
        if let Some(&fp) = fps.iter().find(|&&fp| cat.star_of(fp) != star) {
            held.push(UnseenFp {
                star,
                why: format!(
                    "{}, on star {}, is of this star's candidate family ({}) and {}; archives number one star's candidates <star>.<n>, so both star ids name one star",
                    crate::sanitize::clean(cat.candidate_id(fp)),
                    crate::sanitize::clean(cat.star_id(cat.star_of(fp))),
                    crate::sanitize::clean(f),
                    super::false_positive_words(out, fp),
                ),
            });
        }
    }
    out.hold_for_another_id(cat, held, |n, listed| {
        format!(
            "{n} star{} share{} a candidate family with a false positive on another star id ({listed}): held back, as one star with it; check the star ids (docs/science.md §3.4)",
            if n == 1 { "" } else { "s" },
            if n == 1 { "s" } else { "" },
        )
    });
}

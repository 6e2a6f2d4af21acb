//! One place, two star ids. Rows of two star ids at the same position
//! (within [`SAME_PLACE_ARCSEC`]) are one star under two catalogues' ids,
//! or two stars no survey aperture tells apart: either way one light. A
//! false positive the catalogue names at one id means that light holds an
//! eclipsing binary's, and the candidates of the other id are held as its
//! siblings (docs/science.md §1.1, §3.4). Stars are not joined: that would
//! add multiplicity from a position match alone.

use super::echo::{real_position, separation_arcsec};
use super::{Checks, UnseenFp};
use crate::catalogue::{CandidateId, Catalogue, Field, StarId};

/// Two catalogue positions this close are one star, or stars no survey
/// aperture parts (common practice, no source: the usual radius of a
/// cross-match between catalogues; survey pixels are 4–21″).
pub const SAME_PLACE_ARCSEC: f64 = 2.0;

/// Every row of another star id within [`SAME_PLACE_ARCSEC`] of one of
/// `targets`: (the first such target, the row, how far apart in ″). One
/// pass over the catalogue; `targets` are few. None without positions.
pub(super) fn ties(
    cat: &Catalogue,
    targets: &[CandidateId],
) -> Vec<(CandidateId, CandidateId, f64)> {
    let (Some(ra), Some(dec)) = (cat.column(Field::RaDeg), cat.column(Field::DecDeg)) else {
        return Vec::new();
    };
    // The targets with a position, by declination.
    let mut near: Vec<(f64, f64, CandidateId)> = targets
        .iter()
        .map(|&c| (dec[c as usize], ra[c as usize], c))
        .filter(|&(d, r, _)| real_position(r, d))
        .collect();
    if near.is_empty() {
        return Vec::new();
    }
    near.sort_by(|a, b| a.0.total_cmp(&b.0));
    let reach = SAME_PLACE_ARCSEC / 3600.0;
    (0..cat.len() as CandidateId)
        .filter_map(|c| {
            let (r, d) = (ra[c as usize], dec[c as usize]);
            if !real_position(r, d) {
                return None;
            }
            let star: StarId = cat.star_of(c);
            let from = near.partition_point(|f| f.0 < d - reach);
            near[from..]
                .iter()
                .take_while(|f| f.0 <= d + reach)
                .filter(|f| cat.star_of(f.2) != star)
                .map(|f| (f.2, c, separation_arcsec(f.1, f.0, r, d)))
                .find(|&(_, _, apart)| apart <= SAME_PLACE_ARCSEC)
        })
        .collect()
}

/// Holds each star whose rows sit within [`SAME_PLACE_ARCSEC`] of a
/// candidate of another star id that is a false positive (the catalogue
/// calls it one, or its checks show one's signs: `Checks::
/// shows_false_positive`), and says so. Run again after the light curves;
/// a star already held stays as it was.
pub(super) fn flag(cat: &Catalogue, out: &mut Checks) {
    if cat.column(Field::RaDeg).is_none() || cat.column(Field::DecDeg).is_none() {
        return;
    }
    // The false positives: few, usually none.
    let fps: Vec<CandidateId> = (0..cat.len() as CandidateId)
        .filter(|&c| super::shows_false_positive(out, c))
        .collect();
    let held: Vec<UnseenFp> = ties(cat, &fps)
        .into_iter()
        .map(|(fp, c, apart)| UnseenFp {
            star: cat.star_of(c),
            why: format!(
                "{}, on star {} {apart:.1}″ from this star's {}, is {}: one place, one light (one star under two ids, or stars no aperture parts)",
                crate::sanitize::clean(cat.candidate_id(fp)),
                crate::sanitize::clean(cat.star_id(cat.star_of(fp))),
                crate::sanitize::clean(cat.candidate_id(c)),
                super::false_positive_words(out, fp),
            ),
        })
        .collect();
    out.hold_for_another_id(cat, held, |n, listed| {
        format!(
            "{n} star{} within {SAME_PLACE_ARCSEC}″ of a false positive under another star id ({listed}): held back, as one light with it; check the star ids (docs/science.md §3.4)",
            if n == 1 { "" } else { "s" },
        )
    });
}

//! One star named by a second id column. A table merged from several
//! archives names its stars by one id (`tic_id`) and may carry another
//! that names the host too (`hostname`, `kepid`, `epic_hostname`: a header
//! the loader reads as a star id, kept as an extra column beside the one
//! it uses). Two star ids whose rows give one value there (in one
//! spelling, `load::star_key`) name one star: a false positive at one
//! holds the candidates of the other, as a split candidate family does
//! (docs/science.md §3.4). Stars are not joined: that would add
//! multiplicity from a second column alone.
//!
//! A value that names many star ids is no host's name but a placeholder
//! (`0` where a survey has no id of that catalogue): one that ties more
//! than [`MAX_STARS`] star ids ties none.

use super::Checks;
use crate::catalogue::{CandidateId, Catalogue, StarId};

/// The most star ids one host is expected under in a merged table (one
/// per catalogue it was drawn from; common practice, no source). A value
/// shared by more is a placeholder.
const MAX_STARS: usize = 4;

/// A row's host as its second id columns give it: (column, the value in
/// one spelling); `None` when they are empty or hold no id (`0`, `nan`).
/// The first such column with a value.
fn host_of(cat: &Catalogue, columns: &[usize], c: CandidateId) -> Option<(usize, Vec<u8>)> {
    columns.iter().find_map(|&i| {
        let value = cat.extra(i, c).trim();
        let mut key = Vec::new();
        crate::catalogue::star_key(value, &mut key);
        // No id (`nan`, `-1`, `0`: the loader's reading of a star cell).
        let none = crate::catalogue::names_no_star(value) || key == b"0";
        (!none && key.iter().any(u8::is_ascii_alphanumeric)).then_some((i, key))
    })
}

/// Every row of another star id whose host (its second id column) is that
/// of one of `targets`: (the first such target, the row), hosts that tie
/// more than [`MAX_STARS`] star ids left out. One pass over the catalogue;
/// `targets` are few.
pub(super) fn ties(cat: &Catalogue, targets: &[CandidateId]) -> Vec<(CandidateId, CandidateId)> {
    let columns = cat.other_star_id_columns();
    if columns.is_empty() || targets.is_empty() {
        return Vec::new();
    }
    let host = |c: CandidateId| host_of(cat, &columns, c);
    let pairs = super::other_ids::rows_sharing(cat, targets, host);
    // The star ids each host ties, the targets' own among them.
    let mut stars: hashbrown::HashMap<(usize, Vec<u8>), Vec<StarId>> = hashbrown::HashMap::new();
    for &(t, c) in &pairs {
        if let Some(h) = host(t) {
            stars
                .entry(h)
                .or_default()
                .extend([cat.star_of(t), cat.star_of(c)]);
        }
    }
    for s in stars.values_mut() {
        s.sort_unstable();
        s.dedup();
    }
    pairs
        .into_iter()
        .filter(|&(t, _)| host(t).is_some_and(|h| stars[&h].len() <= MAX_STARS))
        .collect()
}

/// The host two rows share, for people: `hostname HWT-77`.
pub(super) fn describe(cat: &Catalogue, c: CandidateId) -> String {
    let columns = cat.other_star_id_columns();
    let Some((i, _)) = host_of(cat, &columns, c) else {
        return String::new();
    };
    let header = cat.extra_headers().nth(i).unwrap_or_default();
    format!(
        "{} {}",
        crate::sanitize::clean(header.trim()),
        crate::sanitize::clean(cat.extra(i, c).trim())
    )
}

/// Holds each star whose host (its second id column) is that of a false
/// positive on another star id, and says so; as `families::flag` does.
/// `fps`: those false positives (`checks::shows_false_positive`).
pub(super) fn flag(cat: &Catalogue, out: &mut Checks, fps: &[CandidateId]) {
    if fps.is_empty() {
        return;
    }
    let why = |out: &Checks, fp: CandidateId, _| {
        format!(
            "{}, on star {}, names the same host ({}) and {}; two star ids of one host name one star",
            crate::sanitize::clean(cat.candidate_id(fp)),
            crate::sanitize::clean(cat.star_id(cat.star_of(fp))),
            describe(cat, fp),
            super::false_positive_words(out, fp),
        )
    };
    out.hold_pairs(cat, ties(cat, fps), why, |n, listed| {
        format!(
            "{n} star{} name{} the same host as a false positive on another star id ({listed}): held back, as one star with it; check the star ids (docs/science.md §3.4)",
            if n == 1 { "" } else { "s" },
            if n == 1 { "s" } else { "" },
        )
    });
}

//! Which other star ids name the same star as a given one: a candidate
//! family split over both, rows within [`super::same_place::
//! SAME_PLACE_ARCSEC`] of each other, one row listed under both, or one
//! host in a second id column (docs/science.md §3.4). The odds use
//! these ties to hold the candidates of every id of a star whose
//! candidate a vetter rejected as a false positive (`Live`), as the checks
//! do for a false positive they or the catalogue find (`families`,
//! `same_place`, `copies`, `second_ids`, each through
//! [`Checks::hold_for_another_id`]).

use super::{Checks, UnseenFp, copies, families, same_place, second_ids};
use crate::catalogue::{CandidateId, Catalogue, StarId, candidate_family};

/// How two star ids are known to name one star.
#[derive(Clone, Debug, PartialEq)]
pub enum Tie {
    /// Both carry candidates of this family (`<star>.<n>`).
    Family(String),
    /// Rows of the two this far apart, arcseconds.
    Place(f64),
    /// One row listed under both: these two candidates, the same period,
    /// epoch, depth and duration.
    Row(String, String),
    /// Both name this host in a second id column (`hostname HWT-77`).
    Host(String),
}

/// Every row of another star id whose `key` is that of one of `targets`:
/// (the first such target, the row). One pass over the catalogue, a part
/// of the rows on each core; `targets` are few. The ties of a candidate
/// family (`families`; those of one row, `copies::ties`, compare periods
/// within their rounding).
pub(super) fn rows_sharing<K: Eq + std::hash::Hash + Sync>(
    cat: &Catalogue,
    targets: &[CandidateId],
    key: impl Fn(CandidateId) -> Option<K> + Sync,
) -> Vec<(CandidateId, CandidateId)> {
    let mut of: hashbrown::HashMap<K, Vec<CandidateId>> = hashbrown::HashMap::new();
    for &t in targets {
        if let Some(k) = key(t) {
            of.entry(k).or_default().push(t);
        }
    }
    if of.is_empty() {
        return Vec::new();
    }
    crate::parallel::in_parts(cat.len(), |rows| {
        rows.filter_map(|c| {
            let c = c as CandidateId;
            let ts = of.get(&key(c)?)?;
            let star: StarId = cat.star_of(c);
            let t = ts.iter().copied().find(|&t| cat.star_of(t) != star)?;
            Some((t, c))
        })
        .collect::<Vec<_>>()
    })
    .concat()
}

/// Star `other` names the same star as `star`, as `tie` shows.
#[derive(Clone, Debug, PartialEq)]
pub struct StarLink {
    pub star: StarId,
    pub other: StarId,
    pub tie: Tie,
}

impl Tie {
    /// For people: `one candidate family (TOI-902)`, `rows 0.4″ apart`.
    pub fn describe(&self) -> String {
        match self {
            Tie::Family(f) => format!("one candidate family ({})", crate::sanitize::clean(f)),
            Tie::Place(apart) => format!("rows {apart:.1}″ apart"),
            Tie::Row(a, b) => format!(
                "one row listed under both ({} and {})",
                crate::sanitize::clean(a),
                crate::sanitize::clean(b)
            ),
            Tie::Host(h) => format!("one host ({h})"),
        }
    }
}

/// Every other star id tied to one of `stars`, both ways round (a link
/// from each of `stars` and one back), one per pair of stars (a family
/// before a place, a place before a row, a row before a host), sorted by
/// `star`. One or two passes over the
/// catalogue, whatever the number of `stars`.
pub fn links_of(cat: &Catalogue, stars: &[StarId]) -> Vec<StarLink> {
    let members: Vec<CandidateId> = stars
        .iter()
        .flat_map(|&s| cat.index().members(s).to_vec())
        .collect();
    let by_family = families::ties(cat, &members).into_iter().map(|(t, c)| {
        let f = candidate_family(cat.candidate_id(t)).unwrap_or_default();
        (t, c, Tie::Family(f.to_string()))
    });
    let by_place = same_place::ties(cat, &members)
        .into_iter()
        .map(|(t, c, apart)| (t, c, Tie::Place(apart)));
    let by_row = copies::ties(cat, &members).into_iter().map(|(t, c)| {
        let (a, b) = (cat.candidate_id(t), cat.candidate_id(c));
        (t, c, Tie::Row(a.to_string(), b.to_string()))
    });
    let by_host = second_ids::ties(cat, &members)
        .into_iter()
        .map(|(t, c)| (t, c, Tie::Host(second_ids::describe(cat, t))));
    let mut links: Vec<StarLink> = by_family
        .chain(by_place)
        .chain(by_row)
        .chain(by_host)
        .flat_map(|(t, c, tie)| {
            let (star, other) = (cat.star_of(t), cat.star_of(c));
            [
                StarLink {
                    star,
                    other,
                    tie: tie.clone(),
                },
                StarLink {
                    star: other,
                    other: star,
                    tie,
                },
            ]
        })
        .collect();
    // Stable: the first tie found of a pair (a family's) stays.
    links.sort_by_key(|l| (l.star, l.other));
    links.dedup_by_key(|l| (l.star, l.other));
    links
}

impl Checks {
    /// [`Checks::hold_for_another_id`] for `pairs` of (a false positive,
    /// a row of another star id tied to it), `why(checks, fp, row)`.
    pub(super) fn hold_pairs(
        &mut self,
        cat: &Catalogue,
        pairs: Vec<(CandidateId, CandidateId)>,
        why: impl Fn(&Checks, CandidateId, CandidateId) -> String,
        say: impl Fn(usize, &str) -> String,
    ) {
        let tied = (pairs.into_iter())
            .map(|(fp, c)| (c, why(self, fp, c)))
            .collect();
        self.hold_for_another_id(cat, tied, say);
    }

    /// Holds stars known to host a false positive that another star id's
    /// row shows (`families`, `same_place`, `copies`, `second_ids`): the star of each
    /// row of `tied` (the row, why), one entry per star, in star order (an
    /// entry already there stays), and a note, `say(n, listed)` with the
    /// number of stars and the first few named.
    pub(super) fn hold_for_another_id(
        &mut self,
        cat: &Catalogue,
        tied: Vec<(CandidateId, String)>,
        say: impl Fn(usize, &str) -> String,
    ) {
        let mut held: Vec<UnseenFp> = tied
            .into_iter()
            .map(|(c, why)| UnseenFp {
                star: cat.star_of(c),
                by_tie: true,
                why,
            })
            .collect();
        held.sort_by_key(|u| u.star);
        held.dedup_by_key(|u| u.star);
        // A star held already (by an earlier pass, or a skipped row) stays
        // as it was, and is not said again.
        held.retain(|u| {
            self.unseen_fp
                .binary_search_by_key(&u.star, |o| o.star)
                .is_err()
        });
        if held.is_empty() {
            return;
        }
        let listed: Vec<String> = held
            .iter()
            .take(3)
            .map(|u| format!("star {}", crate::sanitize::clean(cat.star_id(u.star))))
            .collect();
        let more = if held.len() > 3 { ", …" } else { "" };
        self.notes
            .push(say(held.len(), &format!("{}{more}", listed.join(", "))));
        let mut all = std::mem::take(&mut self.unseen_fp);
        all.extend(held);
        all.sort_by_key(|u| u.star);
        all.dedup_by_key(|u| u.star);
        self.unseen_fp = all;
    }
}

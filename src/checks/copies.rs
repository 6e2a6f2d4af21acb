//! One row under two star ids. A table merged from two sources, or one
//! star listed under two catalogues' ids, can carry the same row twice: the
//! same period, epoch, depth and duration, to the last digit, on two star
//! ids. That is no neighbour's light (§3.3: a neighbour's copy is diluted,
//! so shallower, and measured anew), it is one entry named twice. Which
//! star it is on cannot be known: each copy is flagged `mixed-host` and
//! counts towards neither system; the copies are one signal group (one
//! verdict); and the two star ids are tied, so a false positive at one
//! holds the candidates of the other, as a split family or one place does
//! (docs/science.md §3.4).

use super::Checks;
use super::system::Link;
use crate::catalogue::{CandidateId, Catalogue, Column, Field, StarId};
use crate::flags::Flag;

/// What makes a row's signal, as read: the bit patterns of its period,
/// epoch, depth and duration (a missing duration as one NaN).
type Key = [u64; 4];

/// The columns a [`Key`] is read from.
struct Cols<'a> {
    period: &'a Column,
    epoch: &'a Column,
    depth: &'a Column,
    duration: Option<&'a Column>,
}

impl<'a> Cols<'a> {
    fn of(cat: &'a Catalogue) -> Option<Cols<'a>> {
        Some(Cols {
            period: cat.column(Field::PeriodD)?,
            epoch: cat.column(Field::Epoch)?,
            depth: cat.column(Field::DepthPpm)?,
            duration: cat.column(Field::DurationH),
        })
    }

    /// Row `c`'s key; `None` when its period, epoch or depth is missing or
    /// its depth is not above zero (nothing to be the same of).
    fn key(&self, c: CandidateId) -> Option<Key> {
        let i = c as usize;
        let (p, e, d) = (self.period.get(i), self.epoch.get(i), self.depth.get(i));
        if !(p.is_finite() && e.is_finite() && d > 0.0 && d.is_finite()) {
            return None;
        }
        let t = self.duration.map_or(f64::NAN, |t| t.get(i));
        let t = if t.is_nan() { f64::NAN } else { t };
        Some([p.to_bits(), e.to_bits(), d.to_bits(), t.to_bits()])
    }
}

/// Whether rows `a` and `b` carry the same signal, value for value.
pub(super) fn same_row(cat: &Catalogue, a: CandidateId, b: CandidateId) -> bool {
    Cols::of(cat).is_some_and(|k| k.key(a).is_some() && k.key(a) == k.key(b))
}

/// The rows whose signal is repeated on another star id, in sets of one
/// signal (each in the order of `period_order`, then star, then row), from
/// the echo search's period order (keys whose high 64 bits order the
/// periods, the candidate in the low 32). Rows of one period lie together
/// there, so only those are compared: O(n), and O(r log r) for a run of r
/// rows of one period.
pub(super) fn find(cat: &Catalogue, period_order: &[u128]) -> Vec<Vec<CandidateId>> {
    let Some(cols) = Cols::of(cat) else {
        return Vec::new();
    };
    let mut out = Vec::new();
    let mut run: Vec<(Key, StarId, CandidateId)> = Vec::new();
    for same_period in period_order.chunk_by(|a, b| a >> 64 == b >> 64) {
        if same_period.len() < 2 {
            continue;
        }
        run.clear();
        run.extend(same_period.iter().filter_map(|&k| {
            let c = k as CandidateId;
            Some((cols.key(c)?, cat.star_of(c), c))
        }));
        run.sort_unstable();
        for same in run.chunk_by(|a, b| a.0 == b.0) {
            if same[0].1 != same[same.len() - 1].1 {
                out.push(same.iter().map(|&(_, _, c)| c).collect());
            }
        }
    }
    out
}

/// The signal-group links of the sets [`find`] found, for
/// `checks::group_flags`: one signal, one verdict.
pub(super) fn links(cat: &Catalogue, sets: &[Vec<CandidateId>]) -> Vec<Link> {
    let mut out = Vec::new();
    for set in sets {
        for &c in &set[1..] {
            let other = on_another_star(cat, set, c);
            out.push(Link {
                a: other,
                b: c,
                flag: Flag::NearTwin,
                detail: if cat.star_of(other) == cat.star_of(c) {
                    "the same row on this star".to_string()
                } else {
                    format!(
                        "the same row under another star id ({}): period, epoch, depth and duration identical",
                        crate::sanitize::clean(cat.star_id(cat.star_of(other)))
                    )
                },
            });
        }
    }
    out
}

/// The first row of `set` on another star than `c`'s (every set spans two
/// stars or more).
fn on_another_star(cat: &Catalogue, set: &[CandidateId], c: CandidateId) -> CandidateId {
    let star = cat.star_of(c);
    set.iter()
        .copied()
        .find(|&m| cat.star_of(m) != star)
        .unwrap_or(set[0])
}

/// Flags every row of the sets `mixed-host`, naming a row of another star
/// id it repeats.
pub(super) fn flag(cat: &Catalogue, sets: &[Vec<CandidateId>], out: &mut Checks) {
    for set in sets {
        for &c in set {
            let other = on_another_star(cat, set, c);
            out.add(
                c,
                Flag::MixedHost,
                false,
                format!(
                    "the same row (period, epoch, depth and duration identical) is also listed as {} on star {}: one row under two star ids, from a merged table or one star under two catalogues' ids, and no neighbour's light, which would be shallower; which star it is on cannot be known, so it counts towards neither (docs/science.md §3.4)",
                    crate::sanitize::clean(cat.candidate_id(other)),
                    crate::sanitize::clean(cat.star_id(cat.star_of(other)))
                ),
            );
        }
    }
}

/// Every row of another star id that repeats the signal of one of
/// `targets`: (the first such target, the row). One pass over the
/// catalogue; `targets` are few.
pub(super) fn ties(cat: &Catalogue, targets: &[CandidateId]) -> Vec<(CandidateId, CandidateId)> {
    let Some(cols) = Cols::of(cat) else {
        return Vec::new();
    };
    super::other_ids::rows_sharing(cat, targets, |c| cols.key(c))
}

/// Holds each star that repeats a row of a false positive on another star
/// id (`fps`: `checks::shows_false_positive`), and says so; as
/// `families::flag` does.
pub(super) fn hold(cat: &Catalogue, out: &mut Checks, fps: &[CandidateId]) {
    if fps.is_empty() {
        return;
    }
    let held: Vec<(CandidateId, String)> = ties(cat, fps)
        .into_iter()
        .map(|(fp, c)| {
            let why = format!(
                "{}, on star {}, is the same row as this star's {} (period, epoch, depth and duration identical) and {}; one row under two star ids names one star",
                crate::sanitize::clean(cat.candidate_id(fp)),
                crate::sanitize::clean(cat.star_id(cat.star_of(fp))),
                crate::sanitize::clean(cat.candidate_id(c)),
                super::false_positive_words(out, fp),
            );
            (c, why)
        })
        .collect();
    out.hold_for_another_id(cat, held, |n, listed| {
        format!(
            "{n} star{} repeat{} a row of a false positive on another star id ({listed}): held back, as one star with it; check the star ids (docs/science.md §3.4)",
            if n == 1 { "" } else { "s" },
            if n == 1 { "s" } else { "" },
        )
    });
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks::{CheckSettings, run};

    #[test]
    fn only_the_same_row_on_another_star_id_is_a_copy() {
        // Invented rows. A's row is repeated on B, on C written with other
        // digits of the same numbers (`3.70`, `100.50`), and a second time
        // on A (one star's own repeat: `near-twin`, not a copy). D differs
        // by 1 ppm in depth, E by 0.001 h in duration: a measurement of
        // its own.
        let text = "star,candidate,period_d,epoch,depth_ppm,duration_h\n\
A,A-1,3.7,100.5,3000,2.5\n\
B,B-1,3.7,100.5,3000,2.5\n\
C,C-1,3.70,100.50,3000.0,2.50\n\
A,A-2,3.7,100.5,3000,2.5\n\
D,D-1,3.7,100.5,3001,2.5\n\
E,E-1,3.7,100.5,3000,2.501\n";
        let cat = Catalogue::from_text("t.csv", text);
        let id = |s: &str| cat.find_candidate(s).unwrap();
        let ch = run(&cat, &CheckSettings::default());
        for s in ["A-1", "B-1", "C-1", "A-2"] {
            assert!(
                ch.flags(id(s)).contains(Flag::MixedHost),
                "{s}: {}",
                ch.why(id(s))
            );
        }
        for s in ["D-1", "E-1"] {
            assert!(
                !ch.flags(id(s)).contains(Flag::MixedHost),
                "{s}: {}",
                ch.why(id(s))
            );
        }
        // One signal group: A-1 stands for it, every other copy follows.
        let g = ch.groups().group_of(id("A-1")).unwrap();
        assert_eq!(ch.groups().members(g).len(), 4);
        assert!(ch.why(id("C-1")).contains("also listed as A-1 on star A"));
        assert!(ch.why(id("A-1")).contains("also listed as B-1 on star B"));
        // The ties a false positive at B holds: A and C (each once).
        let mut tied: Vec<&str> = ties(&cat, &[id("B-1")])
            .into_iter()
            .map(|(_, c)| cat.candidate_id(c))
            .collect();
        tied.sort_unstable();
        assert_eq!(tied, ["A-1", "A-2", "C-1"]);
    }
}

//! Signal groups: candidates of one star that are one physical signal — the
//! same signal found twice (`near-twin`), a period alias (`harmonic`), or
//! the primary and secondary eclipse of one binary (`half-phase`). A group
//! counts once in the multiplicity model, as its representative: the member
//! with the highest SNR, else the deepest, else the first in the file
//! (docs/science.md §3.1).

use crate::catalogue::{CandidateId, Catalogue, Field};
use crate::flags::{Flag, FlagSet};

const NONE: u32 = u32::MAX;

/// The signal groups of a catalogue, members best first.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct SignalGroups {
    /// Group of each candidate; `NONE` when it is alone. Empty while no
    /// candidate has a group (4 bytes a candidate the checks need not
    /// hold while they run).
    of: Vec<u32>,
    /// Members of group g: `members[start[g]..start[g + 1]]`, best first.
    start: Vec<u32>,
    members: Vec<CandidateId>,
    /// The kinds of link that joined each group.
    kinds: Vec<FlagSet>,
}

impl SignalGroups {
    /// No groups (for any number of candidates: the per-candidate array
    /// is made when the first group is).
    pub fn none() -> SignalGroups {
        SignalGroups {
            of: Vec::new(),
            start: vec![0],
            members: Vec::new(),
            kinds: Vec::new(),
        }
    }

    /// Groups from links between candidates (a, b, kind): the connected
    /// components, each ordered best first by [`rank_key`].
    pub fn from_links(cat: &Catalogue, links: &[(CandidateId, CandidateId, Flag)]) -> SignalGroups {
        let n = cat.len();
        let mut g = SignalGroups::none();
        if links.is_empty() {
            return g;
        }
        g.of = vec![NONE; n];
        // Union-find over the linked candidates only.
        let mut parent: std::collections::HashMap<CandidateId, CandidateId> = Default::default();
        fn find(
            p: &mut std::collections::HashMap<CandidateId, CandidateId>,
            x: CandidateId,
        ) -> CandidateId {
            let mut r = x;
            while let Some(&up) = p.get(&r) {
                if up == r {
                    break;
                }
                r = up;
            }
            let mut y = x;
            while y != r {
                let up = p[&y];
                p.insert(y, r);
                y = up;
            }
            r
        }
        for &(a, b, _) in links {
            parent.entry(a).or_insert(a);
            parent.entry(b).or_insert(b);
            let (ra, rb) = (find(&mut parent, a), find(&mut parent, b));
            if ra != rb {
                parent.insert(ra.max(rb), ra.min(rb));
            }
        }
        let mut comps: std::collections::BTreeMap<CandidateId, Vec<CandidateId>> =
            Default::default();
        let keys: Vec<CandidateId> = parent.keys().copied().collect();
        for c in keys {
            let r = find(&mut parent, c);
            comps.entry(r).or_default().push(c);
        }
        for (_, mut m) in comps {
            m.sort_by(|&a, &b| {
                rank_key(cat, a)
                    .partial_cmp(&rank_key(cat, b))
                    .unwrap_or(std::cmp::Ordering::Equal)
                    .then(a.cmp(&b))
            });
            let id = g.kinds.len() as u32;
            for &c in &m {
                g.of[c as usize] = id;
            }
            g.members.extend_from_slice(&m);
            g.start.push(g.members.len() as u32);
            g.kinds.push(FlagSet::EMPTY);
        }
        for &(a, _, kind) in links {
            let id = g.of[a as usize] as usize;
            g.kinds[id].insert(kind);
        }
        g
    }

    /// The group of candidate `c`, if it has one.
    #[inline]
    pub fn group_of(&self, c: CandidateId) -> Option<u32> {
        match self.of.get(c as usize) {
            Some(&g) if g != NONE => Some(g),
            _ => None,
        }
    }

    /// Members of group g, best first.
    pub fn members(&self, g: u32) -> &[CandidateId] {
        &self.members[self.start[g as usize] as usize..self.start[g as usize + 1] as usize]
    }

    /// The kinds of link that joined group g.
    pub fn kinds(&self, g: u32) -> FlagSet {
        self.kinds[g as usize]
    }

    /// Number of groups.
    pub fn len(&self) -> usize {
        self.kinds.len()
    }

    pub fn is_empty(&self) -> bool {
        self.kinds.is_empty()
    }
}

/// The order of a group's members, best first: highest SNR, then deepest
/// (docs/science.md §3.1; the rule, common practice). Smaller sorts first.
pub fn rank_key(cat: &Catalogue, c: CandidateId) -> (f64, f64) {
    let neg = |v: Option<f64>| v.filter(|x| x.is_finite()).map_or(f64::INFINITY, |x| -x);
    (
        neg(cat.value(Field::Snr, c)),
        neg(cat.value(Field::DepthPpm, c)),
    )
}

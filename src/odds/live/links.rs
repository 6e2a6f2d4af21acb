//! Other star ids of one star (docs/science.md §3.4): a vetter's
//! rejection of a candidate as a false positive holds the candidates of
//! every id of its star, as it holds its siblings (§1.1). The links come
//! from `checks::links_of`, asked for the stars such a rejection names.

use super::*;
use crate::checks::StarLink;

impl Live {
    /// Takes the other star ids of `asked` (`checks::links_of` of them):
    /// from now on a vetter's rejection of a candidate as a false positive
    /// at one id holds the candidates of the others (docs/science.md §3.4).
    /// The stars at both ends of a new link are placed again.
    pub fn add_links(&mut self, asked: &[StarId], links: Vec<StarLink>) {
        let mut touched: Vec<StarId> = Vec::new();
        for l in links {
            let i = self
                .links
                .partition_point(|o| (o.star, o.other) < (l.star, l.other));
            if self
                .links
                .get(i)
                .is_some_and(|o| (o.star, o.other) == (l.star, l.other))
            {
                continue;
            }
            touched.extend([l.star, l.other]);
            self.links.insert(i, l);
        }
        self.links_asked.extend_from_slice(asked);
        self.links_asked.sort_unstable();
        self.links_asked.dedup();
        if !touched.is_empty() {
            touched.sort_unstable();
            touched.dedup();
            self.replace_stars(&touched);
        }
    }

    /// Whether the other ids of star s were looked for ([`Live::add_links`]).
    pub fn links_asked(&self, s: StarId) -> bool {
        self.links_asked.binary_search(&s).is_ok()
    }

    /// Every link between star ids of one star this state holds, and the
    /// stars whose links were looked for: what a rebuild takes again.
    pub fn links(&self) -> (&[StarId], &[StarLink]) {
        (&self.links_asked, &self.links)
    }

    /// The other ids of star s.
    pub fn links_of(&self, s: StarId) -> &[StarLink] {
        let from = self.links.partition_point(|l| l.star < s);
        let to = from + self.links[from..].partition_point(|l| l.star == s);
        &self.links[from..to]
    }

    /// A candidate of another id of star s (a link of [`Live::add_links`])
    /// rejected as a false positive under `decision`, with its reason and
    /// the link: its star hosts a false positive (§1.1, §3.4).
    pub(super) fn linked_fp(
        &self,
        s: StarId,
        decision: impl Fn(CandidateId) -> Decision,
    ) -> Option<(CandidateId, Reason, &StarLink)> {
        self.links_of(s).iter().find_map(|l| {
            self.index.members(l.other).iter().find_map(|&m| {
                let r = decision(m).reason().filter(|&r| names_false_positive(r))?;
                Some((m, r, l))
            })
        })
    }
}

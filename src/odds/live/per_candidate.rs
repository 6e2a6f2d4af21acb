//! Per-candidate values of the live odds that are often one value for the
//! whole catalogue.

/// A value per candidate that is often one value for all: stored once
/// then (a catalogue without fpp or an f by size: tens of MB fewer at 10⁷
/// candidates, each written before it is read).
#[derive(Clone, Debug)]
pub(super) enum PerCandidate<T> {
    All(T),
    Each(Vec<T>),
}

impl<T: Copy> PerCandidate<T> {
    #[inline]
    pub(super) fn get(&self, c: usize) -> T {
        match self {
            PerCandidate::All(v) => *v,
            PerCandidate::Each(v) => v[c],
        }
    }
}

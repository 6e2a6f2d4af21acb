//! How far a run of the catalogue checks is, for the browser's status line
//! while they run in the background.

use std::sync::atomic::{AtomicU64, Ordering};

/// Work done by a run of the catalogue checks, in units of one candidate:
/// each candidate counts once in the per-candidate checks, once in its
/// star's checks, and once in the echo search (counted by its stages), so
/// a run of n candidates is done at 3n. The parts run at once on several
/// threads; the count only grows.
#[derive(Debug, Default)]
pub struct CheckProgress {
    done: AtomicU64,
}

/// How many candidates' work a part adds at once (often enough for a
/// status line, rarely enough to cost nothing).
pub(super) const STEP: usize = 1 << 16;

impl CheckProgress {
    pub(super) fn add(&self, candidates: usize) {
        self.done.fetch_add(candidates as u64, Ordering::Relaxed);
    }

    /// Whole percent done of a run over `n` candidates (100 once finished).
    pub fn percent(&self, n: usize) -> u8 {
        let total = 3 * n as u64;
        if total == 0 {
            return 100;
        }
        (self.done.load(Ordering::Relaxed).min(total) * 100 / total) as u8
    }
}

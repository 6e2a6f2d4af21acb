//! How far a run of the catalogue checks is, for the browser's status line
//! while they run in the background, and (when asked) the flags found so
//! far, for the browser's flag columns.

use std::sync::Mutex;
use std::sync::atomic::{AtomicU64, Ordering};

use crate::flags::FlagSet;

/// Work done by a run of the catalogue checks, in units of one candidate:
/// each candidate counts once in the per-candidate checks, once in its
/// star's checks, and once in the echo search (counted by its stages), so
/// a run of n candidates is done at 3n. The parts run at once on several
/// threads; the count only grows.
#[derive(Debug, Default)]
pub struct CheckProgress {
    done: AtomicU64,
    /// Whether the flags found so far are shared (the browser asks).
    sharing: bool,
    /// The flags of the stages finished so far, the latest only, until
    /// taken.
    flags: Mutex<Option<Vec<FlagSet>>>,
}

/// How many candidates' work a part adds at once (often enough for a
/// status line, rarely enough to cost nothing).
pub(super) const STEP: usize = 1 << 16;

impl CheckProgress {
    /// A progress that also keeps the flags found at the end of each stage
    /// of the run (per candidate, per star, across stars), for
    /// [`CheckProgress::take_flags`]. Flags only grow from one stage to the
    /// next.
    pub fn sharing_flags() -> CheckProgress {
        CheckProgress {
            sharing: true,
            ..CheckProgress::default()
        }
    }

    /// Keeps a copy of the flags found so far, when they are shared.
    pub(super) fn publish(&self, flags: &[FlagSet]) {
        if self.sharing {
            *self.flags.lock().unwrap_or_else(|e| e.into_inner()) = Some(flags.to_vec());
        }
    }

    /// The flags of the latest stage finished since the last call, if any.
    pub fn take_flags(&self) -> Option<Vec<FlagSet>> {
        self.flags.lock().unwrap_or_else(|e| e.into_inner()).take()
    }

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

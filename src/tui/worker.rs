//! The browser's light-curve worker: binned folds and diagnostics computed
//! off the drawing thread, latest request first, with a bounded number of
//! light curves kept in memory.

use std::sync::{Arc, mpsc};
use std::time::Duration;

use super::app::SignalResult;

/// How many stars' light curves the browser keeps read (a 1.5M-point
/// light curve and its trend take about 50 MB).
const CURVES_KEPT: usize = 4;

/// How many light curves are read at once: a move during a read starts the
/// new one at once, instead of after the read nobody waits for.
const READS_AT_ONCE: usize = 2;

/// How long no newer move must come before a second read starts (key
/// repeat sends one every 30-40 ms).
const SETTLE: Duration = Duration::from_millis(60);

/// What the light-curve readers share.
struct Readers {
    cat: Arc<crate::catalogue::Catalogue>,
    finder: crate::lightcurve::Finder,
    detrend: crate::lightcurve::analysis::DetrendSettings,
    cache: crate::lightcurve::Cache,
    /// The stars whose light curves stay in memory, latest last: moving
    /// among siblings and back a few stars reads nothing again, and a
    /// session over thousands of stars holds a few curves, not all.
    kept: std::sync::Mutex<std::collections::VecDeque<crate::catalogue::StarId>>,
    /// The candidates being worked on now.
    busy: std::sync::Mutex<Vec<u32>>,
    /// The latest candidate asked for.
    latest: std::sync::atomic::AtomicU32,
}

impl Readers {
    /// Whether the vetter has moved to another star than `c`'s.
    fn stale(&self, c: u32) -> bool {
        let latest = self.latest.load(std::sync::atomic::Ordering::Relaxed);
        self.cat.star_of(latest) != self.cat.star_of(c)
    }

    /// The signal of `c`, or `None` when the vetter moved to another star
    /// meanwhile: the work is done in stages (read, trend, diagnostics,
    /// then the folds), each kept in the cache, and it stops between them
    /// once nobody waits for it; a text light curve's read stops part way
    /// (`crate::lightcurve::stoppable`), so that the read of the star the
    /// vetter stopped at has the machine to itself.
    fn show(self: &Arc<Self>, c: u32) -> Option<SignalResult> {
        let (cat, star) = (&*self.cat, self.cat.star_of(c));
        let what = format!("showing {}", cat.candidate_id(c));
        if self.finder.has(cat, star) {
            let asked = Arc::clone(self);
            let staged = crate::contain::contained(&what, || {
                let read = crate::lightcurve::stoppable(
                    move || asked.stale(c),
                    || self.cache.read_curve(&self.finder, cat, star),
                );
                let Some(curve) = read else {
                    return false;
                };
                if let (Ok(lc), false) = (curve.as_ref(), self.stale(c)) {
                    self.cache.detrended(cat, star, lc, &self.detrend);
                    if !self.stale(c) {
                        self.cache.diagnostics(&self.finder, cat, c, &self.detrend);
                    }
                }
                true
            });
            if staged == Ok(false) || (staged.is_ok() && self.stale(c)) {
                return None;
            }
        }
        let shown = crate::contain::contained(&what, || {
            match crate::lightcurve::show(
                &self.cache,
                &self.finder,
                &self.cat,
                c,
                &self.detrend,
                60,
            ) {
                Ok(shown) => match shown.diagnostics.as_ref() {
                    Ok(d) => SignalResult::Data {
                        source: shown.lc().label(),
                        diagnostics: Box::new(d.clone()),
                        views: Box::new(shown.views.clone()),
                    },
                    Err(e) => SignalResult::Model(e.clone()),
                },
                Err(why) => SignalResult::Model(why),
            }
        })
        .unwrap_or_else(SignalResult::Model);
        Some(shown)
    }

    /// Marks a star as the latest looked at; forgets the oldest beyond
    /// [`CURVES_KEPT`] that no reader is using.
    fn keep(&self, star: crate::catalogue::StarId) {
        let Ok(mut kept) = self.kept.lock() else {
            return;
        };
        kept.retain(|&s| s != star);
        kept.push_back(star);
        while kept.len() > CURVES_KEPT {
            if let Some(old) = kept.pop_front() {
                self.cache.forget(old);
            }
        }
    }

    /// After a read: a star no longer kept (the vetter moved far on while
    /// it was read) is forgotten at once.
    fn done(&self, c: u32) {
        let star = self.cat.star_of(c);
        if let Ok(mut busy) = self.busy.lock() {
            busy.retain(|&b| b != c);
        }
        if self.kept.lock().is_ok_and(|k| !k.contains(&star)) {
            self.cache.forget(star);
        }
    }
}

/// The light-curve worker: computes binned folds and diagnostics off the
/// drawing thread and sends them back. Requests are served latest first:
/// those overtaken while waiting are dropped (the browser asks again if
/// the vetter comes back); a new one starts while an older read runs (up
/// to [`READS_AT_ONCE`]), and one whose star is being read waits for that
/// read; a read whose star the vetter has left stops between its stages.
pub(super) fn spawn_worker(
    cat: Arc<crate::catalogue::Catalogue>,
    finder: crate::lightcurve::Finder,
    detrend: crate::lightcurve::analysis::DetrendSettings,
    results: mpsc::Sender<(u32, SignalResult)>,
) -> mpsc::Sender<u32> {
    let (tx, rx) = mpsc::channel::<u32>();
    std::thread::spawn(move || {
        let readers = Arc::new(Readers {
            cat,
            finder,
            detrend,
            cache: Default::default(),
            kept: Default::default(),
            busy: Default::default(),
            latest: Default::default(),
        });
        let (done_tx, done_rx) = mpsc::channel::<()>();
        let latest = |c: u32| {
            readers
                .latest
                .store(c, std::sync::atomic::Ordering::Relaxed)
        };
        while let Ok(mut c) = rx.recv() {
            latest(c);
            let mut settled = false;
            loop {
                // Only the latest request matters: the vetter has moved on.
                while let Ok(newer) = rx.try_recv() {
                    (c, settled) = (newer, false);
                    latest(c);
                }
                let star = readers.cat.star_of(c);
                let Ok(busy) = readers.busy.lock() else {
                    return;
                };
                // Asked again while being worked on (that work may have
                // stopped when the vetter moved away): it waits for its
                // star's read like any other, and is answered from the cache.
                let (running, free) = (
                    busy.len(),
                    busy.len() < READS_AT_ONCE
                        && !busy.iter().any(|&b| readers.cat.star_of(b) == star),
                );
                drop(busy);
                if running == 0 {
                    break;
                }
                // A read is running: let a burst of moves end before
                // starting another, so the second read is the last move's.
                if !settled {
                    match rx.recv_timeout(SETTLE) {
                        Ok(newer) => {
                            c = newer;
                            latest(c);
                        }
                        Err(mpsc::RecvTimeoutError::Timeout) => settled = true,
                        Err(mpsc::RecvTimeoutError::Disconnected) => return,
                    }
                    continue;
                }
                if free {
                    break;
                }
                let _ = done_rx.recv_timeout(Duration::from_millis(25));
            }
            readers.keep(readers.cat.star_of(c));
            if let Ok(mut busy) = readers.busy.lock() {
                busy.push(c);
            }
            let (readers, results, done_tx) =
                (Arc::clone(&readers), results.clone(), done_tx.clone());
            std::thread::spawn(move || {
                let out = readers.show(c);
                readers.done(c);
                if let Some(out) = out {
                    let _ = results.send((c, out));
                }
                let _ = done_tx.send(());
            });
        }
    });
    tx
}

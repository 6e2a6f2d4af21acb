//! The browser's work behind the table. First the catalogue's second read
//! (its values: the first read kept ids only, `app::Values`); once the
//! values are in, the checks, the light-curve worker and the orders no
//! decision moves, each on a thread of its own, and their results taken
//! into the App as they come.

use std::sync::atomic::{AtomicU64, Ordering::Relaxed};
use std::sync::{Arc, mpsc};

use super::Args;
use super::app::{self, App, Effect, Input};
use super::worker::spawn_worker;
use crate::catalogue::Catalogue;

/// The second read of the catalogue, on its thread.
pub(super) struct ValuesRead {
    rx: mpsc::Receiver<Result<app::ValuesIn, String>>,
    read: Arc<AtomicU64>,
    total: u64,
}

impl ValuesRead {
    /// Reads the whole catalogue on a thread, at the lowest priority: it
    /// starts as the table is about to be drawn and takes only the time
    /// the browser leaves idle, then all of it. `stamp` is the file's stamp
    /// at the first read (when it could be trusted): a file whose stamp is
    /// another after this read was written meanwhile, and is refused.
    /// The read takes the ids of `ids` (the first read's catalogue) when
    /// its rows name the same candidates and stars (`LoadOptions::ids_from`).
    /// It then builds the odds of the whole catalogue from `odds` (those
    /// of the first read, `app::OddsAhead`).
    pub(super) fn start(
        args: &Args,
        stamp: Option<String>,
        ids: Arc<Catalogue>,
        odds: app::OddsFrom,
    ) -> ValuesRead {
        let path = args.vetting.input.catalogue.clone();
        let total = path
            .as_ref()
            .and_then(|p| std::fs::metadata(p).ok())
            .map_or(0, |m| m.len());
        let read = Arc::new(AtomicU64::new(0));
        let (tx, rx) = mpsc::channel();
        let (input, counted) = (args.vetting.input.clone(), Arc::clone(&read));
        std::thread::spawn(move || {
            // The loader's threads, started from this one, inherit it.
            crate::parallel::run_when_idle();
            let whole = input.load_values(counted, ids).map_err(|e| e.to_string());
            let now = path.as_deref().and_then(crate::fingerprint::file_stamp);
            let _ = tx.send(match (whole, stamp) {
                (Ok(_), Some(then)) if now.as_deref() != Some(then.as_str()) => {
                    Err("the catalogue file changed after it was first read; \
                     restart starsift to read it again"
                        .into())
                }
                (whole, _) => whole.map(|cat| app::ValuesIn {
                    odds: Some(Box::new(app::OddsAhead::build(&cat, odds))),
                    cat: Arc::new(cat),
                }),
            });
        });
        ValuesRead { rx, read, total }
    }

    /// How far the read is, then the catalogue, into the App; true when
    /// the read is over (values in or not).
    pub(super) fn poll(&self, app: &mut App, effects: &mut Vec<Effect>) -> bool {
        match self.rx.try_recv() {
            Ok(read) => {
                effects.extend(app.update(Input::Values(read)));
                true
            }
            Err(mpsc::TryRecvError::Disconnected) => {
                effects.extend(app.update(Input::Values(Err(
                    "the read stopped on an internal error".into(),
                ))));
                true
            }
            Err(mpsc::TryRecvError::Empty) => {
                // The bytes read, at most 99 %: the last chunks' rows and
                // the columns' rules come after the last byte (~0.5 s at
                // 10M rows), and 100 % would say the values are in.
                let percent = (100 * self.read.load(Relaxed))
                    .checked_div(self.total)
                    .map_or(0, |p| p.min(99) as u8);
                if app.values != app::Values::Reading(percent) {
                    effects.extend(app.update(Input::ValuesRead(percent)));
                }
                false
            }
        }
    }
}

/// The threads that need the catalogue's values, and what they send.
pub(super) struct Running {
    pub(super) worker: mpsc::Sender<u32>,
    results: mpsc::Receiver<(u32, app::SignalResult)>,
    checks: mpsc::Receiver<Checked>,
    progress: mpsc::Receiver<(usize, usize)>,
    counted: Arc<crate::checks::CheckProgress>,
    orders: mpsc::Receiver<Orders>,
    /// The ledger read again after another vetter's decisions, when the
    /// browser has a ledger ([`watch_team`]).
    team: Option<mpsc::Receiver<crate::ledger::Decided>>,
}

/// Every star in the order of each (sort, descending) no decision moves.
type Orders = Vec<((app::SortKey, bool), Vec<crate::catalogue::StarId>)>;

/// The checks, the odds built with them, and the light curves' run.
type Checked = (
    crate::checks::Checks,
    Result<crate::odds::Live, crate::odds::ModelError>,
    crate::checks::LightcurveRun,
);

impl Running {
    /// Starts the light-curve worker, the checks (and, when asked, the
    /// light-curve checks) and the static orders on the App's catalogue.
    pub(super) fn start(app: &App, args: &Args, finder: &crate::lightcurve::Finder) -> Running {
        let (res_tx, results) = mpsc::channel();
        let worker = spawn_worker(
            Arc::clone(&app.cat),
            finder.clone(),
            args.vetting.lc.detrend(),
            res_tx,
        );
        let (checks_tx, checks) = mpsc::channel();
        let counted = Arc::new(crate::checks::CheckProgress::sharing_flags());
        let (progress_tx, progress) = mpsc::channel();
        {
            let cat = Arc::clone(&app.cat);
            let settings = args.vetting.checks.settings();
            let lc = args.vetting.lc.clone();
            let finder = finder.clone();
            let counted = Arc::clone(&counted);
            // The odds with the checks are built there too, from the decisions
            // of now; those made meanwhile are applied when they arrive.
            let (model, decisions, gone, disputes) = (
                app.live.model().clone(),
                app::decisions_of(&app.cat, &app.live),
                app.live.unseen_fps().to_vec(),
                app.live.disputes().to_vec(),
            );
            std::thread::spawn(move || {
                let mut checks = crate::checks::run_counted(&cat, &settings, &counted);
                let run = if lc.wanted() {
                    crate::checks::run_lightcurves_counted(
                        &cat,
                        &finder,
                        &lc.detrend(),
                        &mut checks,
                        |done, total| {
                            let _ = progress_tx.send((done, total));
                        },
                    )
                } else {
                    Default::default()
                };
                let live =
                    crate::session::odds_with(&cat, model, &checks, decisions, &gone, disputes);
                let _ = checks_tx.send((checks, live, run));
            });
        }
        // The orders no decision moves (by star id, by shortest period), sorted
        // in the background too, so that the first such sort is not a wait; at
        // the lowest priority, so that on a machine of few cores they take no
        // time from the checks (a sort asked for before they arrive is sorted
        // then).
        let (orders_tx, orders) = mpsc::channel();
        {
            let cat = Arc::clone(&app.cat);
            std::thread::spawn(move || {
                crate::parallel::run_when_idle();
                let orders: Vec<_> = [app::SortKey::Star, app::SortKey::Period]
                    .into_iter()
                    .flat_map(|k| [(k, false), (k, true)])
                    .filter_map(|(k, d)| Some(((k, d), app::static_order(&cat, k, d)?)))
                    .collect();
                let _ = orders_tx.send(orders);
                // And the index of the star ids' other spellings, which the
                // first search would otherwise build.
                cat.prepare_spellings();
            });
        }
        let team = app.ledger.as_ref().map(|l| {
            watch_team(
                l.path().to_path_buf(),
                app.vetter.clone(),
                args.vetting.ledger.vetter.clone(),
                Arc::clone(&app.cat),
                app.ledger_seen,
            )
        });
        Running {
            worker,
            results,
            checks,
            progress,
            counted,
            orders,
            team,
        }
    }

    /// Takes what the threads sent since the last look into the App;
    /// true when anything came.
    pub(super) fn poll(&self, app: &mut App, effects: &mut Vec<Effect>) -> bool {
        let mut came = false;
        let percent = self.counted.percent(app.cat.len());
        if app.checks_pending && app.lc_progress.is_none() && percent != app.checks_percent {
            effects.extend(app.update(Input::ChecksDone(percent)));
            came = true;
        }
        if let Some(flags) = self.counted.take_flags() {
            effects.extend(app.update(Input::FlagsSoFar(flags)));
            came = true;
        }
        if let Some((done, total)) = self.progress.try_iter().last() {
            effects.extend(app.update(Input::Progress(done, total)));
            came = true;
        }
        match self.checks.try_recv() {
            Ok((checks, live, run)) => {
                came = true;
                let note = checks.notes().first().cloned();
                effects.extend(app.update(Input::ChecksBuilt(Box::new((checks, live)))));
                if let Some(n) = run.notice {
                    effects.extend(app.update(Input::Notice(n)));
                } else if let Some((_, first)) = run.errors.first() {
                    effects.extend(app.update(Input::Notice(format!(
                        "{} light curves could not be read (first: {first})",
                        run.errors.len(),
                    ))));
                } else if let Some(n) = note {
                    effects.extend(app.update(Input::Notice(n)));
                }
            }
            Err(mpsc::TryRecvError::Disconnected) if app.checks_pending => {
                came = true;
                effects.extend(app.update(Input::ChecksFailed(
                    "the checks stopped on an internal error: flags and verdicts are not shown; \
                     run `starsift checks` on this catalogue to see the error"
                        .into(),
                )));
            }
            Err(_) => {}
        }
        if let Ok(orders) = self.orders.try_recv() {
            effects.extend(app.update(Input::Orders(orders)));
            came = true;
        }
        if let Some(decided) = self.team.as_ref().and_then(|t| t.try_iter().last()) {
            effects.extend(app.update(Input::Team(Box::new(decided))));
            came = true;
        }
        while let Ok((c, r)) = self.results.try_recv() {
            effects.extend(app.update(Input::Signal(c, Box::new(r))));
            came = true;
        }
        came
    }
}

/// How often the browser looks at its ledger for the team's decisions: a
/// query of the rows after the last seen (common practice, no source: a
/// vetter's decisions come seconds apart).
const TEAM_LOOK: std::time::Duration = std::time::Duration::from_secs(2);

/// Looks at the ledger at `path` every [`TEAM_LOOK`] on a thread of its own
/// (its own connection) for decisions after row `after`; when a vetter
/// other than `me` has recorded some, reads the decisions again as the
/// browser did at its start (`view`: of one vetter, or all) and sends
/// them. Ends when the browser stops listening, or the ledger cannot be
/// opened (the browser's own decisions are unaffected).
fn watch_team(
    path: std::path::PathBuf,
    me: String,
    view: Option<String>,
    cat: Arc<Catalogue>,
    mut after: i64,
) -> mpsc::Receiver<crate::ledger::Decided> {
    let (tx, rx) = mpsc::channel();
    std::thread::spawn(move || {
        let Ok(ledger) = crate::ledger::Ledger::open(&path) else {
            return;
        };
        loop {
            std::thread::sleep(TEAM_LOOK);
            let Ok((newest, others)) = ledger.since(after, &me) else {
                continue;
            };
            if !others {
                after = newest;
                continue;
            }
            if let Ok(decided) = ledger.decided(&cat, view.as_deref()) {
                after = decided.newest;
                if tx.send(decided).is_err() {
                    return;
                }
            }
        }
    });
    rx
}

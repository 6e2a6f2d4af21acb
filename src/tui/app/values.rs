//! The catalogue's values, arriving after the table. The browser's first
//! read keeps the ids, the star index and depth only (as `summary` does),
//! so that the table is up in about `summary`'s time; a second read brings
//! the whole catalogue. Nothing that needs a value runs before it is in:
//! no fold, no check (the shell starts them after `Input::Values`), no
//! figure; a sort or a filter by a value is done again when it arrives.

use super::*;
use crate::checks::UnseenFp;
use crate::odds::{Model, ModelError};

/// Whether the catalogue's values are in.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Values {
    /// The whole catalogue is loaded.
    In,
    /// Ids only: the values are being read, this whole percent so far.
    Reading(u8),
    /// Ids only: the second read failed or found other rows; nothing
    /// that needs a value is shown.
    Missing,
}

/// The catalogue's second read, as it arrives.
#[derive(Clone, Debug)]
pub struct ValuesIn {
    pub cat: std::sync::Arc<Catalogue>,
    /// The odds built from it on the read's thread, if they were.
    pub odds: Option<Box<OddsAhead>>,
}

impl From<std::sync::Arc<Catalogue>> for ValuesIn {
    fn from(cat: std::sync::Arc<Catalogue>) -> ValuesIn {
        ValuesIn { cat, odds: None }
    }
}

/// What the odds are built from when the values arrive
/// (`App::odds_of_the_values`): the model, every candidate's decision, and
/// the stars known to host a false positive that no loaded row shows, and
/// where vetters disagree on one.
#[derive(Clone, Debug, PartialEq)]
pub struct OddsFrom {
    model: Model,
    decisions: Vec<Decision>,
    gone: Vec<UnseenFp>,
    disputes: Vec<crate::odds::Dispute>,
}

impl OddsFrom {
    /// As the odds `live` of the first read (ids only) stand.
    pub fn of(cat: &Catalogue, live: &Live) -> OddsFrom {
        OddsFrom {
            model: live.model().clone(),
            decisions: decisions_of(cat, live),
            gone: live.unseen_fps().to_vec(),
            disputes: live.disputes().to_vec(),
        }
    }

    /// The odds of the whole catalogue `cat` from these and `checks`.
    fn odds(self, cat: &Catalogue, checks: &Checks) -> Result<Live, ModelError> {
        crate::session::odds_with(
            cat,
            self.model,
            checks,
            self.decisions,
            &self.gone,
            self.disputes,
        )
    }
}

/// The odds of the whole catalogue built on the second read's thread
/// (~0.3 s at 10M candidates that the browser's thread need not spend),
/// with what they were built from: taken only if the App still stands
/// there when they arrive (no decision made meanwhile).
#[derive(Clone, Debug)]
pub struct OddsAhead {
    from: OddsFrom,
    odds: Result<Live, ModelError>,
}

impl OddsAhead {
    /// The odds of `cat` from `from` (`OddsFrom::of` the first read's),
    /// before any check has run (the checks start once the values are in).
    pub fn build(cat: &Catalogue, from: OddsFrom) -> OddsAhead {
        OddsAhead {
            odds: from.clone().odds(cat, &Checks::none(cat.len())),
            from,
        }
    }

    /// Odds said to be built from `from` (tests: which odds were taken).
    #[cfg(test)]
    pub fn planted(from: OddsFrom, odds: Live) -> OddsAhead {
        OddsAhead {
            from,
            odds: Ok(odds),
        }
    }
}

impl App {
    /// Takes the whole catalogue of the second read in place of the ids
    /// of the first, once it is sure to hold the same rows
    /// (`Catalogue::same_rows`): every candidate and star keeps its number,
    /// so the selection and the decisions stand, and the odds are built
    /// again from them with the values. A file changed
    /// between the two reads, or a read that failed, leaves the ids and
    /// says why; the checks are then not run and no verdict is called
    /// validated.
    pub(super) fn take_values(&mut self, read: Result<ValuesIn, String>) {
        if !matches!(self.values, Values::Reading(_)) {
            return;
        }
        let why = match read {
            Ok(ValuesIn { cat, odds }) if cat.same_rows(&self.cat) => {
                // What the loader says of the values (placeholders read as
                // unknown, units), which the ids' read could not say.
                let said = self.cat.load_warnings();
                let new: Vec<String> = (cat.load_warnings().into_iter())
                    .filter(|w| !said.contains(w))
                    .collect();
                if !new.is_empty() {
                    let new = new.join("; ");
                    self.message = Some(match self.message.take() {
                        Some(m) => format!("{m} · {new}"),
                        None => new,
                    });
                }
                self.cat = cat;
                self.values = Values::In;
                self.odds_of_the_values(odds);
                // What was computed from the values' absence.
                self.radius = std::cell::OnceCell::new();
                self.orders.clear();
                self.refresh_view();
                return;
            }
            Ok(_) => "the catalogue file changed between its two reads (ids, then values); \
                      restart starsift to read it again"
                .to_string(),
            Err(e) => format!("the catalogue's values could not be read: {e}"),
        };
        self.values = Values::Missing;
        self.checks_fail(format!("{why}: no flag, verdict or light curve is shown"));
    }

    /// The checks will not come (they failed, or the values they read
    /// could not be): said on the message line, and the verdicts withheld
    /// for good.
    pub(super) fn checks_fail(&mut self, why: String) {
        self.checks_pending = false;
        self.checks_failed = true;
        // No flag is shown that the verdicts have not seen.
        self.flags_so_far = None;
        self.message = Some(why);
    }

    /// The odds again, from the whole catalogue and every decision now:
    /// the priors of an fpp column, f by planet size and the other ids of
    /// a star rejected as a false positive (found by position) all read
    /// values. Nothing of the odds built from the ids is kept: their links
    /// were looked for without positions. The odds built `ahead` on the
    /// read's thread are these when they were built from what the App
    /// holds now; else they are built here.
    fn odds_of_the_values(&mut self, ahead: Option<Box<OddsAhead>>) {
        // The checks have not run (they start once the values are in):
        // `self.checks` are none, as `OddsAhead::build`'s.
        let now = OddsFrom::of(&self.cat, &self.live);
        let odds = match ahead {
            Some(ahead) if ahead.from == now => ahead.odds,
            _ => now.odds(&self.cat, &self.checks),
        };
        match odds {
            Ok(live) => self.live = live,
            Err(e) => self.message = Some(format!("odds not rebuilt with the values: {e}")),
        }
    }

    /// True while no candidate may be called validated: before the checks
    /// have arrived, and for good when they could not run.
    pub fn verdicts_withheld(&self) -> bool {
        self.checks_pending || self.checks_failed
    }
}

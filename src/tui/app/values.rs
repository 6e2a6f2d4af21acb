//! The catalogue's values, arriving after the table. The browser's first
//! read keeps the ids, the star index and depth only (as `summary` does),
//! so that the table is up in about `summary`'s time; a second read brings
//! the whole catalogue. Nothing that needs a value runs before it is in:
//! no fold, no check (the shell starts them after `Input::Values`), no
//! figure; a sort or a filter by a value is done again when it arrives.

use super::*;

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

impl App {
    /// Takes the whole catalogue of the second read in place of the ids
    /// of the first, once it is sure to hold the same rows
    /// (`Catalogue::same_rows`): every candidate and star keeps its number,
    /// so the selection and the decisions stand, and the odds are built
    /// again from them with the values. A file changed
    /// between the two reads, or a read that failed, leaves the ids and
    /// says why; the checks are then not run and no verdict is called
    /// validated.
    pub(super) fn take_values(&mut self, read: Result<std::sync::Arc<Catalogue>, String>) {
        if !matches!(self.values, Values::Reading(_)) {
            return;
        }
        let why = match read {
            Ok(cat) if cat.same_rows(&self.cat) => {
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
                self.odds_of_the_values();
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
    /// were looked for without positions.
    fn odds_of_the_values(&mut self) {
        let decisions = decisions_of(&self.cat, &self.live);
        match crate::session::odds_with(
            &self.cat,
            self.live.model().clone(),
            &self.checks,
            decisions,
            self.live.unseen_fps(),
        ) {
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

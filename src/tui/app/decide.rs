//! Decisions from the browser: one candidate or every candidate of the
//! filter, written to the ledger first (nothing is shown as decided that is
//! not on disk), then to the live odds; undo and redo as ledger rows too.
//! And what the ledger says back: the selected star's history, the
//! catalogue's sighting.

use super::*;

/// A decision as made and as undone.
#[derive(Clone, Debug, PartialEq)]
pub(super) struct Step {
    pub(super) candidate: CandidateId,
    pub(super) before: Decision,
    pub(super) after: Decision,
    pub(super) ledger_id: Option<i64>,
    /// The note written with the decision, written again by a redo.
    pub(super) note: Option<String>,
}

impl App {
    /// The candidates a bulk decision would change: those matching the
    /// filter whose decision is not already `d`.
    pub fn bulk_targets(&self, d: Decision) -> Vec<CandidateId> {
        let shared = self.shared();
        (0..self.cat.len() as CandidateId)
            .filter(|&c| self.live.decision(c) != d && shared.selects(&self.filter, c))
            .collect()
    }

    /// Applies one decision to every candidate matching the filter, in one
    /// ledger transaction (all or nothing), then to the state; one undo
    /// step takes it all back.
    pub(super) fn apply_bulk(&mut self, d: Decision, note: &str) {
        let targets = self.bulk_targets(d);
        let note = match note.trim() {
            "" => "applied to every candidate matching the filter".to_string(),
            n => format!("applied to every candidate matching the filter: {n}"),
        };
        let rows: Vec<(CandidateId, Decision, Option<i64>)> =
            targets.iter().map(|&c| (c, d, None)).collect();
        let Some(group) = self.write(&rows, Some(&note)) else {
            return;
        };
        self.undo.push(group);
        self.redo.clear();
        self.message = Some(format!(
            "{d} applied to {} candidates matching [{}]",
            targets.len(),
            self.filter.text
        ));
    }

    /// Records a decision: the ledger first, then the state, then the odds.
    pub(super) fn decide(&mut self, d: Decision, note: Option<&str>) {
        let Some(c) = self.candidate() else { return };
        if let Some(group) = self.write(&[(c, d, None)], note) {
            self.undo.push(group);
            self.redo.clear();
            if self.advance {
                self.advance_after_decision();
            }
        }
    }

    /// After a decision: the next open candidate of the same system (after
    /// the cursor, then before it), so the vetter sees the siblings' odds
    /// change; only when the system has none left, the next system's.
    fn advance_after_decision(&mut self) {
        let members = self.members();
        let m = members.len();
        let row = self.cand_row.min(m);
        let pick = (row + 1..m)
            .chain(0..row)
            .find(|&i| self.live.decision(members[i]) == Decision::Open);
        match pick {
            Some(i) => {
                self.cand_row = i;
                self.focus = Pane::Candidates;
            }
            None => self.next_open(true),
        }
    }

    /// Writes decisions (candidate, decision, the ledger entry it undoes) to
    /// the ledger in one transaction, then to the state; returns the steps
    /// as made, or `None` (with the reason on the status line) when the
    /// ledger refused them and nothing changed.
    pub(super) fn write(
        &mut self,
        rows: &[(CandidateId, Decision, Option<i64>)],
        note: Option<&str>,
    ) -> Option<Vec<Step>> {
        let mut ids: Vec<Option<i64>> = vec![None; rows.len()];
        if let Some(ledger) = self.ledger.as_mut() {
            let cat = &self.cat;
            let new: Vec<NewDecision> = rows
                .iter()
                .map(|&(c, d, undoes)| NewDecision {
                    candidate: cat.candidate_id(c),
                    star: cat.star_id(cat.star_of(c)),
                    vetter: &self.vetter,
                    decision: d,
                    note,
                    undoes,
                })
                .collect();
            match ledger.record_all(&new) {
                Ok(written) => {
                    for (r, &id) in rows.iter().zip(&written) {
                        self.own_writes.insert(r.0, id);
                    }
                    ids = written.into_iter().map(Some).collect();
                }
                Err(e) => {
                    self.message = Some(format!("NOT SAVED: {e}"));
                    return None;
                }
            }
        }
        let steps: Vec<Step> = rows
            .iter()
            .zip(ids)
            .map(|(&(c, d, _), id)| Step {
                candidate: c,
                before: self.live.decision(c),
                after: d,
                ledger_id: id,
                note: note.map(str::to_string),
            })
            .collect();
        if let [one] = steps.as_slice() {
            self.after_decision(one.candidate, one.after);
        } else {
            let decided: Vec<_> = steps.iter().map(|st| (st.candidate, st.after)).collect();
            set_decisions(&mut self.live, &self.cat, &decided);
            let decided: Vec<CandidateId> = decided.iter().map(|d| d.0).collect();
            self.refresh_disagree(&decided);
            self.forget_orders(false);
            self.refresh_view();
            self.refresh_history(true);
        }
        Some(steps)
    }

    pub(super) fn after_decision(&mut self, c: CandidateId, d: Decision) {
        let s = self.cat.star_of(c);
        let ranks = self.odds_rank_by_size();
        set_decisions(&mut self.live, &self.cat, &[(c, d)]);
        self.refresh_disagree(&[c]);
        let moved = self.live.stars_moved_by(c);
        self.keep_orders(&moved, ranks);
        self.pinned = Some(s);
        self.message = Some(format!(
            "{} {}",
            crate::sanitize::clean(self.cat.candidate_id(c)),
            d
        ));
        let row = self.cand_row;
        self.reposition(s, &moved);
        self.cand_row = row.min(self.members().len().saturating_sub(1));
        self.refresh_history(true);
    }

    /// Takes back the last group of decisions (each recorded in the ledger
    /// as a new entry naming the one it undoes).
    pub(super) fn undo(&mut self) {
        let Some(group) = self.undo.pop() else {
            self.message = Some("nothing to undo".into());
            return;
        };
        let rows: Vec<_> = group
            .iter()
            .rev()
            .map(|st| (st.candidate, st.before, st.ledger_id))
            .collect();
        match self.write(&rows, None) {
            Some(_) => {
                let first = group[0].candidate;
                self.message = Some(match group.len() {
                    1 => format!(
                        "undone: {}",
                        crate::sanitize::clean(self.cat.candidate_id(first))
                    ),
                    n => format!("undone: {} for {n} candidates", group[0].after),
                });
                self.go_to(first);
                self.redo.push(group);
            }
            None => self.undo.push(group),
        }
    }

    pub(super) fn redo(&mut self) {
        let Some(group) = self.redo.pop() else {
            self.message = Some("nothing to redo".into());
            return;
        };
        let rows: Vec<_> = group
            .iter()
            .map(|st| (st.candidate, st.after, None))
            .collect();
        let note = group[0].note.clone();
        match self.write(&rows, note.as_deref()) {
            Some(steps) => {
                if group.len() > 1 {
                    self.message = Some(format!(
                        "redone: {} for {} candidates",
                        group[0].after,
                        group.len()
                    ));
                }
                self.go_to(group[0].candidate);
                self.undo.push(steps);
            }
            None => self.redo.push(group),
        }
    }
}

/// Sets decisions in the odds, as every command's odds have them: the
/// other ids of the stars they reject a candidate of as a false positive
/// are looked for first (`session::link_other_ids`).
pub(super) fn set_decisions(
    live: &mut crate::odds::Live,
    cat: &crate::catalogue::Catalogue,
    decided: &[(CandidateId, crate::decision::Decision)],
) {
    crate::session::link_other_ids(live, cat, decided.iter().copied());
    for &(c, d) in decided {
        live.set_decision(c, d);
    }
}

impl App {
    /// Records the catalogue's sighting in the ledger (`Input::Seen`); a
    /// changed catalogue, or a sighting that could not be recorded, is said
    /// on the message line.
    pub(super) fn record_sighting(
        &mut self,
        seen: Result<(String, String, Option<String>), String>,
    ) {
        let Some(ledger) = self.ledger.as_mut() else {
            return;
        };
        let said = seen.and_then(|(fp, stamp, earlier)| {
            ledger
                .sighting_note(&self.cat.source, &fp, self.cat.len(), Some(&stamp), &|| {
                    earlier.clone()
                })
                .map_err(|e| e.to_string())
        });
        let note = match said {
            Ok(None) => return,
            Ok(Some(note)) => note,
            Err(e) => format!("the ledger could not record this catalogue's fingerprint: {e}"),
        };
        // Said after what the line says already (the start's notes, such as
        // decided candidates the catalogue no longer lists), not over it.
        self.message = Some(match self.message.take() {
            Some(m) => format!("{m} · {note}"),
            None => note,
        });
    }

    /// Where vetters disagree, again for the candidates just decided (from
    /// their own entries), or past [`REFRESH_ONE_BY_ONE`] of them, from the
    /// whole ledger; and so where they disagree whether a candidate is a
    /// false positive (`session::dispute_of`), which the odds hold back.
    /// Call once the decisions are in the odds: a dispute is against the
    /// decision in force. Decisions other vetters record meanwhile come
    /// from the ledger's watcher (`App::take_team`).
    fn refresh_disagree(&mut self, decided: &[CandidateId]) {
        let Some(l) = self.ledger.as_ref() else {
            return;
        };
        if decided.len() > REFRESH_ONE_BY_ONE {
            if let Ok(d) = l.disagreements() {
                self.disagree = crate::selection::disagreeing(&self.cat, &d);
                let now = decisions_of(&self.cat, &self.live);
                let mut disputes = crate::session::disputes_of(&self.cat, &now, &d);
                // The others' calls on candidates this vetter has still not
                // decided on stand (`Decided::others_fp`).
                let mut done: HashSet<CandidateId> = decided.iter().copied().collect();
                done.extend(disputes.iter().map(|x| x.candidate));
                let kept: Vec<_> = (self.live.disputes().iter())
                    .filter(|x| !done.contains(&x.candidate))
                    .cloned()
                    .collect();
                disputes.extend(kept);
                let stars: Vec<_> = disputes.iter().map(|x| x.star).collect();
                crate::session::link_stars(&mut self.live, &self.cat, stars);
                self.live.set_disputes(disputes);
            }
            return;
        }
        for &c in decided {
            // On an error the marks are left as they were: the decision
            // itself is recorded.
            if let Ok(latest) = l.disagreement_on(self.cat.candidate_id(c)) {
                if latest.is_empty() {
                    self.disagree.remove(&c);
                } else {
                    self.disagree.insert(c);
                }
                let d = self.live.decision(c);
                let dispute = crate::session::dispute_of(&self.cat, c, d, &latest);
                if let Some(x) = &dispute {
                    crate::session::link_stars(&mut self.live, &self.cat, [x.star]);
                }
                self.live.set_dispute(c, dispute);
            }
        }
    }

    /// Reloads the selected star's ledger history when the star changed (or
    /// when forced, after a decision).
    pub(super) fn refresh_history(&mut self, force: bool) {
        let star = self.star();
        if !force && star == self.history_of {
            return;
        }
        self.history_of = star;
        self.history = match (star, self.ledger.as_ref()) {
            (Some(s), Some(l)) => {
                let ids: Vec<&str> = self
                    .cat
                    .members(s)
                    .iter()
                    .map(|&c| self.cat.candidate_id(c))
                    .collect();
                let mut h: Vec<crate::ledger::Entry> = Vec::new();
                for id in ids {
                    h.extend(l.history(Some(id)).unwrap_or_default());
                }
                h.sort_by_key(|e| e.id);
                h
            }
            _ => Vec::new(),
        };
    }
}

/// Candidates decided at once whose disagreements are asked of their own
/// entries; past this many, the whole ledger is read once (a candidate's
/// entries cost tens of microseconds, a scan of a ledger of 1,000,000
/// decisions 0.3-0.6 s here; common practice, no source).
const REFRESH_ONE_BY_ONE: usize = 10_000;

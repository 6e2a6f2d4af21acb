//! The decided candidates a catalogue does not list (a release dropped
//! them, or they were decided with another catalogue), for the note of
//! `decide` and `history`, kept in the ledger for the next command on the
//! same catalogue.
//!
//! Finding them asks every candidate the ledger ever decided on: with
//! 1,000,000 decisions that was 0.22-0.26 s of each `decide` (0.66 s in
//! all, the catalogue's ids read in 0.38 s). The set only grows, for one
//! catalogue: decisions are never taken out of the ledger, and the
//! catalogue is known by a digest of its ids, in order (not by its file,
//! whose ids depend on how it is read). So the list found is kept with the
//! last decision it accounts for, and the next command on the same ids asks
//! only the decisions after that one.
//!
//! The `unlisted` table is kept beside the schema (version 2): it is
//! created by the first list kept, and a starsift that does not know it
//! never reads it. Losing it loses nothing: it is found again.

use rusqlite::{OptionalExtension, params};

use super::{Ledger, LedgerError};
use crate::catalogue::Catalogue;

/// Decisions after the kept list past which it is kept again, though they
/// added no name: fewer are asked in a moment (common practice, no source).
const KEEP_AFTER: i64 = 10_000;

/// Catalogues whose lists are kept: the releases a team moves between.
const KEPT_CATALOGUES: i64 = 8;

/// The key of a catalogue's list: how many candidates, and the digest of
/// their ids in order.
fn key(cat: &Catalogue) -> String {
    format!("ids:{}:{:016x}", cat.len(), cat.candidate_ids().digest())
}

impl Ledger {
    /// The candidates the ledger has decided on that `cat` does not list,
    /// sorted by id (byte order, as SQLite sorts text). The list kept for
    /// these ids, if any, and the names of the decisions made since; the
    /// new list is kept when it grew, or when many decisions came since.
    /// Failing to keep it changes nothing printed: it is found again next
    /// time.
    pub fn candidates_not_in(&mut self, cat: &Catalogue) -> Result<Vec<String>, LedgerError> {
        let key = key(cat);
        let last: i64 = self
            .conn
            .query_row("SELECT COALESCE(MAX(id), 0) FROM decision", [], |r| {
                r.get(0)
            })
            .map_err(|e| self.classify(e))?;
        let kept = self.kept_list(&key)?;
        let (through, mut names) = kept.clone().unwrap_or_default();
        let mut grew = false;
        if last > through {
            // Every candidate when nothing is kept (through the candidate
            // index), else those of the decisions after the list (by their
            // ids: asked for distinct and sorted, SQLite would walk the
            // whole candidate index for them), made distinct below.
            let (sql, args): (&str, &[&dyn rusqlite::ToSql]) = if kept.is_some() {
                ("SELECT candidate FROM decision WHERE id > ?1", &[&through])
            } else {
                (
                    "SELECT DISTINCT candidate FROM decision ORDER BY candidate",
                    &[],
                )
            };
            // In one buffer: every decided candidate of a big ledger.
            let mut pool = crate::catalogue::StrPool::default();
            self.each(sql, args, |r, _| {
                pool.push(r.get_ref(0)?.as_str()?);
                Ok(())
            })?;
            let mut decided = pool.all();
            decided.sort_unstable();
            decided.dedup();
            let before = names.len();
            names.extend(
                cat.find_candidates(&decided)
                    .into_iter()
                    .zip(decided)
                    .filter(|(found, _)| found.is_none())
                    .map(|(_, name)| name.to_string()),
            );
            names.sort_unstable();
            names.dedup();
            grew = names.len() > before;
        }
        if kept.is_none() || grew || last - through >= KEEP_AFTER {
            // Decisions committed between the two reads above may be in
            // the list already: asked again next time, they add nothing.
            let _ = self.keep_list(&key, last.max(through), &names);
        }
        Ok(names)
    }

    /// The list kept for `key`: the last decision it accounts for, and the
    /// names. `None` when there is none, or it cannot be read as written.
    fn kept_list(&self, key: &str) -> Result<Option<(i64, Vec<String>)>, LedgerError> {
        let exists: bool = self
            .conn
            .query_row(
                "SELECT COUNT(*) > 0 FROM sqlite_master WHERE type = 'table' AND name = 'unlisted'",
                [],
                |r| r.get(0),
            )
            .map_err(|e| self.classify(e))?;
        if !exists {
            return Ok(None);
        }
        let row: Option<(i64, String)> = self
            .conn
            .query_row(
                "SELECT through, candidates FROM unlisted WHERE ids = ?1",
                [key],
                |r| Ok((r.get(0)?, r.get(1)?)),
            )
            .optional()
            .map_err(|e| self.classify(e))?;
        Ok(row.and_then(|(through, text)| {
            let names: Vec<String> = serde_json::from_str(&text).ok()?;
            Some((through, names))
        }))
    }

    /// Keeps `names` as the list of `key` through decision `through`, and
    /// the lists of the [`KEPT_CATALOGUES`] catalogues kept last.
    fn keep_list(&mut self, key: &str, through: i64, names: &[String]) -> Result<(), LedgerError> {
        let text = serde_json::to_string(names).unwrap_or_else(|_| "[]".into());
        self.write(|tx| {
            tx.execute_batch(
                "CREATE TABLE IF NOT EXISTS unlisted (
                    ids TEXT PRIMARY KEY,
                    through INTEGER NOT NULL,
                    candidates TEXT NOT NULL
                );",
            )?;
            tx.execute(
                "INSERT OR REPLACE INTO unlisted (ids, through, candidates) VALUES (?1, ?2, ?3)",
                params![key, through, text],
            )?;
            tx.execute(
                "DELETE FROM unlisted WHERE rowid NOT IN \
                 (SELECT rowid FROM unlisted ORDER BY rowid DESC LIMIT ?1)",
                [KEPT_CATALOGUES],
            )
        })
        .map(|_| ())
    }
}

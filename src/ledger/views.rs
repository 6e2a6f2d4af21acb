//! What is read of the ledger: every entry (history), the latest entry per
//! candidate, and what the odds need for one catalogue (`decided`). The
//! decided candidates a catalogue lacks are in `unlisted.rs`, where
//! vetters disagree in `disagree.rs`, the stamps `export` writes in
//! `stamps.rs`, `report`'s counts in `tally.rs`.

use std::collections::BTreeMap;
use std::sync::Arc;

use super::stamps::Stamps;
use super::{Entry, Ledger, LedgerError};
use crate::decision::{Decision, Reason};

/// The latest entry per candidate.
#[derive(Debug, Default)]
pub struct Latest {
    entries: Vec<Entry>,
    index: hashbrown::HashMap<String, u32>,
}

impl Latest {
    pub fn get(&self, candidate: &str) -> Option<&Entry> {
        self.index
            .get(candidate)
            .map(|&i| &self.entries[i as usize])
    }

    pub fn contains_key(&self, candidate: &str) -> bool {
        self.index.contains_key(candidate)
    }

    pub fn len(&self) -> usize {
        self.entries.len()
    }

    pub fn is_empty(&self) -> bool {
        self.entries.is_empty()
    }

    /// Entries, newest first.
    pub fn iter(&self) -> impl Iterator<Item = &Entry> {
        self.entries.iter()
    }
}

impl std::ops::Index<&str> for Latest {
    type Output = Entry;

    fn index(&self, candidate: &str) -> &Entry {
        self.get(candidate)
            .unwrap_or_else(|| panic!("no entry for {candidate}"))
    }
}

/// The decisions of a ledger as scanned ahead of the catalogue
/// ([`Ledger::read_ahead`]), for [`Ledger::decided_ahead`].
pub struct ReadAhead(super::disagree::Scan);

/// What the odds need of the ledger for one catalogue ([`Ledger::decided`]).
#[derive(Clone, Debug, Default)]
pub struct Decided {
    /// By candidate id: the latest decision on each candidate (of one
    /// vetter when asked), `Open` where there is none.
    pub decisions: Vec<Decision>,
    /// The latest entry of each candidate the catalogue does not list,
    /// newest first.
    pub gone: Vec<Entry>,
    /// Every candidate the ledger has decided on (whichever the vetter)
    /// that the catalogue does not list, in the order of their ids (as
    /// [`Ledger::candidates_not_in`]).
    pub not_listed: Vec<String>,
    /// Where vetters disagree, as [`Ledger::disagreements`] gives it (from
    /// the same scan).
    pub disagreements: BTreeMap<String, Vec<Entry>>,
    /// Asked for one vetter's decisions: the latest entries of the other
    /// vetters that reject as a false positive (an eclipsing binary, a
    /// blend, a stellar-size companion) a catalogue candidate the vetter
    /// asked for has not decided on, oldest first. Their call stands in
    /// that vetter's view too (`session::disputes_of`). Empty when no
    /// vetter is asked.
    pub others_fp: Vec<Entry>,
    /// The newest decision read (its row id; 0 for none): what a later
    /// look at the ledger starts after (`Ledger::since`).
    pub newest: i64,
}

impl Ledger {
    pub(super) fn entries(
        &self,
        sql: &str,
        args: &[&dyn rusqlite::ToSql],
    ) -> Result<Vec<Entry>, LedgerError> {
        let mut out = Vec::new();
        self.each(sql, args, |r, shared| {
            out.push(entry_from(r, shared)?);
            Ok(())
        })?;
        Ok(out)
    }

    /// Calls `f` on every row of `sql` (with the interner for repeated text).
    pub(super) fn each(
        &self,
        sql: &str,
        args: &[&dyn rusqlite::ToSql],
        mut f: impl FnMut(&rusqlite::Row, &mut Interner) -> rusqlite::Result<()>,
    ) -> Result<(), LedgerError> {
        let mut stmt = self
            .conn
            .prepare_cached(sql)
            .map_err(|e| self.classify(e))?;
        let mut rows = stmt.query(args).map_err(|e| self.classify(e))?;
        let mut shared = Interner::default();
        while let Some(r) = rows.next().map_err(|e| self.classify(e))? {
            f(r, &mut shared).map_err(|e| self.classify(e))?;
        }
        Ok(())
    }

    /// The newest decision's row id (`after` when none is newer), and
    /// whether a vetter other than `me` recorded any decision after row
    /// `after`: how a browser learns, cheaply, that its team decided
    /// something meanwhile (the rows after `after` only are read).
    pub fn since(&self, after: i64, me: &str) -> Result<(i64, bool), LedgerError> {
        let (mut newest, mut others) = (after, false);
        self.each(
            "SELECT id, vetter FROM decision WHERE id > ?1 ORDER BY id",
            &[&after],
            |r, _| {
                newest = newest.max(r.get(0)?);
                others |= r.get_ref(1)?.as_str_or_null()?.unwrap_or("") != me;
                Ok(())
            },
        )?;
        Ok((newest, others))
    }

    pub(super) const COLUMNS: &'static str =
        "id, candidate, star, vetter, decision, reason, note, decided_at, tool_version, undoes";

    /// Every entry, oldest first; for one candidate if given.
    pub fn history(&self, candidate: Option<&str>) -> Result<Vec<Entry>, LedgerError> {
        let mut out = Vec::new();
        // Kept in memory: giving an entry cannot fail.
        let _kept: std::io::Result<()> = self.entries_each(candidate, None, |e| {
            out.push(e);
            Ok(())
        })?;
        Ok(out)
    }

    /// Every entry, oldest first (for one candidate, of one vetter, if
    /// given), to `f` one at a time, none held: `history` at 1,000,000
    /// entries held 790 MB. Stops calling `f` at its first error, which is
    /// returned inside.
    pub fn history_each(
        &self,
        candidate: Option<&str>,
        vetter: Option<&str>,
        mut f: impl FnMut(&Entry) -> std::io::Result<()>,
    ) -> Result<std::io::Result<()>, LedgerError> {
        self.entries_each(candidate, vetter, |e| f(&e))
    }

    /// [`Ledger::history_each`], each entry given away.
    fn entries_each(
        &self,
        candidate: Option<&str>,
        vetter: Option<&str>,
        mut f: impl FnMut(Entry) -> std::io::Result<()>,
    ) -> Result<std::io::Result<()>, LedgerError> {
        let mut failed = Ok(());
        let mut visit = |r: &rusqlite::Row, shared: &mut Interner| -> rusqlite::Result<()> {
            if failed.is_err() {
                return Ok(());
            }
            // Another vetter's row is passed over before it is read whole.
            if let Some(v) = vetter
                && r.get_ref(3)?.as_str_or_null()? != Some(v)
            {
                return Ok(());
            }
            failed = f(entry_from(r, shared)?);
            Ok(())
        };
        match candidate {
            Some(c) => self.each(
                &format!(
                    "SELECT {} FROM decision WHERE candidate = ?1 ORDER BY id",
                    Self::COLUMNS
                ),
                &[&c],
                &mut visit,
            )?,
            None => self.each(
                &format!("SELECT {} FROM decision ORDER BY id", Self::COLUMNS),
                &[],
                &mut visit,
            )?,
        }
        Ok(failed)
    }

    /// The latest decision on each candidate of `cat` (of any vetter, or of
    /// one), the latest entries of the candidates it does not list, and
    /// which decided candidates it does not list: what the odds stand on,
    /// and the note that says what is gone. One scan of the decisions in
    /// the order they were made, of their candidate, vetter, decision and
    /// reason only (a candidate's last is its latest), the candidates
    /// looked up in the catalogue all at once; whole entries are read for
    /// the candidates it does not list only. At 1M candidates with 500,000
    /// decisions this and the odds took 1.4-2.3 s and 340 MB more than the
    /// same without a ledger when every latest entry was read whole, and
    /// the candidates looked up one by one (`benches/ledger-scale.sh`).
    pub fn decided(
        &self,
        cat: &crate::catalogue::Catalogue,
        vetter: Option<&str>,
    ) -> Result<Decided, LedgerError> {
        Ok(self.decided_reading(cat, vetter, false, None)?.0)
    }

    /// The scan of the decisions that [`Ledger::decided`] makes, made
    /// ahead, while the catalogue is read: it needs no catalogue.
    pub fn read_ahead(&self) -> Result<ReadAhead, LedgerError> {
        Ok(ReadAhead(self.scan_decisions()?))
    }

    /// [`Ledger::decided`] (with `stamps`, [`Ledger::decided_with_stamps`])
    /// from the scan made by [`Ledger::read_ahead`].
    pub fn decided_ahead(
        &self,
        cat: &crate::catalogue::Catalogue,
        vetter: Option<&str>,
        ahead: ReadAhead,
        stamps: bool,
    ) -> Result<(Decided, Stamps), LedgerError> {
        let (decided, latest) = self.decided_reading(cat, vetter, stamps, Some(ahead.0))?;
        let stamps = if stamps {
            self.stamps(&latest)?
        } else {
            Stamps::default()
        };
        Ok((decided, stamps))
    }

    /// [`Ledger::decided`], and who made each candidate's decision in
    /// force, when, with its note (`export`): read of those entries only,
    /// in one more pass, where reading every latest entry whole took 1.9 s
    /// and 190 MB more at 1M candidates with 1,000,000 decisions.
    pub fn decided_with_stamps(
        &self,
        cat: &crate::catalogue::Catalogue,
        vetter: Option<&str>,
    ) -> Result<(Decided, Stamps), LedgerError> {
        let (decided, latest) = self.decided_reading(cat, vetter, true, None)?;
        Ok((decided, self.stamps(&latest)?))
    }

    /// What [`Ledger::decided`] reads, and when `stamps`, each catalogue
    /// candidate's latest entry id (0 for none).
    fn decided_reading(
        &self,
        cat: &crate::catalogue::Catalogue,
        vetter: Option<&str>,
        stamps: bool,
        scanned: Option<super::disagree::Scan>,
    ) -> Result<(Decided, Vec<i64>), LedgerError> {
        let super::disagree::Scan {
            names,
            rows,
            vetters,
        } = match scanned {
            Some(scan) => scan,
            None => self.scan_decisions()?,
        };
        // Whether each row is of the vetter asked (every row when none is).
        let asked = vetter.map(|v| vetters.find(v));
        let mine = rows
            .iter()
            .map(|row| asked.is_none_or(|a| a == Some(row.vetter)));
        let names = names.all();
        let mut decisions = vec![Decision::Open; cat.len()];
        let mut latest = vec![0; if stamps { cat.len() } else { 0 }];
        // Each row's candidate as a number: its place in the catalogue, or
        // past the catalogue's end, its place among the ids it lacks.
        let mut unlisted: hashbrown::HashMap<&str, u32> = hashbrown::HashMap::new();
        let mut gone: hashbrown::HashMap<&str, i64> = hashbrown::HashMap::new();
        let found = cat.find_candidates(&names);
        let mut group = Vec::with_capacity(rows.len());
        for (((found, name), row), mine) in found.into_iter().zip(&names).zip(&rows).zip(mine) {
            group.push(match found {
                Some(c) => {
                    if mine {
                        decisions[c as usize] = row.decision;
                        if stamps {
                            latest[c as usize] = row.id;
                        }
                    }
                    c
                }
                None => {
                    if mine {
                        gone.insert(name, row.id);
                    }
                    let next = (cat.len() + unlisted.len()) as u32;
                    *unlisted.entry(name).or_insert(next)
                }
            });
        }
        let disagree = super::disagree::disagreeing(&rows, &group, cat.len() + unlisted.len());
        let others_fp = match asked {
            Some(asked) => self.entries_by_id(&others_fp(&rows, &group, cat.len(), asked))?,
            None => Vec::new(),
        };
        let mut gone: Vec<i64> = gone.into_values().collect();
        gone.sort_unstable();
        let mut gone = self.entries_by_id(&gone)?;
        gone.reverse();
        let mut not_listed: Vec<String> = unlisted.into_keys().map(String::from).collect();
        not_listed.sort_unstable();
        let decided = Decided {
            decisions,
            gone,
            not_listed,
            disagreements: super::disagree::by_candidate(self.entries_by_id(&disagree)?),
            others_fp,
            newest: rows.iter().map(|r| r.id).max().unwrap_or(0),
        };
        Ok((decided, latest))
    }

    /// The latest entry of one candidate (of any vetter, or of one): the
    /// last of its [`Ledger::history`], read from the candidate index, and
    /// none of the other candidates' entries.
    pub fn latest_of(
        &self,
        candidate: &str,
        vetter: Option<&str>,
    ) -> Result<Option<Entry>, LedgerError> {
        Ok(self
            .history(Some(candidate))?
            .into_iter()
            .rev()
            .find(|e| vetter.is_none_or(|v| &*e.vetter == v)))
    }

    /// The latest entry per candidate: of any vetter, or of one. One scan
    /// from the newest row back; older rows of a candidate already seen are
    /// passed over without being read into memory.
    pub fn latest(&self, vetter: Option<&str>) -> Result<Latest, LedgerError> {
        let mut latest = Latest::default();
        let mut visit = |r: &rusqlite::Row, shared: &mut Interner| -> rusqlite::Result<()> {
            let seen = r
                .get_ref(1)?
                .as_str()
                .map(|c| latest.index.contains_key(c))?;
            if !seen {
                let e = entry_from(r, shared)?;
                latest
                    .index
                    .insert(e.candidate.clone(), latest.entries.len() as u32);
                latest.entries.push(e);
            }
            Ok(())
        };
        match vetter {
            None => self.each(
                &format!("SELECT {} FROM decision ORDER BY id DESC", Self::COLUMNS),
                &[],
                &mut visit,
            )?,
            Some(v) => self.each(
                &format!(
                    "SELECT {} FROM decision WHERE vetter = ?1 ORDER BY id DESC",
                    Self::COLUMNS
                ),
                &[&v],
                &mut visit,
            )?,
        }
        Ok(latest)
    }
}

/// The decision of a row whose columns `i` and `i + 1` are the decision
/// and its reason.
pub(super) fn decision_of(r: &rusqlite::Row, i: usize) -> rusqlite::Result<Decision> {
    let text = |i| -> rusqlite::Result<Option<&str>> { Ok(r.get_ref(i)?.as_str_or_null()?) };
    Ok(decision_from(text(i)?.unwrap_or("open"), text(i + 1)?).unwrap_or(Decision::Open))
}

fn decision_from(name: &str, reason: Option<&str>) -> Option<Decision> {
    Some(match name {
        "open" => Decision::Open,
        "kept" => Decision::Kept,
        "parked" => Decision::Parked,
        "rejected" => Decision::Rejected(reason.and_then(Reason::parse).unwrap_or(Reason::Other)),
        _ => return None,
    })
}

/// Shares the text that repeats from row to row (stars, vetters, versions).
#[derive(Default)]
pub(super) struct Interner(hashbrown::HashSet<Arc<str>>);

impl Interner {
    fn get(&mut self, s: &str) -> Arc<str> {
        match self.0.get(s) {
            Some(a) => Arc::clone(a),
            None => {
                let a: Arc<str> = Arc::from(s);
                self.0.insert(Arc::clone(&a));
                a
            }
        }
    }
}

/// One ledger row (in `Ledger::COLUMNS` order) as an entry.
pub(super) fn entry_from(r: &rusqlite::Row, shared: &mut Interner) -> rusqlite::Result<Entry> {
    let text = |i| -> rusqlite::Result<Option<&str>> { Ok(r.get_ref(i)?.as_str_or_null()?) };
    Ok(Entry {
        id: r.get(0)?,
        candidate: r.get(1)?,
        star: shared.get(text(2)?.unwrap_or("")),
        vetter: shared.get(text(3)?.unwrap_or("")),
        decision: decision_from(text(4)?.unwrap_or("open"), text(5)?).unwrap_or(Decision::Open),
        note: r.get(6)?,
        decided_at: r.get(7)?,
        tool_version: text(8)?.map(|v| shared.get(v)),
        undoes: r.get(9)?,
    })
}

/// The row ids, ascending, of the other vetters' latest decisions that
/// reject as a false positive a catalogue candidate (`group` below
/// `listed`) on which vetter `asked` (`None`: a name the ledger has not
/// seen) has no decision. `rows` in the order made.
fn others_fp(
    rows: &[super::disagree::Seen],
    group: &[u32],
    listed: usize,
    asked: Option<u32>,
) -> Vec<i64> {
    let fp = |d: Decision| d.reason().is_some_and(crate::odds::names_false_positive);
    // Only candidates some vetter rejected as a false positive at some
    // time are followed: a handful of a large ledger.
    let mut followed: hashbrown::HashSet<u32> = rows
        .iter()
        .zip(group)
        .filter(|&(r, &g)| (g as usize) < listed && fp(r.decision))
        .map(|(_, &g)| g)
        .collect();
    if followed.is_empty() {
        return Vec::new();
    }
    let mut latest: hashbrown::HashMap<(u32, u32), usize> = hashbrown::HashMap::new();
    for (i, (r, &g)) in rows.iter().zip(group).enumerate() {
        if !followed.contains(&g) {
            continue;
        }
        if Some(r.vetter) == asked {
            // The vetter asked decided on it: any difference is a
            // disagreement, read there.
            followed.remove(&g);
            continue;
        }
        latest.insert((g, r.vetter), i);
    }
    let mut ids: Vec<i64> = latest
        .into_iter()
        .filter(|((g, _), i)| followed.contains(g) && fp(rows[*i].decision))
        .map(|(_, i)| rows[i].id)
        .collect();
    ids.sort_unstable();
    ids
}

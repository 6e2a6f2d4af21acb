//! What is read of the ledger: every entry (history), the latest entry per
//! candidate, what the odds need for one catalogue (`decided`), the decided
//! candidates a catalogue lacks, and where vetters disagree.

use std::collections::{BTreeMap, HashMap, HashSet};
use std::sync::Arc;

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

/// What the odds need of the ledger for one catalogue ([`Ledger::decided`]).
#[derive(Debug, Default)]
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
}

impl Ledger {
    fn entries(&self, sql: &str, args: &[&dyn rusqlite::ToSql]) -> Result<Vec<Entry>, LedgerError> {
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

    const COLUMNS: &'static str =
        "id, candidate, star, vetter, decision, reason, note, decided_at, tool_version, undoes";

    /// Every entry, oldest first; for one candidate if given.
    pub fn history(&self, candidate: Option<&str>) -> Result<Vec<Entry>, LedgerError> {
        match candidate {
            Some(c) => self.entries(
                &format!(
                    "SELECT {} FROM decision WHERE candidate = ?1 ORDER BY id",
                    Self::COLUMNS
                ),
                &[&c],
            ),
            None => self.entries(
                &format!("SELECT {} FROM decision ORDER BY id", Self::COLUMNS),
                &[],
            ),
        }
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
        let mut names = Names::default();
        // Each row's id, decision, and whether it is of the vetter asked.
        let mut rows: Vec<(i64, Decision, bool)> = Vec::new();
        self.each(
            "SELECT id, candidate, vetter, decision, reason FROM decision ORDER BY id",
            &[],
            |r, _| {
                names.push(r.get_ref(1)?.as_str()?);
                let text =
                    |i| -> rusqlite::Result<Option<&str>> { Ok(r.get_ref(i)?.as_str_or_null()?) };
                let who = text(2)?;
                let mine = vetter.is_none_or(|v| who == Some(v));
                let decision =
                    decision_from(text(3)?.unwrap_or("open"), text(4)?).unwrap_or(Decision::Open);
                rows.push((r.get(0)?, decision, mine));
                Ok(())
            },
        )?;
        let names = names.all();
        let mut decisions = vec![Decision::Open; cat.len()];
        let mut gone: hashbrown::HashMap<&str, i64> = hashbrown::HashMap::new();
        let mut not_listed: hashbrown::HashSet<&str> = hashbrown::HashSet::new();
        let found = cat.find_candidates(&names);
        for ((found, name), (id, decision, mine)) in found.into_iter().zip(&names).zip(rows) {
            match (found, mine) {
                (Some(c), true) => decisions[c as usize] = decision,
                (Some(_), false) => {}
                (None, mine) => {
                    not_listed.insert(name);
                    if mine {
                        gone.insert(name, id);
                    }
                }
            }
        }
        let mut gone: Vec<i64> = gone.into_values().collect();
        gone.sort_unstable_by(|a, b| b.cmp(a));
        let sql = format!("SELECT {} FROM decision WHERE id = ?1", Self::COLUMNS);
        let mut entries = Vec::with_capacity(gone.len());
        for id in gone {
            entries.extend(self.entries(&sql, &[&id])?);
        }
        let mut not_listed: Vec<String> = not_listed.into_iter().map(String::from).collect();
        not_listed.sort_unstable();
        Ok(Decided {
            decisions,
            gone: entries,
            not_listed,
        })
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

    /// Candidates on which vetters' latest decisions differ: candidate →
    /// each vetter's latest entry.
    pub fn disagreements(&self) -> Result<BTreeMap<String, Vec<Entry>>, LedgerError> {
        // Only a candidate two vetters or more decided on can be one. A
        // ledger of one vetter has none: its first and last vetter (the
        // ends of the vetter index) are one. Otherwise these candidates are
        // found first, so that the entries of no other are read. A ledger
        // of 500,000 decisions by one vetter took 3.4 s here.
        let mut one_vetter = true;
        let ends = "SELECT (SELECT MIN(vetter) FROM decision) = (SELECT MAX(vetter) FROM decision)";
        self.each(ends, &[], |r, _| {
            one_vetter = r.get::<_, Option<bool>>(0)?.unwrap_or(true);
            Ok(())
        })?;
        if one_vetter {
            return Ok(BTreeMap::new());
        }
        let mut shared_out: HashSet<String> = HashSet::new();
        self.each(
            // From the (vetter, candidate) index alone: 0.4 s for 500,000
            // decisions, where counting each candidate's vetters from its
            // rows took 1.4 s.
            "SELECT candidate FROM (SELECT DISTINCT vetter, candidate FROM decision) \
             GROUP BY candidate HAVING COUNT(*) > 1",
            &[],
            |r, _| {
                shared_out.insert(r.get_ref(0)?.as_str()?.to_string());
                Ok(())
            },
        )?;
        if shared_out.is_empty() {
            return Ok(BTreeMap::new());
        }
        // Each vetter's latest entry per candidate, newest rows first.
        let mut latest: HashMap<(String, Arc<str>), Entry> = HashMap::new();
        self.each(
            &format!("SELECT {} FROM decision ORDER BY id DESC", Self::COLUMNS),
            &[],
            |r, shared| {
                let c = r.get_ref(1)?.as_str()?;
                if !shared_out.contains(c) {
                    return Ok(());
                }
                let v = shared.get(r.get_ref(3)?.as_str()?);
                if !latest.contains_key(&(c.to_string(), Arc::clone(&v))) {
                    let e = entry_from(r, shared)?;
                    latest.insert((e.candidate.clone(), v), e);
                }
                Ok(())
            },
        )?;
        let mut by: BTreeMap<String, Vec<Entry>> = BTreeMap::new();
        for ((c, _), e) in latest {
            by.entry(c).or_default().push(e);
        }
        by.retain(|_, v| v.iter().any(|e| e.decision != v[0].decision));
        for v in by.values_mut() {
            v.sort_by(|a, b| a.vetter.cmp(&b.vetter));
        }
        Ok(by)
    }
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

/// Many ledger texts (candidate ids) end to end in one buffer, for
/// [`crate::catalogue::Catalogue::find_candidates`].
#[derive(Default)]
pub(super) struct Names {
    text: String,
    ends: Vec<usize>,
}

impl Names {
    pub(super) fn push(&mut self, s: &str) {
        self.text.push_str(s);
        self.ends.push(self.text.len());
    }

    pub(super) fn all(&self) -> Vec<&str> {
        let starts = std::iter::once(0).chain(self.ends.iter().copied());
        starts
            .zip(&self.ends)
            .map(|(a, &b)| &self.text[a..b])
            .collect()
    }
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
fn entry_from(r: &rusqlite::Row, shared: &mut Interner) -> rusqlite::Result<Entry> {
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

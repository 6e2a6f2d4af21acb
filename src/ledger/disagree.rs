//! Where vetters disagree: the candidates on which two vetters' latest
//! decisions differ, with each vetter's latest entry.
//!
//! Found from one scan of the decisions in the order they were made (the
//! scan [`Ledger::decided`] makes anyway), each row's candidate a number
//! (its place in the catalogue, or among the ids it lacks): the candidates
//! two vetters decided on are marked, their rows' latest per vetter sorted
//! out, and only the disagreeing entries read whole. At 1M candidates, a
//! ledger of 1,000,000 decisions by three vetters (400,000 candidates
//! decided twice) took 5.6 s in an SQL grouping and a read of every entry.

use std::collections::BTreeMap;

use super::{Entry, Ledger, LedgerError};
use crate::catalogue::StrPool;
use crate::decision::Decision;

/// A decision as the grouping sees it: its row id, what was decided, and
/// by whom (a number per vetter).
#[derive(Clone, Copy, Debug)]
pub(super) struct Seen {
    pub id: i64,
    pub decision: Decision,
    pub vetter: u32,
}

/// The decisions as [`Ledger::scan_decisions`] reads them: row by row,
/// each candidate id (`names`) and the rest (`rows`).
#[derive(Default)]
pub(super) struct Scan {
    pub names: StrPool,
    pub rows: Vec<Seen>,
    pub vetters: Vetters,
}

/// Numbers for the vetters of a ledger, in the order first seen (the last
/// asked first: a vetter's decisions come in runs).
#[derive(Default)]
pub(super) struct Vetters {
    names: Vec<String>,
    numbers: hashbrown::HashMap<String, u32>,
    last: Option<u32>,
}

impl Vetters {
    pub fn number(&mut self, name: &str) -> u32 {
        if let Some(n) = self.last.filter(|&n| self.names[n as usize] == name) {
            return n;
        }
        let n = match self.numbers.get(name) {
            Some(&n) => n,
            None => {
                let n = self.names.len() as u32;
                self.names.push(name.to_string());
                self.numbers.insert(name.to_string(), n);
                n
            }
        };
        self.last = Some(n);
        n
    }

    /// The number of a vetter already seen.
    pub fn find(&self, name: &str) -> Option<u32> {
        self.numbers.get(name).copied()
    }

    pub fn into_names(self) -> Vec<String> {
        self.names
    }
}

/// The row ids, ascending, of each vetter's latest entry on every
/// candidate whose vetters' latest decisions differ. `rows` in the order
/// the decisions were made; `group[i]` numbers row `i`'s candidate (below
/// `groups`): one number per candidate id.
pub(super) fn disagreeing(rows: &[Seen], group: &[u32], groups: usize) -> Vec<i64> {
    // One vetter (or none) disagrees with nobody: no array per candidate.
    if rows.iter().all(|s| s.vetter == rows[0].vetter) {
        return Vec::new();
    }
    const NONE: u32 = u32::MAX;
    let mut first = vec![NONE; groups];
    let mut shared = vec![false; groups];
    for (s, &g) in rows.iter().zip(group) {
        let f = &mut first[g as usize];
        if *f == NONE {
            *f = s.vetter;
        } else if *f != s.vetter {
            shared[g as usize] = true;
        }
    }
    // The rows of candidates two vetters decided on, by candidate, vetter
    // and order made: each run's last is that vetter's latest.
    let mut keyed: Vec<(u64, u32)> = (0..rows.len())
        .filter(|&i| shared[group[i] as usize])
        .map(|i| {
            (
                (u64::from(group[i]) << 32) | u64::from(rows[i].vetter),
                i as u32,
            )
        })
        .collect();
    keyed.sort_unstable();
    let mut ids = Vec::new();
    let mut latest: Vec<usize> = Vec::new();
    let mut i = 0;
    while i < keyed.len() {
        let candidate = keyed[i].0 >> 32;
        latest.clear();
        while i < keyed.len() && keyed[i].0 >> 32 == candidate {
            let vetter = keyed[i].0;
            while i + 1 < keyed.len() && keyed[i + 1].0 == vetter {
                i += 1;
            }
            latest.push(keyed[i].1 as usize);
            i += 1;
        }
        let d = rows[latest[0]].decision;
        if latest.iter().any(|&r| rows[r].decision != d) {
            ids.extend(latest.iter().map(|&r| rows[r].id));
        }
    }
    ids.sort_unstable();
    ids
}

/// Entries by candidate, each candidate's sorted by vetter.
pub(super) fn by_candidate(entries: Vec<Entry>) -> BTreeMap<String, Vec<Entry>> {
    let mut by: BTreeMap<String, Vec<Entry>> = BTreeMap::new();
    for e in entries {
        by.entry(e.candidate.clone()).or_default().push(e);
    }
    for v in by.values_mut() {
        v.sort_by(|a, b| a.vetter.cmp(&b.vetter));
    }
    by
}

/// Ids asked of one at a time up to this many; past it, every entry is
/// passed once and those asked for are read (common practice, no source:
/// a point query costs a few microseconds, a row of the scan a fraction).
const ONE_BY_ONE: usize = 4096;

impl Ledger {
    /// Candidates on which vetters' latest decisions differ: candidate →
    /// each vetter's latest entry, sorted by vetter. A ledger of one vetter
    /// has none: its first and last vetter (the ends of the vetter index)
    /// are one, and nothing more is read.
    pub fn disagreements(&self) -> Result<BTreeMap<String, Vec<Entry>>, LedgerError> {
        let mut one_vetter = true;
        let ends = "SELECT (SELECT MIN(vetter) FROM decision) = (SELECT MAX(vetter) FROM decision)";
        self.each(ends, &[], |r, _| {
            one_vetter = r.get::<_, Option<bool>>(0)?.unwrap_or(true);
            Ok(())
        })?;
        if one_vetter {
            return Ok(BTreeMap::new());
        }
        let Scan { names, rows, .. } = self.scan_decisions()?;
        let mut number: hashbrown::HashMap<&str, u32> = hashbrown::HashMap::new();
        let names = names.all();
        let group: Vec<u32> = names
            .iter()
            .map(|n| {
                let next = number.len() as u32;
                *number.entry(n).or_insert(next)
            })
            .collect();
        let ids = disagreeing(&rows, &group, number.len());
        Ok(by_candidate(self.entries_by_id(&ids)?))
    }

    /// Every decision in the order made: what [`Ledger::decided`] and
    /// [`Ledger::disagreements`] read of it, in one scan of the candidate,
    /// vetter, decision and reason.
    pub(super) fn scan_decisions(&self) -> Result<Scan, LedgerError> {
        let mut scan = Scan::default();
        self.each(
            "SELECT id, candidate, vetter, decision, reason FROM decision ORDER BY id",
            &[],
            |r, _| {
                scan.names.push(r.get_ref(1)?.as_str()?);
                let who = r.get_ref(2)?.as_str_or_null()?.unwrap_or("");
                scan.rows.push(Seen {
                    id: r.get(0)?,
                    vetter: scan.vetters.number(who),
                    decision: super::views::decision_of(r, 3)?,
                });
                Ok(())
            },
        )?;
        Ok(scan)
    }

    /// Whether the vetters' latest decisions on `candidate` differ, from
    /// its own entries (the candidate index), for the browser after a
    /// decision.
    pub fn disagreed_on(&self, candidate: &str) -> Result<bool, LedgerError> {
        Ok(!self.disagreement_on(candidate)?.is_empty())
    }

    /// Each vetter's latest entry on `candidate`, sorted by vetter, when
    /// their latest decisions differ; empty when they agree. From its own
    /// entries (the candidate index), as [`Ledger::disagreements`] has it
    /// of every candidate.
    pub fn disagreement_on(&self, candidate: &str) -> Result<Vec<Entry>, LedgerError> {
        let mut vetters = Vetters::default();
        let history = self.history(Some(candidate))?;
        let rows: Vec<Seen> = history
            .iter()
            .map(|e| Seen {
                id: e.id,
                decision: e.decision,
                vetter: vetters.number(&e.vetter),
            })
            .collect();
        // One candidate: every row in group 0.
        let ids = disagreeing(&rows, &vec![0; rows.len()], 1);
        let mut latest: Vec<Entry> = history
            .into_iter()
            .filter(|e| ids.binary_search(&e.id).is_ok())
            .collect();
        latest.sort_by(|a, b| a.vetter.cmp(&b.vetter));
        Ok(latest)
    }

    /// The entries of `ids` (ascending), in that order.
    pub(super) fn entries_by_id(&self, ids: &[i64]) -> Result<Vec<Entry>, LedgerError> {
        let mut out = Vec::with_capacity(ids.len());
        if ids.len() <= ONE_BY_ONE {
            let sql = format!("SELECT {} FROM decision WHERE id = ?1", Self::COLUMNS);
            for id in ids {
                out.extend(self.entries(&sql, &[id])?);
            }
            return Ok(out);
        }
        let mut want = ids.iter().peekable();
        self.each(
            &format!(
                "SELECT {} FROM decision WHERE id >= ?1 ORDER BY id",
                Self::COLUMNS
            ),
            &[&ids[0]],
            |r, shared| {
                let id: i64 = r.get(0)?;
                while want.next_if(|&&w| w < id).is_some() {}
                if want.next_if(|&&w| w == id).is_some() {
                    out.push(super::views::entry_from(r, shared)?);
                }
                Ok(())
            },
        )?;
        Ok(out)
    }
}

//! Who made each candidate's decision in force, when, and its note: what
//! `export` writes beside the decision, read of those entries only (their
//! vetter, time and note, nothing else of them) into a few buffers.

use super::{Ledger, LedgerError};
use crate::catalogue::CandidateId;
use crate::catalogue::StrPool;

/// The vetter, time and note of each catalogue candidate's latest entry
/// ([`Ledger::decided_with_stamps`]).
#[derive(Debug, Default)]
pub struct Stamps {
    /// Per candidate: 0 for no entry, else 1 + its place below.
    of: Vec<u32>,
    vetters: Vec<String>,
    who: Vec<u32>,
    dates: StrPool,
    notes: StrPool,
    /// Whether each entry has a note (an empty note is one).
    noted: Vec<bool>,
}

/// One candidate's latest entry, as [`Stamps`] keeps it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stamp<'a> {
    pub vetter: &'a str,
    /// RFC 3339, UTC.
    pub decided_at: &'a str,
    pub note: Option<&'a str>,
}

impl Stamps {
    pub fn get(&self, c: CandidateId) -> Option<Stamp<'_>> {
        let i = (*self.of.get(c as usize)?).checked_sub(1)? as usize;
        Some(Stamp {
            vetter: &self.vetters[self.who[i] as usize],
            decided_at: self.dates.get(i),
            note: self.noted[i].then(|| self.notes.get(i)),
        })
    }
}

impl Ledger {
    /// The stamps of the entries `latest` names per candidate (0 for none),
    /// in one pass from the first of them.
    pub(super) fn stamps(&self, latest: &[i64]) -> Result<Stamps, LedgerError> {
        let mut want: Vec<(i64, u32)> = latest
            .iter()
            .enumerate()
            .filter(|&(_, &id)| id > 0)
            .map(|(c, &id)| (id, c as u32))
            .collect();
        want.sort_unstable();
        let mut out = Stamps {
            of: vec![0; latest.len()],
            ..Stamps::default()
        };
        let Some(&(first, _)) = want.first() else {
            return Ok(out);
        };
        let mut next = want.iter().peekable();
        let mut vetters = super::disagree::Vetters::default();
        self.each(
            "SELECT id, vetter, decided_at, note FROM decision WHERE id >= ?1 ORDER BY id",
            &[&first],
            |r, _| {
                let id: i64 = r.get(0)?;
                while next.next_if(|w| w.0 < id).is_some() {}
                // One entry may be the latest of no more than one candidate.
                if let Some(&(_, c)) = next.next_if(|w| w.0 == id) {
                    let text = |i| -> rusqlite::Result<Option<&str>> {
                        Ok(r.get_ref(i)?.as_str_or_null()?)
                    };
                    out.who.push(vetters.number(text(1)?.unwrap_or("")));
                    out.dates.push(text(2)?.unwrap_or(""));
                    let note = text(3)?;
                    out.notes.push(note.unwrap_or(""));
                    out.noted.push(note.is_some());
                    out.of[c as usize] = out.who.len() as u32;
                }
                Ok(())
            },
        )?;
        out.vetters = vetters.into_names();
        Ok(out)
    }
}

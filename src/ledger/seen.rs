//! Which catalogue a ledger is used with: a row for each sighting of a
//! catalogue's path that differs from the last (its fingerprint, how many
//! candidates, when, and the file's stamp), so that a changed catalogue is
//! noticed, and an unchanged one (the same stamp) is known by its
//! fingerprint without being read again.
//!
//! The `stamp` column came after schema version 2 and is added to a ledger
//! by the first sighting that has a stamp, without a new version: a
//! starsift that does not know it never reads it, and names the columns it
//! writes.

use std::path::Path;

use rusqlite::{Connection, OptionalExtension, params};

use super::{Ledger, LedgerError, file, now_rfc3339};

impl Ledger {
    /// Notes which catalogue the ledger is used with: a new sighting when
    /// its fingerprint, or its stamp (`crate::fingerprint::file_stamp`),
    /// differs from the last one of the same path. Returns the fingerprint
    /// recorded last time for this path, when the catalogue differs from
    /// it. A last sighting an earlier version recorded
    /// (`crate::fingerprint::is_earlier`) is compared with `earlier`, the
    /// catalogue's fingerprint taken as it took them (read only then).
    pub fn note_catalogue(
        &mut self,
        path: &str,
        fp: &str,
        candidates: usize,
        stamp: Option<&str>,
        earlier: &dyn Fn() -> Option<String>,
    ) -> Result<Option<String>, LedgerError> {
        let previous = last_sighting(&self.conn, path).map_err(|e| self.classify(e))?;
        let (previous_fp, previous_stamp) = match &previous {
            Some((f, s)) => (Some(f.as_str()), s.as_deref()),
            None => (None, None),
        };
        // Recorded by an earlier version: the same file when its way of
        // taking the fingerprint gives the same (then recorded anew, below,
        // in this version's).
        let known = previous_fp.is_some_and(|p| {
            p == fp
                || (crate::fingerprint::is_earlier(p)
                    && !crate::fingerprint::is_earlier(fp)
                    && earlier().as_deref() == Some(p))
        });
        if previous_fp != Some(fp) || stamp.is_some_and(|s| Some(s) != previous_stamp) {
            let at = now_rfc3339();
            self.write(|tx| {
                let stamped = has_stamp(tx)? || {
                    if stamp.is_some() {
                        tx.execute_batch("ALTER TABLE catalogue ADD COLUMN stamp TEXT;")?;
                    }
                    stamp.is_some()
                };
                if stamped {
                    tx.execute(
                        "INSERT INTO catalogue (path, fingerprint, candidates, seen_at, stamp) \
                         VALUES (?1, ?2, ?3, ?4, ?5)",
                        params![path, fp, candidates as i64, at, stamp],
                    )
                } else {
                    tx.execute(
                        "INSERT INTO catalogue (path, fingerprint, candidates, seen_at) \
                         VALUES (?1, ?2, ?3, ?4)",
                        params![path, fp, candidates as i64, at],
                    )
                }
            })?;
        }
        Ok(previous_fp.filter(|_| !known).map(str::to_string))
    }

    /// The fingerprint of the last sighting of `path`, if any (`None` too
    /// when the ledger cannot say).
    pub fn last_fingerprint(&self, path: &str) -> Option<String> {
        last_sighting(&self.conn, path).ok()?.map(|(fp, _)| fp)
    }

    /// [`Ledger::note_catalogue`], said for people: the note when the
    /// catalogue changed since this ledger last saw it.
    pub fn sighting_note(
        &mut self,
        path: &str,
        fp: &str,
        candidates: usize,
        stamp: Option<&str>,
        earlier: &dyn Fn() -> Option<String>,
    ) -> Result<Option<String>, LedgerError> {
        Ok(self.note_catalogue(path, fp, candidates, stamp, earlier)?.map(|previous| {
            format!(
                "{} changed since this ledger last saw it ({previous} → {fp}); decisions are matched by candidate id",
                crate::sanitize::clean(path)
            )
        }))
    }
}

/// The fingerprint that the ledger at `ledger` recorded for the catalogue
/// at `path` when the file had this very stamp: that of the path's last
/// sighting, if its stamp is `stamp`. `None` otherwise, and whenever the
/// ledger cannot be read (no ledger, not ours, busy...): the caller then
/// reads the catalogue for its fingerprint, as without a ledger. Nothing
/// is written.
pub fn recorded_fingerprint(ledger: &Path, path: &str, stamp: &str) -> Option<String> {
    if !ledger.is_file() {
        return None;
    }
    let conn = file::open_checked(ledger).ok()??;
    let (fp, seen) = last_sighting(&conn, path).ok()??;
    (seen.as_deref() == Some(stamp)).then_some(fp)
}

/// The fingerprint and stamp of the last sighting of `path`.
fn last_sighting(
    conn: &Connection,
    path: &str,
) -> rusqlite::Result<Option<(String, Option<String>)>> {
    let sql = if has_stamp(conn)? {
        "SELECT fingerprint, stamp FROM catalogue WHERE path = ?1 ORDER BY id DESC LIMIT 1"
    } else {
        "SELECT fingerprint, NULL FROM catalogue WHERE path = ?1 ORDER BY id DESC LIMIT 1"
    };
    conn.query_row(sql, [path], |r| Ok((r.get(0)?, r.get(1)?)))
        .optional()
}

/// True when the ledger's catalogue table has the `stamp` column.
fn has_stamp(conn: &Connection) -> rusqlite::Result<bool> {
    conn.query_row(
        "SELECT COUNT(*) FROM pragma_table_info('catalogue') WHERE name = 'stamp'",
        [],
        |r| r.get::<_, i64>(0),
    )
    .map(|n| n > 0)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn temp(name: &str) -> std::path::PathBuf {
        let d = std::env::temp_dir().join(format!("starsift-seen-{}-{name}", std::process::id()));
        let _ = std::fs::remove_dir_all(&d);
        std::fs::create_dir_all(&d).unwrap();
        d.join("l.sqlite")
    }

    fn sightings(l: &Ledger) -> i64 {
        l.conn
            .query_row("SELECT COUNT(*) FROM catalogue", [], |r| r.get(0))
            .unwrap()
    }

    #[test]
    fn a_stamp_recalls_the_fingerprint_seen_with_it_and_nothing_else() {
        let p = temp("stamp");
        let mut l = Ledger::open(&p).unwrap();
        // A ledger as schema version 2 made it: no stamp column until a
        // sighting has a stamp; one without leaves it so.
        assert_eq!(
            l.note_catalogue("c.csv", "xxh64:01", 3, None, &|| None)
                .unwrap(),
            None
        );
        assert!(!has_stamp(&l.conn).unwrap());
        assert_eq!(recorded_fingerprint(&p, "c.csv", "s1"), None);
        // The same fingerprint with a stamp: a sighting, and the column.
        assert_eq!(
            l.note_catalogue("c.csv", "xxh64:01", 3, Some("s1"), &|| None)
                .unwrap(),
            None
        );
        assert!(has_stamp(&l.conn).unwrap());
        assert_eq!(sightings(&l), 2);
        assert_eq!(
            recorded_fingerprint(&p, "c.csv", "s1").as_deref(),
            Some("xxh64:01")
        );
        // Seen again as it was: nothing written.
        l.note_catalogue("c.csv", "xxh64:01", 3, Some("s1"), &|| None)
            .unwrap();
        assert_eq!(sightings(&l), 2);
        // Another stamp, another path: not known.
        assert_eq!(recorded_fingerprint(&p, "c.csv", "s2"), None);
        assert_eq!(recorded_fingerprint(&p, "d.csv", "s1"), None);
        // Changed: the last sighting decides, so the old stamp no longer
        // recalls the old fingerprint.
        assert_eq!(
            l.note_catalogue("c.csv", "xxh64:02", 4, None, &|| None)
                .unwrap()
                .as_deref(),
            Some("xxh64:01")
        );
        assert_eq!(recorded_fingerprint(&p, "c.csv", "s1"), None);
        // No ledger, or a file that is not one: not known, and no error.
        assert_eq!(
            recorded_fingerprint(&p.with_extension("none"), "c.csv", "s1"),
            None
        );
        let other = p.with_extension("txt");
        std::fs::write(&other, "not a ledger").unwrap();
        assert_eq!(recorded_fingerprint(&other, "c.csv", "s1"), None);
    }

    #[test]
    fn a_sighting_an_earlier_version_recorded_is_compared_as_it_was_taken() {
        let p = temp("earlier");
        let mut l = Ledger::open(&p).unwrap();
        // An earlier version recorded FNV-1a fingerprints.
        l.note_catalogue("c.csv", "fnv1a64:0a", 3, None, &|| None)
            .unwrap();
        // The same file, its fingerprint now taken another way: the same
        // by the earlier way, so no change is said; it is recorded anew.
        let asked = std::cell::Cell::new(0);
        let same = || {
            asked.set(asked.get() + 1);
            Some("fnv1a64:0a".to_string())
        };
        assert_eq!(
            l.note_catalogue("c.csv", "xxh64:0b", 3, None, &same)
                .unwrap(),
            None
        );
        assert_eq!((asked.get(), sightings(&l)), (1, 2));
        // From then on compared as this version takes it: not read again.
        assert_eq!(
            l.note_catalogue("c.csv", "xxh64:0b", 3, None, &same)
                .unwrap(),
            None
        );
        assert_eq!((asked.get(), sightings(&l)), (1, 2));
        // A file that changed since the earlier version saw it is said.
        l.note_catalogue("d.csv", "fnv1a64:0c", 3, None, &|| None)
            .unwrap();
        let other = || Some("fnv1a64:0d".to_string());
        assert_eq!(
            l.note_catalogue("d.csv", "xxh64:0e", 3, None, &other)
                .unwrap()
                .as_deref(),
            Some("fnv1a64:0c")
        );
    }
}

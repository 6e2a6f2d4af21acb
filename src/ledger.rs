//! The ledger: every decision by every vetter, durable, in SQLite (WAL,
//! `synchronous=FULL`). Append-only — every decision is a new row, undo is a
//! new row, triggers refuse updates and deletes — so history, undo and team
//! review come free. A decision is committed before it is reported as made.

use std::path::{Path, PathBuf};
use std::sync::Arc;
use std::time::{Duration, SystemTime, UNIX_EPOCH};

use rusqlite::{Connection, params};

use crate::decision::{Decision, Reason};

mod disagree;
mod file;
mod seen;
mod stamps;
mod tally;
mod unlisted;
mod views;
pub use crate::fingerprint::{fingerprint, fingerprint_file, fingerprint_text};
use file::check_ours;
pub use file::{
    classify, data_dir, default_path, default_path_with, login_name, network_file_system,
};
pub use seen::recorded_fingerprint;
pub use stamps::{Stamp, Stamps};
pub use tally::Tally;
pub use views::{Decided, Latest, ReadAhead};

/// `PRAGMA application_id` of a starsift ledger: "STSF".
pub const APPLICATION_ID: i32 = 0x5354_5346;
/// The schema this build writes. Version 1 lacked `tool_version` and `undoes`.
pub const SCHEMA_VERSION: i32 = 2;
/// How long a writer waits for another to finish, per attempt.
const BUSY_TIMEOUT: Duration = Duration::from_secs(5);
/// Attempts at a write that keeps finding the ledger locked.
const WRITE_ATTEMPTS: u32 = 10;

#[derive(Debug, thiserror::Error)]
pub enum LedgerError {
    #[error(
        "{path}: not a starsift ledger ({why}); it was left unchanged. Choose another file with --ledger PATH"
    )]
    Foreign { path: String, why: String },
    #[error("{path}: the ledger cannot be written: {message}. Nothing was recorded")]
    Unwritable { path: String, message: String },
    #[error(
        "{path}: the ledger is damaged ({why}); starsift left it as it is. Keep a copy, then recover what it holds with the sqlite3 tool: sqlite3 {path} .recover | sqlite3 recovered.sqlite, and give --ledger recovered.sqlite"
    )]
    Damaged { path: String, why: String },
    #[error(
        "{path}: the disk holding the ledger is full; nothing was recorded and the ledger is intact. Free some space and try again"
    )]
    DiskFull { path: String },
    #[error("{path}: cannot open the ledger: {message}")]
    Open { path: String, message: String },
    #[error(
        "{path}: the ledger has schema version {found}, newer than this starsift understands ({SCHEMA_VERSION}); upgrade starsift"
    )]
    TooNew { path: String, found: i32 },
    #[error("{0}")]
    Invalid(String),
}

/// One row of the ledger.
#[derive(Clone, Debug, PartialEq)]
pub struct Entry {
    pub id: i64,
    pub candidate: String,
    /// Star, vetter and tool version repeat from row to row: shared, not copied.
    pub star: Arc<str>,
    pub vetter: Arc<str>,
    pub decision: Decision,
    pub note: Option<String>,
    /// RFC 3339, UTC.
    pub decided_at: String,
    pub tool_version: Option<Arc<str>>,
    /// The entry an undo reverted.
    pub undoes: Option<i64>,
}

/// What a caller asks to record.
#[derive(Clone, Debug, PartialEq)]
pub struct NewDecision<'a> {
    pub candidate: &'a str,
    pub star: &'a str,
    pub vetter: &'a str,
    pub decision: Decision,
    pub note: Option<&'a str>,
    pub undoes: Option<i64>,
}

/// An open ledger.
pub struct Ledger {
    conn: Connection,
    path: PathBuf,
}

/// Version 2. The catalogue table may also have a `stamp` column, added by
/// the first sighting with a file stamp (`seen.rs`) without a new version.
const SCHEMA_V2: &str = "
CREATE TABLE IF NOT EXISTS catalogue (
    id INTEGER PRIMARY KEY,
    path TEXT NOT NULL,
    fingerprint TEXT NOT NULL,
    candidates INTEGER NOT NULL,
    seen_at TEXT NOT NULL
);
CREATE TABLE IF NOT EXISTS decision (
    id INTEGER PRIMARY KEY AUTOINCREMENT,
    candidate TEXT NOT NULL,
    star TEXT NOT NULL,
    vetter TEXT NOT NULL,
    decision TEXT NOT NULL CHECK (decision IN ('open', 'kept', 'rejected', 'parked')),
    reason TEXT CHECK ((decision = 'rejected') = (reason IS NOT NULL)),
    note TEXT,
    decided_at TEXT NOT NULL,
    tool_version TEXT,
    undoes INTEGER REFERENCES decision(id)
);
CREATE INDEX IF NOT EXISTS decision_by_candidate ON decision (candidate, id);
CREATE INDEX IF NOT EXISTS decision_by_vetter ON decision (vetter, candidate, id);
CREATE TRIGGER IF NOT EXISTS decision_append_only_update BEFORE UPDATE ON decision
    BEGIN SELECT RAISE(ABORT, 'the ledger is append-only'); END;
CREATE TRIGGER IF NOT EXISTS decision_append_only_delete BEFORE DELETE ON decision
    BEGIN SELECT RAISE(ABORT, 'the ledger is append-only'); END;
";

/// The version-1 schema, kept to test and perform migrations.
pub const SCHEMA_V1: &str = "
CREATE TABLE catalogue (id INTEGER PRIMARY KEY, path TEXT NOT NULL, fingerprint TEXT NOT NULL,
    candidates INTEGER NOT NULL, seen_at TEXT NOT NULL);
CREATE TABLE decision (id INTEGER PRIMARY KEY AUTOINCREMENT, candidate TEXT NOT NULL, star TEXT NOT NULL,
    vetter TEXT NOT NULL, decision TEXT NOT NULL, reason TEXT, note TEXT, decided_at TEXT NOT NULL);
";

/// SQLite's file header (the first 16 bytes of every database file).
const SQLITE_MAGIC: &[u8; 16] = b"SQLite format 3\0";

pub fn now_rfc3339() -> String {
    let d = SystemTime::now()
        .duration_since(UNIX_EPOCH)
        .unwrap_or_default();
    rfc3339(d.as_secs() as i64, d.subsec_millis())
}

/// UTC date and time from Unix seconds (civil-from-days, Hinnant 2013).
pub fn rfc3339(secs: i64, millis: u32) -> String {
    let days = secs.div_euclid(86_400);
    let rem = secs.rem_euclid(86_400);
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let y = yoe + era * 400;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = if m <= 2 { y + 1 } else { y };
    format!(
        "{y:04}-{m:02}-{d:02}T{:02}:{:02}:{:02}.{millis:03}Z",
        rem / 3600,
        rem % 3600 / 60,
        rem % 60
    )
}

impl Ledger {
    /// Opens (or creates) a ledger. A file that is not ours is refused before
    /// anything is written to it.
    pub fn open(path: &Path) -> Result<Ledger, LedgerError> {
        let name = path.display().to_string();
        if let Some(fs) = network_file_system(path) {
            return Err(LedgerError::Unwritable {
                path: name,
                message: format!(
                    "it is on a network file system ({fs}), where SQLite's write-ahead log cannot \
                     be shared safely between machines; keep the ledger on a local disk of one \
                     machine (--ledger /local/path) and let the team reach it there, over SSH"
                ),
            });
        }
        if path.exists() {
            check_ours(path)?;
        }
        let conn = Connection::open(path).map_err(|e| LedgerError::Open {
            path: name.clone(),
            message: e.to_string(),
        })?;
        conn.busy_timeout(BUSY_TIMEOUT)
            .map_err(|e| LedgerError::Open {
                path: name.clone(),
                message: e.to_string(),
            })?;
        let mut ledger = Ledger {
            conn,
            path: path.to_path_buf(),
        };
        ledger.prepare()?;
        Ok(ledger)
    }

    pub fn path(&self) -> &Path {
        &self.path
    }

    fn name(&self) -> String {
        self.path.display().to_string()
    }

    /// The error a failed SQLite call means for this ledger.
    fn classify(&self, e: rusqlite::Error) -> LedgerError {
        classify(&self.path, e)
    }

    fn unwritable(&self, e: impl std::fmt::Display) -> LedgerError {
        LedgerError::Unwritable {
            path: self.name(),
            message: e.to_string(),
        }
    }

    /// WAL, full sync, schema created or migrated, retried (with jitter)
    /// while another process holds the lock: several vetters opening a new
    /// ledger at the same moment all succeed, one of them creating it.
    fn prepare(&mut self) -> Result<(), LedgerError> {
        let mut last = None;
        for attempt in 0..PREPARE_ATTEMPTS {
            match self.try_prepare() {
                Ok(()) => return Ok(()),
                Err(Prepare::Busy(e)) => {
                    last = Some(e);
                    std::thread::sleep(backoff(attempt));
                }
                // A ledger being created this very moment by another
                // process can read as damaged for an instant: look again.
                Err(Prepare::Fatal(LedgerError::Damaged { .. }))
                    if attempt < 6 && file::just_written(&self.path) =>
                {
                    std::thread::sleep(backoff(attempt));
                }
                Err(Prepare::Fatal(e)) => return Err(e),
            }
        }
        Err(self.unwritable(format!(
            "still locked by another process after {PREPARE_ATTEMPTS} tries ({})",
            last.map_or(String::new(), |e| e.to_string())
        )))
    }

    fn try_prepare(&mut self) -> Result<(), Prepare> {
        let name = self.name();
        let fatal = |e: rusqlite::Error| {
            if is_busy(&e) {
                Prepare::Busy(e)
            } else {
                Prepare::Fatal(classify(Path::new(&name), e))
            }
        };
        let version: i32 = self
            .conn
            .query_row("PRAGMA user_version", [], |r| r.get(0))
            .map_err(fatal)?;
        if version > SCHEMA_VERSION {
            return Err(Prepare::Fatal(LedgerError::TooNew {
                path: self.name(),
                found: version,
            }));
        }
        let mode: String = self
            .conn
            .query_row("PRAGMA journal_mode=WAL", [], |r| r.get(0))
            .map_err(fatal)?;
        if !mode.eq_ignore_ascii_case("wal") {
            return Err(Prepare::Fatal(
                self.unwritable(format!("journal mode is {mode}, not WAL")),
            ));
        }
        // A page cache of up to 64 MiB (SQLite's default is 2 MiB): a batch
        // of decisions (`decide --from`, a bulk decision) is written at its
        // commit, not spilled to the WAL page by page and read back. 100,000
        // decisions made 90,000 page writes and 82,000 reads with the
        // default, 12,000 and 4,000 with this.
        self.conn
            .execute_batch(
                "PRAGMA synchronous=FULL; PRAGMA foreign_keys=ON; PRAGMA cache_size=-65536;",
            )
            .map_err(fatal)?;
        if version == SCHEMA_VERSION {
            return Ok(());
        }
        // Created or migrated under an exclusive lock, after reading the
        // version again: another process may have just done it.
        let tx = self
            .conn
            .transaction_with_behavior(rusqlite::TransactionBehavior::Exclusive)
            .map_err(fatal)?;
        let result = (|| {
            let now: i32 = tx.query_row("PRAGMA user_version", [], |r| r.get(0))?;
            if now == SCHEMA_VERSION {
                return Ok(());
            }
            if now == 1 {
                // v1 → v2: who wrote each row, and which row an undo reverts.
                tx.execute_batch("ALTER TABLE decision ADD COLUMN tool_version TEXT;")?;
                tx.execute_batch(
                    "ALTER TABLE decision ADD COLUMN undoes INTEGER REFERENCES decision(id);",
                )?;
            }
            tx.execute_batch(SCHEMA_V2)?;
            tx.execute_batch(&format!(
                "PRAGMA application_id = {APPLICATION_ID}; PRAGMA user_version = {SCHEMA_VERSION};"
            ))
        })();
        result.and_then(|()| tx.commit()).map_err(fatal)
    }

    /// Runs a write transaction, retrying while another writer holds the lock.
    fn write<T>(
        &mut self,
        f: impl Fn(&rusqlite::Transaction) -> rusqlite::Result<T>,
    ) -> Result<T, LedgerError> {
        let path = self.name();
        let unwritable = |e: &dyn std::fmt::Display| LedgerError::Unwritable {
            path: path.clone(),
            message: e.to_string(),
        };
        let mut last = None;
        for attempt in 0..WRITE_ATTEMPTS {
            let tx = match self
                .conn
                .transaction_with_behavior(rusqlite::TransactionBehavior::Immediate)
            {
                Ok(tx) => tx,
                Err(e) if is_busy(&e) => {
                    last = Some(e);
                    std::thread::sleep(backoff(attempt));
                    continue;
                }
                Err(e) => return Err(classify(&self.path, e)),
            };
            match f(&tx).and_then(|v| tx.commit().map(|()| v)) {
                Ok(v) => return Ok(v),
                Err(e) if is_busy(&e) => last = Some(e),
                Err(e) => return Err(classify(&self.path, e)),
            }
        }
        Err(unwritable(&format!(
            "still locked by another writer after {WRITE_ATTEMPTS} tries ({})",
            last.map_or(String::new(), |e| e.to_string())
        )))
    }

    /// Records a decision; returns its id once it is committed to disk.
    pub fn record(&mut self, d: &NewDecision) -> Result<i64, LedgerError> {
        let ids = self.record_all(std::slice::from_ref(d))?;
        ids.first()
            .copied()
            .ok_or_else(|| self.unwritable("no row was written"))
    }

    /// Records many decisions in one transaction (a bulk decision).
    pub fn record_all(&mut self, ds: &[NewDecision]) -> Result<Vec<i64>, LedgerError> {
        if ds.iter().any(|d| d.vetter.trim().is_empty()) {
            return Err(LedgerError::Invalid(
                "a decision needs a vetter name".into(),
            ));
        }
        let at = now_rfc3339();
        let version = format!("starsift {}", env!("CARGO_PKG_VERSION"));
        self.write(|tx| {
            let mut stmt = tx.prepare_cached(
                "INSERT INTO decision (candidate, star, vetter, decision, reason, note, decided_at, tool_version, undoes)
                 VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9)",
            )?;
            let mut ids = Vec::with_capacity(ds.len());
            for d in ds {
                stmt.execute(params![
                    d.candidate,
                    d.star,
                    d.vetter,
                    d.decision.name(),
                    d.decision.reason().map(Reason::name),
                    d.note,
                    at,
                    version,
                    d.undoes
                ])?;
                ids.push(tx.last_insert_rowid());
            }
            Ok(ids)
        })
    }

    /// Number of entries.
    pub fn len(&self) -> Result<usize, LedgerError> {
        self.conn
            .query_row("SELECT COUNT(*) FROM decision", [], |r| r.get::<_, i64>(0))
            .map(|n| n as usize)
            .map_err(|e| self.classify(e))
    }

    pub fn is_empty(&self) -> Result<bool, LedgerError> {
        Ok(self.len()? == 0)
    }

    /// SQLite's own consistency check: "ok" when the file is sound.
    pub fn integrity(&self) -> Result<String, LedgerError> {
        self.conn
            .query_row("PRAGMA integrity_check", [], |r| r.get(0))
            .map_err(|e| self.classify(e))
    }
}

/// Why preparing a ledger stopped: another process holds it (try again) or
/// an error to report.
enum Prepare {
    Busy(rusqlite::Error),
    Fatal(LedgerError),
}

/// How many times opening a ledger is tried while another process holds it.
const PREPARE_ATTEMPTS: u32 = 12;

/// The wait before try `attempt + 1`: 10 ms doubling to at most 640 ms,
/// with up to half again at random so that processes that collided do not
/// collide again (jitter from the clock and the process id).
fn backoff(attempt: u32) -> Duration {
    let base = 10u64 << attempt.min(6);
    let nanos = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.subsec_nanos() as u64);
    let noise = (nanos ^ (std::process::id() as u64).wrapping_mul(0x9e37_79b9)) % (base / 2 + 1);
    Duration::from_millis(base + noise)
}

fn is_busy(e: &rusqlite::Error) -> bool {
    matches!(
        e.sqlite_error_code(),
        Some(rusqlite::ErrorCode::DatabaseBusy) | Some(rusqlite::ErrorCode::DatabaseLocked)
    )
}

#[cfg(test)]
mod tests;

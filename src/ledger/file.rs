//! Where a ledger lives and what a file is: the default path of a
//! catalogue's ledger, the check that an existing file is one of ours
//! (without writing to it), what a failed SQLite call means (damaged, full
//! disk, not writable), network file systems, and who the vetter is.

use std::path::{Path, PathBuf};

use rusqlite::{Connection, OpenFlags};

use super::{APPLICATION_ID, BUSY_TIMEOUT, LedgerError, SQLITE_MAGIC};

/// A path for an SQLite `file:` URI: `%`, `?` and `#` percent-encoded
/// (RFC 3986; SQLite's URI file names).
fn uri_path(path: &Path) -> String {
    let text = path.display().to_string();
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '%' => out.push_str("%25"),
            '?' => out.push_str("%3f"),
            '#' => out.push_str("%23"),
            c => out.push(c),
        }
    }
    out
}

/// The network file system holding `path` (its folder when the file does
/// not exist yet), by the file-system magic numbers of statfs(2) on Linux;
/// `None` on a local disk or elsewhere.
#[cfg(target_os = "linux")]
pub fn network_file_system(path: &Path) -> Option<&'static str> {
    use std::os::unix::ffi::OsStrExt;
    let probe = if path.exists() {
        path.to_path_buf()
    } else {
        path.parent()
            .filter(|p| !p.as_os_str().is_empty())
            .unwrap_or(Path::new("."))
            .to_path_buf()
    };
    let c = std::ffi::CString::new(probe.as_os_str().as_bytes()).ok()?;
    let mut st: libc::statfs = unsafe { std::mem::zeroed() };
    // SAFETY: `c` is NUL-terminated and `st` is a valid statfs to fill.
    if unsafe { libc::statfs(c.as_ptr(), &mut st) } != 0 {
        return None;
    }
    // statfs(2) and linux/magic.h (from memory).
    match st.f_type as u64 {
        0x6969 => Some("NFS"),
        0x517b => Some("SMB"),
        0xff53_4d42 => Some("CIFS"),
        0xfe53_4d42 => Some("SMB2"),
        0x5346_414f => Some("AFS"),
        0x00c3_6400 => Some("Ceph"),
        0x0102_1997 => Some("9P"),
        _ => None,
    }
}

#[cfg(not(target_os = "linux"))]
pub fn network_file_system(_path: &Path) -> Option<&'static str> {
    None
}

/// What a failed SQLite call means for the ledger at `path`: damaged (a
/// corrupt or truncated file), a full disk, or not writable (read-only file
/// or folder, a side file left by another user, permissions), each with its
/// own error and advice.
pub fn classify(path: &Path, e: rusqlite::Error) -> LedgerError {
    use rusqlite::ErrorCode::*;
    let name = path.display().to_string();
    match e.sqlite_error_code() {
        Some(DatabaseCorrupt | NotADatabase) => LedgerError::Damaged {
            path: name,
            why: e.to_string(),
        },
        Some(DiskFull) => LedgerError::DiskFull { path: name },
        Some(ReadOnly | CannotOpen | PermissionDenied) => {
            let side: Vec<String> = ["-wal", "-shm"]
                .iter()
                .map(|s| format!("{name}{s}"))
                .filter(|p| {
                    std::fs::metadata(p).is_ok_and(|m| m.permissions().readonly())
                        || std::fs::OpenOptions::new().append(true).open(p).is_err()
                            && Path::new(p).exists()
                })
                .collect();
            let hint = if side.is_empty() {
                "check that you may write the file and its folder".to_string()
            } else {
                format!(
                    "the side file {} cannot be written (left by another user or a read-only copy): fix its permissions or remove it when no one else is using the ledger",
                    side.join(" and ")
                )
            };
            LedgerError::Unwritable {
                path: name,
                message: format!("{e}; {hint}"),
            }
        }
        _ => LedgerError::Unwritable {
            path: name,
            message: e.to_string(),
        },
    }
}

/// Refuses a file that is not a starsift ledger without writing to it.
pub(super) fn check_ours(path: &Path) -> Result<(), LedgerError> {
    // A ledger another starsift is creating this very moment can read as
    // damaged for an instant (its header written, its first pages not yet):
    // a file modified in the last few seconds is looked at again, briefly,
    // before it is called damaged. An old damaged file is reported at once.
    let mut attempt = 0;
    loop {
        match check_ours_once(path) {
            Err(LedgerError::Damaged { .. }) if attempt < FRESH_RETRIES && just_written(path) => {
                std::thread::sleep(super::backoff(attempt));
                attempt += 1;
            }
            other => return other,
        }
    }
}

/// Looks at a damaged-looking ledger again this many times when it was
/// written in the last [`FRESH_SECONDS`] (about 1 s in all).
const FRESH_RETRIES: u32 = 6;
const FRESH_SECONDS: u64 = 5;

/// True when the file (or its write-ahead log) changed in the last
/// [`FRESH_SECONDS`].
pub(super) fn just_written(path: &Path) -> bool {
    let recent = |p: &Path| {
        std::fs::metadata(p)
            .and_then(|m| m.modified())
            .ok()
            .and_then(|t| t.elapsed().ok())
            .is_some_and(|age| age.as_secs() < FRESH_SECONDS)
    };
    recent(path) || recent(Path::new(&format!("{}-wal", path.display())))
}

fn check_ours_once(path: &Path) -> Result<(), LedgerError> {
    open_checked(path).map(|_| ())
}

/// A connection that only reads the ledger at `path`, once it is known to
/// be one of ours (`None` for an empty file, which becomes a new ledger).
/// An idle WAL ledger is read as immutable: looking leaves nothing behind.
pub(super) fn open_checked(path: &Path) -> Result<Option<Connection>, LedgerError> {
    let name = path.display().to_string();
    let foreign = |why: String| LedgerError::Foreign {
        path: name.clone(),
        why,
    };
    let mut head = [0u8; 100];
    let len = std::fs::metadata(path).map(|m| m.len()).unwrap_or(0);
    if len == 0 {
        return Ok(None); // an empty file becomes a new ledger
    }
    use std::io::Read;
    let read = std::fs::File::open(path)
        .and_then(|mut f| f.read(&mut head))
        .map_err(|e| LedgerError::Open {
            path: name.clone(),
            message: e.to_string(),
        })?;
    if read < 16 || &head[..16] != SQLITE_MAGIC {
        return Err(foreign("it is not an SQLite database".into()));
    }
    // The database header (sqlite.org/fileformat2.html §1.3): the
    // application id at offset 68 and the write-ahead-log flag at 18. A
    // foreign id is refused without opening the file through SQLite at all.
    let header_app = i32::from_be_bytes([head[68], head[69], head[70], head[71]]);
    if read == 100 && header_app != 0 && header_app != APPLICATION_ID {
        return Err(foreign(format!(
            "an SQLite database of another application (application_id {header_app:#x})"
        )));
    }
    // A WAL database no one has open (no -wal beside it) is read as
    // immutable, so that looking at it leaves no -wal or -shm behind.
    let idle_wal = read == 100 && head[18] == 2 && !Path::new(&format!("{name}-wal")).exists();
    // An SQLite file we may not write (or whose WAL index we cannot make)
    // is a ledger problem, not a foreign file.
    // The file starts as an SQLite database: if SQLite cannot read it, it is
    // damaged (truncated, overwritten in part), not someone else's.
    let access = |e: rusqlite::Error| -> LedgerError {
        use rusqlite::ErrorCode::*;
        match e.sqlite_error_code() {
            Some(DatabaseBusy | DatabaseLocked) => LedgerError::Unwritable {
                path: name.clone(),
                message: e.to_string(),
            },
            _ => classify(path, e),
        }
    };
    let conn = if idle_wal {
        let uri = format!("file:{}?immutable=1", uri_path(path));
        Connection::open_with_flags(
            uri,
            OpenFlags::SQLITE_OPEN_READ_ONLY
                | OpenFlags::SQLITE_OPEN_NO_MUTEX
                | OpenFlags::SQLITE_OPEN_URI,
        )
    } else {
        Connection::open_with_flags(
            path,
            OpenFlags::SQLITE_OPEN_READ_ONLY | OpenFlags::SQLITE_OPEN_NO_MUTEX,
        )
    }
    .map_err(access)?;
    // Another process may be creating or writing it: wait as a writer would.
    conn.busy_timeout(BUSY_TIMEOUT).map_err(access)?;
    // One statement, so one snapshot: another starsift may commit the new
    // ledger's schema between two separate reads.
    let (app, version, objects, ours): (i32, i32, i64, bool) = conn
        .query_row(
            "SELECT (SELECT application_id FROM pragma_application_id()), \
                    (SELECT user_version FROM pragma_user_version()), \
                    (SELECT COUNT(*) FROM sqlite_master), \
                    (SELECT COUNT(*) = 2 FROM sqlite_master WHERE type = 'table' \
                        AND name IN ('decision', 'catalogue'))",
            [],
            |r| Ok((r.get(0)?, r.get(1)?, r.get(2)?, r.get(3)?)),
        )
        .map_err(access)?;
    if app == APPLICATION_ID {
        return Ok(Some(conn));
    }
    // Nothing in it at all: a database another starsift is creating this very
    // moment (its first transaction not yet committed), or an empty one.
    if app == 0 && objects == 0 {
        return Ok(Some(conn));
    }
    // A version-1 ledger predates the application id: it has our tables.
    if ours && version == 1 {
        return Ok(Some(conn));
    }
    Err(foreign(format!(
        "an SQLite database of another application (application_id {app:#x})"
    )))
}

/// The default ledger of a catalogue: named by where the catalogue is, never
/// by what it holds, so an edited catalogue keeps its decisions. Beside the
/// catalogue (the file a symlink points to, so every link to it shares one
/// ledger), or in the data folder when that folder cannot be written (and for
/// the built-in demo). `fp` is the catalogue's content fingerprint as
/// earlier versions took it (`crate::fingerprint::earlier_fingerprint`):
/// only to find a ledger an earlier version named by content.
pub fn default_path(catalogue: Option<&Path>, fp: &str) -> PathBuf {
    default_path_with(catalogue, &|| fp.to_string())
}

/// [`default_path`] with the fingerprint computed only when the path
/// depends on it (a catalogue in a folder that cannot take a ledger), so
/// the usual case does not read the catalogue a second time.
pub fn default_path_with(catalogue: Option<&Path>, fp: &dyn Fn() -> String) -> PathBuf {
    let data = data_dir().join("starsift");
    match catalogue {
        None => data.join("demo.ledger.sqlite"),
        Some(cat) => {
            let real = std::fs::canonicalize(cat).unwrap_or_else(|_| cat.to_path_buf());
            let beside = PathBuf::from(format!("{}.ledger.sqlite", real.display()));
            let dir = real
                .parent()
                .filter(|p| !p.as_os_str().is_empty())
                .unwrap_or(Path::new("."));
            if beside.exists() || writable_dir(dir) {
                return beside;
            }
            let stem = real
                .file_name()
                .map_or("catalogue".into(), |f| f.to_string_lossy().into_owned());
            // Named by the FNV-1a of the place, as ever (a ledger's name).
            let by_place =
                crate::fingerprint::earlier_fingerprint(real.as_os_str().as_encoded_bytes());
            let short = |f: &str| {
                f.rsplit(':')
                    .next()
                    .unwrap_or("")
                    .get(..8)
                    .unwrap_or("")
                    .to_string()
            };
            let by_path = data.join(format!("{stem}-{}.ledger.sqlite", short(&by_place)));
            let by_content = data.join(format!("{stem}-{}.ledger.sqlite", short(&fp())));
            if !by_path.exists() && by_content.exists() {
                by_content
            } else {
                by_path
            }
        }
    }
}

/// `$XDG_DATA_HOME`, else `~/.local/share` (XDG Base Directory Specification).
pub fn data_dir() -> PathBuf {
    std::env::var_os("XDG_DATA_HOME")
        .map(PathBuf::from)
        .filter(|p| p.is_absolute())
        .or_else(|| std::env::var_os("HOME").map(|h| PathBuf::from(h).join(".local/share")))
        .unwrap_or_else(std::env::temp_dir)
}

fn writable_dir(dir: &Path) -> bool {
    let probe = dir.join(format!(".starsift-probe-{}", std::process::id()));
    match std::fs::File::create(&probe) {
        Ok(_) => {
            let _ = std::fs::remove_file(&probe);
            true
        }
        Err(_) => false,
    }
}

/// The login name: `$USER`, else `$LOGNAME`, else the system's name for
/// this user (the password database, getpwuid_r(3)), else `unknown`.
pub fn login_name() -> String {
    std::env::var("USER")
        .or_else(|_| std::env::var("LOGNAME"))
        .ok()
        .filter(|s| !s.trim().is_empty())
        .or_else(system_login)
        .unwrap_or_else(|| "unknown".into())
}

#[cfg(unix)]
fn system_login() -> Option<String> {
    let mut pwd: libc::passwd = unsafe { std::mem::zeroed() };
    let mut buf = vec![0 as libc::c_char; 4096];
    let mut found: *mut libc::passwd = std::ptr::null_mut();
    // SAFETY: every pointer is valid for the call; on success `found`
    // points to `pwd`, whose strings live in `buf`.
    let rc = unsafe {
        libc::getpwuid_r(
            libc::getuid(),
            &mut pwd,
            buf.as_mut_ptr(),
            buf.len(),
            &mut found,
        )
    };
    if rc != 0 || found.is_null() || pwd.pw_name.is_null() {
        return None;
    }
    // SAFETY: pw_name is a NUL-terminated string inside `buf`.
    let name = unsafe { std::ffi::CStr::from_ptr(pwd.pw_name) };
    Some(name.to_string_lossy().into_owned()).filter(|s| !s.is_empty())
}

#[cfg(not(unix))]
fn system_login() -> Option<String> {
    None
}

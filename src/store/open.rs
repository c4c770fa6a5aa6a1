//! Opening the database file: where it lives by default, what is checked before
//! anything is written (a newer schema, another program's file, an empty, damaged
//! or read-only file), and the connection settings (WAL, synchronous=FULL so a
//! committed batch survives a power cut, foreign keys, a busy timeout).
//!
//! A new log is built whole under a temporary name beside the path and then linked
//! into place, so no process ever finds a log half made: a file of zero bytes at
//! the path is never gelu's work in progress, and is refused as a truncated log.

use std::path::{Path, PathBuf};

use rusqlite::{Connection, MAIN_DB, OpenFlags};

use super::error::{Result, StoreError, classify};
use super::migrate;
use super::tx;

/// `PRAGMA application_id` of a gelu batch log: "gelu" in ASCII.
pub const APPLICATION_ID: i64 = 0x6765_6c75;

/// The default database file: `batches.db` in the platform's data directory for gelu.
pub fn default_path() -> Result<PathBuf> {
    directories::ProjectDirs::from("", "", "gelu")
        .map(|dirs| dirs.data_dir().join("batches.db"))
        .ok_or(StoreError::NoDataDir)
}

/// What the file says about itself before we touch it.
struct Probe {
    version: i64,
    application_id: i64,
    objects: i64,
}

fn probe(conn: &Connection) -> rusqlite::Result<Probe> {
    let version = migrate::user_version(conn)?;
    let application_id = conn.query_row("PRAGMA application_id", [], |r| r.get(0))?;
    let objects = conn.query_row("SELECT count(*) FROM sqlite_schema", [], |r| r.get(0))?;
    Ok(Probe {
        version,
        application_id,
        objects,
    })
}

/// Refuses a file of zero bytes: a batch log is never empty, so it was truncated.
fn refuse_empty(path: &Path) -> Result<()> {
    match std::fs::metadata(path) {
        Ok(meta) if meta.is_file() && meta.len() == 0 => Err(StoreError::EmptyFile {
            path: path.to_path_buf(),
        }),
        _ => Ok(()),
    }
}

/// Refuses a file that is too new for this gelu or is not a gelu batch log (a new,
/// empty SQLite file is neither); returns what it found.
fn refuse_foreign(conn: &Connection, path: &Path) -> Result<Probe> {
    let found = tx::retry(path, || probe(conn).map_err(|e| classify(path, e)))?;
    let supported = migrate::latest_version();
    if found.version > supported {
        return Err(StoreError::TooNew {
            path: path.to_path_buf(),
            found: found.version,
            supported,
        });
    }
    let fresh = found.version == 0 && found.objects == 0;
    if found.application_id != APPLICATION_ID && !fresh {
        return Err(StoreError::NotGelu {
            path: path.to_path_buf(),
        });
    }
    Ok(found)
}

/// Opens the file for reading and writing (an SQLite file is created where none
/// is; [`Store::open`](super::Store::open) builds a new log whole with [`create`]
/// instead), refuses files that are empty, not ours or too new, and applies the
/// connection settings. Does not migrate.
pub fn connect(path: &Path) -> Result<Connection> {
    open_read_write(path, true)
}

fn open_read_write(path: &Path, create: bool) -> Result<Connection> {
    refuse_empty(path)?;
    let mut flags = OpenFlags::SQLITE_OPEN_READ_WRITE | OpenFlags::SQLITE_OPEN_NO_MUTEX;
    if create {
        flags |= OpenFlags::SQLITE_OPEN_CREATE;
    }
    let conn = Connection::open_with_flags(path, flags).map_err(|e| classify(path, e))?;
    conn.busy_timeout(tx::BUSY_TIMEOUT)?;
    if conn.is_readonly(MAIN_DB)? {
        return Err(StoreError::ReadOnly {
            path: path.to_path_buf(),
        });
    }
    refuse_foreign(&conn, path)?;
    let mode: String = tx::retry(path, || {
        conn.pragma_update_and_check(None, "journal_mode", "WAL", |r| r.get(0))
            .map_err(|e| classify(path, e))
    })?;
    if !mode.eq_ignore_ascii_case("wal") {
        return Err(StoreError::Invalid(format!(
            "{} could not be switched to write-ahead logging (it stayed in {mode} mode); \
             keep the batch log on a local disk",
            path.display()
        )));
    }
    conn.pragma_update(None, "synchronous", "FULL")?;
    conn.pragma_update(None, "foreign_keys", true)?;
    // 64 MiB of page cache: a large import then writes each page once, not on every spill.
    conn.pragma_update(None, "cache_size", -65_536)?;
    conn.set_prepared_statement_cache_capacity(128);
    // Savepoint and statement journals in memory (they never hold committed data).
    conn.pragma_update(None, "temp_store", "MEMORY")?;
    Ok(conn)
}

/// Opens an existing log for reading only (a log on read-only media, one the
/// user may not write, or one only read from): the same refusals, no migration,
/// no writes. Returns the connection and the schema version it has.
pub fn connect_read_only(path: &Path) -> Result<(Connection, i64)> {
    refuse_empty(path)?;
    let flags = OpenFlags::SQLITE_OPEN_READ_ONLY | OpenFlags::SQLITE_OPEN_NO_MUTEX;
    let conn = Connection::open_with_flags(path, flags).map_err(|e| classify(path, e))?;
    conn.busy_timeout(tx::BUSY_TIMEOUT)?;
    let found = refuse_foreign(&conn, path)?;
    conn.pragma_update(None, "query_only", true)?;
    Ok((conn, found.version))
}

/// The same error about `path` as `e` is about the temporary file built in its place.
fn about(e: StoreError, path: &Path) -> StoreError {
    let path = path.to_path_buf();
    match e {
        StoreError::ReadOnly { .. } => StoreError::ReadOnly { path },
        StoreError::CannotOpen { .. } => StoreError::CannotOpen { path },
        StoreError::Busy { .. } => StoreError::Busy { path },
        StoreError::Corrupt { detail, .. } => StoreError::Corrupt { path, detail },
        StoreError::Io { source, .. } => StoreError::Io { path, source },
        other => other,
    }
}

/// Makes a new log at `path` (which does not exist): built whole under a
/// temporary name beside it by `build`, then linked into place. Returns false when
/// another process made the log first (then its log is the one to open).
pub fn create(
    path: &Path,
    build: impl FnOnce(&mut Connection, &Path) -> Result<()>,
) -> Result<bool> {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "gelu.db".to_owned());
    let stamp = crate::clock::now()
        .timestamp_nanos_opt()
        .unwrap_or_default();
    let tmp = path.with_file_name(format!(".{name}.new-{}-{stamp}", std::process::id()));
    let remove = |p: &Path| {
        for suffix in ["", "-wal", "-shm", "-journal"] {
            let mut s = p.as_os_str().to_owned();
            s.push(suffix);
            let _ = std::fs::remove_file(std::path::PathBuf::from(s));
        }
    };
    let built = (|| {
        let mut conn = open_read_write(&tmp, true)?;
        build(&mut conn, &tmp)?;
        conn.execute_batch("PRAGMA wal_checkpoint(TRUNCATE);")?;
        Ok(())
    })();
    if let Err(e) = built {
        remove(&tmp);
        return Err(about(e, path));
    }
    let placed = match std::fs::hard_link(&tmp, path) {
        Ok(()) => Ok(true),
        Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => Ok(false),
        // A file system without hard links: move it, unless a log appeared meanwhile.
        Err(_) if path.exists() => Ok(false),
        Err(_) => std::fs::rename(&tmp, path).map(|()| true),
    };
    remove(&tmp);
    placed.map_err(|source| StoreError::Io {
        path: path.to_path_buf(),
        source,
    })
}

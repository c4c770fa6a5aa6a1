//! Opening the database file: where it lives by default, what is checked before
//! anything is written (a newer schema, another program's file, a damaged or
//! read-only file), and the connection settings (WAL, synchronous=FULL so a
//! committed batch survives a power cut, foreign keys, a busy timeout).

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

/// Refuses a file newer than this program, or one that is not a gelu log (an
/// empty file is neither).
fn refuse_foreign(path: &Path, found: &Probe) -> Result<()> {
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
    Ok(())
}

/// Opens an existing file to read only (nothing is created or written), refusing
/// files that are not ours or too new. Returns the connection and the schema version.
pub fn connect_read_only(path: &Path) -> Result<(Connection, i64)> {
    let flags = OpenFlags::SQLITE_OPEN_READ_ONLY | OpenFlags::SQLITE_OPEN_NO_MUTEX;
    let conn = Connection::open_with_flags(path, flags).map_err(|e| classify(path, e))?;
    conn.busy_timeout(tx::BUSY_TIMEOUT)?;
    let found = tx::retry(path, || probe(&conn).map_err(|e| classify(path, e)))?;
    refuse_foreign(path, &found)?;
    Ok((conn, found.version))
}

/// Opens (creating if needed) the file, refuses files that are not ours or too new,
/// and applies the connection settings. Does not migrate.
pub fn connect(path: &Path) -> Result<Connection> {
    let flags = OpenFlags::SQLITE_OPEN_READ_WRITE
        | OpenFlags::SQLITE_OPEN_CREATE
        | OpenFlags::SQLITE_OPEN_NO_MUTEX;
    let conn = Connection::open_with_flags(path, flags).map_err(|e| classify(path, e))?;
    conn.busy_timeout(tx::BUSY_TIMEOUT)?;
    if conn.is_readonly(MAIN_DB)? {
        return Err(StoreError::ReadOnly {
            path: path.to_path_buf(),
        });
    }
    let found = tx::retry(path, || probe(&conn).map_err(|e| classify(path, e)))?;
    refuse_foreign(path, &found)?;
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

//! Opening the batch log on real temporary files: creation from nothing and from
//! an empty SQLite file (schema version 0), the sample seed, connection settings,
//! and the files that must be refused untouched (zero bytes, too new, another
//! program's, not a database, read-only for writing).

use gelu::store::migrate::latest_version;
use gelu::store::{Store, StoreError};
use rusqlite::Connection;

use crate::batch_common::Immutable;

fn pragma_i64(conn: &Connection, name: &str) -> i64 {
    conn.query_row(&format!("PRAGMA {name}"), [], |r| r.get(0))
        .unwrap()
}

#[test]
fn a_new_file_is_created_migrated_and_seeded() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("log.db");
    let store = Store::open(&path).unwrap();
    assert_eq!(store.migration().from, 0);
    assert_eq!(store.migration().to, latest_version());
    assert!(store.migration().backup.is_none());
    let names: Vec<String> = store
        .recipes()
        .unwrap()
        .into_iter()
        .map(|r| r.name)
        .collect();
    assert_eq!(names.len(), gelu::samples::SAMPLE_RECIPES.len());
    assert!(names.iter().any(|n| n == "Harbour vanilla"), "{names:?}");
    assert!(store.check().unwrap().is_empty());
    drop(store);

    let conn = Connection::open(&path).unwrap();
    assert_eq!(pragma_i64(&conn, "user_version"), latest_version());
    assert_eq!(pragma_i64(&conn, "application_id"), 0x6765_6c75);
    let mode: String = conn
        .query_row("PRAGMA journal_mode", [], |r| r.get(0))
        .unwrap();
    assert_eq!(mode, "wal");

    // Opening again neither migrates nor seeds twice.
    let again = Store::open(&path).unwrap();
    assert_eq!(again.migration().from, latest_version());
    assert_eq!(again.recipes().unwrap().len(), names.len());
}

#[test]
fn a_zero_byte_file_is_refused_and_an_empty_sqlite_file_at_version_zero_is_migrated() {
    let dir = tempfile::tempdir().unwrap();
    // A log is never empty: a file of zero bytes is a truncated log, not a new one.
    let empty = dir.path().join("empty.db");
    std::fs::write(&empty, b"").unwrap();
    let err = Store::open(&empty).unwrap_err();
    assert!(matches!(err, StoreError::EmptyFile { .. }), "{err}");
    assert!(
        err.to_string().contains("restore it from a backup"),
        "{err}"
    );
    assert_eq!(std::fs::metadata(&empty).unwrap().len(), 0);
    assert!(Store::open_read_only(&empty).is_err());

    // An SQLite file with nothing in it (made by another tool) becomes a log.
    let vacuumed = dir.path().join("v0.db");
    let conn = Connection::open(&vacuumed).unwrap();
    conn.execute_batch("PRAGMA user_version = 0; VACUUM;")
        .unwrap();
    drop(conn);
    let store = Store::open(&vacuumed).unwrap();
    assert_eq!(store.migration().to, latest_version());
}

#[test]
fn a_database_from_a_newer_gelu_is_refused_untouched() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("newer.db");
    drop(Store::open(&path).unwrap());
    let newer = latest_version() + 3;
    let conn = Connection::open(&path).unwrap();
    conn.pragma_update(None, "user_version", newer).unwrap();
    conn.pragma_update(None, "journal_mode", "DELETE").unwrap();
    drop(conn);
    let before = std::fs::read(&path).unwrap();

    let err = Store::open(&path).unwrap_err();
    assert!(matches!(err, StoreError::TooNew { found, supported, .. }
        if found == newer && supported == latest_version()));
    let message = err.to_string();
    assert!(message.contains(&format!("version {newer}")), "{message}");
    assert!(
        message.contains(&format!("up to version {}", latest_version())),
        "{message}"
    );
    assert!(message.contains("untouched"), "{message}");
    assert_eq!(
        std::fs::read(&path).unwrap(),
        before,
        "the file must not change"
    );
    assert!(
        !path.with_extension("db-wal").exists(),
        "not even a WAL file is made"
    );
}

#[test]
fn another_programs_database_is_refused_untouched() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("other.db");
    let conn = Connection::open(&path).unwrap();
    conn.execute_batch("CREATE TABLE invoices (n INTEGER); INSERT INTO invoices VALUES (1);")
        .unwrap();
    drop(conn);
    let before = std::fs::read(&path).unwrap();
    let err = Store::open(&path).unwrap_err();
    assert!(matches!(err, StoreError::NotGelu { .. }), "{err}");
    assert!(err.to_string().contains("not a gelu batch log"));
    assert_eq!(std::fs::read(&path).unwrap(), before);
}

#[test]
fn a_file_that_is_not_a_database_is_refused_untouched() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("notes.txt");
    let text = "Harbour vanilla: 5 kg on Tuesday.\n".repeat(200);
    std::fs::write(&path, &text).unwrap();
    let err = Store::open(&path).unwrap_err();
    assert!(matches!(err, StoreError::NotADatabase { .. }), "{err}");
    assert!(err.to_string().contains("Nothing was changed"));
    assert_eq!(std::fs::read_to_string(&path).unwrap(), text);
}

#[test]
fn a_read_only_file_gets_a_clear_message() {
    use std::os::unix::fs::PermissionsExt;
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("ro.db");
    drop(Store::open(&path).unwrap());
    std::fs::set_permissions(&path, std::fs::Permissions::from_mode(0o444)).unwrap();
    let mut _guard = None;
    if std::fs::OpenOptions::new().write(true).open(&path).is_ok() {
        // Root ignores permission bits; an immutable file stops even root.
        _guard = Immutable::set(&path);
        if _guard.is_none() {
            eprintln!("skipped: this user writes read-only files and chattr is not available");
            return;
        }
    }
    let before = std::fs::read(&path).unwrap();
    let err = Store::open(&path).unwrap_err();
    assert!(matches!(err, StoreError::ReadOnly { .. }), "{err}");
    assert!(err.to_string().contains("cannot be written"));
    assert_eq!(std::fs::read(&path).unwrap(), before);
}

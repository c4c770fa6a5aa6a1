//! Opening the batch log on real temporary files: creation from nothing and from
//! an empty SQLite file (schema version 0), the sample seed, connection settings,
//! and the files that must be refused untouched (too new, another program's, not a
//! database, read-only).

use gelu::store::migrate::latest_version;
use gelu::store::{Store, StoreError};
use rusqlite::Connection;

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
fn an_empty_sqlite_file_at_version_zero_is_migrated() {
    let dir = tempfile::tempdir().unwrap();
    let empty = dir.path().join("empty.db");
    std::fs::write(&empty, b"").unwrap();
    let store = Store::open(&empty).unwrap();
    assert_eq!(store.migration().from, 0);
    assert!(store.check().unwrap().is_empty());

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

/// Makes a file immutable (`chattr +i`) for as long as it lives; root ignores
/// permission bits but not this.
struct Immutable(std::path::PathBuf);

impl Immutable {
    fn set(path: &std::path::Path) -> Option<Immutable> {
        let ok = std::process::Command::new("chattr")
            .arg("+i")
            .arg(path)
            .status()
            .is_ok_and(|s| s.success());
        ok.then(|| Immutable(path.to_path_buf()))
    }
}

impl Drop for Immutable {
    fn drop(&mut self) {
        let _ = std::process::Command::new("chattr")
            .arg("-i")
            .arg(&self.0)
            .status();
    }
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

//! Migrating batch logs made by earlier versions of gelu. `tests/fixtures/batch-log-v1.db`
//! was written by the first release (schema version 1) through its own commands:
//! three batches from the sample recipes (one amended after sign-off, one liqueur made
//! by volume, one draft), with measurements, notes and lots. `batch-log-v1.jsonl` is
//! what that release exported from it. Each test works on a copy.

use std::path::{Path, PathBuf};

use gelu::store::Store;
use gelu::store::migrate::latest_version;
use rusqlite::Connection;

use crate::store_common::{export, search};

const V1_DB: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/fixtures/batch-log-v1.db"
);
const V1_EXPORT: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/fixtures/batch-log-v1.jsonl"
);

fn copy_of_v1(dir: &Path) -> PathBuf {
    let path = dir.join("log.db");
    std::fs::copy(V1_DB, &path).unwrap();
    path
}

/// Every object of the schema but `batch_predictions`, with its SQL.
fn other_objects(conn: &Connection) -> Vec<String> {
    conn.prepare(
        "SELECT name || ': ' || coalesce(sql, '') FROM sqlite_schema
         WHERE name <> 'batch_predictions' ORDER BY name",
    )
    .unwrap()
    .query_map([], |r| r.get(0))
    .unwrap()
    .collect::<rusqlite::Result<_>>()
    .unwrap()
}

fn table_sql(conn: &Connection, name: &str) -> String {
    conn.query_row(
        "SELECT sql FROM sqlite_schema WHERE name = ?1",
        [name],
        |r| r.get(0),
    )
    .unwrap()
}

#[test]
fn a_version_1_log_migrates_and_exports_exactly_what_version_1_exported() {
    let dir = tempfile::tempdir().unwrap();
    let path = copy_of_v1(dir.path());
    let store = Store::open(&path).unwrap();
    assert_eq!(store.migration().from, 1);
    assert_eq!(store.migration().to, latest_version());
    assert_eq!(
        export(&store),
        std::fs::read_to_string(V1_EXPORT).unwrap(),
        "every field of every record survives the migration"
    );
    assert!(store.check().unwrap().is_empty(), "{:?}", store.check());

    // The copy made before migrating is the untouched version 1 file.
    let backup = store
        .migration()
        .backup
        .clone()
        .expect("a backup before migrating");
    let old = Connection::open(&backup).unwrap();
    let version: i64 = old
        .query_row("PRAGMA user_version", [], |r| r.get(0))
        .unwrap();
    assert_eq!(version, 1);
    assert!(table_sql(&old, "batch_predictions").contains("json_valid"));

    // Its search entries (one per line's lot in version 1) still find the batches.
    for (words, code) in [
        ("S-2611-7", "B-20261202-0001"),
        ("C-2611-11", "B-20261202-0001"),
        ("lemons", "B-20261202-0003"),
    ] {
        assert_eq!(search(&store, words), [code], "{words}");
    }
    drop(store);

    // Opening again does not migrate again, and has nothing to tell.
    let again = Store::open(&path).unwrap();
    assert_eq!(again.migration().from, latest_version());
    assert!(again.migration().backup.is_none());
    assert_eq!(again.migration().notice(&path), None);
}

#[test]
fn the_command_line_says_when_it_upgraded_a_log_and_where_the_copy_is() {
    let dir = tempfile::tempdir().unwrap();
    let path = copy_of_v1(dir.path());
    let run = || {
        crate::batch_common::gelu(&path)
            .args(["batch", "list"])
            .output()
            .unwrap()
    };
    let first = run();
    assert!(first.status.success());
    let said = String::from_utf8_lossy(&first.stderr);
    let upgraded = format!("upgraded from schema version 1 to {}", latest_version());
    assert!(said.contains(&upgraded), "{said}");
    assert!(said.contains(".bak"), "{said}");
    assert!(String::from_utf8_lossy(&first.stdout).contains("B-20261202-0001"));
    let second = run();
    assert!(
        second.stderr.is_empty(),
        "{}",
        String::from_utf8_lossy(&second.stderr)
    );
}

#[test]
fn migration_2_drops_only_the_json_check_and_every_connection_sees_it() {
    let dir = tempfile::tempdir().unwrap();
    let path = copy_of_v1(dir.path());
    // A connection that has read the version 1 schema before the migration runs.
    let early = Connection::open(&path).unwrap();
    assert!(table_sql(&early, "batch_predictions").contains("json_valid"));
    let before = other_objects(&early);

    // Migration 2 alone (the later sections add tables and columns of their own).
    let mut conn = Connection::open(&path).unwrap();
    let steps = gelu::store::migrate::migrations();
    let migrated = {
        let nothing = |_: &rusqlite::Transaction| Ok(());
        let hooks = gelu::store::migrate::Hooks {
            seed: &nothing,
            after: &nothing,
        };
        gelu::store::migrate::migrate(&mut conn, &path, &steps[..2], &hooks).unwrap()
    };
    assert_eq!((migrated.from, migrated.to), (1, 2));
    drop(conn);
    let sql = table_sql(&early, "batch_predictions");
    assert!(!sql.contains("json_valid"), "{sql}");
    assert!(sql.contains("analysis    TEXT NOT NULL\n"), "{sql}");
    // Every other table, index and trigger is as it was (later migrations may add more).
    let after = other_objects(&early);
    for object in &before {
        assert!(
            after.contains(object),
            "every other table, index and trigger is as it was: {object}"
        );
    }

    // The early connection writes under the new schema: the snapshot text is no
    // longer refused by SQLite, and `db check` is what reports it. (A snapshot for a
    // batch row that does not exist, with foreign keys off, so as to touch no record.)
    early.pragma_update(None, "foreign_keys", false).unwrap();
    let id = 999;
    early
        .execute(
            "INSERT INTO batch_predictions (batch_id, analysis) VALUES (?1, '{not json')",
            [id],
        )
        .expect("the CHECK is gone for a connection opened before the migration");
    let store = Store::open(&path).unwrap();
    let problems = store.check().unwrap();
    assert!(
        problems
            .iter()
            .any(|p| p.contains(&format!("batch row {id} is not valid JSON"))),
        "{problems:?}"
    );
}

#[test]
fn a_migrated_log_still_guards_final_records() {
    let dir = tempfile::tempdir().unwrap();
    let path = copy_of_v1(dir.path());
    drop(Store::open(&path).unwrap());
    let conn = Connection::open(&path).unwrap();
    let final_id: i64 = conn
        .query_row(
            "SELECT id FROM batches WHERE status = 'final' LIMIT 1",
            [],
            |r| r.get(0),
        )
        .unwrap();
    for sql in [
        "INSERT INTO batch_lines (batch_id, position, ingredient, planned_g, lot) VALUES (?1, 99, 'sucrose', 1.0, '')",
        "UPDATE batches SET operator = 'someone else' WHERE id = ?1",
        "DELETE FROM batches WHERE id = ?1",
        "UPDATE batch_predictions SET analysis = '{}' WHERE batch_id = ?1",
    ] {
        let err = conn.execute(sql, [final_id]).unwrap_err().to_string();
        assert!(err.contains("never"), "{sql}: {err}");
    }
}

const V2_DB: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/fixtures/batch-log-v2.db"
);
const V2_EXPORT: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/fixtures/batch-log-v2.jsonl"
);

/// `tests/fixtures/batch-log-v2.db` was written by the release with schema version 2
/// through its own commands: a vanilla batch measured, signed off, then measured and
/// noted again after sign-off (as that release allowed) and amended; a liqueur made by
/// volume and signed off; a draft. `batch-log-v2.jsonl` is what that release exported.
#[test]
fn a_version_2_log_opens_and_exports_exactly_what_version_2_exported() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("log.db");
    std::fs::copy(V2_DB, &path).unwrap();
    let store = Store::open(&path).unwrap();
    assert_eq!(store.migration().from, 2);
    assert_eq!(store.migration().to, latest_version());
    assert_eq!(
        export(&store),
        std::fs::read_to_string(V2_EXPORT).unwrap(),
        "every field of every record survives opening (and any migration)"
    );
    assert!(store.check().unwrap().is_empty(), "{:?}", store.check());
    assert_eq!(search(&store, "WM-4477"), ["B-20261202-0001"]);
}

/// The migration after version 2 on the version 2 fixture: what was recorded after
/// sign-off under version 2 stays where it was, with its own time; from now on a
/// signed-off record takes readings and notes only on its trail; every signed-off
/// record is sealed as it stood at the upgrade, so a later change behind gelu's back
/// is named; and a recipe with versions keeps its name.
#[test]
fn a_version_2_log_keeps_its_late_readings_and_is_sealed_and_guarded_after_the_upgrade() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("log.db");
    std::fs::copy(V2_DB, &path).unwrap();
    let mut store = Store::open(&path).unwrap();
    assert_eq!(store.migration().from, 2);
    let vanilla = store.batch("B-20261202-0001").unwrap().unwrap();
    let late = &vanilla.measurements[3];
    assert_eq!(
        (late.value, late.struck),
        (-5.6, false),
        "the late reading stays"
    );
    assert!(
        late.taken_at > vanilla.finalized_at.unwrap(),
        "with its own time"
    );
    assert_eq!(vanilla.notes.len(), 2);

    // Readings now go on the trail, with a reason.
    let refused = store.add_measurement(
        "B-20261202-0001",
        gelu::batch::MeasurementKind::Brix,
        32.0,
        "Ines",
        None,
    );
    assert!(refused.is_err());
    store
        .add_measurement(
            "B-20261202-0001",
            gelu::batch::MeasurementKind::Brix,
            32.0,
            "Ines",
            Some("read again after the upgrade"),
        )
        .unwrap();
    let now = store.batch("B-20261202-0001").unwrap().unwrap();
    assert_eq!(now.measurements.len(), 5);
    assert_eq!(now.amendments.len(), 2);
    assert!(store.check().unwrap().is_empty(), "{:?}", store.check());
    drop(store);

    let conn = Connection::open(&path).unwrap();
    let seals: Vec<(String, i64)> = conn
        .prepare(
            "SELECT b.code, s.amendments FROM batch_seals s JOIN batches b ON b.id = s.batch_id
             ORDER BY b.code, s.amendments",
        )
        .unwrap()
        .query_map([], |r| Ok((r.get(0)?, r.get(1)?)))
        .unwrap()
        .collect::<rusqlite::Result<_>>()
        .unwrap();
    assert_eq!(
        seals,
        [
            ("B-20261202-0001".to_owned(), 1),
            ("B-20261202-0001".to_owned(), 2),
            ("B-20261202-0002".to_owned(), 0)
        ],
        "sealed at the upgrade as they stood, then at the new entry; the draft is not"
    );
    let measured: i64 = conn
        .query_row(
            "SELECT count(*) FROM measurements m JOIN batches b ON b.id = m.batch_id
             WHERE b.code = 'B-20261202-0001'",
            [],
            |r| r.get(0),
        )
        .unwrap();
    assert_eq!(
        measured, 4,
        "the new reading is on the trail, not in the table"
    );
    for sql in [
        "INSERT INTO measurements (batch_id, kind, value, unit, taken_at, taken_by)
         SELECT id, 'brix', 1.0, '°Bx', made_at, 'x' FROM batches WHERE code = 'B-20261202-0002'",
        "INSERT INTO batch_notes (batch_id, text, written_at, written_by)
         SELECT id, 'late', made_at, 'x' FROM batches WHERE code = 'B-20261202-0002'",
        "UPDATE recipes SET name = 'Another name' WHERE name = 'Harbour vanilla'",
        "DELETE FROM batch_seals",
    ] {
        let err = conn.execute(sql, []).unwrap_err().to_string();
        assert!(
            err.contains("trail") || err.contains("never"),
            "{sql}: {err}"
        );
    }
}

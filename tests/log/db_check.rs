//! `gelu db check` on files changed behind gelu's back: a protecting trigger dropped
//! or rewritten, a final record edited in SQL, a recipe renamed under its batches.
//! Each must be reported by name (exit 1); an untouched file is ok.

use std::path::{Path, PathBuf};

use rusqlite::Connection;

use crate::batch_common::{VANILLA, gelu_cmd as gelu, run_ok};

/// A log with one final vanilla batch (measured, noted, amended) and one draft.
fn log_with_records() -> (tempfile::TempDir, PathBuf, String, String) {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("log.db");
    let new = |size: &str| {
        run_ok(
            &db,
            &["batch", "new", VANILLA, "--size", size, "--by", "Mara"],
        )
        .trim()
        .to_owned()
    };
    let signed = new("2kg");
    run_ok(&db, &["batch", "measure", &signed, "brix=31.5"]);
    run_ok(&db, &["batch", "note", &signed, "first run"]);
    run_ok(&db, &["batch", "finalize", &signed, "--by", "Head cook"]);
    run_ok(
        &db,
        &[
            "batch",
            "amend",
            &signed,
            "--reason",
            "lot misread",
            "--lot",
            "sucrose=S-2",
        ],
    );
    let draft = new("1kg");
    assert!(run_ok(&db, &["db", "check"]).contains("ok"));
    (dir, db, signed, draft)
}

/// `gelu db check`'s report and exit code.
fn check(db: &Path) -> (Option<i32>, String) {
    let out = gelu(db).args(["db", "check"]).output().unwrap();
    (
        out.status.code(),
        String::from_utf8_lossy(&out.stdout).into_owned(),
    )
}

fn trigger_sql(conn: &Connection, name: &str) -> String {
    conn.query_row(
        "SELECT sql FROM sqlite_schema WHERE type = 'trigger' AND name = ?1",
        [name],
        |r| r.get(0),
    )
    .unwrap()
}

#[test]
fn a_dropped_or_rewritten_protection_is_reported_by_name() {
    let (_dir, db, _, _) = log_with_records();
    let conn = Connection::open(&db).unwrap();
    conn.execute_batch("DROP TRIGGER batches_final_is_final")
        .unwrap();
    let sql = trigger_sql(&conn, "amendments_append_only_delete");
    conn.execute_batch("DROP TRIGGER amendments_append_only_delete")
        .unwrap();
    // Same name, but it no longer refuses anything.
    conn.execute_batch(&sql.replace(
        "BEFORE DELETE ON amendments",
        "BEFORE DELETE ON amendments WHEN 0",
    ))
    .unwrap();
    drop(conn);
    let (code, said) = check(&db);
    assert_eq!(code, Some(1), "{said}");
    assert!(said.contains("batches_final_is_final"), "{said}");
    assert!(said.contains("amendments_append_only_delete"), "{said}");
}

#[test]
fn a_final_record_edited_behind_gelus_back_is_named() {
    let (_dir, db, signed, draft) = log_with_records();
    let conn = Connection::open(&db).unwrap();
    conn.execute_batch(
        "DROP TRIGGER batches_final_is_final;
         DROP TRIGGER measurements_append_only_update;",
    )
    .unwrap();
    conn.execute(
        "UPDATE batches SET operator = 'someone else' WHERE code = ?1",
        [&signed],
    )
    .unwrap();
    conn.execute(
        "UPDATE measurements SET value = 29 WHERE batch_id = (SELECT id FROM batches WHERE code = ?1)",
        [&signed],
    )
    .unwrap();
    drop(conn);
    let (code, said) = check(&db);
    assert_eq!(code, Some(1), "{said}");
    let about: Vec<&str> = said.lines().filter(|l| l.contains(&signed)).collect();
    assert!(!about.is_empty(), "the changed record is named: {said}");
    assert!(
        !said.contains(&draft),
        "the untouched draft is not named: {said}"
    );
}

#[test]
fn a_recipe_name_of_a_version_in_use_is_guarded_and_a_rename_is_reported() {
    let (_dir, db, signed, _) = log_with_records();
    let conn = Connection::open(&db).unwrap();
    let err = conn
        .execute(
            "UPDATE recipes SET name = 'Another name' WHERE name = 'Harbour vanilla'",
            [],
        )
        .unwrap_err()
        .to_string();
    assert!(err.contains("never"), "{err}");
    // With the guard dropped, the rename goes through, and the check sees both.
    let guards: Vec<String> = conn
        .prepare("SELECT name FROM sqlite_schema WHERE type = 'trigger' AND tbl_name = 'recipes'")
        .unwrap()
        .query_map([], |r| r.get(0))
        .unwrap()
        .collect::<rusqlite::Result<_>>()
        .unwrap();
    assert!(!guards.is_empty());
    for name in &guards {
        conn.execute_batch(&format!("DROP TRIGGER {name}")).unwrap();
    }
    conn.execute(
        "UPDATE recipes SET name = 'Another name' WHERE name = 'Harbour vanilla'",
        [],
    )
    .unwrap();
    drop(conn);
    let (code, said) = check(&db);
    assert_eq!(code, Some(1), "{said}");
    assert!(said.contains(&guards[0]), "{said}");
    assert!(said.contains(&signed), "{said}");
}

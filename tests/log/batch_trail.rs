//! A finalised record keeps what it showed: readings and notes after sign-off go on
//! its amendment trail (dated, signed, with a reason), an amendment can strike out
//! or correct a reading or a note, and every export holds every reading, note, the
//! sign-off and the whole trail. Run as the real binary on temporary files.

use std::path::{Path, PathBuf};

use serde_json::{Value, json};

use crate::batch_common::{VANILLA, csv_rows, run_err, run_ok};

fn shown(db: &Path, code: &str) -> Value {
    serde_json::from_str(run_ok(db, &["batch", "show", code, "--json"]).trim()).unwrap()
}

/// A vanilla batch measured (draw -6.5 °C) and noted, then signed off.
fn signed_off() -> (tempfile::TempDir, PathBuf, String) {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("log.db");
    let code = run_ok(
        &db,
        &["batch", "new", VANILLA, "--size", "2kg", "--by", "Mara"],
    )
    .trim()
    .to_owned();
    run_ok(
        &db,
        &[
            "batch",
            "measure",
            &code,
            "draw-temp-c=-6.5",
            "--by",
            "Ines",
        ],
    );
    run_ok(&db, &["batch", "note", &code, "first run", "--by", "Ines"]);
    run_ok(&db, &["batch", "finalize", &code, "--by", "Head cook"]);
    (dir, db, code)
}

fn rows_in(db: &Path, table: &str, code: &str) -> i64 {
    let conn = rusqlite::Connection::open(db).unwrap();
    conn.query_row(
        &format!(
            "SELECT count(*) FROM {table} WHERE batch_id = (SELECT id FROM batches WHERE code = ?1)"
        ),
        [code],
        |r| r.get(0),
    )
    .unwrap()
}

#[test]
fn a_reading_after_sign_off_goes_on_the_trail_with_a_reason() {
    let (_dir, db, code) = signed_off();
    let refused = run_err(&db, &["batch", "measure", &code, "draw-temp-c=-5.6"]);
    assert!(refused.contains("--reason"), "{refused}");
    assert_eq!(
        shown(&db, &code)["measurements"].as_array().unwrap().len(),
        1
    );

    run_ok(
        &db,
        &[
            "batch",
            "measure",
            &code,
            "draw-temp-c=-5.6",
            "--by",
            "Ines",
            "--reason",
            "read again after hardening",
        ],
    );
    let b = shown(&db, &code);
    assert_eq!(b["status"], "amended");
    let readings = b["measurements"].as_array().unwrap();
    assert_eq!(readings.len(), 2, "{readings:?}");
    assert_eq!(readings[0]["value"], -6.5, "the signed-off reading stays");
    assert_eq!(readings[1]["value"], -5.6);
    let entry = &b["amendments"][0];
    assert_eq!(entry["reason"], "read again after hardening");
    assert_eq!(entry["by"], "Ines");
    let change = &entry["changes"][0];
    assert_eq!(change["field"], "add-reading");
    assert_eq!(change["kind"], "draw-temp-c");
    assert_eq!(change["value"], -5.6);
    assert_eq!(change["unit"], "°C");
    assert_eq!(change["by"], "Ines");
    assert_eq!(change["taken_at"], readings[1]["taken_at"]);
    assert_eq!(
        rows_in(&db, "measurements", &code),
        1,
        "the table keeps only what was recorded before sign-off"
    );

    // A draft takes readings as they come; a reason there is refused, not dropped.
    let draft = run_ok(&db, &["batch", "new", VANILLA, "--size", "1kg"])
        .trim()
        .to_owned();
    let said = run_err(
        &db,
        &["batch", "measure", &draft, "brix=30", "--reason", "why"],
    );
    assert!(said.contains("draft"), "{said}");
}

#[test]
fn a_note_after_sign_off_goes_on_the_trail_with_a_reason() {
    let (_dir, db, code) = signed_off();
    let refused = run_err(&db, &["batch", "note", &code, "tasted: fine"]);
    assert!(refused.contains("--reason"), "{refused}");
    run_ok(
        &db,
        &[
            "batch",
            "note",
            &code,
            "tasted: fine",
            "--by",
            "Jon",
            "--reason",
            "tasting after hardening",
        ],
    );
    let b = shown(&db, &code);
    let notes = b["notes"].as_array().unwrap();
    assert_eq!(notes.len(), 2);
    assert_eq!(notes[1]["text"], "tasted: fine");
    let change = &b["amendments"][0]["changes"][0];
    assert_eq!(change["field"], "add-note");
    assert_eq!(change["text"], "tasted: fine");
    assert_eq!(change["by"], "Jon");
    assert_eq!(rows_in(&db, "batch_notes", &code), 1);
    // The note is found by search like any other.
    let listed = run_ok(&db, &["batch", "list", "--search", "tasted"]);
    assert!(listed.contains(&code), "{listed}");
}

#[test]
fn an_amendment_strikes_out_or_corrects_a_reading_or_a_note() {
    let (_dir, db, code) = signed_off();
    run_ok(
        &db,
        &[
            "batch",
            "measure",
            &code,
            "brix=31.5",
            "--by",
            "Ines",
            "--reason",
            "late reading",
        ],
    );
    run_ok(
        &db,
        &[
            "batch", "note", &code, "sandy", "--by", "Jon", "--reason", "tasting",
        ],
    );
    run_ok(
        &db,
        &[
            "batch",
            "amend",
            &code,
            "--reason",
            "misread and mistyped",
            "--by",
            "Head cook",
            "--strike-reading",
            "1",
            "--replace-reading",
            "2=32.5",
            "--strike-note",
            "2",
            "--replace-note",
            "1=first run of the day",
        ],
    );
    let b = shown(&db, &code);
    let readings = b["measurements"].as_array().unwrap();
    assert_eq!(readings.len(), 2, "a struck reading keeps its place");
    assert_eq!(readings[0]["struck"], true);
    assert_eq!(readings[0]["value"], -6.5);
    assert_eq!(readings[1]["value"], 32.5);
    assert!(readings[1].get("struck").is_none());
    let notes = b["notes"].as_array().unwrap();
    assert_eq!(notes[0]["text"], "first run of the day");
    assert_eq!(notes[1]["struck"], true);
    let changes = b["amendments"][2]["changes"].as_array().unwrap();
    let fields: Vec<&str> = changes
        .iter()
        .map(|c| c["field"].as_str().unwrap())
        .collect();
    assert_eq!(
        fields,
        [
            "strike-reading",
            "replace-reading",
            "strike-note",
            "replace-note"
        ]
    );
    assert_eq!(changes[0]["reading"], 1);
    assert_eq!(changes[0]["old"]["value"], -6.5);
    assert_eq!(changes[1]["old"]["value"], 31.5);
    assert_eq!(changes[1]["new"]["value"], 32.5);
    assert_eq!(changes[3]["old"]["text"], "first run");

    // Measured against predicted leaves the struck reading out.
    let text = run_ok(&db, &["batch", "show", &code]);
    assert!(text.contains("struck"), "{text}");
    let refused = run_err(
        &db,
        &[
            "batch",
            "amend",
            &code,
            "--reason",
            "again",
            "--strike-reading",
            "1",
        ],
    );
    assert!(refused.contains("struck"), "{refused}");

    // Export then import gives back every field, trail included.
    let jsonl = run_ok(&db, &["batch", "export"]);
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("out.jsonl");
    std::fs::write(&file, &jsonl).unwrap();
    let other = dir.path().join("other.db");
    run_ok(&other, &["batch", "import", file.to_str().unwrap()]);
    assert_eq!(run_ok(&other, &["batch", "export"]), jsonl);
    assert!(run_ok(&other, &["db", "check"]).contains("ok"));
}

#[test]
fn every_export_holds_every_reading_note_the_sign_off_and_the_trail() {
    let (_dir, db, code) = signed_off();
    run_ok(
        &db,
        &[
            "batch",
            "measure",
            &code,
            "draw-temp-c=-5.6",
            "--by",
            "Jon",
            "--reason",
            "read again",
        ],
    );
    let b = shown(&db, &code);
    let csv = run_ok(&db, &["batch", "export", "--format", "csv"]);
    let rows = csv_rows(&csv);
    let header = &rows[0];
    let col = |name: &str| {
        header
            .iter()
            .position(|h| h == name)
            .unwrap_or_else(|| panic!("no column {name} in {header:?}"))
    };
    let of = |event: &str| -> Vec<&Vec<String>> {
        rows[1..]
            .iter()
            .filter(|r| r[col("code")] == code && r[col("event")] == event)
            .collect()
    };
    let readings = of("reading");
    let values: Vec<(&str, &str, &str)> = readings
        .iter()
        .map(|r| {
            (
                r[col("value")].as_str(),
                r[col("at")].as_str(),
                r[col("by")].as_str(),
            )
        })
        .collect();
    let taken = |i: usize| {
        b["measurements"][i]["taken_at"]
            .as_str()
            .unwrap()
            .to_owned()
    };
    assert_eq!(
        values,
        [
            ("-6.5", taken(0).as_str(), "Ines"),
            ("-5.6", taken(1).as_str(), "Jon")
        ],
        "both draw temperatures, each with its time and who took it"
    );
    let notes = of("note");
    assert_eq!(notes.len(), 1);
    assert_eq!(notes[0][col("text")], "first run");
    let signed = of("final");
    assert_eq!(signed.len(), 1);
    assert_eq!(signed[0][col("by")], "Head cook");
    assert_eq!(signed[0][col("at")], b["finalized_at"].as_str().unwrap());
    let amendments = of("amendment");
    assert_eq!(amendments.len(), 1);
    assert_eq!(amendments[0][col("text")], "read again");
    let changes = of("change");
    assert_eq!(changes.len(), 1);
    let change: Value = serde_json::from_str(&changes[0][col("text")]).unwrap();
    assert_eq!(change, b["amendments"][0]["changes"][0]);
    assert_eq!(
        change,
        json!({"field": "add-reading", "kind": "draw-temp-c", "value": -5.6, "unit": "°C",
               "taken_at": taken(1), "by": "Jon"})
    );
}

#[test]
fn the_csv_export_keeps_every_reading_of_a_kind_not_only_the_latest() {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("log.db");
    let code = run_ok(&db, &["batch", "new", VANILLA, "--size", "2kg"])
        .trim()
        .to_owned();
    run_ok(&db, &["batch", "measure", &code, "draw-temp-c=-6.5"]);
    run_ok(&db, &["batch", "measure", &code, "draw-temp-c=-5.6"]);
    let csv = run_ok(&db, &["batch", "export", "--format", "csv"]);
    for value in ["-6.5", "-5.6"] {
        let found = csv_rows(&csv)
            .iter()
            .any(|row| row.iter().any(|f| f == value));
        assert!(found, "{value} is missing from the CSV export:\n{csv}");
    }
}

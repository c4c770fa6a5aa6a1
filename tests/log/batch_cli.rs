//! The `gelu batch` and `gelu db` commands, run as the real binary on temporary
//! files: the JSON contract, measurements against predictions, the amendment trail,
//! export and import through files, checks and backups, and clear refusals.

use std::path::PathBuf;

use assert_cmd::Command;
use serde_json::Value;

use crate::batch_common::{VANILLA, gelu_cmd as gelu, run_ok};

const LIQUEUR: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/sample-recipes/strawberry-liqueur.toml"
);

fn new_db() -> (tempfile::TempDir, PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("log.db");
    (dir, db)
}

#[test]
fn a_batch_is_recorded_measured_finalized_and_amended() {
    let (_dir, db) = new_db();
    let out = run_ok(
        &db,
        &[
            "batch",
            "new",
            VANILLA,
            "--size",
            "5kg",
            "--by",
            "Mara",
            "--lot",
            "sucrose=S-2611-7",
            "--note",
            "first on the new freezer",
            "--json",
        ],
    );
    let b: Value = serde_json::from_str(out.trim()).unwrap();
    for key in [
        "code",
        "recipe",
        "recipe_version",
        "made_at",
        "size_g",
        "operator",
        "status",
        "notes",
        "lines",
        "measurements",
        "prediction",
    ] {
        assert!(b.get(key).is_some(), "batch JSON lacks `{key}`: {b}");
    }
    for key in ["ingredient", "planned_g", "actual_g", "lot"] {
        assert!(b["lines"][0].get(key).is_some(), "line JSON lacks `{key}`");
    }
    assert!(b["prediction"]["freezing_point_c"].is_number());
    assert!(b["prediction"]["serving_temp_c"].is_number());
    assert_eq!(b["size_g"], 5000.0);
    assert_eq!(b["status"], "draft");
    assert_eq!(b["recipe"], "Harbour vanilla");
    chrono::DateTime::parse_from_rfc3339(b["made_at"].as_str().unwrap()).unwrap();
    let code = b["code"].as_str().unwrap().to_owned();
    // B-YYYYMMDD-SITE-NNNN, with this log's random site code.
    let site = run_ok(&db, &["site"]).trim().to_owned();
    let day = &b["made_at"].as_str().unwrap()[..10].replace('-', "");
    assert_eq!(code, format!("B-{day}-{site}-0001"));
    assert!(
        site.len() == 4
            && site
                .chars()
                .all(|c| c.is_ascii_uppercase() || c.is_ascii_digit()),
        "{site}"
    );
    // Once a batch carries it, the site code is fixed.
    let err = gelu(&db).args(["site", "NEWCODE"]).output().unwrap();
    assert!(!err.status.success());
    assert!(
        String::from_utf8_lossy(&err.stderr).contains("fixed"),
        "{}",
        String::from_utf8_lossy(&err.stderr)
    );

    run_ok(
        &db,
        &[
            "batch",
            "measure",
            &code,
            "brix=31.5",
            "freezing-point-c=-2.7",
            "overrun-pct=28",
            "--by",
            "Ines",
        ],
    );
    run_ok(
        &db,
        &["batch", "note", &code, "cabinet at -13", "--by", "Ines"],
    );
    let shown = run_ok(&db, &["batch", "show", &code]);
    assert!(shown.contains("freezing-point-c"), "{shown}");
    assert!(shown.contains("predicted"), "{shown}");
    assert!(shown.contains("S-2611-7"), "{shown}");

    run_ok(&db, &["batch", "finalize", &code, "--by", "Head cook"]);
    let refused = gelu(&db)
        .args(["batch", "finalize", &code])
        .output()
        .unwrap();
    assert_eq!(refused.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&refused.stderr).contains("amend"));

    run_ok(
        &db,
        &[
            "batch",
            "amend",
            &code,
            "--reason",
            "lot misread",
            "--lot",
            "sucrose=S-2611-8",
            "--actual",
            "whole-milk=2410",
            "--by",
            "Head cook",
        ],
    );
    let after: Value =
        serde_json::from_str(run_ok(&db, &["batch", "show", &code, "--json"]).trim()).unwrap();
    assert_eq!(after["status"], "amended");
    assert_eq!(after["measurements"].as_array().unwrap().len(), 3);
    assert_eq!(after["measurements"][0]["kind"], "brix");
    assert_eq!(after["measurements"][0]["by"], "Ines");
    let sugar = after["lines"]
        .as_array()
        .unwrap()
        .iter()
        .find(|l| l["ingredient"] == "sucrose")
        .unwrap();
    assert_eq!(sugar["lot"], "S-2611-8");
    assert_eq!(after["amendments"][0]["reason"], "lot misread");

    let listed = run_ok(&db, &["batch", "list", "--search", "S-2611-8", "--json"]);
    let rows: Vec<Value> = listed
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(rows.len(), 1);
    assert_eq!(rows[0]["code"], code.as_str());
}

#[test]
fn list_filters_by_recipe_and_date_and_limits() {
    let (_dir, db) = new_db();
    run_ok(&db, &["batch", "new", VANILLA, "--size", "800g"]);
    run_ok(&db, &["batch", "new", LIQUEUR, "--size", "1.5L"]);
    run_ok(&db, &["batch", "new", LIQUEUR, "--size", "750mL"]);
    let count = |args: &[&str]| {
        let mut all = vec!["batch", "list", "--json"];
        all.extend_from_slice(args);
        run_ok(&db, &all).lines().count()
    };
    assert_eq!(count(&[]), 3);
    assert_eq!(count(&["--recipe", "Gullrock strawberry liqueur"]), 2);
    assert_eq!(count(&["--limit", "1"]), 1);
    assert_eq!(
        count(&["--since", "2000-01-01", "--until", "2000-12-31"]),
        0
    );
    let today = chrono::Utc::now().format("%Y-%m-%d").to_string();
    assert_eq!(count(&["--since", &today, "--until", &today]), 3);
    let text = run_ok(&db, &["batch", "list"]);
    assert_eq!(text.lines().count(), 3);
    assert!(
        text.lines()
            .next()
            .unwrap()
            .contains("Gullrock strawberry liqueur"),
        "newest first: {text}"
    );
}

#[test]
fn bad_input_is_refused_with_what_would_be_valid() {
    let (_dir, db) = new_db();
    let code = run_ok(&db, &["batch", "new", VANILLA, "--size", "1kg"])
        .trim()
        .to_owned();
    let err = |args: &[&str]| {
        let out = gelu(&db).args(args).output().unwrap();
        assert_eq!(out.status.code(), Some(2), "{args:?} should fail");
        String::from_utf8(out.stderr).unwrap()
    };
    assert!(err(&["batch", "measure", &code, "sweetness=3"]).contains("brix, ph, overrun-pct"));
    assert!(err(&["batch", "measure", &code, "brix=lots"]).contains("not a number"));
    assert!(err(&["batch", "new", VANILLA, "--size", "5 stone"]).contains("g, kg, oz, lb, mL, L"));
    assert!(
        err(&[
            "batch",
            "new",
            VANILLA,
            "--size",
            "1kg",
            "--lot",
            "saffron=X1"
        ])
        .contains("whole-milk")
    );
    assert!(err(&["batch", "show", "B-20000101-0001"]).contains("no batch has the code"));
    assert!(err(&["batch", "amend", &code, "--reason", "nothing"]).contains("at least one change"));
    // Nothing of the refused commands was written.
    assert_eq!(run_ok(&db, &["batch", "list", "--json"]).lines().count(), 1);
    let shown: Value =
        serde_json::from_str(run_ok(&db, &["batch", "show", &code, "--json"]).trim()).unwrap();
    assert_eq!(shown["measurements"].as_array().unwrap().len(), 0);
}

#[test]
fn export_and_import_through_files_and_csv() {
    let (dir, db) = new_db();
    for size in ["1kg", "2kg"] {
        let code = run_ok(
            &db,
            &[
                "batch",
                "new",
                VANILLA,
                "--size",
                size,
                "--note",
                "line, with comma",
            ],
        )
        .trim()
        .to_owned();
        run_ok(&db, &["batch", "measure", &code, "ph=6.4"]);
    }
    let jsonl = run_ok(&db, &["batch", "export"]);
    assert_eq!(jsonl.lines().count(), 2);
    let file = dir.path().join("export.jsonl");
    std::fs::write(&file, format!("{jsonl}{{broken\n")).unwrap();

    let other = dir.path().join("other.db");
    let out = gelu(&other)
        .args(["batch", "import"])
        .arg(&file)
        .output()
        .unwrap();
    assert_eq!(
        out.status.code(),
        Some(1),
        "a refused line makes the import exit 1"
    );
    assert!(String::from_utf8_lossy(&out.stdout).contains("2 imported, 0 skipped"));
    assert!(String::from_utf8_lossy(&out.stderr).contains("export.jsonl:3:"));
    assert_eq!(run_ok(&other, &["batch", "export"]), jsonl);
    let out = gelu(&other)
        .args(["batch", "import"])
        .arg(&file)
        .output()
        .unwrap();
    assert!(String::from_utf8_lossy(&out.stdout).contains("0 imported, 2 skipped"));

    // CSV: one row per event, the header first.
    let csv = run_ok(&db, &["batch", "export", "--format", "csv"]);
    assert!(
        csv.starts_with(
            "code,recipe,recipe_version,event,number,at,by,item,value,unit,lot,struck,text\n"
        ),
        "{csv}"
    );
    let rows = crate::batch_common::csv_rows(&csv);
    let notes: Vec<&Vec<String>> = rows.iter().filter(|r| r[3] == "note").collect();
    assert_eq!(notes.len(), 2);
    assert_eq!(
        notes[0][12], "line, with comma",
        "quoted, then read back whole"
    );
    assert!(csv.contains(",\"line, with comma\""), "{csv}");
    let ph: Vec<&Vec<String>> = rows
        .iter()
        .filter(|r| r[3] == "reading" && r[7] == "ph")
        .collect();
    assert_eq!(ph.len(), 2);
    assert!(
        ph.iter().all(|r| r[8] == "6.4" && r[6] == "tester"),
        "{ph:?}"
    );
    assert!(
        rows[1..].iter().all(|r| r.len() == 13),
        "every row has every column"
    );
}

#[test]
fn db_path_check_and_backup() {
    let (dir, db) = new_db();
    assert_eq!(run_ok(&db, &["db", "path"]).trim(), db.to_str().unwrap());
    let via_env = Command::new(env!("CARGO_BIN_EXE_gelu"))
        .env("GELU_DB", &db)
        .args(["db", "path"])
        .output()
        .unwrap();
    assert_eq!(
        String::from_utf8_lossy(&via_env.stdout).trim(),
        db.to_str().unwrap()
    );

    let code = run_ok(&db, &["batch", "new", VANILLA, "--size", "1kg"])
        .trim()
        .to_owned();
    assert!(run_ok(&db, &["db", "check"]).contains("ok"));
    let copy = dir.path().join("copy.db");
    run_ok(&db, &["db", "backup", copy.to_str().unwrap()]);
    let shown = run_ok(&copy, &["batch", "show", &code, "--json"]);
    assert!(shown.contains(&code));
    let twice = gelu(&db)
        .args(["db", "backup"])
        .arg(&copy)
        .output()
        .unwrap();
    assert_eq!(
        twice.status.code(),
        Some(2),
        "a backup never replaces a file"
    );
    assert!(String::from_utf8_lossy(&twice.stderr).contains("already exists"));
}

#[test]
fn db_check_reports_a_damaged_file_with_exit_1() {
    let (_dir, db) = new_db();
    for _ in 0..20 {
        run_ok(
            &db,
            &[
                "batch",
                "new",
                VANILLA,
                "--size",
                "1kg",
                "--note",
                "padding the file with pages",
            ],
        );
    }
    // Fold the WAL into the file, then scribble over the pages after the first.
    let conn = rusqlite::Connection::open(&db).unwrap();
    conn.execute_batch("PRAGMA wal_checkpoint(TRUNCATE); PRAGMA journal_mode = DELETE;")
        .unwrap();
    drop(conn);
    let mut bytes = std::fs::read(&db).unwrap();
    assert!(bytes.len() > 16 * 4096, "{}", bytes.len());
    for (i, b) in bytes.iter_mut().enumerate().skip(4096) {
        *b = (i as u8).wrapping_mul(31) ^ 0x5a;
    }
    std::fs::write(&db, &bytes).unwrap();
    let out = gelu(&db).args(["db", "check"]).output().unwrap();
    assert_eq!(
        out.status.code(),
        Some(1),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

#[test]
fn a_file_that_is_not_a_database_gets_a_clear_message() {
    let (dir, _) = new_db();
    let path = dir.path().join("shopping.txt");
    std::fs::write(&path, "milk, cream, sugar\n".repeat(300)).unwrap();
    let out = gelu(&path).args(["batch", "list"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("not a gelu batch log") && err.contains("Nothing was changed"),
        "{err}"
    );
}

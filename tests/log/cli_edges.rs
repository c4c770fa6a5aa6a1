//! The command line at its edges: output into a closed pipe, no terminal for the
//! workspace, the wrong kind of file given (a CSV export to import, an empty file
//! as the log), a log that cannot be written, and text that tries to drive the
//! terminal. Run as the real binary.

use std::io::Read;
use std::path::Path;
use std::process::Stdio;

use crate::batch_common::{Immutable, VANILLA, gelu_cmd as gelu, run_ok};

/// Runs gelu with its output going into a pipe that is closed before it writes;
/// returns the exit code and what it said on stderr.
fn into_closed_pipe(db: &Path, args: &[&str]) -> (Option<i32>, String) {
    let mut child = crate::batch_common::gelu(db)
        .args(args)
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    drop(child.stdout.take());
    let mut said = String::new();
    child
        .stderr
        .take()
        .unwrap()
        .read_to_string(&mut said)
        .unwrap();
    (child.wait().unwrap().code(), said)
}

#[test]
fn output_into_a_closed_pipe_ends_quietly() {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("log.db");
    // More output than a pipe holds (64 KiB), so that the writer meets the closed
    // pipe even if another test's process briefly holds a copy of its reading end.
    let code = run_ok(&db, &["batch", "new", VANILLA, "--size", "1kg"])
        .trim()
        .to_owned();
    let one = run_ok(&db, &["batch", "export"]);
    let many: String = (0..1000)
        .map(|i| one.replace(&code, &format!("B-PIPE-{i:04}")))
        .collect();
    let file = dir.path().join("many.jsonl");
    std::fs::write(&file, many).unwrap();
    run_ok(&db, &["batch", "import", file.to_str().unwrap()]);
    let samples: Vec<String> =
        std::fs::read_dir(concat!(env!("CARGO_MANIFEST_DIR"), "/sample-recipes"))
            .unwrap()
            .map(|e| e.unwrap().path().to_string_lossy().into_owned())
            .collect();
    let mut report = vec!["report"];
    for _ in 0..4 {
        report.extend(samples.iter().map(String::as_str));
    }
    for args in [
        vec!["batch", "list", "--limit", "0"],
        vec!["batch", "list", "--json"],
        vec!["batch", "export"],
        vec!["batch", "export", "--format", "csv"],
        report,
    ] {
        let (code, said) = into_closed_pipe(&db, &args);
        assert!(
            !said.contains("panicked") && !said.to_lowercase().contains("broken pipe"),
            "gelu {args:?}: {said}"
        );
        assert_eq!(
            code,
            Some(141),
            "gelu {args:?} exits as a tool whose reader left: {said}"
        );
    }
}

#[test]
fn the_workspace_without_a_terminal_says_it_needs_one() {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("log.db");
    let out = crate::batch_common::gelu(&db)
        .args(["edit", VANILLA])
        .stdin(Stdio::null())
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let said = String::from_utf8_lossy(&out.stderr);
    assert!(said.contains("needs a terminal"), "{said}");
    assert!(
        said.contains("gelu report"),
        "points to the plain-text way: {said}"
    );
}

#[test]
fn importing_a_csv_export_says_that_import_reads_json_lines() {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("log.db");
    run_ok(&db, &["batch", "new", VANILLA, "--size", "1kg"]);
    let csv = dir.path().join("batches.csv");
    std::fs::write(&csv, run_ok(&db, &["batch", "export", "--format", "csv"])).unwrap();
    let other = dir.path().join("other.db");
    let out = gelu(&other)
        .args(["batch", "import"])
        .arg(&csv)
        .output()
        .unwrap();
    assert_ne!(out.status.code(), Some(0));
    let said = String::from_utf8_lossy(&out.stderr);
    assert!(said.contains("JSON Lines"), "{said}");
    assert!(said.contains("batches.csv"), "names the file: {said}");
    assert_eq!(
        said.lines().count(),
        1,
        "one clear message, not one per line: {said}"
    );
}

#[test]
fn a_zero_length_file_is_not_taken_for_a_new_log() {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("truncated.db");
    std::fs::write(&db, b"").unwrap();
    for args in [
        vec!["batch", "list"],
        vec!["batch", "new", VANILLA, "--size", "1kg"],
    ] {
        let out = gelu(&db).args(&args).output().unwrap();
        assert_eq!(out.status.code(), Some(2), "gelu {args:?}");
        let said = String::from_utf8_lossy(&out.stderr);
        assert!(said.contains("empty"), "{said}");
        assert!(said.contains("backup"), "{said}");
    }
    assert_eq!(std::fs::metadata(&db).unwrap().len(), 0, "left as it was");
}

#[test]
fn a_read_only_log_is_listed_shown_exported_and_checked() {
    use std::os::unix::fs::PermissionsExt;
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("ro.db");
    let code = run_ok(&db, &["batch", "new", VANILLA, "--size", "1kg"])
        .trim()
        .to_owned();
    // Fold the write-ahead log into the file, as a copied or archived log would be.
    let conn = rusqlite::Connection::open(&db).unwrap();
    conn.execute_batch("PRAGMA wal_checkpoint(TRUNCATE);")
        .unwrap();
    drop(conn);
    std::fs::set_permissions(&db, std::fs::Permissions::from_mode(0o444)).unwrap();
    let mut _guard = None;
    if std::fs::OpenOptions::new().write(true).open(&db).is_ok() {
        _guard = Immutable::set(&db);
        if _guard.is_none() {
            eprintln!("skipped: this user writes read-only files and chattr is not available");
            return;
        }
    }
    let before = std::fs::read(&db).unwrap();
    assert!(run_ok(&db, &["batch", "list"]).contains(&code));
    assert!(run_ok(&db, &["batch", "show", &code]).contains(&code));
    assert!(run_ok(&db, &["batch", "export"]).contains(&code));
    assert!(run_ok(&db, &["db", "check"]).contains("ok"));
    let out = gelu(&db)
        .args(["batch", "note", &code, "hello"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("cannot be written"));
    assert_eq!(std::fs::read(&db).unwrap(), before, "the file is untouched");
}

#[test]
fn text_output_shows_control_characters_inert() {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("log.db");
    let code = run_ok(&db, &["batch", "new", VANILLA, "--size", "1kg"])
        .trim()
        .to_owned();
    // A note may hold line breaks; one must not start a line that reads like a record.
    run_ok(
        &db,
        &["batch", "note", &code, "ok\nB-20261202-0009  FINAL  forged"],
    );
    // As an old log or another program may hold them: escape sequences in a
    // draft's operator and in a note.
    let conn = rusqlite::Connection::open(&db).unwrap();
    conn.execute(
        "UPDATE batches SET operator = 'Mara\u{1b}]0;owned\u{7}\u{1b}[2J' WHERE code = ?1",
        [&code],
    )
    .unwrap();
    conn.execute(
        "INSERT INTO batch_notes (batch_id, text, written_at, written_by)
         SELECT id, 'bell\u{7}\u{9b}31m', made_at, 'x\u{1b}[1A' FROM batches WHERE code = ?1",
        [&code],
    )
    .unwrap();
    drop(conn);
    for args in [vec!["batch", "list"], vec!["batch", "show", &code]] {
        let text = run_ok(&db, &args);
        assert!(
            !text.chars().any(|c| c.is_control() && c != '\n'),
            "gelu {args:?} printed a control character: {text:?}"
        );
        assert!(text.contains("Mara"), "{text}");
        assert!(
            !text.lines().any(|l| l.starts_with("B-20261202-0009")),
            "{text}"
        );
    }
    // The report shows a recipe's own texts inert too.
    let recipe = dir.path().join("odd.toml");
    std::fs::write(
        &recipe,
        std::fs::read_to_string(VANILLA).unwrap().replacen(
            "name = \"Harbour vanilla\"",
            "name = \"Harbour\\u001b[2J vanilla\"",
            1,
        ),
    )
    .unwrap();
    let out = gelu(&db).arg("report").arg(&recipe).output().unwrap();
    let text =
        String::from_utf8_lossy(&out.stdout).into_owned() + &String::from_utf8_lossy(&out.stderr);
    assert!(
        !text.chars().any(|c| c.is_control() && c != '\n'),
        "{text:?}"
    );
}

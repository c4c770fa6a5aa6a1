//! Large imports on real temporary files: records spread over several transactions
//! and written many at a time, with the insert-time guards lifted inside each
//! transaction. Checked here: what is refused or repeated is reported by line and
//! nothing of it written, the rest is written whole, the guards come back exactly as
//! the schema made them, and search finds what the import wrote.

use std::path::Path;

use chrono::{TimeZone, Utc};
use gelu::analysis::Options;
use gelu::batch::jsonl::batch_json;
use gelu::batch::plan::{Plan, parse_size, plan_batch};
use gelu::batch::{Batch, BatchFilter, Status};
use gelu::catalog::Catalog;
use gelu::recipe_file::parse_recipe;
use gelu::samples::SAMPLE_RECIPES;
use gelu::store::Store;
use rusqlite::Connection;

use crate::store_common::{FailingAfter, search};

fn fresh(dir: &Path, name: &str) -> Store {
    Store::open(&dir.join(name)).unwrap()
}

/// A signed-off vanilla batch to copy: its lines carry lots.
fn template(store: &mut Store) -> Batch {
    let (file, text) = SAMPLE_RECIPES
        .iter()
        .find(|(n, _)| *n == "harbour-vanilla.toml")
        .unwrap();
    let recipe = parse_recipe(Path::new(file), text).unwrap();
    let mut new = plan_batch(
        &Plan {
            recipe: &recipe,
            recipe_text: text,
            size: parse_size("4kg", None).unwrap(),
            operator: "Mara Quill",
            lots: &[],
            note: Some("template"),
            made_at: Utc.with_ymd_and_hms(2026, 10, 1, 6, 0, 0).unwrap(),
        },
        Catalog::builtin(),
        &Options::default(),
    )
    .unwrap();
    new.lines[0].lot = "M-2609-01".into();
    new.lines[1].lot = "C-2609-02".into();
    let b = store.new_batch(&new).unwrap();
    store.finalize(&b.code, "Head cook").unwrap()
}

fn triggers(path: &Path) -> Vec<(String, String)> {
    let conn = Connection::open(path).unwrap();
    conn.prepare("SELECT name, sql FROM sqlite_schema WHERE type = 'trigger' ORDER BY name")
        .unwrap()
        .query_map([], |r| Ok((r.get(0)?, r.get(1)?)))
        .unwrap()
        .collect::<rusqlite::Result<_>>()
        .unwrap()
}

#[test]
fn an_import_over_several_transactions_keeps_refusals_and_repeats_apart() {
    let dir = tempfile::tempdir().unwrap();
    let mut source = fresh(dir.path(), "source.db");
    let template = template(&mut source);
    let guards_before = triggers(&dir.path().join("source.db"));

    // 5,600 records: more than one transaction holds (about 5,000).
    const N: usize = 5_600;
    let mut lines: Vec<String> = (0..N)
        .map(|i| {
            let mut b = template.clone();
            b.code = format!("B-IMPORT-{i:05}");
            b.made_at += chrono::Duration::minutes(i as i64);
            b.lines[2].lot = format!("S-{:04}", i / 50);
            if i == 5_300 {
                // Refused by the store as it writes, in the second transaction.
                b.operator = "   ".into();
            }
            batch_json(&b).to_string()
        })
        .collect();
    // Repeats of a code, within the first transaction and across into the second.
    lines[10] = lines[3].clone();
    lines[5_200] = lines[4].clone();
    lines[700] = "{\"code\": 7}".into();
    let text = lines.join("\n");

    let path = dir.path().join("other.db");
    let mut other = fresh(dir.path(), "other.db");
    let report = other.import_jsonl(&mut text.as_bytes()).unwrap();
    let refused: Vec<usize> = report.errors.iter().map(|(n, _)| *n).collect();
    assert_eq!(refused, [701, 5_301], "{:?}", report.errors);
    // The key at fault, placed by column (the line is the one reported).
    assert!(
        report.errors[0].1.starts_with("`code`:") && report.errors[0].1.contains("(column "),
        "{}",
        report.errors[0].1
    );
    assert!(
        !report.errors[0].1.contains("line 1"),
        "{}",
        report.errors[0].1
    );
    assert!(
        report.errors[1].1.contains("operator"),
        "{}",
        report.errors[1].1
    );
    assert_eq!(report.skipped_existing, 2);
    assert_eq!(report.imported, N - 4);

    let all = other.list_batches(&BatchFilter::default()).unwrap();
    assert_eq!(all.len(), N - 4, "every batch written, none twice");
    assert!(other.batch("B-IMPORT-05300").unwrap().is_none());
    assert!(other.batch("B-IMPORT-00700").unwrap().is_none());
    let last = other.batch("B-IMPORT-05599").unwrap().unwrap();
    assert_eq!(last.status, Status::Final);
    assert_eq!(last.lines, {
        let mut l = template.lines.clone();
        l[2].lot = "S-0111".into();
        l
    });
    assert_eq!(last.notes, template.notes);
    assert!(other.check().unwrap().is_empty(), "{:?}", other.check());

    // The guards are back, word for word, and still refuse changes to a final record.
    assert_eq!(triggers(&path), guards_before);
    let conn = Connection::open(&path).unwrap();
    let err = conn
        .execute(
            "INSERT INTO batch_lines (batch_id, position, ingredient, planned_g, lot)
             SELECT id, 99, 'sucrose', 1.0, '' FROM batches WHERE code = 'B-IMPORT-05599'",
            [],
        )
        .unwrap_err();
    assert!(err.to_string().contains("never changed"), "{err}");

    // Importing the same file again writes nothing.
    let again = other.import_jsonl(&mut text.as_bytes()).unwrap();
    assert_eq!(again.imported, 0);
    assert_eq!(
        again.skipped_existing,
        N - 2,
        "all but the two refused lines"
    );
    assert_eq!(triggers(&path), guards_before);
}

#[test]
fn search_finds_imported_lots_alone_or_together() {
    let dir = tempfile::tempdir().unwrap();
    let mut source = fresh(dir.path(), "source.db");
    let template = template(&mut source);
    let mut other = fresh(dir.path(), "other.db");
    // As a file saved by an editor that adds a byte-order mark and Windows line ends.
    let text = format!("\u{feff}{}\r\n\r\n", batch_json(&template));
    let report = other.import_jsonl(&mut text.as_bytes()).unwrap();
    assert_eq!(report.imported, 1, "{:?}", report.errors);

    let code = std::slice::from_ref(&template.code);
    for store in [&source, &other] {
        assert_eq!(search(store, "M-2609-01"), code);
        assert_eq!(search(store, "C-2609-02 M-2609-01"), code);
        assert_eq!(search(store, "template"), code);
        assert!(search(store, "M-2609-02").is_empty());
        assert!(search(store, "M-2609-01 Z-0000").is_empty());
    }
}

#[test]
fn a_read_error_stops_the_import_with_an_error_and_a_rerun_completes_it() {
    let dir = tempfile::tempdir().unwrap();
    let mut source = fresh(dir.path(), "source.db");
    let template = template(&mut source);
    let lines: Vec<String> = (0..900)
        .map(|i| {
            let mut b = template.clone();
            b.code = format!("B-READ-{i:04}");
            batch_json(&b).to_string()
        })
        .collect();
    let all = lines.join("\n") + "\n";
    let mut other = fresh(dir.path(), "other.db");
    let partial = lines[..600].join("\n") + "\n";
    let mut failing = std::io::BufReader::new(FailingAfter {
        good: std::io::Cursor::new(partial.into_bytes()),
    });
    let err = other.import_jsonl(&mut failing).unwrap_err();
    assert!(err.to_string().contains("disk went away"), "{err}");
    let written = other.list_batches(&BatchFilter::default()).unwrap().len();
    assert!(written <= 600, "{written}");
    assert!(other.check().unwrap().is_empty());

    let rerun = other.import_jsonl(&mut all.as_bytes()).unwrap();
    assert_eq!(rerun.imported + rerun.skipped_existing, 900);
    assert_eq!(rerun.skipped_existing, written);
    assert_eq!(
        other.list_batches(&BatchFilter::default()).unwrap().len(),
        900
    );
}

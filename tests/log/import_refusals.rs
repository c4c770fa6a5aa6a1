//! Imports say exactly what they did: a record the command line could never make
//! is refused by its line with the reason (nothing of it written), never changed
//! silently; a line without an end does not grow memory without bound; a read that
//! fails part-way says how many records were written, where it stopped and how to
//! resume.

use std::path::Path;

use chrono::{TimeZone, Utc};
use gelu::analysis::Options;
use gelu::batch::jsonl::batch_json;
use gelu::batch::plan::{Plan, parse_size, plan_batch};
use gelu::batch::{BatchFilter, MeasurementKind};
use gelu::catalog::Catalog;
use gelu::recipe_file::parse_recipe;
use gelu::samples::SAMPLE_RECIPES;
use gelu::store::Store;
use serde_json::{Value, json};

use crate::store_common::FailingAfter;

/// A signed-off vanilla batch with a reading and a note, as its JSON object.
fn template(dir: &Path) -> Value {
    let mut store = Store::open(&dir.join("source.db")).unwrap();
    let (file, text) = SAMPLE_RECIPES
        .iter()
        .find(|(n, _)| *n == "harbour-vanilla.toml")
        .unwrap();
    let recipe = parse_recipe(Path::new(file), text).unwrap();
    let lots = [(gelu::batch::LineRef::parse("sucrose"), "S-1".to_owned())];
    let new = plan_batch(
        &Plan {
            recipe: &recipe,
            recipe_text: text,
            size: parse_size("2kg", None).unwrap(),
            operator: "Mara Quill",
            lots: &lots,
            note: Some("first run"),
            made_at: Utc.with_ymd_and_hms(2026, 10, 1, 6, 0, 0).unwrap(),
        },
        Catalog::builtin(),
        &Options::default(),
    )
    .unwrap();
    let b = store.new_batch(&new).unwrap();
    store
        .add_measurement(&b.code, MeasurementKind::DrawTempC, -6.5, "Ines", None)
        .unwrap();
    let b = store.finalize(&b.code, "Head cook").unwrap();
    batch_json(&b)
}

/// Imports `lines` into a fresh log; returns the refusals by line and the codes written.
fn import(dir: &Path, lines: &[Value]) -> (Vec<(usize, String)>, Vec<String>) {
    let path = dir.join(format!("other-{}.db", rand_suffix()));
    let mut other = Store::open(&path).unwrap();
    let text: Vec<String> = lines.iter().map(Value::to_string).collect();
    let report = other.import_jsonl(&mut text.join("\n").as_bytes()).unwrap();
    let codes = other
        .list_batches(&BatchFilter::default())
        .unwrap()
        .into_iter()
        .map(|b| b.code)
        .collect();
    (report.errors, codes)
}

fn rand_suffix() -> u128 {
    std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .unwrap()
        .as_nanos()
}

/// Each variant of the template, changed by `edit`, must be refused with a reason
/// holding `why`, and nothing of it written; the untouched template beside it is.
fn refused(edit: impl Fn(&mut Value), why: &str) {
    let dir = tempfile::tempdir().unwrap();
    let good = template(dir.path());
    let mut bad = good.clone();
    bad["code"] = "B-20261001-0099".into();
    edit(&mut bad);
    let (errors, codes) = import(dir.path(), &[good.clone(), bad.clone()]);
    assert_eq!(
        errors.len(),
        1,
        "expected line 2 refused ({why}); got {errors:?} for {bad}"
    );
    assert_eq!(errors[0].0, 2);
    assert!(
        errors[0].1.to_lowercase().contains(why),
        "the reason should mention `{why}`: {}",
        errors[0].1
    );
    assert_eq!(
        codes,
        [good["code"].as_str().unwrap()],
        "nothing of it written"
    );
}

#[test]
fn a_trail_that_contradicts_the_record_is_refused() {
    refused(
        |b| {
            b["status"] = "amended".into();
            b["amendments"] = json!([{
                "amended_at": "2026-10-02T10:00:00.000Z", "by": "x", "reason": "r",
                "changes": [{"field": "lot", "line": 4, "ingredient": "sucrose",
                             "old": "S-0", "new": "S-2"}]
            }]);
            // The record shows S-1 where the trail says it set S-2.
        },
        "contradicts",
    );
}

#[test]
fn codes_the_command_line_could_never_make_are_refused() {
    refused(|b| b["code"] = "".into(), "code");
    refused(|b| b["code"] = "B-1\u{1b}[2J".into(), "code");
    refused(
        |b| b["operator"] = "Mara\u{1b}]0;owned\u{7}".into(),
        "control",
    );
}

#[test]
fn impossible_masses_and_lines_are_refused() {
    refused(|b| b["lines"][0]["planned_g"] = (-5.0).into(), "mass");
    refused(|b| b["lines"][1]["actual_g"] = (-1.0).into(), "mass");
    refused(|b| b["lines"] = json!([]), "line");
    refused(
        |b| b["lines"][2]["ingredient"] = "unobtainium".into(),
        "unobtainium",
    );
}

#[test]
fn impossible_times_and_sign_offs_are_refused() {
    refused(
        |b| b["finalized_at"] = "2026-09-30T06:00:00.000Z".into(),
        "before",
    );
    refused(|b| b["made_at"] = "9999-10-01T06:00:00.000Z".into(), "year");
    refused(|b| b["finalized_at"] = Value::Null, "finalized_at");
    refused(
        |b| {
            b.as_object_mut().unwrap().remove("finalized_by");
        },
        "finalized_by",
    );
    refused(
        |b| {
            b["status"] = "draft".into();
        },
        "draft",
    );
}

#[test]
fn a_reading_in_another_unit_than_its_kinds_is_refused_not_relabelled() {
    refused(|b| b["measurements"][0]["unit"] = "°F".into(), "unit");
}

#[test]
fn a_line_without_an_end_is_refused_without_growing_memory_and_the_next_is_read() {
    let dir = tempfile::tempdir().unwrap();
    let good = template(dir.path()).to_string();
    // 40 MiB without a line break, then a good record.
    struct Endless {
        left: usize,
        tail: std::io::Cursor<Vec<u8>>,
    }
    impl std::io::Read for Endless {
        fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
            if self.left == 0 {
                return self.tail.read(buf);
            }
            let n = buf.len().min(self.left);
            buf[..n].fill(b'x');
            self.left -= n;
            Ok(n)
        }
    }
    let mut input = std::io::BufReader::new(Endless {
        left: 40 << 20,
        tail: std::io::Cursor::new(format!("\n{good}\n").into_bytes()),
    });
    let mut other = Store::open(&dir.path().join("other.db")).unwrap();
    let report = other.import_jsonl(&mut input).unwrap();
    assert_eq!(report.imported, 1, "{:?}", report.errors);
    assert_eq!(report.errors.len(), 1);
    assert_eq!(report.errors[0].0, 1);
    assert!(
        report.errors[0].1.contains("longer than"),
        "{}",
        report.errors[0].1
    );
}

#[test]
fn a_read_that_fails_part_way_says_what_was_written_where_it_stopped_and_how_to_resume() {
    let dir = tempfile::tempdir().unwrap();
    let good = template(dir.path());
    let lines: Vec<String> = (0..700)
        .map(|i| {
            let mut b = good.clone();
            b["code"] = format!("B-READ-{i:04}").into();
            b.to_string()
        })
        .collect();
    let mut other = Store::open(&dir.path().join("other.db")).unwrap();
    let partial = lines[..600].join("\n") + "\n";
    let mut failing = std::io::BufReader::new(FailingAfter {
        good: std::io::Cursor::new(partial.into_bytes()),
    });
    let err = other.import_jsonl(&mut failing).unwrap_err().to_string();
    let written = other.list_batches(&BatchFilter::default()).unwrap().len();
    assert_eq!(
        written, 600,
        "every whole line before the failure is written"
    );
    assert!(err.contains("disk went away"), "{err}");
    assert!(err.contains("line 601"), "where it stopped: {err}");
    assert!(err.contains("600 records were written"), "{err}");
    assert!(err.contains("again"), "how to resume: {err}");
    assert!(!err.contains("not changed"), "{err}");
}

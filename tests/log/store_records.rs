//! Batch records through the store's public API on real temporary files: codes,
//! recipe versions, measurements, notes, sign-off, the amendment trail, the
//! triggers that keep final records unchanged, the list with its filters, search
//! and keyset pages, and the JSON Lines round trip.

use std::path::Path;

use chrono::{TimeZone, Utc};
use gelu::analysis::Options;
use gelu::batch::plan::{Plan, parse_size, plan_batch};
use gelu::batch::{BatchFilter, Edit, LineRef, MeasurementKind, NewBatch, Status};
use gelu::catalog::Catalog;
use gelu::recipe_file::parse_recipe;
use gelu::samples::SAMPLE_RECIPES;
use gelu::store::{Store, StoreError};
use rusqlite::Connection;

use crate::store_common::{export, search};

fn sample(file: &str) -> (&'static str, gelu::model::Recipe) {
    let (name, text) = SAMPLE_RECIPES
        .iter()
        .find(|(n, _)| *n == file)
        .expect("sample exists");
    (text, parse_recipe(Path::new(name), text).unwrap())
}

fn planned(file: &str, size: &str, day: u32, lot: &str, note: &str) -> NewBatch {
    let (text, recipe) = sample(file);
    let lots = vec![(LineRef::parse("sucrose"), lot.to_owned())];
    plan_batch(
        &Plan {
            recipe: &recipe,
            recipe_text: text,
            size: parse_size(size, None).unwrap(),
            operator: "Mara Quill",
            lots: if lot.is_empty() { &[] } else { &lots },
            note: (!note.is_empty()).then_some(note),
            made_at: Utc.with_ymd_and_hms(2026, 11, day, 9, 30, 0).unwrap(),
        },
        Catalog::builtin(),
        &Options::default(),
    )
    .unwrap()
}

/// A 2 kg vanilla batch to copy into many imported records.
fn template(store: &mut Store) -> gelu::batch::Batch {
    store
        .new_batch(&planned(
            "harbour-vanilla.toml",
            "2kg",
            1,
            "S-0",
            "template",
        ))
        .unwrap()
}

/// A new log with the site code HBR, so that codes are known in advance.
fn fresh() -> (tempfile::TempDir, Store) {
    let dir = tempfile::tempdir().unwrap();
    let mut store = Store::open(&dir.path().join("log.db")).unwrap();
    assert_eq!(store.set_site_code("hbr").unwrap(), "HBR");
    (dir, store)
}

#[test]
fn a_new_batch_is_stored_whole_with_a_daily_code() {
    let (_dir, mut store) = fresh();
    let new = planned("harbour-vanilla.toml", "5kg", 3, "S-2611-7", "new freezer");
    let first = store.new_batch(&new).unwrap();
    let second = store.new_batch(&new).unwrap();
    assert_eq!(first.code, "B-20261103-HBR-0001");
    assert_eq!(second.code, "B-20261103-HBR-0002");
    assert_eq!(first.status, Status::Draft);
    assert_eq!(first.size_g, 5000.0);
    let planned_total: f64 = first.lines.iter().map(|l| l.planned_g).sum();
    assert!((planned_total - 5000.0).abs() < 1e-6, "{planned_total}");
    let sugar = first
        .lines
        .iter()
        .find(|l| l.ingredient == "sucrose")
        .unwrap();
    assert_eq!(sugar.lot, "S-2611-7");
    assert_eq!(first.notes[0].text, "new freezer");
    let predicted = first.prediction["mass_g"].as_f64().unwrap();
    assert!(
        (predicted - 5000.0).abs() < 0.01,
        "snapshot is of the scaled recipe"
    );
    assert!(first.prediction["freezing_point_c"].as_f64().unwrap() < 0.0);
    assert_eq!(store.batch(&first.code).unwrap().as_ref(), Some(&first));
    assert_eq!(store.batch("B-19990101-0001").unwrap(), None);
}

#[test]
fn a_liqueur_is_scaled_by_volume() {
    let (_dir, mut store) = fresh();
    let new = planned("strawberry-liqueur.toml", "1.5L", 4, "", "");
    let b = store.new_batch(&new).unwrap();
    let volume = b.prediction["volume_ml"].as_f64().unwrap();
    assert!((volume - 1500.0).abs() < 0.1, "{volume}");
    assert!((b.size_g - b.prediction["mass_g"].as_f64().unwrap()).abs() < 0.01);
}

#[test]
fn recipe_versions_are_kept_and_reused() {
    let (_dir, mut store) = fresh();
    let (text, _) = sample("harbour-vanilla.toml");
    let v1 = store.save_recipe_version("Harbour vanilla", text).unwrap();
    assert_eq!(
        v1.version, 1,
        "the seed already holds this text as version 1"
    );
    let changed = text.replace("g = 480", "g = 470");
    let v2 = store
        .save_recipe_version("Harbour vanilla", &changed)
        .unwrap();
    assert_eq!(v2.version, 2);
    assert_ne!(v1.content_hash, v2.content_hash);
    assert_eq!(
        store
            .save_recipe_version("Harbour vanilla", &changed)
            .unwrap()
            .version,
        2
    );
    let all = store.recipe_versions("Harbour vanilla").unwrap();
    assert_eq!(all.len(), 2);
    assert_eq!(all[0].text, text);
    let newest = store.recipes().unwrap();
    let vanilla = newest.iter().find(|r| r.name == "Harbour vanilla").unwrap();
    assert_eq!(vanilla.latest_version, 2);

    store.set_setting("cabinet_temp_c", "-13").unwrap();
    store.set_setting("cabinet_temp_c", "-14").unwrap();
    assert_eq!(
        store.get_setting("cabinet_temp_c").unwrap().as_deref(),
        Some("-14")
    );
    assert_eq!(store.get_setting("nothing").unwrap(), None);
}

#[test]
fn final_records_are_amended_never_changed() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("log.db");
    let mut store = Store::open(&path).unwrap();
    let b = store
        .new_batch(&planned(
            "harbour-vanilla.toml",
            "4kg",
            5,
            "S-1",
            "draw looked wet",
        ))
        .unwrap();
    store
        .add_measurements(
            &b.code,
            &[
                (MeasurementKind::Brix, 31.5),
                (MeasurementKind::DrawTempC, -6.4),
            ],
            "Ines",
            None,
        )
        .unwrap();
    store
        .add_note(&b.code, "overrun checked twice", "Ines", None)
        .unwrap();
    let fin = store.finalize(&b.code, "Head cook").unwrap();
    assert_eq!(fin.status, Status::Final);
    assert_eq!(fin.finalized_by.as_deref(), Some("Head cook"));
    let again = store.finalize(&b.code, "Head cook").unwrap_err();
    assert!(matches!(again, StoreError::Invalid(_)), "{again}");

    let a = store
        .amend(
            &b.code,
            "Head cook",
            "sugar lot misread from the sack",
            &[
                Edit::Lot {
                    line: LineRef::parse("sucrose"),
                    lot: "S-2".into(),
                },
                Edit::ActualG {
                    line: LineRef::parse("1"),
                    grams: 1921.0,
                },
                Edit::Operator("Mara Quill and Ines".into()),
            ],
        )
        .unwrap();
    assert_eq!(a.changes.len(), 3);
    let refused = store.amend(&b.code, "Head cook", "  ", &[Edit::Operator("x".into())]);
    assert!(refused.is_err(), "a reason is required");
    drop(store);

    // Everything survives closing and reopening.
    let store = Store::open(&path).unwrap();
    let now = store.batch(&b.code).unwrap().unwrap();
    assert_eq!(now.status, Status::Amended);
    assert_eq!(now.operator, "Mara Quill and Ines");
    assert_eq!(now.lines[0].actual_g, Some(1921.0));
    assert_eq!(
        now.lines
            .iter()
            .find(|l| l.ingredient == "sucrose")
            .unwrap()
            .lot,
        "S-2"
    );
    assert_eq!(now.measurements.len(), 2);
    assert_eq!(now.notes.len(), 2);
    assert_eq!(now.amendments[0].reason, "sugar lot misread from the sack");
    drop(store);

    // Below the API, the schema itself refuses to change the final record.
    let conn = Connection::open(&path).unwrap();
    for sql in [
        "UPDATE batches SET operator = 'someone else'",
        "UPDATE batches SET status = 'draft'",
        "UPDATE batch_lines SET lot = 'forged'",
        "DELETE FROM batches",
        "DELETE FROM measurements",
        "UPDATE measurements SET value = 30",
        "UPDATE amendments SET reason = 'forged'",
        "DELETE FROM batch_notes",
        "UPDATE recipe_versions SET text = ''",
        "UPDATE batch_predictions SET analysis = '{}'",
    ] {
        let err = conn.execute(sql, []).unwrap_err().to_string();
        assert!(
            err.contains("never") || err.contains("immutable"),
            "{sql}: {err}"
        );
    }
    let lot: String = conn
        .query_row(
            "SELECT lot FROM batch_lines WHERE ingredient = 'sucrose'",
            [],
            |r| r.get(0),
        )
        .unwrap();
    assert_eq!(
        lot, "S-1",
        "the first entry stays as written; the amendment sits beside it"
    );
}

#[test]
fn the_list_filters_searches_and_pages_newest_first() {
    let (_dir, mut store) = fresh();
    for day in 1..=12u32 {
        let (file, lot) = if day % 3 == 0 {
            ("lemon-sorbet.toml", format!("LEMON-{day}"))
        } else {
            ("harbour-vanilla.toml", format!("SUC-{day:02}"))
        };
        let note = if day == 7 {
            "cabinet door left ajar overnight"
        } else {
            ""
        };
        store
            .new_batch(&planned(file, "2kg", day, &lot, note))
            .unwrap();
    }
    let all = store.list_batches(&BatchFilter::default()).unwrap();
    assert_eq!(all.len(), 12);
    assert!(
        all.windows(2).all(|w| w[0].made_at >= w[1].made_at),
        "newest first"
    );
    assert_eq!(all[0].code, "B-20261112-HBR-0001");

    let sorbet = BatchFilter {
        recipe: Some("Quay lemon sorbet".into()),
        ..Default::default()
    };
    let codes: Vec<String> = store
        .list_batches(&sorbet)
        .unwrap()
        .into_iter()
        .map(|b| b.code)
        .collect();
    assert_eq!(
        codes,
        [
            "B-20261112-HBR-0001",
            "B-20261109-HBR-0001",
            "B-20261106-HBR-0001",
            "B-20261103-HBR-0001"
        ]
    );

    let window = BatchFilter {
        since: Some(Utc.with_ymd_and_hms(2026, 11, 4, 0, 0, 0).unwrap()),
        until: Some(Utc.with_ymd_and_hms(2026, 11, 6, 0, 0, 0).unwrap()),
        ..Default::default()
    };
    assert_eq!(store.list_batches(&window).unwrap().len(), 2);

    let search = |text: &str| search(&store, text);
    assert_eq!(search("ajar"), ["B-20261107-HBR-0001"]);
    assert_eq!(search("SUC-05"), ["B-20261105-HBR-0001"]);
    assert_eq!(
        search("lemon").len(),
        4,
        "lots LEMON-3.. hold the word lemon"
    );
    assert!(search("lem").is_empty(), "whole words only...");
    assert_eq!(search("lem*").len(), 4, "...unless a word ends in *");
    assert!(search("pistachio").is_empty());
    assert!(
        search("\"unbalanced AND (").is_empty(),
        "search syntax is taken literally"
    );

    // Keyset pages of 5: every row once, in order.
    let mut filter = BatchFilter {
        limit: 5,
        ..Default::default()
    };
    let mut paged = Vec::new();
    loop {
        let page = store.list_batches(&filter).unwrap();
        if page.is_empty() {
            break;
        }
        filter.after = Some(page.last().unwrap().cursor.clone());
        paged.extend(page.into_iter().map(|b| b.code));
    }
    let expected: Vec<String> = all.iter().map(|b| b.code.clone()).collect();
    assert_eq!(paged, expected);
}

#[test]
fn export_import_export_gives_identical_lines() {
    let (_dir, mut store) = fresh();
    for day in 1..=6u32 {
        let b = store
            .new_batch(&planned(
                "harbour-vanilla.toml",
                "3kg",
                day,
                &format!("S-{day}"),
                "note, with \"quotes\"",
            ))
            .unwrap();
        store
            .add_measurement(
                &b.code,
                MeasurementKind::OverrunPct,
                31.0 + f64::from(day) / 7.0,
                "Ines",
                None,
            )
            .unwrap();
        if day % 2 == 0 {
            store.finalize(&b.code, "Head cook").unwrap();
        }
        if day == 4 {
            store
                .amend(
                    &b.code,
                    "Head cook",
                    "weighed again",
                    &[Edit::ActualG {
                        line: LineRef::parse("2"),
                        grams: 899.5,
                    }],
                )
                .unwrap();
        }
    }
    let liqueur = store
        .new_batch(&planned("strawberry-liqueur.toml", "750mL", 9, "", ""))
        .unwrap();
    // A batch of an edited recipe (version 2) travels with its own text.
    let mut edited = planned("harbour-vanilla.toml", "1kg", 10, "", "");
    edited.recipe_text = edited.recipe_text.replace("g = 480", "g = 470");
    assert_eq!(store.new_batch(&edited).unwrap().recipe.version, 2);
    store
        .add_measurement(&liqueur.code, MeasurementKind::AbvPct, 20.1, "Jon", None)
        .unwrap();

    let first = export(&store);
    assert_eq!(first.lines().count(), 8);
    let (_dir2, mut other) = fresh();
    let report = other.import_jsonl(&mut first.as_bytes()).unwrap();
    assert_eq!(
        (report.imported, report.skipped_existing),
        (8, 0),
        "{:?}",
        report.errors
    );
    assert!(report.errors.is_empty());
    let second = export(&other);
    assert_eq!(first, second);
    assert!(other.check().unwrap().is_empty());

    // Importing again skips every code; nothing is duplicated.
    let again = other.import_jsonl(&mut first.as_bytes()).unwrap();
    assert_eq!((again.imported, again.skipped_existing), (0, 8));
    assert_eq!(export(&other), first);
    let amended = other.batch("B-20261104-HBR-0001").unwrap().unwrap();
    assert_eq!(amended.status, Status::Amended);
    assert_eq!(amended.lines[1].actual_g, Some(899.5));
}

#[test]
fn a_malformed_import_line_is_reported_and_nothing_of_it_written() {
    let (_dir, mut store) = fresh();
    for day in 1..=3u32 {
        store
            .new_batch(&planned("harbour-vanilla.toml", "1kg", day, "", ""))
            .unwrap();
    }
    let lines: Vec<String> = export(&store).lines().map(str::to_owned).collect();
    let mut missing_key: serde_json::Value = serde_json::from_str(&lines[1]).unwrap();
    missing_key.as_object_mut().unwrap().remove("operator");
    let mut bad_lot: serde_json::Value = serde_json::from_str(&lines[2]).unwrap();
    bad_lot["code"] = "B-20261130-0009".into();
    bad_lot["lines"][0]["lot"] = 17.into();
    let mut bad_line_ref: serde_json::Value = serde_json::from_str(&lines[0]).unwrap();
    bad_line_ref["code"] = "B-20261130-0010".into();
    bad_line_ref["status"] = "final".into();
    bad_line_ref["amendments"] = serde_json::json!([{
        "amended_at": "2026-11-30T10:00:00.000Z", "by": "x", "reason": "r",
        "changes": [{"field": "lot", "line": 99, "ingredient": "sucrose", "old": "", "new": "Z"}]
    }]);
    bad_line_ref["status"] = "amended".into();
    bad_line_ref["finalized_at"] = "2026-11-30T09:00:00.000Z".into();
    bad_line_ref["finalized_by"] = "Head cook".into();
    let input = [
        lines[0].clone(),
        "{ this is not json".to_owned(),
        missing_key.to_string(),
        bad_lot.to_string(),
        bad_line_ref.to_string(),
    ]
    .join("\n");

    let (_dir2, mut other) = fresh();
    let report = other.import_jsonl(&mut input.as_bytes()).unwrap();
    assert_eq!(report.imported, 1);
    let numbers: Vec<usize> = report.errors.iter().map(|(n, _)| *n).collect();
    assert_eq!(numbers, [2, 3, 4, 5], "{:?}", report.errors);
    assert!(
        report.errors[1].1.contains("operator"),
        "{}",
        report.errors[1].1
    );
    assert!(
        report.errors[3].1.contains("line 99"),
        "{}",
        report.errors[3].1
    );
    let codes: Vec<String> = other
        .list_batches(&BatchFilter::default())
        .unwrap()
        .into_iter()
        .map(|b| b.code)
        .collect();
    assert_eq!(
        codes,
        ["B-20261103-HBR-0001"],
        "nothing of a refused line is written"
    );
    assert!(other.check().unwrap().is_empty());
}

#[test]
fn searches_with_many_matches_page_like_a_plain_filter() {
    let (_dir, mut store) = fresh();
    let template = template(&mut store);
    // 3,000 batches, four in five noted "glossy": enough to take the many-matches path.
    let list: Vec<_> = (0..3_000)
        .map(|i| {
            let made_at =
                Utc.with_ymd_and_hms(2026, 10, 1, 0, 0, 0).unwrap() + chrono::Duration::minutes(i);
            let mut b = template.clone();
            b.code = format!("B-IMPORT-{i:05}");
            b.made_at = made_at;
            b.notes[0].text = if i % 5 != 0 {
                format!("glossy finish {i}")
            } else {
                format!("dull {i}")
            };
            b.notes[0].written_at = made_at;
            b
        })
        .collect();
    let report = store.import_batches(&list).unwrap();
    assert_eq!(report.imported, 3_000, "{:?}", report.errors.first());

    let page = |store: &Store, search: &str, limit: usize| {
        store
            .list_batches(&BatchFilter {
                search: Some(search.into()),
                limit,
                ..Default::default()
            })
            .unwrap()
            .into_iter()
            .map(|b| b.code)
            .collect::<Vec<_>>()
    };
    let expected: Vec<String> = (0..3_000)
        .rev()
        .filter(|i| i % 5 != 0)
        .take(50)
        .map(|i| format!("B-IMPORT-{i:05}"))
        .collect();
    assert_eq!(page(&store, "glossy", 50), expected);
    assert_eq!(page(&store, "glossy", 0).len(), 2_400);
    assert_eq!(
        page(&store, "dull", 0).len(),
        600,
        "few matches: the sorting path"
    );
    assert_eq!(page(&store, "finish 1234", 0), ["B-IMPORT-01234"]);
    // A prefix with many matches takes the third path; same page.
    assert_eq!(page(&store, "gloss*", 50), expected);

    // Notes and amendments written later are found too.
    store
        .add_note("B-IMPORT-00003", "seized the dasher", "Ines", None)
        .unwrap();
    store
        .amend(
            "B-IMPORT-00005",
            "Head cook",
            "scale misread",
            &[Edit::Lot {
                line: LineRef::parse("sucrose"),
                lot: "S-9931".into(),
            }],
        )
        .unwrap();
    assert_eq!(page(&store, "dasher", 0), ["B-IMPORT-00003"]);
    assert_eq!(page(&store, "misread", 0), ["B-IMPORT-00005"]);
    assert_eq!(page(&store, "S-9931", 0), ["B-IMPORT-00005"]);
}

#[test]
fn custom_solutes_and_ingredients_are_kept_by_id() {
    let (_dir, mut store) = fresh();
    let solute = gelu::store::CustomItem {
        id: "sea-buckthorn-sugars".into(),
        name: "Sea buckthorn sugars".into(),
        definition: "molar_mass = 180.16\ndissociation = 1.0\n".into(),
    };
    store.save_custom_solute(&solute).unwrap();
    let mut ingredient = gelu::store::CustomItem {
        id: "harbour-honey".into(),
        name: "Harbour honey".into(),
        definition: "water = 17.0\n".into(),
    };
    store.save_custom_ingredient(&ingredient).unwrap();
    ingredient.definition = "water = 18.0\n".into();
    store.save_custom_ingredient(&ingredient).unwrap();
    assert_eq!(store.custom_solutes().unwrap(), [solute]);
    assert_eq!(store.custom_ingredients().unwrap(), [ingredient]);
}

#[test]
fn prefix_searches_page_by_time_even_when_records_were_imported_out_of_order() {
    // The fast path for a prefix with many matches reads the newest index entries
    // (highest batch ids) and proves the page against the batches it did not read.
    // Imports of old records break the link between id and time. Three logs: ids in
    // time order (the fast path holds), ids against time, and ids in time order but
    // for one very new record written first (both must fall back). Every page must
    // be the newest by time. The imports are dated after the template batch.
    for order in ["with time", "against time", "one new record first"] {
        let (_dir, mut store) = fresh();
        let template = template(&mut store);
        let n = 3_000i64;
        let made = |i: i64| {
            let minutes = match order {
                "against time" => n - i,
                "one new record first" if i == 1 => 10 * n,
                _ => i,
            };
            Utc.with_ymd_and_hms(2027, 1, 1, 0, 0, 0).unwrap() + chrono::Duration::minutes(minutes)
        };
        let list: Vec<_> = (0..n)
            .map(|i| {
                let mut b = template.clone();
                b.code = format!("B-OLD-{i:05}");
                b.made_at = made(i);
                b.notes[0].text = if i % 5 != 0 {
                    format!("glossy {i}")
                } else {
                    format!("dull {i}")
                };
                b.notes[0].written_at = made(i);
                b
            })
            .collect();
        assert_eq!(store.import_batches(&list).unwrap().imported, n as usize);
        let mut expected: Vec<(chrono::DateTime<Utc>, String)> = (0..n)
            .filter(|i| i % 5 != 0)
            .map(|i| (made(i), format!("B-OLD-{i:05}")))
            .collect();
        expected.sort_by(|a, b| b.cmp(a));
        // Two pages of 50 through the cursor, as the workspace scrolls.
        let mut filter = BatchFilter {
            search: Some("gloss*".into()),
            limit: 50,
            ..Default::default()
        };
        let first = store.list_batches(&filter).unwrap();
        filter.after = first.last().map(|b| b.cursor.clone());
        let second = store.list_batches(&filter).unwrap();
        let got: Vec<String> = first
            .iter()
            .chain(&second)
            .map(|b| b.code.clone())
            .collect();
        let want: Vec<String> = expected.iter().take(100).map(|e| e.1.clone()).collect();
        assert_eq!(got, want, "ids {order}");
    }
}

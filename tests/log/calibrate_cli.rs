//! Calibration on the command line, never silent: `gelu batch calibrate` fits a
//! correction per recipe or style from logged batches and shows how it would
//! change the predictions; `--turn-on` stores it as a new version in the log and
//! puts it in force, after which calibrated figures are marked with their basis
//! and the uncalibrated ones stay beside them; `gelu batch calibrations` lists
//! every version and who turned what on or off, and when.

use std::path::Path;

use chrono::{TimeZone, Utc};
use gelu::batch::MeasurementKind;
use gelu::store::{Store, migrate};
use serde_json::Value;

use crate::batch_common::{VANILLA, json, new_db, run};

/// Records `n` vanilla batches whose freezing point reads `offset` K above
/// the prediction, through the library.
fn vanilla_batches(db: &Path, n: usize, offset: f64) {
    let mut store = Store::open(db).unwrap();
    for day in 0..n {
        let made_at =
            Utc.with_ymd_and_hms(2026, 2, 1, 9, 0, 0).unwrap() + chrono::Duration::days(day as i64);
        let b = crate::batch_common::record(&mut store, VANILLA, made_at);
        let predicted = b.prediction["freezing_point_c"].as_f64().unwrap();
        store
            .add_measurements(
                &b.code,
                &[(MeasurementKind::FreezingPointC, predicted + offset)],
                "Ines Harrow",
                None,
            )
            .unwrap();
    }
}

/// The freezing point as `gelu batch show --json` sets it against its reading.
fn freezing_point_shown(db: &Path, code: &str) -> Value {
    let shown = json(db, &["batch", "show", code, "--json"]);
    shown["compared"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["kind"] == "freezing-point-c")
        .unwrap()
        .clone()
}

const FIT: [&str; 6] = [
    "batch",
    "calibrate",
    "--kind",
    "freezing-point-c",
    "--recipe",
    "Harbour vanilla",
];

/// The offset `gelu batch calibrate --json` fits for `n` batches 0.3 K warm,
/// read with a kitchen thermometer (0.3 K).
fn fitted_offset(n: usize) -> f64 {
    let (_dir, db) = new_db();
    vanilla_batches(&db, n, 0.3);
    let args: Vec<&str> = FIT
        .iter()
        .copied()
        .chain(["--precision", "freezing-point-c=0.3", "--json"])
        .collect();
    let v = json(&db, &args);
    v["correction"]["offset"].as_f64().unwrap()
}

#[test]
fn few_batches_move_the_prediction_less_than_many() {
    // Normal-normal shrinkage with the prior scale of 0.2 K for freezing points:
    // with 2 batches read to 0.3 K most of the 0.3 K is held back; with 20 most
    // of it comes through. Neither passes the batches' own mean.
    let few = fitted_offset(2);
    let many = fitted_offset(20);
    assert!(few > 0.0 && few < many, "{few} against {many}");
    assert!(many < 0.3 + 1e-12, "{many}");
    assert!(
        few < 0.2,
        "two thermometer readings move it less than 0.2 K: {few}"
    );
    assert!(many > 0.25, "twenty move it most of the way: {many}");
}

#[test]
fn a_correction_is_shown_then_turned_on_versioned_and_turned_off() {
    let (_dir, db) = new_db();
    vanilla_batches(&db, 12, 0.15);
    // The preview changes nothing and says how it would change the predictions.
    let text = run(&db, &FIT, 0);
    for words in ["+0.15 K from 12 batches", "bias +0.150 K", "--turn-on"] {
        assert!(text.contains(words), "`{words}` missing:\n{text}");
    }
    let preview: Value = json(&db, &[&FIT[..], &["--json"]].concat());
    assert_eq!(preview["correction"]["n"], 12);
    assert!(preview["in_force"].is_null());
    let after = preview["after"]["bias"].as_f64().unwrap();
    let before = preview["before"]["bias"].as_f64().unwrap();
    assert!(
        (before - 0.15).abs() < 1e-9 && after.abs() < before,
        "{preview}"
    );
    let code = preview["batches"][0]["batch_code"]
        .as_str()
        .unwrap()
        .to_string();
    let fp = freezing_point_shown(&db, &code);
    assert!(fp["calibrated"].is_null(), "nothing in force yet: {fp}");

    // Turned on: version 1, by whom.
    let on = run(
        &db,
        &[&FIT[..], &["--turn-on", "--by", "Head cook"]].concat(),
        0,
    );
    assert!(on.contains("version 1"), "{on}");
    let fp = freezing_point_shown(&db, &code);
    let offset = preview["correction"]["offset"].as_f64().unwrap();
    let predicted = fp["predicted"].as_f64().unwrap();
    assert!(
        (fp["calibrated"]["predicted"].as_f64().unwrap() - (predicted + offset)).abs() < 1e-9,
        "{fp}"
    );
    assert!(
        fp["calibrated"]["basis"]
            .as_str()
            .unwrap()
            .contains("from 12 batches")
    );
    let text = run(&db, &["batch", "show", &code], 0);
    assert!(text.contains("calibrated"), "{text}");
    assert!(text.contains("from 12 batches"), "{text}");

    // batch compare reports the statistics with the correction beside the plain ones.
    let summary = json(
        &db,
        &["batch", "compare", "--json", "--kind", "freezing-point-c"],
    );
    assert!((summary["bias"].as_f64().unwrap() - 0.15).abs() < 1e-9);
    assert_eq!(summary["calibrated"]["corrected"], 12);
    assert!(summary["calibrated"]["bias"].as_f64().unwrap().abs() < 0.15);

    // A second fit is version 2; the history keeps both and every switch.
    run(
        &db,
        &[&FIT[..], &["--turn-on", "--by", "Ines Harrow"]].concat(),
        0,
    );
    run(
        &db,
        &[&FIT[..], &["--turn-off", "--by", "Head cook"]].concat(),
        0,
    );
    let history = run(&db, &["batch", "calibrations", "--json"], 0);
    let rows: Vec<Value> = history
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    let versions: Vec<&Value> = rows.iter().filter(|r| r["fitted_by"].is_string()).collect();
    assert_eq!(versions.len(), 2, "{history}");
    assert!(versions.iter().all(|r| r["in_force"] == false), "{history}");
    let switches: Vec<&Value> = rows.iter().filter(|r| r["switched"].is_string()).collect();
    assert_eq!(switches.len(), 3, "on, on, off: {history}");
    assert_eq!(switches[2]["switched"], "off");
    assert_eq!(switches[2]["by"], "Head cook");
    let text = run(&db, &["batch", "calibrations"], 0);
    for words in [
        "version 1",
        "version 2",
        "Head cook",
        "Ines Harrow",
        "turned off",
    ] {
        assert!(text.contains(words), "`{words}` missing:\n{text}");
    }
    let shown = json(&db, &["batch", "show", &code, "--json"]);
    assert!(
        shown["compared"]
            .as_array()
            .unwrap()
            .iter()
            .all(|c| c["calibrated"].is_null()),
        "off again"
    );
}

#[test]
fn calibration_refuses_what_it_cannot_fit() {
    let (_dir, db) = new_db();
    vanilla_batches(&db, 2, 0.1);
    // No batch of that recipe has a measured ABV.
    let out = crate::batch_common::gelu(&db)
        .args([
            "batch",
            "calibrate",
            "--kind",
            "abv-pct",
            "--recipe",
            "Harbour vanilla",
        ])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("no batches"));
    // A scope is required, and only one.
    run(
        &db,
        &["batch", "calibrate", "--kind", "freezing-point-c"],
        2,
    );
    run(&db, &[&FIT[..], &["--style", "ice-cream"]].concat(), 2);
    // Turning off what is not on is refused.
    run(&db, &[&FIT[..], &["--turn-off"]].concat(), 1);
}

#[test]
fn the_schema_holds_the_versions_append_only() {
    let (_dir, db) = new_db();
    vanilla_batches(&db, 3, 0.1);
    run(&db, &[&FIT[..], &["--turn-on"]].concat(), 0);
    let conn = rusqlite::Connection::open(&db).unwrap();
    assert_eq!(
        migrate::user_version(&conn).unwrap(),
        migrate::latest_version()
    );
    for sql in [
        "UPDATE calibrations SET fitted_by = 'someone else'",
        "DELETE FROM calibrations",
        "UPDATE calibration_switches SET switched_by = 'someone else'",
        "DELETE FROM calibration_switches",
    ] {
        let err = conn.execute(sql, []).unwrap_err().to_string();
        assert!(err.contains("never"), "{sql}: {err}");
    }
}

#[test]
fn a_report_shows_the_corrections_in_force_beside_the_plain_prediction() {
    let (_dir, db) = new_db();
    vanilla_batches(&db, 12, 0.15);
    // Nothing in force: the report says so with an empty list.
    let plain = json(&db, &["report", VANILLA, "--json"]);
    assert_eq!(plain["calibrated"], serde_json::json!([]), "{plain}");
    run(
        &db,
        &[&FIT[..], &["--turn-on", "--by", "Head cook"]].concat(),
        0,
    );
    let fitted: Value = json(&db, &[&FIT[..], &["--json"]].concat());
    let offset = fitted["in_force"]["offset"]
        .as_f64()
        .or_else(|| fitted["correction"]["offset"].as_f64())
        .unwrap();
    let report = json(&db, &["report", VANILLA, "--json"]);
    // The plain prediction is untouched; the calibrated one is beside it.
    assert_eq!(report["freezing_point_c"], plain["freezing_point_c"]);
    let predicted = report["freezing_point_c"].as_f64().unwrap();
    let calibrated = report["calibrated"].as_array().unwrap();
    assert_eq!(calibrated.len(), 1, "{report}");
    let fp = &calibrated[0];
    assert_eq!(fp["kind"], "freezing-point-c");
    // JSON rounds the freezing point to 0.001 K.
    assert!(
        (fp["predicted"].as_f64().unwrap() - predicted).abs() < 1e-3,
        "{fp}"
    );
    assert!(
        (fp["value"].as_f64().unwrap() - (predicted + offset)).abs() < 2e-3,
        "{fp} {offset}"
    );
    assert!(
        fp["basis"].as_str().unwrap().contains("from 12 batches"),
        "{fp}"
    );
    let text = run(&db, &["report", VANILLA], 0);
    assert!(text.contains("calibrated"), "{text}");
    assert!(text.contains("from 12 batches"), "{text}");
}

#[test]
fn the_logs_instrument_precision_is_used_until_a_flag_says_otherwise() {
    let (_dir, db) = new_db();
    vanilla_batches(&db, 3, 0.3);
    let offset = |extra: &[&str]| {
        let args: Vec<&str> = FIT.iter().copied().chain(extra.iter().copied()).collect();
        json(&db, &[&args[..], &["--json"]].concat())["correction"]["offset"]
            .as_f64()
            .unwrap()
    };
    let cryoscope = offset(&[]);
    let thermometer = offset(&["--precision", "freezing-point-c=0.3"]);
    assert!(thermometer < cryoscope, "{thermometer} {cryoscope}");
    // The log's own precision: a probe thermometer (0.3 K) for freezing points.
    let listed = run(&db, &["batch", "precision"], 0);
    assert!(
        listed.contains("freezing-point-c") && listed.contains("0.005 K (usual)"),
        "{listed}"
    );
    let set = run(&db, &["batch", "precision", "freezing-point-c=0.3"], 0);
    assert!(set.contains("0.3 K (this log)"), "{set}");
    assert_eq!(offset(&[]), thermometer);
    // A flag still wins for one run.
    assert_eq!(
        offset(&["--precision", "freezing-point-c=0.005"]),
        cryoscope
    );
    // Back to the usual.
    let reset = run(&db, &["batch", "precision", "freezing-point-c=usual"], 0);
    assert!(reset.contains("0.005 K (usual)"), "{reset}");
    assert_eq!(offset(&[]), cryoscope);
    // Nonsense is refused and changes nothing.
    run(&db, &["batch", "precision", "freezing-point-c=-1"], 2);
    run(&db, &["batch", "precision", "ph=0.1"], 2);
}

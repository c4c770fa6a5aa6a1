//! Predicted against measured on the command line: `gelu batch show` sets every
//! measured figure the model predicts beside its prediction (freezing point,
//! also read in degrees Hortvet; ABV; Brix; draw temperature), flags a batch far
//! off in plain words, and `gelu batch compare` summarises the log per kind,
//! recovering a bias injected into synthetic batches.

use chrono::{TimeZone, Utc};
use gelu::batch::{Batch, MeasurementKind};
use gelu::store::Store;
use serde_json::Value;

use crate::batch_common::{VANILLA, json, new_db, run};

const SORBET: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/sample-recipes/lemon-sorbet.toml"
);
const LIQUEUR: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/sample-recipes/strawberry-liqueur.toml"
);

/// Records a 5 kg batch of the recipe file, made on day `day` of 2026
/// (counted from 1 January).
fn record(store: &mut Store, file: &str, day: i64) -> Batch {
    let made_at = Utc.with_ymd_and_hms(2026, 1, 1, 9, 0, 0).unwrap() + chrono::Duration::days(day);
    crate::batch_common::record(store, file, made_at)
}

/// Records a measurement `offset` off the batch's own recorded prediction.
fn measure_off(store: &mut Store, b: &Batch, kind: MeasurementKind, key: &str, offset: f64) {
    let predicted = b.prediction[key].as_f64().unwrap();
    store
        .add_measurements(&b.code, &[(kind, predicted + offset)], "Ines Harrow", None)
        .unwrap();
}

/// A vanilla batch made on `day` whose freezing point reads `offset` K off its prediction.
fn vanilla_off(store: &mut Store, day: i64, offset: f64) -> Batch {
    let b = record(store, VANILLA, day);
    measure_off(
        store,
        &b,
        MeasurementKind::FreezingPointC,
        "freezing_point_c",
        offset,
    );
    b
}

fn compared<'a>(show: &'a Value, kind: &str) -> &'a Value {
    show["compared"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["kind"] == kind)
        .unwrap_or_else(|| panic!("no `{kind}` in {}", show["compared"]))
}

#[test]
fn a_new_batch_records_brix_and_draw_temperature_predictions() {
    let (_dir, db) = new_db();
    let b = json(&db, &["batch", "new", SORBET, "--size", "4kg", "--json"]);
    let p = &b["prediction"];
    // Keys of the analysis stay; the measurement loop's are added beside them.
    for key in ["freezing_point_c", "serving_temp_c", "abv_pct", "mass_g"] {
        assert!(p[key].is_number(), "{key}: {p}");
    }
    assert!(p["brix"].is_number(), "{p}");
    assert!(p["draw_temp_c"].is_number(), "{p}");
    assert_eq!(p["draw_frozen_fraction"], 0.5);
    // The draw (half the water frozen) is colder than the freezing point and
    // warmer than serving (70 % frozen).
    let draw = p["draw_temp_c"].as_f64().unwrap();
    assert!(draw < p["freezing_point_c"].as_f64().unwrap());
    assert!(draw > p["serving_temp_c"].as_f64().unwrap());
    // A liqueur: no Brix, and the reason is kept.
    let l = json(&db, &["batch", "new", LIQUEUR, "--size", "2L", "--json"]);
    assert!(l["prediction"]["brix"].is_null());
    assert!(
        l["prediction"]["brix_refused"]
            .as_str()
            .is_some_and(|r| r.contains("ethanol")),
        "{}",
        l["prediction"]
    );
}

#[test]
fn show_sets_each_reading_beside_its_prediction_with_the_difference() {
    let (_dir, db) = new_db();
    let b = json(&db, &["batch", "new", SORBET, "--size", "4kg", "--json"]);
    let code = b["code"].as_str().unwrap();
    let p = &b["prediction"];
    run(
        &db,
        &[
            "batch",
            "measure",
            code,
            "brix=30.2",
            "draw-temp-c=-6.0",
            "freezing-point-h=-3.000",
            "mass-g=4980",
        ],
        0,
    );
    let show = json(&db, &["batch", "show", code, "--json"]);
    // The batch JSON is all there, with the comparison added.
    assert_eq!(show["code"], code);
    assert!(show["measurements"].is_array());
    let brix = compared(&show, "brix");
    let predicted = p["brix"].as_f64().unwrap();
    assert_eq!(brix["predicted"].as_f64().unwrap(), predicted);
    assert_eq!(brix["measured"], 30.2);
    assert!((brix["difference"].as_f64().unwrap() - (30.2 - predicted)).abs() < 1e-9);
    assert_eq!(brix["predicted_from"], "recorded");
    let draw = compared(&show, "draw-temp-c");
    assert!(
        (draw["difference"].as_f64().unwrap() - (-6.0 - p["draw_temp_c"].as_f64().unwrap())).abs()
            < 1e-9
    );
    // The cryoscope reading is kept as taken and set against the prediction in
    // °C by the IDF line: °C = 0.96418 °H + 0.00085.
    let kinds: Vec<(&str, f64)> = show["measurements"]
        .as_array()
        .unwrap()
        .iter()
        .map(|m| (m["kind"].as_str().unwrap(), m["value"].as_f64().unwrap()))
        .collect();
    assert!(kinds.contains(&("freezing-point-h", -3.0)), "{kinds:?}");
    let fp = compared(&show, "freezing-point-c");
    let converted = 0.96418 * -3.0 + 0.00085;
    assert!((fp["measured"].as_f64().unwrap() - converted).abs() < 1e-12);
    assert!(fp["predicted"].is_number());
    // The text says the same for people.
    let text = run(&db, &["batch", "show", code], 0);
    for words in [
        "brix",
        "draw-temp-c",
        "freezing-point-h",
        "°H",
        "difference",
    ] {
        assert!(text.contains(words), "`{words}` missing:\n{text}");
    }
}

#[test]
fn a_hortvet_reading_converts_as_the_published_pair() {
    // University of Illinois ANSC 438 (citing Sherbon 1988): -0.525 °H is
    // -0.505 °C, to three decimals (tolerance 0.0005 K).
    let (_dir, db) = new_db();
    let code = run(&db, &["batch", "new", VANILLA, "--size", "5kg"], 0);
    let code = code.trim();
    run(
        &db,
        &["batch", "measure", code, "freezing-point-h=-0.525"],
        0,
    );
    let show = json(&db, &["batch", "show", code, "--json"]);
    let c = compared(&show, "freezing-point-c")["measured"]
        .as_f64()
        .unwrap();
    assert!((c + 0.505).abs() < 0.0005, "{c}");
}

#[test]
fn older_batches_get_brix_and_draw_from_their_recorded_recipe_text() {
    // The schema-2 fixture was written before Brix and the draw temperature were
    // recorded: they are computed from the recipe text each batch kept, and say so.
    let (_dir, db) = new_db();
    std::fs::copy(
        concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/tests/fixtures/batch-log-v2.db"
        ),
        &db,
    )
    .unwrap();
    let show = json(&db, &["batch", "show", "B-20261202-0001", "--json"]);
    let brix = compared(&show, "brix");
    assert_eq!(brix["predicted_from"], "recipe-text");
    assert!(brix["predicted"].is_number());
    assert_eq!(brix["measured"], 32.5);
    let draw = compared(&show, "draw-temp-c");
    assert_eq!(draw["predicted_from"], "recipe-text");
    assert_eq!(draw["measured"], -5.6, "the latest reading");
    // Recorded figures stay recorded.
    assert_eq!(
        compared(&show, "freezing-point-c")["predicted_from"],
        "recorded"
    );
    let text = run(&db, &["batch", "show", "B-20261202-0001"], 0);
    assert!(text.contains("from the recorded recipe"), "{text}");
    // The liqueur's Brix is refused with its reason.
    let show = json(&db, &["batch", "show", "B-20261202-0002", "--json"]);
    let brix = compared(&show, "brix");
    assert!(brix["predicted"].is_null());
    assert!(
        brix["no_prediction"]
            .as_str()
            .is_some_and(|r| r.contains("ethanol"))
    );
}

#[test]
fn a_batch_far_off_is_flagged_with_likely_causes() {
    let (_dir, db) = new_db();
    let mut store = Store::open(&db).unwrap();
    let b = record(&mut store, VANILLA, 0);
    // 1 K warmer than predicted is far beyond a cryoscope's 0.005 K and the
    // 0.05 K usual batch spread.
    measure_off(
        &mut store,
        &b,
        MeasurementKind::FreezingPointC,
        "freezing_point_c",
        1.0,
    );
    let show = json(&db, &["batch", "show", &b.code, "--json"]);
    let fp = compared(&show, "freezing-point-c");
    assert_eq!(fp["far_off"], true);
    assert!(
        fp["likely_causes"]
            .as_array()
            .unwrap()
            .iter()
            .any(|c| c.as_str().unwrap().contains("fewer dissolved solids")),
        "{fp}"
    );
    let text = run(&db, &["batch", "show", &b.code], 0);
    assert!(text.contains("far off"), "{text}");
    assert!(text.contains("weighed low"), "{text}");
}

/// Twelve offsets around +0.15 K (their mean is 0.15 exactly).
const OFFSETS: [f64; 12] = [
    0.12, 0.18, 0.15, 0.10, 0.20, 0.14, 0.16, 0.13, 0.17, 0.15, 0.11, 0.19,
];

fn summaries(text: &str) -> Vec<Value> {
    text.lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect()
}

#[test]
fn compare_recovers_an_injected_bias_with_n_and_rmse() {
    let (_dir, db) = new_db();
    let mut store = Store::open(&db).unwrap();
    for (k, off) in OFFSETS.iter().enumerate() {
        vanilla_off(&mut store, k as i64, *off);
        // Sorbet batches read 0.4 °Bx low.
        let s = record(&mut store, SORBET, k as i64);
        measure_off(&mut store, &s, MeasurementKind::Brix, "brix", -0.4);
    }
    drop(store);
    let all = summaries(&run(&db, &["batch", "compare", "--json"], 0));
    assert_eq!(all.len(), 2, "one object per kind: {all:?}");
    // The log's order: brix before freezing-point-c.
    assert_eq!(all[0]["kind"], "brix");
    assert_eq!(all[1]["kind"], "freezing-point-c");
    let fp = &all[1];
    assert_eq!(fp["n"], 12);
    let mean = OFFSETS.iter().sum::<f64>() / 12.0;
    let rmse = (OFFSETS.iter().map(|d| d * d).sum::<f64>() / 12.0).sqrt();
    assert!((fp["bias"].as_f64().unwrap() - mean).abs() < 1e-9, "{fp}");
    assert!((fp["rmse"].as_f64().unwrap() - rmse).abs() < 1e-9, "{fp}");
    assert!((mean - 0.15).abs() < 1e-12);
    assert!(fp["flagged"].as_array().unwrap().is_empty(), "{fp}");
    assert_eq!(all[0]["n"], 12);
    assert!((all[0]["bias"].as_f64().unwrap() + 0.4).abs() < 1e-9);
    assert!((all[0]["rmse"].as_f64().unwrap() - 0.4).abs() < 1e-9);

    // Filters: one kind, one recipe, one style, a date.
    let one = summaries(&run(
        &db,
        &["batch", "compare", "--json", "--kind", "brix"],
        0,
    ));
    assert_eq!((one.len(), one[0]["kind"].as_str()), (1, Some("brix")));
    let vanilla = summaries(&run(
        &db,
        &["batch", "compare", "--json", "--recipe", "Harbour vanilla"],
        0,
    ));
    assert_eq!(vanilla.len(), 1);
    assert_eq!(vanilla[0]["kind"], "freezing-point-c");
    let sorbets = summaries(&run(
        &db,
        &["batch", "compare", "--json", "--style", "sorbet"],
        0,
    ));
    assert_eq!(
        (sorbets.len(), sorbets[0]["kind"].as_str()),
        (1, Some("brix"))
    );
    let late = summaries(&run(
        &db,
        &[
            "batch",
            "compare",
            "--json",
            "--kind",
            "freezing-point-c",
            "--since",
            "2026-01-09",
        ],
        0,
    ));
    assert_eq!(late[0]["n"], 4, "made on 9-12 January");

    // The text: counts, bias, RMSE, the worst batches and a chart.
    let text = run(&db, &["batch", "compare", "--kind", "freezing-point-c"], 0);
    for words in [
        "freezing-point-c",
        "n = 12",
        "bias +0.150 K",
        "RMSE",
        "worst",
        "measured (up) against predicted",
    ] {
        assert!(text.contains(words), "`{words}` missing:\n{text}");
    }
    // Bad usage.
    run(&db, &["batch", "compare", "--kind", "colour"], 2);
    run(&db, &["batch", "compare", "--style", "fudge"], 2);
}

#[test]
fn compare_flags_the_batch_far_off_the_others() {
    let (_dir, db) = new_db();
    let mut store = Store::open(&db).unwrap();
    let mut far = String::new();
    for (k, off) in [0.15, 0.14, 0.16, 0.15, 1.15].iter().enumerate() {
        let b = vanilla_off(&mut store, k as i64, *off);
        if *off > 1.0 {
            far = b.code.clone();
        }
    }
    drop(store);
    let all = summaries(&run(&db, &["batch", "compare", "--json"], 0));
    let flagged = all[0]["flagged"].as_array().unwrap();
    assert_eq!(flagged.len(), 1, "{flagged:?}");
    assert_eq!(flagged[0]["batch_code"], far.as_str());
    assert!(!flagged[0]["likely_causes"].as_array().unwrap().is_empty());
    let text = run(&db, &["batch", "compare"], 0);
    assert!(
        text.contains(&far) && text.contains("fewer dissolved solids"),
        "{text}"
    );
}

#[test]
fn the_draw_share_is_a_setting_of_the_log() {
    let (_dir, db) = new_db();
    assert!(run(&db, &["batch", "draw-share"], 0).contains("50 %"));
    let at_half = json(&db, &["batch", "new", VANILLA, "--size", "5kg", "--json"]);
    assert!(run(&db, &["batch", "draw-share", "0.6"], 0).contains("60 %"));
    let at_six = json(&db, &["batch", "new", VANILLA, "--size", "5kg", "--json"]);
    assert_eq!(at_six["prediction"]["draw_frozen_fraction"], 0.6);
    // More ice at draw means a colder draw.
    let draw = |b: &Value| b["prediction"]["draw_temp_c"].as_f64().unwrap();
    assert!(draw(&at_six) < draw(&at_half) - 0.3);
    // A batch keeps the draw share it was predicted at.
    let code = at_half["code"].as_str().unwrap();
    let show = json(&db, &["batch", "show", code, "--json"]);
    assert_eq!(
        compared(&show, "draw-temp-c")["predicted"]
            .as_f64()
            .unwrap(),
        draw(&at_half)
    );
    run(&db, &["batch", "draw-share", "120 %"], 2);
}

#[test]
fn a_drink_has_no_serving_temperature_to_compare_but_keeps_the_analysis_key() {
    // A liqueur is poured, not scooped: no serving temperature is set against a
    // reading (the analysis keeps its key, a public contract).
    let (_dir, db) = new_db();
    let l = json(&db, &["batch", "new", LIQUEUR, "--size", "2L", "--json"]);
    assert!(l["prediction"]["serving_temp_c"].is_number());
    let code = l["code"].as_str().unwrap().to_string();
    let show = json(&db, &["batch", "show", &code, "--json"]);
    let serving = compared(&show, "serving-temp-c");
    assert!(serving["predicted"].is_null(), "{serving}");
    assert!(
        serving["no_prediction"]
            .as_str()
            .is_some_and(|r| r.contains("not served")),
        "{serving}"
    );
    // The freezing point and ABV are still compared.
    assert!(compared(&show, "freezing-point-c")["predicted"].is_number());
    assert!(compared(&show, "abv-pct")["predicted"].is_number());
    // Its size reads in litres too, as it was asked for.
    let text = run(&db, &["batch", "show", &code], 0);
    assert!(text.contains("(2 L at 20 °C)"), "{text}");
}

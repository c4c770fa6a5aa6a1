//! The measurement loop in the workspace, through `update` alone: the form that
//! characterises an ingredient from measured freezing points and saves it into
//! the own library, a cryoscope reading in °H, the compare view of the batch
//! log with its calibration (asked before anything is put in force), and the
//! draw share among the settings.

use chrono::{TimeZone, Utc};
use gelu::batch::MeasurementKind;
use gelu::measure::{CalibrationPrior, Comparison, Scope, fit_correction, summarise};
use gelu::tui::state::{
    BatchDetailView, BatchRow, CompareRequest, CompareView, Context, FormPurpose, KindView,
    Overlay, Question, SettingField,
};
use gelu::tui::{Action, Command, Effect, State, update};

use crate::common::{cmd, loaded_state, open_setting, type_text};

fn fill(state: &mut State, values: &[&str]) {
    for v in values {
        cmd(state, Command::ClearField);
        type_text(state, v);
        cmd(state, Command::NextField);
    }
}

fn summary(state: &State) -> String {
    match &state.overlay {
        Some(Overlay::Form(f)) => f.summary.clone().unwrap_or_default(),
        other => panic!("expected a form, found {other:?}"),
    }
}

/// CRC Handbook, 102nd ed., glucose: 10.0 % freezes 1.17 K and 20.0 % 2.70 K
/// below pure water (±0.005 K rounding); glucose is 180.155 g/mol.
const GLUCOSE: [&str; 5] = [
    "breakwater-dextrose",
    "Breakwater dextrose",
    "10:90:-1.17  20:80:-2.70",
    "100",
    "1",
];

#[test]
fn the_characterise_form_shows_the_result_as_you_type_and_saves_it() {
    let mut s = loaded_state();
    cmd(&mut s, Command::ShowIngredients);
    cmd(&mut s, Command::CharacteriseIngredient);
    assert!(matches!(&s.overlay, Some(Overlay::Form(f)) if f.purpose == FormPurpose::Characterise));
    assert_eq!(s.context(), Context::Form);
    fill(&mut s, &GLUCOSE);
    let said = summary(&s);
    assert!(said.contains("g/mol"), "{said}");
    // The molar mass shown is glucose's within the 3 % of the core check.
    let m: f64 = said
        .split_whitespace()
        .zip(said.split_whitespace().skip(1))
        .find(|(_, unit)| unit.trim_end_matches(',') == "g/mol")
        .and_then(|(n, _)| n.parse().ok())
        .unwrap_or(f64::NAN);
    assert!((m / 180.155 - 1.0).abs() < 0.03, "{said}");
    let effects = cmd(&mut s, Command::Confirm);
    let [
        Effect::SaveOwnIngredient {
            ingredient,
            solutes,
        },
    ] = &effects[..]
    else {
        panic!("{effects:?}");
    };
    assert_eq!(ingredient.id, "breakwater-dextrose");
    assert_eq!(solutes.len(), 1);
    assert_eq!(solutes[0].id, "breakwater-dextrose-solids");
    assert!(solutes[0].source.contains("froze at -1.17 °C"));
    assert!(s.overlay.is_none());
    assert!(s.own.ingredient("breakwater-dextrose").is_some());
    assert!(s.catalog.ingredient("breakwater-dextrose").is_some());
    // It can go into the recipe straight away.
    assert!(s.catalog.solute("breakwater-dextrose-solids").is_some());
}

#[test]
fn the_characterise_form_refuses_with_the_reason_and_stays_open() {
    let mut s = loaded_state();
    cmd(&mut s, Command::ShowIngredients);
    cmd(&mut s, Command::CharacteriseIngredient);
    fill(
        &mut s,
        &["odd-sample", "Odd sample", "10:90:0.5", "100", "1"],
    );
    assert!(summary(&s).contains("not below 0 °C"), "{}", summary(&s));
    assert!(cmd(&mut s, Command::Confirm).is_empty());
    assert!(matches!(s.overlay, Some(Overlay::Form(_))), "kept open");
    // A point that does not read is named on its field.
    fill(&mut s, &["odd-sample", "Odd sample", "10:90", "100", "1"]);
    let Some(Overlay::Form(f)) = &s.overlay else {
        panic!("form expected");
    };
    assert!(
        f.fields[2]
            .problem
            .as_deref()
            .is_some_and(|p| p.contains("SAMPLE_G:WATER_G:TEMP"))
    );
}

#[test]
fn the_characterise_form_reads_temperatures_in_the_display_unit() {
    let mut s = loaded_state();
    s.settings.temp_unit = gelu::model::TempUnit::Fahrenheit;
    cmd(&mut s, Command::ShowIngredients);
    cmd(&mut s, Command::CharacteriseIngredient);
    // -1.17 °C is 29.894 °F, -2.70 °C is 27.14 °F.
    fill(
        &mut s,
        &[
            "quay-glucose",
            "Quay glucose",
            "10:90:29.894 20:80:27.14",
            "100",
            "1",
        ],
    );
    let effects = cmd(&mut s, Command::Confirm);
    assert!(
        matches!(&effects[..], [Effect::SaveOwnIngredient { solutes, .. }]
            if (solutes[0].molar_mass_g_mol / 180.155 - 1.0).abs() < 0.03),
        "{effects:?}"
    );
}

fn row(code: &str) -> BatchRow {
    BatchRow {
        code: code.into(),
        made_at: "2026-12-01 09:00".into(),
        recipe_name: "Tide Mill fior di latte".into(),
        version: 1,
        size_g: 5000.0,
        volume_ml: None,
        operator: "RW".into(),
        status: "draft".into(),
        finalized: false,
        cursor: None,
    }
}

#[test]
fn a_cryoscope_reading_in_hortvet_is_accepted() {
    let mut s = loaded_state();
    s.settings.operator = "RW".into();
    cmd(&mut s, Command::ShowBatches);
    update(
        &mut s,
        Action::BatchDetail(Box::new(BatchDetailView {
            row: row("B-20261201-0001"),
            lines: Vec::new(),
            comparisons: Vec::new(),
            measurements: Vec::new(),
            notes: Vec::new(),
            trail: Vec::new(),
        })),
    );
    cmd(&mut s, Command::AddMeasurement);
    type_text(&mut s, "freezing-point-h");
    cmd(&mut s, Command::Confirm);
    type_text(&mut s, "-0.540");
    let effects = cmd(&mut s, Command::Confirm);
    assert!(
        matches!(&effects[..], [Effect::AddMeasurement { kind, value, .. }]
            if *kind == MeasurementKind::FreezingPointH && (*value + 0.54).abs() < 1e-12),
        "{effects:?}"
    );
}

/// Twelve synthetic freezing-point pairs 0.15 K warm (demo numbers).
fn pairs() -> Vec<Comparison> {
    (0..12)
        .map(|k| Comparison {
            kind: "freezing-point-c".into(),
            predicted: -2.5,
            measured: -2.35 + 0.01 * ((k % 3) as f64 - 1.0),
            batch_code: format!("B-2026120{}-00{k:02}", 1 + k % 3),
            taken_at: Utc.with_ymd_and_hms(2026, 12, 1, 9, k, 0).unwrap(),
            precision: 0.005,
        })
        .collect()
}

/// A compare view of the fior di latte with a freezing-point correction on offer.
pub fn compare_view() -> CompareView {
    let pairs = pairs();
    let scope = Scope::Recipe("Tide Mill fior di latte".into());
    let prior = CalibrationPrior::for_kind("freezing-point-c");
    let preview = prior.ok_or_else(|| "no prior".to_string()).and_then(|p| {
        fit_correction("freezing-point-c", scope.clone(), &pairs, p).map_err(|e| e.to_string())
    });
    let summaries = summarise(&pairs).unwrap_or_default();
    CompareView {
        request: CompareRequest {
            recipe: Some("Tide Mill fior di latte".into()),
            since: None,
            scope: Some(scope),
        },
        kinds: summaries
            .into_iter()
            .map(|summary| KindView {
                summary,
                corrected: None,
                preview: preview.clone(),
                in_force: None,
            })
            .collect(),
        cursor: 0,
    }
}

#[test]
fn the_compare_view_opens_from_the_log_and_asks_before_a_correction() {
    let mut s = loaded_state();
    cmd(&mut s, Command::ShowBatches);
    cmd(&mut s, Command::FilterRecipe);
    let effects = cmd(&mut s, Command::CompareBatches);
    let [Effect::LoadComparison(request)] = &effects[..] else {
        panic!("{effects:?}");
    };
    assert_eq!(request.recipe.as_deref(), Some("Tide Mill fior di latte"));
    assert_eq!(
        request.scope,
        Some(Scope::Recipe("Tide Mill fior di latte".into())),
        "the recipe filtered on is what a correction would be for"
    );
    update(&mut s, Action::ComparisonLoaded(Box::new(compare_view())));
    assert_eq!(s.context(), Context::Compare);
    // Nothing is put in force without a question, and not without an operator.
    cmd(&mut s, Command::Calibrate);
    assert!(
        matches!(&s.overlay, Some(Overlay::Confirm(Question::TurnOnCorrection(k))) if k == "freezing-point-c")
    );
    assert!(cmd(&mut s, Command::Yes).is_empty());
    assert!(
        s.message
            .as_ref()
            .is_some_and(|m| m.text.contains("operator"))
    );
    s.settings.operator = "RW".into();
    cmd(&mut s, Command::Calibrate);
    let effects = cmd(&mut s, Command::Yes);
    let [Effect::TurnOnCorrection { correction, by }] = &effects[..] else {
        panic!("{effects:?}");
    };
    assert_eq!(by, "RW");
    assert_eq!(correction.n, 12);
    assert!(
        (correction.offset - 0.15).abs() < 0.01,
        "{}",
        correction.offset
    );
    // Turned on, the log is asked again.
    let effects = update(
        &mut s,
        Action::CorrectionChanged("Turned on as version 1.".into()),
    );
    assert!(matches!(&effects[..], [Effect::LoadComparison(_)]));
    // Taking out what is not in force says so; with one in force it asks first.
    cmd(&mut s, Command::CalibrationOff);
    assert!(s.overlay.is_none());
    let mut view = compare_view();
    view.kinds[0].in_force = view.kinds[0].preview.clone().ok();
    update(&mut s, Action::ComparisonLoaded(Box::new(view)));
    cmd(&mut s, Command::CalibrationOff);
    let effects = cmd(&mut s, Command::Yes);
    assert!(
        matches!(&effects[..], [Effect::TurnOffCorrection { kind, scope: Scope::Recipe(_), by }]
            if kind == "freezing-point-c" && by == "RW"),
        "{effects:?}"
    );
    cmd(&mut s, Command::Cancel);
    assert!(s.batches.compare.is_none(), "Esc goes back to the list");
    assert_eq!(s.context(), Context::Batches);
}

#[test]
fn without_a_recipe_filter_the_correction_is_for_the_editors_style() {
    let mut s = loaded_state();
    cmd(&mut s, Command::ShowBatches);
    let effects = cmd(&mut s, Command::CompareBatches);
    assert!(
        matches!(&effects[..], [Effect::LoadComparison(r)]
            if r.recipe.is_none() && r.scope == Some(Scope::Style("gelato".into()))),
        "{effects:?}"
    );
}

#[test]
fn the_draw_share_is_a_setting() {
    let mut s = loaded_state();
    open_setting(&mut s, SettingField::DrawShare);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "45");
    let effects = cmd(&mut s, Command::Confirm);
    assert!((s.settings.draw_frozen_fraction - 0.45).abs() < 1e-12);
    assert!(
        matches!(&effects[..], [Effect::SaveSettings(x)] if (x.draw_frozen_fraction - 0.45).abs() < 1e-12)
    );
}

#[test]
fn a_correction_in_force_shows_on_the_recipe_screen_beside_the_plain_prediction() {
    let mut s = loaded_state();
    let plain_fp = match &s.recipe.analysis {
        Ok(a) => a.freezing_point_c.unwrap_or(f64::NAN),
        Err(e) => panic!("{e}"),
    };
    assert!(s.recipe.calibrated.is_empty());
    let scope = Scope::Style("gelato".into());
    let Some(prior) = CalibrationPrior::for_kind("freezing-point-c") else {
        panic!("no prior");
    };
    let correction = match fit_correction("freezing-point-c", scope, &pairs(), prior) {
        Ok(c) => c,
        Err(e) => panic!("{e}"),
    };
    let mut settings = s.settings.clone();
    settings.corrections = vec![correction.clone()];
    update(&mut s, Action::SettingsLoaded(settings));
    let [fp] = &s.recipe.calibrated[..] else {
        panic!("{:?}", s.recipe.calibrated);
    };
    assert_eq!(fp.kind, "freezing-point-c");
    assert!((fp.predicted - plain_fp).abs() < 1e-12);
    assert!((fp.value - (plain_fp + correction.offset)).abs() < 1e-12);
    // The plain prediction is untouched; the calibrated one is marked, with its basis.
    assert_eq!(
        s.recipe
            .analysis
            .as_ref()
            .ok()
            .and_then(|a| a.freezing_point_c),
        Some(plain_fp)
    );
    let screen = crate::common::draw(&s, 120, 40);
    let shown = format!("{:.1} °C", plain_fp + correction.offset);
    assert!(screen.contains("calibrated"), "{screen}");
    assert!(screen.contains(&shown), "{shown}\n{screen}");
    assert!(screen.contains("12 batches"), "{screen}");
}

#[test]
fn how_finely_freezing_points_are_read_is_a_setting() {
    // A kitchen with a probe thermometer (about 0.3 K) rather than a cryoscope.
    let mut s = loaded_state();
    assert_eq!(s.settings.freezing_point_precision_k, None);
    open_setting(&mut s, SettingField::FreezingPointPrecision);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "0");
    cmd(&mut s, Command::Confirm);
    assert!(
        matches!(&s.overlay, Some(Overlay::Prompt(p)) if p.error.as_deref().is_some_and(|e| e.contains("above 0 K"))),
        "{:?}",
        s.overlay
    );
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "0.3");
    let effects = cmd(&mut s, Command::Confirm);
    assert_eq!(s.settings.freezing_point_precision_k, Some(0.3));
    assert!(
        matches!(&effects[..], [Effect::SaveSettings(x)] if x.freezing_point_precision_k == Some(0.3))
    );
    open_setting(&mut s, SettingField::FreezingPointPrecision);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "usual");
    cmd(&mut s, Command::Confirm);
    assert_eq!(s.settings.freezing_point_precision_k, None);
}

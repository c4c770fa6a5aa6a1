//! Between the store's records and the workspace's state: settings as
//! key-value pairs, the user's own items as TOML definitions, and batch
//! records as the rows and details the batch log draws.

use crate::batch::BatchFilter;
use crate::batch::compare::{Setting, comparisons, fit_for, scope_batches, with_corrections};
use crate::batch::{Batch, BatchSummary};
use crate::measure::{CalibrationError, DRAW_FROZEN_FRACTION_SETTING, summarise};
use crate::model::time::{DayEnd, parse_date_bound};
use crate::model::{Ingredient, Solute};
use crate::recipe_file::{own_item_definition, own_items_in};
use crate::store::{CustomItem, SYNC_URL_KEY, Store, scope_words};

use super::super::state::{
    BatchDetailView, BatchRow, CompareRequest, CompareView, KindView, MeasurementRow, OwnLibrary,
    Settings, TrailRow,
};
use crate::model::{MassUnit, TempUnit};
use crate::report::inert::inert;

const KEY_TEMP: &str = "workspace.temp_unit";
const KEY_MASS: &str = "workspace.mass_unit";
const KEY_SERVING: &str = "workspace.serving_target";
const KEY_CABINET: &str = crate::store::CABINET_TEMP_KEY;
const KEY_FREEZER: &str = crate::store::FREEZER_TEMP_KEY;
const KEY_OPERATOR: &str = "workspace.operator";
/// Prices per kg by ingredient id, as one JSON object (`{"sucrose":1.15}`).
const KEY_PRICES: &str = "workspace.prices_per_kg";

/// The settings as (key, value) pairs for the database.
pub fn settings_pairs(s: &Settings) -> Vec<(&'static str, String)> {
    vec![
        (
            KEY_TEMP,
            match s.temp_unit {
                TempUnit::Celsius => "c".into(),
                TempUnit::Fahrenheit => "f".into(),
            },
        ),
        (
            KEY_MASS,
            match s.mass_unit {
                MassUnit::Grams => "g".into(),
                MassUnit::Imperial => "oz".into(),
            },
        ),
        (KEY_SERVING, s.serving_frozen_fraction.to_string()),
        (KEY_CABINET, s.cabinet_temp_c.to_string()),
        (KEY_FREEZER, s.freezer_temp_c.to_string()),
        (
            DRAW_FROZEN_FRACTION_SETTING,
            s.draw_frozen_fraction.to_string(),
        ),
        (
            crate::measure::FREEZING_POINT_PRECISION_SETTING,
            s.freezing_point_precision_k
                .map_or_else(String::new, |p| p.to_string()),
        ),
        (KEY_OPERATOR, s.operator.clone()),
        (SYNC_URL_KEY, s.sync_url.clone()),
        (
            KEY_PRICES,
            serde_json::to_string(&s.prices_per_kg).unwrap_or_else(|_| "{}".into()),
        ),
    ]
}

/// The settings stored in the database; defaults for any not stored or not readable.
pub fn load_settings(store: &Store) -> Settings {
    let mut s = Settings::default();
    let get = |key: &str| store.get_setting(key).ok().flatten();
    if let Some(v) = get(KEY_TEMP) {
        s.temp_unit = if v == "f" {
            TempUnit::Fahrenheit
        } else {
            TempUnit::Celsius
        };
    }
    if let Some(v) = get(KEY_MASS) {
        s.mass_unit = if v == "oz" {
            MassUnit::Imperial
        } else {
            MassUnit::Grams
        };
    }
    let number = |key: &str, ok: fn(f64) -> bool| {
        get(key)
            .and_then(|v| v.parse::<f64>().ok())
            .filter(|x| ok(*x))
    };
    if let Some(x) = number(KEY_SERVING, |x| x > 0.0 && x < 1.0) {
        s.serving_frozen_fraction = x;
    }
    if let Some(x) = number(KEY_CABINET, |x| (-60.0..=0.0).contains(&x)) {
        s.cabinet_temp_c = x;
    }
    if let Some(x) = number(KEY_FREEZER, |x| (-60.0..=0.0).contains(&x)) {
        s.freezer_temp_c = x;
    }
    if let Some(v) = get(KEY_OPERATOR) {
        s.operator = v;
    }
    if let Ok(share) = store.draw_frozen_fraction() {
        s.draw_frozen_fraction = share;
    }
    s.freezing_point_precision_k = crate::measure::precision_from_setting(
        get(crate::measure::FREEZING_POINT_PRECISION_SETTING).as_deref(),
    );
    if let Ok(corrections) = store.corrections_in_force() {
        s.corrections = corrections;
    }
    if let Some(v) = get(SYNC_URL_KEY) {
        s.sync_url = v;
    }
    s.site_code = store.site_code().unwrap_or_default();
    if let Some(v) = get(KEY_PRICES)
        && let Ok(prices) = serde_json::from_str::<std::collections::BTreeMap<String, f64>>(&v)
    {
        s.prices_per_kg = prices
            .into_iter()
            .filter(|(_, p)| *p >= 0.0 && p.is_finite())
            .collect();
    }
    s
}

/// Predicted against measured over the batches `request` asks for, with the
/// correction each kind would get for its scope and the one in force.
pub fn compare_view(store: &Store, request: CompareRequest) -> anyhow::Result<CompareView> {
    let log = store.log_setting()?;
    let since = request
        .since
        .as_deref()
        .map(|day| parse_date_bound(day, DayEnd::Start))
        .transpose()
        .map_err(anyhow::Error::msg)?;
    let shown = BatchFilter {
        recipe: request.recipe.clone(),
        since,
        ..BatchFilter::default()
    };
    let pairs = store.measured_pairs(&shown, None, None, &log.setting())?;
    let plain: Vec<_> = pairs.iter().map(|(c, _)| c.clone()).collect();
    let summaries = summarise(&plain)?;
    let scope_pairs = match &request.scope {
        Some(scope) => {
            let (recipe, style) = scope_batches(scope);
            let filter = BatchFilter {
                recipe,
                since,
                ..BatchFilter::default()
            };
            store.measured_pairs(&filter, style, None, &log.setting())?
        }
        None => Vec::new(),
    };
    let kinds = summaries
        .into_iter()
        .map(|summary| {
            let preview = match &request.scope {
                Some(scope) => fit_for(&summary.kind, scope, &scope_pairs).map_err(|e| match e {
                    // Say which batches were looked at: the scope is the recipe the
                    // list shows, else the style of the recipe in the editor.
                    CalibrationError::NoBatches { kind } => format!(
                        "no batch of {} has a measured {kind} (a correction here is for the \
                         recipe the list is filtered on, else for the style of the recipe in \
                         the editor)",
                        scope_words(scope)
                    ),
                    other => other.to_string(),
                }),
                None => Err("no recipe or style to calibrate for".to_string()),
            };
            let in_force = log
                .corrections
                .iter()
                .find(|c| c.kind == summary.kind && Some(&c.scope) == request.scope.as_ref())
                .cloned();
            KindView {
                corrected: with_corrections(&pairs, &summary.kind),
                preview,
                in_force,
                summary,
            }
        })
        .collect();
    Ok(CompareView {
        request,
        kinds,
        cursor: 0,
    })
}

/// An own solute or ingredient as stored: a small recipe file holding it (and
/// the own solutes it uses).
pub fn own_item(
    id: &str,
    name: &str,
    solutes: Vec<Solute>,
    ingredients: Vec<Ingredient>,
) -> CustomItem {
    CustomItem {
        id: id.to_string(),
        name: name.to_string(),
        definition: own_item_definition(name, &solutes, &ingredients),
    }
}

/// The user's own solutes and ingredients stored in the database.
pub fn load_own_library(store: &Store) -> anyhow::Result<OwnLibrary> {
    own_items_in(store)
}

fn minute(t: &chrono::DateTime<chrono::Utc>) -> String {
    t.format("%Y-%m-%d %H:%M").to_string()
}

/// A row of the batch log.
pub fn row(b: &BatchSummary) -> BatchRow {
    BatchRow {
        code: b.code.clone(),
        made_at: minute(&b.made_at),
        recipe_name: b.recipe.clone(),
        version: b.recipe_version,
        size_g: b.size_g,
        volume_ml: b.drink_volume_ml,
        operator: b.operator.clone(),
        status: b.status.as_str().to_string(),
        finalized: b.status != crate::batch::Status::Draft,
        cursor: Some(b.cursor.clone()),
    }
}

/// One batch in full, with predicted against measured figures (`setting`: the
/// draw share and corrections in force), every reading and note (struck ones
/// marked) and the amendment trail; text from the record inert.
pub fn detail(b: &Batch, setting: &Setting<'_>) -> BatchDetailView {
    let comparisons = comparisons(b, setting);
    let shown = |t: &str| inert(t).into_owned();
    let notes: Vec<(String, String, String)> = b
        .notes
        .iter()
        .map(|n| {
            let text = if n.struck {
                format!("(struck out) {}", shown(&n.text))
            } else {
                shown(&n.text)
            };
            (minute(&n.written_at), shown(&n.by), text)
        })
        .collect();
    let trail = b
        .amendments
        .iter()
        .map(|a| TrailRow {
            at: minute(&a.amended_at),
            by: shown(&a.by),
            reason: shown(&a.reason),
            changes: a.changes.iter().map(|c| shown(&c.to_string())).collect(),
        })
        .collect();
    BatchDetailView {
        row: BatchRow {
            code: b.code.clone(),
            made_at: minute(&b.made_at),
            recipe_name: b.recipe.recipe.clone(),
            version: b.recipe.version,
            size_g: b.size_g,
            volume_ml: crate::batch::compare::drink_volume_ml(b),
            operator: b.operator.clone(),
            status: b.status.as_str().to_string(),
            finalized: b.status != crate::batch::Status::Draft,
            cursor: None,
        },
        lines: b
            .lines
            .iter()
            .map(|l| (l.ingredient.clone(), l.planned_g, l.lot.clone()))
            .collect(),
        comparisons,
        measurements: b
            .measurements
            .iter()
            .map(|m| MeasurementRow {
                at: minute(&m.taken_at),
                kind: m.kind,
                value: m.value,
                by: shown(&m.by),
                struck: m.struck,
            })
            .collect(),
        notes,
        trail,
    }
}

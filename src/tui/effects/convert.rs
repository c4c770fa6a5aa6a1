//! Between the store's records and the workspace's state: settings as
//! key-value pairs, the user's own items as TOML definitions, and batch
//! records as the rows and details the batch log draws.

use std::path::Path;

use crate::batch::compare::comparisons;
use crate::batch::{Batch, BatchSummary};
use crate::model::{Amount, Ingredient, Line, Recipe, Solute};
use crate::recipe_file::{parse_recipe, recipe_to_toml};
use crate::store::{CustomItem, Store};

use super::super::state::{
    BatchDetailView, BatchRow, MeasurementRow, OwnLibrary, Settings, TrailRow,
};
use crate::model::{MassUnit, TempUnit};
use crate::report::inert::inert;

const KEY_TEMP: &str = "workspace.temp_unit";
const KEY_MASS: &str = "workspace.mass_unit";
const KEY_SERVING: &str = "workspace.serving_frozen_fraction";
const KEY_CABINET: &str = "workspace.cabinet_temp_c";
const KEY_FREEZER: &str = "workspace.freezer_temp_c";
const KEY_OPERATOR: &str = "workspace.operator";

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
        (KEY_OPERATOR, s.operator.clone()),
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
    s
}

/// An own solute or ingredient as stored: a small recipe file holding it (and
/// the own solutes it uses), with one line of water so it reads as a recipe.
pub fn own_item(
    id: &str,
    name: &str,
    solutes: Vec<Solute>,
    ingredients: Vec<Ingredient>,
) -> CustomItem {
    let holder = Recipe {
        name: name.to_string(),
        solutes,
        ingredients,
        lines: vec![Line {
            ingredient: "water".into(),
            amount: Amount::Grams(1.0),
        }],
        ..Recipe::default()
    };
    CustomItem {
        id: id.to_string(),
        name: name.to_string(),
        definition: recipe_to_toml(&holder),
    }
}

/// The user's own solutes and ingredients stored in the database.
pub fn load_own_library(store: &Store) -> anyhow::Result<OwnLibrary> {
    let mut own = OwnLibrary::default();
    for item in store.custom_solutes()? {
        let holder = parse_recipe(Path::new(&item.id), &item.definition)
            .map_err(|e| anyhow::anyhow!("{e}"))?;
        own.solutes
            .extend(holder.solutes.into_iter().filter(|s| s.id == item.id));
    }
    for item in store.custom_ingredients()? {
        let holder = parse_recipe(Path::new(&item.id), &item.definition)
            .map_err(|e| anyhow::anyhow!("{e}"))?;
        for s in holder.solutes {
            if !own.solutes.iter().any(|o| o.id == s.id) {
                own.solutes.push(s);
            }
        }
        own.ingredients
            .extend(holder.ingredients.into_iter().filter(|i| i.id == item.id));
    }
    Ok(own)
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
        operator: b.operator.clone(),
        status: b.status.as_str().to_string(),
        finalized: b.status != crate::batch::Status::Draft,
        cursor: Some(b.cursor.clone()),
    }
}

/// One batch in full, with predicted against measured figures, every reading and
/// note (struck ones marked) and the amendment trail; text from the record inert.
pub fn detail(b: &Batch) -> BatchDetailView {
    let comparisons = comparisons(b);
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

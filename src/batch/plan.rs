//! Planning a batch: a recipe scaled to the batch size (by mass, or by volume for
//! liqueurs through the analysis' volume), its lines with planned masses and lots,
//! and the prediction (the analysis of the scaled recipe), ready for the store.

use chrono::{DateTime, Utc};

use super::Invalid;
use super::amend::{LineRef, resolve_lines};
use super::types::{BatchLine, NewBatch};
use crate::analysis::{Options, analyze};
use crate::catalog::Catalog;
use crate::measure::{DEFAULT_DRAW_FROZEN_FRACTION, Predictions, predict};
use crate::model::units::parse_amount;
use crate::model::{Amount, MassUnit, Recipe};
use crate::report::json::analysis_json;

type Result<T> = std::result::Result<T, Invalid>;

/// Reads a batch size as people write it: a number and a unit, by mass (`5kg`,
/// `800 g`, `10 lb`) or by volume (`1.5L`, `750mL`, `5 gallons`); above zero. A
/// bare number is in `bare` (g or oz) when given; with `None` a unit is required.
pub fn parse_size(text: &str, bare: Option<MassUnit>) -> Result<Amount> {
    match parse_amount(text, bare).map_err(Invalid)? {
        Amount::Grams(v) | Amount::Millilitres(v) if v <= 0.0 => Err(Invalid(format!(
            "`{}`: a batch size must be above zero",
            text.trim()
        ))),
        size => Ok(size),
    }
}

/// Everything about a batch before it is recorded.
#[derive(Debug, Clone)]
pub struct Plan<'a> {
    /// The parsed recipe.
    pub recipe: &'a Recipe,
    /// The recipe file's text, saved as the recipe version.
    pub recipe_text: &'a str,
    /// The size to scale to: a mass, or a volume at 20 °C.
    pub size: Amount,
    /// Who makes it.
    pub operator: &'a str,
    /// Supplier lots: (the line or lines, lot).
    pub lots: &'a [(LineRef, String)],
    /// A first note.
    pub note: Option<&'a str>,
    /// When it is made.
    pub made_at: DateTime<Utc>,
}

fn analysis_error(e: impl std::fmt::Display) -> Invalid {
    Invalid(format!("the recipe could not be analysed: {e}"))
}

/// Scales the recipe, analyses it (against `catalog`, with `options`), and
/// builds the new batch, with the draw temperature predicted at the default
/// draw share ([`DEFAULT_DRAW_FROZEN_FRACTION`]).
pub fn plan_batch(plan: &Plan<'_>, catalog: &Catalog, options: &Options) -> Result<NewBatch> {
    plan_batch_drawn(plan, catalog, options, DEFAULT_DRAW_FROZEN_FRACTION)
}

/// As [`plan_batch`], with the draw temperature predicted at
/// `draw_frozen_fraction` (0..1) of the water frozen. The prediction recorded
/// is the analysis' public JSON plus what the measurement loop predicts beside
/// it: `brix` (what a refractometer reads; null with `brix_refused` saying why),
/// `draw_temp_c` and `draw_frozen_fraction`.
pub fn plan_batch_drawn(
    plan: &Plan<'_>,
    catalog: &Catalog,
    options: &Options,
    draw_frozen_fraction: f64,
) -> Result<NewBatch> {
    let base = analyze(plan.recipe, catalog, options).map_err(analysis_error)?;
    let factor = match plan.size {
        Amount::Grams(g) => g / base.mass_g,
        Amount::Millilitres(ml) => ml / base.volume_ml,
    };
    if !factor.is_finite() || factor <= 0.0 {
        return Err(Invalid(format!(
            "`{}` has no mass or volume to scale",
            plan.recipe.name
        )));
    }
    let scaled = plan.recipe.scaled(factor);
    let analysis = analyze(&scaled, catalog, options).map_err(analysis_error)?;
    let mut lines: Vec<BatchLine> = scaled
        .lines
        .iter()
        .zip(&analysis.line_mass_g)
        .map(|(line, &g)| BatchLine {
            ingredient: line.ingredient.clone(),
            planned_g: g,
            actual_g: None,
            lot: String::new(),
        })
        .collect();
    for (key, lot) in plan.lots {
        for i in resolve_lines(&lines, key)? {
            lines[i].lot = lot.clone();
        }
    }
    let size_g = match plan.size {
        Amount::Grams(g) => g,
        Amount::Millilitres(_) => analysis.mass_g,
    };
    Ok(NewBatch {
        recipe: plan.recipe.name.clone(),
        recipe_text: plan.recipe_text.to_owned(),
        made_at: plan.made_at,
        size_g,
        operator: plan.operator.to_owned(),
        lines,
        note: plan.note.map(str::to_owned),
        prediction: with_loop_predictions(
            analysis_json(&analysis),
            &predict(&scaled, catalog, draw_frozen_fraction).map_err(analysis_error)?,
        ),
    })
}

/// The analysis JSON with the measurement loop's predictions added (its keys untouched).
fn with_loop_predictions(mut json: serde_json::Value, p: &Predictions) -> serde_json::Value {
    let round = |x: f64| (x * 1000.0).round() / 1000.0;
    if let Some(object) = json.as_object_mut() {
        object.insert("brix".into(), p.brix.map(round).into());
        object.insert("brix_refused".into(), p.brix_refused.clone().into());
        object.insert("draw_temp_c".into(), p.draw_temp_c.map(round).into());
        object.insert("draw_frozen_fraction".into(), p.draw_frozen_fraction.into());
    }
    json
}

#[cfg(test)]
mod tests {
    use super::parse_size;
    use crate::model::{Amount, MassUnit};

    #[test]
    fn sizes_read_with_units() {
        assert_eq!(parse_size("5kg", None), Ok(Amount::Grams(5000.0)));
        assert_eq!(parse_size("800 g", None), Ok(Amount::Grams(800.0)));
        assert_eq!(parse_size("1.5L", None), Ok(Amount::Millilitres(1500.0)));
        assert_eq!(parse_size("750mL", None), Ok(Amount::Millilitres(750.0)));
        assert!(parse_size("5 stone", None).is_err());
        assert!(parse_size("-2kg", None).is_err());
        assert!(parse_size("0 kg", None).is_err());
        assert!(parse_size("kg", None).is_err());
        assert!(parse_size("5", None).is_err(), "a size needs a unit");
        assert_eq!(
            parse_size("5", Some(MassUnit::Grams)),
            Ok(Amount::Grams(5.0))
        );
    }
}

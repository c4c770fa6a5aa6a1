//! The predicted draw temperature: the temperature at which a mix leaves the
//! freezer with a given share of its water frozen.

use crate::analysis::{AnalysisError, Options, analyze};
use crate::catalog::Catalog;
use crate::model::Recipe;

/// Share of the water frozen at draw (0..1): about half the water is frozen as
/// the mix leaves the freezer (McGee, On Food and Cooking; PRACTICE.md).
pub const DEFAULT_DRAW_FROZEN_FRACTION: f64 = 0.5;

/// Where the default draw share comes from, for reports.
pub const DRAW_FROZEN_FRACTION_SOURCE: &str =
    "about half the water is frozen at draw (McGee, On Food and Cooking)";

/// The batch log's setting that holds the share of water frozen at draw (0..1)
/// a kitchen's freezer draws at.
pub const DRAW_FROZEN_FRACTION_SETTING: &str = "measure.draw_frozen_fraction";

/// The draw share a stored setting gives: the value when it is a share above 0
/// and below 1, else [`DEFAULT_DRAW_FROZEN_FRACTION`].
pub fn draw_frozen_fraction_from_setting(value: Option<&str>) -> f64 {
    value
        .and_then(|v| v.trim().parse::<f64>().ok())
        .filter(|x| *x > 0.0 && *x < 1.0)
        .unwrap_or(DEFAULT_DRAW_FROZEN_FRACTION)
}

/// The temperature (°C) at which `frozen_fraction` (0..1) of the recipe's water
/// is frozen; `None` when the mix never freezes that far above −60 °C, and for
/// liqueurs and spirits, which are not drawn from an ice-cream freezer.
/// Uses the same freezing curve as the serving temperature.
pub fn predicted_draw_temp_c(
    recipe: &Recipe,
    catalog: &Catalog,
    frozen_fraction: f64,
) -> Result<Option<f64>, AnalysisError> {
    if recipe.style.is_drink() || !(frozen_fraction > 0.0 && frozen_fraction < 1.0) {
        return Ok(None);
    }
    let options = Options {
        serving_frozen_fraction: Some(frozen_fraction),
        ..Options::default()
    };
    Ok(analyze(recipe, catalog, &options)?.serving_temp_c)
}

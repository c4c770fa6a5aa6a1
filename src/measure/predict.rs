//! Every prediction a logged measurement can be set against, for one recipe
//! (scaled to the batch), by the log's kind names.

use serde::Serialize;

use crate::analysis::{AnalysisError, Options, analyze};
use crate::catalog::Catalog;
use crate::model::Recipe;

use super::draw::predicted_draw_temp_c;
use super::refractometer::predict_brix;

/// The predicted values of one recipe.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Predictions {
    /// Initial freezing point (°C).
    pub freezing_point_c: Option<f64>,
    /// Alcoholic strength (% vol at 20 °C).
    pub abv_pct: f64,
    /// Refractometer reading (°Brix); `None` when refused (see `brix_refused`).
    pub brix: Option<f64>,
    /// Why no Brix is predicted, in plain words.
    pub brix_refused: Option<String>,
    /// Draw temperature (°C) at `draw_frozen_fraction`.
    pub draw_temp_c: Option<f64>,
    /// Share of water frozen at draw used (0..1).
    pub draw_frozen_fraction: f64,
    /// Serving temperature (°C) at the recipe's serving share.
    pub serving_temp_c: Option<f64>,
    /// Mass of the batch (g).
    pub mass_g: f64,
}

impl Predictions {
    /// The prediction for a kind name of the batch log, if gelu predicts it here.
    pub fn for_kind(&self, kind: &str) -> Option<f64> {
        match kind {
            "freezing-point-c" => self.freezing_point_c,
            "abv-pct" => Some(self.abv_pct),
            "brix" => self.brix,
            "draw-temp-c" => self.draw_temp_c,
            "serving-temp-c" => self.serving_temp_c,
            "mass-g" => Some(self.mass_g),
            _ => None,
        }
    }
}

/// Predicts everything for `recipe` (its own solutes and ingredients layered over `catalog`).
pub fn predict(
    recipe: &Recipe,
    catalog: &Catalog,
    draw_frozen_fraction: f64,
) -> Result<Predictions, AnalysisError> {
    let analysis = analyze(recipe, catalog, &Options::default())?;
    let extended;
    let lookup = if recipe.solutes.is_empty() && recipe.ingredients.is_empty() {
        catalog
    } else {
        extended = catalog.with_additions(&recipe.solutes, &recipe.ingredients)?;
        &extended
    };
    let (brix, brix_refused) = match predict_brix(&analysis, lookup) {
        Ok(b) => (Some(b.brix), None),
        Err(e) => (None, Some(e.to_string())),
    };
    Ok(Predictions {
        freezing_point_c: analysis.freezing_point_c,
        abv_pct: analysis.abv_pct,
        brix,
        brix_refused,
        draw_temp_c: predicted_draw_temp_c(recipe, catalog, draw_frozen_fraction)?,
        draw_frozen_fraction,
        serving_temp_c: analysis.serving_temp_c,
        mass_g: analysis.mass_g,
    })
}

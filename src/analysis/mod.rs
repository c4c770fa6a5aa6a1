//! Recipe + catalog -> Mix -> Analysis: every figure the user sees, computed
//! purely and cheaply enough to redo on every keystroke.

mod classic;
mod freezer;
mod mix;
mod targets;
mod warnings;

use std::collections::BTreeMap;

use serde::Serialize;

use crate::catalog::{Catalog, CatalogError, suggest_text};
use crate::model::{Recipe, SoluteKind, Style, TempUnit};

pub use freezer::{FROZEN_FROZEN_FRACTION, FreezerBehaviour, SLUSH_FROZEN_FRACTION};
pub use mix::Mix;
pub use targets::{StyleTargets, targets_for};
pub use warnings::{Severity, Warning};

/// Default share of water frozen at serving (0..1): 65-70 % is scoopable (Mullan).
pub const DEFAULT_SERVING_FROZEN_FRACTION: f64 = 0.70;
/// Default display-cabinet temperature (°C): dipping cabinets run -12 to -14 °C (common practice).
pub const DEFAULT_CABINET_TEMP_C: f64 = -13.0;
/// Default freezer temperature (°C): home and retail freezers, 0 °F.
pub const DEFAULT_FREEZER_TEMP_C: f64 = -18.0;
/// Coldest temperature of the reported curve (°C).
pub const CURVE_MIN_C: f64 = -40.0;
/// Step of the reported curve (K).
pub const CURVE_STEP_K: f64 = 0.5;

/// Why a recipe cannot be analysed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum AnalysisError {
    /// A line names an ingredient nobody knows.
    #[error("line {line}: unknown ingredient `{id}`{}", suggest_text(.suggestions))]
    UnknownIngredient {
        /// 1-based line number in the recipe.
        line: usize,
        /// The unknown id.
        id: String,
        /// The nearest known ids.
        suggestions: Vec<String>,
    },
    /// A line names a spirit by a strength that cannot be (out of range, wrong unit).
    #[error(
        "line {line}: `{id}` is not a spirit gelu can make: {why} (did you mean `{suggestion}`?)"
    )]
    BadSpirit {
        /// 1-based line number in the recipe.
        line: usize,
        /// The id as written.
        id: String,
        /// What is wrong with it.
        why: String,
        /// The nearest spirit id that resolves.
        suggestion: String,
    },
    /// An ingredient names a solute nobody knows.
    #[error("ingredient `{ingredient}` contains the unknown solute `{id}`")]
    UnknownSolute {
        /// The ingredient.
        ingredient: String,
        /// The unknown solute id.
        id: String,
    },
    /// An amount is negative or not a number.
    #[error("line {line}: the amount must be zero or more grams, not {grams}")]
    BadAmount {
        /// 1-based line number.
        line: usize,
        /// The mass it came to (g).
        grams: f64,
    },
    /// The recipe weighs nothing.
    #[error("the recipe has no lines with a mass above zero")]
    NoMass,
    /// A user's solute or ingredient is invalid.
    #[error(transparent)]
    Catalog(#[from] CatalogError),
}

/// What to compute beyond the recipe itself.
#[derive(Debug, Clone, PartialEq)]
pub struct Options {
    /// Overrides the recipe's serving target (share of water frozen, 0..1).
    pub serving_frozen_fraction: Option<f64>,
    /// Extra temperatures (°C) at which to report the frozen share.
    pub at_temps_c: Vec<f64>,
    /// Display-cabinet temperature (°C) for recipes that set none (the settings').
    pub cabinet_temp_c: f64,
    /// Freezer temperature (°C) for recipes that set none (the settings').
    pub freezer_temp_c: f64,
    /// A cabinet temperature (°C) asked for explicitly (a command-line flag): it
    /// wins over the recipe's own.
    pub cabinet_override_c: Option<f64>,
    /// A freezer temperature (°C) asked for explicitly: it wins over the recipe's own.
    pub freezer_override_c: Option<f64>,
    /// The unit temperatures are written in inside warning messages.
    pub temp_unit: TempUnit,
}

impl Options {
    /// The cabinet temperature (°C) for `recipe`: an explicit one, else the
    /// recipe's own, else the settings'.
    pub fn cabinet_for(&self, recipe: &Recipe) -> f64 {
        self.cabinet_override_c
            .or(recipe.cabinet_temp_c)
            .unwrap_or(self.cabinet_temp_c)
    }

    /// The freezer temperature (°C) for `recipe`, by the same rule.
    pub fn freezer_for(&self, recipe: &Recipe) -> f64 {
        self.freezer_override_c
            .or(recipe.freezer_temp_c)
            .unwrap_or(self.freezer_temp_c)
    }
}

impl Default for Options {
    fn default() -> Self {
        Options {
            serving_frozen_fraction: None,
            at_temps_c: Vec::new(),
            cabinet_temp_c: DEFAULT_CABINET_TEMP_C,
            freezer_temp_c: DEFAULT_FREEZER_TEMP_C,
            cabinet_override_c: None,
            freezer_override_c: None,
            temp_unit: TempUnit::Celsius,
        }
    }
}

/// Composition in mass % of the mix.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Default)]
pub struct Composition {
    /// Water.
    pub water_pct: f64,
    /// Fat.
    pub fat_pct: f64,
    /// Protein.
    pub protein_pct: f64,
    /// Milk solids-not-fat (protein, lactose and minerals of dairy ingredients).
    pub msnf_pct: f64,
    /// Lactose.
    pub lactose_pct: f64,
    /// Mono- and disaccharides (lactose included).
    pub sugars_pct: f64,
    /// Everything but water and ethanol.
    pub total_solids_pct: f64,
    /// Ethanol.
    pub ethanol_pct: f64,
    /// Insoluble or non-osmotic solids.
    pub other_solids_pct: f64,
}

/// One point of a freezing curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CurvePoint {
    /// Temperature (°C).
    pub temp_c: f64,
    /// Share of the mix's water that is ice (0..1).
    pub frozen_fraction: f64,
}

/// Every figure gelu reports for a recipe.
#[derive(Debug, Clone, PartialEq)]
pub struct Analysis {
    /// Recipe name.
    pub name: String,
    /// Recipe style.
    pub style: Style,
    /// Total mass (g).
    pub mass_g: f64,
    /// Estimated volume at 20 °C (mL).
    pub volume_ml: f64,
    /// Mass of each line (g), in recipe order.
    pub line_mass_g: Vec<f64>,
    /// Composition (mass %).
    pub composition: Composition,
    /// Each dissolved solute (mass % of the mix).
    pub solutes_pct: BTreeMap<String, f64>,
    /// Sweeteners other than lactose: sugars, oligosaccharides and polyols (mass %).
    pub sweeteners_pct: f64,
    /// Sugars and other sweeteners per litre (g/L), as the liqueur rules count them.
    pub sugar_g_per_l: f64,
    /// Alcoholic strength (% vol at 20 °C).
    pub abv_pct: f64,
    /// Sweetness as grams of sucrose per 100 g of mix that would taste as sweet.
    pub sweetness: f64,
    /// Initial freezing point (°C); `None` without water or below -60 °C.
    pub freezing_point_c: Option<f64>,
    /// Dilute-law (van 't Hoff) estimate of the freezing point (°C).
    pub dilute_law_freezing_point_c: Option<f64>,
    /// Share of water frozen at serving that the serving temperature is found for (0..1).
    pub serving_frozen_fraction: f64,
    /// Temperature at which `serving_frozen_fraction` of the water is frozen (°C).
    pub serving_temp_c: Option<f64>,
    /// Frozen share from 0 to -40 °C every 0.5 K.
    pub ice_curve: Vec<CurvePoint>,
    /// Frozen share at each requested temperature.
    pub at: Vec<CurvePoint>,
    /// Frozen share at the cabinet temperature.
    pub cabinet: CurvePoint,
    /// Frozen share at the freezer temperature.
    pub freezer: CurvePoint,
    /// What the freezer does to it, in a distiller's words (from `freezer`).
    pub freezer_behaviour: FreezerBehaviour,
    /// Temperature at which freezing stops at maximal freeze concentration (°C), if above -60 °C.
    pub glass_limit_temp_c: Option<f64>,
    /// Warmest temperature (°C) of the curve below which solutes holding most of the
    /// unfrozen water are past their measured data; `None` if that never happens above -40 °C.
    pub data_limit_temp_c: Option<f64>,
    /// The classic sucrose-equivalent estimate of the freezing point (°C), for comparison.
    pub classic_freezing_point_c: Option<f64>,
    /// Whether the classic method applies to this recipe (a frozen dairy-style
    /// dessert without an excess of alcohol or salt, in the range of its table).
    pub classic_applies: bool,
    /// Why the classic method does not apply, in words; `None` where it does.
    pub classic_note: Option<String>,
    /// Allergens present.
    pub allergens: Vec<String>,
    /// Warnings, most serious first.
    pub warnings: Vec<Warning>,
    /// Cautions on safe practice.
    pub cautions: Vec<String>,
}

/// Analyses a recipe: its own solutes and ingredients are layered over `catalog`.
pub fn analyze(
    recipe: &Recipe,
    catalog: &Catalog,
    options: &Options,
) -> Result<Analysis, AnalysisError> {
    if recipe.solutes.is_empty() && recipe.ingredients.is_empty() {
        analyze_with(recipe, catalog, options)
    } else {
        let extended = catalog.with_additions(&recipe.solutes, &recipe.ingredients)?;
        analyze_with(recipe, &extended, options)
    }
}

fn pct(part_g: f64, total_g: f64) -> f64 {
    100.0 * part_g / total_g
}

fn analyze_with(
    recipe: &Recipe,
    catalog: &Catalog,
    options: &Options,
) -> Result<Analysis, AnalysisError> {
    let mix = Mix::from_recipe(recipe, catalog)?;
    let serum = mix.serum();
    let total = mix.mass_g;
    let lactose_g = mix.solute_g("lactose");
    let ethanol_g = mix.solute_g("ethanol");
    let sugars_g = mix.kind_g(&[SoluteKind::Sugar]);
    let sweeteners_g = mix.kind_g(&[
        SoluteKind::Sugar,
        SoluteKind::Oligosaccharide,
        SoluteKind::Polyol,
    ]) - lactose_g;
    let all_solutes_g: f64 = mix.solutes.values().map(|s| s.1).sum();
    let composition = Composition {
        water_pct: pct(mix.water_g, total),
        fat_pct: pct(mix.fat_g, total),
        protein_pct: pct(mix.protein_g, total),
        msnf_pct: pct(mix.msnf_g, total),
        lactose_pct: pct(lactose_g, total),
        sugars_pct: pct(sugars_g, total),
        total_solids_pct: pct(total - mix.water_g - ethanol_g, total),
        ethanol_pct: pct(ethanol_g, total),
        other_solids_pct: pct(mix.other_solids_g, total),
    };
    // Mass balance: a composition may add to 100 within the catalog's tolerance.
    debug_assert!(
        (mix.water_g + mix.fat_g + mix.protein_g + mix.other_solids_g + all_solutes_g - total)
            .abs()
            <= (crate::catalog::COMPOSITION_TOLERANCE_PCT / 100.0 + 1e-9) * total.max(1.0)
    );
    let solutes_pct = mix
        .solutes
        .iter()
        .map(|(id, (_, g))| (id.clone(), pct(*g, total)))
        .collect();
    let sweetness = mix
        .solutes
        .values()
        .map(|(e, g)| g * e.solute.sweetness.unwrap_or(0.0) / 100.0)
        .sum::<f64>()
        * 100.0
        / total;
    let volume_ml = mix.volume_ml();
    let serving_frozen_fraction = options
        .serving_frozen_fraction
        .or(recipe.serving_frozen_fraction)
        .filter(|t| (0.0..1.0).contains(t))
        .unwrap_or(DEFAULT_SERVING_FROZEN_FRACTION);
    let point = |temp_c: f64| CurvePoint {
        temp_c,
        frozen_fraction: serum.frozen_fraction(temp_c),
    };
    let steps = (-CURVE_MIN_C / CURVE_STEP_K).round() as usize;
    let ice_curve = (0..=steps)
        .map(|k| point(-(k as f64) * CURVE_STEP_K))
        .collect();
    let classic = classic::classic(&mix, catalog, recipe.style.is_drink());
    let freezer = point(options.freezer_for(recipe));
    let mut analysis = Analysis {
        name: recipe.name.clone(),
        style: recipe.style,
        mass_g: total,
        volume_ml,
        line_mass_g: mix.line_mass_g.clone(),
        composition,
        solutes_pct,
        sweeteners_pct: pct(sweeteners_g.max(0.0), total),
        sugar_g_per_l: if volume_ml > 0.0 {
            1000.0 * (sweeteners_g.max(0.0) + lactose_g) / volume_ml
        } else {
            0.0
        },
        abv_pct: mix.abv_pct(),
        sweetness,
        freezing_point_c: serum.freezing_point_c(),
        dilute_law_freezing_point_c: serum.dilute_law_freezing_point_c(),
        serving_frozen_fraction,
        serving_temp_c: serum.temp_for_frozen_fraction(serving_frozen_fraction),
        ice_curve,
        at: options.at_temps_c.iter().map(|t| point(*t)).collect(),
        cabinet: point(options.cabinet_for(recipe)),
        freezer,
        freezer_behaviour: FreezerBehaviour::from_frozen_fraction(freezer.frozen_fraction),
        glass_limit_temp_c: serum.glass_limit_temp_c(),
        data_limit_temp_c: (1..=steps)
            .map(|k| -(k as f64) * CURVE_STEP_K)
            .find(|t| serum.share_beyond_data(*t) > 0.5)
            .filter(|_| mix.water_g > 0.0),
        classic_freezing_point_c: classic.freezing_point_c,
        classic_applies: classic.applies,
        classic_note: classic.note,
        allergens: mix.allergens.clone(),
        warnings: Vec::new(),
        cautions: Vec::new(),
    };
    analysis.warnings = warnings::warnings(&analysis, &mix, catalog, options.temp_unit);
    analysis.cautions = warnings::cautions(&analysis, &mix);
    Ok(analysis)
}

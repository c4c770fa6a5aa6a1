//! The measurement loop, pure: measured points in, characterised solutes,
//! predictions and statistics out. No files, no clock, no SQL; the command line
//! (`gelu characterise`, `gelu batch compare`), the store and the workspace
//! build on these functions.
//!
//! - [`characterise()`]: an unknown ingredient's effective molar mass, Norrish K
//!   and sucrose equivalent from measured freezing points, with the
//!   [`crate::model::Solute`] and [`crate::model::Ingredient`] to save.
//! - [`cryoscope`]: degrees Hortvet to and from °C (IDF conversion).
//! - [`predict_brix`]: what a refractometer reads on an alcohol-free mix.
//! - [`predicted_draw_temp_c`]: the temperature at which the draw share of water is frozen.
//! - [`predict`]: every predicted value of a recipe by the log's kind names.
//! - [`summarise`] and [`render_chart`]: predicted against measured over many
//!   batches, with the batches far off flagged and likely causes in words.
//! - [`fit_correction`]: an explicit, shrunk calibration offset per style or recipe.
//!
//! For the command line: the JSON of `gelu characterise` is
//! `serde_json::to_value(&Characterisation)`, whose keys `molar_mass_g_mol`,
//! `norrish_k` (null with one point), `sucrose_equivalent` and `points`
//! (`sample_g`, `water_g`, `freezing_point_c`, `model_c`, `residual_k`) are the
//! contract; more keys are reported beside them (`dissociation`, `solids_pct`,
//! `rms_residual_k`, per point `apparent_molar_mass_g_mol`, …). `--save FILE`
//! writes [`Characterisation::solute`] and [`Characterisation::ingredient`]
//! (already validated with [`crate::catalog::Catalog::with_additions`]); the
//! ingredient's id is the one given, so `ingredient = "ID"` in a recipe means
//! the sample as measured. `gelu batch compare` builds one [`Comparison`] per
//! logged measurement whose kind [`Predictions::for_kind`] answers, then prints
//! [`summarise`] (serialisable) and [`render_chart`]. A [`Correction`] is shown
//! beside, never folded into, a prediction: [`Correction::describe`].
//!
//! ```
//! use gelu::catalog::Catalog;
//! use gelu::measure::{DilutionPoint, SampleSpec, characterise};
//!
//! // CRC Handbook: 10.0 % glucose freezes at -1.17 °C, 20.0 % at -2.70 °C.
//! let points = [
//!     DilutionPoint { sample_g: 10.0, water_g: 90.0, freezing_point_c: -1.17 },
//!     DilutionPoint { sample_g: 20.0, water_g: 80.0, freezing_point_c: -2.70 },
//! ];
//! let spec = SampleSpec::new("house-dextrose", "House dextrose");
//! let c = characterise(&spec, &points, Catalog::builtin()).unwrap();
//! assert!((c.molar_mass_g_mol / 180.16 - 1.0).abs() < 0.03);
//! let json = serde_json::to_value(&c).unwrap();
//! assert!(json["norrish_k"].is_number());
//! ```

mod calibrate;
mod characterise;
mod chart;
mod compare;
pub mod cryoscope;
mod draw;
mod kinds;
mod predict;
mod refraction_data;
mod refractometer;

pub use calibrate::{
    CalibratedFigure, CalibrationError, CalibrationPrior, Correction, Scope, calibrate_recipe,
    calibrated_figures, correction_for, fit_correction,
};
pub use characterise::{
    COLDEST_C, Characterisation, CharacteriseError, DEFAULT_PRECISION_K, DilutionPoint, DryMatter,
    KF_WATER, NORRISH_K_MAX, PointFit, SUCROSE_EQUIVALENT_REFERENCE_G_PER_100G_WATER, SampleSpec,
    characterise,
};
pub use chart::render_chart;
pub use compare::{
    BatchOff, ChartPoint, CompareError, Comparison, FLAG_SIGMAS, KindSummary, WORST_BATCHES,
    likely_causes, summarise,
};
pub use draw::{
    DEFAULT_DRAW_FROZEN_FRACTION, DRAW_FROZEN_FRACTION_SETTING, DRAW_FROZEN_FRACTION_SOURCE,
    draw_frozen_fraction_from_setting, predicted_draw_temp_c,
};
pub use kinds::{
    FREEZING_POINT_PRECISION_SETTING, KINDS, KindDefaults, PRECISION_SETTING_PREFIX,
    PREDICTED_KINDS, defaults as kind_defaults, precision_from_setting,
};
pub use predict::{Predictions, predict};
pub use refractometer::{
    BRIX_SCALE_MAX, BrixError, BrixPrediction, ETHANOL_TRACE_PCT, SoluteRefraction,
    brix_from_refractive_index, predict_brix, refractive_index_from_brix,
};

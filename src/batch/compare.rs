//! Measured against predicted, for one batch: the one place that pairs a batch's
//! readings with its predictions, for the command line and the workspace alike.
//!
//! Every kind gelu predicts is set against the batch's latest reading of it:
//! the freezing point (a reading in °H is compared through its °C twin, see
//! [`super::reading`]), the serving and draw temperatures, ABV, Brix (what a
//! refractometer reads, for alcohol-free mixes) and the batch mass.
//!
//! History does not change when the catalog does: the prediction recorded with
//! the batch is used. A batch recorded before gelu recorded Brix and the draw
//! temperature lacks them; those two are computed from the recipe text the
//! batch recorded (so from what was made), with today's catalog and the draw
//! share in force, and say so ([`PredictedFrom::RecipeText`]).
//!
//! A correction turned on for the batch's recipe (or else its style) is shown
//! beside the prediction, never in its place ([`Calibrated`]); a reading far
//! from the (corrected) prediction is flagged with its likely causes, by the
//! rule of [`crate::measure::summarise`] for one batch: more than 3 σ, with σ
//! from the instrument's precision and the kind's usual batch-to-batch spread.

use std::collections::HashMap;
use std::path::Path;

use chrono::{DateTime, Utc};
use serde_json::{Value, json};

use super::types::{Batch, Measurement, MeasurementKind};
use crate::catalog::Catalog;
use crate::measure::{self, Correction, DEFAULT_DRAW_FROZEN_FRACTION, Predictions, Scope};
use crate::model::Style;
use crate::recipe_file::parse_recipe;

/// Where a batch's prediction of a kind comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PredictedFrom {
    /// Recorded with the batch when it was made.
    Recorded,
    /// Not recorded (the batch predates it): computed now from the recipe text
    /// the batch recorded, with today's catalog.
    RecipeText,
}

impl PredictedFrom {
    /// The word used in JSON: `recorded` or `recipe-text`.
    pub fn as_str(self) -> &'static str {
        match self {
            PredictedFrom::Recorded => "recorded",
            PredictedFrom::RecipeText => "recipe-text",
        }
    }
}

/// What setting readings against predictions needs besides the batch.
#[derive(Debug, Clone, Copy)]
pub struct Setting<'a> {
    /// The catalog for predictions computed now.
    pub catalog: &'a Catalog,
    /// Share of the water frozen at draw (0..1), for draw temperatures computed now.
    pub draw_frozen_fraction: f64,
    /// The corrections turned on (at most one per kind and scope).
    pub corrections: &'a [Correction],
    /// Instrument precisions that replace a kind's usual one (in its difference unit).
    pub precisions: &'a [(MeasurementKind, f64)],
}

impl Setting<'static> {
    /// The built-in catalog, the default draw share, no corrections.
    pub fn plain() -> Setting<'static> {
        Setting {
            catalog: Catalog::builtin(),
            draw_frozen_fraction: DEFAULT_DRAW_FROZEN_FRACTION,
            corrections: &[],
            precisions: &[],
        }
    }
}

impl Setting<'_> {
    /// The precision of a reading of `kind` (in its difference unit).
    pub fn precision(&self, kind: MeasurementKind) -> f64 {
        self.precisions
            .iter()
            .find(|(k, _)| *k == kind)
            .map(|(_, p)| *p)
            .or_else(|| measure::kind_defaults(kind.as_str()).map(|d| d.precision))
            .unwrap_or(1.0)
    }

    /// The correction turned on for `kind` of this recipe, else of this style.
    pub fn correction(
        &self,
        kind: MeasurementKind,
        recipe: &str,
        style: Option<Style>,
    ) -> Option<&Correction> {
        measure::correction_for(
            self.corrections,
            kind.as_str(),
            recipe,
            style.map(|s| s.as_str()),
        )
    }
}

/// The owned parts of a [`Setting`], as read from the batch log.
#[derive(Debug, Clone, PartialEq)]
pub struct LogSetting {
    /// Share of the water frozen at draw (0..1).
    pub draw_frozen_fraction: f64,
    /// The corrections turned on.
    pub corrections: Vec<Correction>,
    /// Instrument precisions that replace a kind's usual one.
    pub precisions: Vec<(MeasurementKind, f64)>,
}

impl Default for LogSetting {
    fn default() -> Self {
        LogSetting {
            draw_frozen_fraction: DEFAULT_DRAW_FROZEN_FRACTION,
            corrections: Vec::new(),
            precisions: Vec::new(),
        }
    }
}

impl LogSetting {
    /// The setting, with the built-in catalog.
    /// Puts `overrides` (a run's own instrument precisions) over the log's, kind by kind.
    pub fn override_precisions(&mut self, overrides: &[(MeasurementKind, f64)]) {
        for (kind, p) in overrides {
            match self.precisions.iter_mut().find(|(k, _)| k == kind) {
                Some(entry) => entry.1 = *p,
                None => self.precisions.push((*kind, *p)),
            }
        }
    }

    pub fn setting(&self) -> Setting<'_> {
        Setting {
            catalog: Catalog::builtin(),
            draw_frozen_fraction: self.draw_frozen_fraction,
            corrections: &self.corrections,
            precisions: &self.precisions,
        }
    }
}

/// A prediction shown with a correction applied.
#[derive(Debug, Clone, PartialEq)]
pub struct Calibrated {
    /// The corrected prediction (in the kind's unit).
    pub value: f64,
    /// What it rests on, e.g. "+0.12 K from 14 batches (…)".
    pub basis: String,
}

/// One predicted kind of a batch: its prediction and latest reading.
#[derive(Debug, Clone, PartialEq)]
pub struct Comparison {
    /// What.
    pub kind: MeasurementKind,
    /// The prediction, in the kind's unit.
    pub predicted: Option<f64>,
    /// Where the prediction comes from.
    pub predicted_from: PredictedFrom,
    /// Why there is no prediction, when there is none.
    pub no_prediction: Option<String>,
    /// The prediction with the correction turned on for it, if any.
    pub calibrated: Option<Calibrated>,
    /// The latest reading, in the kind's unit.
    pub measured: Option<f64>,
    /// When the latest reading was taken.
    pub measured_at: Option<DateTime<Utc>>,
    /// Likely causes, in plain words, when the reading is far off; empty otherwise.
    pub likely_causes: Vec<String>,
}

impl Comparison {
    /// Measured minus predicted, when both are known (in the kind's unit).
    pub fn difference(&self) -> Option<f64> {
        Some(self.measured? - self.predicted?)
    }

    /// Measured minus the corrected prediction, when both are known.
    pub fn calibrated_difference(&self) -> Option<f64> {
        Some(self.measured? - self.calibrated.as_ref()?.value)
    }

    /// Whether the reading is far from the (corrected) prediction.
    pub fn far_off(&self) -> bool {
        !self.likely_causes.is_empty()
    }
}

/// The style of the batch's recipe: recorded with its prediction, else read
/// from its recipe text.
pub fn style(batch: &Batch) -> Option<Style> {
    batch
        .prediction
        .get("style")
        .and_then(Value::as_str)
        .and_then(Style::parse)
        .or_else(|| recipe_of(batch).ok().map(|r| r.style))
}

/// A liqueur's or spirit's batch volume at 20 °C (mL), as its prediction
/// recorded it; `None` for other styles (sized by mass) or when not recorded.
pub fn drink_volume_ml(batch: &Batch) -> Option<f64> {
    crate::batch::drink_volume_from(
        style(batch),
        batch.prediction.get("volume_ml").and_then(Value::as_f64),
    )
}

fn recipe_of(batch: &Batch) -> Result<crate::model::Recipe, String> {
    let label = format!("{} version {}", batch.recipe.recipe, batch.recipe.version);
    parse_recipe(Path::new(&label), &batch.recipe.text).map_err(|e| e.to_string())
}

/// The predictions computed now from the batch's recorded recipe text.
fn computed_now(batch: &Batch, setting: &Setting<'_>) -> Result<Predictions, String> {
    let recipe = recipe_of(batch)?;
    measure::predict(&recipe, setting.catalog, setting.draw_frozen_fraction)
        .map_err(|e| e.to_string())
}

/// Predictions computed now from recorded recipe texts, by the text's content
/// hash, so that a recipe version made into many batches is computed once in a
/// pass over the log (with one [`Setting`]).
pub type Recomputed = HashMap<String, Result<Predictions, String>>;

/// The batch's prediction of `kind`: the value, where it comes from, and why
/// there is none when there is none. What is computed now is computed on first
/// need and kept in `now`.
fn prediction(
    batch: &Batch,
    kind: MeasurementKind,
    setting: &Setting<'_>,
    now: &mut Recomputed,
) -> (Option<f64>, PredictedFrom, Option<String>) {
    let Some(key) = kind.prediction_key() else {
        return (None, PredictedFrom::Recorded, None);
    };
    if kind == MeasurementKind::ServingTempC && style(batch).is_some_and(Style::is_drink) {
        return (
            None,
            PredictedFrom::Recorded,
            Some("a liqueur or spirit is poured, not served from a cabinet".into()),
        );
    }
    if let Some(recorded) = batch.prediction.get(key) {
        let why = match kind {
            MeasurementKind::Brix => batch.prediction.get("brix_refused").and_then(Value::as_str),
            _ => Some("the mix does not freeze that far"),
        };
        let value = recorded.as_f64();
        let why = value.is_none().then(|| why.unwrap_or_default().to_string());
        return (value, PredictedFrom::Recorded, why);
    }
    let computed = now
        .entry(batch.recipe.content_hash.clone())
        .or_insert_with(|| computed_now(batch, setting));
    match computed {
        Ok(p) => {
            let value = match kind {
                MeasurementKind::MassG => Some(batch.size_g),
                _ => p.for_kind(kind.as_str()),
            };
            let why = value.is_none().then(|| match (kind, &p.brix_refused) {
                (MeasurementKind::Brix, Some(r)) => r.clone(),
                _ => "the mix does not freeze that far".to_string(),
            });
            (value, PredictedFrom::RecipeText, why)
        }
        Err(e) => (
            None,
            PredictedFrom::RecipeText,
            Some(format!("the recorded recipe does not read now: {e}")),
        ),
    }
}

/// The latest reading of `kind`.
/// The latest reading of `kind` that stands (a reading struck out by an
/// amendment does not count).
fn latest(batch: &Batch, kind: MeasurementKind) -> Option<&Measurement> {
    batch
        .measurements
        .iter()
        .rev()
        .find(|m| m.kind == kind && !m.struck)
}

/// Likely causes when `measured` is far from `reference` for one batch; empty when not.
fn flags(
    batch: &Batch,
    kind: MeasurementKind,
    reference: f64,
    reading: &Measurement,
    setting: &Setting<'_>,
) -> Vec<String> {
    let one = measure::Comparison {
        kind: kind.as_str().to_string(),
        predicted: reference,
        measured: reading.value,
        batch_code: batch.code.clone(),
        taken_at: reading.taken_at,
        precision: setting.precision(kind),
    };
    measure::summarise(&[one])
        .ok()
        .and_then(|s| s.into_iter().next())
        .and_then(|s| s.flagged.into_iter().next())
        .map(|b| b.likely_causes)
        .unwrap_or_default()
}

/// Every kind the model predicts, in the usual order, with the batch's
/// prediction, any correction turned on for it, its latest reading, and flags.
pub fn comparisons(batch: &Batch, setting: &Setting<'_>) -> Vec<Comparison> {
    comparisons_with(batch, setting, &mut Recomputed::new())
}

/// As [`comparisons`], keeping what is computed now in `now` for the next batches.
pub fn comparisons_with(
    batch: &Batch,
    setting: &Setting<'_>,
    now: &mut Recomputed,
) -> Vec<Comparison> {
    let style = style(batch);
    MeasurementKind::ALL
        .into_iter()
        .filter(|kind| kind.prediction_key().is_some())
        .map(|kind| {
            let (predicted, predicted_from, no_prediction) = prediction(batch, kind, setting, now);
            let calibrated = predicted.and_then(|p| {
                setting
                    .correction(kind, &batch.recipe.recipe, style)
                    .map(|c| Calibrated {
                        value: c.apply(p),
                        basis: c.basis.clone(),
                    })
            });
            let reading = latest(batch, kind);
            let reference = calibrated.as_ref().map(|c| c.value).or(predicted);
            let likely_causes = match (reference, reading) {
                (Some(r), Some(m)) => flags(batch, kind, r, m, setting),
                _ => Vec::new(),
            };
            Comparison {
                kind,
                predicted,
                predicted_from,
                no_prediction,
                calibrated,
                measured: reading.map(|m| m.value),
                measured_at: reading.map(|m| m.taken_at),
                likely_causes,
            }
        })
        .collect()
}

/// The batch's readings that have a prediction, as the pairs the statistics of
/// [`crate::measure`] take (the prediction as recorded, uncorrected; the
/// latest reading of each kind), each with the corrected prediction when a
/// correction is in force for it; if the batch is of `style` (any when
/// `None`), and only of `kind` when one is given.
pub fn measured_pairs(
    batch: &Batch,
    setting: &Setting<'_>,
    style_wanted: Option<Style>,
    kind: Option<MeasurementKind>,
    now: &mut Recomputed,
) -> Vec<(measure::Comparison, Option<f64>)> {
    if style_wanted.is_some() && style(batch) != style_wanted {
        return Vec::new();
    }
    comparisons_with(batch, setting, now)
        .into_iter()
        .filter(|c| kind.is_none_or(|k| k == c.kind))
        .filter_map(|c| {
            let pair = measure::Comparison {
                kind: c.kind.as_str().to_string(),
                predicted: c.predicted?,
                measured: c.measured?,
                batch_code: batch.code.clone(),
                taken_at: c.measured_at?,
                precision: setting.precision(c.kind),
            };
            Some((pair, c.calibrated.map(|k| k.value)))
        })
        .collect()
}

/// The comparisons as JSON, for `gelu batch show --json` (key `compared`).
pub fn comparisons_json(comparisons: &[Comparison]) -> Value {
    Value::Array(
        comparisons
            .iter()
            .map(|c| {
                json!({
                    "kind": c.kind.as_str(),
                    "unit": c.kind.unit(),
                    "predicted": c.predicted,
                    "predicted_from": c.predicted_from.as_str(),
                    "no_prediction": c.no_prediction,
                    "measured": c.measured,
                    "difference": c.difference(),
                    "calibrated": c.calibrated.as_ref().map(|k| json!({
                        "predicted": k.value,
                        "basis": k.basis,
                        "difference": c.calibrated_difference(),
                    })),
                    "far_off": c.far_off(),
                    "likely_causes": c.likely_causes,
                })
            })
            .collect(),
    )
}

/// A reading with the prediction for its kind, if there is one.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Reading<'a> {
    /// The measurement.
    pub measurement: &'a Measurement,
    /// The prediction for its kind (same unit).
    pub predicted: Option<f64>,
}

impl Reading<'_> {
    /// Measured minus predicted (in the kind's unit); none for a struck reading.
    pub fn difference(&self) -> Option<f64> {
        if self.measurement.struck {
            return None;
        }
        self.predicted.map(|p| self.measurement.value - p)
    }
}

/// Every reading of the batch, struck ones too, in the order recorded, each with
/// its kind's prediction from `comparisons`.
pub fn readings<'a>(batch: &'a Batch, comparisons: &[Comparison]) -> Vec<Reading<'a>> {
    batch
        .measurements
        .iter()
        .map(|m| Reading {
            measurement: m,
            predicted: comparisons
                .iter()
                .find(|c| c.kind == m.kind)
                .and_then(|c| c.predicted),
        })
        .collect()
}

/// The statistics of one kind with the corrections in force applied.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct WithCorrections {
    /// How many of the kind's batches a correction applied to.
    pub corrected: usize,
    /// Mean of measured minus the prediction as corrected.
    pub bias: f64,
    /// Root-mean-square of the same.
    pub rmse: f64,
}

/// The statistics of `kind` over `pairs` (from [`measured_pairs`]) with each
/// corrected prediction in place of the plain one; `None` when no correction
/// applied to any of its batches.
pub fn with_corrections(
    pairs: &[(measure::Comparison, Option<f64>)],
    kind: &str,
) -> Option<WithCorrections> {
    let of_kind: Vec<&(measure::Comparison, Option<f64>)> =
        pairs.iter().filter(|(c, _)| c.kind == kind).collect();
    let corrected = of_kind.iter().filter(|(_, k)| k.is_some()).count();
    if corrected == 0 {
        return None;
    }
    let d: Vec<f64> = of_kind
        .iter()
        .map(|(c, k)| c.measured - k.unwrap_or(c.predicted))
        .collect();
    let n = d.len() as f64;
    Some(WithCorrections {
        corrected,
        bias: d.iter().sum::<f64>() / n,
        rmse: (d.iter().map(|x| x * x).sum::<f64>() / n).sqrt(),
    })
}

/// The batches a correction of `scope` learns from: a recipe's (by name), or a
/// style's.
pub fn scope_batches(scope: &Scope) -> (Option<String>, Option<Style>) {
    match scope {
        Scope::Recipe(name) => (Some(name.clone()), None),
        Scope::Style(name) => (None, Style::parse(name)),
    }
}

/// Fits the correction of `kind` for `scope` from the pairs of its batches
/// (from [`measured_pairs`]), with the kind's prior.
pub fn fit_for(
    kind: &str,
    scope: &Scope,
    pairs: &[(measure::Comparison, Option<f64>)],
) -> Result<Correction, measure::CalibrationError> {
    let prior = measure::CalibrationPrior::for_kind(kind).unwrap_or(measure::CalibrationPrior {
        prior_scale: 1.0,
        batch_spread_floor: 0.0,
    });
    let plain: Vec<measure::Comparison> = pairs.iter().map(|(c, _)| c.clone()).collect();
    measure::fit_correction(kind, scope.clone(), &plain, prior)
}

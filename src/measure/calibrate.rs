//! Calibration from logged batches, never silent: a per-style or per-recipe
//! offset added to a prediction, with its basis spelled out.
//!
//! Model (normal–normal, empirical Bayes). Each batch's difference
//! d_i = measured − predicted is the true offset θ plus noise of variance
//! σ_i² = precision_i² + τ², where τ is the batch-to-batch spread: the sample
//! variance of d less the mean instrument variance, never below the kind's
//! floor (`kinds`). The prior is θ ~ N(0, s²) with s the kind's prior scale,
//! the size of model error believed before seeing any batch. Then
//!
//! offset = Σ (d_i / σ_i²) / (1/s² + Σ 1/σ_i²),  standard error = (1/s² + Σ 1/σ_i²)^-½
//!
//! With few batches the prior term dominates and the offset is pulled toward
//! zero; with many it approaches the precision-weighted mean of the differences.
//! `shrinkage` reports how much was held back. Storing and versioning
//! corrections is the store's job; a [`Correction`] serialises for it.

use serde::{Deserialize, Serialize};

use super::compare::{CompareError, Comparison};
use super::kinds::{PREDICTED_KINDS, defaults, difference_unit};
use super::predict::Predictions;

/// What a correction applies to.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(tag = "scope", content = "name", rename_all = "kebab-case")]
pub enum Scope {
    /// Every recipe of a style (kebab-case style name).
    Style(String),
    /// One recipe (its name).
    Recipe(String),
}

/// The prior of a calibration.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct CalibrationPrior {
    /// Prior scale s of the offset (in the kind's difference unit), above 0.
    pub prior_scale: f64,
    /// Least batch-to-batch spread τ (same unit), 0 or more.
    pub batch_spread_floor: f64,
}

impl CalibrationPrior {
    /// The kind's defaults (`kinds`), if it is a kind the log knows.
    pub fn for_kind(kind: &str) -> Option<CalibrationPrior> {
        defaults(kind).map(|d| CalibrationPrior {
            prior_scale: d.prior_scale,
            batch_spread_floor: d.batch_spread_floor,
        })
    }
}

/// A fitted correction.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Correction {
    /// Kind it corrects.
    pub kind: String,
    /// What it applies to.
    pub scope: Scope,
    /// Offset added to a prediction (in `unit`).
    pub offset: f64,
    /// Unit of the offset (K for temperatures).
    pub unit: String,
    /// Standard error of the offset (same unit).
    pub standard_error: f64,
    /// Number of batches it rests on.
    pub n: usize,
    /// Precision-weighted mean of the differences, before shrinking.
    pub weighted_mean_difference: f64,
    /// Share of the weighted mean held back by the prior (0..1).
    pub shrinkage: f64,
    /// The prior used.
    pub prior: CalibrationPrior,
    /// Batch-to-batch spread used (same unit).
    pub batch_spread: f64,
    /// Plain text, e.g. "+0.12 K from 14 batches".
    pub basis: String,
}

impl Correction {
    /// The prediction with the correction applied.
    pub fn apply(&self, predicted: f64) -> f64 {
        predicted + self.offset
    }

    /// How the correction changes a prediction, in words, e.g.
    /// "-2.41 → -2.29 (calibrated: +0.12 K from 14 batches)".
    pub fn describe(&self, predicted: f64) -> String {
        format!(
            "{predicted:.2} → {:.2} (calibrated: {})",
            self.apply(predicted),
            self.basis
        )
    }
}

/// The correction in force for `kind` of the recipe named `recipe`, else of
/// its `style` (kebab-case): a recipe's own correction wins over its style's.
pub fn correction_for<'a>(
    corrections: &'a [Correction],
    kind: &str,
    recipe: &str,
    style: Option<&str>,
) -> Option<&'a Correction> {
    let of = |scope: &Scope| {
        corrections
            .iter()
            .find(|c| c.kind == kind && &c.scope == scope)
    };
    of(&Scope::Recipe(recipe.to_string()))
        .or_else(|| style.and_then(|s| of(&Scope::Style(s.to_string()))))
}

/// A prediction of a recipe with the correction in force for it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CalibratedFigure {
    /// The kind name of the batch log (`freezing-point-c`, ...).
    pub kind: String,
    /// The plain prediction (in the kind's unit).
    pub predicted: f64,
    /// The prediction with the correction applied (same unit).
    pub value: f64,
    /// Unit of the offset (K for temperatures).
    pub unit: String,
    /// Number of batches the correction rests on.
    pub n: usize,
    /// The correction's basis, e.g. "+0.12 K from 14 batches".
    pub basis: String,
}

/// Every prediction of a recipe that a correction in force applies to, with
/// the correction applied (the batch mass is a plan, never corrected).
pub fn calibrated_figures(
    predictions: &Predictions,
    recipe: &str,
    style: &str,
    corrections: &[Correction],
) -> Vec<CalibratedFigure> {
    PREDICTED_KINDS
        .iter()
        .filter(|kind| **kind != "mass-g")
        .filter_map(|kind| {
            let predicted = predictions.for_kind(kind)?;
            let c = correction_for(corrections, kind, recipe, Some(style))?;
            Some(CalibratedFigure {
                kind: kind.to_string(),
                predicted,
                value: c.apply(predicted),
                unit: c.unit.clone(),
                n: c.n,
                basis: c.basis.clone(),
            })
        })
        .collect()
}

/// The predictions of `recipe` that `corrections` in force apply to, corrected:
/// predicted as the batch log predicts (draw temperature at
/// `draw_frozen_fraction`), with the serving temperature the caller's analysis
/// found (`serving_temp_c`, at the share it uses). Nothing is computed when no
/// correction is in force.
pub fn calibrate_recipe(
    recipe: &crate::model::Recipe,
    catalog: &crate::catalog::Catalog,
    draw_frozen_fraction: f64,
    serving_temp_c: Option<f64>,
    corrections: &[Correction],
) -> Result<Vec<CalibratedFigure>, crate::analysis::AnalysisError> {
    if corrections.is_empty() {
        return Ok(Vec::new());
    }
    let mut p = super::predict::predict(recipe, catalog, draw_frozen_fraction)?;
    p.serving_temp_c = serving_temp_c;
    Ok(calibrated_figures(
        &p,
        &recipe.name,
        recipe.style.as_str(),
        corrections,
    ))
}

/// Why no correction can be fitted.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CalibrationError {
    /// No batch of that kind.
    #[error("no batches with a measured {kind} to calibrate from")]
    NoBatches {
        /// The kind.
        kind: String,
    },
    /// The prior is unusable.
    #[error(
        "the prior scale must be above 0 and the spread floor 0 or more (got {prior_scale} and {batch_spread_floor})"
    )]
    BadPrior {
        /// Prior scale given.
        prior_scale: f64,
        /// Floor given.
        batch_spread_floor: f64,
    },
    /// A comparison is unusable.
    #[error(transparent)]
    Comparison(#[from] CompareError),
}

/// Fits the offset for `kind` from the comparisons of that kind (others are
/// ignored: pass the batches of one style or recipe, as `scope` says).
pub fn fit_correction(
    kind: &str,
    scope: Scope,
    comparisons: &[Comparison],
    prior: CalibrationPrior,
) -> Result<Correction, CalibrationError> {
    if !(prior.prior_scale > 0.0
        && prior.prior_scale.is_finite()
        && prior.batch_spread_floor >= 0.0
        && prior.batch_spread_floor.is_finite())
    {
        return Err(CalibrationError::BadPrior {
            prior_scale: prior.prior_scale,
            batch_spread_floor: prior.batch_spread_floor,
        });
    }
    let items: Vec<&Comparison> = comparisons.iter().filter(|c| c.kind == kind).collect();
    if items.is_empty() {
        return Err(CalibrationError::NoBatches {
            kind: kind.to_string(),
        });
    }
    // Reuse the comparison checks (finite values, positive precision).
    super::compare::summarise(&items.iter().map(|c| (*c).clone()).collect::<Vec<_>>())?;
    let n = items.len();
    let d: Vec<f64> = items.iter().map(|c| c.difference()).collect();
    let mean = d.iter().sum::<f64>() / n as f64;
    let sample_var = if n >= 2 {
        d.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1) as f64
    } else {
        0.0
    };
    let mean_instrument_var = items.iter().map(|c| c.precision.powi(2)).sum::<f64>() / n as f64;
    let batch_spread = (sample_var - mean_instrument_var)
        .max(0.0)
        .sqrt()
        .max(prior.batch_spread_floor);
    let weights: Vec<f64> = items
        .iter()
        .map(|c| 1.0 / (c.precision.powi(2) + batch_spread.powi(2)))
        .collect();
    let weight_sum: f64 = weights.iter().sum();
    let weighted_sum: f64 = weights.iter().zip(&d).map(|(w, x)| w * x).sum();
    let prior_precision = 1.0 / prior.prior_scale.powi(2);
    let offset = weighted_sum / (prior_precision + weight_sum);
    let weighted_mean_difference = weighted_sum / weight_sum;
    let shrinkage = prior_precision / (prior_precision + weight_sum);
    let unit = difference_unit(kind).to_string();
    let batches = if n == 1 { "batch" } else { "batches" };
    let basis = format!(
        "{offset:+.2} {unit} from {n} {batches} (their weighted mean {weighted_mean_difference:+.2} {unit}, {:.0} % held back toward zero)",
        100.0 * shrinkage
    );
    Ok(Correction {
        kind: kind.to_string(),
        scope,
        offset,
        unit,
        standard_error: (prior_precision + weight_sum).powf(-0.5),
        n,
        weighted_mean_difference,
        shrinkage,
        prior,
        batch_spread,
        basis,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::{TimeZone, Utc};

    fn c(difference: f64) -> Comparison {
        Comparison {
            kind: "abv-pct".into(),
            predicted: 20.0,
            measured: 20.0 + difference,
            batch_code: "HD-1".into(),
            taken_at: Utc
                .with_ymd_and_hms(2025, 5, 6, 7, 8, 9)
                .single()
                .unwrap_or_default(),
            precision: 0.1,
        }
    }

    #[test]
    fn one_batch_follows_the_normal_normal_formula() {
        // One batch, d = 0.4, σ² = 0.1² + floor 0.1² = 0.02, prior s = 0.3:
        // offset = (0.4 / 0.02) / (1/0.09 + 1/0.02).
        let prior = CalibrationPrior::for_kind("abv-pct").unwrap_or(CalibrationPrior {
            prior_scale: 0.3,
            batch_spread_floor: 0.1,
        });
        let k = fit_correction("abv-pct", Scope::Recipe("r".into()), &[c(0.4)], prior);
        let k = k.unwrap_or_else(|e| panic!("{e}"));
        let expected = (0.4 / 0.02) / (1.0 / 0.09 + 1.0 / 0.02);
        assert!((k.offset - expected).abs() < 1e-12, "{}", k.offset);
        assert!(
            k.basis.starts_with("+0.33 % vol from 1 batch "),
            "{}",
            k.basis
        );
    }

    #[test]
    fn a_bad_prior_is_refused() {
        let bad = CalibrationPrior {
            prior_scale: 0.0,
            batch_spread_floor: 0.1,
        };
        assert!(matches!(
            fit_correction("abv-pct", Scope::Style("liqueur".into()), &[c(0.1)], bad),
            Err(CalibrationError::BadPrior { .. })
        ));
    }

    #[test]
    fn a_recipes_own_correction_wins_over_its_styles_and_mass_is_never_corrected() {
        let prior = CalibrationPrior {
            prior_scale: 0.3,
            batch_spread_floor: 0.1,
        };
        let fit = |scope: Scope, d: f64| {
            fit_correction("abv-pct", scope, &[c(d)], prior).unwrap_or_else(|e| panic!("{e}"))
        };
        let style = fit(Scope::Style("liqueur".into()), 0.4);
        let own = fit(Scope::Recipe("Gull Rock cassis".into()), -0.4);
        let mut mass = style.clone();
        mass.kind = "mass-g".into();
        let corrections = [style.clone(), own.clone(), mass];
        let p = Predictions {
            freezing_point_c: Some(-9.0),
            abv_pct: 20.0,
            brix: None,
            brix_refused: None,
            draw_temp_c: None,
            draw_frozen_fraction: 0.5,
            serving_temp_c: None,
            mass_g: 1000.0,
        };
        let mine = calibrated_figures(&p, "Gull Rock cassis", "liqueur", &corrections);
        assert_eq!(mine.len(), 1, "{mine:?}");
        assert_eq!(mine[0].kind, "abv-pct");
        assert_eq!(mine[0].value, 20.0 + own.offset);
        assert!(own.offset < 0.0);
        let other = calibrated_figures(&p, "Another", "liqueur", &corrections);
        assert_eq!(other.len(), 1, "{other:?}");
        assert_eq!(other[0].value, 20.0 + style.offset);
        assert_eq!(other[0].n, 1);
        assert!(calibrated_figures(&p, "Another", "gelato", &corrections).is_empty());
    }
}

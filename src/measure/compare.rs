//! Predicted against measured, over many batches: per kind the count, the bias
//! (mean of measured − predicted), the RMSE, the batches furthest off, the data
//! for a chart, and the batches far enough off to be worth a look.
//!
//! When is a batch "far off"? Its difference d = measured − predicted is set
//! against the kind's typical difference (the median over the batches when
//! there are 3 or more, else 0, i.e. the prediction itself), so a model that is
//! off for every batch does not flag them all (that is the calibration's job).
//! The allowed departure is 3 σ with σ = √(precision² + spread²):
//! - `precision` is the instrument's, so a reading never flags for its own
//!   noise, and a cryoscope (0.005 K) is held tighter than a thermometer (0.3 K);
//! - `spread` is the batch-to-batch scatter: 1.4826 × the median absolute
//!   deviation of d when there are 5 or more batches (robust, so the far batch
//!   does not hide itself), never below the kind's floor (`kinds`).
//!
//! Three σ lets about 3 in 1000 ordinary batches through as false alarms if the
//! scatter is normal.

use std::collections::BTreeMap;

use chrono::{DateTime, Utc};
use serde::{Deserialize, Serialize};

use super::kinds::{KINDS, defaults, difference_unit};

/// Allowed departure in standard deviations.
pub const FLAG_SIGMAS: f64 = 3.0;
/// How many of the furthest-off batches each summary lists.
pub const WORST_BATCHES: usize = 5;
/// Spread floor for a kind the log does not know (in its own unit).
const UNKNOWN_KIND_SPREAD_FLOOR: f64 = 0.0;

/// One measured value with the prediction it is set against.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Comparison {
    /// Kebab-case kind, as in the batch log (`freezing-point-c`, `brix`, …).
    pub kind: String,
    /// Predicted value (in the kind's unit).
    pub predicted: f64,
    /// Measured value (in the kind's unit).
    pub measured: f64,
    /// Batch code.
    pub batch_code: String,
    /// When it was measured.
    pub taken_at: DateTime<Utc>,
    /// Precision of the instrument (in the kind's difference unit), above 0.
    pub precision: f64,
}

impl Comparison {
    /// Measured minus predicted.
    pub fn difference(&self) -> f64 {
        self.measured - self.predicted
    }
}

/// A comparison that cannot be used.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CompareError {
    /// A value is not a finite number.
    #[error("batch {batch_code}, {kind}: the {field} value must be a finite number, not {value}")]
    NotFinite {
        /// Batch code.
        batch_code: String,
        /// Kind.
        kind: String,
        /// Which value.
        field: &'static str,
        /// The value.
        value: f64,
    },
    /// The precision is not above zero.
    #[error("batch {batch_code}, {kind}: the instrument precision must be above 0, not {value}")]
    BadPrecision {
        /// Batch code.
        batch_code: String,
        /// Kind.
        kind: String,
        /// The value.
        value: f64,
    },
}

/// One batch in a summary.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BatchOff {
    /// Batch code.
    pub batch_code: String,
    /// When it was measured.
    pub taken_at: DateTime<Utc>,
    /// Predicted value.
    pub predicted: f64,
    /// Measured value.
    pub measured: f64,
    /// Measured minus predicted.
    pub difference: f64,
    /// Difference minus the kind's typical difference.
    pub departure: f64,
    /// Allowed departure (3 σ).
    pub allowed: f64,
    /// Likely causes in plain words, for a flagged batch (empty otherwise).
    pub likely_causes: Vec<String>,
}

/// One point of the measured-against-predicted chart.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ChartPoint {
    /// Predicted value.
    pub predicted: f64,
    /// Measured value.
    pub measured: f64,
    /// Whether the batch is flagged.
    pub flagged: bool,
}

/// Everything about one kind.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct KindSummary {
    /// Kind.
    pub kind: String,
    /// Unit of differences (K for temperatures).
    pub unit: String,
    /// Number of batches.
    pub n: usize,
    /// Mean of measured − predicted.
    pub bias: f64,
    /// Root-mean-square of measured − predicted.
    pub rmse: f64,
    /// Sample standard deviation of the differences (`None` with one batch).
    pub sd: Option<f64>,
    /// Standard error of the bias (`None` with one batch).
    pub standard_error: Option<f64>,
    /// The typical difference flags are judged from (median with 3 or more batches, else 0).
    pub typical_difference: f64,
    /// Batch-to-batch spread used for flags.
    pub batch_spread: f64,
    /// The batches furthest from the typical difference, worst first.
    pub worst: Vec<BatchOff>,
    /// The batches beyond the allowed departure, worst first.
    pub flagged: Vec<BatchOff>,
    /// Measured against predicted, in the input order.
    pub chart: Vec<ChartPoint>,
}

fn median(values: &mut [f64]) -> f64 {
    values.sort_by(f64::total_cmp);
    let n = values.len();
    if n == 0 {
        0.0
    } else if n % 2 == 1 {
        values[n / 2]
    } else {
        0.5 * (values[n / 2 - 1] + values[n / 2])
    }
}

fn check(c: &Comparison) -> Result<(), CompareError> {
    for (field, value) in [("predicted", c.predicted), ("measured", c.measured)] {
        if !value.is_finite() {
            return Err(CompareError::NotFinite {
                batch_code: c.batch_code.clone(),
                kind: c.kind.clone(),
                field,
                value,
            });
        }
    }
    if !(c.precision > 0.0 && c.precision.is_finite()) {
        return Err(CompareError::BadPrecision {
            batch_code: c.batch_code.clone(),
            kind: c.kind.clone(),
            value: c.precision,
        });
    }
    Ok(())
}

/// Summarises the comparisons per kind: the log's kinds first in the log's order,
/// then any other kind by name. Refuses the whole set if one comparison is unusable.
pub fn summarise(comparisons: &[Comparison]) -> Result<Vec<KindSummary>, CompareError> {
    let mut by_kind: BTreeMap<&str, Vec<&Comparison>> = BTreeMap::new();
    for c in comparisons {
        check(c)?;
        by_kind.entry(c.kind.as_str()).or_default().push(c);
    }
    let rank = |k: &str| {
        KINDS
            .iter()
            .position(|d| d.kind == k)
            .unwrap_or(KINDS.len())
    };
    let mut kinds: Vec<&str> = by_kind.keys().copied().collect();
    kinds.sort_by_key(|k| (rank(k), k.to_string()));
    Ok(kinds
        .into_iter()
        .map(|k| summarise_kind(k, &by_kind[k]))
        .collect())
}

fn summarise_kind(kind: &str, items: &[&Comparison]) -> KindSummary {
    let n = items.len();
    let d: Vec<f64> = items.iter().map(|c| c.difference()).collect();
    let bias = d.iter().sum::<f64>() / n as f64;
    let rmse = (d.iter().map(|x| x * x).sum::<f64>() / n as f64).sqrt();
    let sd = (n >= 2)
        .then(|| (d.iter().map(|x| (x - bias).powi(2)).sum::<f64>() / (n - 1) as f64).sqrt());
    let standard_error = sd.map(|s| s / (n as f64).sqrt());
    let typical_difference = if n >= 3 { median(&mut d.clone()) } else { 0.0 };
    let floor = defaults(kind).map_or(UNKNOWN_KIND_SPREAD_FLOOR, |k| k.batch_spread_floor);
    let robust = if n >= 5 {
        let mut dev: Vec<f64> = d.iter().map(|x| (x - typical_difference).abs()).collect();
        1.4826 * median(&mut dev)
    } else {
        0.0
    };
    let batch_spread = robust.max(floor);
    let mut all: Vec<BatchOff> = items
        .iter()
        .map(|c| {
            let departure = c.difference() - typical_difference;
            let allowed = FLAG_SIGMAS * (c.precision.powi(2) + batch_spread.powi(2)).sqrt();
            BatchOff {
                batch_code: c.batch_code.clone(),
                taken_at: c.taken_at,
                predicted: c.predicted,
                measured: c.measured,
                difference: c.difference(),
                departure,
                allowed,
                likely_causes: if departure.abs() > allowed {
                    likely_causes(kind, departure)
                } else {
                    Vec::new()
                },
            }
        })
        .collect();
    let chart = all
        .iter()
        .map(|b| ChartPoint {
            predicted: b.predicted,
            measured: b.measured,
            flagged: !b.likely_causes.is_empty(),
        })
        .collect();
    all.sort_by(|a, b| b.departure.abs().total_cmp(&a.departure.abs()));
    let flagged: Vec<BatchOff> = all
        .iter()
        .filter(|b| !b.likely_causes.is_empty())
        .cloned()
        .collect();
    all.truncate(WORST_BATCHES);
    KindSummary {
        kind: kind.to_string(),
        unit: difference_unit(kind).to_string(),
        n,
        bias,
        rmse,
        sd,
        standard_error,
        typical_difference,
        batch_spread,
        worst: all,
        flagged,
        chart,
    }
}

/// Plain-language causes of a batch measuring `departure` above (positive) or
/// below its usual difference from the prediction.
pub fn likely_causes(kind: &str, departure: f64) -> Vec<String> {
    let high = departure > 0.0;
    let mut causes: Vec<&str> = match (kind, high) {
        ("freezing-point-c", false) | ("draw-temp-c", false) | ("serving-temp-c", false) => vec![
            "more dissolved solids than the recipe says: a sugar or salt line weighed high or added twice",
            "less water than planned: water weighed low, or boiled off while pasteurising",
            "an ingredient lot with more sugar or salt than its sheet (riper fruit, another syrup)",
        ],
        ("freezing-point-c", true) | ("draw-temp-c", true) | ("serving-temp-c", true) => vec![
            "fewer dissolved solids than the recipe says: a sugar line missing or weighed low",
            "more water than planned: water weighed high, or ice or rinse water got in",
            "an ingredient lot with less sugar than its sheet (less ripe fruit, a diluted purée)",
        ],
        ("brix", true) => vec![
            "sugar weighed high or a sugar line added twice",
            "water weighed low, or water boiled off while heating",
            "an ingredient lot sweeter than its sheet (riper fruit, a more concentrated syrup)",
        ],
        ("brix", false) => vec![
            "a sugar line missing or weighed low",
            "water weighed high",
            "an ingredient lot less sweet than its sheet",
        ],
        ("abv-pct", true) => vec![
            "spirit weighed high, or a stronger spirit lot than the recipe names",
            "water or syrup weighed low",
        ],
        ("abv-pct", false) => vec![
            "spirit weighed low or a spirit line missing, or a weaker spirit lot",
            "alcohol lost to heat or an open vessel",
            "water or syrup weighed high",
        ],
        ("mass-g", false) => vec![
            "a line missing or weighed low",
            "mix left in pans and lines, or water lost to heating",
        ],
        ("mass-g", true) => vec![
            "a line added twice or weighed high",
            "rinse water or extra water added",
        ],
        _ => vec!["a weighing error, a missing line or a different ingredient lot"],
    };
    if matches!(kind, "draw-temp-c" | "serving-temp-c") {
        causes.push("the freezer or cabinet ran at another setting, or the reading was taken at another moment");
    }
    causes.push("the instrument needs checking against its standard");
    causes.into_iter().map(String::from).collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::TimeZone;

    fn c(predicted: f64, measured: f64, precision: f64) -> Comparison {
        Comparison {
            kind: "brix".into(),
            predicted,
            measured,
            batch_code: "HB-1".into(),
            taken_at: Utc
                .with_ymd_and_hms(2025, 1, 2, 3, 4, 5)
                .single()
                .unwrap_or_default(),
            precision,
        }
    }

    #[test]
    fn median_of_odd_and_even_counts() {
        assert_eq!(median(&mut [3.0, 1.0, 2.0]), 2.0);
        assert_eq!(median(&mut [4.0, 1.0, 2.0, 3.0]), 2.5);
        assert_eq!(median(&mut []), 0.0);
    }

    #[test]
    fn with_few_batches_the_prediction_itself_is_the_reference() {
        // Two batches: typical difference 0, so a batch 2 °Bx off with a 0.2 °Bx
        // refractometer (allowed 3 √(0.2² + 0.3²) ≈ 1.08) is flagged.
        let s = summarise(&[c(30.0, 32.0, 0.2), c(30.0, 30.1, 0.2)]).unwrap();
        assert_eq!(s[0].typical_difference, 0.0);
        assert_eq!(s[0].flagged.len(), 1);
        assert!((s[0].flagged[0].allowed - 3.0 * (0.04_f64 + 0.09).sqrt()).abs() < 1e-12);
    }

    #[test]
    fn causes_follow_the_sign() {
        assert!(likely_causes("brix", 1.0)[0].contains("high"));
        assert!(likely_causes("brix", -1.0)[0].contains("missing"));
        assert!(likely_causes("freezing-point-c", -0.5)[0].contains("more dissolved"));
        assert!(
            likely_causes("ph", 0.3)
                .iter()
                .any(|c| c.contains("instrument"))
        );
    }
}

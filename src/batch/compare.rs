//! Measured against predicted, for one batch: the one place that pairs a batch's
//! readings with the prediction it was made with, for the command line and the
//! workspace alike.

use super::types::{Batch, Measurement, MeasurementKind};

/// The predicted value of `kind` for this batch, in the kind's unit, if the model
/// predicts that kind and the batch's prediction holds it.
pub fn predicted(batch: &Batch, kind: MeasurementKind) -> Option<f64> {
    kind.prediction_key()
        .and_then(|key| batch.prediction.get(key))
        .and_then(serde_json::Value::as_f64)
}

/// One predicted kind of a batch: its prediction and latest reading that stands
/// (a struck reading does not count).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Comparison {
    /// What.
    pub kind: MeasurementKind,
    /// The prediction, in the kind's unit.
    pub predicted: Option<f64>,
    /// The latest reading, in the kind's unit.
    pub measured: Option<f64>,
}

impl Comparison {
    /// Measured minus predicted, when both are known (in the kind's unit).
    pub fn difference(&self) -> Option<f64> {
        Some(self.measured? - self.predicted?)
    }
}

/// Every kind the model predicts, in the usual order, with the batch's prediction
/// and its latest reading of that kind.
pub fn comparisons(batch: &Batch) -> Vec<Comparison> {
    MeasurementKind::ALL
        .into_iter()
        .filter(|kind| kind.prediction_key().is_some())
        .map(|kind| Comparison {
            kind,
            predicted: predicted(batch, kind),
            measured: batch
                .measurements
                .iter()
                .rev()
                .find(|m| m.kind == kind && !m.struck)
                .map(|m| m.value),
        })
        .collect()
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
/// its prediction.
pub fn readings(batch: &Batch) -> Vec<Reading<'_>> {
    batch
        .measurements
        .iter()
        .map(|m| Reading {
            measurement: m,
            predicted: predicted(batch, m.kind),
        })
        .collect()
}

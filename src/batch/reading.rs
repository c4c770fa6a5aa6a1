//! A reading as it is entered, and the measurements recorded for it. A
//! cryoscope reading in degrees Hortvet (`freezing-point-h`, the milk-testing
//! scale) is kept as taken and recorded beside it converted to °C by the IDF
//! line (`freezing-point-c`, see [`crate::measure::cryoscope`]): the °C figure
//! is what is set against the prediction and calibrated, the °H one is the
//! record of what the instrument showed. Every other reading is recorded as it is.

use super::types::MeasurementKind;
use crate::measure::cryoscope::hortvet_to_celsius;

/// The measurements to record for one reading, in order.
pub fn as_recorded(kind: MeasurementKind, value: f64) -> Vec<(MeasurementKind, f64)> {
    match kind {
        MeasurementKind::FreezingPointH => vec![
            (kind, value),
            (MeasurementKind::FreezingPointC, hortvet_to_celsius(value)),
        ],
        _ => vec![(kind, value)],
    }
}

/// The measurements to record for several readings, in order.
pub fn all_as_recorded(readings: &[(MeasurementKind, f64)]) -> Vec<(MeasurementKind, f64)> {
    readings
        .iter()
        .flat_map(|(kind, value)| as_recorded(*kind, *value))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_hortvet_reading_is_kept_and_converted() {
        let recorded = as_recorded(MeasurementKind::FreezingPointH, -0.540);
        assert_eq!(recorded[0], (MeasurementKind::FreezingPointH, -0.540));
        assert_eq!(recorded[1].0, MeasurementKind::FreezingPointC);
        assert!((recorded[1].1 - (0.96418 * -0.540 + 0.00085)).abs() < 1e-12);
        assert_eq!(
            as_recorded(MeasurementKind::Brix, 31.5),
            vec![(MeasurementKind::Brix, 31.5)]
        );
    }
}

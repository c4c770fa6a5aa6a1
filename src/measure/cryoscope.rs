//! Cryoscope readings in degrees Hortvet (°H), the milk-testing scale, to and
//! from degrees Celsius.
//!
//! The Hortvet scale was set by two sucrose calibration solutions whose freezing
//! points were first taken as −0.422 and −0.621 °C and were later measured a
//! little warmer; readings on the old scale are still reported. The IDF
//! conversion (as used with ISO 5764 | IDF 108, the thermistor-cryoscope method
//! for milk) is linear:
//!
//! °C = 0.96418 · °H + 0.00085
//!
//! Some instrument makers use a plain factor (°C = °H / 1.0356) instead; the two
//! differ by under 0.002 K over the milk range. gelu uses the IDF line.

/// Slope of the IDF conversion (°C per °H).
pub const HORTVET_SLOPE: f64 = 0.96418;

/// Offset of the IDF conversion (°C).
pub const HORTVET_OFFSET_C: f64 = 0.00085;

/// A reading in degrees Hortvet (°H) as degrees Celsius (°C).
pub fn hortvet_to_celsius(reading_h: f64) -> f64 {
    HORTVET_SLOPE * reading_h + HORTVET_OFFSET_C
}

/// A temperature in degrees Celsius (°C) as degrees Hortvet (°H).
pub fn celsius_to_hortvet(temp_c: f64) -> f64 {
    (temp_c - HORTVET_OFFSET_C) / HORTVET_SLOPE
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn conversion_round_trips() {
        for h in [-0.621, -0.540, -0.525, -0.422, 0.0] {
            assert!((celsius_to_hortvet(hortvet_to_celsius(h)) - h).abs() < 1e-12);
        }
    }
}

//! The measurement kinds of the batch log, with the defaults the comparison and
//! the calibration use when the caller knows no better.
//!
//! The names are the log's kebab-case kind names. The numbers are judgements of
//! the trade (common practice), stated here once so every report uses the same:
//! - `precision`: what a usual instrument for the kind resolves (a cryoscope
//!   reads to a few thousandths of a kelvin, a probe thermometer to a few
//!   tenths, a hand refractometer to 0.2 °Bx). A log may keep its own
//!   instruments' precisions (`gelu batch precision`, the workspace's settings),
//!   and a run may give them (`--precision`).
//! - `batch_spread_floor`: the least batch-to-batch scatter to expect even with
//!   a perfect instrument (weighing to ±1 %, fruit and dairy lots, freezer timing).
//! - `prior_scale`: how large a systematic offset of the model is believed
//!   before any batch is seen; the calibration shrinks toward zero on this scale.

/// Defaults for one kind of measurement.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct KindDefaults {
    /// Kebab-case kind name, as in the batch log.
    pub kind: &'static str,
    /// Unit of a difference between two values of this kind (K for temperatures).
    pub difference_unit: &'static str,
    /// Whether gelu predicts this kind.
    pub predicted: bool,
    /// Typical instrument precision (in `difference_unit`).
    pub precision: f64,
    /// Least batch-to-batch spread to expect (in `difference_unit`).
    pub batch_spread_floor: f64,
    /// Prior scale of a systematic model offset (in `difference_unit`).
    pub prior_scale: f64,
}

const fn kind(
    kind: &'static str,
    difference_unit: &'static str,
    predicted: bool,
    precision: f64,
    batch_spread_floor: f64,
    prior_scale: f64,
) -> KindDefaults {
    KindDefaults {
        kind,
        difference_unit,
        predicted,
        precision,
        batch_spread_floor,
        prior_scale,
    }
}

/// Every kind the log has, in the log's order (common practice, see the module notes).
pub const KINDS: [KindDefaults; 12] = [
    kind("brix", "°Bx", true, 0.2, 0.3, 1.0),
    kind("ph", "pH", false, 0.05, 0.05, 0.2),
    kind("overrun-pct", "%", false, 2.0, 5.0, 10.0),
    kind("draw-temp-c", "K", true, 0.3, 0.5, 1.0),
    kind("serving-temp-c", "K", true, 0.3, 0.5, 1.0),
    kind("freezing-point-c", "K", true, 0.005, 0.05, 0.2),
    kind("mass-g", "g", true, 1.0, 5.0, 20.0),
    kind("abv-pct", "% vol", true, 0.1, 0.1, 0.3),
    kind("titratable-acidity-pct", "%", false, 0.01, 0.02, 0.05),
    kind("pasteurise-temp-c", "K", false, 0.3, 0.3, 1.0),
    kind("pasteurise-time-s", "s", false, 1.0, 2.0, 10.0),
    // A cryoscope's own reading (°H); its °C twin is what is compared.
    kind("freezing-point-h", "°H", false, 0.005, 0.05, 0.2),
];

/// The kinds gelu predicts.
pub const PREDICTED_KINDS: [&str; 6] = [
    "freezing-point-c",
    "abv-pct",
    "brix",
    "draw-temp-c",
    "serving-temp-c",
    "mass-g",
];

/// Prefix of the batch-log setting that holds a log's own instrument precision
/// for a kind (`measure.precision.freezing-point-c`), in the kind's difference unit.
pub const PRECISION_SETTING_PREFIX: &str = "measure.precision.";

/// The setting of the log's precision of freezing-point readings (K).
pub const FREEZING_POINT_PRECISION_SETTING: &str = "measure.precision.freezing-point-c";

/// A stored precision setting read: a positive finite number, else `None`.
pub fn precision_from_setting(value: Option<&str>) -> Option<f64> {
    value
        .and_then(|v| v.trim().parse::<f64>().ok())
        .filter(|p| *p > 0.0 && p.is_finite())
}

/// The defaults of a kind, if it is one the log knows.
pub fn defaults(kind: &str) -> Option<&'static KindDefaults> {
    KINDS.iter().find(|k| k.kind == kind)
}

/// Unit of a difference for a kind ("" for a kind the log does not know).
pub fn difference_unit(kind: &str) -> &'static str {
    defaults(kind).map_or("", |k| k.difference_unit)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn predicted_kinds_are_known_and_marked() {
        for k in PREDICTED_KINDS {
            assert!(defaults(k).is_some_and(|d| d.predicted), "{k}");
        }
        assert_eq!(
            FREEZING_POINT_PRECISION_SETTING,
            format!("{PRECISION_SETTING_PREFIX}freezing-point-c")
        );
        assert_eq!(
            KINDS.iter().filter(|k| k.predicted).count(),
            PREDICTED_KINDS.len()
        );
    }
}

//! Why a set of freezing points cannot be characterised, in words that say what to check.

use crate::catalog::CatalogError;

use super::{COLDEST_C, NORRISH_K_MAX};

/// Why a set of points cannot be characterised.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CharacteriseError {
    /// No points.
    #[error("no measurements: give at least one point (sample g, water g, freezing point °C)")]
    NoPoints,
    /// A number is NaN or infinite.
    #[error("point {point}: {field} must be a finite number, not {value}")]
    NotFinite {
        /// 1-based point number.
        point: usize,
        /// Which field.
        field: &'static str,
        /// The value given.
        value: f64,
    },
    /// The sample mass is not above zero.
    #[error("point {point}: the sample must weigh more than 0 g, not {value} g")]
    SampleNotPositive {
        /// 1-based point number.
        point: usize,
        /// The value given (g).
        value: f64,
    },
    /// The added water is negative.
    #[error("point {point}: the water added must be 0 g or more, not {value} g")]
    WaterNegative {
        /// 1-based point number.
        point: usize,
        /// The value given (g).
        value: f64,
    },
    /// Nothing to freeze.
    #[error("point {point}: the sample brings no water and none was added, so nothing can freeze")]
    NoWater {
        /// 1-based point number.
        point: usize,
    },
    /// The freezing point is not below 0 °C.
    #[error(
        "point {point}: a freezing point of {temp_c} °C is not below 0 °C; dissolved solids always freeze below pure water, so check the reading and the instrument's zero"
    )]
    NotBelowZero {
        /// 1-based point number.
        point: usize,
        /// The reading (°C).
        temp_c: f64,
    },
    /// The freezing point is too cold for the ice model.
    #[error(
        "point {point}: {temp_c} °C is colder than {COLDEST_C} °C, beyond the ice model gelu uses"
    )]
    TooCold {
        /// 1-based point number.
        point: usize,
        /// The reading (°C).
        temp_c: f64,
    },
    /// The dry matter is out of range.
    #[error("the dry matter must be above 0 % and at most 100 %, not {value} %")]
    BadSolids {
        /// The value given (mass % or °Brix).
        value: f64,
    },
    /// The dissociation factor is out of range.
    #[error(
        "the dissociation factor must be above 0 and at most 10 (1 for sugars, 2 for table salt), not {value}"
    )]
    BadDissociation {
        /// The value given.
        value: f64,
    },
    /// The precision is not a positive number.
    #[error("the reading precision must be a positive number of kelvin, not {value}")]
    BadPrecision {
        /// The value given (K).
        value: f64,
    },
    /// More solute froze warmer.
    #[error(
        "point {warmer} has more sample per gram of water than point {colder} but froze warmer ({warmer_c} °C against {colder_c} °C); more solute can only freeze colder, so one of the two is wrong"
    )]
    Contradiction {
        /// The more concentrated point that froze warmer (1-based).
        warmer: usize,
        /// The less concentrated point (1-based).
        colder: usize,
        /// Reading of the first (°C).
        warmer_c: f64,
        /// Reading of the second (°C).
        colder_c: f64,
    },
    /// No Norrish K in range fits.
    #[error(
        "no Norrish K from 0 to {NORRISH_K_MAX} makes the points agree: point {point} is {residual_k:+.3} K off the best fit (K = {norrish_k:.2}), more than the {tolerance_k:.3} K its precision allows; check the weighings and the readings"
    )]
    NoSaneFit {
        /// The worst point (1-based).
        point: usize,
        /// Its residual (K).
        residual_k: f64,
        /// The tolerance it broke (K).
        tolerance_k: f64,
        /// The best K found.
        norrish_k: f64,
    },
    /// The catalog has no sucrose to compare with.
    #[error("the catalog has no `sucrose` to state the sucrose equivalent against")]
    NoSucrose,
    /// The solute or ingredient to save is invalid.
    #[error(transparent)]
    Catalog(#[from] CatalogError),
}

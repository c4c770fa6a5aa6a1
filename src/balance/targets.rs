//! What a maker can ask balancing for: the figures ([`Figure`]), a target on
//! one of them ([`Target`]: a value or a range, one-sided allowed), their public
//! names (`fat_pct`, `solutes_pct.glucose`, `frozen_at.-12`, …), tolerances and
//! the pure parser of a command-line target `NAME=VALUE`, `NAME=LOW..HIGH`,
//! `NAME=..HIGH` or `NAME=LOW..`.
//!
//! The names are a public contract (files, command line, JSON): add names
//! freely, never rename or drop one.

use serde::Serialize;

use crate::analysis::Analysis;

/// A figure of a mix that a target can be set on. Composition figures are mass %
/// of the mix with the definitions of [`crate::analysis::Composition`].
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(into = "String")]
pub enum Figure {
    /// Total mass (g).
    MassG,
    /// Volume at 20 °C (mL), as [`Analysis::volume_ml`].
    VolumeMl,
    /// Fat (mass %).
    FatPct,
    /// Milk solids-not-fat (mass %).
    MsnfPct,
    /// Protein (mass %).
    ProteinPct,
    /// Lactose (mass %).
    LactosePct,
    /// Mono- and disaccharides, lactose included (mass %).
    SugarsPct,
    /// Everything but water and ethanol (mass %).
    TotalSolidsPct,
    /// Water (mass %).
    WaterPct,
    /// Ethanol (mass %).
    EthanolPct,
    /// Insoluble or non-osmotic solids (mass %).
    OtherSolidsPct,
    /// Sweetness, g of sucrose per 100 g of mix that would taste as sweet, as [`Analysis::sweetness`].
    Sweetness,
    /// Alcoholic strength (% vol at 20 °C).
    AbvPct,
    /// Sugars and other sweeteners per litre (g/L), as [`Analysis::sugar_g_per_l`].
    SugarGPerL,
    /// Initial freezing point (°C).
    FreezingPointC,
    /// Temperature (°C) at which the recipe's serving share of its water is frozen.
    ServingTempC,
    /// Share of one dissolved solute, by solute id (mass % of the mix).
    SolutePct(String),
    /// Share of the water frozen (0..1) at a temperature (°C).
    FrozenAt {
        /// The temperature (°C), below 0.
        temp_c: f64,
    },
}

/// The plain figures with their public names, in display order.
const PLAIN: [(&str, Figure); 16] = [
    ("mass_g", Figure::MassG),
    ("volume_ml", Figure::VolumeMl),
    ("fat_pct", Figure::FatPct),
    ("msnf_pct", Figure::MsnfPct),
    ("protein_pct", Figure::ProteinPct),
    ("lactose_pct", Figure::LactosePct),
    ("sugars_pct", Figure::SugarsPct),
    ("total_solids_pct", Figure::TotalSolidsPct),
    ("water_pct", Figure::WaterPct),
    ("ethanol_pct", Figure::EthanolPct),
    ("other_solids_pct", Figure::OtherSolidsPct),
    ("sweetness", Figure::Sweetness),
    ("abv_pct", Figure::AbvPct),
    ("sugar_g_per_l", Figure::SugarGPerL),
    ("freezing_point_c", Figure::FreezingPointC),
    ("serving_temp_c", Figure::ServingTempC),
];

/// Prefix of a solute-share name: `solutes_pct.<solute id>`.
pub const SOLUTE_PREFIX: &str = "solutes_pct.";
/// Prefix of a frozen-share name: `frozen_at.<temperature °C>`.
pub const FROZEN_PREFIX: &str = "frozen_at.";
/// Coldest temperature (°C) a temperature target or a frozen share may name:
/// the model's freezing tables end at -60 °C.
pub const COLDEST_C: f64 = -59.9;

/// Every valid name, for error messages: the plain ones, then the two patterns.
pub fn valid_names() -> Vec<String> {
    let mut names: Vec<String> = PLAIN.iter().map(|(n, _)| n.to_string()).collect();
    names.push(format!("{SOLUTE_PREFIX}<solute id>"));
    names.push(format!("{FROZEN_PREFIX}<temperature °C>"));
    names
}

/// A temperature written as short as it reads: -12, -12.5.
pub(crate) fn short_number(v: f64) -> String {
    let text = format!("{v:.3}");
    let text = text.trim_end_matches('0').trim_end_matches('.');
    if text == "-0" {
        "0".into()
    } else {
        text.into()
    }
}

/// How close the full model must come to a target for it to count as met.
/// Linear figures are solved exactly, so their tolerance only absorbs rounding;
/// the others are the engine's promise: 0.05 K, 0.005 of a frozen share,
/// 0.05 % vol, 0.5 g/L, 0.1 % of a volume.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Tolerance {
    /// In the figure's own unit.
    Absolute(f64),
    /// As a share of the bound (0..1).
    Relative(f64),
}

impl Figure {
    /// The public name, e.g. `fat_pct`, `solutes_pct.glucose`, `frozen_at.-12`.
    pub fn name(&self) -> String {
        match self {
            Figure::SolutePct(id) => format!("{SOLUTE_PREFIX}{id}"),
            Figure::FrozenAt { temp_c } => format!("{FROZEN_PREFIX}{}", short_number(*temp_c)),
            plain => PLAIN
                .iter()
                .find(|(_, f)| f == plain)
                .map_or_else(String::new, |(n, _)| n.to_string()),
        }
    }

    /// Parses a public name; the error names every valid one.
    pub fn parse(name: &str) -> Result<Figure, TargetError> {
        let name = name.trim();
        if let Some((_, f)) = PLAIN.iter().find(|(n, _)| *n == name) {
            return Ok(f.clone());
        }
        if let Some(id) = name.strip_prefix(SOLUTE_PREFIX) {
            if id.is_empty() {
                return Err(TargetError::UnknownName(name.to_string()));
            }
            return Ok(Figure::SolutePct(id.to_string()));
        }
        if let Some(t) = name.strip_prefix(FROZEN_PREFIX) {
            let temp_c = parse_number(t).ok_or_else(|| TargetError::BadTemperature {
                name: name.to_string(),
                text: t.to_string(),
            })?;
            return Ok(Figure::FrozenAt { temp_c });
        }
        Err(TargetError::UnknownName(name.to_string()))
    }

    /// The unit a value of this figure is written in ("%", "g", "°C", …; "" for a share).
    pub fn unit(&self) -> &'static str {
        match self {
            Figure::MassG => "g",
            Figure::VolumeMl => "mL",
            Figure::Sweetness => "",
            Figure::AbvPct => "% vol",
            Figure::SugarGPerL => "g/L",
            Figure::FreezingPointC | Figure::ServingTempC => "°C",
            Figure::FrozenAt { .. } => "",
            _ => "%",
        }
    }

    /// Decimals shown in plain-text advice.
    pub(crate) fn decimals(&self) -> usize {
        match self {
            Figure::MassG | Figure::VolumeMl | Figure::SugarGPerL => 0,
            Figure::FrozenAt { .. } => 3,
            Figure::FreezingPointC | Figure::ServingTempC => 2,
            _ => 1,
        }
    }

    /// What a maker calls it, for plain-text advice ("fat", "the freezing point").
    pub fn label(&self) -> String {
        match self {
            Figure::MassG => "the batch mass".into(),
            Figure::VolumeMl => "the batch volume".into(),
            Figure::FatPct => "fat".into(),
            Figure::MsnfPct => "MSNF".into(),
            Figure::ProteinPct => "protein".into(),
            Figure::LactosePct => "lactose".into(),
            Figure::SugarsPct => "sugars".into(),
            Figure::TotalSolidsPct => "total solids".into(),
            Figure::WaterPct => "water".into(),
            Figure::EthanolPct => "ethanol by mass".into(),
            Figure::OtherSolidsPct => "other solids".into(),
            Figure::Sweetness => "sweetness".into(),
            Figure::AbvPct => "the strength (ABV)".into(),
            Figure::SugarGPerL => "sugar per litre".into(),
            Figure::FreezingPointC => "the freezing point".into(),
            Figure::ServingTempC => "the serving temperature".into(),
            Figure::SolutePct(id) => id.clone(),
            Figure::FrozenAt { temp_c } => {
                format!("the frozen share at {} °C", short_number(*temp_c))
            }
        }
    }

    /// How close the full model must come for the target to count as met.
    pub fn tolerance(&self) -> Tolerance {
        match self {
            Figure::FreezingPointC | Figure::ServingTempC => Tolerance::Absolute(0.05),
            Figure::FrozenAt { .. } => Tolerance::Absolute(0.005),
            Figure::AbvPct => Tolerance::Absolute(0.05),
            Figure::SugarGPerL => Tolerance::Absolute(0.5),
            Figure::VolumeMl | Figure::MassG => Tolerance::Relative(0.001),
            // Linear figures: solved exactly; this only absorbs the solver's rounding.
            _ => Tolerance::Absolute(0.001),
        }
    }

    /// The tolerance in the figure's unit near `bound`.
    pub fn tolerance_at(&self, bound: f64) -> f64 {
        match self.tolerance() {
            Tolerance::Absolute(t) => t,
            Tolerance::Relative(r) => r * bound.abs(),
        }
    }

    /// A small step of this figure near `bound`, in its unit, that weighs a
    /// violation when targets cannot all hold (one step of each figure counts
    /// alike): 0.1 percentage point, 0.1 K, 0.01 of a frozen share, 0.1 % vol,
    /// 2 g/L, 0.2 % of a mass or volume.
    pub(crate) fn step(&self, bound: f64) -> f64 {
        match self {
            Figure::FrozenAt { .. } => 0.01,
            Figure::SugarGPerL => 2.0,
            Figure::MassG | Figure::VolumeMl => 0.002 * bound.abs().max(1.0),
            _ => 0.1,
        }
    }

    /// Whether the full model needs the volume (so balancing iterates).
    pub(crate) fn uses_volume(&self) -> bool {
        matches!(self, Figure::VolumeMl | Figure::AbvPct | Figure::SugarGPerL)
    }

    /// The loosest values a bound on this figure can take (low, high): relaxing
    /// a bound never goes past them.
    pub(crate) fn extremes(&self, mass_ref_g: f64) -> (f64, f64) {
        match self {
            Figure::MassG | Figure::VolumeMl => (0.0, 1e4 * mass_ref_g),
            Figure::Sweetness => (0.0, 300.0),
            Figure::SugarGPerL => (0.0, 2000.0),
            Figure::FreezingPointC | Figure::ServingTempC => (COLDEST_C, -1e-6),
            Figure::FrozenAt { .. } => (0.0, 1.0),
            _ => (0.0, 100.0),
        }
    }

    /// The figure's value in a full analysis; `None` when the model has none
    /// (no freezing point above -60 °C, a frozen share not asked for).
    pub fn value_in(&self, a: &Analysis) -> Option<f64> {
        let c = &a.composition;
        Some(match self {
            Figure::MassG => a.mass_g,
            Figure::VolumeMl => a.volume_ml,
            Figure::FatPct => c.fat_pct,
            Figure::MsnfPct => c.msnf_pct,
            Figure::ProteinPct => c.protein_pct,
            Figure::LactosePct => c.lactose_pct,
            Figure::SugarsPct => c.sugars_pct,
            Figure::TotalSolidsPct => c.total_solids_pct,
            Figure::WaterPct => c.water_pct,
            Figure::EthanolPct => c.ethanol_pct,
            Figure::OtherSolidsPct => c.other_solids_pct,
            Figure::Sweetness => a.sweetness,
            Figure::AbvPct => a.abv_pct,
            Figure::SugarGPerL => a.sugar_g_per_l,
            Figure::FreezingPointC => a.freezing_point_c?,
            Figure::ServingTempC => a.serving_temp_c?,
            Figure::SolutePct(id) => a.solutes_pct.get(id).copied().unwrap_or(0.0),
            Figure::FrozenAt { temp_c } => {
                a.at.iter()
                    .find(|p| p.temp_c == *temp_c)
                    .map(|p| p.frozen_fraction)?
            }
        })
    }
}

impl From<Figure> for String {
    fn from(f: Figure) -> String {
        f.name()
    }
}

/// A target on one figure: a value to hit (`low == high`) or a range, one side
/// of which may be open.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Target {
    /// The figure.
    pub figure: Figure,
    /// Lowest acceptable value, in the figure's unit; `None` for no lower bound.
    pub low: Option<f64>,
    /// Highest acceptable value, in the figure's unit; `None` for no upper bound.
    pub high: Option<f64>,
}

impl Target {
    /// A value to hit.
    pub fn value(figure: Figure, value: f64) -> Target {
        Target {
            figure,
            low: Some(value),
            high: Some(value),
        }
    }

    /// A closed range `[low, high]`.
    pub fn range(figure: Figure, low: f64, high: f64) -> Target {
        Target {
            figure,
            low: Some(low),
            high: Some(high),
        }
    }

    /// At least `low`.
    pub fn at_least(figure: Figure, low: f64) -> Target {
        Target {
            figure,
            low: Some(low),
            high: None,
        }
    }

    /// At most `high`.
    pub fn at_most(figure: Figure, high: f64) -> Target {
        Target {
            figure,
            low: None,
            high: Some(high),
        }
    }

    /// Whether it asks for one exact value.
    pub fn is_value(&self) -> bool {
        matches!((self.low, self.high), (Some(l), Some(h)) if l == h)
    }

    /// Checks the numbers: finite, at least one bound, low ≤ high, in the figure's
    /// range; temperatures below 0 °C and not below -59.9 °C.
    pub fn validate(&self) -> Result<(), TargetError> {
        let name = self.figure.name();
        let bad = |reason: String| TargetError::BadRange {
            name: name.clone(),
            reason,
        };
        if self.low.is_none() && self.high.is_none() {
            return Err(bad("give a value, a low bound or a high bound".into()));
        }
        for v in [self.low, self.high].into_iter().flatten() {
            if !v.is_finite() {
                return Err(bad(format!("{v} is not a number")));
            }
        }
        if let (Some(l), Some(h)) = (self.low, self.high)
            && l > h
        {
            return Err(bad(format!(
                "the low bound {l} is above the high bound {h}"
            )));
        }
        let (lo, hi) = match &self.figure {
            Figure::FreezingPointC | Figure::ServingTempC => (COLDEST_C, 0.0),
            Figure::FrozenAt { temp_c } => {
                if !(*temp_c < 0.0 && *temp_c >= COLDEST_C) {
                    return Err(bad(format!(
                        "the temperature must lie below 0 °C and not below {COLDEST_C} °C, not {}",
                        short_number(*temp_c)
                    )));
                }
                (0.0, 1.0)
            }
            Figure::MassG | Figure::VolumeMl | Figure::Sweetness | Figure::SugarGPerL => {
                (0.0, f64::INFINITY)
            }
            _ => (0.0, 100.0),
        };
        for v in [self.low, self.high].into_iter().flatten() {
            if v < lo || v > hi {
                return Err(bad(format!(
                    "{v} lies outside {} to {}",
                    short_number(lo),
                    if hi.is_finite() {
                        short_number(hi)
                    } else {
                        "any size".into()
                    }
                )));
            }
        }
        if matches!(self.figure, Figure::FreezingPointC | Figure::ServingTempC)
            && self.low.is_some_and(|l| l >= 0.0)
        {
            return Err(bad(
                "a mix with anything dissolved freezes below 0 °C: give a low bound below 0".into(),
            ));
        }
        if matches!(self.figure, Figure::MassG | Figure::VolumeMl) && self.high == Some(0.0) {
            return Err(bad("a batch must weigh something".into()));
        }
        Ok(())
    }

    /// The range as text, e.g. "at least 8 %", "0.65 to 0.7", "exactly 20 % vol".
    pub fn describe(&self) -> String {
        let unit = self.figure.unit();
        let v = |x: f64| with_unit(&short_number(x), unit);
        match (self.low, self.high) {
            (Some(l), Some(h)) if l == h => format!("exactly {}", v(l)),
            (Some(l), Some(h)) => format!("{} to {}", short_number(l), v(h)),
            (Some(l), None) => format!("at least {}", v(l)),
            (None, Some(h)) => format!("at most {}", v(h)),
            (None, None) => "anything".into(),
        }
    }
}

/// A number followed by its unit, with the space the unit wants.
pub(crate) fn with_unit(number: &str, unit: &str) -> String {
    if unit.is_empty() {
        number.to_string()
    } else {
        format!("{number} {unit}")
    }
}

/// Why a target could not be read or used.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum TargetError {
    /// The text has no `=`.
    #[error(
        "`{0}` is not a target: write NAME=VALUE, NAME=LOW..HIGH, NAME=..HIGH or NAME=LOW.. (for example fat_pct=6..9)"
    )]
    NoEquals(String),
    /// The name is not a known figure.
    #[error("`{0}` is not a target name; valid names: {names}", names = valid_names().join(", "))]
    UnknownName(String),
    /// A frozen share names no temperature.
    #[error("`{name}`: `{text}` is not a temperature in °C (for example frozen_at.-12)")]
    BadTemperature {
        /// The whole name.
        name: String,
        /// The text after the prefix.
        text: String,
    },
    /// A bound is not a number.
    #[error("`{name}`: `{text}` is not a number")]
    BadNumber {
        /// The target's name.
        name: String,
        /// What was written.
        text: String,
    },
    /// The numbers make no sense for the figure.
    #[error("`{name}`: {reason}")]
    BadRange {
        /// The target's name.
        name: String,
        /// What is wrong and what would be valid.
        reason: String,
    },
}

fn parse_number(text: &str) -> Option<f64> {
    let t = text.trim();
    t.parse::<f64>().ok().filter(|v| v.is_finite())
}

/// Parses a command-line target: `NAME=VALUE`, `NAME=LOW..HIGH`, `NAME=..HIGH`
/// or `NAME=LOW..`, e.g. `fat_pct=6..9`, `abv_pct=20`, `frozen_at.-12=0.65..0.70`,
/// `solutes_pct.glucose=..8`. The target is validated.
pub fn parse_target(text: &str) -> Result<Target, TargetError> {
    let Some((name, value)) = text.split_once('=') else {
        return Err(TargetError::NoEquals(text.to_string()));
    };
    let figure = Figure::parse(name)?;
    let name = figure.name();
    let number = |t: &str| {
        parse_number(t).ok_or_else(|| TargetError::BadNumber {
            name: name.clone(),
            text: t.trim().to_string(),
        })
    };
    let bound = |t: &str| -> Result<Option<f64>, TargetError> {
        if t.trim().is_empty() {
            Ok(None)
        } else {
            number(t).map(Some)
        }
    };
    let target = match value.split_once("..") {
        Some((low, high)) => Target {
            figure,
            low: bound(low)?,
            high: bound(high)?,
        },
        None => Target::value(figure, number(value)?),
    };
    target.validate()?;
    Ok(target)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_plain_name_reads_back() {
        for (name, figure) in PLAIN.iter() {
            assert_eq!(&figure.name(), name);
            assert_eq!(&Figure::parse(name).unwrap(), figure);
        }
        let frozen = Figure::FrozenAt { temp_c: -12.0 };
        assert_eq!(frozen.name(), "frozen_at.-12");
        assert_eq!(Figure::parse("frozen_at.-12").unwrap(), frozen);
        assert_eq!(Figure::FrozenAt { temp_c: -12.5 }.name(), "frozen_at.-12.5");
        assert_eq!(
            Figure::parse("solutes_pct.glucose").unwrap(),
            Figure::SolutePct("glucose".into())
        );
    }

    #[test]
    fn the_four_command_line_forms_parse() {
        assert_eq!(
            parse_target("abv_pct=20").unwrap(),
            Target::value(Figure::AbvPct, 20.0)
        );
        assert_eq!(
            parse_target("fat_pct=6..9").unwrap(),
            Target::range(Figure::FatPct, 6.0, 9.0)
        );
        assert_eq!(
            parse_target("solutes_pct.glucose=..8").unwrap(),
            Target::at_most(Figure::SolutePct("glucose".into()), 8.0)
        );
        assert_eq!(
            parse_target("total_solids_pct=36..").unwrap(),
            Target::at_least(Figure::TotalSolidsPct, 36.0)
        );
        assert_eq!(
            parse_target("frozen_at.-12=0.65..0.70").unwrap(),
            Target::range(Figure::FrozenAt { temp_c: -12.0 }, 0.65, 0.70)
        );
        assert_eq!(
            parse_target(" freezing_point_c = -3.5..-2.5 ").unwrap(),
            Target::range(Figure::FreezingPointC, -3.5, -2.5)
        );
    }

    #[test]
    fn errors_say_what_is_valid() {
        let e = parse_target("fatt_pct=8").unwrap_err().to_string();
        assert!(
            e.contains("fat_pct") && e.contains("frozen_at.<temperature °C>"),
            "{e}"
        );
        let e = parse_target("fat_pct").unwrap_err().to_string();
        assert!(e.contains("NAME=LOW..HIGH"), "{e}");
        let e = parse_target("fat_pct=lots").unwrap_err().to_string();
        assert!(e.contains("`lots` is not a number"), "{e}");
        let e = parse_target("fat_pct=9..6").unwrap_err().to_string();
        assert!(e.contains("above the high bound"), "{e}");
        let e = parse_target("frozen_at.5=0.5").unwrap_err().to_string();
        assert!(e.contains("below 0 °C"), "{e}");
        let e = parse_target("frozen_at.-12=1.5").unwrap_err().to_string();
        assert!(e.contains("outside 0 to 1"), "{e}");
        assert!(parse_target("fat_pct=..").is_err());
        assert!(parse_target("freezing_point_c=1..2").is_err());
    }
}

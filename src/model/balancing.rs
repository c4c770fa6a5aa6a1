//! What a maker asks balancing, as plain data: the figures a target can be set
//! on ([`Figure`]) with their public names, a target on one ([`Target`]: a value
//! or a range, one side of which may be open), what each line may do
//! ([`LineRule`]), the objective ([`Objective`]) and the whole question
//! ([`Request`]), which a [`super::Recipe`] carries from its file (the
//! `[balance]` table, the rules on its lines, its prices) so that it survives
//! every save. No analysis here: what a figure's value is in a mix, and how
//! balancing reaches it, belong to [`crate::balance`].
//!
//! The names are a public contract (files, command line, JSON): add names
//! freely, never rename or drop one.

use std::collections::BTreeMap;

use serde::Serialize;

use super::units::{TempUnit, trim_number};

/// A figure of a mix that a target can be set on. Composition figures are mass %
/// of the mix with the definitions of `crate::analysis::Composition`.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(into = "String")]
pub enum Figure {
    /// Total mass (g).
    MassG,
    /// Volume at 20 °C (mL).
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
    /// Sweetness, g of sucrose per 100 g of mix that would taste as sweet.
    Sweetness,
    /// Alcoholic strength (% vol at 20 °C).
    AbvPct,
    /// Sugars and other sweeteners per litre (g/L).
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

/// The plain figures with their public names, in display (and file) order.
pub const PLAIN: [(&str, Figure); 16] = [
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

impl Figure {
    /// The public name, e.g. `fat_pct`, `solutes_pct.glucose`, `frozen_at.-12`.
    pub fn name(&self) -> String {
        match self {
            Figure::SolutePct(id) => format!("{SOLUTE_PREFIX}{id}"),
            Figure::FrozenAt { temp_c } => format!("{FROZEN_PREFIX}{}", trim_number(*temp_c)),
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

    /// What a maker calls it, with any temperature in its name in `unit` ("the
    /// frozen share at 10.4 °F").
    pub fn label_in(&self, unit: TempUnit) -> String {
        match self {
            Figure::FrozenAt { temp_c } => format!(
                "the frozen share at {} {}",
                trim_number(unit.from_c(*temp_c)),
                unit.symbol()
            ),
            _ => self.label(),
        }
    }

    /// Whether the figure is a temperature (its values are °C).
    pub fn is_temperature(&self) -> bool {
        matches!(self, Figure::FreezingPointC | Figure::ServingTempC)
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
                format!("the frozen share at {} °C", trim_number(*temp_c))
            }
        }
    }

    /// A value of this figure as people read it, with its unit: `7.05 %`,
    /// `-2.61 °C`, `0.683`, `1000.0 g`, `20.00 % vol`, `250.0 g/L`.
    pub fn value_text(&self, v: f64) -> String {
        let number = match self {
            Figure::MassG | Figure::VolumeMl | Figure::SugarGPerL | Figure::Sweetness => {
                format!("{v:.1}")
            }
            Figure::FrozenAt { .. } => format!("{v:.3}"),
            _ => format!("{v:.2}"),
        };
        with_unit(&number, self.unit())
    }

    /// The values a bound on this figure may take (low, high), in its unit;
    /// `high` is infinite for figures with no top (mass, volume, sweetness, g/L).
    pub fn valid_range(&self) -> (f64, f64) {
        match self {
            Figure::FreezingPointC | Figure::ServingTempC => (COLDEST_C, 0.0),
            Figure::FrozenAt { .. } => (0.0, 1.0),
            Figure::MassG | Figure::VolumeMl | Figure::Sweetness | Figure::SugarGPerL => {
                (0.0, f64::INFINITY)
            }
            _ => (0.0, 100.0),
        }
    }

    /// Where the figure stands in a recipe file's `[balance]` table: the plain
    /// names in [`PLAIN`] order, then the solute shares by id, then the frozen
    /// shares (in the order given).
    pub fn file_rank(&self) -> (usize, String) {
        match self {
            Figure::SolutePct(id) => (PLAIN.len(), id.clone()),
            Figure::FrozenAt { .. } => (PLAIN.len() + 1, String::new()),
            plain => (
                PLAIN
                    .iter()
                    .position(|(_, f)| f == plain)
                    .unwrap_or(PLAIN.len()),
                String::new(),
            ),
        }
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
        if let Figure::FrozenAt { temp_c } = &self.figure
            && !(*temp_c < 0.0 && *temp_c >= COLDEST_C)
        {
            return Err(bad(format!(
                "the temperature must lie below 0 °C and not below {COLDEST_C} °C, not {}",
                trim_number(*temp_c)
            )));
        }
        let (lo, hi) = self.figure.valid_range();
        for v in [self.low, self.high].into_iter().flatten() {
            if v < lo || v > hi {
                return Err(bad(format!(
                    "{v} lies outside {} to {}",
                    trim_number(lo),
                    if hi.is_finite() {
                        trim_number(hi)
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
        let v = |x: f64| with_unit(&trim_number(x), unit);
        match (self.low, self.high) {
            (Some(l), Some(h)) if l == h => format!("exactly {}", v(l)),
            (Some(l), Some(h)) => format!("{} to {}", trim_number(l), v(h)),
            (Some(l), None) => format!("at least {}", v(l)),
            (None, Some(h)) => format!("at most {}", v(h)),
            (None, None) => "anything".into(),
        }
    }

    /// The range as typed on the command line and in the workspace: `20`,
    /// `6..9`, `..8` or `36..`.
    pub fn range_text(&self) -> String {
        match (self.low, self.high) {
            (Some(l), Some(h)) if l == h => trim_number(l),
            (l, h) => format!(
                "{}..{}",
                l.map(trim_number).unwrap_or_default(),
                h.map(trim_number).unwrap_or_default()
            ),
        }
    }
}

/// A number followed by its unit, with the space the unit wants.
pub fn with_unit(number: &str, unit: &str) -> String {
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

/// What a line may do, by ingredient id (it applies to every line of that ingredient).
/// All amounts stay at or above zero whatever the rule.
#[derive(Debug, Clone, PartialEq, Default, Serialize)]
pub struct LineRule {
    /// Never changed.
    pub fixed: bool,
    /// Least mass of the line (g).
    pub min_g: Option<f64>,
    /// Most mass of the line (g).
    pub max_g: Option<f64>,
    /// Least share of the mix (mass %, 0..100).
    pub min_pct: Option<f64>,
    /// Most share of the mix (mass %, 0..100).
    pub max_pct: Option<f64>,
}

impl LineRule {
    /// A line that never changes.
    pub fn fixed() -> LineRule {
        LineRule {
            fixed: true,
            ..LineRule::default()
        }
    }

    /// Whether the rule says anything (a line without one may change freely).
    pub fn is_empty(&self) -> bool {
        *self == LineRule::default()
    }

    /// The bounds given, by their file names.
    pub fn bounds(&self) -> [(&'static str, Option<f64>); 4] {
        [
            ("min_g", self.min_g),
            ("max_g", self.max_g),
            ("min_pct", self.min_pct),
            ("max_pct", self.max_pct),
        ]
    }

    /// Checks the rule; the error says what is wrong and what would be valid.
    pub fn validate(&self) -> Result<(), String> {
        let given = self.bounds();
        if self.fixed && given.iter().any(|(_, v)| v.is_some()) {
            return Err("a fixed line takes no min or max; drop `fixed` or the bounds".into());
        }
        for (field, v) in given {
            if let Some(v) = v
                && !(v >= 0.0 && v.is_finite())
            {
                return Err(format!("{field} must be zero or more, not {v}"));
            }
        }
        for (field, v) in [("min_pct", self.min_pct), ("max_pct", self.max_pct)] {
            if v.is_some_and(|v| v > 100.0) {
                return Err(format!("{field} is a share of the mix, 0 to 100 %"));
            }
        }
        if let (Some(lo), Some(hi)) = (self.min_g, self.max_g)
            && lo > hi
        {
            return Err(format!("min_g {lo} is above max_g {hi}"));
        }
        if let (Some(lo), Some(hi)) = (self.min_pct, self.max_pct)
            && lo > hi
        {
            return Err(format!("min_pct {lo} is above max_pct {hi}"));
        }
        Ok(())
    }
}

/// What to make least.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Objective {
    /// The least change from the current amounts, each line measured against its
    /// own amount (lines under 0.5 % of the mix, zero lines included, against
    /// 0.5 % of the mix), so the recipe keeps its character.
    #[default]
    Nearest,
    /// The least cost of the batch, from prices per kg.
    Cost,
}

impl Objective {
    /// The public name: `nearest` or `cost`.
    pub fn as_str(self) -> &'static str {
        match self {
            Objective::Nearest => "nearest",
            Objective::Cost => "cost",
        }
    }

    /// Parses `nearest` or `cost`.
    pub fn parse(text: &str) -> Option<Objective> {
        match text.trim() {
            "nearest" => Some(Objective::Nearest),
            "cost" => Some(Objective::Cost),
            _ => None,
        }
    }
}

/// A balancing request: what a recipe file's `[balance]` table, the rules on
/// its lines and its prices say, and what `crate::balance::balance` is asked.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Request {
    /// The targets, each figure at most once.
    pub targets: Vec<Target>,
    /// Rules by ingredient id; a line without one may change freely (unless `vary` says otherwise).
    pub rules: BTreeMap<String, LineRule>,
    /// When given, only lines of these ingredient ids may change; all others are fixed.
    pub vary: Option<Vec<String>>,
    /// What to make least.
    pub objective: Objective,
    /// Prices per kg by ingredient id (any currency; plain numbers). Needed for
    /// every line with [`Objective::Cost`]; with all lines priced the cost is also
    /// reported under [`Objective::Nearest`].
    pub prices_per_kg: BTreeMap<String, f64>,
    /// The unit of temperatures in the plain-text advice of a conflict (°C unless
    /// a workspace set to °F asks). Targets, files and JSON figures stay in °C.
    pub advice_unit: TempUnit,
}

impl Request {
    /// A request with these targets and defaults for the rest.
    pub fn with_targets(targets: Vec<Target>) -> Request {
        Request {
            targets,
            ..Request::default()
        }
    }

    /// Adds `target`, replacing one on the same figure; a mass or volume
    /// replaces the other (a batch has one size).
    pub fn set_target(&mut self, target: Target) {
        let is_size = |f: &Figure| matches!(f, Figure::MassG | Figure::VolumeMl);
        let size = is_size(&target.figure);
        self.targets
            .retain(|t| t.figure != target.figure && !(size && is_size(&t.figure)));
        self.targets.push(target);
    }

    /// Puts the targets in the order a recipe file lists them.
    pub fn sort_targets(&mut self) {
        self.targets.sort_by_key(|t| t.figure.file_rank());
    }

    /// The rule of `id`, if it has one.
    pub fn rule(&self, id: &str) -> Option<&LineRule> {
        self.rules.get(id)
    }

    /// Whether lines of `id` may change: not fixed, and named by `vary` if it is given.
    pub fn may_vary(&self, id: &str) -> bool {
        !self.rule(id).is_some_and(|r| r.fixed)
            && self.vary.as_ref().is_none_or(|v| v.iter().any(|x| x == id))
    }
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
        for text in [
            "abv_pct=20",
            "fat_pct=6..9",
            "sweetness=..8",
            "msnf_pct=36.5..",
        ] {
            let t = parse_target(text).unwrap();
            let (name, _) = text.split_once('=').unwrap();
            assert_eq!(format!("{name}={}", t.range_text()), text);
        }
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

    #[test]
    fn a_size_replaces_the_other_size_and_a_figure_replaces_itself() {
        let mut r = Request::with_targets(vec![
            Target::value(Figure::MassG, 1000.0),
            Target::range(Figure::FatPct, 6.0, 9.0),
        ]);
        r.set_target(Target::value(Figure::VolumeMl, 900.0));
        r.set_target(Target::at_most(Figure::FatPct, 8.0));
        assert_eq!(
            r.targets,
            vec![
                Target::value(Figure::VolumeMl, 900.0),
                Target::at_most(Figure::FatPct, 8.0)
            ]
        );
        r.sort_targets();
        assert_eq!(r.targets[0].figure, Figure::VolumeMl);
    }

    #[test]
    fn rules_say_what_is_wrong() {
        assert!(LineRule::fixed().validate().is_ok());
        let both = LineRule {
            fixed: true,
            min_g: Some(1.0),
            ..LineRule::default()
        };
        assert!(both.validate().unwrap_err().contains("fixed"));
        let over = LineRule {
            max_pct: Some(120.0),
            ..LineRule::default()
        };
        assert!(over.validate().unwrap_err().contains("0 to 100"));
        let crossed = LineRule {
            min_g: Some(5.0),
            max_g: Some(4.0),
            ..LineRule::default()
        };
        assert!(crossed.validate().unwrap_err().contains("above max_g"));
    }
}

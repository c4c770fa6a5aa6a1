//! The balance panel's part of the state: the question being asked of the
//! recipe in the editor (targets, which lines may move, the objective), the
//! row under the cursor, and the answer to the question as it stands.

use crate::balance::{Balance, FROZEN_PREFIX, Figure, Request, Target};
use crate::model::units::{TempUnit, parse_temp, trim_number};

/// The balance panel on the recipe screen.
#[derive(Debug, Clone, PartialEq)]
pub struct BalancePanel {
    /// The question: targets, which lines may move, the objective, and the
    /// recipe's own rules and prices (the batch log's prices are added when
    /// solving, never stored with the recipe).
    pub request: Request,
    /// Where the targets came from, in words.
    pub source: String,
    /// Row under the cursor: the recipe's lines first, then the targets.
    pub cursor: usize,
    /// The answer to the question as it stands, or why there is none.
    pub answer: Result<Balance, String>,
}

impl BalancePanel {
    /// The target under the cursor, by index, when the cursor is on a target.
    pub fn target_at_cursor(&self, lines: usize) -> Option<usize> {
        self.cursor
            .checked_sub(lines)
            .filter(|k| *k < self.request.targets.len())
    }
}

/// Whether a target's values are temperatures (°C in files).
fn is_temperature(figure: &Figure) -> bool {
    matches!(figure, Figure::FreezingPointC | Figure::ServingTempC)
}

/// A target's name as the panel shows it: the file's name, except that the
/// temperature of a frozen share is written in `unit` when that is °F
/// (`frozen_at.8.6°F`), a form the panel also reads back.
pub fn shown_name(figure: &Figure, unit: TempUnit) -> String {
    match (figure, unit) {
        (Figure::FrozenAt { temp_c }, TempUnit::Fahrenheit) => format!(
            "{FROZEN_PREFIX}{}°F",
            trim_number((unit.from_c(*temp_c) * 10.0).round() / 10.0)
        ),
        _ => figure.name(),
    }
}

/// A value of a target's figure (°C) in `unit` when the figure is a temperature
/// shown in °F; `None` when it is shown as it is.
pub fn shown_temperature(figure: &Figure, value: f64, unit: TempUnit) -> Option<f64> {
    (is_temperature(figure) && unit == TempUnit::Fahrenheit).then(|| unit.from_c(value))
}

/// A target's range as the panel shows (and offers to edit) it: temperatures in
/// `unit`, rounded to 0.01.
pub fn shown_range(target: &Target, unit: TempUnit) -> String {
    if !is_temperature(&target.figure) || unit == TempUnit::Celsius {
        return target.range_text();
    }
    let shown = |v: f64| (unit.from_c(v) * 100.0).round() / 100.0;
    Target {
        figure: target.figure.clone(),
        low: target.low.map(shown),
        high: target.high.map(shown),
    }
    .range_text()
}

/// A target's name typed in the panel, in the form files keep: the temperature
/// of a frozen share is read as the rest of the workspace reads temperatures (a
/// bare number in `unit`, or with its unit: `14F`, `-10C`) and written in °C to
/// 0.01 K. Any other name is returned as typed, for the target reader to judge.
pub fn name_in_celsius(name: &str, unit: TempUnit) -> Result<String, String> {
    let name = name.trim();
    match name.strip_prefix(FROZEN_PREFIX) {
        Some(t) => {
            let temp_c = parse_temp(t, unit)?;
            Ok(format!(
                "{FROZEN_PREFIX}{}",
                trim_number((temp_c * 100.0).round() / 100.0)
            ))
        }
        None => Ok(name.to_string()),
    }
}

/// A target's value typed in the panel (`VALUE` or `LOW..HIGH`), in the form
/// files keep: the values of a freezing point or serving temperature are read
/// as temperatures (as [`name_in_celsius`]) and written in °C to 0.001 K;
/// others are returned as typed.
pub fn value_in_celsius(figure: &Figure, value: &str, unit: TempUnit) -> Result<String, String> {
    if !is_temperature(figure) {
        return Ok(value.to_string());
    }
    let in_c = |t: &str| -> Result<String, String> {
        if t.trim().is_empty() {
            Ok(String::new())
        } else {
            parse_temp(t, unit).map(|c| trim_number((c * 1000.0).round() / 1000.0))
        }
    };
    match value.split_once("..") {
        Some((low, high)) => Ok(format!("{}..{}", in_c(low)?, in_c(high)?)),
        None => in_c(value),
    }
}

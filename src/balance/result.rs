//! What balancing answers: the new recipe, each line's amount before and after,
//! every target's achieved value (from a fresh full analysis), what bound the
//! answer, cost figures and, when targets cannot all hold, the conflicts.
//!
//! The field names follow the JSON the command line prints (`name, status,
//! objective, cost, cost_per_kg, lines, targets, conflicts`); the command line
//! owns the final JSON, these types only derive `Serialize` to make it easy.

use serde::Serialize;

use super::Objective;
use crate::analysis::Analysis;
use crate::model::Recipe;

/// Whether the answer meets every target.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Status {
    /// Every target is met by the full model within its tolerance.
    Balanced,
    /// Some targets cannot hold together; see the conflicts. The recipe is the
    /// nearest that can be made within the line rules, and does not meet them.
    Infeasible,
}

impl Status {
    /// The public name: `balanced` or `infeasible`.
    pub fn as_str(self) -> &'static str {
        match self {
            Status::Balanced => "balanced",
            Status::Infeasible => "infeasible",
        }
    }
}

/// One line of the answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LineResult {
    /// Ingredient id.
    pub ingredient: String,
    /// Mass before balancing (g).
    pub before_g: f64,
    /// Mass after balancing (g).
    pub g: f64,
    /// Least cost only, for a line left at zero: how much cheaper (per kg) its
    /// ingredient would have to be before it came in (the reduced cost).
    pub reduced_cost_per_kg: Option<f64>,
}

/// One target of the answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TargetResult {
    /// The public name (`fat_pct`, `frozen_at.-12`, …).
    pub name: String,
    /// Lowest acceptable value asked, in the figure's unit.
    pub low: Option<f64>,
    /// Highest acceptable value asked, in the figure's unit.
    pub high: Option<f64>,
    /// The value in a fresh full analysis of the answer; `None` when the model
    /// has none (no freezing point above -60 °C, say).
    pub value: Option<f64>,
    /// Whether the value lies in `[low, high]` within the figure's tolerance. In
    /// an answer that is not balanced, a target named in a conflict is met only
    /// when its value lies in the range itself (to a tenth of that tolerance).
    pub met: bool,
    /// Whether the value sits at one of the bounds (within tolerance), so that
    /// the target shapes the answer.
    pub binding: bool,
    /// Least cost only, for a binding target: the change in the batch's cost per
    /// unit of the bound that binds (currency per unit of the target, e.g. per
    /// percentage point, per K, per g/L). Positive when raising that bound makes
    /// the batch dearer; for a value target, per unit the value is raised.
    pub shadow_price: Option<f64>,
    /// True for a target the engine added itself (least cost with no size target
    /// keeps the batch's current mass).
    pub implied: bool,
}

/// A set of targets and line rules that cannot hold together.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Conflict {
    /// Names of the members: target names and line rules (`line.<id>.fixed`,
    /// `line.<id>.min_g`, `line.<id>.max_g`, `line.<id>.min_pct`, `line.<id>.max_pct`).
    /// Dropping any one member lets the others hold.
    pub targets: Vec<String>,
    /// Plain-text relaxations, one per member: each alone would let the set hold.
    pub relax: Vec<String>,
}

/// The answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Balance {
    /// Recipe name.
    pub name: String,
    /// Whether every target is met.
    pub status: Status,
    /// The objective used.
    pub objective: Objective,
    /// Cost of the batch (currency), when every line has a price.
    pub cost: Option<f64>,
    /// Cost per kg of the batch (currency/kg), when every line has a price.
    pub cost_per_kg: Option<f64>,
    /// Every line, in recipe order.
    pub lines: Vec<LineResult>,
    /// Every target, in request order (an implied mass target last).
    pub targets: Vec<TargetResult>,
    /// Empty when balanced.
    pub conflicts: Vec<Conflict>,
    /// The new recipe: each line keeps its amount kind (g or mL).
    #[serde(skip)]
    pub recipe: Recipe,
    /// A full analysis of the new recipe (`None` if it weighs nothing).
    #[serde(skip)]
    pub analysis: Option<Analysis>,
}

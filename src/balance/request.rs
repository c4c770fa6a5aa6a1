//! What balancing is asked: targets, what each line may do, the objective and
//! the prices. Plain data with a validating check against the recipe.

use std::collections::BTreeMap;

use serde::Serialize;

use super::BalanceError;
use super::targets::{Figure, Target};
use crate::model::Recipe;

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

    fn check(&self, id: &str) -> Result<(), BalanceError> {
        let bad = |reason: String| BalanceError::BadRule {
            ingredient: id.to_string(),
            reason,
        };
        let given = [
            ("min_g", self.min_g),
            ("max_g", self.max_g),
            ("min_pct", self.min_pct),
            ("max_pct", self.max_pct),
        ];
        if self.fixed && given.iter().any(|(_, v)| v.is_some()) {
            return Err(bad(
                "a fixed line takes no min or max; drop `fixed` or the bounds".into(),
            ));
        }
        for (field, v) in given {
            if let Some(v) = v
                && !(v >= 0.0 && v.is_finite())
            {
                return Err(bad(format!("{field} must be zero or more, not {v}")));
            }
        }
        for (field, v) in [("min_pct", self.min_pct), ("max_pct", self.max_pct)] {
            if v.is_some_and(|v| v > 100.0) {
                return Err(bad(format!("{field} is a share of the mix, 0 to 100 %")));
            }
        }
        if let (Some(lo), Some(hi)) = (self.min_g, self.max_g)
            && lo > hi
        {
            return Err(bad(format!("min_g {lo} is above max_g {hi}")));
        }
        if let (Some(lo), Some(hi)) = (self.min_pct, self.max_pct)
            && lo > hi
        {
            return Err(bad(format!("min_pct {lo} is above max_pct {hi}")));
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

/// A balancing request.
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
    /// Overrides the recipe's share of water frozen at serving (0..1) for `serving_temp_c`.
    pub serving_frozen_fraction: Option<f64>,
}

impl Request {
    /// A request with these targets and defaults for the rest.
    pub fn with_targets(targets: Vec<Target>) -> Request {
        Request {
            targets,
            ..Request::default()
        }
    }

    /// Checks the request against the recipe: targets valid and unique, rules and
    /// `vary` naming ingredients of the recipe's lines, prices valid and complete
    /// for the cost objective.
    pub(crate) fn check(&self, recipe: &Recipe) -> Result<(), BalanceError> {
        let mut names: Vec<String> = Vec::new();
        for t in &self.targets {
            t.validate()?;
            let name = t.figure.name();
            if names.contains(&name) {
                return Err(BalanceError::DuplicateTarget(name));
            }
            names.push(name);
        }
        let line_ids: Vec<&str> = recipe.lines.iter().map(|l| l.ingredient.as_str()).collect();
        let known = |what: &'static str, id: &str| {
            if line_ids.contains(&id) {
                Ok(())
            } else {
                Err(BalanceError::NotALine {
                    what,
                    id: id.to_string(),
                    lines: line_ids.iter().map(|s| s.to_string()).collect(),
                })
            }
        };
        for (id, rule) in &self.rules {
            known("a line rule", id)?;
            rule.check(id)?;
        }
        for id in self.vary.iter().flatten() {
            known("`vary`", id)?;
        }
        for (id, price) in &self.prices_per_kg {
            if !(*price >= 0.0 && price.is_finite()) {
                return Err(BalanceError::BadPrice {
                    ingredient: id.clone(),
                    price: *price,
                });
            }
        }
        if self.objective == Objective::Cost {
            let mut missing: Vec<String> = Vec::new();
            for id in &line_ids {
                if !self.prices_per_kg.contains_key(*id) && !missing.iter().any(|m| m == id) {
                    missing.push(id.to_string());
                }
            }
            if !missing.is_empty() {
                return Err(BalanceError::MissingPrices(missing));
            }
        }
        if let Some(f) = self.serving_frozen_fraction
            && !(0.0..1.0).contains(&f)
        {
            return Err(BalanceError::BadServingShare(f));
        }
        Ok(())
    }

    /// Whether a mass or volume target fixes the size of the batch.
    pub(crate) fn has_size_target(&self) -> bool {
        self.targets
            .iter()
            .any(|t| matches!(t.figure, Figure::MassG | Figure::VolumeMl))
    }
}

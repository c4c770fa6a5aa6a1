//! Checking a request ([`Request`], plain data in [`crate::model::balancing`])
//! against the recipe before balancing starts: targets valid and unique, rules
//! and `vary` naming ingredients of the recipe's lines, prices valid and
//! complete for the cost objective.

use super::BalanceError;
use crate::model::Recipe;
use crate::model::balancing::{Figure, Objective, Request};

impl Request {
    /// Checks the request against the recipe: targets valid and unique, rules and
    /// `vary` naming ingredients of the recipe's lines, prices valid and complete
    /// for the cost objective, and the recipe's serving share in range.
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
            rule.validate().map_err(|reason| BalanceError::BadRule {
                ingredient: id.clone(),
                reason,
            })?;
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
        if let Some(f) = recipe.serving_frozen_fraction
            && !(f > 0.0 && f < 1.0)
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

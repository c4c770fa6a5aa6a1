//! Least-cost figures: the cost of the batch, the shadow price of each binding
//! target and the reduced cost of each unused line.
//!
//! Both come from the solver's multipliers, read as derivatives of the optimal
//! cost (the envelope theorem): a target's shadow price is d(cost)/d(bound) at
//! the bound that binds, in currency per unit of the target; a line at zero has
//! a reduced cost, the multiplier of x ≥ 0, which is how much its price per kg
//! must fall before it would come in.

use std::collections::BTreeMap;

use super::engine::{Problem, Solved};
use super::result::{LineResult, TargetResult};
use super::rows::{RuleKind, Side, Soft};

/// Cost of the batch and per kg (currency), when every line has a price.
pub(crate) fn batch_cost(
    lines: &[LineResult],
    prices_per_kg: &BTreeMap<String, f64>,
) -> (Option<f64>, Option<f64>) {
    let mut cost = 0.0;
    let mut mass_g = 0.0;
    for l in lines {
        let Some(price) = prices_per_kg.get(&l.ingredient) else {
            return (None, None);
        };
        cost += price * l.g / 1000.0;
        mass_g += l.g;
    }
    let per_kg = (mass_g > 0.0).then(|| cost / (mass_g / 1000.0));
    (Some(cost), per_kg)
}

/// Fills in the shadow price of every binding target.
pub(crate) fn shadow_prices(problem: &Problem, solved: &Solved, targets: &mut [TargetResult]) {
    for (index, t) in targets.iter_mut().enumerate() {
        if !t.binding {
            continue;
        }
        let value = t.value.unwrap_or(f64::NAN);
        let builder = problem.builder(&solved.lin);
        // The side that binds: the value's, or the nearer bound of a range. A
        // bound every mix meets (a share of at least 0 %) has no row, and no price.
        let mut best: Option<(f64, f64)> = None;
        for (k, c) in problem.constraints.iter().enumerate() {
            let Soft::Target { index: i, side } = c.soft else {
                continue;
            };
            if i != index || builder.rows(c.soft, c.bound).is_empty() {
                continue;
            }
            let distance = match side {
                Side::Value => 0.0,
                _ => (value - c.bound).abs(),
            };
            if distance > problem.targets[index].figure.tolerance_at(c.bound) {
                // Not the bound the value sits at.
                continue;
            }
            if best.is_none_or(|(d, _)| distance < d) {
                best = Some((distance, problem.bound_derivative(solved, k)));
            }
        }
        t.shadow_price = best.map(|(_, p)| p);
    }
}

/// Fills in the reduced cost (per kg) of every line left at zero that may change.
pub(crate) fn reduced_costs(problem: &Problem, solved: &Solved, lines: &mut [LineResult]) {
    for (j, line) in lines.iter_mut().enumerate() {
        let fixed = problem.constraints.iter().any(|c| {
            matches!(c.soft, Soft::Rule { line, kind: RuleKind::Fixed | RuleKind::NotVaried } if line == j)
        });
        if line.g == 0.0 && !fixed {
            line.reduced_cost_per_kg = Some(solved.solution.reduced_per_g[j] * 1000.0);
        }
    }
}

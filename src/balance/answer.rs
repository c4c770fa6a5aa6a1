//! Turns solved line masses into the answer: the new recipe (fixed lines copied
//! exactly, amounts clamped into their rules, each line in its own amount kind),
//! and every target checked against a fresh full analysis of it. The analysis
//! has the last word: a target is met only if the analysis says so.

use crate::analysis::{Analysis, AnalysisError, Options, analyze};
use crate::catalog::Catalog;
use crate::model::{Amount, Recipe};

use super::BalanceError;
use super::engine::Problem;
use super::result::{LineResult, TargetResult};
use super::rows::{Lin, RuleKind, Side, Soft};
use crate::model::balancing::Figure;

/// The checked answer.
pub(crate) struct Answer {
    /// The new recipe (with the user's own items, as given).
    pub recipe: Recipe,
    /// Its full analysis, `None` if it weighs nothing.
    pub analysis: Option<Analysis>,
    /// Every line.
    pub lines: Vec<LineResult>,
    /// Every target.
    pub targets: Vec<TargetResult>,
}

impl Answer {
    /// Whether the analysis meets every target.
    pub fn all_met(&self) -> bool {
        self.targets.iter().all(|t| t.met)
    }
}

/// Masses below this share of the batch (10 mg per kg, far below what a kitchen
/// scale reads) are taken as zero: an interior-point answer only approaches a
/// bound, and a line left out must read 0 g and carry its reduced cost.
const ZERO_SHARE: f64 = 1e-5;

/// Builds and checks the answer for line masses `x_g` (g). `catalog` already
/// holds the recipe's own items.
pub(crate) fn answer(
    problem: &Problem,
    recipe: &Recipe,
    catalog: &Catalog,
    x_g: &[f64],
) -> Result<Answer, BalanceError> {
    let mut out = recipe.clone();
    let batch_g: f64 = x_g.iter().map(|x| x.max(0.0)).sum();
    for (j, line) in out.lines.iter_mut().enumerate() {
        let model_line = &problem.model.lines[j];
        let mut fixed = false;
        let (mut lo, mut hi) = (0.0_f64, f64::INFINITY);
        for c in &problem.constraints {
            if let Soft::Rule { line, kind } = c.soft
                && line == j
            {
                match kind {
                    RuleKind::Fixed | RuleKind::NotVaried => fixed = true,
                    RuleKind::MinG => lo = lo.max(c.bound),
                    RuleKind::MaxG => hi = hi.min(c.bound),
                    RuleKind::MinPct | RuleKind::MaxPct => {}
                }
            }
        }
        if fixed {
            continue;
        }
        let mut g = x_g[j].max(0.0);
        if g < ZERO_SHARE * batch_g {
            g = 0.0;
        }
        let g = g.clamp(lo, hi.max(lo));
        line.amount = match line.amount {
            Amount::Millilitres(_) => Amount::Millilitres(g / model_line.density_g_ml),
            Amount::Grams(_) => Amount::Grams(g),
        };
    }
    let mut plain = out.clone();
    plain.solutes.clear();
    plain.ingredients.clear();
    let options = Options {
        at_temps_c: problem
            .targets
            .iter()
            .filter_map(|t| match t.figure {
                Figure::FrozenAt { temp_c } => Some(temp_c),
                _ => None,
            })
            .collect(),
        ..Options::default()
    };
    let analysis = match analyze(&plain, catalog, &options) {
        Ok(a) => Some(a),
        Err(AnalysisError::NoMass) => None,
        Err(e) => return Err(e.into()),
    };
    let lines = out
        .lines
        .iter()
        .zip(&problem.model.lines)
        .map(|(line, m)| LineResult {
            ingredient: line.ingredient.clone(),
            before_g: m.before_g,
            g: line.amount.grams(m.density_g_ml),
            reduced_cost_per_kg: None,
        })
        .collect();
    // Which bounds every mix meets (a share of at least 0 %): a value sitting
    // there does not bind. Only figures without the volume are judged, whose
    // rows do not depend on its tangent.
    let no_volume = Lin::default();
    let builder = problem.builder(&no_volume);
    let always_holds = |index: usize, which: Side| {
        !problem.targets[index].figure.uses_volume()
            && problem.constraints.iter().any(|c| {
                matches!(c.soft, Soft::Target { index: i, side } if i == index && side == which)
                    && builder.rows(c.soft, c.bound).is_empty()
            })
    };
    let targets = problem
        .targets
        .iter()
        .zip(&problem.implied)
        .enumerate()
        .map(|(index, (t, implied))| {
            let value = analysis.as_ref().and_then(|a| t.figure.value_in(a));
            let low_holds = always_holds(index, Side::Low);
            let high_holds = always_holds(index, Side::High);
            let near = |bound: Option<f64>, v: f64| {
                bound.is_some_and(|b| (v - b).abs() <= t.figure.tolerance_at(b))
            };
            let (met, binding) = match value {
                Some(v) => {
                    let above = t.low.is_none_or(|l| v >= l - t.figure.tolerance_at(l));
                    let below = t.high.is_none_or(|h| v <= h + t.figure.tolerance_at(h));
                    let binds = (near(t.low, v) && !low_holds) || (near(t.high, v) && !high_holds);
                    (above && below, binds)
                }
                None => (false, false),
            };
            TargetResult {
                name: t.figure.name(),
                low: t.low,
                high: t.high,
                value,
                met,
                binding,
                shadow_price: None,
                implied: *implied,
            }
        })
        .collect();
    Ok(Answer {
        recipe: out,
        analysis,
        lines,
        targets,
    })
}

//! Balancing: Recipe + targets + line rules + objective -> new amounts. Where
//! [`crate::analysis`] answers "what does my recipe do?", balancing answers
//! "what amounts reach my targets?". Pure: no I/O, no clock, deterministic.
//!
//! # Use
//!
//! ```
//! use gelu::balance::{balance, Figure, Request, Status, Target};
//! use gelu::catalog::Catalog;
//! use gelu::model::{Amount, Line, Recipe};
//!
//! let line = |id: &str, g: f64| Line { ingredient: id.into(), amount: Amount::Grams(g) };
//! let recipe = Recipe {
//!     name: "Milk base".into(),
//!     lines: vec![line("whole-milk", 600.0), line("heavy-cream", 200.0), line("sucrose", 150.0)],
//!     ..Recipe::default()
//! };
//! let request = Request::with_targets(vec![
//!     Target::range(Figure::FatPct, 8.0, 9.0),
//!     Target::value(Figure::MassG, 1000.0),
//!     Target::range(Figure::FrozenAt { temp_c: -12.0 }, 0.65, 0.70),
//! ]);
//! let answer = balance(&recipe, Catalog::builtin(), &request).unwrap();
//! assert_eq!(answer.status, Status::Balanced);
//! assert!(answer.targets.iter().all(|t| t.met));
//! ```
//!
//! # Method
//!
//! Each line's mass is a variable. Composition, solute shares and sweetness are
//! ratios of sums over lines, so `value in [low, high]` becomes linear rows
//! (`N·x − low/100·Σx ≥ 0`). The freezing figures are linear too at a fixed
//! temperature: by the ZSR rule the unfrozen water at T is a sum over lines, so
//! "freezing point at least −3 °C" is "unfrozen water at −3 °C at most the
//! water", exactly (the private `rows` module lists every form). Only the volume (and so
//! ABV, g/L and a volume target) is not linear, through the ethanol-water
//! contraction of OIML R 22; it is replaced by its tangent (finite differences
//! of the analysis's own volume) and the programme is solved again at the new
//! point until the tangent agrees with the full volume to 1e-9, a sequential
//! linear/quadratic programme. The volume is homogeneous of degree one and
//! within a few per cent of linear, so the rounds converge fast (two and three
//! rounds on the dilution and liqueur tests); no trust region has been needed,
//! and if the tangent has not settled after 30 rounds balancing says so
//! ([`BalanceError::NotConverged`]) rather than answer.
//!
//! Each programme is solved by the Clarabel interior-point solver:
//! [`Objective::Nearest`] is a quadratic programme, the least sum of squared
//! relative changes; [`Objective::Cost`] is a linear programme. A fresh full
//! [`analysis::analyze`](crate::analysis::analyze) of the answer decides which
//! targets are met, within the tolerances of [`Figure::tolerance`].
//!
//! When the targets and rules cannot all hold, the answer is the nearest recipe
//! that can be made within the line rules (targets violated as little as
//! possible, counted in tolerances), marked [`Status::Infeasible`], with the
//! conflicting sets and the least relaxation of each member (see
//! [`Conflict`]). Never a silent partial answer.

mod answer;
mod conflicts;
mod cost;
mod engine;
mod model;
mod request;
mod result;
mod rows;
mod solve;
mod targets;

use crate::analysis::AnalysisError;
use crate::catalog::{Catalog, CatalogError, suggest_text};
use crate::model::{Amount, Line, Recipe};

pub use crate::model::balancing::{
    COLDEST_C, FROZEN_PREFIX, Figure, LineRule, Objective, Request, SOLUTE_PREFIX, Target,
    TargetError, parse_target, valid_names,
};
pub use result::{Balance, Conflict, LineResult, Status, TargetResult};
pub use targets::Tolerance;

use answer::answer;
use engine::{Elastic, Problem};
use model::Model;
use rows::Soft;

/// The ingredient id that [`reduce_to_strength`] varies.
pub const WATER_ID: &str = "water";

/// Why balancing could not start or finish.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum BalanceError {
    /// The recipe cannot be analysed (unknown ingredient, bad amount, …).
    #[error(transparent)]
    Analysis(#[from] AnalysisError),
    /// The recipe's own solutes or ingredients are invalid.
    #[error(transparent)]
    Catalog(#[from] CatalogError),
    /// A target is invalid.
    #[error(transparent)]
    Target(#[from] TargetError),
    /// Two targets on one figure.
    #[error("the target `{0}` is given twice; give each figure once")]
    DuplicateTarget(String),
    /// A solute share names a solute nobody knows.
    #[error("`solutes_pct.{id}`: no solute has the id `{id}`{}", suggest_text(.suggestions))]
    UnknownSolute {
        /// The unknown id.
        id: String,
        /// The nearest known ids.
        suggestions: Vec<String>,
    },
    /// A rule or `vary` names an ingredient with no line in the recipe.
    #[error("{what} names `{id}`, which no line of the recipe uses; the lines are: {}", .lines.join(", "))]
    NotALine {
        /// Where the id was given.
        what: &'static str,
        /// The id.
        id: String,
        /// The recipe's ingredient ids.
        lines: Vec<String>,
    },
    /// A line rule makes no sense.
    #[error("the rule for `{ingredient}`: {reason}")]
    BadRule {
        /// The ingredient id.
        ingredient: String,
        /// What is wrong and what would be valid.
        reason: String,
    },
    /// A price is negative or not a number.
    #[error("the price of `{ingredient}` must be zero or more per kg, not {price}")]
    BadPrice {
        /// The ingredient id.
        ingredient: String,
        /// The price given.
        price: f64,
    },
    /// Least cost without a price for every line.
    #[error("least cost needs a price per kg for every line; missing: {}", .0.join(", "))]
    MissingPrices(Vec<String>),
    /// The serving share is out of range.
    #[error("the serving share of frozen water must lie between 0 and 1, not {0}")]
    BadServingShare(f64),
    /// Nothing to scale from.
    #[error("the recipe weighs nothing: give amounts, or a mass_g or volume_ml target")]
    NoMass,
    /// The solver failed (a numerical problem, not a conflict).
    #[error("balancing failed inside the solver ({0}); nothing was changed")]
    Solver(String),
    /// The volume's tangent did not settle.
    #[error("balancing did not settle after {0} rounds; nothing was changed")]
    NotConverged(usize),
}

/// Balances `recipe` as `request` asks, with the built-in or any `catalog`
/// (the recipe's own solutes and ingredients are layered on top, as in
/// [`crate::analysis::analyze`]). Returns the answer, balanced or with its
/// conflicts; an error only when the request itself is invalid or the solver fails.
pub fn balance(
    recipe: &Recipe,
    catalog: &Catalog,
    request: &Request,
) -> Result<Balance, BalanceError> {
    request.check(recipe)?;
    if recipe.solutes.is_empty() && recipe.ingredients.is_empty() {
        run(recipe, catalog, request)
    } else {
        let extended = catalog.with_additions(&recipe.solutes, &recipe.ingredients)?;
        run(recipe, &extended, request)
    }
}

/// The quick action for spirits and liqueurs: vary the water only (a water line
/// is added at 0 g if there is none) so that the strength is `abv_pct`
/// (% vol at 20 °C). Ethanol is conserved; the answer says the water and
/// volume. Cautions on spirits (flammable vapour; add spirits off the heat)
/// are in the answer's analysis.
pub fn reduce_to_strength(
    recipe: &Recipe,
    catalog: &Catalog,
    abv_pct: f64,
) -> Result<Balance, BalanceError> {
    let mut r = recipe.clone();
    if !r.lines.iter().any(|l| l.ingredient == WATER_ID) {
        r.lines.push(Line {
            ingredient: WATER_ID.to_string(),
            amount: Amount::Grams(0.0),
        });
    }
    let request = Request {
        targets: vec![Target::value(Figure::AbvPct, abv_pct)],
        vary: Some(vec![WATER_ID.to_string()]),
        ..Request::default()
    };
    balance(&r, catalog, &request)
}

fn run(recipe: &Recipe, catalog: &Catalog, request: &Request) -> Result<Balance, BalanceError> {
    for t in &request.targets {
        if let Figure::SolutePct(id) = &t.figure
            && catalog.solute(id).is_none()
        {
            return Err(BalanceError::UnknownSolute {
                id: id.clone(),
                suggestions: catalog.nearest_solutes(id),
            });
        }
    }
    let mut plain = recipe.clone();
    plain.solutes.clear();
    plain.ingredients.clear();
    let model = Model::new(&plain, catalog)?;
    let size = request.targets.iter().find_map(|t| match t.figure {
        Figure::MassG | Figure::VolumeMl => t.high.or(t.low),
        _ => None,
    });
    let mass_ref_g = if model.mass_ref_g > 0.0 {
        model.mass_ref_g
    } else {
        size.filter(|s| *s > 0.0).ok_or(BalanceError::NoMass)?
    };
    if model.len() == 0 {
        return Err(BalanceError::NoMass);
    }
    let problem = Problem::new(&model, request, mass_ref_g)?;
    let all = problem.all();
    let finish = |ans: answer::Answer, status, solved: Option<&engine::Solved>, conflicts| {
        build(&problem, request, recipe, ans, status, solved, conflicts)
    };

    if let Some(solved) = problem.solve(&all, Elastic::None)? {
        let ans = answer(&problem, recipe, catalog, &solved.solution.x_g)?;
        if ans.all_met() {
            return Ok(finish(ans, Status::Balanced, Some(&solved), Vec::new()));
        }
    }

    // The targets and rules cannot all hold (or the answer missed a tolerance).
    let Some(near) = problem.solve(&all, Elastic::Targets)? else {
        // The line rules conflict among themselves: nothing can be made.
        let rules: Vec<usize> = all
            .iter()
            .copied()
            .filter(|k| matches!(problem.constraints[*k].soft, Soft::Rule { .. }))
            .collect();
        let lin = problem.tangent(&problem.start_g);
        let conflicts = conflicts::explain(&problem, &lin, &problem.start_g, &rules);
        let before: Vec<f64> = model.lines.iter().map(|l| l.before_g).collect();
        let ans = answer(&problem, recipe, catalog, &before)?;
        return Ok(finish(ans, Status::Infeasible, None, conflicts));
    };
    let ans = answer(&problem, recipe, catalog, &near.solution.x_g)?;
    // Balanced only when the programme itself nearly holds (the hard solve
    // stumbled, or missed a tolerance the elastic one meets): rows that cannot
    // hold by a fifth of a tolerance or more are a conflict even when the nearest
    // recipe lands within each figure's tolerance (a freezing point only
    // approached as one line grows without end, which the least violation
    // reaches only at the largest batch allowed).
    if near.solution.total_violation <= engine::NEARLY_HOLDS
        && !near.solution.at_most_mass
        && ans.all_met()
    {
        return Ok(finish(ans, Status::Balanced, Some(&near), Vec::new()));
    }
    let mut conflicts = conflicts::explain(&problem, &near.lin, &near.solution.x_g, &all);
    if conflicts.is_empty() {
        // The programme holds, yet the full analysis misses a target's tolerance.
        let unmet: Vec<&result::TargetResult> = ans.targets.iter().filter(|t| !t.met).collect();
        conflicts.push(Conflict {
            targets: unmet.iter().map(|t| t.name.clone()).collect(),
            relax: unmet
                .iter()
                .map(|t| {
                    format!(
                        "{}: the engine could not bring the full model within tolerance (it reached {}); widen the range a little",
                        t.name,
                        t.value.map_or("no value".into(), |v| format!("{v:.3}"))
                    )
                })
                .collect(),
        });
    }
    Ok(finish(ans, Status::Infeasible, None, conflicts))
}

fn build(
    problem: &Problem,
    request: &Request,
    recipe: &Recipe,
    ans: answer::Answer,
    status: Status,
    solved: Option<&engine::Solved>,
    conflicts: Vec<Conflict>,
) -> Balance {
    let answer::Answer {
        recipe: new_recipe,
        analysis,
        mut lines,
        mut targets,
    } = ans;
    if status == Status::Infeasible {
        // A target in a conflict is met only inside its range itself: the
        // tolerance absorbs the solver's rounding, not a target that cannot hold.
        for (t, asked) in targets.iter_mut().zip(&problem.targets) {
            if conflicts.iter().any(|c| c.targets.contains(&t.name)) {
                let eps = |b: f64| asked.figure.tolerance_at(b) / 10.0;
                t.met = t.value.is_some_and(|v| {
                    t.low.is_none_or(|l| v >= l - eps(l)) && t.high.is_none_or(|h| v <= h + eps(h))
                });
            }
        }
    }
    let (cost, cost_per_kg) = cost::batch_cost(&lines, &request.prices_per_kg);
    if let (Objective::Cost, Status::Balanced, Some(solved)) = (request.objective, status, solved) {
        cost::shadow_prices(problem, solved, &mut targets);
        cost::reduced_costs(problem, solved, &mut lines);
    }
    Balance {
        name: recipe.name.clone(),
        status,
        objective: request.objective,
        cost,
        cost_per_kg,
        lines,
        targets,
        conflicts,
        recipe: new_recipe,
        analysis,
    }
}

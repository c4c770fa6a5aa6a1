//! The balancing problem put together: the constraints the maker set, the
//! objective, and the sequential solve that repeats a linear or quadratic
//! programme until the tangent of the volume agrees with the full volume.

use super::BalanceError;
use super::model::Model;
use super::rows::{Constraint, Lin, Row, RowBuilder, RuleKind, Sense, Side, Soft};
use super::solve::{Goal, Outcome, Program, ProgramRow, Solution, solve};
use crate::model::balancing::{Figure, Target};
use crate::model::balancing::{Objective, Request};

/// Most repeats of the programme while the volume's tangent settles.
const MAX_ROUNDS: usize = 30;
/// The tangent has settled when it is this close to the full volume (relative).
const VOLUME_SETTLED: f64 = 1e-9;
/// Lines below this share of the mix (zero lines included) are measured against it.
pub(crate) const SMALL_LINE_SHARE: f64 = 0.005;
/// A batch weighs at least this share of the reference mass.
const FLOOR_SHARE: f64 = 1e-3;
/// A set of constraints counts as holding together when the least total
/// violation is below this many steps ([`Figure::step`]): a thousandth of a
/// percentage point, of a kelvin.
pub(crate) const FEASIBLE_VIOLATION: f64 = 0.01;
/// The largest total violation of the programme's rows (in steps of their
/// figures; half a step is a nonlinear figure's tolerance) at which an answer
/// found by the elastic solve may still count as balanced.
pub(crate) const NEARLY_HOLDS: f64 = 0.1;
/// A total violation (in steps) too small to be anything but the solver's own
/// rounding.
const VANISHING_VIOLATION: f64 = 1e-6;
/// Where violations are measured (when targets cannot all hold), the batch may
/// grow to this many times the recipe or the size asked for, and no further: a
/// target only approached as a line grows without end (a freezing point more milk
/// only nears, all of the water frozen) then misses by a measurable amount
/// instead of a vanishing one. Answers that hold are never limited by it.
const MOST_MASS: f64 = 100.0;
/// How much further than its least violation (in steps of its figure) a target
/// that cannot hold may miss in the nearest recipe shown, when the rows miss by
/// more than [`NEARLY_HOLDS`], to keep that recipe near the one asked about.
/// Half a step is the tolerance of the nonlinear figures.
const NEAR_STEPS: f64 = 0.5;
/// The step of a line rule in g, as a share of the reference mass.
const RULE_STEP_SHARE: f64 = 1e-3;
/// The step of a line rule on a share (percentage points).
const RULE_STEP_PCT: f64 = 0.1;

/// Which rows may be violated at a price.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Elastic {
    /// None.
    None,
    /// Targets only (line rules stay hard).
    Targets,
    /// Every constraint.
    All,
}

/// A solved round: the solution, the tangent it was solved with, and which
/// constraint each row belongs to.
pub(crate) struct Solved {
    /// The solution.
    pub solution: Solution,
    /// The tangent of the volume used.
    pub lin: Lin,
    /// For each programme row, the index of its constraint.
    pub owners: Vec<usize>,
}

/// The problem: the model, the targets (an implied one last), the constraints.
pub(crate) struct Problem<'a, 'c> {
    /// The model.
    pub model: &'a Model<'c>,
    /// The targets, request order, then any implied one.
    pub targets: Vec<Target>,
    /// Whether each target was added by the engine.
    pub implied: Vec<bool>,
    /// Every constraint with the bound asked.
    pub constraints: Vec<Constraint>,
    /// The objective.
    pub goal: Goal,
    /// Whether any target needs the volume.
    pub needs_volume: bool,
    /// Reference mass (g).
    pub mass_ref_g: f64,
    /// The unit of temperatures in the advice of conflicts.
    pub advice_unit: crate::model::TempUnit,
    /// Largest batch (g) where violations are measured: [`MOST_MASS`] times the
    /// larger of the reference mass and the size asked for.
    pub most_g: f64,
    /// Where the solve starts (g).
    pub start_g: Vec<f64>,
}

/// The scale of the recipe a size target asks for: its mass or volume over the
/// recipe's, kept at 1 (the batch as it is) wherever the target's range allows.
/// The least change is measured against the recipe at this scale: a free scale
/// would let every change shrink with the batch, and the answer to "fat 8-9 %,
/// at most 2 kg" was a 55 g batch.
fn size_ref(model: &Model, targets: &[Target]) -> f64 {
    let before: Vec<f64> = model.lines.iter().map(|l| l.before_g).collect();
    let mut t0 = 1.0_f64;
    for t in targets {
        let now = match t.figure {
            Figure::MassG => before.iter().sum(),
            Figure::VolumeMl => model.volume_evaluator().volume_ml(&before),
            _ => continue,
        };
        if !(now > 0.0) {
            continue;
        }
        if let Some(low) = t.low {
            t0 = t0.max(low / now);
        }
        if let Some(high) = t.high {
            t0 = t0.min(high / now);
        }
    }
    t0
}

impl<'a, 'c> Problem<'a, 'c> {
    /// Resolves a request against the model.
    pub fn new(
        model: &'a Model<'c>,
        request: &Request,
        mass_ref_g: f64,
    ) -> Result<Problem<'a, 'c>, BalanceError> {
        let mut targets = request.targets.clone();
        let mut implied = vec![false; targets.len()];
        if request.objective == Objective::Cost && !request.has_size_target() {
            // Least cost of nothing is nothing: keep the batch's mass.
            targets.push(Target::value(Figure::MassG, model.mass_ref_g));
            implied.push(true);
        }
        let mut constraints = Vec::new();
        for (index, t) in targets.iter().enumerate() {
            let mut push = |side, bound| {
                constraints.push(Constraint {
                    soft: Soft::Target { index, side },
                    bound,
                })
            };
            match (t.low, t.high) {
                (Some(l), Some(h)) if l == h => push(Side::Value, l),
                (low, high) => {
                    if let Some(l) = low {
                        push(Side::Low, l);
                    }
                    if let Some(h) = high {
                        push(Side::High, h);
                    }
                }
            }
        }
        let mut counted = Vec::with_capacity(model.len());
        for (line, l) in model.lines.iter().enumerate() {
            let rule = request
                .rules
                .get(&l.ingredient)
                .cloned()
                .unwrap_or_default();
            let varied = request
                .vary
                .as_ref()
                .is_none_or(|v| v.iter().any(|id| id == &l.ingredient));
            let mut push = |kind, bound| {
                constraints.push(Constraint {
                    soft: Soft::Rule { line, kind },
                    bound,
                })
            };
            if rule.fixed {
                push(RuleKind::Fixed, l.before_g);
            } else if !varied {
                push(RuleKind::NotVaried, l.before_g);
            } else {
                let given = [
                    (RuleKind::MinG, rule.min_g),
                    (RuleKind::MaxG, rule.max_g),
                    (RuleKind::MinPct, rule.min_pct),
                    (RuleKind::MaxPct, rule.max_pct),
                ];
                for (kind, v) in given {
                    if let Some(v) = v {
                        push(kind, v);
                    }
                }
            }
            counted.push(!rule.fixed && varied);
        }
        let goal = match request.objective {
            Objective::Nearest => {
                let t0 = size_ref(model, &targets);
                Goal::Nearest {
                    reference_g: model.lines.iter().map(|l| t0 * l.before_g).collect(),
                    scale_g: model
                        .lines
                        .iter()
                        .map(|l| t0 * l.before_g.max(SMALL_LINE_SHARE * mass_ref_g))
                        .collect(),
                    counted,
                }
            }
            Objective::Cost => Goal::Linear {
                per_g: model
                    .lines
                    .iter()
                    .map(|l| {
                        request
                            .prices_per_kg
                            .get(&l.ingredient)
                            .copied()
                            .unwrap_or(0.0)
                            / 1000.0
                    })
                    .collect(),
            },
        };
        let before: Vec<f64> = model.lines.iter().map(|l| l.before_g).collect();
        let start_g = if before.iter().sum::<f64>() > 0.0 {
            before
        } else {
            vec![mass_ref_g / model.len().max(1) as f64; model.len()]
        };
        // The size asked for, in g (a volume at a density of 1.5 g/mL at most:
        // syrups and mixes are lighter).
        let size_g = targets
            .iter()
            .filter_map(|t| {
                let v = t.high.or(t.low)?;
                match t.figure {
                    Figure::MassG => Some(v),
                    Figure::VolumeMl => Some(1.5 * v),
                    _ => None,
                }
            })
            .fold(0.0_f64, f64::max);
        Ok(Problem {
            advice_unit: request.advice_unit,
            most_g: MOST_MASS * mass_ref_g.max(size_g),
            needs_volume: targets.iter().any(|t| t.figure.uses_volume()),
            model,
            targets,
            implied,
            constraints,
            goal,
            mass_ref_g,
            start_g,
        })
    }

    /// The row builder for a tangent.
    pub fn builder<'b>(&'b self, lin: &'b Lin) -> RowBuilder<'b, 'c> {
        RowBuilder {
            model: self.model,
            targets: &self.targets,
            lin,
        }
    }

    /// The tangent of the volume at `x_g` (empty when no target needs it).
    pub fn tangent(&self, x_g: &[f64]) -> Lin {
        if !self.needs_volume {
            return Lin::default();
        }
        let mut eval = self.model.volume_evaluator();
        let (v, grad) = eval.volume_and_gradient(x_g);
        let offset = v - grad.iter().zip(x_g).map(|(g, x)| g * x).sum::<f64>();
        Lin { grad, offset }
    }

    /// The size of one step of a constraint's rows near `x_g`, in row units
    /// per gram of batch.
    fn step_sizes(&self, builder: &RowBuilder, c: &Constraint, x_g: &[f64]) -> Vec<f64> {
        let total: f64 = x_g.iter().sum::<f64>().max(self.mass_ref_g * FLOOR_SHARE);
        let floor = 1e-12;
        let per_g = |v: f64| v / total;
        match c.soft {
            Soft::Rule { kind, .. } => {
                let size = match kind {
                    RuleKind::MinPct | RuleKind::MaxPct => total / 100.0 * RULE_STEP_PCT,
                    _ => self.mass_ref_g * RULE_STEP_SHARE,
                };
                vec![per_g(size).max(floor)]
            }
            Soft::Target { index, .. } => {
                let step = self.targets[index].figure.step(c.bound);
                let d = builder.d_rows_d_bound(c.soft, c.bound, x_g);
                // A row that does not move with the bound (the glass limit of the
                // serving temperature) is weighed like its target's first row.
                let first = d.first().map_or(0.0, |v| v.abs());
                d.into_iter()
                    .map(|v| per_g(if v.abs() > 0.0 { v.abs() } else { first } * step).max(floor))
                    .collect()
            }
        }
    }

    /// Programme rows for a set of constraints (by index) at a tangent.
    pub fn program_rows(
        &self,
        lin: &Lin,
        which: &[usize],
        bounds: &[(usize, f64)],
        elastic: Elastic,
        x_ref: &[f64],
    ) -> (Vec<ProgramRow>, Vec<usize>) {
        let builder = self.builder(lin);
        let mut rows = Vec::new();
        let mut owners = Vec::new();
        for &k in which {
            let mut c = self.constraints[k];
            if let Some((_, b)) = bounds.iter().find(|(i, _)| *i == k) {
                c.bound = *b;
            }
            let soft_rows: Vec<Row> = builder.rows(c.soft, c.bound);
            let is_elastic = match elastic {
                Elastic::None => false,
                Elastic::Targets => matches!(c.soft, Soft::Target { .. }),
                Elastic::All => true,
            };
            let sizes = if is_elastic {
                self.step_sizes(&builder, &c, x_ref)
            } else {
                Vec::new()
            };
            for (r, row) in soft_rows.into_iter().enumerate() {
                let elastic =
                    is_elastic.then(|| sizes.get(r).or(sizes.first()).copied().unwrap_or(1.0));
                rows.push(ProgramRow { row, elastic });
                owners.push(k);
            }
        }
        (rows, owners)
    }

    /// Solves once at a fixed tangent. With elastic rows and a goal, the least
    /// violation of each row is found first (per gram of batch), then the goal
    /// is made least with each row relaxed by exactly that much.
    pub fn solve_at(
        &self,
        lin: &Lin,
        which: &[usize],
        bounds: &[(usize, f64)],
        elastic: Elastic,
        goal: &Goal,
        x_ref: &[f64],
    ) -> (Outcome, Vec<usize>) {
        let (rows, owners) = self.program_rows(lin, which, bounds, elastic, x_ref);
        let program = |rows, goal| Program {
            mass_ref_g: self.mass_ref_g,
            floor_g: FLOOR_SHARE * self.mass_ref_g,
            most_g: self.most_g,
            rows,
            goal,
            n: self.model.len(),
        };
        if elastic == Elastic::None || matches!(goal, Goal::Feasibility) {
            return (solve(&program(&rows, goal)), owners);
        }
        let least = match solve(&program(&rows, &Goal::Feasibility)) {
            Outcome::Solved(s) => s,
            other => return (other, owners),
        };
        // Relax each row by its least violation plus a millionth of a step. When
        // the rows truly cannot hold, a row that misses gets up to NEAR_STEPS
        // more, so that the goal has room and the nearest recipe stays near the
        // one asked about (the least violation alone is often reached only by an
        // odd, tiny batch).
        let cannot_hold = least.total_violation > NEARLY_HOLDS || least.at_most_mass;
        let mut relaxed = Vec::new();
        let mut relaxed_owners = Vec::new();
        for ((pr, v), owner) in rows.iter().zip(&least.violation_per_g).zip(&owners) {
            let slack = pr.elastic.map_or(0.0, |step| {
                let room = if cannot_hold && *v > 1e-6 * step {
                    NEAR_STEPS
                } else {
                    0.0
                };
                v * (1.0 + 1e-6) + (1e-6 + room) * step
            });
            let shifted = |sense, by: f64| ProgramRow {
                row: Row {
                    coef: pr.row.coef.iter().map(|c| c + by).collect(),
                    constant: pr.row.constant,
                    sense,
                },
                elastic: None,
            };
            match pr.row.sense {
                Sense::Le => relaxed.push(shifted(Sense::Le, -slack)),
                Sense::Ge => relaxed.push(shifted(Sense::Ge, slack)),
                Sense::Eq if slack == 0.0 => relaxed.push(shifted(Sense::Eq, 0.0)),
                Sense::Eq => {
                    relaxed.push(shifted(Sense::Le, -slack));
                    relaxed.push(shifted(Sense::Ge, slack));
                    relaxed_owners.push(*owner);
                }
            }
            relaxed_owners.push(*owner);
        }
        match solve(&program(&relaxed, goal)) {
            Outcome::Solved(mut s) => {
                s.total_violation = least.total_violation;
                s.at_most_mass = least.at_most_mass;
                (Outcome::Solved(s), relaxed_owners)
            }
            // The least violation alone is still an answer.
            _ => (Outcome::Solved(least), owners),
        }
    }

    /// Solves with every constraint in `which`, repeating while the volume's
    /// tangent settles. `Ok(None)` when the hard rows cannot all hold (or, with
    /// no elastic rows, when the solver gives up: the elastic path decides then).
    pub fn solve(&self, which: &[usize], elastic: Elastic) -> Result<Option<Solved>, BalanceError> {
        let mut x = self.start_g.clone();
        for _ in 0..MAX_ROUNDS {
            let lin = self.tangent(&x);
            let (outcome, owners) = self.solve_at(&lin, which, &[], elastic, &self.goal, &x);
            let solution = match outcome {
                Outcome::Solved(s) => s,
                Outcome::Infeasible => return Ok(None),
                // Hard rows only: the elastic path that follows decides.
                Outcome::Failed(_) if elastic == Elastic::None => return Ok(None),
                Outcome::Failed(why) => return Err(BalanceError::Solver(why)),
            };
            if !self.needs_volume {
                return Ok(Some(Solved {
                    solution,
                    lin,
                    owners,
                }));
            }
            let full = self.model.volume_evaluator().volume_ml(&solution.x_g);
            let tangent = lin
                .grad
                .iter()
                .zip(&solution.x_g)
                .map(|(g, x)| g * x)
                .sum::<f64>()
                + lin.offset;
            if (full - tangent).abs() <= VOLUME_SETTLED * full.abs().max(1.0) {
                return Ok(Some(Solved {
                    solution,
                    lin,
                    owners,
                }));
            }
            x = solution.x_g;
        }
        Err(BalanceError::NotConverged(MAX_ROUNDS))
    }

    /// Whether the constraints `which` (with bounds overridden by `bounds`) can
    /// hold together at a fixed tangent: the least total violation, every row
    /// elastic, is under [`FEASIBLE_VIOLATION`] tolerances. `None` when the
    /// solver could not tell (it stalled): the caller decides which way is the
    /// careful one.
    pub fn feasible(
        &self,
        lin: &Lin,
        which: &[usize],
        bounds: &[(usize, f64)],
        x_ref: &[f64],
    ) -> Option<bool> {
        let (outcome, _) =
            self.solve_at(lin, which, bounds, Elastic::All, &Goal::Feasibility, x_ref);
        match outcome {
            // A violation that only shrinks as the batch grows without end is
            // not a way for them to hold.
            Outcome::Solved(s) => Some(
                s.total_violation <= FEASIBLE_VIOLATION
                    && !(s.at_most_mass && s.total_violation > VANISHING_VIOLATION),
            ),
            // Elastic rows always admit a point; only the mass floor is hard.
            Outcome::Infeasible => Some(false),
            Outcome::Failed(_) => None,
        }
    }

    /// The indices of every constraint.
    pub fn all(&self) -> Vec<usize> {
        (0..self.constraints.len()).collect()
    }

    /// The derivative of the objective with respect to the bound of constraint
    /// `k` at a solution (objective units per unit of the bound).
    pub fn bound_derivative(&self, solved: &Solved, k: usize) -> f64 {
        let c = self.constraints[k];
        let builder = self.builder(&solved.lin);
        let d = builder.d_rows_d_bound(c.soft, c.bound, &solved.solution.x_g);
        let duals: Vec<f64> = solved
            .owners
            .iter()
            .zip(&solved.solution.dual)
            .filter(|(o, _)| **o == k)
            .map(|(_, m)| *m)
            .collect();
        duals.iter().zip(&d).map(|(m, d)| m * d).sum()
    }
}

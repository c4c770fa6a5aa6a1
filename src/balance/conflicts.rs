//! When targets and line rules cannot all hold: which ones conflict, and the
//! least relaxation of each that would let the others hold.
//!
//! A smallest set is found by a deletion filter over an elastic formulation
//! (Chinneck & Dravnieks 1991): starting from every constraint, drop each in
//! turn and keep it dropped if the rest still cannot hold; what remains is an
//! irreducible infeasible subset (dropping any one member lets the others
//! hold). Line rules are tried first, so the set names targets where it can.
//! After one set is found its members are set aside and the search repeats,
//! up to [`MAX_CONFLICTS`] sets. The least relaxation of a member is found by
//! bisection on its bound between the value asked and its loosest value, with
//! the other members and every constraint outside the sets held.

use super::BalanceError;
use super::engine::Problem;
use super::result::Conflict;
use super::rows::{Constraint, Lin, RuleKind, Side, Soft};
use crate::model::balancing::with_unit;
use crate::model::units::trim_number;

/// Most conflicting sets reported.
pub(crate) const MAX_CONFLICTS: usize = 4;
/// Most bisection steps for one relaxation.
const MAX_STEPS: usize = 60;

/// The public name of a constraint: a target's name or `line.<id>.<rule>`.
pub(crate) fn constraint_name(problem: &Problem, c: &Constraint) -> String {
    match c.soft {
        Soft::Target { index, .. } => problem.targets[index].figure.name(),
        Soft::Rule { line, kind } => {
            let rule = match kind {
                RuleKind::Fixed | RuleKind::NotVaried => "fixed",
                RuleKind::MinG => "min_g",
                RuleKind::MaxG => "max_g",
                RuleKind::MinPct => "min_pct",
                RuleKind::MaxPct => "max_pct",
            };
            format!("line.{}.{rule}", problem.model.lines[line].ingredient)
        }
    }
}

/// Finds the conflicting sets among `candidates` (constraint indices) at a
/// fixed tangent of the volume, with a relaxation for each member.
pub(crate) fn explain(
    problem: &Problem,
    lin: &Lin,
    x_ref: &[f64],
    candidates: &[usize],
) -> Result<Vec<Conflict>, BalanceError> {
    // Rules first, so the filter drops them first and the sets name targets.
    let mut remaining: Vec<usize> = candidates
        .iter()
        .copied()
        .filter(|k| matches!(problem.constraints[*k].soft, Soft::Rule { .. }))
        .chain(
            candidates
                .iter()
                .copied()
                .filter(|k| matches!(problem.constraints[*k].soft, Soft::Target { .. })),
        )
        .collect();
    let mut sets: Vec<Vec<usize>> = Vec::new();
    while sets.len() < MAX_CONFLICTS && !problem.feasible(lin, &remaining, &[], x_ref)? {
        let mut set = remaining.clone();
        for k in remaining.iter() {
            let without: Vec<usize> = set.iter().copied().filter(|i| i != k).collect();
            if !problem.feasible(lin, &without, &[], x_ref)? {
                set = without;
            }
        }
        if set.is_empty() {
            break;
        }
        remaining.retain(|k| !set.contains(k));
        sets.push(set);
    }
    let mut conflicts = Vec::new();
    for set in &sets {
        let mut names: Vec<String> = Vec::new();
        let mut relax = Vec::new();
        for &member in set {
            let name = constraint_name(problem, &problem.constraints[member]);
            if !names.contains(&name) {
                names.push(name);
            }
            let base: Vec<usize> = remaining
                .iter()
                .copied()
                .chain(set.iter().copied().filter(|k| *k != member))
                .collect();
            let found = least_relaxation(problem, lin, x_ref, &base, member)?;
            relax.push(advice(problem, member, found));
        }
        conflicts.push(Conflict {
            targets: names,
            relax,
        });
    }
    Ok(conflicts)
}

/// The loosest values of a constraint's bound, in the order to try.
fn extremes(problem: &Problem, c: &Constraint) -> Vec<f64> {
    let big = 1e4 * problem.mass_ref_g;
    match c.soft {
        Soft::Target { index, side } => {
            let (lo, hi) = problem.targets[index].figure.extremes(problem.mass_ref_g);
            match side {
                Side::Low => vec![lo],
                Side::High => vec![hi],
                Side::Value => vec![lo, hi],
            }
        }
        Soft::Rule { kind, .. } => match kind {
            RuleKind::MinG | RuleKind::MinPct => vec![0.0],
            RuleKind::MaxG => vec![big],
            RuleKind::MaxPct => vec![100.0],
            RuleKind::Fixed | RuleKind::NotVaried => vec![0.0, big],
        },
    }
}

/// How finely a relaxed bound is found, in its own unit.
fn resolution(problem: &Problem, c: &Constraint) -> f64 {
    match c.soft {
        Soft::Target { index, .. } => {
            0.25 * problem.targets[index]
                .figure
                .tolerance_at(c.bound)
                .max(1e-6)
        }
        Soft::Rule { kind, .. } => match kind {
            RuleKind::MinPct | RuleKind::MaxPct => 1e-3,
            _ => 1e-4 * problem.mass_ref_g,
        },
    }
}

/// The bound nearest the one asked at which `member` holds together with
/// `base`; `None` when no value does (another conflict holds as well).
fn least_relaxation(
    problem: &Problem,
    lin: &Lin,
    x_ref: &[f64],
    base: &[usize],
    member: usize,
) -> Result<Option<f64>, BalanceError> {
    let c = problem.constraints[member];
    let with: Vec<usize> = base.iter().copied().chain([member]).collect();
    let holds = |bound: f64| problem.feasible(lin, &with, &[(member, bound)], x_ref);
    let res = resolution(problem, &c);
    let mut best: Option<f64> = None;
    for extreme in extremes(problem, &c) {
        let span = extreme - c.bound;
        if span == 0.0 {
            continue;
        }
        // Outward from the bound in doubling steps, so that the nearest value that
        // holds is found even where values farther out do not hold again (a
        // freezing point that must move a little colder cannot move to -60 °C).
        let (mut bad, mut found) = (c.bound, None);
        let mut step = res;
        loop {
            let at = if step >= span.abs() {
                extreme
            } else {
                c.bound + span.signum() * step
            };
            if holds(at)? {
                found = Some(at);
                break;
            }
            if at == extreme {
                break;
            }
            bad = at;
            step *= 2.0;
        }
        let Some(mut good) = found else {
            continue;
        };
        for _ in 0..MAX_STEPS {
            if (good - bad).abs() <= res {
                break;
            }
            let mid = 0.5 * (bad + good);
            if holds(mid)? {
                good = mid;
            } else {
                bad = mid;
            }
        }
        if best.is_none_or(|b| (good - c.bound).abs() < (b - c.bound).abs()) {
            best = Some(good);
        }
    }
    Ok(best)
}

/// `v` rounded to `decimals` away from `asked` (so the advice is enough).
fn round_away(v: f64, asked: f64, decimals: usize) -> String {
    let scale = 10f64.powi(decimals as i32);
    let r = if v < asked {
        (v * scale).floor() / scale
    } else {
        (v * scale).ceil() / scale
    };
    format!("{r:.decimals$}")
}

/// Plain-text advice for relaxing one member.
fn advice(problem: &Problem, member: usize, found: Option<f64>) -> String {
    let c = problem.constraints[member];
    let name = constraint_name(problem, &c);
    let Some(v) = found else {
        let what = match c.soft {
            Soft::Target { index, .. } => {
                problem.targets[index].figure.label_in(problem.advice_unit)
            }
            Soft::Rule { .. } => name,
        };
        return format!(
            "relaxing {what} alone does not resolve this: other targets or rules conflict as well"
        );
    };
    match c.soft {
        Soft::Target { index, side } => {
            let figure = &problem.targets[index].figure;
            let shown = problem.advice_unit;
            let label = figure.label_in(shown);
            // Temperatures in the unit asked (a monotonic map, so rounding away
            // from the bound stays on the safe side).
            let (v, bound, unit) = if figure.is_temperature() {
                (shown.from_c(v), shown.from_c(c.bound), shown.symbol())
            } else {
                (v, c.bound, figure.unit())
            };
            let new = with_unit(&round_away(v, bound, figure.decimals()), unit);
            let asked = with_unit(&trim_number(bound), unit);
            match side {
                Side::Low => {
                    format!("lower the minimum for {label} to {new} (asked at least {asked})")
                }
                Side::High => {
                    format!("raise the maximum for {label} to {new} (asked at most {asked})")
                }
                Side::Value => format!("change {label} to {new} (asked {asked})"),
            }
        }
        Soft::Rule { line, kind } => {
            let id = &problem.model.lines[line].ingredient;
            let g = |x: f64| format!("{} g", round_away(x, c.bound, 0));
            let pct = |x: f64| format!("{} %", round_away(x, c.bound, 1));
            let now = trim_number(c.bound);
            match kind {
                RuleKind::Fixed => {
                    format!("let {id} change from its fixed {now} g to {}", g(v))
                }
                RuleKind::NotVaried => format!(
                    "let {id} vary too (it is not among the lines that may vary): {} instead of {now} g",
                    g(v)
                ),
                RuleKind::MinG => format!("lower the minimum for {id} to {} (now {now} g)", g(v)),
                RuleKind::MaxG => format!("raise the maximum for {id} to {} (now {now} g)", g(v)),
                RuleKind::MinPct => {
                    format!(
                        "lower the minimum share of {id} to {} (now {now} %)",
                        pct(v)
                    )
                }
                RuleKind::MaxPct => {
                    format!(
                        "raise the maximum share of {id} to {} (now {now} %)",
                        pct(v)
                    )
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::round_away;

    #[test]
    fn advice_rounds_away_from_the_value_asked() {
        assert_eq!(round_away(3.2549, 20.0, 1), "3.2");
        assert_eq!(round_away(41.8111, 40.0, 1), "41.9");
        assert_eq!(round_away(-2.4449, -3.0, 2), "-2.44");
        assert_eq!(round_away(-3.561, -3.0, 2), "-3.57");
    }
}

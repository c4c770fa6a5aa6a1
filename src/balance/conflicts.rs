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

use super::engine::Problem;
use super::result::Conflict;
use super::rows::{Constraint, Lin, RuleKind, Side, Soft};
use crate::model::TempUnit;
use crate::model::balancing::{Figure, with_unit};
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
) -> Vec<Conflict> {
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
    // Where the solver cannot tell, a set is taken as able to hold: no conflict
    // is named that was not shown, and no member is dropped from one unshown.
    let holds = |which: &[usize]| problem.feasible(lin, which, &[], x_ref).unwrap_or(true);
    while sets.len() < MAX_CONFLICTS && !holds(&remaining) {
        let mut set = remaining.clone();
        for k in remaining.iter() {
            let without: Vec<usize> = set.iter().copied().filter(|i| i != k).collect();
            if !holds(&without) {
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
            let found = least_relaxation(problem, lin, x_ref, &base, member);
            relax.push(advice(problem, member, found));
        }
        conflicts.push(Conflict {
            targets: names,
            relax,
        });
    }
    conflicts
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
/// `base`, rounded for the advice to a value that holds; `None` when no value
/// does (another conflict holds as well).
fn least_relaxation(
    problem: &Problem,
    lin: &Lin,
    x_ref: &[f64],
    base: &[usize],
    member: usize,
) -> Option<Relaxed> {
    let c = problem.constraints[member];
    let with: Vec<usize> = base.iter().copied().chain([member]).collect();
    // A relaxation is offered only where the solver shows that it holds.
    let holds = |bound: f64| {
        problem
            .feasible(lin, &with, &[(member, bound)], x_ref)
            .unwrap_or(false)
    };
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
            // An extreme no mix with anything dissolved reaches (a freezing
            // point of -0.01 °C, all of the water frozen) holds only where the
            // rows degenerate: it is no advice.
            if !(at == extreme && unreachable(problem, &c, at)) && holds(at) {
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
            if holds(mid) {
                good = mid;
            } else {
                bad = mid;
            }
        }
        if best.is_none_or(|b| (good - c.bound).abs() < (b - c.bound).abs()) {
            best = Some(good);
        }
    }
    let v = best?;
    // The advice is read and typed back as printed: round it so that the printed
    // value holds too (away from the bound asked first; toward it where the values
    // that hold are a narrow interval), with more decimals if neither does.
    let shown = shown_unit(problem, &c);
    let base = decimals(problem, &c);
    for d in base..=base + 3 {
        let away = shown.to_c(round_away(shown.from_c(v), shown.from_c(c.bound), d));
        let toward = shown.to_c(round_toward(shown.from_c(v), shown.from_c(c.bound), d));
        for candidate in [away, toward] {
            if holds(candidate) {
                return Some(Relaxed {
                    value: candidate,
                    decimals: d,
                });
            }
        }
    }
    Some(Relaxed {
        value: v,
        decimals: base + 3,
    })
}

/// Whether `value` is the warm end of a temperature or a whole frozen share:
/// a bound only a mix with nothing dissolved could reach.
fn unreachable(problem: &Problem, c: &Constraint, value: f64) -> bool {
    match c.soft {
        Soft::Target { index, .. } => match problem.targets[index].figure {
            Figure::FreezingPointC | Figure::ServingTempC => value >= -0.01,
            Figure::FrozenAt { .. } => value >= 1.0,
            _ => false,
        },
        Soft::Rule { .. } => false,
    }
}

/// A relaxed bound as the advice prints it: a value that holds, and how many
/// decimals show it (in the unit the advice speaks).
#[derive(Debug, Clone, Copy)]
struct Relaxed {
    value: f64,
    decimals: usize,
}

/// The unit temperatures of `c` are printed in (others are not temperatures:
/// Celsius maps them to themselves).
fn shown_unit(problem: &Problem, c: &Constraint) -> TempUnit {
    match c.soft {
        Soft::Target { index, .. } if problem.targets[index].figure.is_temperature() => {
            problem.advice_unit
        }
        _ => TempUnit::Celsius,
    }
}

/// Decimals the advice on `c` starts with.
fn decimals(problem: &Problem, c: &Constraint) -> usize {
    match c.soft {
        Soft::Target { index, .. } => problem.targets[index].figure.decimals(),
        Soft::Rule { kind, .. } => match kind {
            RuleKind::MinPct | RuleKind::MaxPct => 1,
            _ => 0,
        },
    }
}

/// `v` rounded to `decimals` away from `asked` (so the advice is enough).
fn round_away(v: f64, asked: f64, decimals: usize) -> f64 {
    round_to(v, decimals, v >= asked)
}

/// `v` rounded to `decimals` toward `asked`.
fn round_toward(v: f64, asked: f64, decimals: usize) -> f64 {
    round_to(v, decimals, v < asked)
}

/// `v` rounded to `decimals`, up or down.
fn round_to(v: f64, decimals: usize, up: bool) -> f64 {
    let scale = 10f64.powi(decimals as i32);
    if up {
        (v * scale).ceil() / scale
    } else {
        (v * scale).floor() / scale
    }
}

/// Plain-text advice for relaxing one member.
fn advice(problem: &Problem, member: usize, found: Option<Relaxed>) -> String {
    let c = problem.constraints[member];
    let name = constraint_name(problem, &c);
    let Some(Relaxed { value, decimals }) = found else {
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
    // In the unit the advice speaks (°F for temperatures when asked).
    let shown = shown_unit(problem, &c);
    let new = format!("{:.decimals$}", shown.from_c(value));
    match c.soft {
        Soft::Target { index, side } => {
            let figure = &problem.targets[index].figure;
            let label = figure.label_in(problem.advice_unit);
            let unit = if figure.is_temperature() {
                shown.symbol()
            } else {
                figure.unit()
            };
            let new = with_unit(&new, unit);
            let asked = with_unit(&trim_number(shown.from_c(c.bound)), unit);
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
            let now = trim_number(c.bound);
            match kind {
                RuleKind::Fixed => {
                    format!("let {id} change from its fixed {now} g to {new} g")
                }
                RuleKind::NotVaried => format!(
                    "let {id} vary too (it is not among the lines that may vary): {new} g instead of {now} g"
                ),
                RuleKind::MinG => format!("lower the minimum for {id} to {new} g (now {now} g)"),
                RuleKind::MaxG => format!("raise the maximum for {id} to {new} g (now {now} g)"),
                RuleKind::MinPct => {
                    format!("lower the minimum share of {id} to {new} % (now {now} %)")
                }
                RuleKind::MaxPct => {
                    format!("raise the maximum share of {id} to {new} % (now {now} %)")
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::{round_away, round_toward};

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() < 1e-9
    }

    #[test]
    fn advice_rounds_away_from_the_value_asked() {
        assert!(close(round_away(3.2549, 20.0, 1), 3.2));
        assert!(close(round_away(41.8111, 40.0, 1), 41.9));
        assert!(close(round_away(-2.4449, -3.0, 2), -2.44));
        assert!(close(round_away(-3.561, -3.0, 2), -3.57));
    }

    #[test]
    fn or_toward_it() {
        assert!(close(round_toward(3.2549, 20.0, 1), 3.3));
        assert!(close(round_toward(41.8111, 40.0, 1), 41.8));
        assert!(close(round_toward(-2.4449, -3.0, 2), -2.45));
    }
}

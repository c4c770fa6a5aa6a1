//! Every target and line rule as linear rows in the line masses x (g).
//!
//! Each target figure v(x) gets a function g(x, θ) with the sign of v(x) − θ,
//! linear in x for a fixed bound θ, so that v ≥ low is g(x, low) ≥ 0, v ≤ high
//! is g(x, high) ≤ 0 and v = value is g(x, value) = 0:
//!
//! - a share (composition %, a solute's %, sweetness) 100·N·x/Σx: g = N·x − θ/100·Σx;
//! - mass: g = Σx − θ; volume: g = V(x) − θ;
//! - ABV 100·E/(ρ_e·V): g = 100·E/ρ_e − θ·V; sugar per litre 1000·S/V: g = 1000·S − θ·V;
//! - freezing point: g = W − Z(θ), where W is the water and Z(T) the unfrozen
//!   water by ZSR at T (ice first forms where Z = W, and Z falls with T);
//! - serving temperature with serving share φ: g = (1 − φ)·W − Z(θ);
//! - frozen share at T, 1 − max(Z(T), G)/W with G the glass-limit water:
//!   g = (1 − θ)·W − Z(T), and for a low bound also (1 − θ)·W − G ≥ 0.
//!
//! So every freezing figure is exact here, with no approximation; only the
//! volume V is replaced by its tangent at the current point ([`Lin`]), and the
//! solve is repeated until the tangent agrees with the full volume.
//!
//! One limit: a high bound on a frozen share is imposed on the ZSR part only,
//! which is exact above the glass-limit temperature (where Z ≥ G).

use crate::thermo::ethanol::ETHANOL_DENSITY_20C_KG_M3;

use super::model::Model;
use crate::model::balancing::{Figure, Target};

/// How a row compares with zero.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Sense {
    /// coef·x + constant ≤ 0.
    Le,
    /// coef·x + constant ≥ 0.
    Ge,
    /// coef·x + constant = 0.
    Eq,
}

/// One linear row: `coef·x + constant` compared with 0 by `sense`, x in g.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct Row {
    /// Coefficient per g of each line.
    pub coef: Vec<f64>,
    /// The constant term.
    pub constant: f64,
    /// The comparison.
    pub sense: Sense,
}

impl Row {
    /// Whether every mix of non-negative masses meets the row.
    pub fn always_holds(&self) -> bool {
        let at_least_zero = self.constant >= 0.0 && self.coef.iter().all(|c| *c >= 0.0);
        let at_most_zero = self.constant <= 0.0 && self.coef.iter().all(|c| *c <= 0.0);
        match self.sense {
            Sense::Ge => at_least_zero,
            Sense::Le => at_most_zero,
            Sense::Eq => false,
        }
    }

    /// coef·x + constant.
    pub fn value(&self, x: &[f64]) -> f64 {
        self.coef.iter().zip(x).map(|(c, x)| c * x).sum::<f64>() + self.constant
    }
}

/// Which side of a target a constraint is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Side {
    /// v ≥ low.
    Low,
    /// v ≤ high.
    High,
    /// v = value.
    Value,
}

/// Which rule of a line a constraint is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum RuleKind {
    /// Fixed by a rule.
    Fixed,
    /// Fixed because `vary` does not name it.
    NotVaried,
    /// A least mass (g).
    MinG,
    /// A most mass (g).
    MaxG,
    /// A least share (%).
    MinPct,
    /// A most share (%).
    MaxPct,
}

/// A constraint the maker set, which a conflict may name.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) enum Soft {
    /// One side of a target, by its index in the list of targets.
    Target {
        /// Index of the target.
        index: usize,
        /// Which side.
        side: Side,
    },
    /// A rule of one line.
    Rule {
        /// Index of the line.
        line: usize,
        /// Which rule.
        kind: RuleKind,
    },
}

/// A constraint and the value of its bound θ (in the target's unit, or g, or %).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Constraint {
    /// Which constraint.
    pub soft: Soft,
    /// The bound.
    pub bound: f64,
}

/// The tangent of the volume: V(x) ≈ grad·x + offset (mL).
#[derive(Debug, Clone, PartialEq, Default)]
pub(crate) struct Lin {
    /// ∂V/∂x per line (mL/g).
    pub grad: Vec<f64>,
    /// V(x₀) − grad·x₀ (mL).
    pub offset: f64,
}

/// Builds rows from targets and rules.
pub(crate) struct RowBuilder<'a, 'c> {
    /// The model.
    pub model: &'a Model<'c>,
    /// The targets.
    pub targets: &'a [Target],
    /// The volume's tangent (empty when no target needs the volume).
    pub lin: &'a Lin,
}

fn combine(a: &[f64], ka: f64, b: &[f64], kb: f64) -> Vec<f64> {
    a.iter().zip(b).map(|(a, b)| ka * a + kb * b).collect()
}

impl RowBuilder<'_, '_> {
    fn n(&self) -> usize {
        self.model.len()
    }

    fn water(&self) -> Vec<f64> {
        self.model.lines.iter().map(|l| l.water_g).collect()
    }

    fn glass(&self) -> Vec<f64> {
        self.model.lines.iter().map(|l| l.glass_g).collect()
    }

    fn volume(&self) -> (Vec<f64>, f64) {
        if self.lin.grad.len() == self.n() {
            (self.lin.grad.clone(), self.lin.offset)
        } else {
            (vec![0.0; self.n()], 0.0)
        }
    }

    /// g(x, θ) for a figure as (coef, constant); `None` when every mix meets the
    /// bound (a temperature bound at or above 0 °C on the high side).
    fn g(&self, figure: &Figure, theta: f64) -> (Vec<f64>, f64) {
        let n = self.n();
        if let Some(num) = self.model.share_numerator(figure) {
            return (num.iter().map(|a| a - theta / 100.0).collect(), 0.0);
        }
        match figure {
            Figure::MassG => (vec![1.0; n], -theta),
            Figure::VolumeMl => {
                let (grad, offset) = self.volume();
                (grad, offset - theta)
            }
            Figure::AbvPct => {
                let (grad, offset) = self.volume();
                let per_ml = 100.0 / (ETHANOL_DENSITY_20C_KG_M3 / 1000.0);
                let e = self.model.ethanol_per_g();
                (combine(&e, per_ml, &grad, -theta), -theta * offset)
            }
            Figure::SugarGPerL => {
                let (grad, offset) = self.volume();
                let s = self.model.sugar_per_g();
                (combine(&s, 1000.0, &grad, -theta), -theta * offset)
            }
            Figure::FreezingPointC => {
                let z = self.model.zsr_per_g(theta);
                (combine(&self.water(), 1.0, &z, -1.0), 0.0)
            }
            Figure::ServingTempC => {
                let phi = self.model.serving_frozen_fraction;
                let z = self.model.zsr_per_g(theta);
                (combine(&self.water(), 1.0 - phi, &z, -1.0), 0.0)
            }
            Figure::FrozenAt { temp_c } => {
                let z = self.model.zsr_per_g(*temp_c);
                (combine(&self.water(), 1.0 - theta, &z, -1.0), 0.0)
            }
            // Share figures were answered above.
            _ => (vec![0.0; n], 0.0),
        }
    }

    /// The rows of one constraint with bound `theta`; empty when it always holds.
    /// A row that every non-negative mix meets (a share of at least 0 %, say) is
    /// left out: it would only share the multiplier of x ≥ 0 with that bound, and
    /// halve the reduced cost of a line left at zero.
    pub fn rows(&self, soft: Soft, theta: f64) -> Vec<Row> {
        let mut rows = self.all_rows(soft, theta);
        rows.retain(|r| !r.always_holds());
        rows
    }

    fn all_rows(&self, soft: Soft, theta: f64) -> Vec<Row> {
        match soft {
            Soft::Target { index, side } => {
                let figure = &self.targets[index].figure;
                let temperature = matches!(figure, Figure::FreezingPointC | Figure::ServingTempC);
                if temperature && side == Side::High && theta >= 0.0 {
                    return Vec::new();
                }
                // The frozen share is max(0, 1 - Z/W): its row is exact only where
                // ice is present. None frozen at T (a share of exactly 0) means no
                // ice yet, W <= Z(T), whatever the freezing point below T; at least
                // 0 always holds.
                let frozen = matches!(figure, Figure::FrozenAt { .. });
                if frozen && side == Side::Low && theta <= 0.0 {
                    return Vec::new();
                }
                let side = if frozen && side == Side::Value && theta <= 0.0 {
                    Side::High
                } else {
                    side
                };
                let sense = match side {
                    Side::Low => Sense::Ge,
                    Side::High => Sense::Le,
                    Side::Value => Sense::Eq,
                };
                let (coef, constant) = self.g(figure, theta);
                let mut rows = vec![Row {
                    coef,
                    constant,
                    sense,
                }];
                let glass_share = match figure {
                    Figure::FrozenAt { .. } if side != Side::High => Some(1.0 - theta),
                    Figure::ServingTempC => Some(1.0 - self.model.serving_frozen_fraction),
                    _ => None,
                };
                if let Some(share) = glass_share {
                    rows.push(Row {
                        coef: combine(&self.water(), share, &self.glass(), -1.0),
                        constant: 0.0,
                        sense: Sense::Ge,
                    });
                }
                rows
            }
            Soft::Rule { line, kind } => {
                let n = self.n();
                let unit = |j: usize| -> Vec<f64> {
                    let mut c = vec![0.0; n];
                    c[j] = 1.0;
                    c
                };
                let share = |j: usize| -> Vec<f64> {
                    let mut c = vec![-theta / 100.0; n];
                    c[j] += 1.0;
                    c
                };
                let (coef, constant, sense) = match kind {
                    RuleKind::Fixed | RuleKind::NotVaried => (unit(line), -theta, Sense::Eq),
                    RuleKind::MinG => (unit(line), -theta, Sense::Ge),
                    RuleKind::MaxG => (unit(line), -theta, Sense::Le),
                    RuleKind::MinPct => (share(line), 0.0, Sense::Ge),
                    RuleKind::MaxPct => (share(line), 0.0, Sense::Le),
                };
                vec![Row {
                    coef,
                    constant,
                    sense,
                }]
            }
        }
    }

    /// ∂(coef·x + constant)/∂θ of each row of a constraint at `x`, by central
    /// differences in θ (units of the row per unit of the bound).
    pub fn d_rows_d_bound(&self, soft: Soft, theta: f64, x: &[f64]) -> Vec<f64> {
        let h = 1e-5 * theta.abs().max(1e-2);
        // Row by row as `rows` gives them at theta (the same rows either side,
        // even where one side would always hold).
        let at = self.all_rows(soft, theta);
        let up = self.all_rows(soft, theta + h);
        let down = self.all_rows(soft, theta - h);
        at.iter()
            .zip(up.iter().zip(&down))
            .filter(|(r, _)| !r.always_holds())
            .map(|(_, (u, d))| (u.value(x) - d.value(x)) / (2.0 * h))
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::{Options, analyze};
    use crate::catalog::Catalog;
    use crate::model::{Amount, Line, Recipe};

    fn gelato() -> Recipe {
        let line = |id: &str, g: f64| Line {
            ingredient: id.into(),
            amount: Amount::Grams(g),
        };
        Recipe {
            lines: vec![
                line("whole-milk", 650.0),
                line("heavy-cream", 120.0),
                line("skim-milk-powder", 40.0),
                line("sucrose", 160.0),
                line("dextrose-monohydrate", 25.0),
                line("spirit-40", 20.0),
            ],
            ..Recipe::default()
        }
    }

    /// g(x, θ) changes sign exactly where the full analysis puts the figure.
    fn crosses_at(figure: Figure, value: f64, step: f64) {
        let recipe = gelato();
        let model = Model::new(&recipe, Catalog::builtin()).unwrap();
        let x: Vec<f64> = model.lines.iter().map(|l| l.before_g).collect();
        let targets = vec![Target::value(figure, value)];
        let (v, grad) = model.volume_evaluator().volume_and_gradient(&x);
        let lin = Lin {
            offset: v - grad.iter().zip(&x).map(|(g, x)| g * x).sum::<f64>(),
            grad,
        };
        let b = RowBuilder {
            model: &model,
            targets: &targets,
            lin: &lin,
        };
        let g = |theta: f64| {
            b.rows(
                Soft::Target {
                    index: 0,
                    side: Side::Value,
                },
                theta,
            )[0]
            .value(&x)
        };
        assert!(g(value - step) > 0.0, "g above zero below the value");
        assert!(g(value + step) < 0.0, "g below zero above the value");
        // Linear interpolation of g between the two puts the root at the value.
        let (a, c) = (g(value - step), g(value + step));
        let root = value - step + 2.0 * step * a / (a - c);
        assert!((root - value).abs() < 0.02 * step, "{root} vs {value}");
    }

    #[test]
    fn each_row_changes_sign_where_the_analysis_puts_its_figure() {
        let a = analyze(
            &gelato(),
            Catalog::builtin(),
            &Options {
                at_temps_c: vec![-13.0],
                ..Options::default()
            },
        )
        .unwrap();
        crosses_at(Figure::FreezingPointC, a.freezing_point_c.unwrap(), 0.01);
        crosses_at(Figure::ServingTempC, a.serving_temp_c.unwrap(), 0.01);
        crosses_at(
            Figure::FrozenAt { temp_c: -13.0 },
            a.at[0].frozen_fraction,
            1e-4,
        );
        crosses_at(Figure::AbvPct, a.abv_pct, 1e-3);
        crosses_at(Figure::SugarGPerL, a.sugar_g_per_l, 0.01);
        crosses_at(Figure::VolumeMl, a.volume_ml, 0.1);
        crosses_at(Figure::FatPct, a.composition.fat_pct, 1e-3);
        crosses_at(Figure::MsnfPct, a.composition.msnf_pct, 1e-3);
        crosses_at(Figure::Sweetness, a.sweetness, 1e-3);
        crosses_at(
            Figure::SolutePct("glucose".into()),
            a.solutes_pct["glucose"],
            1e-4,
        );
    }

    #[test]
    fn a_high_temperature_bound_at_zero_always_holds() {
        let recipe = gelato();
        let model = Model::new(&recipe, Catalog::builtin()).unwrap();
        let targets = vec![Target::at_most(Figure::FreezingPointC, 0.0)];
        let lin = Lin::default();
        let b = RowBuilder {
            model: &model,
            targets: &targets,
            lin: &lin,
        };
        assert!(
            b.rows(
                Soft::Target {
                    index: 0,
                    side: Side::High
                },
                0.0
            )
            .is_empty()
        );
    }
}

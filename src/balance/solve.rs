//! One linear or quadratic programme over the line masses, solved by the
//! Clarabel interior-point solver, with the multipliers turned back into
//! derivatives of the objective.
//!
//! Clarabel solves `min ½v'Pv + q'v` subject to `Av + s = b`, s in a product of
//! the zero cone (equalities) and the non-negative cone (inequalities), and
//! returns multipliers z with `Pv + q + A'z = 0`; so the derivative of the
//! optimum with respect to a parameter θ of row r is `z_r · ∂(A_r v − b_r)/∂θ`.
//! Rows are divided by their largest coefficient.
//!
//! Two spaces:
//! - masses: the variables are the line masses divided by the reference mass
//!   (order one), plus a scale factor t for the nearest objective;
//! - shares (for measuring violations): the Charnes–Cooper transform z = x/Σx,
//!   u = 1/Σx. Every row G(x) = coef·x + c becomes coef·z + c·u = G(x)/Σx, so an
//!   elastic variable measures a violation per gram of batch. Measured on the
//!   masses instead, violations of share targets would shrink with the batch,
//!   and the least violation would be a batch of nothing.

use clarabel::algebra::CscMatrix;
use clarabel::solver::{DefaultSettings, DefaultSolver, IPSolver, SolverStatus, SupportedConeT};

use super::rows::{Row, Sense};

/// A row of the programme: hard, or elastic with the size of one step (in the
/// row's own units per gram of batch) that weighs its violation.
#[derive(Debug, Clone)]
pub(crate) struct ProgramRow {
    /// The row.
    pub row: Row,
    /// `Some(size of one step per gram of batch)` when the row may be violated.
    pub elastic: Option<f64>,
}

/// What to make least.
#[derive(Debug, Clone)]
pub(crate) enum Goal {
    /// Nothing: find any point, or with elastic rows the least total violation.
    Feasibility,
    /// Σ ((x_j − r_j)/s_j)² over the counted lines.
    Nearest {
        /// Reference mass of each line (g).
        reference_g: Vec<f64>,
        /// Scale of each line's change (g), positive.
        scale_g: Vec<f64>,
        /// Which lines count.
        counted: Vec<bool>,
    },
    /// Σ c_j x_j (objective units per g).
    Linear {
        /// Coefficient per g of each line.
        per_g: Vec<f64>,
    },
}

/// A programme.
pub(crate) struct Program<'a> {
    /// Number of lines.
    pub n: usize,
    /// Reference mass (g).
    pub mass_ref_g: f64,
    /// Least total mass (g), always imposed.
    pub floor_g: f64,
    /// Largest total mass (g), imposed where violations are measured (the space
    /// of shares), so that a violation cannot vanish by a batch without end.
    pub most_g: f64,
    /// The rows.
    pub rows: &'a [ProgramRow],
    /// The objective; elastic rows need [`Goal::Feasibility`] and are solved
    /// in the space of shares.
    pub goal: &'a Goal,
}

/// A solved programme.
#[derive(Debug, Clone)]
pub(crate) struct Solution {
    /// Line masses (g).
    pub x_g: Vec<f64>,
    /// Total violation, in steps.
    pub total_violation: f64,
    /// Per row: its violation per gram of batch, in the row's units.
    pub violation_per_g: Vec<f64>,
    /// Per row: the multiplier m_r with dObjective/dθ = Σ_r m_r · ∂(row value)/∂θ.
    pub dual: Vec<f64>,
    /// Per line: the multiplier of x ≥ 0 (objective units per g), the reduced cost.
    pub reduced_per_g: Vec<f64>,
    /// Whether the least violation was reached only at (or near) the largest
    /// batch the programme allows: the violation shrinks as the batch grows
    /// without end, so the rows can never quite hold (a freezing point that more
    /// milk only approaches). Set by solves in the space of shares.
    pub at_most_mass: bool,
}

/// How a programme ended.
#[derive(Debug, Clone)]
pub(crate) enum Outcome {
    /// Solved.
    Solved(Solution),
    /// No point meets the hard rows.
    Infeasible,
    /// The solver stopped for another reason.
    Failed(String),
}

/// One row of A with its right-hand side and where it came from.
struct ARow {
    a: Vec<f64>,
    b: f64,
    origin: Origin,
}

enum Origin {
    Row { index: usize, sign: f64, norm: f64 },
    Bound(usize),
    Other,
}

fn csc(rows: usize, cols: usize, by_col: &[Vec<(usize, f64)>]) -> CscMatrix<f64> {
    let mut colptr = Vec::with_capacity(cols + 1);
    let mut rowval = Vec::new();
    let mut nzval = Vec::new();
    colptr.push(0);
    for col in by_col {
        for (r, v) in col {
            rowval.push(*r);
            nzval.push(*v);
        }
        colptr.push(rowval.len());
    }
    CscMatrix::new(rows, cols, colptr, rowval, nzval)
}

/// Solves a programme.
pub(crate) fn solve(p: &Program) -> Outcome {
    let n = p.n;
    let m_ref = p.mass_ref_g;
    let shares = p.rows.iter().any(|r| r.elastic.is_some());
    // Column n: u' = M_ref/Σx (shares).
    let first_e = n + usize::from(shares);
    let mut e_of_row = vec![None; p.rows.len()];
    let mut ne = 0;
    for (k, r) in p.rows.iter().enumerate() {
        if r.elastic.is_some() {
            e_of_row[k] = Some(first_e + ne);
            ne += 1;
        }
    }
    let nv = first_e + ne;

    let mut eqs: Vec<ARow> = Vec::new();
    let mut ineqs: Vec<ARow> = Vec::new();
    let mut weights = vec![0.0; p.rows.len()];
    let mut norms = vec![1.0; p.rows.len()];
    for (k, pr) in p.rows.iter().enumerate() {
        // Masses: coef·(M y) + c. Shares: coef·z + (c/M)·u'.
        let unit = if shares { 1.0 } else { m_ref };
        let big = pr
            .row
            .coef
            .iter()
            .fold(0.0_f64, |m, c| m.max((c * unit).abs()));
        let norm = if big > 0.0 { big } else { 1.0 };
        norms[k] = norm;
        let mut a = vec![0.0; nv];
        for (a, c) in a.iter_mut().zip(&pr.row.coef) {
            *a = c * unit / norm;
        }
        let mut b = -pr.row.constant / norm;
        if shares {
            a[n] = pr.row.constant / m_ref / norm;
            b = 0.0;
        }
        if let Some(step) = pr.elastic {
            weights[k] = norm / step.max(1e-300);
        }
        let mut push = |sign: f64, equal: bool| {
            let mut row: Vec<f64> = a.iter().map(|v| sign * v).collect();
            if let Some(e) = e_of_row[k] {
                row[e] = -1.0;
            }
            let r = ARow {
                a: row,
                b: sign * b,
                origin: Origin::Row {
                    index: k,
                    sign,
                    norm,
                },
            };
            if equal { eqs.push(r) } else { ineqs.push(r) }
        };
        match (pr.row.sense, pr.elastic.is_some()) {
            (Sense::Le, _) => push(1.0, false),
            (Sense::Ge, _) => push(-1.0, false),
            (Sense::Eq, false) => push(1.0, true),
            (Sense::Eq, true) => {
                push(1.0, false);
                push(-1.0, false);
            }
        }
    }
    let unit_row = |col: usize, v: f64| {
        let mut a = vec![0.0; nv];
        a[col] = v;
        a
    };
    for j in 0..n {
        ineqs.push(ARow {
            a: unit_row(j, -1.0),
            b: 0.0,
            origin: Origin::Bound(j),
        });
    }
    let mut total = vec![0.0; nv];
    total.iter_mut().take(n).for_each(|v| *v = 1.0);
    if shares {
        // Σz = 1, and floor ≤ Σx ≤ most: M/most ≤ u' ≤ M/floor.
        eqs.push(ARow {
            a: total,
            b: 1.0,
            origin: Origin::Other,
        });
        ineqs.push(ARow {
            a: unit_row(n, -1.0),
            b: -m_ref / p.most_g,
            origin: Origin::Other,
        });
        ineqs.push(ARow {
            a: unit_row(n, 1.0),
            b: m_ref / p.floor_g,
            origin: Origin::Other,
        });
    } else {
        ineqs.push(ARow {
            a: total.iter().map(|v| -v).collect(),
            b: -p.floor_g / m_ref,
            origin: Origin::Other,
        });
    }
    for e in e_of_row.iter().flatten() {
        ineqs.push(ARow {
            a: unit_row(*e, -1.0),
            b: 0.0,
            origin: Origin::Other,
        });
    }

    // The objective.
    let mut p_cols: Vec<Vec<(usize, f64)>> = vec![Vec::new(); nv];
    let mut q = vec![0.0; nv];
    let mut kappa = 1.0;
    // Violations are weighed in steps, divided by the largest weight for the solver.
    let w_max = weights.iter().fold(0.0_f64, |m, w| m.max(*w));
    for k in 0..p.rows.len() {
        if let Some(e) = e_of_row[k] {
            q[e] = weights[k] / w_max;
        }
    }
    match p.goal {
        Goal::Feasibility => {}
        _ if shares => {
            return Outcome::Failed("elastic rows are solved for feasibility only".into());
        }
        Goal::Nearest {
            reference_g,
            scale_g,
            counted,
        } => {
            for j in (0..n).filter(|j| counted[*j]) {
                let sigma = scale_g[j] / m_ref;
                let rho = reference_g[j] / m_ref;
                let w = 2.0 / (sigma * sigma);
                p_cols[j].push((j, w));
                q[j] = -w * rho;
            }
        }
        Goal::Linear { per_g } => {
            let big = per_g.iter().fold(0.0_f64, |m, c| m.max((c * m_ref).abs()));
            kappa = if big > 0.0 { big } else { 1.0 };
            for j in 0..n {
                q[j] = per_g[j] * m_ref / kappa;
            }
        }
    }

    let n_eq = eqs.len();
    let all: Vec<ARow> = eqs.into_iter().chain(ineqs).collect();
    let m = all.len();
    let mut a_cols: Vec<Vec<(usize, f64)>> = vec![Vec::new(); nv];
    for (r, row) in all.iter().enumerate() {
        for (c, v) in row.a.iter().enumerate() {
            if *v != 0.0 {
                a_cols[c].push((r, *v));
            }
        }
    }
    let b: Vec<f64> = all.iter().map(|r| r.b).collect();
    let mut cones = Vec::new();
    if n_eq > 0 {
        cones.push(SupportedConeT::ZeroConeT(n_eq));
    }
    cones.push(SupportedConeT::NonnegativeConeT(m - n_eq));
    let settings = DefaultSettings {
        verbose: false,
        ..DefaultSettings::default()
    };
    let (p_mat, a_mat) = (csc(nv, nv, &p_cols), csc(m, nv, &a_cols));
    let mut solver = match DefaultSolver::new(&p_mat, &q, &a_mat, &b, &cones, settings) {
        Ok(s) => s,
        Err(e) => return Outcome::Failed(format!("the solver refused the problem: {e:?}")),
    };
    solver.solve();
    let sol = &solver.solution;
    match sol.status {
        SolverStatus::Solved | SolverStatus::AlmostSolved => {}
        SolverStatus::PrimalInfeasible | SolverStatus::AlmostPrimalInfeasible => {
            return Outcome::Infeasible;
        }
        other => return Outcome::Failed(format!("the solver stopped: {other:?}")),
    }
    let x_g: Vec<f64> = if shares {
        let u = sol.x[n].max(m_ref / p.most_g);
        sol.x[..n].iter().map(|z| z * m_ref / u).collect()
    } else {
        sol.x[..n].iter().map(|y| y * m_ref).collect()
    };
    let mut dual = vec![0.0; p.rows.len()];
    let mut reduced_per_g = vec![0.0; n];
    for (r, row) in all.iter().enumerate() {
        match row.origin {
            Origin::Row { index, sign, norm } => dual[index] += kappa * sol.z[r] * sign / norm,
            Origin::Bound(j) => reduced_per_g[j] = kappa * sol.z[r] / m_ref,
            Origin::Other => {}
        }
    }
    let violation = |k: usize| e_of_row[k].map_or(0.0, |e| sol.x[e].max(0.0));
    Outcome::Solved(Solution {
        x_g,
        total_violation: (0..p.rows.len()).map(|k| weights[k] * violation(k)).sum(),
        violation_per_g: (0..p.rows.len()).map(|k| norms[k] * violation(k)).collect(),
        dual,
        reduced_per_g,
        // Within 2 % of the largest batch.
        at_most_mass: shares && sol.x[n] < 1.02 * m_ref / p.most_g,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn row(coef: Vec<f64>, constant: f64, sense: Sense) -> ProgramRow {
        ProgramRow {
            row: Row {
                coef,
                constant,
                sense,
            },
            elastic: None,
        }
    }

    #[test]
    fn a_small_lp_and_its_multipliers() {
        // min 2a + 3b, a + b = 10, a <= 4: a = 4, b = 6, cost 26. Raising the
        // total by one costs 3 (b comes in); raising a's limit saves 1.
        let rows = [
            row(vec![1.0, 1.0], -10.0, Sense::Eq),
            row(vec![1.0, 0.0], -4.0, Sense::Le),
        ];
        let goal = Goal::Linear {
            per_g: vec![2.0, 3.0],
        };
        let p = Program {
            n: 2,
            mass_ref_g: 10.0,
            floor_g: 0.01,
            most_g: 1e6,
            rows: &rows,
            goal: &goal,
        };
        let Outcome::Solved(s) = solve(&p) else {
            panic!("solves");
        };
        assert!((s.x_g[0] - 4.0).abs() < 1e-6 && (s.x_g[1] - 6.0).abs() < 1e-6);
        // Row values are coef·x + constant; the constant is −θ, so ∂/∂θ = −1.
        assert!((-s.dual[0] - 3.0).abs() < 1e-6, "{:?}", s.dual);
        assert!((-s.dual[1] + 1.0).abs() < 1e-6, "{:?}", s.dual);
    }

    #[test]
    fn violations_are_measured_per_gram_of_batch() {
        // a ≥ 0.8 (a + b) with a ≤ 0.5 (a + b): the least violation is 0.15 of
        // the batch on each row whatever the batch weighs.
        let mut rows = vec![
            row(vec![0.2, -0.8], 0.0, Sense::Ge),
            row(vec![0.5, -0.5], 0.0, Sense::Le),
        ];
        for r in &mut rows {
            r.elastic = Some(0.01);
        }
        let p = Program {
            n: 2,
            mass_ref_g: 1000.0,
            floor_g: 1.0,
            most_g: 1e6,
            rows: &rows,
            goal: &Goal::Feasibility,
        };
        let Outcome::Solved(s) = solve(&p) else {
            panic!("solves");
        };
        let total: f64 = s.violation_per_g.iter().sum();
        assert!((total - 0.3).abs() < 1e-6, "{:?}", s.violation_per_g);
        assert!((s.total_violation - 30.0).abs() < 1e-4);
    }
}

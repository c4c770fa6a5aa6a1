//! Binary water-activity models: the water activity of one solute dissolved in
//! water, as a function of its molality, and the inverse (the molality of the
//! binary solution that has a given water activity), which the ZSR mixing rule
//! needs.
//!
//! Four forms:
//! - `Ideal`: the mole-fraction law with the van 't Hoff factor i, optionally
//!   with a Norrish (1966) term: a_w = x_w exp(−K x_s²).
//! - `NorrishSeries`: ln a_w = ln x_w + Σ c_k x_s^k (k ≥ 2), fitted to measured
//!   freezing points up to `max_molality`; beyond it the curve is continued by
//!   the Norrish form with the published K, shifted to join without a jump.
//! - `Tabulated`: measured points joined by a monotone cubic (Fritsch-Carlson),
//!   for solutions whose curve no short series follows (ethanol).
//! - `Pitzer`: the Pitzer osmotic coefficient of a 1:1 electrolyte.
//!
//! Beyond the data of a fitted form, the ideal or Norrish law continues the
//! curve from the last measured point, and the analysis flags the extrapolation.

use serde::{Deserialize, Serialize};

/// Molar mass of water (kg/mol).
pub const WATER_MOLAR_MASS_KG: f64 = 0.018015;

/// Debye-Hückel-type constant b of the Pitzer equations (kg^½/mol^½).
const PITZER_B: f64 = 1.2;
/// Pitzer α1 for 1:1 electrolytes (kg^½/mol^½).
const PITZER_ALPHA1: f64 = 2.0;

/// The water-activity model of a binary solute + water solution.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "form", rename_all = "kebab-case")]
pub enum WaterModel {
    /// Mole-fraction law with the solute's dissociation factor, plus a Norrish term (K ≥ 0).
    Ideal {
        /// Norrish constant K (dimensionless); 0 for the plain ideal law.
        #[serde(default)]
        norrish_k: f64,
    },
    /// Activity-coefficient series in the solute mole fraction, valid up to `max_molality`.
    NorrishSeries {
        /// c_2, c_3, … of ln a_w = ln x_w + Σ c_k x_s^k (dimensionless; c_2 = −K).
        coeffs: Vec<f64>,
        /// Highest molality of the data the series was fitted to (mol/kg water).
        max_molality: f64,
        /// Norrish constant K used to continue the curve beyond `max_molality`.
        #[serde(default)]
        norrish_k: f64,
    },
    /// Monotone cubic through measured (molality, ln a_w) points.
    Tabulated {
        /// Knot molalities, ascending, starting at 0 (mol/kg water).
        molality: Vec<f64>,
        /// ln a_w at each knot (0 at the first).
        ln_aw: Vec<f64>,
        /// Fritsch-Carlson slopes d ln a_w / dm at each knot (kg/mol).
        slopes: Vec<f64>,
    },
    /// Pitzer osmotic coefficient for a 1:1 electrolyte (dissociation factor 2).
    Pitzer {
        /// β(0) (kg/mol).
        beta0: f64,
        /// β(1) (kg/mol).
        beta1: f64,
        /// C^φ (kg²/mol²).
        c_phi: f64,
        /// Debye-Hückel slope A_φ at the temperature of the parameter set (kg^½/mol^½).
        a_phi: f64,
        /// Highest molality the parameters are known to hold (mol/kg water).
        max_molality: f64,
    },
}

/// A solute's binary model together with its dissociation factor.
#[derive(Debug, Clone, PartialEq)]
pub struct Binary {
    /// Van 't Hoff factor i: particles per formula unit (dimensionless).
    pub dissociation: f64,
    /// The water-activity model.
    pub model: WaterModel,
}

/// Natural log of the mole fraction of water for `molality` (mol/kg water) of a
/// solute giving `i` particles each, and the solute mole fraction.
fn mole_fractions(molality: f64, i: f64) -> (f64, f64) {
    let n_w = 1.0 / WATER_MOLAR_MASS_KG;
    let n_s = i * molality;
    let x_s = n_s / (n_w + n_s);
    ((n_w / (n_w + n_s)).ln(), x_s)
}

/// ln a_w of the Norrish form with dissociation factor `i` at `molality`.
fn norrish_ln_aw(molality: f64, i: f64, k: f64) -> f64 {
    let (ln_xw, x_s) = mole_fractions(molality, i);
    ln_xw - k * x_s * x_s
}

/// Evaluates the monotone cubic at `m`; past the last knot, continues with the
/// ideal law (dissociation `i`) shifted to join the last knot.
fn tabulated_ln_aw(knots: &[f64], values: &[f64], slopes: &[f64], m: f64, i: f64) -> f64 {
    let n = knots.len().min(values.len()).min(slopes.len());
    if n < 2 {
        return norrish_ln_aw(m, i, 0.0);
    }
    let last = n - 1;
    if m >= knots[last] {
        return values[last] + norrish_ln_aw(m, i, 0.0) - norrish_ln_aw(knots[last], i, 0.0);
    }
    let j = knots[..n].partition_point(|k| *k <= m).clamp(1, last) - 1;
    let h = knots[j + 1] - knots[j];
    let t = (m - knots[j]) / h;
    let (t2, t3) = (t * t, t * t * t);
    (2.0 * t3 - 3.0 * t2 + 1.0) * values[j]
        + (t3 - 2.0 * t2 + t) * h * slopes[j]
        + (-2.0 * t3 + 3.0 * t2) * values[j + 1]
        + (t3 - t2) * h * slopes[j + 1]
}

/// Fritsch-Carlson slopes for a monotone cubic through (`x`, `y`), `x` ascending.
pub fn monotone_slopes(x: &[f64], y: &[f64]) -> Vec<f64> {
    let n = x.len().min(y.len());
    if n < 2 {
        return vec![0.0; n];
    }
    let delta: Vec<f64> = (0..n - 1)
        .map(|k| (y[k + 1] - y[k]) / (x[k + 1] - x[k]))
        .collect();
    let mut d = vec![0.0; n];
    d[0] = delta[0];
    d[n - 1] = delta[n - 2];
    for k in 1..n - 1 {
        d[k] = if delta[k - 1] * delta[k] <= 0.0 {
            0.0
        } else {
            // Weighted harmonic mean (Fritsch & Butland), which keeps the cubic monotone.
            let (h0, h1) = (x[k] - x[k - 1], x[k + 1] - x[k]);
            let (w1, w2) = (2.0 * h1 + h0, h1 + 2.0 * h0);
            (w1 + w2) / (w1 / delta[k - 1] + w2 / delta[k])
        };
    }
    d
}

impl Binary {
    /// Natural log of the water activity of the binary solution at `molality`
    /// (mol solute per kg water). Zero for no solute; never positive.
    pub fn ln_aw(&self, molality: f64) -> f64 {
        if molality <= 0.0 {
            return 0.0;
        }
        let i = self.dissociation;
        match &self.model {
            WaterModel::Ideal { norrish_k } => norrish_ln_aw(molality, i, *norrish_k),
            WaterModel::NorrishSeries {
                coeffs,
                max_molality,
                norrish_k,
            } => {
                let series = |m: f64| {
                    let (ln_xw, x_s) = mole_fractions(m, i);
                    let mut sum = 0.0;
                    let mut p = x_s;
                    for c in coeffs {
                        p *= x_s;
                        sum += c * p;
                    }
                    ln_xw + sum
                };
                if molality <= *max_molality {
                    series(molality)
                } else {
                    series(*max_molality) + norrish_ln_aw(molality, i, *norrish_k)
                        - norrish_ln_aw(*max_molality, i, *norrish_k)
                }
            }
            WaterModel::Tabulated {
                molality: knots,
                ln_aw,
                slopes,
            } => tabulated_ln_aw(knots, ln_aw, slopes, molality, i),
            WaterModel::Pitzer {
                beta0,
                beta1,
                c_phi,
                a_phi,
                ..
            } => {
                let sq = molality.sqrt();
                let phi = 1.0 - a_phi * sq / (1.0 + PITZER_B * sq)
                    + molality * (beta0 + beta1 * (-PITZER_ALPHA1 * sq).exp())
                    + molality * molality * c_phi;
                -i * molality * WATER_MOLAR_MASS_KG * phi
            }
        }
    }

    /// Highest molality (mol/kg water) at which the model rests on measured data;
    /// `None` for the ideal law, which has no data range of its own.
    pub fn validated_molality(&self) -> Option<f64> {
        match &self.model {
            WaterModel::Ideal { .. } => None,
            WaterModel::NorrishSeries { max_molality, .. }
            | WaterModel::Pitzer { max_molality, .. } => Some(*max_molality),
            WaterModel::Tabulated { molality, .. } => molality.last().copied(),
        }
    }

    /// The molality (mol/kg water) of the binary solution whose water activity
    /// is exp(`ln_aw`). Returns 0 for `ln_aw >= 0` and `f64::INFINITY` when no
    /// finite molality reaches it. A close `guess` (mol/kg) makes it cheap: a
    /// few secant steps from it, with a bracketed Newton-bisection as fallback.
    pub fn molality_at(&self, ln_aw: f64, guess: Option<f64>) -> f64 {
        if ln_aw >= 0.0 || ln_aw.is_nan() {
            return 0.0;
        }
        if let Some(m) = guess
            .filter(|g| *g > 0.0 && g.is_finite())
            .and_then(|g| self.secant_from(ln_aw, g))
        {
            return m;
        }
        self.bracketed_molality(ln_aw, guess)
    }

    /// Secant iterations from `guess`; `None` if they do not converge cleanly.
    fn secant_from(&self, ln_aw: f64, guess: f64) -> Option<f64> {
        let f = |m: f64| self.ln_aw(m) - ln_aw;
        let tol = 1e-13 * ln_aw.abs().max(1e-12);
        let (mut m0, mut m1) = (guess, guess * (1.0 + 1e-4));
        let (mut f0, mut f1) = (f(m0), f(m1));
        for _ in 0..12 {
            if f1.abs() <= tol {
                return Some(m1);
            }
            let denom = f1 - f0;
            if denom == 0.0 || !denom.is_finite() {
                return None;
            }
            let next = m1 - f1 * (m1 - m0) / denom;
            if !(next > 0.0 && next.is_finite()) {
                return None;
            }
            (m0, f0) = (m1, f1);
            m1 = next;
            f1 = f(m1);
        }
        None
    }

    fn bracketed_molality(&self, ln_aw: f64, guess: Option<f64>) -> f64 {
        let f = |m: f64| self.ln_aw(m) - ln_aw;
        let ideal = -ln_aw / (self.dissociation.max(1e-9) * WATER_MOLAR_MASS_KG);
        let mut lo = 0.0_f64;
        let mut hi = guess
            .filter(|g| *g > 0.0 && g.is_finite())
            .unwrap_or(ideal)
            .max(1e-12);
        // Expand the bracket until f(hi) <= 0 (ln_aw decreases with molality).
        let mut expansions = 0;
        while f(hi) > 0.0 {
            lo = hi;
            hi *= 2.0;
            expansions += 1;
            if expansions > 200 || !hi.is_finite() {
                return f64::INFINITY;
            }
        }
        let mut m = hi;
        for _ in 0..100 {
            let fm = f(m);
            if fm.abs() < 1e-13 {
                return m;
            }
            if fm > 0.0 {
                lo = m;
            } else {
                hi = m;
            }
            let h = (m * 1e-6).max(1e-12);
            let slope = (self.ln_aw(m + h) - self.ln_aw(m - h).min(0.0)) / (2.0 * h);
            let newton = m - fm / slope;
            m = if slope < 0.0 && newton > lo && newton < hi {
                newton
            } else {
                0.5 * (lo + hi)
            };
            if hi - lo < 1e-13 * hi.max(1.0) {
                return m;
            }
        }
        m
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn inversion_round_trips_for_each_form() {
        let models = [
            Binary {
                dissociation: 1.0,
                model: WaterModel::Ideal { norrish_k: 6.47 },
            },
            Binary {
                dissociation: 2.0,
                model: WaterModel::Ideal { norrish_k: 0.0 },
            },
            Binary {
                dissociation: 1.0,
                model: WaterModel::NorrishSeries {
                    coeffs: vec![-6.35, -37.3],
                    max_molality: 2.0,
                    norrish_k: 6.47,
                },
            },
            Binary {
                dissociation: 2.0,
                model: WaterModel::Pitzer {
                    beta0: 0.04926,
                    beta1: 0.24625,
                    c_phi: 0.005149,
                    a_phi: 0.3767,
                    max_molality: 5.2,
                },
            },
        ];
        for b in &models {
            for m in [1e-4, 0.01, 0.3, 1.0, 2.5, 6.0] {
                let ln_aw = b.ln_aw(m);
                let back = b.molality_at(ln_aw, None);
                assert!((back - m).abs() < 1e-8 * m.max(1.0), "{b:?}: {m} -> {back}");
            }
        }
    }

    #[test]
    fn dilute_limit_is_the_ideal_law() {
        // Any form reduces to ln a_w ≈ −i m M_w as m → 0 (the colligative limit).
        let b = Binary {
            dissociation: 2.0,
            model: WaterModel::Ideal { norrish_k: 0.0 },
        };
        let m = 1e-5;
        assert!((b.ln_aw(m) / (-2.0 * m * WATER_MOLAR_MASS_KG) - 1.0).abs() < 1e-4);
    }
}

//! Linear least squares, used once at catalog load to fit each solute's
//! osmotic-coefficient polynomial to its published freezing points.
//!
//! Householder QR keeps the fit stable even when the columns are powers of a
//! molality spanning two orders of magnitude.

/// Solves min ‖A x − y‖² for `x`, with `a` given row by row (every row the same
/// length). Returns `None` when the columns are linearly dependent or the input
/// is empty or ragged.
#[allow(clippy::needless_range_loop)] // Householder QR reads best with explicit indices.
pub fn least_squares(a: &[Vec<f64>], y: &[f64]) -> Option<Vec<f64>> {
    let rows = a.len();
    let cols = a.first()?.len();
    if cols == 0 || rows < cols || y.len() != rows || a.iter().any(|r| r.len() != cols) {
        return None;
    }
    // Column scaling so every column has unit max-norm.
    let scale: Vec<f64> = (0..cols)
        .map(|j| a.iter().map(|r| r[j].abs()).fold(0.0, f64::max))
        .collect();
    if scale.iter().any(|s| *s == 0.0 || !s.is_finite()) {
        return None;
    }
    let mut m: Vec<Vec<f64>> = a
        .iter()
        .map(|r| r.iter().zip(&scale).map(|(v, s)| v / s).collect())
        .collect();
    let mut b = y.to_vec();
    for k in 0..cols {
        let norm = (k..rows).map(|i| m[i][k] * m[i][k]).sum::<f64>().sqrt();
        if norm < 1e-12 {
            return None;
        }
        let alpha = if m[k][k] > 0.0 { -norm } else { norm };
        let mut v: Vec<f64> = (k..rows).map(|i| m[i][k]).collect();
        v[0] -= alpha;
        let vnorm2: f64 = v.iter().map(|x| x * x).sum();
        if vnorm2 == 0.0 {
            continue;
        }
        for j in k..cols {
            let dot: f64 = (k..rows).map(|i| v[i - k] * m[i][j]).sum();
            let f = 2.0 * dot / vnorm2;
            for i in k..rows {
                m[i][j] -= f * v[i - k];
            }
        }
        let dot: f64 = (k..rows).map(|i| v[i - k] * b[i]).sum();
        let f = 2.0 * dot / vnorm2;
        for i in k..rows {
            b[i] -= f * v[i - k];
        }
    }
    let mut x = vec![0.0; cols];
    for k in (0..cols).rev() {
        let s: f64 = (k + 1..cols).map(|j| m[k][j] * x[j]).sum();
        if m[k][k].abs() < 1e-14 {
            return None;
        }
        x[k] = (b[k] - s) / m[k][k];
    }
    Some(x.iter().zip(&scale).map(|(v, s)| v / s).collect())
}

/// Fits c_2..c_(degree+1) of ln a_w = ln x_w + Σ c_k x_s^k (a Margules-type
/// activity-coefficient series in the solute mole fraction x_s; c_2 = −K is the
/// Norrish form) to measured freezing points (molality, depression in K).
pub fn fit_mole_fraction(i: f64, points: &[(f64, f64)], degree: usize) -> Option<Vec<f64>> {
    use super::binary::WATER_MOLAR_MASS_KG;
    use super::ice::ln_ice_activity;
    let n_w = 1.0 / WATER_MOLAR_MASS_KG;
    let xs = |m: f64| i * m / (n_w + i * m);
    let rows: Vec<Vec<f64>> = points
        .iter()
        .map(|(m, _)| (2..degree + 2).map(|k| xs(*m).powi(k as i32)).collect())
        .collect();
    let y: Vec<f64> = points
        .iter()
        .map(|(m, dt)| ln_ice_activity(-dt) - (1.0 - xs(*m)).ln())
        .collect();
    least_squares(&rows, &y)
}

/// Fits β(0), β(1) and C^φ of the Pitzer osmotic coefficient of a 1:1
/// electrolyte, with A_φ given, to measured freezing points (molality,
/// depression in K). Residuals in ln a_w, as in [`fit_mole_fraction`].
pub fn fit_pitzer(a_phi: f64, points: &[(f64, f64)]) -> Option<[f64; 3]> {
    use super::binary::WATER_MOLAR_MASS_KG;
    use super::ice::ln_ice_activity;
    // ln a_w = −2 m M_w [1 − A_φ √m/(1+1.2√m) + m β0 + m e^(−2√m) β1 + m² Cφ]
    let rows: Vec<Vec<f64>> = points
        .iter()
        .map(|(m, _)| {
            let s = -2.0 * m * WATER_MOLAR_MASS_KG;
            vec![s * m, s * m * (-2.0 * m.sqrt()).exp(), s * m * m]
        })
        .collect();
    let y: Vec<f64> = points
        .iter()
        .map(|(m, dt)| {
            let s = -2.0 * m * WATER_MOLAR_MASS_KG;
            ln_ice_activity(-dt) - s * (1.0 - a_phi * m.sqrt() / (1.0 + 1.2 * m.sqrt()))
        })
        .collect();
    let c = least_squares(&rows, &y)?;
    Some([c[0], c[1], c[2]])
}

/// Builds a `Tabulated` model from measured freezing points (molality in
/// mol/kg water, depression in K), ascending in molality: each point's ln a_w is
/// that of ice at its freezing point, and (0, 0) is added as the first knot.
pub fn tabulate_freezing_points(points: &[(f64, f64)]) -> super::binary::WaterModel {
    use super::ice::ln_ice_activity;
    let mut molality = vec![0.0];
    let mut ln_aw = vec![0.0];
    for (m, dt) in points {
        molality.push(*m);
        ln_aw.push(ln_ice_activity(-dt));
    }
    let slopes = super::binary::monotone_slopes(&molality, &ln_aw);
    super::binary::WaterModel::Tabulated {
        molality,
        ln_aw,
        slopes,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recovers_an_exact_quadratic() {
        // y = 2 + 3x − 0.5x², sampled without noise: the fit must return the coefficients.
        let xs = [0.0, 1.0, 2.0, 3.0, 4.0, 7.5];
        let a: Vec<Vec<f64>> = xs.iter().map(|x| vec![1.0, *x, x * x]).collect();
        let y: Vec<f64> = xs.iter().map(|x| 2.0 + 3.0 * x - 0.5 * x * x).collect();
        let c = least_squares(&a, &y).expect("well posed");
        assert!(
            (c[0] - 2.0).abs() < 1e-10 && (c[1] - 3.0).abs() < 1e-10 && (c[2] + 0.5).abs() < 1e-10
        );
    }

    #[test]
    fn refuses_dependent_columns() {
        let a = vec![vec![1.0, 2.0], vec![2.0, 4.0], vec![3.0, 6.0]];
        assert!(least_squares(&a, &[1.0, 2.0, 3.0]).is_none());
    }
}

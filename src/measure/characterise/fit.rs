//! Fitting the molar mass M and the Norrish K of the dissolved solids to the
//! freezing points: least squares on the temperatures, a grid over K refined
//! by golden section, and for each K the best M between the points' own values.

use crate::thermo::binary::{Binary, WATER_MOLAR_MASS_KG, WaterModel};
use crate::thermo::ice::temp_c_for_ln_activity;

use super::NORRISH_K_MAX;

/// A point reduced to what the fit needs.
#[derive(Debug, Clone, Copy)]
pub(super) struct Prepared {
    /// Dissolved solids (g).
    pub(super) solids_g: f64,
    /// All water (g).
    pub(super) water_g: f64,
    /// ln of the ice activity at the reading.
    pub(super) ln_aw: f64,
    /// The reading (°C).
    pub(super) temp_c: f64,
}

impl Prepared {
    /// Solids per gram of water (g/g).
    pub(super) fn concentration(&self) -> f64 {
        self.solids_g / self.water_g
    }

    /// Depression below 0 °C (K).
    pub(super) fn depression_k(&self) -> f64 {
        -self.temp_c
    }
}

/// Particle mole fraction x_s at which ln(1 − x) − K x² equals `ln_aw` (bisection; K ≥ 0).
fn particle_fraction(ln_aw: f64, norrish_k: f64) -> f64 {
    let f = |x: f64| (1.0 - x).ln() - norrish_k * x * x - ln_aw;
    let (mut lo, mut hi) = (0.0_f64, 1.0 - 1e-12);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f(mid) > 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < 1e-15 {
            break;
        }
    }
    0.5 * (lo + hi)
}

/// The molar mass (g/mol) one point gives for Norrish constant `norrish_k`.
pub(super) fn apparent_molar_mass(p: &Prepared, i: f64, norrish_k: f64) -> f64 {
    let x = particle_fraction(p.ln_aw, norrish_k);
    let water_mol = p.water_g / 1000.0 / WATER_MOLAR_MASS_KG;
    let particles = water_mol * x / (1.0 - x);
    i * p.solids_g / particles
}

/// The model's freezing point (°C) for a point.
pub(super) fn model_temp_c(binary: &Binary, molar_mass: f64, p: &Prepared) -> f64 {
    let molality = p.solids_g / molar_mass / (p.water_g / 1000.0);
    temp_c_for_ln_activity(binary.ln_aw(molality))
}

/// Sum of squared temperature residuals (K²).
fn sse(points: &[Prepared], i: f64, molar_mass: f64, norrish_k: f64) -> f64 {
    let binary = Binary {
        dissociation: i,
        model: WaterModel::Ideal { norrish_k },
    };
    points
        .iter()
        .map(|p| (model_temp_c(&binary, molar_mass, p) - p.temp_c).powi(2))
        .sum()
}

/// Golden-section minimum of `f` on [lo, hi].
fn golden_min(mut lo: f64, mut hi: f64, f: impl Fn(f64) -> f64) -> f64 {
    const R: f64 = 0.618_033_988_749_895;
    let mut c = hi - R * (hi - lo);
    let mut d = lo + R * (hi - lo);
    let (mut fc, mut fd) = (f(c), f(d));
    for _ in 0..80 {
        if fc < fd {
            hi = d;
            d = c;
            fd = fc;
            c = hi - R * (hi - lo);
            fc = f(c);
        } else {
            lo = c;
            c = d;
            fc = fd;
            d = lo + R * (hi - lo);
            fd = f(d);
        }
        if (hi - lo).abs() < 1e-12 * (1.0 + lo.abs()) {
            break;
        }
    }
    0.5 * (lo + hi)
}

/// Best molar mass for a given K: between the smallest and largest single-point value.
fn best_molar_mass(points: &[Prepared], i: f64, norrish_k: f64) -> f64 {
    let apparent: Vec<f64> = points
        .iter()
        .map(|p| apparent_molar_mass(p, i, norrish_k).ln())
        .collect();
    let lo = apparent.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = apparent.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if hi - lo < 1e-12 {
        return lo.exp();
    }
    golden_min(lo, hi, |ln_m| sse(points, i, ln_m.exp(), norrish_k)).exp()
}

/// Least-squares (M, K): a grid over K, refined by golden section around the best.
pub(super) fn fit(points: &[Prepared], i: f64) -> (f64, f64) {
    let profile = |k: f64| sse(points, i, best_molar_mass(points, i, k), k);
    let steps = 100;
    let step = NORRISH_K_MAX / steps as f64;
    let best = (0..=steps)
        .map(|s| s as f64 * step)
        .map(|k| (k, profile(k)))
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map_or(0.0, |(k, _)| k);
    let k = golden_min(
        (best - step).max(0.0),
        (best + step).min(NORRISH_K_MAX),
        profile,
    );
    (best_molar_mass(points, i, k), k)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::thermo::ice::ln_ice_activity;

    #[test]
    fn a_single_ideal_point_gives_back_its_molar_mass() {
        // Build a point from the ideal law itself: 10 g of M = 200 g/mol in 1000 g water.
        let binary = Binary {
            dissociation: 1.0,
            model: WaterModel::Ideal { norrish_k: 0.0 },
        };
        let t = temp_c_for_ln_activity(binary.ln_aw(10.0 / 200.0));
        let p = Prepared {
            solids_g: 10.0,
            water_g: 1000.0,
            ln_aw: ln_ice_activity(t),
            temp_c: t,
        };
        assert!((apparent_molar_mass(&p, 1.0, 0.0) - 200.0).abs() < 1e-6);
    }

    #[test]
    fn the_fit_recovers_a_known_norrish_k() {
        // Points made from M = 150 g/mol, K = 4 must give both back.
        let binary = Binary {
            dissociation: 1.0,
            model: WaterModel::Ideal { norrish_k: 4.0 },
        };
        let points: Vec<Prepared> = [20.0, 150.0, 400.0, 800.0]
            .iter()
            .map(|g| {
                let t = temp_c_for_ln_activity(binary.ln_aw(g / 150.0));
                Prepared {
                    solids_g: *g,
                    water_g: 1000.0,
                    ln_aw: ln_ice_activity(t),
                    temp_c: t,
                }
            })
            .collect();
        let (m, k) = fit(&points, 1.0);
        assert!((m - 150.0).abs() < 0.01, "{m}");
        assert!((k - 4.0).abs() < 0.01, "{k}");
    }
}

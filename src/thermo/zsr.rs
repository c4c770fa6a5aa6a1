//! The freezing curve of a mix by the Zdanovskii-Stokes-Robinson (ZSR) rule.
//!
//! At temperature T the unfrozen solution has the water activity of ice,
//! a_ice(T). ZSR says the water that keeps all solutes dissolved at that
//! activity is the sum over solutes of the water each would need on its own:
//! W_u(T) = Σ n_i / m*_i(T), where m*_i(T) is the molality of the binary
//! solution of solute i that freezes at T. No iteration is needed.
//!
//! Every solute's m*_i(T) is tabulated once on a fine temperature grid (a
//! [`FreezingTable`]), so a whole curve costs only sums and divisions: cheap
//! enough to redo on every keystroke. Between grid points m* is interpolated
//! linearly; on a 0.1 K grid that is exact to about 1e-5 K in a freezing point.
//!
//! Freezing stops at maximal freeze concentration: glass-forming solutes (sugars,
//! polyols, salts, …) keep at least a quarter of their own mass as unfrozen water
//! (about 80 % solids in the serum, after Roos & Karel 1991).

use super::binary::Binary;
use super::ice::{ln_ice_activity, temp_c_for_ln_activity};

/// Spacing of the temperature grid of a [`FreezingTable`] (K).
pub const GRID_STEP_K: f64 = 0.1;
/// Coldest temperature of the grid (°C); freezing points below it are not resolved.
pub const GRID_MIN_C: f64 = -60.0;
/// Number of grid points from 0 °C down to [`GRID_MIN_C`].
pub const GRID_LEN: usize = 601;
/// Unfrozen water kept per gram of glass-forming solute at maximal freeze
/// concentration (g/g): 80 % solids in the serum.
pub const GLASS_WATER_PER_SOLUTE_G: f64 = 0.25;

/// The molality of one solute's binary solution at ice equilibrium, tabulated
/// from 0 °C down to [`GRID_MIN_C`] every [`GRID_STEP_K`].
#[derive(Debug, Clone, PartialEq)]
pub struct FreezingTable {
    /// m*(T_k) in mol/kg water at T_k = −k · GRID_STEP_K °C.
    molality: Vec<f64>,
    /// Temperature (°C) below which the solute's model runs past its measured data;
    /// `None` when the model has no data range (the ideal law of a user's solute).
    data_limit_c: Option<f64>,
}

impl FreezingTable {
    /// Tabulates `binary` on the grid (about 600 inversions of the binary model).
    pub fn new(binary: &Binary) -> Self {
        let mut molality: Vec<f64> = Vec::with_capacity(GRID_LEN);
        for k in 0..GRID_LEN {
            let temp_c = -(k as f64) * GRID_STEP_K;
            // Extrapolate the last two points: the secant solver then needs two or three steps.
            let guess = match molality.as_slice() {
                [.., a, b] => Some(2.0 * b - a),
                [b] => Some(*b),
                [] => None,
            };
            molality.push(binary.molality_at(
                ln_ice_activity(temp_c),
                guess.filter(|g| g.is_finite() && *g > 0.0),
            ));
        }
        let data_limit_c = binary
            .validated_molality()
            .map(|m| temp_c_for_ln_activity(binary.ln_aw(m)));
        Self {
            molality,
            data_limit_c,
        }
    }

    /// m*(T) (mol/kg water) at `temp_c` (°C), interpolated; 0 at or above 0 °C and
    /// the last grid value below the grid.
    pub fn molality_at(&self, temp_c: f64) -> f64 {
        if !(temp_c < 0.0) {
            return 0.0;
        }
        let x = -temp_c / GRID_STEP_K;
        let last = self.molality.len() - 1;
        if x >= last as f64 {
            return self.molality[last];
        }
        let k = x as usize;
        let t = x - k as f64;
        self.molality[k] + t * (self.molality[k + 1] - self.molality[k])
    }

    /// Temperature (°C) below which the solute's model rests on extrapolation.
    pub fn data_limit_c(&self) -> Option<f64> {
        self.data_limit_c
    }
}

/// One dissolved solute in the serum of a mix.
#[derive(Debug, Clone, Copy)]
pub struct SerumSolute<'a> {
    /// The solute's tabulated binary freezing curve.
    pub table: &'a FreezingTable,
    /// Amount of solute (mol).
    pub moles: f64,
    /// Mass of solute (g).
    pub mass_g: f64,
    /// Whether it forms a glass at maximal freeze concentration (everything but ethanol).
    pub glass_forming: bool,
    /// Dissociation factor i, for the dilute-law estimate (dimensionless).
    pub dissociation: f64,
}

/// The water and dissolved solutes of a mix: what the freezing curve depends on.
#[derive(Debug, Clone, Default)]
pub struct Serum<'a> {
    /// Total water of the mix, frozen or not (g).
    pub water_g: f64,
    /// The dissolved solutes.
    pub solutes: Vec<SerumSolute<'a>>,
}

/// Cryoscopic constant of water for the dilute law (K kg/mol).
pub const KF_WATER: f64 = 1.86;

impl Serum<'_> {
    /// Unfrozen water (g) in equilibrium with ice at `temp_c` (°C), by ZSR, never
    /// below the glass limit and never more than the water there is.
    pub fn unfrozen_water_g(&self, temp_c: f64) -> f64 {
        if !(temp_c < 0.0) {
            return self.water_g;
        }
        self.zsr_water_g(temp_c)
            .max(self.glass_water_g())
            .min(self.water_g)
    }

    /// Share of the mix's water that is ice at `temp_c` (°C), 0..1.
    pub fn frozen_fraction(&self, temp_c: f64) -> f64 {
        if self.water_g <= 0.0 {
            return 0.0;
        }
        (1.0 - self.unfrozen_water_g(temp_c) / self.water_g).clamp(0.0, 1.0)
    }

    /// Water (g) the glass-forming solutes keep unfrozen at maximal freeze concentration.
    pub fn glass_water_g(&self) -> f64 {
        self.solutes
            .iter()
            .filter(|s| s.glass_forming)
            .map(|s| GLASS_WATER_PER_SOLUTE_G * s.mass_g)
            .sum()
    }

    /// Unfrozen water by ZSR alone (g), without the glass limit or the cap at
    /// the water there is; infinite at or above 0 °C. At a fixed temperature it is
    /// linear in the amounts of solute, which balancing relies on.
    pub fn zsr_water_g(&self, temp_c: f64) -> f64 {
        self.solutes
            .iter()
            .filter(|s| s.moles > 0.0)
            .map(|s| {
                let m = s.table.molality_at(temp_c);
                if m > 0.0 {
                    1000.0 * s.moles / m
                } else {
                    f64::INFINITY
                }
            })
            .sum()
    }

    /// Temperature (°C) at which the unfrozen water by ZSR falls to `water_g`
    /// (g): the freezing point for the whole water, the serving temperature for
    /// part of it. `None` when that happens only below the grid.
    fn temp_for_unfrozen_g(&self, water_g: f64) -> Option<f64> {
        if water_g <= 0.0 || !water_g.is_finite() {
            return None;
        }
        // Unfrozen water falls as the temperature falls: bisect on the grid index.
        let at = |k: usize| self.zsr_water_g(-(k as f64) * GRID_STEP_K);
        let last = GRID_LEN - 1;
        if at(last) > water_g {
            return None;
        }
        let (mut lo, mut hi) = (0usize, last);
        while hi - lo > 1 {
            let mid = (lo + hi) / 2;
            if at(mid) > water_g {
                lo = mid
            } else {
                hi = mid
            }
        }
        // Within one cell the interpolated curve is smooth and monotone: the
        // Illinois variant of regula falsi converges in a handful of steps.
        let (mut warm, mut cold) = (-(lo as f64) * GRID_STEP_K, -(hi as f64) * GRID_STEP_K);
        let (mut f_warm, mut f_cold) = (
            self.zsr_water_g(warm) - water_g,
            self.zsr_water_g(cold) - water_g,
        );
        if !f_warm.is_finite() {
            // At 0 °C the unfrozen water is unbounded: start just inside the cell.
            warm = -1e-9;
            f_warm = self.zsr_water_g(warm) - water_g;
        }
        let mut side = 0i8;
        for _ in 0..60 {
            if (warm - cold).abs() < 1e-10 || f_cold == 0.0 {
                break;
            }
            let t = if f_warm.is_finite() {
                cold - f_cold * (cold - warm) / (f_cold - f_warm)
            } else {
                0.5 * (warm + cold)
            };
            let t = if t.is_finite() && t < warm && t > cold {
                t
            } else {
                0.5 * (warm + cold)
            };
            let f = self.zsr_water_g(t) - water_g;
            if f > 0.0 {
                warm = t;
                f_warm = f;
                if side == 1 {
                    f_cold *= 0.5;
                }
                side = 1;
            } else {
                cold = t;
                f_cold = f;
                if side == -1 {
                    f_warm *= 0.5;
                }
                side = -1;
            }
            if f.abs() < 1e-12 * water_g {
                return Some(t);
            }
        }
        Some(if f_cold.abs() < f_warm.abs() {
            cold
        } else {
            warm
        })
    }

    /// Initial freezing point (°C): where the first ice forms. 0 for pure
    /// water; `None` with no water at all or when it lies below [`GRID_MIN_C`].
    pub fn freezing_point_c(&self) -> Option<f64> {
        if self.water_g <= 0.0 {
            return None;
        }
        if self.solutes.iter().all(|s| s.moles <= 0.0) {
            return Some(0.0);
        }
        self.temp_for_unfrozen_g(self.water_g)
    }

    /// Temperature (°C) at which `frozen_fraction` (0..1) of the water is ice;
    /// `None` if the mix never gets there above [`GRID_MIN_C`] (too much solute,
    /// or the glass limit holds more water unfrozen).
    pub fn temp_for_frozen_fraction(&self, frozen_fraction: f64) -> Option<f64> {
        if self.water_g <= 0.0 || !(0.0..1.0).contains(&frozen_fraction) {
            return None;
        }
        let target_g = (1.0 - frozen_fraction) * self.water_g;
        let glass = self.glass_water_g();
        if glass > target_g {
            return None;
        }
        if self.solutes.iter().all(|s| s.moles <= 0.0) {
            return Some(0.0);
        }
        self.temp_for_unfrozen_g(target_g)
    }

    /// The dilute-law (van 't Hoff) freezing point (°C): −K_f Σ i_j m_j.
    pub fn dilute_law_freezing_point_c(&self) -> Option<f64> {
        if self.water_g <= 0.0 {
            return None;
        }
        let particles: f64 = self.solutes.iter().map(|s| s.dissociation * s.moles).sum();
        Some(-KF_WATER * particles * 1000.0 / self.water_g)
    }

    /// Temperature (°C) at which freezing stops at the glass limit, if it does
    /// above [`GRID_MIN_C`].
    pub fn glass_limit_temp_c(&self) -> Option<f64> {
        let glass = self.glass_water_g();
        if glass <= 0.0 || glass >= self.water_g {
            return None;
        }
        self.temp_for_unfrozen_g(glass)
    }

    /// Share (0..1) of the unfrozen water at `temp_c` held by solutes whose models
    /// run past their measured data there (or have none).
    pub fn share_beyond_data(&self, temp_c: f64) -> f64 {
        let mut total = 0.0;
        let mut beyond = 0.0;
        for s in self.solutes.iter().filter(|s| s.moles > 0.0) {
            let m = s.table.molality_at(temp_c);
            if m <= 0.0 {
                return 0.0;
            }
            let w = s.moles / m;
            total += w;
            if s.table.data_limit_c().is_none_or(|limit| temp_c < limit) {
                beyond += w;
            }
        }
        if total > 0.0 { beyond / total } else { 0.0 }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::thermo::binary::WaterModel;

    fn sucrose_like() -> Binary {
        Binary {
            dissociation: 1.0,
            model: WaterModel::Ideal { norrish_k: 6.47 },
        }
    }

    fn serum<'a>(table: &'a FreezingTable, parts: &[(f64, f64)], water_g: f64) -> Serum<'a> {
        Serum {
            water_g,
            solutes: parts
                .iter()
                .map(|(moles, mass_g)| SerumSolute {
                    table,
                    moles: *moles,
                    mass_g: *mass_g,
                    glass_forming: true,
                    dissociation: 1.0,
                })
                .collect(),
        }
    }

    #[test]
    fn one_solute_freezes_where_its_binary_solution_does() {
        let b = sucrose_like();
        let table = FreezingTable::new(&b);
        let s = serum(&table, &[(0.5, 171.15)], 1000.0);
        let binary_fp = crate::thermo::ice::temp_c_for_ln_activity(b.ln_aw(0.5));
        assert!((s.freezing_point_c().unwrap() - binary_fp).abs() < 1e-4);
    }

    #[test]
    fn splitting_a_solute_in_two_changes_nothing() {
        // ZSR is exact for two portions of the same solute: the mix is the binary
        // solution at the summed molality.
        let table = FreezingTable::new(&sucrose_like());
        let whole = serum(&table, &[(0.8, 273.8)], 1000.0);
        let split = serum(&table, &[(0.3, 102.7), (0.5, 171.1)], 1000.0);
        assert!(
            (whole.freezing_point_c().unwrap() - split.freezing_point_c().unwrap()).abs() < 1e-9
        );
        for t in [-2.0, -5.0, -15.0] {
            assert!((whole.frozen_fraction(t) - split.frozen_fraction(t)).abs() < 1e-12);
        }
    }

    #[test]
    fn freezing_stops_at_the_glass_limit() {
        let table = FreezingTable::new(&sucrose_like());
        let s = serum(&table, &[(1.0, 342.3)], 1000.0);
        // At -60 °C at most 1 - 0.25 * 342.3 / 1000 of the water can be ice.
        let most = 1.0 - GLASS_WATER_PER_SOLUTE_G * 342.3 / 1000.0;
        assert!((s.frozen_fraction(GRID_MIN_C) - most).abs() < 1e-12);
        let limit = s.glass_limit_temp_c().unwrap();
        assert!(s.frozen_fraction(limit - 1.0) <= most + 1e-12);
        assert!(s.frozen_fraction(limit + 1.0) < most);
    }

    #[test]
    fn serving_temperature_is_where_the_share_is_reached() {
        let table = FreezingTable::new(&sucrose_like());
        let s = serum(&table, &[(0.6, 205.4)], 1000.0);
        let t = s.temp_for_frozen_fraction(0.7).unwrap();
        assert!((s.frozen_fraction(t) - 0.7).abs() < 1e-6);
    }
}

//! The classic sucrose-equivalent estimate of the freezing point, as ice-cream
//! texts teach it (Goff & Hartel, Ice Cream, 7th ed., 2013): convert every
//! dissolved sugar to the mass of sucrose that would lower the freezing point
//! as much, look up a sucrose solution of that strength, and add the dairy
//! salts term 2.37 °C × MSNF / water. gelu shows it beside the full model so a
//! user can compare with a hand calculation.
//!
//! The texts' factors (glucose about 1.9, MSNF 0.545, …) are the molar-mass
//! ratios 342.30 / M times the dissociation factor; gelu uses those ratios for
//! every solute, lactose included, and leaves the milk minerals to the salts term.

use crate::catalog::Catalog;
use crate::model::SoluteKind;

use super::Mix;

/// Molar mass of sucrose (g/mol).
const SUCROSE_MOLAR_MASS: f64 = 342.30;
/// The dairy salts term of the classic method (K per unit MSNF/water).
pub const SALTS_TERM_K: f64 = 2.37;

/// The classic estimate (°C); `None` without water or sucrose in the catalog.
pub fn classic_freezing_point_c(mix: &Mix, catalog: &Catalog) -> Option<f64> {
    if mix.water_g <= 0.0 {
        return None;
    }
    let sucrose = catalog.solute("sucrose")?;
    let sucrose_equivalent_g: f64 = mix
        .solutes
        .values()
        .filter(|(e, _)| e.solute.kind != SoluteKind::MilkMinerals)
        .map(|(e, g)| g * e.solute.dissociation * SUCROSE_MOLAR_MASS / e.solute.molar_mass_g_mol)
        .sum();
    // Sucrose solution of that strength: its molality, and the binary freezing point.
    let molality = 1000.0 * sucrose_equivalent_g / SUCROSE_MOLAR_MASS / mix.water_g;
    let sugars_c = if molality > 0.0 {
        crate::thermo::ice::temp_c_for_ln_activity(sucrose.binary.ln_aw(molality))
    } else {
        0.0
    };
    Some(sugars_c - SALTS_TERM_K * mix.msnf_g / mix.water_g)
}

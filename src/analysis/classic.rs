//! The classic sucrose-equivalent estimate of the freezing point, as ice-cream
//! texts teach it (Goff & Hartel, Ice Cream, 7th ed., 2013): convert every
//! dissolved sugar to the mass of sucrose that would lower the freezing point
//! as much, look up a sucrose solution of that strength, and add the dairy
//! salts term 2.37 °C × MSNF / water. gelu shows it beside the full model so a
//! user can compare with a hand calculation, and says where it does not apply.
//!
//! The texts' factors (glucose about 1.9, MSNF 0.545, …) are the molar-mass
//! ratios 342.30 / M times the dissociation factor; gelu uses those ratios for
//! every solute, lactose included, and leaves the milk minerals to the salts term.
//! The same lookup, done for the water left unfrozen, gives the method's
//! frozen-water curve.

use crate::catalog::{Catalog, SoluteEntry};
use crate::model::SoluteKind;
use crate::thermo::ice::temp_c_for_ln_activity;

use super::Mix;

/// Molar mass of sucrose (g/mol).
const SUCROSE_MOLAR_MASS: f64 = 342.30;
/// The dairy salts term of the classic method (K per unit MSNF/water).
pub const SALTS_TERM_K: f64 = 2.37;
/// Ethanol (mass % of the mix) above which the classic method does not apply:
/// the texts build it for sugars and milk solids, and ethanol's depression runs
/// far above the ideal law it would be given here (our limit, a splash of
/// spirit for flavour; with a liqueur the estimate is 4-5 K off).
pub const CLASSIC_MAX_ETHANOL_PCT: f64 = 1.0;
/// Table salt and potassium chloride (mass % of the mix) above which the classic
/// method does not apply (our limit, a seasoning pinch: the method has no term
/// for added salt beyond the milk salts).
pub const CLASSIC_MAX_SALT_PCT: f64 = 0.5;
/// Sucrose-equivalent strength of the serum (mass % of sucrose in the solution)
/// beyond which the lookup leaves the sucrose table it reads: the CRC Handbook
/// sucrose freezing points end at 42 %.
pub const CLASSIC_MAX_SE_PCT: f64 = 42.0;

/// The classic method's figures for one mix.
#[derive(Debug, Clone, PartialEq)]
pub struct Classic {
    /// Estimated freezing point (°C); `None` without water or sucrose in the catalog.
    pub freezing_point_c: Option<f64>,
    /// Whether the method applies to this mix.
    pub applies: bool,
    /// Why it does not apply; `None` where it does.
    pub note: Option<String>,
}

/// The ingredients of the method for one mix: sucrose equivalent (mol),
/// MSNF (g), water (g) and the sucrose model.
struct Inputs<'c> {
    sucrose: &'c SoluteEntry,
    sucrose_equivalent_mol: f64,
    msnf_g: f64,
    water_g: f64,
}

fn inputs<'c>(mix: &Mix, catalog: &'c Catalog) -> Option<Inputs<'c>> {
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
    Some(Inputs {
        sucrose,
        sucrose_equivalent_mol: sucrose_equivalent_g / SUCROSE_MOLAR_MASS,
        msnf_g: mix.msnf_g,
        water_g: mix.water_g,
    })
}

impl Inputs<'_> {
    /// The temperature (°C) at which `unfrozen_g` of water holds the mix's
    /// sucrose equivalent and milk salts in equilibrium with ice.
    fn temp_c_with_unfrozen_water(&self, unfrozen_g: f64) -> f64 {
        let molality = 1000.0 * self.sucrose_equivalent_mol / unfrozen_g;
        let sugars_c = if molality > 0.0 {
            temp_c_for_ln_activity(self.sucrose.binary.ln_aw(molality))
        } else {
            0.0
        };
        sugars_c - SALTS_TERM_K * self.msnf_g / unfrozen_g
    }
}

/// The classic estimate of the freezing point (°C); `None` without water or sucrose in the catalog.
pub fn classic_freezing_point_c(mix: &Mix, catalog: &Catalog) -> Option<f64> {
    let i = inputs(mix, catalog)?;
    Some(i.temp_c_with_unfrozen_water(i.water_g))
}

/// The temperature (°C) at which the classic method has `frozen_fraction`
/// (0..1) of the mix's water frozen.
pub fn classic_temp_for_frozen_fraction(
    mix: &Mix,
    catalog: &Catalog,
    frozen_fraction: f64,
) -> Option<f64> {
    let i = inputs(mix, catalog)?;
    if !(0.0..1.0).contains(&frozen_fraction) {
        return None;
    }
    Some(i.temp_c_with_unfrozen_water((1.0 - frozen_fraction) * i.water_g))
}

/// The share of the mix's water (0..1) the classic method has frozen at `temp_c`.
pub fn classic_frozen_fraction(mix: &Mix, catalog: &Catalog, temp_c: f64) -> Option<f64> {
    let i = inputs(mix, catalog)?;
    if i.temp_c_with_unfrozen_water(i.water_g) <= temp_c {
        return Some(0.0);
    }
    // The equilibrium temperature falls as the unfrozen water shrinks: bisect on it.
    let (mut lo, mut hi) = (0.0_f64, 1.0_f64);
    for _ in 0..50 {
        let mid = 0.5 * (lo + hi);
        if i.temp_c_with_unfrozen_water((1.0 - mid) * i.water_g) > temp_c {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Some(0.5 * (lo + hi))
}

/// The classic figures for a mix (`is_drink` for liqueurs and spirits), with
/// whether the method applies and, if not, why.
pub fn classic(mix: &Mix, catalog: &Catalog, is_drink: bool) -> Classic {
    let freezing_point_c = classic_freezing_point_c(mix, catalog);
    let mut why = Vec::new();
    let pct = |g: f64| 100.0 * g / mix.mass_g;
    let ethanol_pct = pct(mix.solute_g("ethanol"));
    if is_drink {
        why.push("it is built for frozen desserts, not liqueurs or spirits".to_string());
    }
    if ethanol_pct > CLASSIC_MAX_ETHANOL_PCT {
        why.push(format!(
            "{ethanol_pct:.1} % alcohol by mass is beyond its sugars-and-milk-solids basis (over {CLASSIC_MAX_ETHANOL_PCT} % it runs several kelvin off)"
        ));
    }
    let salt_pct = pct(mix.solute_g("sodium-chloride") + mix.solute_g("potassium-chloride"));
    if salt_pct > CLASSIC_MAX_SALT_PCT {
        why.push(format!(
            "{salt_pct:.1} % added salt is more than it allows for (it counts only the milk salts)"
        ));
    }
    if let Some(i) = inputs(mix, catalog) {
        let se_g = i.sucrose_equivalent_mol * SUCROSE_MOLAR_MASS;
        let se_pct = 100.0 * se_g / (se_g + i.water_g);
        if se_pct > CLASSIC_MAX_SE_PCT {
            why.push(format!(
                "its sucrose equivalent of {se_pct:.0} % in the water is past the {CLASSIC_MAX_SE_PCT:.0} % where the sucrose table ends"
            ));
        }
    } else {
        why.push("the mix holds no water".to_string());
    }
    let applies = why.is_empty();
    Classic {
        freezing_point_c,
        applies,
        note: (!applies).then(|| format!("the classic method does not apply: {}", why.join("; "))),
    }
}

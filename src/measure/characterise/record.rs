//! What a characterisation saves and states: the sucrose equivalent, the
//! `source` text that records the measurements, and the sample as an ingredient.

use std::collections::BTreeMap;

use crate::catalog::Catalog;
use crate::model::{Ingredient, Solute};
use crate::thermo::binary::Binary;

use super::{
    CharacteriseError, DilutionPoint, DryMatter, SUCROSE_EQUIVALENT_REFERENCE_G_PER_100G_WATER,
    SampleSpec,
};

/// Estimated apparent specific volume of dissolved solids (mL/g), for the saved
/// ingredient's density: typical of sugars in solution (memory).
const SOLIDS_SPECIFIC_VOLUME_ML_G: f64 = 0.62;

/// Grams of sucrose per gram of these solids giving the same freezing point, at the
/// reference concentration (equal water activity means equal freezing point).
pub(super) fn sucrose_equivalent(
    binary: &Binary,
    molar_mass: f64,
    catalog: &Catalog,
) -> Result<f64, CharacteriseError> {
    let sucrose = catalog
        .solute("sucrose")
        .ok_or(CharacteriseError::NoSucrose)?;
    let reference = SUCROSE_EQUIVALENT_REFERENCE_G_PER_100G_WATER;
    let molality = reference / molar_mass / 0.1;
    let ln_aw = binary.ln_aw(molality);
    let sucrose_molality = sucrose.binary.molality_at(ln_aw, None);
    let sucrose_g_per_100g_water = sucrose_molality * sucrose.solute.molar_mass_g_mol * 0.1;
    Ok(sucrose_g_per_100g_water / reference)
}

/// The `source` text that records the measurements.
pub(super) fn source_text(
    spec: &SampleSpec,
    points: &[DilutionPoint],
    norrish_k: Option<f64>,
) -> String {
    let readings: Vec<String> = points
        .iter()
        .map(|p| {
            format!(
                "{} g in {} g water froze at {} °C",
                p.sample_g, p.water_g, p.freezing_point_c
            )
        })
        .collect();
    let basis = match spec.dry_matter {
        DryMatter::SolidsPct(p) => format!("{p} % dissolved solids"),
        DryMatter::Brix(b) => format!("{b} °Brix taken as % dissolved solids"),
    };
    let k = match norrish_k {
        Some(k) => format!("Norrish K {k:.2} fitted"),
        None => "one point, so ideal law (K = 0)".to_string(),
    };
    format!(
        "measured freezing points (cryoscopic method): {}; sample {basis}, i = {}; Murphy & Koop ice activity, {k}",
        readings.join("; "),
        spec.dissociation
    )
}

/// The sample as measured: its water and its dissolved solids as the new solute.
pub(super) fn sample_ingredient(spec: &SampleSpec, solute: &Solute, solids_pct: f64) -> Ingredient {
    let solids = solids_pct / 100.0;
    let specific_volume = (1.0 - solids) + solids * SOLIDS_SPECIFIC_VOLUME_ML_G;
    Ingredient {
        id: spec.id.clone(),
        name: spec.name.clone(),
        category: spec.category,
        water_pct: 100.0 - solids_pct,
        fat_pct: 0.0,
        protein_pct: 0.0,
        other_solids_pct: 0.0,
        solutes_pct: BTreeMap::from([(solute.id.clone(), solids_pct)]),
        density_g_ml: 1.0 / specific_volume,
        allergens: Vec::new(),
        source: format!(
            "{}; density estimated from typical specific volumes, measure it for amounts by volume",
            solute.source
        ),
    }
}

//! Recipe + catalog -> Mix: the mass of every component of the batch, summed
//! over its lines.

use std::collections::BTreeMap;

use crate::catalog::{Catalog, SoluteEntry};
use crate::model::{Category, Recipe, SoluteKind};
use crate::thermo::ethanol::{ETHANOL_DENSITY_20C_KG_M3, density_20c_kg_m3};
use crate::thermo::zsr::{Serum, SerumSolute};

use super::AnalysisError;

/// The summed composition of a recipe (all masses in g).
#[derive(Debug, Clone, Default)]
pub struct Mix<'c> {
    /// Total mass (g).
    pub mass_g: f64,
    /// Water (g).
    pub water_g: f64,
    /// Fat (g).
    pub fat_g: f64,
    /// Protein (g).
    pub protein_g: f64,
    /// Insoluble or non-osmotic solids (g).
    pub other_solids_g: f64,
    /// Milk solids-not-fat of the dairy ingredients (g).
    pub msnf_g: f64,
    /// Each dissolved solute (g), in id order.
    pub solutes: BTreeMap<String, (&'c SoluteEntry, f64)>,
    /// Mass (g) of each line, in recipe order.
    pub line_mass_g: Vec<f64>,
    /// Categories present.
    pub categories: Vec<Category>,
    /// Allergens present, sorted, without repeats.
    pub allergens: Vec<String>,
}

/// Apparent specific volume in solution (mL/g) by kind of component, for the
/// volume (and so the ABV) of a mix that holds more than ethanol and water.
/// Typical partial specific volumes (memory): sugars about 0.62, fat 1/0.92,
/// protein 0.74; exact for pure ethanol-water, where OIML R 22 applies.
fn specific_volume_ml_g(kind: SoluteKind) -> f64 {
    match kind {
        SoluteKind::Salt | SoluteKind::MilkMinerals => 0.35,
        SoluteKind::Acid => 0.6,
        _ => 0.62,
    }
}

impl<'c> Mix<'c> {
    /// Sums a recipe's lines through the catalog.
    pub fn from_recipe(recipe: &Recipe, catalog: &'c Catalog) -> Result<Mix<'c>, AnalysisError> {
        let mut mix = Mix::default();
        for (index, line) in recipe.lines.iter().enumerate() {
            let Some(ing) = catalog.ingredient(&line.ingredient) else {
                if let Some(problem) = catalog.spirit_id_problem(&line.ingredient) {
                    return Err(AnalysisError::BadSpirit {
                        line: index + 1,
                        id: line.ingredient.clone(),
                        why: problem.why,
                        suggestion: problem.suggestion,
                    });
                }
                return Err(AnalysisError::UnknownIngredient {
                    line: index + 1,
                    id: line.ingredient.clone(),
                    suggestions: catalog.nearest_ingredients(&line.ingredient),
                });
            };
            let g = line.amount.grams(ing.density_g_ml);
            if !(g >= 0.0 && g.is_finite()) {
                return Err(AnalysisError::BadAmount {
                    line: index + 1,
                    grams: g,
                });
            }
            let part = |pct: f64| g * pct / 100.0;
            mix.mass_g += g;
            mix.water_g += part(ing.water_pct);
            mix.fat_g += part(ing.fat_pct);
            mix.protein_g += part(ing.protein_pct);
            mix.other_solids_g += part(ing.other_solids_pct);
            let dairy = ing.category == Category::Dairy;
            if dairy {
                mix.msnf_g += part(ing.protein_pct);
            }
            for (id, pct) in &ing.solutes_pct {
                let Some(entry) = catalog.solute(id) else {
                    return Err(AnalysisError::UnknownSolute {
                        ingredient: ing.id.clone(),
                        id: id.clone(),
                    });
                };
                if dairy && (entry.solute.kind == SoluteKind::MilkMinerals || id == "lactose") {
                    mix.msnf_g += part(*pct);
                }
                mix.solutes.entry(id.clone()).or_insert((entry, 0.0)).1 += part(*pct);
            }
            mix.line_mass_g.push(g);
            if g > 0.0 {
                if !mix.categories.contains(&ing.category) {
                    mix.categories.push(ing.category);
                }
                for a in &ing.allergens {
                    if !mix.allergens.contains(a) {
                        mix.allergens.push(a.clone());
                    }
                }
            }
        }
        mix.allergens.sort();
        if !(mix.mass_g > 0.0) {
            return Err(AnalysisError::NoMass);
        }
        Ok(mix)
    }

    /// Mass (g) of one solute, 0 when absent.
    pub fn solute_g(&self, id: &str) -> f64 {
        self.solutes.get(id).map_or(0.0, |s| s.1)
    }

    /// Mass (g) of all solutes of the given kinds.
    pub fn kind_g(&self, kinds: &[SoluteKind]) -> f64 {
        self.solutes
            .values()
            .filter(|(e, _)| kinds.contains(&e.solute.kind))
            .map(|(_, g)| g)
            .sum()
    }

    /// The water and dissolved solutes, for the freezing curve.
    pub fn serum(&self) -> Serum<'c> {
        Serum {
            water_g: self.water_g,
            solutes: self
                .solutes
                .values()
                .filter(|(_, g)| *g > 0.0)
                .map(|(e, g)| SerumSolute {
                    table: e.table(),
                    moles: g / e.solute.molar_mass_g_mol,
                    mass_g: *g,
                    glass_forming: e.solute.kind != SoluteKind::Alcohol,
                    dissociation: e.solute.dissociation,
                })
                .collect(),
        }
    }

    /// Estimated volume at 20 °C (mL): the ethanol-water part by OIML R 22, the
    /// rest by typical apparent specific volumes.
    pub fn volume_ml(&self) -> f64 {
        let ethanol_g = self.solute_g("ethanol");
        let hydro_g = ethanol_g + self.water_g;
        let mut v = if hydro_g > 0.0 {
            hydro_g / (density_20c_kg_m3(ethanol_g / hydro_g) / 1000.0)
        } else {
            0.0
        };
        v += self.fat_g / 0.92 + self.protein_g * 0.74 + self.other_solids_g * 0.65;
        for (e, g) in self.solutes.values() {
            if e.solute.kind != SoluteKind::Alcohol {
                v += g * specific_volume_ml_g(e.solute.kind);
            }
        }
        v
    }

    /// Alcoholic strength (% vol at 20 °C).
    pub fn abv_pct(&self) -> f64 {
        let v = self.volume_ml();
        if v <= 0.0 {
            return 0.0;
        }
        100.0 * self.solute_g("ethanol") / (ETHANOL_DENSITY_20C_KG_M3 / 1000.0) / v
    }
}

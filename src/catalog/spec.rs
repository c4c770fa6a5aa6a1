//! The catalog file's format, and turning its entries into solutes (fitting
//! their model parameters to the freezing data given) and ingredients.

use std::collections::BTreeMap;

use serde::Deserialize;
use toml::Spanned;

use crate::model::{Category, Ingredient, Solute, SoluteKind};
use crate::thermo::binary::WaterModel;
use crate::thermo::fit::{fit_mole_fraction, fit_pitzer, tabulate_freezing_points};

/// A problem in a catalog file.
#[derive(Debug, thiserror::Error)]
pub enum CatalogFileError {
    /// Not valid TOML or not the expected fields.
    #[error("catalog file: {0}")]
    Toml(#[from] toml::de::Error),
    /// An entry's model cannot be built.
    #[error("catalog entry `{id}`: {why}")]
    Entry {
        /// The entry's id.
        id: String,
        /// What is wrong.
        why: String,
    },
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct CatalogFile {
    #[serde(default)]
    solute: Vec<SoluteSpec>,
    #[serde(default)]
    ingredient: Vec<IngredientTable>,
    #[serde(default)]
    spirits: Option<SpiritsSpec>,
}

/// The neutral spirits listed for browsing (every strength resolves by id anyway).
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct SpiritsSpec {
    /// Strengths to list (% vol at 20 °C).
    listed_abv_pct: Vec<f64>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct SoluteSpec {
    id: String,
    name: String,
    kind: SoluteKind,
    molar_mass_g_mol: f64,
    dissociation: f64,
    model: String,
    #[serde(default)]
    series_terms: Option<usize>,
    #[serde(default)]
    norrish_k: Option<f64>,
    #[serde(default)]
    a_phi: Option<f64>,
    #[serde(default)]
    beta0: Option<f64>,
    #[serde(default)]
    beta1: Option<f64>,
    #[serde(default)]
    c_phi: Option<f64>,
    #[serde(default)]
    max_molality: Option<f64>,
    #[serde(default)]
    sweetness: Option<f64>,
    #[serde(default)]
    solubility_g_per_100g_water_0c: Option<f64>,
    source: String,
    /// [mass % of solute in the solution, freezing-point depression (K)].
    #[serde(default)]
    freezing_data: Vec<[f64; 2]>,
}

/// An ingredient table as written in the catalog and in recipe files.
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
pub struct IngredientTable {
    /// Kebab-case id, with its place in the file.
    pub id: Spanned<String>,
    /// Display name.
    pub name: String,
    /// Category name, with its place in the file; `other` when absent.
    #[serde(default)]
    pub category: Option<Spanned<String>>,
    /// Water (mass %).
    #[serde(default)]
    pub water_pct: f64,
    /// Fat (mass %).
    #[serde(default)]
    pub fat_pct: f64,
    /// Protein (mass %).
    #[serde(default)]
    pub protein_pct: f64,
    /// Insoluble or non-osmotic solids (mass %).
    #[serde(default)]
    pub other_solids_pct: f64,
    /// Dissolved solutes by id (mass %).
    #[serde(default)]
    pub solutes_pct: BTreeMap<String, f64>,
    /// Density (g/mL), with its place in the file; 1 when absent.
    #[serde(default)]
    pub density_g_ml: Option<Spanned<f64>>,
    /// Allergens.
    #[serde(default)]
    pub allergens: Vec<String>,
    /// Where the numbers come from.
    #[serde(default)]
    pub source: Option<String>,
    /// Price per kg (recipe files only: an own ingredient's price for least
    /// cost; the catalog refuses it).
    #[serde(default)]
    pub price_per_kg: Option<Spanned<f64>>,
}

impl IngredientTable {
    /// The ingredient, or the span and message of an unknown category.
    /// Composition checks are [`crate::catalog::Catalog::validate_ingredient`]'s job.
    pub fn to_ingredient(
        &self,
        default_source: &str,
    ) -> Result<Ingredient, (std::ops::Range<usize>, String)> {
        let category = match &self.category {
            None => Category::Other,
            Some(c) => Category::parse(c.get_ref()).ok_or_else(|| {
                let all: Vec<&str> = Category::ALL.iter().map(|c| c.as_str()).collect();
                (
                    c.span(),
                    format!(
                        "unknown category `{}`; valid categories: {}",
                        c.get_ref(),
                        all.join(", ")
                    ),
                )
            })?,
        };
        Ok(Ingredient {
            id: self.id.get_ref().clone(),
            name: self.name.clone(),
            category,
            water_pct: self.water_pct,
            fat_pct: self.fat_pct,
            protein_pct: self.protein_pct,
            other_solids_pct: self.other_solids_pct,
            solutes_pct: self.solutes_pct.clone(),
            density_g_ml: self.density_g_ml.as_ref().map_or(1.0, |d| *d.get_ref()),
            allergens: self.allergens.clone(),
            source: self
                .source
                .clone()
                .unwrap_or_else(|| default_source.to_string()),
        })
    }
}

/// Molality (mol/kg water) of a binary solution of `mass_pct` solute (g per 100 g solution).
pub fn molality_from_mass_pct(mass_pct: f64, molar_mass_g_mol: f64) -> f64 {
    1000.0 * mass_pct / ((100.0 - mass_pct) * molar_mass_g_mol)
}

impl SoluteSpec {
    fn into_solute(self) -> Result<Solute, CatalogFileError> {
        let fail = |why: &str| CatalogFileError::Entry {
            id: self.id.clone(),
            why: why.to_string(),
        };
        let points: Vec<(f64, f64)> = self
            .freezing_data
            .iter()
            .map(|[w, dt]| (molality_from_mass_pct(*w, self.molar_mass_g_mol), *dt))
            .collect();
        let max_data = points.iter().map(|p| p.0).fold(0.0, f64::max);
        let norrish_k = self.norrish_k.unwrap_or(0.0);
        let model = match self.model.as_str() {
            "ideal" => WaterModel::Ideal { norrish_k },
            "norrish-series" => {
                let terms = self
                    .series_terms
                    .ok_or_else(|| fail("norrish-series needs series_terms"))?;
                let coeffs = fit_mole_fraction(self.dissociation, &points, terms)
                    .ok_or_else(|| fail("freezing_data too few or degenerate for the fit"))?;
                WaterModel::NorrishSeries {
                    coeffs,
                    max_molality: max_data,
                    norrish_k,
                }
            }
            "tabulated" => {
                if points.len() < 2 {
                    return Err(fail("tabulated needs at least two freezing_data rows"));
                }
                tabulate_freezing_points(&points)
            }
            "pitzer" => {
                let a_phi = self.a_phi.ok_or_else(|| fail("pitzer needs a_phi"))?;
                let ([beta0, beta1, c_phi], max_molality) =
                    match (self.beta0, self.beta1, self.c_phi) {
                        (Some(b0), Some(b1), Some(c)) => (
                            [b0, b1, c],
                            self.max_molality
                                .ok_or_else(|| fail("pitzer needs max_molality"))?,
                        ),
                        _ => (
                            fit_pitzer(a_phi, &points)
                                .ok_or_else(|| fail("freezing_data too few for the fit"))?,
                            max_data,
                        ),
                    };
                WaterModel::Pitzer {
                    beta0,
                    beta1,
                    c_phi,
                    a_phi,
                    max_molality,
                }
            }
            other => return Err(fail(&format!("unknown model `{other}`"))),
        };
        Ok(Solute {
            id: self.id,
            name: self.name,
            kind: self.kind,
            molar_mass_g_mol: self.molar_mass_g_mol,
            dissociation: self.dissociation,
            model,
            sweetness: self.sweetness,
            solubility_g_per_100g_water_0c: self.solubility_g_per_100g_water_0c,
            source: self.source,
        })
    }
}

/// Parses a catalog file into its solutes (models fitted) and ingredients.
pub fn parse_catalog(text: &str) -> Result<(Vec<Solute>, Vec<Ingredient>), CatalogFileError> {
    let file: CatalogFile = toml::from_str(text)?;
    let solutes = file
        .solute
        .into_iter()
        .map(SoluteSpec::into_solute)
        .collect::<Result<Vec<_>, _>>()?;
    let ingredients = file
        .ingredient
        .iter()
        .map(|i| {
            let entry = |why: String| CatalogFileError::Entry {
                id: i.id.get_ref().clone(),
                why,
            };
            if i.price_per_kg.is_some() {
                return Err(entry(
                    "the catalog holds no prices: give them in a recipe file or the batch log"
                        .into(),
                ));
            }
            i.to_ingredient("").map_err(|(_, why)| entry(why))
        })
        .collect::<Result<Vec<_>, _>>()?;
    let mut ingredients = ingredients;
    for abv_pct in file.spirits.map(|s| s.listed_abv_pct).unwrap_or_default() {
        let spirit = super::spirit::listed(abv_pct).ok_or_else(|| CatalogFileError::Entry {
            id: format!("spirits.listed_abv_pct {abv_pct}"),
            why: "not a strength above 0 and at most 100 % vol in steps of 0.05".into(),
        })?;
        ingredients.push(spirit);
    }
    Ok((solutes, ingredients))
}

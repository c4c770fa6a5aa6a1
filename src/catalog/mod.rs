//! The built-in solutes and ingredients, read from `catalog.toml` (embedded at
//! build time) once per process. Where a solute has measured freezing points,
//! its model parameters are fitted to them here, at load, and its binary
//! freezing curve is tabulated for the ZSR rule.
//!
//! A recipe's own solutes and ingredients are layered on top with
//! [`Catalog::with_additions`], which validates them. Neutral spirits at any
//! strength (`spirit-57-vol`, `spirit-114-proof`) resolve by id without being
//! listed: see [`spirit`].

mod spec;
pub mod spirit;
mod suggest;

use std::collections::HashMap;
use std::sync::{Arc, OnceLock};

use crate::model::{Ingredient, Solute};
use crate::thermo::binary::Binary;
use crate::thermo::zsr::FreezingTable;

pub use spec::{CatalogFileError, IngredientTable, parse_catalog};
pub use suggest::{did_you_mean as suggest_text, nearest};

/// Tolerance on a composition's total (mass %): 100 ± this.
pub const COMPOSITION_TOLERANCE_PCT: f64 = 0.05;

/// A solute with its binary model and tabulated freezing curve.
#[derive(Debug, Clone)]
pub struct SoluteEntry {
    /// The solute.
    pub solute: Solute,
    /// Its binary model with the dissociation factor.
    pub binary: Binary,
    /// Its binary freezing curve on the ZSR grid, tabulated on first use.
    table: OnceLock<FreezingTable>,
}

impl SoluteEntry {
    /// Builds the entry; the freezing curve is tabulated when first needed.
    pub fn new(solute: Solute) -> SoluteEntry {
        let binary = Binary {
            dissociation: solute.dissociation,
            model: solute.model.clone(),
        };
        SoluteEntry {
            solute,
            binary,
            table: OnceLock::new(),
        }
    }

    /// The binary freezing curve on the ZSR grid.
    pub fn table(&self) -> &FreezingTable {
        self.table.get_or_init(|| FreezingTable::new(&self.binary))
    }
}

/// Something wrong with a user's own solute or ingredient.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CatalogError {
    /// The id is already taken.
    #[error("the id `{0}` is already used by a built-in solute or ingredient; choose another id")]
    DuplicateId(String),
    /// The id is not kebab-case.
    #[error("the id `{0}` must be lower-case letters, digits and dashes (like `house-syrup`)")]
    BadId(String),
    /// A number that must be positive is not, or is beyond any real value.
    #[error("{field} of `{id}` must be a positive number up to {max}, not {value}")]
    NotPositive {
        /// The item's id.
        id: String,
        /// Which field.
        field: &'static str,
        /// The value given.
        value: f64,
        /// The largest value taken.
        max: f64,
    },
    /// A composition part is negative or not finite.
    #[error("{field} of `{id}` must be between 0 and 100, not {value}")]
    BadPart {
        /// The item's id.
        id: String,
        /// Which part.
        field: String,
        /// The value given.
        value: f64,
    },
    /// A number outside its range (or not a number).
    #[error("{field} of `{id}` must be a number from 0 to {max}, not {value}")]
    BadRange {
        /// The item's id.
        id: String,
        /// Which field.
        field: String,
        /// The value given.
        value: f64,
        /// The largest value taken.
        max: f64,
    },
    /// A name holds a control character.
    #[error("the name of `{id}` holds the control character {found}; names are plain text")]
    ControlCharacter {
        /// The item's id.
        id: String,
        /// The character, as U+XXXX.
        found: String,
    },
    /// The composition does not add up to 100.
    #[error(
        "the composition of `{id}` adds up to {total:.2} %, not 100 % (water, fat, protein, other solids and solutes together)"
    )]
    NotHundred {
        /// The ingredient's id.
        id: String,
        /// What it adds up to (mass %).
        total: f64,
    },
    /// A composition names a solute that does not exist.
    #[error("`{ingredient}` contains the unknown solute `{solute}`{}", suggest::did_you_mean(.suggestions))]
    UnknownSolute {
        /// The ingredient's id.
        ingredient: String,
        /// The unknown solute id.
        solute: String,
        /// The nearest known solute ids.
        suggestions: Vec<String>,
    },
}

/// Solutes and ingredients by id.
#[derive(Debug, Clone, Default)]
pub struct Catalog {
    solutes: Vec<Arc<SoluteEntry>>,
    solute_index: HashMap<String, usize>,
    ingredients: Vec<Arc<Ingredient>>,
    ingredient_index: HashMap<String, usize>,
}

static BUILTIN: OnceLock<Catalog> = OnceLock::new();

/// The embedded catalog file.
pub const CATALOG_TOML: &str = include_str!("catalog.toml");

/// What a kitchen calls white sugar; each is sucrose (common practice).
const KITCHEN_SUCROSE: [&str; 5] = [
    "sugar",
    "white-sugar",
    "table-sugar",
    "granulated-sugar",
    "caster-sugar",
];
/// The catalog id of sucrose.
const SUCROSE_ID: &str = "sucrose";

impl Catalog {
    /// The built-in catalog, loaded and fitted on first use.
    ///
    /// # Panics
    /// Only if the embedded `catalog.toml` is broken, which the test suite rules out.
    pub fn builtin() -> &'static Catalog {
        BUILTIN.get_or_init(|| match parse_catalog(CATALOG_TOML) {
            Ok((solutes, ingredients)) => {
                let mut c = Catalog::default();
                for s in solutes {
                    c.push_solute(SoluteEntry::new(s));
                }
                for i in ingredients {
                    c.push_ingredient(i);
                }
                c
            }
            Err(e) => panic!("the built-in catalog.toml is invalid: {e}"),
        })
    }

    fn push_solute(&mut self, entry: SoluteEntry) {
        let pure = Ingredient::pure(&entry.solute);
        self.solute_index
            .insert(entry.solute.id.clone(), self.solutes.len());
        self.solutes.push(Arc::new(entry));
        self.push_ingredient(pure);
    }

    fn push_ingredient(&mut self, ingredient: Ingredient) {
        self.ingredient_index
            .insert(ingredient.id.clone(), self.ingredients.len());
        self.ingredients.push(Arc::new(ingredient));
    }

    /// The solute with this id.
    pub fn solute(&self, id: &str) -> Option<&SoluteEntry> {
        self.solute_index.get(id).map(|k| self.solutes[*k].as_ref())
    }

    /// The ingredient with this id (every solute id is also one, and so is every
    /// neutral spirit strength written `spirit-<ABV>-vol` or `spirit-<proof>-proof`).
    pub fn ingredient(&self, id: &str) -> Option<&Ingredient> {
        match self.ingredient_index.get(id) {
            Some(k) => Some(self.ingredients[*k].as_ref()),
            None => spirit::resolve(id),
        }
    }

    /// All solutes, in catalog order.
    pub fn solutes(&self) -> impl Iterator<Item = &SoluteEntry> {
        self.solutes.iter().map(|s| s.as_ref())
    }

    /// All listed ingredients, in catalog order (pure solutes included; of the
    /// spirits only the usual strengths the catalog file names).
    pub fn ingredients(&self) -> impl Iterator<Item = &Ingredient> {
        self.ingredients.iter().map(|i| i.as_ref())
    }

    /// The nearest known ingredient ids to `id`, best first. For a spirit id that
    /// does not resolve (out of range, off the grid, wrong unit) the nearest valid
    /// spirit comes first.
    pub fn nearest_ingredients(&self, id: &str) -> Vec<String> {
        let mut near = nearest(id, self.ingredient_index.keys().map(String::as_str), 3);
        // The kitchen's word for white sugar names the sugar itself, not the
        // nearest spelling (`brown-sugar`).
        if KITCHEN_SUCROSE.contains(&id) && self.ingredient_index.contains_key(SUCROSE_ID) {
            near.retain(|n| n != SUCROSE_ID);
            near.insert(0, SUCROSE_ID.to_string());
            near.truncate(3);
        }
        if let Some(Err(e)) = spirit::parse(id) {
            near.retain(|n| *n != e.suggestion);
            near.insert(0, e.suggestion);
            near.truncate(3);
        }
        near
    }

    /// Why `id` does not name a spirit, when it is shaped like a spirit id that
    /// does not resolve; `None` for every other id.
    pub fn spirit_id_problem(&self, id: &str) -> Option<spirit::SpiritIdError> {
        if self.ingredient_index.contains_key(id) {
            return None;
        }
        spirit::parse(id)?.err()
    }

    /// The nearest known solute ids to `id`, best first.
    pub fn nearest_solutes(&self, id: &str) -> Vec<String> {
        nearest(id, self.solute_index.keys().map(String::as_str), 3)
    }

    /// This catalog plus a user's own solutes and ingredients, each validated.
    /// Returns the first problem found.
    pub fn with_additions(
        &self,
        solutes: &[Solute],
        ingredients: &[Ingredient],
    ) -> Result<Catalog, CatalogError> {
        let mut c = self.clone();
        for s in solutes {
            validate_solute(s)?;
            if c.ingredient(&s.id).is_some() {
                return Err(CatalogError::DuplicateId(s.id.clone()));
            }
            c.push_solute(SoluteEntry::new(s.clone()));
        }
        for i in ingredients {
            c.validate_ingredient(i)?;
            if c.ingredient(&i.id).is_some() {
                return Err(CatalogError::DuplicateId(i.id.clone()));
            }
            c.push_ingredient(i.clone());
        }
        Ok(c)
    }

    /// Checks an ingredient's id, parts, total, solutes and density against this catalog.
    pub fn validate_ingredient(&self, i: &Ingredient) -> Result<(), CatalogError> {
        // A spirit id may hold a decimal point (`spirit-37.5-vol`).
        if !matches!(spirit::parse(&i.id), Some(Ok(_))) {
            validate_id(&i.id)?;
        }
        validate_name(&i.id, &i.name)?;
        for allergen in &i.allergens {
            validate_name(&i.id, allergen)?;
        }
        let parts = [
            ("water_pct", i.water_pct),
            ("fat_pct", i.fat_pct),
            ("protein_pct", i.protein_pct),
            ("other_solids_pct", i.other_solids_pct),
        ];
        for (field, value) in parts {
            check_part(&i.id, field, value)?;
        }
        for (solute, value) in &i.solutes_pct {
            check_part(&i.id, solute, *value)?;
            if self.solute(solute).is_none() {
                return Err(CatalogError::UnknownSolute {
                    ingredient: i.id.clone(),
                    solute: solute.clone(),
                    suggestions: self.nearest_solutes(solute),
                });
            }
        }
        let total = i.total_pct();
        if (total - 100.0).abs() > COMPOSITION_TOLERANCE_PCT {
            return Err(CatalogError::NotHundred {
                id: i.id.clone(),
                total,
            });
        }
        positive(&i.id, "density_g_ml", i.density_g_ml, MAX_DENSITY_G_ML)?;
        Ok(())
    }
}

fn check_part(id: &str, field: &str, value: f64) -> Result<(), CatalogError> {
    if !(0.0..=100.0).contains(&value) {
        return Err(CatalogError::BadPart {
            id: id.to_string(),
            field: field.to_string(),
            value,
        });
    }
    Ok(())
}

/// Checks that an id is kebab-case: lower-case ASCII letters, digits and single dashes.
pub fn validate_id(id: &str) -> Result<(), CatalogError> {
    let ok = !id.is_empty()
        && id.len() <= 64
        && id
            .bytes()
            .all(|b| b.is_ascii_lowercase() || b.is_ascii_digit() || b == b'-')
        && !id.starts_with('-')
        && !id.ends_with('-')
        && !id.contains("--");
    if ok {
        Ok(())
    } else {
        Err(CatalogError::BadId(id.to_string()))
    }
}

/// The largest molar mass taken (g/mol): above the largest food polymers.
pub const MAX_MOLAR_MASS_G_MOL: f64 = 1.0e7;
/// The largest dissociation (van 't Hoff) factor taken.
pub const MAX_DISSOCIATION: f64 = 10.0;
/// The largest Norrish K taken (published ones are below 20).
pub const MAX_NORRISH_K: f64 = 1000.0;
/// The largest relative sweetness taken (sucrose = 100; intense sweeteners reach
/// some hundred thousand).
pub const MAX_SWEETNESS: f64 = 1.0e6;
/// The largest density taken (g/mL): denser than any food.
pub const MAX_DENSITY_G_ML: f64 = 25.0;

/// A number that must lie above zero and at most `max`, finite.
pub fn positive(id: &str, field: &'static str, value: f64, max: f64) -> Result<(), CatalogError> {
    if value > 0.0 && value <= max {
        Ok(())
    } else {
        Err(CatalogError::NotPositive {
            id: id.to_string(),
            field,
            value,
            max,
        })
    }
}

/// A number that must lie from zero to `max`, finite.
fn zero_or_more(id: &str, field: &str, value: f64, max: f64) -> Result<(), CatalogError> {
    if (0.0..=max).contains(&value) {
        Ok(())
    } else {
        Err(CatalogError::BadRange {
            id: id.to_string(),
            field: field.to_string(),
            value,
            max,
        })
    }
}

/// Checks a user's solute: id, name, molar mass, dissociation factor, Norrish K
/// and sweetness, each a number the reader takes back.
pub fn validate_solute(s: &Solute) -> Result<(), CatalogError> {
    validate_id(&s.id)?;
    validate_name(&s.id, &s.name)?;
    positive(
        &s.id,
        "molar_mass_g_mol",
        s.molar_mass_g_mol,
        MAX_MOLAR_MASS_G_MOL,
    )?;
    positive(&s.id, "dissociation", s.dissociation, MAX_DISSOCIATION)?;
    if let crate::thermo::binary::WaterModel::Ideal { norrish_k } = s.model {
        zero_or_more(&s.id, "norrish_k", norrish_k, MAX_NORRISH_K)?;
    }
    if let Some(sweetness) = s.sweetness {
        zero_or_more(&s.id, "sweetness", sweetness, MAX_SWEETNESS)?;
    }
    Ok(())
}

/// A display name: plain text, without control characters (escape sequences,
/// line breaks), so that it shows as itself wherever it is printed.
pub fn validate_name(id: &str, name: &str) -> Result<(), CatalogError> {
    match name.chars().find(|c| c.is_control()) {
        Some(c) => Err(CatalogError::ControlCharacter {
            id: id.to_string(),
            found: format!("U+{:04X}", u32::from(c)),
        }),
        None => Ok(()),
    }
}

//! Solutes (what dissolves and lowers the freezing point) and ingredients (what
//! a cook weighs out: a composition of water, fat, protein, insoluble solids and
//! dissolved solutes, in mass percent).

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use crate::thermo::binary::WaterModel;

/// What kind of substance a solute is; decides which composition totals it counts in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum SoluteKind {
    /// Mono- and disaccharides: counted in "sugars".
    Sugar,
    /// Tri- and higher saccharides of glucose syrups, maltodextrins, inulin.
    Oligosaccharide,
    /// Sugar alcohols and glycerol.
    Polyol,
    /// Ethanol.
    Alcohol,
    /// Strong electrolytes (table salt, potassium chloride).
    Salt,
    /// Organic acids.
    Acid,
    /// The salts of milk solids-not-fat, as one pseudo-solute.
    MilkMinerals,
    /// Anything else a user defines.
    Other,
}

/// A substance that dissolves in the water of a mix.
#[derive(Debug, Clone, PartialEq)]
pub struct Solute {
    /// Kebab-case id, unique across solutes and ingredients.
    pub id: String,
    /// Display name.
    pub name: String,
    /// Kind, for the composition totals.
    pub kind: SoluteKind,
    /// Molar mass (g/mol).
    pub molar_mass_g_mol: f64,
    /// Van 't Hoff factor i: particles per formula unit in dilute solution.
    pub dissociation: f64,
    /// Binary water-activity model (its parameters fitted at catalog load where data exist).
    pub model: WaterModel,
    /// Relative sweetness, sucrose = 100; `None` when not sweet or unknown.
    pub sweetness: Option<f64>,
    /// Solubility at 0 °C (g per 100 g water), where known.
    pub solubility_g_per_100g_water_0c: Option<f64>,
    /// Where the numbers come from.
    pub source: String,
}

/// A category of ingredient, for cautions and for the workspace's browser.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, PartialOrd, Ord)]
#[serde(rename_all = "kebab-case")]
pub enum Category {
    /// Milk, cream, milk powders, butter, yogurt.
    Dairy,
    /// Sugars, syrups, polyols.
    Sugar,
    /// Fruit, purées, juices.
    Fruit,
    /// Spirits and ethanol.
    Alcohol,
    /// Eggs and yolks.
    Egg,
    /// Chocolate and cocoa.
    Chocolate,
    /// Non-dairy fats and plant milks.
    Fat,
    /// Stabilisers, emulsifiers, fibres.
    Stabiliser,
    /// Salts and minerals.
    Salt,
    /// Acids.
    Acid,
    /// Water.
    Water,
    /// Anything else.
    Other,
}

impl Category {
    /// All categories, in display order.
    pub const ALL: [Category; 12] = [
        Category::Dairy,
        Category::Sugar,
        Category::Fruit,
        Category::Alcohol,
        Category::Egg,
        Category::Chocolate,
        Category::Fat,
        Category::Stabiliser,
        Category::Salt,
        Category::Acid,
        Category::Water,
        Category::Other,
    ];

    /// The kebab-case name used in files.
    pub fn as_str(self) -> &'static str {
        match self {
            Category::Dairy => "dairy",
            Category::Sugar => "sugar",
            Category::Fruit => "fruit",
            Category::Alcohol => "alcohol",
            Category::Egg => "egg",
            Category::Chocolate => "chocolate",
            Category::Fat => "fat",
            Category::Stabiliser => "stabiliser",
            Category::Salt => "salt",
            Category::Acid => "acid",
            Category::Water => "water",
            Category::Other => "other",
        }
    }

    /// Parses a kebab-case category name.
    pub fn parse(text: &str) -> Option<Category> {
        Category::ALL.into_iter().find(|c| c.as_str() == text)
    }
}

/// Something a cook weighs out, with its composition in mass percent.
#[derive(Debug, Clone, PartialEq)]
pub struct Ingredient {
    /// Kebab-case id.
    pub id: String,
    /// Display name.
    pub name: String,
    /// Category.
    pub category: Category,
    /// Water (mass %).
    pub water_pct: f64,
    /// Fat (mass %).
    pub fat_pct: f64,
    /// Protein (mass %).
    pub protein_pct: f64,
    /// Insoluble or non-osmotic solids: fibre, cocoa solids, stabilisers (mass %).
    pub other_solids_pct: f64,
    /// Each dissolved solute by id (mass %).
    pub solutes_pct: BTreeMap<String, f64>,
    /// Density (g/mL), for amounts given by volume.
    pub density_g_ml: f64,
    /// Allergens, lower-case names (milk, egg, tree-nuts, …).
    pub allergens: Vec<String>,
    /// Where the composition comes from.
    pub source: String,
}

impl Ingredient {
    /// Sum of all composition parts (mass %); 100 for a valid ingredient.
    pub fn total_pct(&self) -> f64 {
        self.water_pct
            + self.fat_pct
            + self.protein_pct
            + self.other_solids_pct
            + self.solutes_pct.values().sum::<f64>()
    }

    /// The pure ingredient made of one solute (every solute id is also an ingredient).
    pub fn pure(solute: &Solute) -> Ingredient {
        let category = match solute.kind {
            SoluteKind::Alcohol => Category::Alcohol,
            SoluteKind::Salt | SoluteKind::MilkMinerals => Category::Salt,
            SoluteKind::Acid => Category::Acid,
            _ => Category::Sugar,
        };
        Ingredient {
            id: solute.id.clone(),
            name: solute.name.clone(),
            category,
            water_pct: 0.0,
            fat_pct: 0.0,
            protein_pct: 0.0,
            other_solids_pct: 0.0,
            solutes_pct: BTreeMap::from([(solute.id.clone(), 100.0)]),
            density_g_ml: if solute.kind == SoluteKind::Alcohol {
                0.78924
            } else {
                1.59
            },
            allergens: Vec::new(),
            source: format!("pure {}", solute.name.to_lowercase()),
        }
    }
}

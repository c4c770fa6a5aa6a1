//! A recipe: a named list of ingredient amounts, plus the user's own solutes and
//! ingredients that it uses.

use serde::{Deserialize, Serialize};

use super::balancing::Request;
use super::{Ingredient, Solute};

/// What kind of product a recipe makes; decides the targets it is checked against.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum Style {
    /// Hard-pack ice cream.
    #[default]
    IceCream,
    /// Gelato.
    Gelato,
    /// Sorbet (no dairy).
    Sorbet,
    /// Sherbet (a little dairy).
    Sherbet,
    /// Frozen yogurt.
    FrozenYogurt,
    /// Soft serve.
    SoftServe,
    /// Liqueur.
    Liqueur,
    /// Spirit.
    Spirit,
    /// Anything else.
    Other,
}

impl Style {
    /// All styles, in display order.
    pub const ALL: [Style; 9] = [
        Style::IceCream,
        Style::Gelato,
        Style::Sorbet,
        Style::Sherbet,
        Style::FrozenYogurt,
        Style::SoftServe,
        Style::Liqueur,
        Style::Spirit,
        Style::Other,
    ];

    /// The kebab-case name used in files.
    pub fn as_str(self) -> &'static str {
        match self {
            Style::IceCream => "ice-cream",
            Style::Gelato => "gelato",
            Style::Sorbet => "sorbet",
            Style::Sherbet => "sherbet",
            Style::FrozenYogurt => "frozen-yogurt",
            Style::SoftServe => "soft-serve",
            Style::Liqueur => "liqueur",
            Style::Spirit => "spirit",
            Style::Other => "other",
        }
    }

    /// Parses a kebab-case style name.
    pub fn parse(text: &str) -> Option<Style> {
        Style::ALL.into_iter().find(|s| s.as_str() == text)
    }

    /// Whether the product is a drink kept liquid (liqueur, spirit) rather than a frozen dessert.
    pub fn is_drink(self) -> bool {
        matches!(self, Style::Liqueur | Style::Spirit)
    }
}

/// How much of an ingredient a line holds.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Amount {
    /// By mass (g).
    Grams(f64),
    /// By volume (mL), converted through the ingredient's density.
    Millilitres(f64),
}

impl Amount {
    /// Mass in g given the ingredient's density (g/mL).
    pub fn grams(self, density_g_ml: f64) -> f64 {
        match self {
            Amount::Grams(g) => g,
            Amount::Millilitres(ml) => ml * density_g_ml,
        }
    }

    /// The same kind of amount multiplied by `factor`.
    pub fn scaled(self, factor: f64) -> Amount {
        match self {
            Amount::Grams(g) => Amount::Grams(g * factor),
            Amount::Millilitres(ml) => Amount::Millilitres(ml * factor),
        }
    }
}

/// One line of a recipe.
#[derive(Debug, Clone, PartialEq)]
pub struct Line {
    /// Ingredient id (built-in, the recipe's own, or a solute id).
    pub ingredient: String,
    /// How much.
    pub amount: Amount,
}

/// A recipe as read from a file or the database.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Recipe {
    /// Name.
    pub name: String,
    /// Style.
    pub style: Style,
    /// Free notes.
    pub notes: String,
    /// Share of water frozen at serving (0..1), when the recipe sets one.
    pub serving_frozen_fraction: Option<f64>,
    /// The display-cabinet temperature this recipe is served from (°C), when its
    /// file sets one (a shop's own cabinet); else the settings' or the default.
    pub cabinet_temp_c: Option<f64>,
    /// The freezer temperature this recipe is kept in (°C), when its file sets one.
    pub freezer_temp_c: Option<f64>,
    /// The user's own solutes.
    pub solutes: Vec<Solute>,
    /// The user's own ingredients.
    pub ingredients: Vec<Ingredient>,
    /// The lines, in order.
    pub lines: Vec<Line>,
    /// What balancing is asked for this recipe: its file's `[balance]` table,
    /// the rules on its lines and its prices (empty when the file gives none).
    pub balance: Request,
}

impl Recipe {
    /// The recipe with every line's amount multiplied by `factor`.
    pub fn scaled(&self, factor: f64) -> Recipe {
        let mut r = self.clone();
        for line in &mut r.lines {
            line.amount = line.amount.scaled(factor);
        }
        r
    }
}

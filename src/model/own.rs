//! The user's own solutes and ingredients: made in the workspace or by
//! `gelu characterise`, kept in the batch log, and usable by any recipe as if
//! they were built in. A recipe that uses one carries a copy of it, so a file
//! or a recorded batch never depends on the log.

use super::{Ingredient, Solute};

/// A library of the user's own solutes and ingredients.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct OwnItems {
    /// Own solutes (each also usable as a pure ingredient of its id).
    pub solutes: Vec<Solute>,
    /// Own ingredients.
    pub ingredients: Vec<Ingredient>,
}

impl OwnItems {
    /// Whether the library holds nothing.
    pub fn is_empty(&self) -> bool {
        self.solutes.is_empty() && self.ingredients.is_empty()
    }

    /// The own solute with this id.
    pub fn solute(&self, id: &str) -> Option<&Solute> {
        self.solutes.iter().find(|s| s.id == id)
    }

    /// The own ingredient with this id.
    pub fn ingredient(&self, id: &str) -> Option<&Ingredient> {
        self.ingredients.iter().find(|i| i.id == id)
    }

    /// Adds a solute unless one of that id is already in (the first one wins).
    pub fn add_solute(&mut self, solute: Solute) {
        if self.solute(&solute.id).is_none() {
            self.solutes.push(solute);
        }
    }

    /// Adds an ingredient unless one of that id is already in (the first one wins).
    pub fn add_ingredient(&mut self, ingredient: Ingredient) {
        if self.ingredient(&ingredient.id).is_none() {
            self.ingredients.push(ingredient);
        }
    }

    /// What a recipe using `ids` (line ingredients, or the solutes an own
    /// ingredient holds) needs from this library: each own ingredient named and
    /// the own solutes it holds, and each own solute named as a pure ingredient.
    /// Ids the library does not hold are passed over.
    pub fn used_by<'a>(&self, ids: impl IntoIterator<Item = &'a str>) -> OwnItems {
        let mut used = OwnItems::default();
        for id in ids {
            if let Some(i) = self.ingredient(id) {
                for solute in i.solutes_pct.keys() {
                    if let Some(s) = self.solute(solute) {
                        used.add_solute(s.clone());
                    }
                }
                used.add_ingredient(i.clone());
            } else if let Some(s) = self.solute(id) {
                used.add_solute(s.clone());
            }
        }
        used
    }
}

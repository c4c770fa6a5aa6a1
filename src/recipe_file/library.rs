//! The user's own items as the batch log keeps them: each one as the text of a
//! small recipe file holding it (with the own solutes an ingredient uses) and
//! one line of water, so that it is read by the one recipe reader and checked
//! like any recipe's own items.

use std::path::Path;

use crate::model::{Amount, Ingredient, Line, OwnItems, Recipe, Solute};
use crate::store::Store;

use super::{RecipeFileError, parse_recipe, recipe_to_toml};

/// The stored definition of an own item: a recipe named `name` holding
/// `solutes` and `ingredients`.
pub fn own_item_definition(name: &str, solutes: &[Solute], ingredients: &[Ingredient]) -> String {
    recipe_to_toml(&Recipe {
        name: name.to_string(),
        solutes: solutes.to_vec(),
        ingredients: ingredients.to_vec(),
        lines: vec![Line {
            ingredient: "water".into(),
            amount: Amount::Grams(1.0),
        }],
        ..Recipe::default()
    })
}

/// The library the stored definitions describe, as (id, definition text):
/// each own solute, and each own ingredient with the own solutes it holds.
/// A definition that does not read is an error naming its id.
pub fn read_own_items<'a>(
    solutes: impl IntoIterator<Item = (&'a str, &'a str)>,
    ingredients: impl IntoIterator<Item = (&'a str, &'a str)>,
) -> Result<OwnItems, RecipeFileError> {
    let mut own = OwnItems::default();
    for (id, text) in solutes {
        let holder = parse_recipe(Path::new(id), text)?;
        for s in holder.solutes.into_iter().filter(|s| s.id == id) {
            own.add_solute(s);
        }
    }
    for (id, text) in ingredients {
        let holder = parse_recipe(Path::new(id), text)?;
        for s in holder.solutes {
            own.add_solute(s);
        }
        for i in holder.ingredients.into_iter().filter(|i| i.id == id) {
            own.add_ingredient(i);
        }
    }
    Ok(own)
}

/// The user's own items kept in the batch log `store`.
pub fn own_items_in(store: &Store) -> anyhow::Result<OwnItems> {
    let solutes = store.custom_solutes()?;
    let ingredients = store.custom_ingredients()?;
    fn pairs(items: &[crate::store::CustomItem]) -> Vec<(&str, &str)> {
        items
            .iter()
            .map(|i| (i.id.as_str(), i.definition.as_str()))
            .collect()
    }
    read_own_items(pairs(&solutes), pairs(&ingredients))
        .map_err(|e| anyhow::anyhow!("one of your own items in the batch log does not read: {e}"))
}

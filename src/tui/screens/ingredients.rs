//! The ingredients screen's half of `update`: browsing and searching solutes
//! and ingredients, adding one to the recipe, and opening the forms for the
//! user's own ones (in `own_items`).

use super::super::action::{Command, Effect};
use super::super::state::{CatalogList, PromptPurpose, State};
use super::move_cursor;
use super::own_items::{open_ingredient_form, open_solute_form};
use super::recipe::{ask_new_line_amount, matches_words, prompt};

/// Handles a command on the ingredients screen.
pub fn command(state: &mut State, command: Command) -> Vec<Effect> {
    let len = state.ingredients.matches.len();
    match command {
        c if c.moves_cursor() => {
            state.ingredients.cursor = move_cursor(state.ingredients.cursor, len, command);
        }
        Command::Search => {
            let text = state.ingredients.filter.clone();
            prompt(
                state,
                PromptPurpose::IngredientSearch,
                "Search by name or id".into(),
                text,
            );
        }
        Command::ClearFilter => set_filter(state, ""),
        Command::SwitchList => {
            state.ingredients.list = match state.ingredients.list {
                CatalogList::Ingredients => CatalogList::Solutes,
                CatalogList::Solutes => CatalogList::Ingredients,
            };
            state.ingredients.cursor = 0;
            refresh_matches(state);
        }
        Command::NewIngredient => open_ingredient_form(state, None, None),
        Command::NewSolute => open_solute_form(state, None, None),
        Command::EditOwn => edit_selected(state),
        Command::AddToRecipe => {
            if let Some(id) = selected_id(state) {
                ask_new_line_amount(state, &id);
            }
        }
        _ => {}
    }
    Vec::new()
}

/// The id under the cursor.
pub fn selected_id(state: &State) -> Option<String> {
    state
        .ingredients
        .matches
        .get(state.ingredients.cursor)
        .cloned()
}

/// Sets the search text and recomputes the matches.
pub fn set_filter(state: &mut State, text: &str) {
    state.ingredients.filter = text.to_string();
    state.ingredients.cursor = 0;
    refresh_matches(state);
}

/// Recomputes the ids shown for the list and search text, sorted by name.
pub fn refresh_matches(state: &mut State) {
    let query = state.ingredients.filter.to_lowercase();
    let catalog = &state.catalog;
    let mut rows: Vec<(String, String)> = match state.ingredients.list {
        CatalogList::Ingredients => catalog
            .ingredients()
            .filter(|i| catalog.solute(&i.id).is_none())
            .map(|i| (i.name.clone(), i.id.clone()))
            .collect(),
        CatalogList::Solutes => catalog
            .solutes()
            .map(|s| (s.solute.name.clone(), s.solute.id.clone()))
            .collect(),
    };
    rows.retain(|(name, id)| matches_words(&format!("{} {id}", name.to_lowercase()), &query));
    rows.sort();
    state.ingredients.matches = rows.into_iter().map(|(_, id)| id).collect();
    let len = state.ingredients.matches.len();
    state.ingredients.cursor = state.ingredients.cursor.min(len.saturating_sub(1));
}

fn edit_selected(state: &mut State) {
    let Some(id) = selected_id(state) else {
        return;
    };
    match state.ingredients.list {
        CatalogList::Ingredients => {
            let own = state.own.ingredients.iter().position(|i| i.id == id);
            let base = state.catalog.ingredient(&id).cloned();
            if own.is_none() {
                state.tell("Built-in numbers are read-only: this form makes your own copy.");
            }
            open_ingredient_form(state, own, base);
        }
        CatalogList::Solutes => {
            let own = state.own.solutes.iter().position(|s| s.id == id);
            let base = state.catalog.solute(&id).map(|e| e.solute.clone());
            if own.is_none() {
                state.tell("Built-in numbers are read-only: this form makes your own copy.");
            }
            open_solute_form(state, own, base);
        }
    }
}

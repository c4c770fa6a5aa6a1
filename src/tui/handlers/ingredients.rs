//! The ingredients screen's half of `update`: browsing and searching solutes
//! and ingredients, adding one to the recipe, and opening the forms for the
//! user's own ones (in `own_items`).

use super::super::action::{Command, Effect};
use super::super::state::{CatalogList, PromptPurpose, State};
use super::characterise::open_characterise_form;
use super::common::move_cursor;
use super::common::prompt;
use super::own_items::{open_ingredient_form, open_solute_form};
use super::recipe::ask_new_line_amount;

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
            state.refresh_ingredient_matches();
        }
        Command::NewIngredient => open_ingredient_form(state, None, None),
        Command::NewSolute => open_solute_form(state, None, None),
        Command::EditOwn => edit_selected(state),
        Command::CharacteriseIngredient => open_characterise_form(state),
        Command::AddToRecipe => {
            if let Some(id) = state.selected_ingredient_id() {
                ask_new_line_amount(state, &id);
            }
        }
        _ => {}
    }
    Vec::new()
}

/// Sets the search text and recomputes the matches.
pub fn set_filter(state: &mut State, text: &str) {
    state.ingredients.filter = text.to_string();
    state.ingredients.cursor = 0;
    state.refresh_ingredient_matches();
}

fn edit_selected(state: &mut State) {
    let Some(id) = state.selected_ingredient_id() else {
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

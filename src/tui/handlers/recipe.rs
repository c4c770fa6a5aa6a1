//! The recipe screen's half of `update`: lines, amounts, scaling, undo and
//! redo, saving and opening. Every change goes through [`change`], which keeps
//! the undo history and recomputes the analysis.

use tui_input::Input;

use crate::batch::plan::parse_size;
use crate::model::{Amount, Line, MassUnit, Recipe, SoluteKind, Style};

use super::super::action::{Command, Effect};
use super::super::state::{
    OpenFrom, Overlay, PickItem, Picker, PickerPurpose, PromptPurpose, Question, RecipeEntry,
    RecipeSource, Screen, State, search_key,
};
use super::batch_forms::size_text;
use super::common::{more_than_ten_times, move_cursor, prompt, prompt_on};
use crate::model::units::{
    amount_edit_text, format_amount, format_mass, format_volume, parse_amount, parse_share,
    trim_number,
};

/// Most undo steps kept.
pub const UNDO_DEPTH: usize = 200;

/// Handles a command on the recipe screen.
pub fn command(state: &mut State, command: Command) -> Vec<Effect> {
    let lines = state.recipe.recipe.lines.len();
    match command {
        c if c.moves_cursor() => {
            state.recipe.cursor = move_cursor(state.recipe.cursor, lines, command);
        }
        Command::AddLine => open_ingredient_picker(state),
        Command::EditAmount => {
            if let Some(line) = state.recipe.recipe.lines.get(state.recipe.cursor) {
                let title = format!("Amount of {}", state.display_name(&line.ingredient));
                let text = amount_edit_text(line.amount, state.settings.mass_unit);
                let at = state.recipe.cursor;
                prompt_on(state, PromptPurpose::LineAmount(at), title, text);
            }
        }
        Command::DeleteLine => {
            let at = state.recipe.cursor;
            if at < lines {
                change(state, |r| {
                    r.lines.remove(at);
                });
            }
        }
        Command::MoveLineUp => {
            let at = state.recipe.cursor;
            if at > 0 && at < lines {
                change(state, |r| r.lines.swap(at, at - 1));
                state.recipe.cursor = at - 1;
            }
        }
        Command::MoveLineDown => {
            let at = state.recipe.cursor;
            if at + 1 < lines {
                change(state, |r| r.lines.swap(at, at + 1));
                state.recipe.cursor = at + 1;
            }
        }
        Command::ScaleRecipe => match &state.recipe.analysis {
            Ok(a) => {
                let text = size_text(a, state.settings.mass_unit);
                prompt_on(
                    state,
                    PromptPurpose::ScaleTotal,
                    "Scale the whole recipe to a total of".into(),
                    text,
                );
            }
            Err(_) => state.warn("There is nothing to scale: the recipe weighs nothing yet."),
        },
        Command::SetServingTarget => {
            let text = state
                .recipe
                .recipe
                .serving_frozen_fraction
                .map(|t| trim_number(100.0 * t))
                .unwrap_or_default();
            prompt_on(
                state,
                PromptPurpose::ServingTarget,
                "Water frozen at serving, % (empty: the settings' default)".into(),
                text,
            );
        }
        Command::Rename => {
            let name = state.recipe.recipe.name.clone();
            prompt(state, PromptPurpose::Rename, "Recipe name".into(), name);
        }
        Command::Undo => undo(state),
        Command::Redo => redo(state),
        Command::Save => return save(state),
        Command::SaveAsNew => {
            let name = state.recipe.recipe.name.clone();
            prompt(
                state,
                PromptPurpose::SaveAsName,
                "Save as a new recipe named".into(),
                name,
            );
        }
        Command::SaveVersion => {
            return vec![Effect::SaveVersion {
                name: state.recipe.recipe.name.clone(),
                recipe: state.recipe.recipe.clone(),
            }];
        }
        Command::OpenRecipe => return open_or_ask(state, OpenFrom::Log),
        Command::OpenFile => return open_or_ask(state, OpenFrom::File),
        Command::NewRecipe => return open_or_ask(state, OpenFrom::Blank),
        Command::CopyToFile => {
            let name: String = state
                .recipe
                .recipe
                .name
                .chars()
                .map(|c| {
                    if c.is_alphanumeric() {
                        c.to_ascii_lowercase()
                    } else {
                        '-'
                    }
                })
                .collect();
            prompt(
                state,
                PromptPurpose::CopyToFile,
                "Write a copy of the recipe to the new file".into(),
                format!("{}.toml", name.trim_matches('-')),
            );
        }
        Command::ShowWarnings => {
            state.overlay = Some(Overlay::Reader(
                super::super::state::ReaderKind::Warnings,
                0,
            ));
        }
        Command::StartBatch => return super::batch_forms::open_batch_form(state),
        Command::OpenBalance => super::balance::open(state),
        Command::ReduceToStrength => super::balance::ask_strength(state),
        _ => {}
    }
    Vec::new()
}

/// Applies a change to the recipe: keeps the undo history, recomputes the analysis.
pub fn change(state: &mut State, f: impl FnOnce(&mut Recipe)) {
    let before = state.recipe.recipe.clone();
    f(&mut state.recipe.recipe);
    if state.recipe.recipe == before {
        return;
    }
    state.recipe.undo.push(before);
    if state.recipe.undo.len() > UNDO_DEPTH {
        state.recipe.undo.remove(0);
    }
    state.recipe.redo.clear();
    after_change(state);
}

fn after_change(state: &mut State) {
    let lines = state.recipe.recipe.lines.len();
    state.recipe.cursor = state.recipe.cursor.min(lines.saturating_sub(1));
    state.reanalyse();
}

fn undo(state: &mut State) {
    match state.recipe.undo.pop() {
        Some(previous) => {
            let current = std::mem::replace(&mut state.recipe.recipe, previous);
            state.recipe.redo.push(current);
            after_change(state);
        }
        None => state.tell("Nothing to undo."),
    }
}

fn redo(state: &mut State) {
    match state.recipe.redo.pop() {
        Some(next) => {
            let current = std::mem::replace(&mut state.recipe.recipe, next);
            state.recipe.undo.push(current);
            after_change(state);
        }
        None => state.tell("Nothing to redo."),
    }
}

/// Opens another recipe, asking first when the one in the editor has unsaved
/// changes (as quitting does, with a choice to save first).
pub fn open_or_ask(state: &mut State, from: OpenFrom) -> Vec<Effect> {
    if state.recipe.is_dirty() {
        state.overlay = Some(Overlay::Confirm(Question::OpenUnsaved(from)));
        Vec::new()
    } else {
        open(state, from)
    }
}

/// Goes on opening another recipe: the list of the log's recipes, or the prompt
/// for a file's path.
pub fn open(state: &mut State, from: OpenFrom) -> Vec<Effect> {
    match from {
        OpenFrom::Log => vec![Effect::ListRecipes],
        OpenFrom::Blank => {
            let mut picker = Picker {
                purpose: PickerPurpose::Style,
                title: "A new recipe of which style?".into(),
                query: Input::default(),
                items: Vec::new(),
                cursor: 0,
            };
            refresh_picker(state, &mut picker);
            state.overlay = Some(Overlay::Picker(picker));
            Vec::new()
        }
        OpenFrom::BatchRecipe => match &state.batches.detail {
            Some(detail) => vec![Effect::LoadBatchRecipe(detail.row.code.clone())],
            None => Vec::new(),
        },
        OpenFrom::File => {
            prompt(
                state,
                PromptPurpose::OpenFilePath,
                "Open the recipe file".into(),
                String::new(),
            );
            Vec::new()
        }
    }
}

/// When a prompt's value is more than ten times its old one, the question to put
/// before applying it; `None` to apply it at once (or to let it be refused).
pub fn large_change(state: &State, purpose: &PromptPurpose, text: &str) -> Option<String> {
    let unit = state.settings.mass_unit;
    match purpose {
        PromptPurpose::LineAmount(at) => {
            let line = state.recipe.recipe.lines.get(*at)?;
            let new = parse_amount(text, Some(unit)).ok()?;
            let density = state
                .catalog
                .ingredient(&line.ingredient)
                .map_or(1.0, |i| i.density_g_ml);
            more_than_ten_times(line.amount.grams(density), new.grams(density)).then(|| {
                format!(
                    "{} to {} is more than ten times the old amount of {}. Apply it?",
                    format_amount(line.amount, unit),
                    format_amount(new, unit),
                    state.display_name(&line.ingredient)
                )
            })
        }
        PromptPurpose::ScaleTotal => {
            let a = state.recipe.analysis.as_ref().ok()?;
            let (old, new, shown): (f64, f64, fn(f64, MassUnit) -> String) =
                match parse_size(text, Some(unit)).ok()? {
                    Amount::Grams(g) => (a.mass_g, g, format_mass),
                    Amount::Millilitres(ml) => (a.volume_ml, ml, |v, _| format_volume(v)),
                };
            more_than_ten_times(old, new).then(|| {
                format!(
                    "Scaling {} to {} changes every amount more than ten times. Apply it?",
                    shown(old, unit),
                    shown(new, unit)
                )
            })
        }
        PromptPurpose::ServingTarget if !text.trim().is_empty() => {
            let old = state
                .recipe
                .recipe
                .serving_frozen_fraction
                .unwrap_or(state.settings.serving_frozen_fraction);
            share_question(old, parse_share(text).ok()?)
        }
        _ => None,
    }
}

/// The question for a share changed more than ten times, if it is.
pub fn share_question(old: f64, new: f64) -> Option<String> {
    more_than_ten_times(old, new).then(|| {
        format!(
            "{} % to {} % of the water frozen at serving is more than a tenfold change. Apply it?",
            trim_number(100.0 * old),
            trim_number(100.0 * new)
        )
    })
}

/// Saves the recipe where it came from (a new one asks for its name first).
pub fn save(state: &mut State) -> Vec<Effect> {
    let recipe = state.recipe.recipe.clone();
    match &state.recipe.source {
        RecipeSource::File { path, original } => vec![Effect::SaveFile {
            path: path.clone(),
            original: original.clone(),
            recipe,
        }],
        RecipeSource::Database { name, .. } => vec![Effect::SaveVersion {
            name: name.clone(),
            recipe,
        }],
        RecipeSource::New => {
            let name = recipe.name.clone();
            prompt(
                state,
                PromptPurpose::SaveAsName,
                "Save as a new recipe named".into(),
                name,
            );
            Vec::new()
        }
    }
}

/// Puts a loaded recipe in the editor, with a fresh history.
pub fn loaded(state: &mut State, recipe: Recipe, source: RecipeSource) {
    let name = recipe.name.clone();
    state.recipe.saved = recipe.clone();
    state.recipe.recipe = recipe;
    state.recipe.source = source;
    state.recipe.cursor = 0;
    state.recipe.undo.clear();
    state.recipe.redo.clear();
    state.recipe.balance = None;
    state.screen = Screen::Recipe;
    state.refresh_catalog();
    state.reanalyse();
    state.tell(format!("Opened {name}."));
}

/// Records that the recipe was saved at `source`.
pub fn saved(state: &mut State, source: RecipeSource, recipe: Recipe) {
    state.recipe.source = source;
    state.recipe.saved = recipe;
}

fn open_ingredient_picker(state: &mut State) {
    let mut picker = Picker {
        purpose: PickerPurpose::Ingredient,
        title: "Add a line: type to search ingredients".into(),
        query: Input::default(),
        items: Vec::new(),
        cursor: 0,
    };
    refresh_picker(state, &mut picker);
    state.overlay = Some(Overlay::Picker(picker));
}

/// Opens the picker over the recipes in the database.
pub fn open_recipe_picker(state: &mut State, entries: Vec<RecipeEntry>) {
    if entries.is_empty() {
        state.tell("The database holds no recipes yet.");
        return;
    }
    let mut picker = Picker {
        purpose: PickerPurpose::Recipe(entries),
        title: "Open a recipe: type to search".into(),
        query: Input::default(),
        items: Vec::new(),
        cursor: 0,
    };
    refresh_picker(state, &mut picker);
    state.overlay = Some(Overlay::Picker(picker));
}

/// How picker items sort: pseudo-solutes last, then by [`search_key`], then by name.
type PickOrder = (bool, (u8, usize), String);

/// Recomputes the picker's items for its search text.
pub fn refresh_picker(state: &State, picker: &mut Picker) {
    let query = picker.query.value().to_lowercase();
    let mut items: Vec<(PickOrder, PickItem)> = match &picker.purpose {
        PickerPurpose::Ingredient => state
            .catalog
            .ingredients()
            .filter_map(|i| {
                let rank = search_key(&i.name, &i.id, &query)?;
                // A pseudo-solute (the salts of milk as one solute) is a modelling
                // device, never what someone typing "milk" wants: it comes last.
                let pseudo = state
                    .catalog
                    .solute(&i.id)
                    .is_some_and(|s| s.solute.kind == SoluteKind::MilkMinerals);
                Some((
                    (pseudo, rank, i.name.to_lowercase()),
                    PickItem {
                        key: i.id.clone(),
                        label: i.name.clone(),
                        detail: i.category.as_str().to_string(),
                    },
                ))
            })
            .collect(),
        PickerPurpose::Style => Style::ALL
            .into_iter()
            .filter_map(|style| {
                let rank = search_key(style.as_str(), style.as_str(), &query)?;
                Some((
                    (false, rank, String::new()),
                    PickItem {
                        key: style.as_str().to_string(),
                        label: style.as_str().to_string(),
                        detail: if style.is_drink() {
                            "liqueurs and spirits".into()
                        } else if style == Style::Other {
                            "anything else".into()
                        } else {
                            "frozen desserts".into()
                        },
                    },
                ))
            })
            .collect(),
        PickerPurpose::MeasurementKind { .. } => super::batch_forms::measurement_items()
            .into_iter()
            .filter_map(|item| {
                let rank = search_key(&item.label, &item.key, &query)?;
                // The usual order (the log's) when nothing is typed.
                Some(((false, rank, String::new()), item))
            })
            .collect(),
        PickerPurpose::Recipe(entries) => entries
            .iter()
            .filter_map(|e| {
                let rank = search_key(&e.name, "", &query)?;
                Some((
                    (false, rank, e.name.to_lowercase()),
                    PickItem {
                        key: e.name.clone(),
                        label: e.name.clone(),
                        detail: format!("version {}", e.version),
                    },
                ))
            })
            .collect(),
    };
    items.sort_by(|a, b| a.0.cmp(&b.0));
    picker.items = items.into_iter().map(|(_, item)| item).collect();
    picker.cursor = picker.cursor.min(picker.items.len().saturating_sub(1));
}

/// Asks for the amount of a new line of `ingredient_id`.
pub fn ask_new_line_amount(state: &mut State, ingredient_id: &str) {
    let title = format!("Amount of {}", state.display_name(ingredient_id));
    prompt(
        state,
        PromptPurpose::NewLineAmount(ingredient_id.to_string()),
        title,
        String::new(),
    );
}

/// Adds a line, copying the user's own ingredient (and own solutes) into the recipe.
fn add_line(state: &mut State, ingredient_id: &str, amount: crate::model::Amount) {
    let own_ingredient = state
        .own
        .ingredients
        .iter()
        .find(|i| i.id == ingredient_id)
        .cloned();
    let own_solutes: Vec<_> = match &own_ingredient {
        Some(i) => state
            .own
            .solutes
            .iter()
            .filter(|s| i.solutes_pct.contains_key(&s.id))
            .cloned()
            .collect(),
        None => state
            .own
            .solutes
            .iter()
            .filter(|s| s.id == ingredient_id)
            .cloned()
            .collect(),
    };
    change(state, |r| {
        if let Some(i) = own_ingredient
            && !r.ingredients.iter().any(|o| o.id == i.id)
        {
            r.ingredients.push(i);
        }
        for s in own_solutes {
            if !r.solutes.iter().any(|o| o.id == s.id) {
                r.solutes.push(s);
            }
        }
        r.lines.push(Line {
            ingredient: ingredient_id.to_string(),
            amount,
        });
    });
    state.recipe.cursor = state.recipe.recipe.lines.len().saturating_sub(1);
    state.screen = Screen::Recipe;
}

/// Accepts a recipe prompt's text; `Err` keeps the prompt open with the reason.
pub fn accept(
    state: &mut State,
    purpose: &PromptPurpose,
    text: &str,
) -> Result<Vec<Effect>, String> {
    let unit = state.settings.mass_unit;
    match purpose {
        PromptPurpose::NewLineAmount(id) => {
            let amount = parse_amount(text, Some(unit))?;
            add_line(state, id, amount);
        }
        PromptPurpose::LineAmount(at) => {
            let amount = parse_amount(text, Some(unit))?;
            let at = *at;
            change(state, |r| {
                if let Some(line) = r.lines.get_mut(at) {
                    line.amount = amount;
                }
            });
        }
        PromptPurpose::ScaleTotal => {
            // A mass scales by mass; a volume (a distiller's litres) by the volume at 20 °C.
            let target = parse_size(text, Some(unit)).map_err(|e| e.0)?;
            let (current, target_text) = {
                let a = state
                    .recipe
                    .analysis
                    .as_ref()
                    .map_err(|_| "there is nothing to scale".to_string())?;
                match target {
                    Amount::Grams(g) => (g / a.mass_g, format_mass(g, unit)),
                    Amount::Millilitres(ml) => (ml / a.volume_ml, format_volume(ml)),
                }
            };
            let factor = current;
            if !(factor.is_finite() && factor > 0.0) {
                return Err("there is nothing to scale".into());
            }
            change(state, |r| *r = r.scaled(factor));
            state.tell(format!("Scaled by {factor:.3} to {target_text}."));
        }
        PromptPurpose::ServingTarget => {
            let target = if text.trim().is_empty() {
                None
            } else {
                Some(parse_share(text)?)
            };
            change(state, |r| r.serving_frozen_fraction = target);
        }
        PromptPurpose::Rename => {
            let name = non_empty_name(text)?;
            change(state, |r| r.name = name);
        }
        PromptPurpose::SaveAsName => {
            let name = non_empty_name(text)?;
            change(state, |r| r.name = name);
            return Ok(vec![Effect::SaveNewRecipe(state.recipe.recipe.clone())]);
        }
        PromptPurpose::OpenFilePath => {
            let path = text.trim();
            if path.is_empty() {
                return Err("type the path of a .toml recipe file".into());
            }
            return Ok(vec![Effect::OpenFile(path.into())]);
        }
        PromptPurpose::CopyToFile => {
            let path = text.trim();
            if path.is_empty() {
                return Err("type the path of the new .toml file".into());
            }
            return Ok(vec![Effect::CopyToFile {
                path: path.into(),
                recipe: state.recipe.recipe.clone(),
            }]);
        }
        _ => {}
    }
    Ok(Vec::new())
}

fn non_empty_name(text: &str) -> Result<String, String> {
    let name = text.trim();
    if name.is_empty() {
        Err("a recipe needs a name".into())
    } else {
        Ok(name.to_string())
    }
}

/// A new, blank recipe of `style` in the editor (not saved until the user saves it).
pub fn new_blank(state: &mut State, style: Style) {
    let recipe = Recipe {
        name: format!("New {}", style.as_str().replace('-', " ")),
        style,
        ..Recipe::default()
    };
    loaded(state, recipe, RecipeSource::New);
    state.tell("A new recipe: add its lines with a, name it with r, save it with Ctrl-S.");
}

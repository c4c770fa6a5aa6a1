//! Work in the workspace is never lost: opening another recipe over unsaved edits
//! asks first (as quitting does), with a choice to save first; a prompt that opens
//! on an old value shows it selected, so typing replaces it; and a change of more
//! than ten times asks before it is applied.

use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use ratatui::style::Modifier;

use crate::common::{cmd, loaded_state, type_text};
use gelu::model::Amount;
use gelu::tui::keymap::action_for;
use gelu::tui::state::{Context, Overlay, PromptPurpose, RecipeSource, SettingField, State};
use gelu::tui::{Action, Command, Effect, update};

/// Presses a key as the loop would: through the keymap of the mode in effect.
fn press(state: &mut State, c: char) -> Vec<Effect> {
    let event = KeyEvent::new(KeyCode::Char(c), KeyModifiers::NONE);
    let Some(action) = action_for(state.context(), event) else {
        panic!("`{c}` means nothing in {:?}", state.context());
    };
    update(state, action)
}

fn edited() -> State {
    let mut s = loaded_state();
    cmd(&mut s, Command::DeleteLine);
    assert!(s.recipe.is_dirty());
    s
}

fn from_database(state: &mut State) {
    state.recipe.source = RecipeSource::Database {
        name: state.recipe.saved.name.clone(),
        version: 1,
        text: String::new(),
    };
}

#[test]
fn opening_from_the_log_over_unsaved_edits_asks_first() {
    let mut s = edited();
    let kept = s.recipe.recipe.clone();
    assert!(
        cmd(&mut s, Command::OpenRecipe).is_empty(),
        "nothing is opened yet"
    );
    assert_eq!(s.context(), Context::Confirm);
    assert!(cmd(&mut s, Command::No).is_empty());
    assert!(s.overlay.is_none());
    assert_eq!(s.recipe.recipe, kept, "the edits are still there");
    cmd(&mut s, Command::OpenRecipe);
    assert_eq!(cmd(&mut s, Command::Yes), vec![Effect::ListRecipes]);
}

#[test]
fn opening_a_file_over_unsaved_edits_asks_first() {
    let mut s = edited();
    assert!(cmd(&mut s, Command::OpenFile).is_empty());
    assert_eq!(s.context(), Context::Confirm);
    cmd(&mut s, Command::Yes);
    assert!(
        matches!(&s.overlay, Some(Overlay::Prompt(p)) if p.purpose == PromptPurpose::OpenFilePath)
    );
}

#[test]
fn save_first_saves_then_opens() {
    let mut s = edited();
    from_database(&mut s);
    cmd(&mut s, Command::OpenFile);
    let effects = press(&mut s, 's');
    let [Effect::SaveVersion { recipe, .. }] = &effects[..] else {
        panic!("save first should save: {effects:?}");
    };
    let saved = recipe.clone();
    let source = s.recipe.source.clone();
    let next = update(
        &mut s,
        Action::Saved {
            source,
            recipe: saved,
            message: "Saved.".into(),
        },
    );
    assert!(next.is_empty(), "{next:?}");
    assert!(
        matches!(&s.overlay, Some(Overlay::Prompt(p)) if p.purpose == PromptPurpose::OpenFilePath),
        "after the save, the open goes on: {:?}",
        s.overlay
    );
}

#[test]
fn quitting_offers_to_save_first_and_a_failed_save_does_not_quit() {
    let mut s = edited();
    cmd(&mut s, Command::Quit);
    // A recipe never saved asks for its name first.
    assert!(press(&mut s, 's').is_empty());
    assert!(
        matches!(&s.overlay, Some(Overlay::Prompt(p)) if p.purpose == PromptPurpose::SaveAsName)
    );
    let effects = cmd(&mut s, Command::Confirm);
    let [Effect::SaveNewRecipe(recipe)] = &effects[..] else {
        panic!("{effects:?}");
    };
    let recipe = recipe.clone();
    let failed = update(&mut s, Action::Failed("the disk is full".into()));
    assert!(failed.is_empty(), "a failed save never quits");
    assert!(s.recipe.is_dirty());
    // Asked again, the save goes through and then it quits.
    cmd(&mut s, Command::Quit);
    from_database(&mut s);
    let effects = press(&mut s, 's');
    assert!(
        matches!(&effects[..], [Effect::SaveVersion { .. }]),
        "{effects:?}"
    );
    let source = s.recipe.source.clone();
    let after = update(
        &mut s,
        Action::Saved {
            source,
            recipe,
            message: "Saved.".into(),
        },
    );
    assert_eq!(after, vec![Effect::Quit]);
}

fn prompt_text(state: &State) -> String {
    match &state.overlay {
        Some(Overlay::Prompt(p)) => p.input.value().to_owned(),
        other => panic!("expected a prompt, found {other:?}"),
    }
}

#[test]
fn typing_over_an_amount_replaces_it() {
    let mut s = loaded_state();
    cmd(&mut s, Command::Down);
    cmd(&mut s, Command::EditAmount);
    assert_eq!(prompt_text(&s), "160");
    type_text(&mut s, "280");
    assert_eq!(prompt_text(&s), "280");
    cmd(&mut s, Command::Confirm);
    assert_eq!(s.recipe.recipe.lines[1].amount, Amount::Grams(280.0));
    // Moving the text cursor first edits the old value instead.
    cmd(&mut s, Command::EditAmount);
    cmd(&mut s, Command::CursorLeft);
    type_text(&mut s, "5");
    assert_eq!(prompt_text(&s), "2850");
}

#[test]
fn the_old_value_is_drawn_selected() {
    let mut s = loaded_state();
    cmd(&mut s, Command::Down);
    cmd(&mut s, Command::EditAmount);
    let backend = ratatui::backend::TestBackend::new(80, 24);
    let mut terminal = ratatui::Terminal::new(backend).unwrap();
    terminal.draw(|f| gelu::tui::view(&s, f)).unwrap();
    let buffer = terminal.backend().buffer().clone();
    let mut found = false;
    for y in 0..buffer.area.height {
        let row: String = (0..buffer.area.width)
            .map(|x| buffer[(x, y)].symbol().to_owned())
            .collect();
        if let Some(at) = row.find("> 160") {
            let x = (row[..at].chars().count() + 2) as u16;
            for dx in 0..3 {
                let cell = &buffer[(x + dx, y)];
                assert!(
                    cell.modifier.contains(Modifier::REVERSED),
                    "`{}` should be drawn selected",
                    cell.symbol()
                );
            }
            found = true;
        }
    }
    assert!(found, "the prompt shows the old value");
    type_text(&mut s, "2");
    terminal.draw(|f| gelu::tui::view(&s, f)).unwrap();
    let buffer = terminal.backend().buffer().clone();
    assert!(
        (0..buffer.area.width).all(|x| (0..buffer.area.height)
            .all(|y| buffer[(x, y)].symbol() != "2"
                || !buffer[(x, y)].modifier.contains(Modifier::REVERSED))),
        "typed text is not selected"
    );
}

#[test]
fn a_change_of_more_than_ten_times_asks_before_it_is_applied() {
    let mut s = loaded_state();
    cmd(&mut s, Command::Down);
    cmd(&mut s, Command::EditAmount);
    type_text(&mut s, "1700");
    assert!(cmd(&mut s, Command::Confirm).is_empty());
    assert_eq!(s.context(), Context::Confirm, "160 g to 1700 g asks first");
    assert_eq!(s.recipe.recipe.lines[1].amount, Amount::Grams(160.0));
    // No: back to the prompt, the text kept to correct.
    cmd(&mut s, Command::No);
    assert_eq!(prompt_text(&s), "1700");
    cmd(&mut s, Command::Confirm);
    cmd(&mut s, Command::Yes);
    assert!(s.overlay.is_none());
    assert_eq!(s.recipe.recipe.lines[1].amount, Amount::Grams(1700.0));
    // Nine times does not ask.
    cmd(&mut s, Command::EditAmount);
    type_text(&mut s, "190");
    cmd(&mut s, Command::Confirm);
    assert!(s.overlay.is_none());
    assert_eq!(s.recipe.recipe.lines[1].amount, Amount::Grams(190.0));

    // Scaling a 1 kg recipe to 20 kg asks; the settings' serving share too.
    let mut s = loaded_state();
    cmd(&mut s, Command::ScaleRecipe);
    type_text(&mut s, "20 kg");
    cmd(&mut s, Command::Confirm);
    assert_eq!(s.context(), Context::Confirm);
    cmd(&mut s, Command::ShowSettings);
    let mut s = loaded_state();
    cmd(&mut s, Command::ShowSettings);
    let at = SettingField::ALL
        .iter()
        .position(|f| *f == SettingField::ServingTarget)
        .unwrap();
    for _ in 0..at {
        cmd(&mut s, Command::Down);
    }
    cmd(&mut s, Command::Toggle);
    type_text(&mut s, "5");
    assert!(cmd(&mut s, Command::Confirm).is_empty());
    assert_eq!(s.context(), Context::Confirm, "70 % to 5 % asks first");
    let effects = cmd(&mut s, Command::Yes);
    assert!(matches!(&effects[..], [Effect::SaveSettings(x)] if x.serving_frozen_fraction == 0.05));
}

#[test]
fn an_absurd_amount_is_refused_in_the_prompt() {
    let mut s = loaded_state();
    cmd(&mut s, Command::EditAmount);
    type_text(&mut s, "2000000 kg");
    cmd(&mut s, Command::Confirm);
    let Some(Overlay::Prompt(p)) = &s.overlay else {
        panic!("the prompt stays open");
    };
    assert!(
        p.error.as_deref().is_some_and(|e| e.contains("1000 t")),
        "{:?}",
        p.error
    );
}

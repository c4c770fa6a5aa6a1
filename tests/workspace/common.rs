//! Shared helpers of the workspace tests: a recipe built in code, a state
//! holding it, key presses as actions, and drawing a state to text.

#![allow(dead_code)]

use gelu::model::{Amount, Line, Recipe, Style};
use gelu::tui::state::{RecipeSource, State};
use gelu::tui::{Action, Command, update};
use ratatui::Terminal;
use ratatui::backend::TestBackend;

/// A gelato base from the invented harbour-front kitchen "The Tide Mill".
pub fn tide_mill_fior_di_latte() -> Recipe {
    let line = |id: &str, g: f64| Line {
        ingredient: id.into(),
        amount: Amount::Grams(g),
    };
    Recipe {
        name: "Tide Mill fior di latte".into(),
        style: Style::Gelato,
        notes: "Breakwater Lane test kitchen".into(),
        serving_frozen_fraction: None,
        solutes: Vec::new(),
        ingredients: Vec::new(),
        lines: vec![
            line("whole-milk", 620.0),
            line("heavy-cream", 160.0),
            line("skim-milk-powder", 40.0),
            line("sucrose", 140.0),
            line("dextrose-monohydrate", 35.0),
            line("stabiliser-blend", 5.0),
        ],
        ..Recipe::default()
    }
}

/// A state with colour off and the Tide Mill recipe loaded.
pub fn loaded_state() -> State {
    let mut state = State::new(false);
    update(
        &mut state,
        Action::RecipeLoaded {
            recipe: tide_mill_fior_di_latte(),
            source: RecipeSource::New,
        },
    );
    state.message = None;
    state
}

/// Runs a command.
pub fn cmd(state: &mut State, command: Command) -> Vec<gelu::tui::Effect> {
    update(state, Action::Command(command))
}

/// Types text into the field in focus.
pub fn type_text(state: &mut State, text: &str) {
    for c in text.chars() {
        update(state, Action::Insert(c));
    }
}

/// Draws the state at `width` x `height` and returns the screen as text.
pub fn draw(state: &State, width: u16, height: u16) -> String {
    let backend = TestBackend::new(width, height);
    let mut terminal = match Terminal::new(backend) {
        Ok(t) => t,
        Err(e) => panic!("test terminal: {e}"),
    };
    if let Err(e) = terminal.draw(|f| gelu::tui::view(state, f)) {
        panic!("draw: {e}");
    }
    let buffer = terminal.backend().buffer().clone();
    let mut out = String::new();
    for y in 0..buffer.area.height {
        let mut row = String::new();
        for x in 0..buffer.area.width {
            row.push_str(buffer[(x, y)].symbol());
        }
        out.push_str(row.trim_end());
        out.push('\n');
    }
    out
}

/// A blackcurrant liqueur from the invented Gullrock distillery, by volume where
/// a distiller measures by volume.
pub fn gullrock_blackcurrant() -> Recipe {
    Recipe {
        name: "Gullrock blackcurrant".into(),
        style: Style::Liqueur,
        notes: "Still house batch sheet".into(),
        serving_frozen_fraction: None,
        solutes: Vec::new(),
        ingredients: Vec::new(),
        lines: vec![
            Line {
                ingredient: "spirit-96-vol".into(),
                amount: Amount::Millilitres(2600.0),
            },
            Line {
                ingredient: "sucrose".into(),
                amount: Amount::Grams(3000.0),
            },
            Line {
                ingredient: "water".into(),
                amount: Amount::Grams(4600.0),
            },
        ],
        ..Recipe::default()
    }
}

/// A state holding the blackcurrant liqueur.
pub fn liqueur_state() -> State {
    let mut state = State::new(false);
    update(
        &mut state,
        Action::RecipeLoaded {
            recipe: gullrock_blackcurrant(),
            source: RecipeSource::New,
        },
    );
    state.message = None;
    state
}

/// Goes to the settings screen and opens the setting `field` for typing.
pub fn open_setting(state: &mut State, field: gelu::tui::state::SettingField) {
    cmd(state, Command::ShowSettings);
    cmd(state, Command::First);
    let at = gelu::tui::state::SettingField::ALL
        .iter()
        .position(|f| *f == field)
        .unwrap_or(0);
    for _ in 0..at {
        cmd(state, Command::Down);
    }
    cmd(state, Command::Toggle);
}

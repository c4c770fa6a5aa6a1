//! Tests of the one keymap table: no key bound twice in a mode, every command
//! reachable, typing never fires a shortcut, and help and hints are generated
//! from the table (so they list every binding).

use gelu::tui::Command;
use gelu::tui::keymap::{self, KEYMAP, Key};
use gelu::tui::state::Context;
use gelu::tui::view::view;
use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyModifiers};

#[test]
fn no_key_is_bound_twice_in_a_mode() {
    for context in Context::ALL {
        let bindings = keymap::effective_bindings(context);
        for (k, a) in bindings.iter().enumerate() {
            for b in &bindings[k + 1..] {
                assert!(
                    a.key != b.key,
                    "{} is bound to both {} and {} in {:?}",
                    a.key.label(),
                    a.command.name(),
                    b.command.name(),
                    context
                );
            }
        }
    }
}

#[test]
fn every_command_has_a_key() {
    for command in Command::ALL {
        assert!(
            KEYMAP.iter().any(|b| b.command == *command),
            "{} has no key",
            command.name()
        );
    }
}

#[test]
fn every_mode_has_a_way_back_or_out() {
    for context in Context::ALL {
        if context == Context::Global {
            continue;
        }
        let commands: Vec<Command> = keymap::effective_bindings(context)
            .iter()
            .map(|b| b.command)
            .collect();
        assert!(
            commands
                .iter()
                .any(|c| matches!(c, Command::Cancel | Command::Quit | Command::No)),
            "{context:?} has no way out"
        );
    }
}

#[test]
fn typed_characters_go_to_text_fields_never_to_shortcuts() {
    for context in Context::ALL.into_iter().filter(|c| c.takes_text()) {
        for c in ('a'..='z')
            .chain('A'..='Z')
            .chain('0'..='9')
            .chain("?/ q-.,".chars())
        {
            let event = KeyEvent::new(KeyCode::Char(c), KeyModifiers::NONE);
            assert_eq!(
                keymap::action_for(context, event),
                Some(gelu::tui::Action::Insert(c)),
                "{c:?} in {context:?}"
            );
        }
    }
}

#[test]
fn shift_is_folded_into_characters() {
    let event = KeyEvent::new(KeyCode::Char('S'), KeyModifiers::SHIFT);
    assert_eq!(Key::from_event(event), Some(Key::ch('S')));
    assert_eq!(
        keymap::lookup(Context::Recipe, Key::ch('S')),
        Some(Command::SaveAsNew)
    );
    let event = KeyEvent::new(KeyCode::Char('s'), KeyModifiers::CONTROL);
    assert_eq!(
        keymap::action_for(Context::Recipe, event),
        Some(gelu::tui::Action::Command(Command::Save))
    );
}

#[test]
fn browsing_modes_fall_back_to_the_global_keys_and_text_modes_do_not() {
    assert_eq!(
        keymap::lookup(Context::Ingredients, Key::ch('q')),
        Some(Command::Quit)
    );
    assert_eq!(keymap::lookup(Context::Prompt, Key::ch('q')), None);
    assert_eq!(keymap::lookup(Context::Form, Key::ch('?')), None);
}

/// Draws the help overlay of `context` on a tall terminal and returns the text.
fn help_text(context: Context) -> String {
    let mut state = gelu::tui::State::new(false);
    state.overlay = Some(gelu::tui::state::Overlay::Reader(
        gelu::tui::state::ReaderKind::Help(context),
        0,
    ));
    let backend = ratatui::backend::TestBackend::new(160, 120);
    let mut terminal = match ratatui::Terminal::new(backend) {
        Ok(t) => t,
        Err(e) => panic!("{e}"),
    };
    if let Err(e) = terminal.draw(|f| view(&state, f)) {
        panic!("{e}");
    }
    let buffer = terminal.backend().buffer().clone();
    let mut out = String::new();
    for y in 0..buffer.area.height {
        for x in 0..buffer.area.width {
            out.push_str(buffer[(x, y)].symbol());
        }
        out.push('\n');
    }
    out
}

#[test]
fn help_lists_every_binding_of_the_mode() {
    for context in Context::ALL {
        let text = help_text(context);
        for b in keymap::effective_bindings(context) {
            assert!(
                text.contains(b.command.description()),
                "help of {context:?} lacks {}",
                b.command.name()
            );
            let row = text
                .lines()
                .find(|l| l.contains(b.command.description()))
                .unwrap_or_default();
            assert!(
                row.contains(&b.key.label()),
                "help of {context:?} lacks the key {} of {}",
                b.key.label(),
                b.command.name()
            );
        }
    }
}

#[test]
fn hints_come_from_the_table_of_the_mode_in_effect() {
    for context in Context::ALL {
        for (keys, word) in keymap::hints(context) {
            assert!(
                keymap::effective_bindings(context)
                    .iter()
                    .any(|b| b.key.label() == keys && b.hint == Some(word)),
                "hint {keys} {word} of {context:?} is not in the table"
            );
        }
    }
    let recipe: Vec<&str> = keymap::hints(Context::Recipe).iter().map(|h| h.1).collect();
    assert!(recipe.contains(&"help") && recipe.contains(&"add") && recipe.contains(&"save"));
}

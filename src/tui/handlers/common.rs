//! What every screen's handler uses: moving a cursor, opening a prompt (on an old
//! value, selected), telling a change of more than ten times, reading a form
//! field, and matching typed words.

use tui_input::Input;

use super::super::action::Command;
use super::super::state::{Form, Overlay, PAGE_ROWS, Prompt, PromptPurpose, State};

/// Moves a cursor by a command over `len` rows; returns the new position.
pub fn move_cursor(cursor: usize, len: usize, command: Command) -> usize {
    use Command as C;
    let last = len.saturating_sub(1);
    let moved = match command {
        C::Up => cursor.saturating_sub(1),
        C::Down => cursor + 1,
        C::PageUp => cursor.saturating_sub(PAGE_ROWS),
        C::PageDown => cursor + PAGE_ROWS,
        C::First => 0,
        C::Last => last,
        _ => cursor,
    };
    moved.min(last)
}

/// Opens a one-line prompt.
pub fn prompt(state: &mut State, purpose: PromptPurpose, title: String, text: String) {
    state.overlay = Some(Overlay::Prompt(Prompt {
        purpose,
        title,
        input: Input::new(text),
        error: None,
        selected: false,
    }));
}

/// The trimmed text of a form's field `at` ("" when there is none).
pub fn field_value(form: &Form, at: usize) -> &str {
    form.fields.get(at).map_or("", |f| f.input.value().trim())
}

/// Opens a one-line prompt on an old value, shown selected: typing replaces it.
pub fn prompt_on(state: &mut State, purpose: PromptPurpose, title: String, old: String) {
    let selected = !old.is_empty();
    prompt(state, purpose, title, old);
    if let Some(Overlay::Prompt(p)) = &mut state.overlay {
        p.selected = selected;
    }
}

/// Whether going from `old` to `new` (same unit, both above zero) is a change of
/// more than ten times, either way: a slip of the keys more often than a plan.
pub fn more_than_ten_times(old: f64, new: f64) -> bool {
    old > 0.0 && new > 0.0 && (new / old > 10.0 || old / new > 10.0)
}

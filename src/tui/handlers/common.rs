//! What every screen's handler uses: moving a cursor, opening a prompt, and
//! matching typed words.

use tui_input::Input;

use super::super::action::Command;
use super::super::state::{Overlay, PAGE_ROWS, Prompt, PromptPurpose, State};

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
    }));
}

//! The per-screen halves of `update`: what each screen's commands, prompts and
//! forms do to the state. Each file holds one screen.

pub mod batches;
pub mod ingredients;
pub mod own_items;
pub mod recipe;
pub mod settings;

/// Moves a cursor by a command over `len` rows; returns the new position.
pub fn move_cursor(cursor: usize, len: usize, command: super::action::Command) -> usize {
    use super::action::Command as C;
    let last = len.saturating_sub(1);
    let moved = match command {
        C::Up => cursor.saturating_sub(1),
        C::Down => cursor + 1,
        C::PageUp => cursor.saturating_sub(super::state::PAGE_ROWS),
        C::PageDown => cursor + super::state::PAGE_ROWS,
        C::First => 0,
        C::Last => last,
        _ => cursor,
    };
    moved.min(last)
}

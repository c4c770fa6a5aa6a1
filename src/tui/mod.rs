//! The workspace: the terminal user interface that `gelu` opens with no
//! arguments (or `gelu edit FILE`). A recipe editor that recomputes the
//! freezing behaviour on every keystroke, a browser for solutes and
//! ingredients, the batch log and the settings; keyboard only, 80x24 or larger.
//!
//! The shape is the same everywhere:
//! - [`state`]: one [`state::State`] the loop owns;
//! - [`action`]: [`action::Command`]s (what keys do), [`action::Action`]s (what
//!   `update` accepts) and [`action::Effect`]s (the I/O `update` asks for);
//! - [`keymap`]: the one table of keys, which also generates help and hints;
//! - [`update()`]: `update(&mut State, Action) -> Vec<Effect>`, no I/O;
//! - [`view()`]: `view(&State, &mut Frame)`, pure;
//! - `effects`: carries out effects against files and the database;
//! - `app`: the loop: block on the next event, update, perform effects, draw.

pub mod action;
pub mod app;
pub mod effects;
pub mod handlers;
pub mod keymap;
pub mod state;
pub mod terminal;
pub mod update;
pub mod view;

pub use action::{Action, Command, Effect};
pub use app::run;
pub use effects::Launch;
pub use state::State;
pub use update::update;
pub use view::view;

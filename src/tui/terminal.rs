//! Entering and leaving the full-screen terminal mode. Leaving restores the
//! terminal (raw mode off, main screen back, cursor shown) on every path: a
//! normal exit, an error, and a panic (through a panic hook).

use std::io::{self, Stdout, stdout};

use ratatui::Terminal;
use ratatui::backend::CrosstermBackend;
use ratatui::crossterm::cursor::Show;
use ratatui::crossterm::execute;
use ratatui::crossterm::terminal::{
    EnterAlternateScreen, LeaveAlternateScreen, disable_raw_mode, enable_raw_mode,
};

/// The terminal the workspace draws on.
pub type Term = Terminal<CrosstermBackend<Stdout>>;

/// Switches to raw mode and the alternate screen, and installs the panic hook.
pub fn enter() -> io::Result<Term> {
    let previous = std::panic::take_hook();
    std::panic::set_hook(Box::new(move |info| {
        leave();
        previous(info);
    }));
    enable_raw_mode()?;
    if let Err(e) = execute!(stdout(), EnterAlternateScreen) {
        leave();
        return Err(e);
    }
    Terminal::new(CrosstermBackend::new(stdout())).inspect_err(|_| leave())
}

/// Restores the terminal; safe to call more than once.
pub fn leave() {
    let _ = disable_raw_mode();
    let _ = execute!(stdout(), LeaveAlternateScreen, Show);
}

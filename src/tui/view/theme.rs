//! Styles, with and without colour. Every meaning carried by colour is also
//! carried by a symbol or by reverse video, so NO_COLOR and monochrome
//! terminals lose nothing.

use ratatui::style::{Color, Modifier, Style};

/// The styles of one frame.
#[derive(Debug, Clone, Copy)]
pub struct Theme {
    color: bool,
}

/// Marks the row under the cursor (beside reverse video).
pub const CURSOR_MARK: &str = "> ";
/// Marks a problem.
pub const PROBLEM_MARK: &str = "!! ";
/// Marks advice.
pub const ADVICE_MARK: &str = "!  ";
/// Marks a note about the model.
pub const NOTE_MARK: &str = "i  ";
/// Marks a caution of safe practice.
pub const CAUTION_MARK: &str = "⚠  ";

impl Theme {
    /// The theme for a terminal with or without colour.
    pub fn new(color: bool) -> Theme {
        Theme { color }
    }

    fn fg(self, c: Color) -> Style {
        if self.color {
            Style::new().fg(c)
        } else {
            Style::new()
        }
    }

    /// The row under the cursor.
    pub fn selected(self) -> Style {
        Style::new().add_modifier(Modifier::REVERSED | Modifier::BOLD)
    }

    /// Titles and headers.
    pub fn title(self) -> Style {
        self.fg(Color::Cyan).add_modifier(Modifier::BOLD)
    }

    /// A problem: the product will likely fail, or a value is refused.
    pub fn problem(self) -> Style {
        self.fg(Color::Red).add_modifier(Modifier::BOLD)
    }

    /// Advice worth a look.
    pub fn advice(self) -> Style {
        self.fg(Color::Yellow)
    }

    /// Quieter text: units, hints, notes.
    pub fn dim(self) -> Style {
        if self.color {
            Style::new().fg(Color::DarkGray)
        } else {
            Style::new()
        }
    }

    /// Key names in hints.
    pub fn key(self) -> Style {
        self.fg(Color::Cyan).add_modifier(Modifier::BOLD)
    }

    /// A figure's value.
    pub fn value(self) -> Style {
        Style::new().add_modifier(Modifier::BOLD)
    }

    /// The curve of the chart.
    pub fn curve(self) -> Style {
        self.fg(Color::Cyan)
    }

    /// A mark on the chart.
    pub fn mark(self, which: usize) -> Style {
        self.fg([Color::Green, Color::Yellow, Color::Magenta][which % 3])
    }
}

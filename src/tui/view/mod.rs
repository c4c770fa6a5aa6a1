//! `view(&State, &mut Frame)`: draws one frame from the state and nothing else.
//! The frame is a tab bar, the screen shown, a message line and the key hints
//! of the current mode (from the keymap); overlays are drawn on top.

mod balance;
mod batches;
mod chrome;
mod compare;
mod ingredients;
mod overlay;
mod recipe;
mod settings;
pub mod theme;

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::text::Line;
use ratatui::widgets::{Paragraph, Wrap};

use super::state::{Screen, State};
use theme::Theme;

/// Smallest terminal the workspace draws in (columns).
pub const MIN_WIDTH: u16 = 80;
/// Smallest terminal the workspace draws in (rows).
pub const MIN_HEIGHT: u16 = 24;

/// Draws the whole workspace.
pub fn view(state: &State, frame: &mut Frame) {
    let area = frame.area();
    if area.width < MIN_WIDTH || area.height < MIN_HEIGHT {
        too_small(frame, area);
        return;
    }
    let theme = Theme::new(state.color);
    let [tabs, body, message, hints] = Layout::vertical([
        Constraint::Length(1),
        Constraint::Min(1),
        Constraint::Length(1),
        Constraint::Length(1),
    ])
    .areas(area);
    chrome::tabs(state, theme, frame, tabs);
    match state.screen {
        Screen::Recipe => match &state.recipe.balance {
            Some(panel) => balance::render(state, panel, theme, frame, body),
            None => recipe::render(state, theme, frame, body),
        },
        Screen::Ingredients => ingredients::render(state, theme, frame, body),
        Screen::Batches => batches::render(state, theme, frame, body),
        Screen::Settings => settings::render(state, theme, frame, body),
    }
    chrome::message(state, theme, frame, message);
    chrome::hints(state, theme, frame, hints);
    overlay::render(state, theme, frame, area);
}

/// What is drawn when the terminal is smaller than 80x24.
pub fn too_small(frame: &mut Frame, area: Rect) {
    let text = vec![
        Line::from("gelu needs a terminal of at least"),
        Line::from(format!("{MIN_WIDTH} columns x {MIN_HEIGHT} rows;")),
        Line::from(format!("this one is {} x {}.", area.width, area.height)),
        Line::from("Enlarge the window, or press q to quit."),
    ];
    let top = area.height.saturating_sub(text.len() as u16) / 2;
    let inner = Rect {
        y: area.y + top.min(area.height),
        height: area.height - top.min(area.height),
        ..area
    };
    frame.render_widget(
        Paragraph::new(text)
            .wrap(Wrap { trim: true })
            .alignment(ratatui::layout::Alignment::Center),
        inner,
    );
}

/// A rectangle of at most `width` x `height` centred in `area`.
pub fn centered(area: Rect, width: u16, height: u16) -> Rect {
    let w = width.min(area.width);
    let h = height.min(area.height);
    Rect {
        x: area.x + (area.width - w) / 2,
        y: area.y + (area.height - h) / 2,
        width: w,
        height: h,
    }
}

/// Shortens `text` to `width` characters, ending in "…" when cut.
pub fn fit(text: &str, width: usize) -> String {
    if text.chars().count() <= width {
        return text.to_string();
    }
    let mut out: String = text.chars().take(width.saturating_sub(1)).collect();
    out.push('…');
    out
}

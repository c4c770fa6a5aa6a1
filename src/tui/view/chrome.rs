//! The frame around every screen: the tab bar, the message line and the key
//! hints, which come from the keymap of the mode in effect.

use ratatui::Frame;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::Paragraph;

use super::super::keymap;
use super::super::state::{Screen, State};
use super::theme::{PROBLEM_MARK, Theme};

/// The tab bar: one tab per screen, the current one in reverse video and brackets.
pub fn tabs(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let mut spans = vec![Span::styled(" gelu ", theme.title())];
    for (k, screen) in Screen::ALL.iter().enumerate() {
        let label = format!("{} {}", k + 1, screen.title());
        if *screen == state.screen {
            spans.push(Span::styled(format!("[{label}]"), theme.selected()));
        } else {
            spans.push(Span::raw(format!(" {label} ")));
        }
        spans.push(Span::raw(" "));
    }
    if state.recipe.is_dirty() {
        spans.push(Span::styled("* unsaved recipe", theme.advice()));
    }
    frame.render_widget(Paragraph::new(Line::from(spans)), area);
}

/// The message line: the last thing the workspace has to say.
pub fn message(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let Some(message) = &state.message else {
        return;
    };
    let line = if message.is_error {
        Line::from(vec![
            Span::styled(PROBLEM_MARK, theme.problem()),
            Span::styled(message.text.clone(), theme.problem()),
        ])
    } else {
        Line::from(message.text.clone())
    };
    frame.render_widget(Paragraph::new(line), area);
}

/// The key hints of the mode in effect, as many as fit.
pub fn hints(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let mut spans = Vec::new();
    let mut used = 0usize;
    let width = area.width as usize;
    for (keys, word) in keymap::hints(state.context()) {
        let len = keys.chars().count() + word.chars().count() + 3;
        if used + len > width {
            break;
        }
        used += len;
        spans.push(Span::styled(keys, theme.key()));
        spans.push(Span::raw(format!(" {word}  ")));
    }
    frame.render_widget(Paragraph::new(Line::from(spans)), area);
}

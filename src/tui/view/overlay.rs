//! Overlays drawn over the screen: the one-line prompt, the picker, forms,
//! the reader (help, generated from the keymap, and the full warnings), and
//! yes/no questions.

use ratatui::Frame;
use ratatui::layout::{Position, Rect};
use ratatui::style::Style;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Clear, Paragraph, Wrap};
use tui_input::Input;

use super::super::action::Command;
use super::super::keymap;
use super::super::state::Context;
use super::super::state::{Form, Overlay, Picker, Prompt, Question, ReaderKind, State};
use super::theme::{CURSOR_MARK, PROBLEM_MARK, Theme};
use super::{centered, fit};

/// Draws the overlay in focus, if any.
pub fn render(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    match &state.overlay {
        None => {}
        Some(Overlay::Prompt(p)) => prompt(p, theme, frame, area),
        Some(Overlay::Picker(p)) => picker(p, theme, frame, area),
        Some(Overlay::Form(f)) => form(f, theme, frame, area),
        Some(Overlay::Reader(kind, scroll)) => reader(state, *kind, *scroll, theme, frame, area),
        Some(Overlay::Confirm(q)) => confirm(state, q, theme, frame, area),
    }
}

fn boxed(frame: &mut Frame, area: Rect, title: &str, theme: Theme) -> Rect {
    frame.render_widget(Clear, area);
    let block = Block::bordered().title(Span::styled(format!(" {title} "), theme.title()));
    let inner = block.inner(area);
    frame.render_widget(block, area);
    inner
}

/// Draws a text field on one row and puts the terminal cursor in it; a selected
/// value is drawn in reverse video.
fn text_field(
    input: &Input,
    frame: &mut Frame,
    area: Rect,
    focused: bool,
    selected: Option<Style>,
) {
    let width = area.width.max(1) as usize;
    let scroll = input.visual_scroll(width);
    let shown: String = input.value().chars().skip(scroll).take(width).collect();
    match selected {
        Some(style) => frame.render_widget(Paragraph::new(Span::styled(shown, style)), area),
        None => frame.render_widget(Paragraph::new(shown), area),
    }
    if focused && area.width > 0 {
        let x = (input.visual_cursor().saturating_sub(scroll)) as u16;
        frame.set_cursor_position(Position::new(area.x + x.min(area.width - 1), area.y));
    }
}

fn prompt(p: &Prompt, theme: Theme, frame: &mut Frame, area: Rect) {
    let outer = centered(area, 70, 6);
    let inner = boxed(frame, outer, &p.title, theme);
    if inner.height == 0 {
        return;
    }
    let field = Rect {
        height: 1,
        x: inner.x + 2,
        width: inner.width.saturating_sub(2),
        ..inner
    };
    frame.render_widget(Paragraph::new(">"), Rect { width: 2, ..inner });
    text_field(
        &p.input,
        frame,
        field,
        true,
        p.selected.then(|| theme.selected()),
    );
    if let Some(error) = &p.error
        && inner.height > 2
    {
        let row = Rect {
            y: inner.y + 2,
            height: inner.height - 2,
            ..inner
        };
        frame.render_widget(
            Paragraph::new(Line::from(vec![
                Span::styled(PROBLEM_MARK, theme.problem()),
                Span::styled(error.clone(), theme.problem()),
            ]))
            .wrap(Wrap { trim: true }),
            row,
        );
    }
}

fn picker(p: &Picker, theme: Theme, frame: &mut Frame, area: Rect) {
    let outer = centered(area, 70, area.height.saturating_sub(4).min(20));
    let inner = boxed(frame, outer, &p.title, theme);
    if inner.height < 2 {
        return;
    }
    frame.render_widget(
        Paragraph::new("/"),
        Rect {
            width: 2,
            height: 1,
            ..inner
        },
    );
    text_field(
        &p.query,
        frame,
        Rect {
            x: inner.x + 2,
            width: inner.width.saturating_sub(2),
            height: 1,
            ..inner
        },
        true,
        None,
    );
    let rows = (inner.height - 1) as usize;
    let offset = p.cursor.saturating_sub(rows.saturating_sub(1));
    let width = inner.width as usize;
    let lines: Vec<Line> = if p.items.is_empty() {
        vec![Line::from("nothing matches")]
    } else {
        p.items
            .iter()
            .enumerate()
            .skip(offset)
            .take(rows)
            .map(|(k, item)| {
                let mark = if k == p.cursor { CURSOR_MARK } else { "  " };
                let detail_w = item.detail.chars().count() + 1;
                let label = fit(&item.label, width.saturating_sub(detail_w + 2));
                let pad = width.saturating_sub(2 + label.chars().count() + detail_w);
                let text = format!("{mark}{label}{} {}", " ".repeat(pad), item.detail);
                if k == p.cursor {
                    Line::from(Span::styled(text, theme.selected()))
                } else {
                    Line::from(text)
                }
            })
            .collect()
    };
    frame.render_widget(
        Paragraph::new(lines),
        Rect {
            y: inner.y + 1,
            height: inner.height - 1,
            ..inner
        },
    );
}

fn form(f: &Form, theme: Theme, frame: &mut Frame, area: Rect) {
    let wanted = f.fields.len() as u16 * 2 + 4;
    let outer = centered(area, 76, wanted.min(area.height));
    let inner = boxed(frame, outer, &f.title, theme);
    let label_w = 26u16.min(inner.width / 2);
    // Fields take two rows (value, problem) when there is room, else one.
    let per = if inner.height > f.fields.len() as u16 * 2 {
        2
    } else {
        1
    };
    let room_fields = (inner.height.saturating_sub(1) / per) as usize;
    let offset = f.focus.saturating_sub(room_fields.saturating_sub(1));
    for (row, (k, field)) in f
        .fields
        .iter()
        .enumerate()
        .skip(offset)
        .take(room_fields)
        .enumerate()
    {
        let y = inner.y + row as u16 * per;
        let focused = k == f.focus;
        let mark = if focused { CURSOR_MARK } else { "  " };
        // With one row per field, a problem is flagged beside the label and
        // spelt out on the bottom line when the field is in focus.
        let flag = if per == 1 && field.problem.is_some() {
            "! "
        } else {
            ""
        };
        let label = fit(
            &field.label,
            label_w.saturating_sub(3 + flag.len() as u16) as usize,
        );
        let style = if focused {
            theme.selected()
        } else {
            theme.title()
        };
        frame.render_widget(
            Paragraph::new(Span::styled(format!("{mark}{flag}{label}"), style)),
            Rect {
                y,
                height: 1,
                width: label_w,
                ..inner
            },
        );
        let value_area = Rect {
            x: inner.x + label_w + 1,
            y,
            width: inner.width.saturating_sub(label_w + 1),
            height: 1,
        };
        text_field(
            &field.input,
            frame,
            value_area,
            focused,
            (focused && field.selected).then(|| theme.selected()),
        );
        if let Some(problem) = &field.problem
            && per == 2
        {
            let text = format!("{PROBLEM_MARK}{problem}");
            frame.render_widget(
                Paragraph::new(Span::styled(
                    fit(&text, value_area.width as usize),
                    theme.problem(),
                )),
                Rect {
                    y: y + 1,
                    ..value_area
                },
            );
        }
    }
    let focused_problem = f
        .fields
        .get(f.focus)
        .and_then(|field| field.problem.as_ref())
        .filter(|_| per == 1);
    if let Some(problem) = focused_problem
        && inner.height > 0
    {
        let y = inner.y + inner.height - 1;
        frame.render_widget(
            Paragraph::new(Span::styled(
                fit(&format!("{PROBLEM_MARK}{problem}"), inner.width as usize),
                theme.problem(),
            )),
            Rect {
                y,
                height: 1,
                ..inner
            },
        );
        return;
    }
    if let Some(summary) = &f.summary
        && inner.height > 0
    {
        let y = inner.y + inner.height - 1;
        frame.render_widget(
            Paragraph::new(fit(summary, inner.width as usize)),
            Rect {
                y,
                height: 1,
                ..inner
            },
        );
    }
}

/// The help text of a mode: its own keys, then the global ones when it browses.
pub fn help_lines(context: Context) -> Vec<Line<'static>> {
    let mut lines = Vec::new();
    let mut sections = vec![context];
    if context.is_browsing() {
        sections.push(Context::Global);
    }
    for section in sections {
        lines.push(Line::from(section.title().to_string()));
        for row in keymap::help_rows(section) {
            lines.push(Line::from(format!(
                "  {:<24} {}",
                row.keys,
                row.command.description()
            )));
        }
        if section.takes_text() {
            lines.push(Line::from(format!(
                "  {:<24} {}",
                "other keys", "type into the field"
            )));
        }
        lines.push(Line::from(""));
    }
    lines
}

fn reader(
    state: &State,
    kind: ReaderKind,
    scroll: usize,
    theme: Theme,
    frame: &mut Frame,
    area: Rect,
) {
    let outer = centered(
        area,
        area.width.saturating_sub(4),
        area.height.saturating_sub(2),
    );
    let (title, lines) = match kind {
        ReaderKind::Help(context) => (
            format!("Keys: {} (Esc closes)", context.title()),
            help_lines(context),
        ),
        ReaderKind::Warnings => (
            "Warnings and cautions (Esc closes)".to_string(),
            super::recipe::notices(state, theme)
                .into_iter()
                .flat_map(|(mark, style, text)| {
                    [
                        Line::from(vec![Span::styled(mark, style), Span::styled(text, style)]),
                        Line::from(""),
                    ]
                })
                .collect(),
        ),
    };
    let inner = boxed(frame, outer, &title, theme);
    let max_scroll = lines.len().saturating_sub(inner.height as usize);
    let scroll = scroll.min(max_scroll) as u16;
    frame.render_widget(
        Paragraph::new(lines)
            .wrap(Wrap { trim: false })
            .scroll((scroll, 0)),
        inner,
    );
}

fn confirm(state: &State, q: &Question, theme: Theme, frame: &mut Frame, area: Rect) {
    let text = match q {
        Question::QuitUnsaved => format!(
            "{} has unsaved changes. Quit and lose them?",
            state.recipe.recipe.name
        ),
        Question::OpenUnsaved(_) => format!(
            "{} has unsaved changes. Open another recipe and lose them?",
            state.recipe.recipe.name
        ),
        Question::Finalize(_) => {
            "Finalise this batch? Afterwards it is corrected only by amendments.".to_string()
        }
        Question::TurnOnCorrection(kind) => {
            let basis = state
                .batches
                .compare
                .as_ref()
                .and_then(|v| v.kind(kind))
                .and_then(|k| k.preview.as_ref().ok())
                .map_or(String::new(), |c| format!(" ({})", c.basis));
            format!(
                "Put in force the correction of {kind}{basis}? It is stored as a new version; calibrated figures are marked, the plain ones stay beside them."
            )
        }
        Question::TurnOffCorrection(kind) => {
            format!("Take out the correction of {kind} in force? Its versions stay in the log.")
        }
        Question::LargeChange { said, .. } => said.clone(),
    };
    // Room for the question wrapped in the box, a blank line and the keys.
    let rows = (text.chars().count() / 54 + 1) as u16;
    let outer = centered(area, 60, (rows + 4).max(6));
    let inner = boxed(frame, outer, "Are you sure?", theme);
    let save = q.offers_save();
    let keys: Vec<String> = keymap::bindings_in(Context::Confirm)
        .filter(|b| match b.command {
            Command::Yes | Command::No => true,
            Command::SaveFirst => save,
            _ => false,
        })
        .map(|b| {
            format!(
                "{} {}",
                b.key.label(),
                b.command.description().to_lowercase()
            )
        })
        .collect();
    frame.render_widget(
        Paragraph::new(vec![
            Line::from(Span::styled(text, theme.advice())),
            Line::from(""),
            Line::from(keys.join("   ")),
        ])
        .wrap(Wrap { trim: true }),
        inner,
    );
}

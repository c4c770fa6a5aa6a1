//! The compare view of the batch log: each measured kind with its count, bias
//! and RMSE, the one under the cursor in detail (the worst batches, those far
//! off with a likely cause, the correction on offer and the one in force) and
//! its chart of measured against predicted.

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Paragraph, Row, Table, TableState, Wrap};

use super::super::state::{CompareView, KindView};
use super::theme::{CURSOR_MARK, PROBLEM_MARK, Theme};
use crate::measure::render_chart;
use crate::store::scope_words;

/// Draws the compare view.
pub fn render(view: &CompareView, theme: Theme, frame: &mut Frame, area: Rect) {
    let wanted = view.kinds.len().max(1) as u16 + 3;
    let [top, bottom] = Layout::vertical([
        Constraint::Length(wanted.min(area.height / 3).max(4)),
        Constraint::Min(1),
    ])
    .areas(area);
    kinds_table(view, theme, frame, top);
    let Some(kind) = view.kinds.get(view.cursor) else {
        frame.render_widget(
            Paragraph::new(
                "No measured figure of these batches has a prediction to set it against yet. \
                 Open a batch (Enter on the list) and add its readings (m).",
            )
            .wrap(Wrap { trim: true })
            .block(Block::bordered()),
            bottom,
        );
        return;
    };
    let [left, right] =
        Layout::horizontal([Constraint::Percentage(50), Constraint::Percentage(50)]).areas(bottom);
    frame.render_widget(
        Paragraph::new(detail_lines(view, kind, theme))
            .wrap(Wrap { trim: false })
            .block(Block::bordered().title(Span::styled(
                format!(" {} ({}) ", kind.summary.kind, kind.summary.unit),
                theme.title(),
            ))),
        left,
    );
    let inner_w = right.width.saturating_sub(2) as usize;
    let inner_h = right.height.saturating_sub(2) as usize;
    let chart: Vec<Line> = render_chart(&kind.summary, inner_w, inner_h + 1)
        .into_iter()
        .skip(1)
        .map(Line::from)
        .collect();
    frame.render_widget(
        Paragraph::new(chart).block(
            Block::bordered()
                .title(Span::styled(
                    " measured (up) against predicted ",
                    theme.title(),
                ))
                .title_bottom(" . equal  * batch  X far off "),
        ),
        right,
    );
}

fn filters(view: &CompareView) -> String {
    let r = &view.request;
    let mut parts = Vec::new();
    if let Some(recipe) = &r.recipe {
        parts.push(format!("recipe {recipe}"));
    }
    if let Some(since) = &r.since {
        parts.push(format!("since {since}"));
    }
    if parts.is_empty() {
        "all batches".into()
    } else {
        parts.join(", ")
    }
}

fn kinds_table(view: &CompareView, theme: Theme, frame: &mut Frame, area: Rect) {
    let visible = area.height.saturating_sub(3).max(1) as usize;
    let offset = view.cursor.saturating_sub(visible - 1);
    let rows: Vec<Row> = view
        .kinds
        .iter()
        .enumerate()
        .skip(offset)
        .take(visible)
        .map(|(k, kind)| {
            let s = &kind.summary;
            let mark = if k == view.cursor { CURSOR_MARK } else { "  " };
            let force = if kind.in_force.is_some() {
                "corrected"
            } else {
                ""
            };
            Row::new(vec![
                format!("{mark}{}", s.kind),
                s.n.to_string(),
                format!("{:+.3}", s.bias),
                format!("{:.3}", s.rmse),
                s.unit.clone(),
                s.flagged.len().to_string(),
                force.to_string(),
            ])
        })
        .collect();
    let scope = view
        .request
        .scope
        .as_ref()
        .map_or("nothing".to_string(), scope_words);
    let table = Table::new(
        rows,
        [
            Constraint::Length(20),
            Constraint::Length(4),
            Constraint::Length(8),
            Constraint::Length(7),
            Constraint::Length(6),
            Constraint::Length(8),
            Constraint::Min(9),
        ],
    )
    .header(
        Row::new(vec!["  Kind", "n", "bias", "RMSE", "unit", "far off", ""]).style(theme.title()),
    )
    .row_highlight_style(theme.selected())
    .block(
        Block::bordered()
            .title(Span::styled(
                format!(" Predicted against measured: {} ", filters(view)),
                theme.title(),
            ))
            .title_bottom(format!(" corrections for {scope} ")),
    );
    let mut ts = TableState::default();
    if !view.kinds.is_empty() {
        ts.select(Some(view.cursor - offset));
    }
    frame.render_stateful_widget(table, area, &mut ts);
}

fn detail_lines(view: &CompareView, kind: &KindView, theme: Theme) -> Vec<Line<'static>> {
    let s = &kind.summary;
    let u = &s.unit;
    let mut lines = vec![Line::from(format!(
        "n {}   bias {:+.3}   RMSE {:.3}",
        s.n, s.bias, s.rmse
    ))];
    if let (Some(sd), Some(se)) = (s.sd, s.standard_error) {
        lines.push(Line::from(format!("sd {sd:.3} (s.e. of the bias {se:.3})")));
    }
    if let Some(k) = &kind.corrected {
        lines.push(Line::from(Span::styled(
            format!(
                "calibrated ({} of {}): bias {:+.3}, RMSE {:.3}",
                k.corrected, s.n, k.bias, k.rmse
            ),
            theme.advice(),
        )));
    }
    let scope = view
        .request
        .scope
        .as_ref()
        .map_or("nothing".to_string(), scope_words);
    lines.push(Line::from(Span::styled(
        format!("Correction for {scope}"),
        theme.title(),
    )));
    match &kind.in_force {
        Some(c) => lines.push(Line::from(Span::styled(
            format!("  in force (X takes it out): {}", c.basis),
            theme.advice(),
        ))),
        None => lines.push(Line::from("  none in force")),
    }
    match &kind.preview {
        Ok(c) => lines.push(Line::from(format!("  C puts in force: {}", c.basis))),
        Err(why) => lines.push(Line::from(format!("  none to fit: {why}"))),
    }
    for b in &s.flagged {
        lines.push(Line::from(vec![
            Span::styled(PROBLEM_MARK, theme.problem()),
            Span::styled(
                format!(
                    "{} {:+.2} {u}: {}",
                    b.batch_code,
                    b.difference,
                    b.likely_causes.first().map_or("", String::as_str)
                ),
                theme.problem(),
            ),
        ]));
    }
    lines.push(Line::from(Span::styled(
        "Furthest off (measured - predicted)",
        theme.title(),
    )));
    for b in &s.worst {
        lines.push(Line::from(format!(
            "  {} {:+.3}",
            b.batch_code, b.difference
        )));
    }
    lines
}

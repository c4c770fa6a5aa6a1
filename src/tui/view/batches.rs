//! The batch log: the history newest first (only the rows on screen are
//! drawn, so a million-row log draws as fast as a short one), and one batch's
//! detail with predicted against measured figures.

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Paragraph, Row, Table, TableState, Wrap};

use super::super::state::{BatchDetailView, State};
use crate::batch::MeasurementKind;

use super::theme::{CURSOR_MARK, Theme};
use crate::model::TempUnit;
use crate::model::units::{format_mass, trim_number};

/// Draws the batch log or the open batch.
pub fn render(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    match &state.batches.detail {
        Some(detail) => render_detail(state, detail, theme, frame, area),
        None => render_list(state, theme, frame, area),
    }
}

fn filters(state: &State) -> String {
    let q = &state.batches.query;
    let mut parts = Vec::new();
    if let Some(recipe) = &q.recipe {
        parts.push(format!("recipe: {recipe}"));
    }
    if let Some(since) = &q.since {
        parts.push(format!("since {since}"));
    }
    if !q.text.is_empty() {
        parts.push(format!("search: {}", q.text));
    }
    if parts.is_empty() {
        "all batches".into()
    } else {
        parts.join(", ")
    }
}

fn render_list(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let b = &state.batches;
    let unit = state.settings.mass_unit;
    let visible = area.height.saturating_sub(3).max(1) as usize;
    let offset = b.cursor.saturating_sub(visible - 1);
    let rows: Vec<Row> = b
        .rows
        .iter()
        .enumerate()
        .skip(offset)
        .take(visible)
        .map(|(k, r)| {
            let mark = if k == b.cursor { CURSOR_MARK } else { "  " };
            let status = if r.finalized { "final" } else { "open" };
            let made = r.made_at.get(..16).unwrap_or(&r.made_at).replace('T', " ");
            Row::new(vec![
                format!("{mark}{}", r.code),
                made,
                format!("{} v{}", r.recipe_name, r.version),
                format_mass(r.size_g, unit),
                r.operator.clone(),
                status.to_string(),
            ])
        })
        .collect();
    let count = if b.loading {
        "loading…".to_string()
    } else if b.more {
        format!("{}+ batches", b.rows.len())
    } else if b.rows.len() == 1 {
        "1 batch".to_string()
    } else {
        format!("{} batches", b.rows.len())
    };
    let table = Table::new(
        rows,
        [
            Constraint::Length(18),
            Constraint::Length(16),
            Constraint::Min(14),
            Constraint::Length(11),
            Constraint::Length(10),
            Constraint::Length(5),
        ],
    )
    .header(
        Row::new(vec![
            "  Batch",
            "Made (UTC)",
            "Recipe",
            "Size",
            "Operator",
            "State",
        ])
        .style(theme.title()),
    )
    .row_highlight_style(theme.selected())
    .block(
        Block::bordered()
            .title(Span::styled(" Batch log, newest first ", theme.title()))
            .title_bottom(format!(" {}; {count} ", filters(state))),
    );
    let mut ts = TableState::default();
    if !b.rows.is_empty() {
        ts.select(Some(b.cursor - offset));
    }
    frame.render_stateful_widget(table, area, &mut ts);
    if b.rows.is_empty() && !b.loading && area.height > 4 && area.width > 4 {
        let inner = Rect {
            x: area.x + 2,
            y: area.y + 2,
            width: area.width - 4,
            height: 2,
        };
        frame.render_widget(
            Paragraph::new("No batches match. Press b to start one from the recipe in the editor.")
                .wrap(Wrap { trim: true }),
            inner,
        );
    }
}

fn render_detail(state: &State, d: &BatchDetailView, theme: Theme, frame: &mut Frame, area: Rect) {
    let unit = state.settings.mass_unit;
    let [left, right] =
        Layout::horizontal([Constraint::Percentage(50), Constraint::Percentage(50)]).areas(area);
    let mut lines = vec![
        Line::from(format!(
            "Recipe     {} v{}",
            d.row.recipe_name, d.row.version
        )),
        Line::from(format!("Made       {}", d.row.made_at.replace('T', " "))),
        Line::from(format!("Operator   {}", d.row.operator)),
        Line::from(format!("Size       {}", format_mass(d.row.size_g, unit))),
        Line::from(if d.row.finalized {
            "State      final (corrections are amendments)"
        } else {
            "State      open"
        }),
        Line::from(Span::styled("Lines (planned, lot)", theme.title())),
    ];
    for (name, grams, lot) in &d.lines {
        let lot = if lot.is_empty() { "-" } else { lot };
        lines.push(Line::from(format!(
            "  {name}: {}  lot {lot}",
            format_mass(*grams, unit)
        )));
    }
    frame.render_widget(
        Paragraph::new(lines)
            .wrap(Wrap { trim: false })
            .block(Block::bordered().title(Span::styled(
                format!(" Batch {} ", d.row.code),
                theme.title(),
            ))),
        left,
    );
    let t = state.settings.temp_unit;
    let mut lines = vec![Line::from(Span::styled(
        format!("{:<16}{:>10}{:>10}", "", "predicted", "measured"),
        theme.title(),
    ))];
    for c in &d.comparisons {
        let show = |v: Option<f64>| v.map_or("-".to_string(), |x| measured_text(c.kind, x, t));
        lines.push(Line::from(format!(
            "{:<16}{:>10}{:>10}",
            kind_label(c.kind),
            show(c.predicted),
            show(c.measured)
        )));
    }
    lines.push(Line::from(Span::styled("Measurements", theme.title())));
    for (i, m) in d.measurements.iter().enumerate() {
        lines.push(Line::from(format!(
            "{:>2} {} {} {} ({}){}",
            i + 1,
            m.at,
            kind_label(m.kind),
            measured_text(m.kind, m.value, t),
            m.by,
            if m.struck { " struck out" } else { "" }
        )));
    }
    lines.push(Line::from(Span::styled("Notes", theme.title())));
    for (i, (at, by, text)) in d.notes.iter().enumerate() {
        lines.push(Line::from(format!("{:>2} {at} {by}: {text}", i + 1)));
    }
    if !d.trail.is_empty() {
        lines.push(Line::from(Span::styled(
            "Amendment trail (after sign-off)",
            theme.title(),
        )));
        for (i, a) in d.trail.iter().enumerate() {
            lines.push(Line::from(format!(
                "{:>2} {} {}: {}",
                i + 1,
                a.at,
                a.by,
                a.reason
            )));
            for c in &a.changes {
                lines.push(Line::from(format!("     {c}")));
            }
        }
    }
    frame.render_widget(
        Paragraph::new(lines).wrap(Wrap { trim: false }).block(
            Block::bordered().title(Span::styled(" Predicted and measured ", theme.title())),
        ),
        right,
    );
}

/// The words for a measured figure.
pub fn kind_label(kind: MeasurementKind) -> &'static str {
    match kind {
        MeasurementKind::Brix => "Brix",
        MeasurementKind::Ph => "pH",
        MeasurementKind::OverrunPct => "overrun",
        MeasurementKind::DrawTempC => "draw temperature",
        MeasurementKind::ServingTempC => "serving temp.",
        MeasurementKind::FreezingPointC => "freezing point",
        MeasurementKind::MassG => "batch mass",
        MeasurementKind::AbvPct => "ABV",
        MeasurementKind::TitratableAcidityPct => "acidity",
        MeasurementKind::PasteuriseTempC => "pasteurised at",
        MeasurementKind::PasteuriseTimeS => "pasteurised for",
    }
}

/// A measured or predicted value with its unit; temperatures in the display unit.
pub fn measured_text(kind: MeasurementKind, value: f64, unit: TempUnit) -> String {
    match kind.unit() {
        "°C" => unit.format(value),
        "g" => format!("{value:.0} g"),
        other => format!("{} {other}", trim_number((value * 100.0).round() / 100.0)),
    }
}

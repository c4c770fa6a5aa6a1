//! The batch log: the history newest first (only the rows on screen are
//! drawn, so a million-row log draws as fast as a short one), and one batch's
//! detail with predicted against measured figures.

use crate::model::units::format_volume;
use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Paragraph, Row, Table, TableState, Wrap};

use super::super::state::{BatchDetailView, State};
use crate::batch::MeasurementKind;

use super::theme::{CURSOR_MARK, PROBLEM_MARK, Theme};
use crate::batch::compare::PredictedFrom;
use crate::model::TempUnit;
use crate::model::units::{format_mass, trim_number};

/// Draws the batch log, the open batch, or the compare view.
pub fn render(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    match (&state.batches.compare, &state.batches.detail) {
        (Some(view), _) => super::compare::render(view, theme, frame, area),
        (None, Some(detail)) => render_detail(state, detail, theme, frame, area),
        (None, None) => render_list(state, theme, frame, area),
    }
}

/// A value of `kind` as a bare number in the unit shown (temperatures in the
/// display unit; `difference` for a difference of two temperatures).
fn number(kind: MeasurementKind, value: f64, unit: TempUnit, difference: bool) -> String {
    if kind.unit() == "°C" {
        let shown = unit.from_c(value) - if difference { unit.from_c(0.0) } else { 0.0 };
        return if difference {
            format!("{shown:+.2}")
        } else {
            format!("{shown:.2}")
        };
    }
    match (kind, difference) {
        (MeasurementKind::MassG, false) => format!("{value:.0}"),
        (MeasurementKind::MassG, true) => format!("{value:+.0}"),
        (_, true) => format!("{value:+.2}"),
        (_, false) => format!("{value:.2}"),
    }
}

/// The unit a kind is shown in.
fn shown_unit(kind: MeasurementKind, unit: TempUnit) -> &'static str {
    match kind.unit() {
        "°C" => unit.symbol(),
        other => other,
    }
}

/// Each predicted kind with its prediction, latest reading and difference; a
/// corrected prediction and a reading far off on a line of their own.
fn comparison_lines(d: &BatchDetailView, t: TempUnit, theme: Theme) -> Vec<Line<'static>> {
    let mut lines = vec![Line::from(Span::styled(
        format!(
            "{:<12}{:<5}{:>7}{:>7}{:>7}",
            "", "", "predic.", "meas.", "diff."
        ),
        theme.title(),
    ))];
    let mut recomputed = false;
    for c in &d.comparisons {
        let show = |v: Option<f64>| v.map_or("-".to_string(), |x| number(c.kind, x, t, false));
        let mut predicted = show(c.predicted);
        if c.predicted_from == PredictedFrom::RecipeText && c.predicted.is_some() {
            predicted.push('*');
            recomputed = true;
        }
        lines.push(Line::from(format!(
            "{:<11} {:<5}{:>7}{:>7}{:>7}",
            short_label(c.kind),
            shown_unit(c.kind, t),
            predicted,
            show(c.measured),
            c.difference()
                .map_or(String::new(), |x| number(c.kind, x, t, true))
        )));
        if let Some(k) = &c.calibrated {
            let difference = c.calibrated_difference().map_or(String::new(), |x| {
                format!(", diff. {}", number(c.kind, x, t, true))
            });
            lines.push(Line::from(Span::styled(
                format!(
                    "  calibrated {}{difference}: {}",
                    number(c.kind, k.value, t, false),
                    k.basis
                ),
                theme.advice(),
            )));
        }
        if let (Some(why), Some(_)) = (&c.no_prediction, c.measured) {
            lines.push(Line::from(Span::styled(
                format!("  no prediction: {why}"),
                theme.dim(),
            )));
        }
        if let Some(cause) = c.likely_causes.first() {
            lines.push(Line::from(vec![
                Span::styled(PROBLEM_MARK, theme.problem()),
                Span::styled(format!("far off; likely: {cause}"), theme.problem()),
            ]));
        }
    }
    if recomputed {
        lines.push(Line::from(Span::styled(
            "* not recorded: computed now from the recorded recipe",
            theme.dim(),
        )));
    }
    lines
}

/// A short name for the comparison table (at most 11 characters, so a space
/// always parts it from the unit).
fn short_label(kind: MeasurementKind) -> &'static str {
    match kind {
        MeasurementKind::FreezingPointC => "freezing pt",
        MeasurementKind::DrawTempC => "draw temp.",
        MeasurementKind::ServingTempC => "serve temp.",
        MeasurementKind::MassG => "batch mass",
        other => kind_label(other),
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

/// Where the log stands with the hub, in a few words (short enough for 80 columns
/// beside the title).
fn hub_state(state: &State) -> String {
    let s = &state.batches.sync;
    let mut parts = Vec::new();
    if s.running {
        parts.push("syncing…".to_string());
    } else if let Some(at) = &s.last_sync {
        parts.push(format!(
            "synced {}",
            at.get(5..16).unwrap_or(at).replace('T', " ")
        ));
    } else if s.hub_set {
        parts.push("never synced".into());
    } else {
        parts.push("no hub".into());
    }
    if s.waiting > 0 {
        parts.push(format!("{} waiting", s.waiting));
    }
    match s.conflicts {
        0 => {}
        1 => parts.push("1 conflict".into()),
        n => parts.push(format!("{n} conflicts")),
    }
    format!(" {}: {} ", s.site, parts.join(", "))
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
            let status = r.status.as_str();
            let made = r.made_at.get(..16).unwrap_or(&r.made_at).replace('T', " ");
            Row::new(vec![
                format!("{mark}{}", r.code),
                made,
                format!("{} v{}", r.recipe_name, r.version),
                r.volume_ml
                    .map_or_else(|| format_mass(r.size_g, unit), format_volume),
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
            Constraint::Length(22),
            Constraint::Length(16),
            Constraint::Min(10),
            Constraint::Length(10),
            Constraint::Length(8),
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
            .title(Line::from(hub_state(state)).right_aligned())
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
        Line::from(match d.row.volume_ml {
            Some(ml) => format!(
                "Size       {} ({})",
                format_volume(ml),
                format_mass(d.row.size_g, unit)
            ),
            None => format!("Size       {}", format_mass(d.row.size_g, unit)),
        }),
        Line::from(match d.row.status.as_str() {
            "draft" => "State      draft (measure, note, then finalise)".to_string(),
            status => format!("State      {status} (corrections are amendments)"),
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
    let mut lines = comparison_lines(d, t, theme);
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
        MeasurementKind::FreezingPointH => "freezing pt. °H",
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_short_label_leaves_a_space_before_the_unit() {
        // The comparison table (kinds with a prediction) gives the label 11
        // columns and a space.
        for kind in MeasurementKind::ALL
            .into_iter()
            .filter(|k| k.prediction_key().is_some())
        {
            let label = short_label(kind);
            assert!(label.chars().count() <= 11, "{kind:?}: `{label}`");
        }
    }
}

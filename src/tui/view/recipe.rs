//! The recipe screen: the lines with a cursor, the key figures, the warnings
//! and cautions, and the chart of frozen water against temperature.

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::style::Style;
use ratatui::symbols::Marker;
use ratatui::text::{Line, Span};
use ratatui::widgets::{
    Axis, Block, Cell, Chart, Dataset, GraphType, Paragraph, Row, Table, TableState, Wrap,
};

use crate::analysis::{Analysis, Severity};

use super::super::state::State;
use super::fit;
use super::theme::{ADVICE_MARK, CAUTION_MARK, CURSOR_MARK, NOTE_MARK, PROBLEM_MARK, Theme};
use crate::model::units::{format_amount, format_mass, format_volume};

/// Coldest temperature the chart shows (°C).
pub const CHART_MIN_C: f64 = -30.0;

/// Draws the recipe screen.
pub fn render(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    // Ten key figures need 12 rows; a tall terminal also gets the extra ones.
    let top_rows = if area.height >= 34 { 17 } else { 12 }.min(area.height);
    let [top, bottom] =
        Layout::vertical([Constraint::Length(top_rows), Constraint::Min(0)]).areas(area);
    let side = if area.width >= 110 { 44 } else { 36 };
    let [lines, figures] =
        Layout::horizontal([Constraint::Min(20), Constraint::Length(side)]).areas(top);
    let [chart, notes] =
        Layout::horizontal([Constraint::Min(20), Constraint::Length(side)]).areas(bottom);
    render_lines(state, theme, frame, lines);
    render_figures(state, theme, frame, figures);
    render_chart(state, theme, frame, chart);
    render_warnings(state, theme, frame, notes);
}

fn render_lines(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let r = &state.recipe;
    let unit = state.settings.mass_unit;
    let analysis = r.analysis.as_ref().ok();
    let amounts: Vec<String> = r
        .recipe
        .lines
        .iter()
        .map(|line| format_amount(line.amount, unit))
        .collect();
    let rows: Vec<Row> = r
        .recipe
        .lines
        .iter()
        .zip(&amounts)
        .enumerate()
        .map(|(k, (line, amount))| {
            let name = state.display_name(&line.ingredient);
            let share = analysis
                .and_then(|a| a.line_mass_g.get(k).map(|g| 100.0 * g / a.mass_g))
                .map_or("-".to_string(), |p| format!("{p:.1}"));
            let mark = if k == r.cursor { CURSOR_MARK } else { "  " };
            Row::new(vec![
                Cell::from(format!("{mark}{name}")),
                Cell::from(Line::from(amount.clone()).right_aligned()),
                Cell::from(Line::from(share).right_aligned()),
            ])
        })
        .collect();
    // The amount column is as wide as its widest amount, so no number is ever cut.
    let amount_w = amounts
        .iter()
        .map(|a| a.chars().count())
        .max()
        .unwrap_or(0)
        .max("Amount".len()) as u16;
    let total = analysis.map_or("-".to_string(), |a| format_mass(a.mass_g, unit));
    let dirty = if r.is_dirty() { " *" } else { "" };
    let title = format!(" {}{dirty} ", r.recipe.name);
    let table = Table::new(
        rows,
        [
            Constraint::Min(12),
            Constraint::Length(amount_w),
            Constraint::Length(6),
        ],
    )
    .header(
        Row::new(vec![
            Cell::from("  Ingredient"),
            Cell::from(Line::from("Amount").right_aligned()),
            Cell::from(Line::from("% mix").right_aligned()),
        ])
        .style(theme.title()),
    )
    .row_highlight_style(theme.selected())
    .block(
        Block::bordered()
            .title(Span::styled(title, theme.title()))
            .title_bottom(format!(
                " {}, {} lines, {total} ",
                r.recipe.style.as_str(),
                r.recipe.lines.len()
            )),
    );
    let mut table_state = TableState::default();
    if !r.recipe.lines.is_empty() {
        table_state.select(Some(r.cursor));
    }
    frame.render_stateful_widget(table, area, &mut table_state);
    if r.recipe.lines.is_empty() && area.height > 3 && area.width > 4 {
        let inner = Rect {
            x: area.x + 2,
            y: area.y + 2,
            width: area.width - 4,
            height: 1,
        };
        frame.render_widget(Paragraph::new("No lines yet: press a to add one."), inner);
    }
}

fn figure<'a>(theme: Theme, label: &str, value: String, width: u16) -> Line<'a> {
    // At least one space: a row too long for the panel wraps between words
    // instead of running the label into its value.
    let pad = (width as usize)
        .saturating_sub(label.chars().count() + value.chars().count() + 2)
        .max(1);
    Line::from(vec![
        Span::raw(format!("{label}{}", " ".repeat(pad))),
        Span::styled(value, theme.value()),
    ])
}

fn render_figures(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let block = Block::bordered().title(Span::styled(" Key figures ", theme.title()));
    let width = area.width;
    let lines = match &state.recipe.analysis {
        Ok(a) if a.style.is_drink() => drink_figures(state, theme, a, width),
        Ok(a) => dessert_figures(state, theme, a, width),
        Err(reason) => vec![Line::from(reason.clone())],
    };
    frame.render_widget(
        Paragraph::new(lines).wrap(Wrap { trim: true }).block(block),
        area,
    );
}

/// A frozen dessert's key figures, most asked-for first (the first ten fit 80x24).
fn dessert_figures<'a>(state: &State, theme: Theme, a: &Analysis, width: u16) -> Vec<Line<'a>> {
    let t = state.settings.temp_unit;
    let c = &a.composition;
    let pct = |x: f64| format!("{x:.1} %");
    let calibrated = |kind: &str| calibrated_rows(state, theme, kind, width);
    [
        vec![figure(
            theme,
            "Freezing point",
            t.format_opt(a.freezing_point_c),
            width,
        )],
        calibrated("freezing-point-c"),
        vec![figure(
            theme,
            &format!(
                "Serve at ({:.0} % frozen)",
                100.0 * a.serving_frozen_fraction
            ),
            t.format_opt(a.serving_temp_c),
            width,
        )],
        calibrated("serving-temp-c"),
        vec![
            figure(
                theme,
                &format!("Frozen, cabinet {}", t.format(a.cabinet.temp_c)),
                pct(100.0 * a.cabinet.frozen_fraction),
                width,
            ),
            figure(
                theme,
                &format!("Frozen, freezer {}", t.format(a.freezer.temp_c)),
                pct(100.0 * a.freezer.frozen_fraction),
                width,
            ),
            figure(
                theme,
                "Sweetness (sucrose = 100)",
                format!("{:.1}", a.sweetness),
                width,
            ),
            figure(theme, "Total solids", pct(c.total_solids_pct), width),
            figure(theme, "Fat", pct(c.fat_pct), width),
            figure(theme, "MSNF", pct(c.msnf_pct), width),
            figure(theme, "Sugars", pct(c.sugars_pct), width),
            figure(theme, "ABV", format!("{:.1} % vol", a.abv_pct), width),
            figure(
                theme,
                "Dilute-law freezing point",
                t.format_opt(a.dilute_law_freezing_point_c),
                width,
            ),
            figure(
                theme,
                "Classic-method freezing point",
                if a.classic_applies {
                    t.format_opt(a.classic_freezing_point_c)
                } else {
                    "n/a (see notes)".into()
                },
                width,
            ),
            figure(theme, "Water", pct(c.water_pct), width),
            figure(theme, "Protein", pct(c.protein_pct), width),
            figure(
                theme,
                "Mass, volume",
                format!(
                    "{}, {}",
                    format_mass(a.mass_g, state.settings.mass_unit),
                    format_volume(a.volume_ml)
                ),
                width,
            ),
        ],
    ]
    .concat()
}

/// A liqueur's or spirit's key figures: what a distiller and a label law ask
/// (volume, strength, sugar) and what the freezer does to it. The serving
/// temperature and the cabinet mean nothing for a drink and are not shown.
fn drink_figures<'a>(state: &State, theme: Theme, a: &Analysis, width: u16) -> Vec<Line<'a>> {
    let t = state.settings.temp_unit;
    let c = &a.composition;
    let pct = |x: f64| format!("{x:.1} %");
    let calibrated = |kind: &str| calibrated_rows(state, theme, kind, width);
    [
        vec![
            figure(theme, "Volume at 20 °C", format_volume(a.volume_ml), width),
            figure(
                theme,
                "ABV (20 °C)",
                format!("{:.2} % vol", a.abv_pct),
                width,
            ),
        ],
        calibrated("abv-pct"),
        vec![
            figure(theme, "US proof", format!("{:.1}", 2.0 * a.abv_pct), width),
            figure(theme, "Sugar", format!("{:.0} g/L", a.sugar_g_per_l), width),
            figure(
                theme,
                "Mass",
                format_mass(a.mass_g, state.settings.mass_unit),
                width,
            ),
            figure(
                theme,
                // Short enough beside "a few crystals" at 80 columns.
                &format!("Freezer, {}", t.format(a.freezer.temp_c)),
                a.freezer_behaviour.words().to_string(),
                width,
            ),
            figure(
                theme,
                "Its water as ice there",
                pct(100.0 * a.freezer.frozen_fraction),
                width,
            ),
            figure(
                theme,
                "Freezing point",
                t.format_opt(a.freezing_point_c),
                width,
            ),
        ],
        calibrated("freezing-point-c"),
        vec![
            figure(
                theme,
                "Sweetness (sucrose = 100)",
                format!("{:.1}", a.sweetness),
                width,
            ),
            figure(theme, "Ethanol (mass)", pct(c.ethanol_pct), width),
            figure(theme, "Total solids", pct(c.total_solids_pct), width),
            figure(theme, "Fat", pct(c.fat_pct), width),
            figure(
                theme,
                "Dilute-law freezing point",
                t.format_opt(a.dilute_law_freezing_point_c),
                width,
            ),
            figure(
                theme,
                "Classic-method estimate",
                "n/a for drinks".into(),
                width,
            ),
            figure(theme, "Water", pct(c.water_pct), width),
        ],
    ]
    .concat()
}

/// The row of a calibrated figure of `kind` under its plain one, when a
/// correction in force applies: marked as calibrated, with its basis (the
/// offset too where the panel is wide enough).
fn calibrated_rows<'a>(state: &State, theme: Theme, kind: &str, width: u16) -> Vec<Line<'a>> {
    let t = state.settings.temp_unit;
    state
        .recipe
        .calibrated
        .iter()
        .filter(|f| f.kind == kind)
        .map(|f| {
            let value = if f.unit == "K" {
                t.format(f.value)
            } else {
                format!("{:.2} {}", f.value, f.unit)
            };
            let batches = if f.n == 1 { "batch" } else { "batches" };
            let wide = format!(
                "  calibrated {:+.2} {}, {} {batches}",
                f.value - f.predicted,
                f.unit,
                f.n
            );
            let label = if wide.chars().count() + value.chars().count() + 2 <= width as usize {
                wide
            } else {
                format!("  calibrated, {} {batches}", f.n)
            };
            figure(theme, &label, value, width)
        })
        .collect()
}

/// The warnings and cautions as (mark, style, text): problems first, then the
/// cautions of safe practice, then advice and notes, so that when space is
/// short what is cut is the least important.
pub fn notices(state: &State, theme: Theme) -> Vec<(&'static str, Style, String)> {
    match &state.recipe.analysis {
        Ok(a) => {
            let of = |severity: Severity| {
                a.warnings
                    .iter()
                    .filter(move |w| w.severity == severity)
                    .map(move |w| match severity {
                        Severity::Problem => (PROBLEM_MARK, theme.problem(), w.message.clone()),
                        Severity::Advice => (ADVICE_MARK, theme.advice(), w.message.clone()),
                        Severity::Note => (NOTE_MARK, theme.dim(), w.message.clone()),
                    })
            };
            let cautions = a
                .cautions
                .iter()
                .map(|c| (CAUTION_MARK, theme.advice(), c.clone()));
            of(Severity::Problem)
                .chain(cautions)
                .chain(of(Severity::Advice))
                .chain(of(Severity::Note))
                .collect()
        }
        Err(reason) if state.recipe.recipe.lines.is_empty() => {
            vec![(NOTE_MARK, theme.dim(), reason.clone())]
        }
        Err(reason) => vec![(PROBLEM_MARK, theme.problem(), reason.clone())],
    }
}

fn render_warnings(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let items = notices(state, theme);
    let block = Block::bordered()
        .title(Span::styled(" Warnings and cautions ", theme.title()))
        .title_bottom(" w: read all ");
    let inner = block.inner(area);
    frame.render_widget(block, area);
    let room = inner.height as usize;
    let mark_w = 3;
    let text_w = (inner.width as usize).saturating_sub(mark_w).max(1);
    let wrapped: Vec<Vec<String>> = items
        .iter()
        .map(|(_, _, t)| wrap_words(t, text_w))
        .collect();
    // Every notice gets a row while rows last (the last row says how many are
    // left out); rows to spare go to the notices in order, so they read in full.
    let shown = if items.len() > room {
        room.saturating_sub(1)
    } else {
        items.len()
    };
    let mut rows_for = vec![1usize; shown];
    let mut spare = room.saturating_sub(shown + usize::from(shown < items.len()));
    for (k, rows) in rows_for.iter_mut().enumerate() {
        let extra = (wrapped[k].len() - 1).min(spare);
        *rows += extra;
        spare -= extra;
    }
    let mut lines: Vec<Line> = Vec::new();
    for (k, (mark, style, _)) in items.iter().take(shown).enumerate() {
        let parts = &wrapped[k];
        for (r, part) in parts.iter().take(rows_for[k]).enumerate() {
            let cut = r + 1 == rows_for[k] && parts.len() > rows_for[k];
            let text = if cut {
                fit(&format!("{part} …"), text_w)
            } else {
                part.clone()
            };
            let lead = if r == 0 { *mark } else { "   " };
            lines.push(Line::from(vec![
                Span::styled(lead, *style),
                Span::styled(text, *style),
            ]));
        }
    }
    if shown < items.len() {
        lines.push(Line::from(format!(
            "+{} more: press w",
            items.len() - shown
        )));
    }
    frame.render_widget(Paragraph::new(lines), inner);
}

/// Greedy word wrap of `text` into lines of at most `width` characters (a word
/// longer than a line is split).
pub fn wrap_words(text: &str, width: usize) -> Vec<String> {
    let width = width.max(1);
    let mut lines: Vec<String> = Vec::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        let mut word: Vec<char> = word.chars().collect();
        loop {
            let used = line.chars().count();
            let need = if used == 0 {
                word.len()
            } else {
                used + 1 + word.len()
            };
            if need <= width {
                if used > 0 {
                    line.push(' ');
                }
                line.extend(word.iter());
                break;
            }
            if used > 0 {
                lines.push(std::mem::take(&mut line));
                continue;
            }
            let rest = word.split_off(width);
            lines.push(word.into_iter().collect());
            word = rest;
        }
    }
    if !line.is_empty() || lines.is_empty() {
        lines.push(line);
    }
    lines
}

/// The marks on the chart: (label, temperature °C, marker, marker symbol).
/// The temperatures marked on the chart: for a dessert where it is served, the
/// cabinet and the freezer; for a drink only the freezer (serving share and
/// cabinet mean nothing for it).
fn marks(a: &Analysis) -> Vec<(&'static str, f64, Marker, &'static str)> {
    let mut out = Vec::new();
    if !a.style.is_drink() {
        if let Some(t) = a.serving_temp_c {
            out.push(("serve", t, Marker::Dot, "•"));
        }
        out.push(("cabinet", a.cabinet.temp_c, Marker::Bar, "▄"));
    }
    out.push(("freezer", a.freezer.temp_c, Marker::Block, "█"));
    out
}

fn render_chart(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let t = state.settings.temp_unit;
    let Ok(a) = &state.recipe.analysis else {
        frame.render_widget(
            Block::bordered().title(Span::styled(" Water frozen ", theme.title())),
            area,
        );
        return;
    };
    let curve: Vec<(f64, f64)> = a
        .ice_curve
        .iter()
        .filter(|p| p.temp_c >= CHART_MIN_C)
        .map(|p| (t.from_c(p.temp_c), 100.0 * p.frozen_fraction))
        .collect();
    let marks = marks(a);
    let mark_lines: Vec<[(f64, f64); 2]> = marks
        .iter()
        .map(|(_, temp_c, _, _)| {
            let x = t.from_c(temp_c.max(CHART_MIN_C));
            [(x, 0.0), (x, 100.0)]
        })
        .collect();
    let mut datasets = vec![
        Dataset::default()
            .name("frozen")
            .marker(Marker::Braille)
            .graph_type(GraphType::Line)
            .style(theme.curve())
            .data(&curve),
    ];
    for (k, ((label, _, marker, _), points)) in marks.iter().zip(&mark_lines).enumerate() {
        datasets.push(
            Dataset::default()
                .name(*label)
                .marker(*marker)
                .graph_type(GraphType::Line)
                .style(theme.mark(k))
                .data(points),
        );
    }
    let wide = area.width >= 70;
    let legend: String = marks
        .iter()
        .map(|(label, temp_c, _, symbol)| {
            if wide {
                format!("{symbol} {label} {}", t.format(*temp_c))
            } else {
                format!("{symbol}{label} {:.1}", t.from_c(*temp_c))
            }
        })
        .collect::<Vec<_>>()
        .join(if wide { "  " } else { " " });
    let (lo, hi) = (t.from_c(CHART_MIN_C), t.from_c(0.0));
    let sym = t.symbol();
    let chart = Chart::new(datasets)
        .block(
            Block::bordered()
                .title(Span::styled(" Water frozen, % ", theme.title()))
                .title_bottom(format!(" {legend} ")),
        )
        .legend_position(None)
        .x_axis(Axis::default().bounds([lo, hi]).labels([
            format!("{lo:.0}{sym}"),
            format!("{:.0}", (lo + hi) / 2.0),
            format!("{hi:.0}{sym}"),
        ]))
        .y_axis(
            Axis::default()
                .bounds([0.0, 100.0])
                .labels(["0", "50", "100"]),
        );
    frame.render_widget(chart, area);
}

#[cfg(test)]
mod tests {
    use super::wrap_words;

    #[test]
    fn words_wrap_within_the_width_and_long_words_split() {
        let lines = wrap_words("Pasteurise dairy and egg mixes before ageing", 12);
        assert_eq!(
            lines,
            ["Pasteurise", "dairy and", "egg mixes", "before", "ageing"]
        );
        assert!(
            wrap_words("abcdefghij", 4)
                .iter()
                .all(|l| l.chars().count() <= 4)
        );
        assert_eq!(wrap_words("abcdefghij", 4).concat(), "abcdefghij");
        assert_eq!(wrap_words("", 5), [""]);
    }
}

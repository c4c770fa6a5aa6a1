//! The balance panel, drawn over the recipe screen's body: the lines with
//! whether each may move and its amount now and after balancing, side by side;
//! the targets with what is asked, the value reached and whether it is met or
//! binds; and below, the answer in words (balanced, or which targets conflict
//! and what would let them hold), the cost, and where the targets came from.

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Cell, Paragraph, Row, Table, TableState};

use super::super::state::{shown_name, shown_range, shown_temperature};
use crate::balance::{Balance, Figure, Objective, Status};
use crate::model::units::{G_PER_OZ, TempUnit, trim_number};
use crate::model::{Amount, MassUnit};

use super::super::action::Command;
use super::super::keymap::key_label;
use super::super::state::{BalancePanel, Context, State};
use super::fit;
use super::recipe::wrap_words;
use super::theme::{CURSOR_MARK, PROBLEM_MARK, Theme};

/// An amount to a tenth of a gram (or millilitre), or in ounces: the panel
/// compares amounts that differ by little.
fn amount_text(amount: Amount, unit: MassUnit) -> String {
    match (amount, unit) {
        (Amount::Grams(g), MassUnit::Imperial) => format!("{:.2} oz", g / G_PER_OZ),
        (Amount::Grams(g), _) if g.abs() >= 10_000.0 => format!("{:.2} kg", g / 1000.0),
        (Amount::Grams(g), _) => format!("{g:.1} g"),
        (Amount::Millilitres(ml), _) if ml.abs() >= 10_000.0 => format!("{:.2} L", ml / 1000.0),
        (Amount::Millilitres(ml), _) => format!("{ml:.1} mL"),
    }
}

fn objective_words(o: Objective) -> &'static str {
    match o {
        Objective::Nearest => "least change",
        Objective::Cost => "least cost",
    }
}

/// Draws the panel in `area` (the recipe screen's body).
pub fn render(state: &State, panel: &BalancePanel, theme: Theme, frame: &mut Frame, area: Rect) {
    let lines = state.recipe.recipe.lines.len();
    let rows = lines.max(panel.request.targets.len()) as u16 + 3;
    let top_rows = rows
        .min(area.height.saturating_sub(5))
        .max(3.min(area.height));
    let [top, bottom] =
        Layout::vertical([Constraint::Length(top_rows), Constraint::Min(0)]).areas(area);
    let side = if area.width >= 110 { 54 } else { 40 };
    let [left, right] =
        Layout::horizontal([Constraint::Min(20), Constraint::Length(side)]).areas(top);
    let answer = panel.answer.as_ref().ok();
    render_lines(state, panel, answer, theme, frame, left);
    render_targets(state, panel, answer, theme, frame, right);
    render_answer(panel, theme, frame, bottom);
}

fn render_lines(
    state: &State,
    panel: &BalancePanel,
    answer: Option<&Balance>,
    theme: Theme,
    frame: &mut Frame,
    area: Rect,
) {
    let unit = state.settings.mass_unit;
    let recipe = &state.recipe.recipe;
    let amount_w = 9u16;
    let rows: Vec<Row> = recipe
        .lines
        .iter()
        .enumerate()
        .map(|(k, line)| {
            let mark = if k == panel.cursor { CURSOR_MARK } else { "  " };
            let moves = if panel.request.may_vary(&line.ingredient) {
                "yes"
            } else {
                "held"
            };
            let new = answer
                .and_then(|b| b.recipe.lines.get(k))
                .map_or("-".to_string(), |l| amount_text(l.amount, unit));
            Row::new(vec![
                Cell::from(format!("{mark}{}", state.display_name(&line.ingredient))),
                Cell::from(moves),
                Cell::from(Line::from(amount_text(line.amount, unit)).right_aligned()),
                Cell::from(Line::from(new).right_aligned()),
            ])
        })
        .collect();
    let title = format!(" Balance: {} ", recipe.name);
    let table = Table::new(
        rows,
        [
            Constraint::Min(10),
            Constraint::Length(4),
            Constraint::Length(amount_w),
            Constraint::Length(amount_w),
        ],
    )
    .header(
        Row::new(vec![
            Cell::from("  Ingredient"),
            Cell::from("move"),
            Cell::from(Line::from("now").right_aligned()),
            Cell::from(Line::from("balanced").right_aligned()),
        ])
        .style(theme.title()),
    )
    .row_highlight_style(theme.selected())
    .block(Block::bordered().title(Span::styled(
        fit(&title, area.width.saturating_sub(2) as usize),
        theme.title(),
    )));
    let mut table_state = TableState::default();
    if panel.cursor < recipe.lines.len() {
        table_state.select(Some(panel.cursor));
    }
    frame.render_stateful_widget(table, area, &mut table_state);
}

fn render_targets(
    state: &State,
    panel: &BalancePanel,
    answer: Option<&Balance>,
    theme: Theme,
    frame: &mut Frame,
    area: Rect,
) {
    let lines = state.recipe.recipe.lines.len();
    let wide = area.width >= 50;
    let unit = state.settings.temp_unit;
    let rows: Vec<Row> = panel
        .request
        .targets
        .iter()
        .enumerate()
        .map(|(k, t)| {
            let selected = panel.cursor == lines + k;
            let mark = if selected { CURSOR_MARK } else { "  " };
            let result = answer.and_then(|b| b.targets.iter().find(|r| r.name == t.figure.name()));
            let value = result
                .and_then(|r| r.value)
                .map_or("-".to_string(), |v| value_text(&t.figure, v, wide, unit));
            let verdict = match result {
                Some(r) if !r.met => "!!",
                Some(r) if r.binding => "=",
                _ => "",
            };
            let style = if result.is_some_and(|r| !r.met) {
                theme.problem()
            } else {
                ratatui::style::Style::new()
            };
            Row::new(vec![
                Cell::from(format!("{mark}{}", shown_name(&t.figure, unit))),
                Cell::from(shown_range(t, unit)),
                Cell::from(Line::from(value).right_aligned()),
                Cell::from(verdict),
            ])
            .style(style)
        })
        .collect();
    let table = Table::new(
        rows,
        [
            Constraint::Min(10),
            Constraint::Length(if wide { 12 } else { 9 }),
            Constraint::Length(if wide { 11 } else { 6 }),
            Constraint::Length(2),
        ],
    )
    .header(
        Row::new(vec![
            Cell::from("  Target"),
            Cell::from("asked"),
            Cell::from(Line::from("value").right_aligned()),
            Cell::from(""),
        ])
        .style(theme.title()),
    )
    .row_highlight_style(theme.selected())
    .block(Block::bordered().title(Span::styled(" Targets  = binds  !! missed ", theme.title())));
    let mut table_state = TableState::default();
    if let Some(k) = panel.target_at_cursor(lines) {
        table_state.select(Some(k));
    }
    frame.render_stateful_widget(table, area, &mut table_state);
}

/// A target's value for the panel: with its unit when there is room.
fn value_text(figure: &Figure, v: f64, wide: bool, unit: TempUnit) -> String {
    if let Some(shown) = shown_temperature(figure, v, unit) {
        return if wide {
            format!("{shown:.2} {}", unit.symbol())
        } else {
            format!("{shown:.2}")
        };
    }
    if wide {
        figure.value_text(v)
    } else {
        match figure {
            Figure::MassG | Figure::VolumeMl => format!("{v:.0}"),
            Figure::FrozenAt { .. } => format!("{v:.3}"),
            Figure::SugarGPerL | Figure::Sweetness => format!("{v:.1}"),
            _ => format!("{v:.2}"),
        }
    }
}

/// The answer in words, one paragraph each.
fn answer_paragraphs(panel: &BalancePanel) -> Vec<(bool, String)> {
    let mut out = Vec::new();
    match &panel.answer {
        Err(e) if e.is_empty() => {}
        Err(e) => out.push((true, format!("Cannot balance: {e}"))),
        Ok(b) => {
            match b.status {
                Status::Balanced => out.push((
                    false,
                    format!(
                        "Balanced ({}): every target is met. {} accepts the new amounts as one step ({} on the recipe undoes it); {} leaves the recipe as it was.",
                        objective_words(b.objective),
                        key_label(Context::Balance, Command::AcceptBalance),
                        key_label(Context::Recipe, Command::Undo),
                        key_label(Context::Balance, Command::Cancel),
                    ),
                )),
                Status::Infeasible => out.push((
                    true,
                    "The targets cannot all be met. The amounts shown are the nearest that can be made and miss them; nothing can be accepted.".into(),
                )),
            }
            for c in &b.conflicts {
                out.push((
                    true,
                    format!(
                        "These cannot all hold: {}. Any one of these would do: {}.",
                        c.targets.join(", "),
                        c.relax.join("; ")
                    ),
                ));
            }
            if let (Some(cost), Some(per_kg)) = (b.cost, b.cost_per_kg) {
                out.push((
                    false,
                    format!("Cost of the batch {cost:.2}, {per_kg:.2} per kg."),
                ));
            }
            let shadow: Vec<String> = b
                .targets
                .iter()
                .filter_map(|t| {
                    t.shadow_price
                        .map(|p| format!("{} {}", t.name, trim_number((p * 1e4).round() / 1e4)))
                })
                .collect();
            if !shadow.is_empty() {
                out.push((
                    false,
                    format!(
                        "Cost per unit of each binding target: {}.",
                        shadow.join(", ")
                    ),
                ));
            }
        }
    }
    out.push((false, format!("Targets from {}.", panel.source)));
    out
}

fn render_answer(panel: &BalancePanel, theme: Theme, frame: &mut Frame, area: Rect) {
    let title = format!(" Answer: {} ", objective_words(panel.request.objective));
    let block = Block::bordered().title(Span::styled(title, theme.title()));
    let inner = block.inner(area);
    frame.render_widget(block, area);
    let width = (inner.width as usize)
        .saturating_sub(PROBLEM_MARK.len())
        .max(1);
    let mut lines: Vec<Line> = Vec::new();
    for (problem, text) in answer_paragraphs(panel) {
        for (r, part) in wrap_words(&text, width).into_iter().enumerate() {
            let lead = match (problem, r) {
                (true, 0) => PROBLEM_MARK,
                _ => "   ",
            };
            let style = if problem {
                theme.problem()
            } else {
                ratatui::style::Style::new()
            };
            lines.push(Line::from(vec![
                Span::styled(lead, style),
                Span::styled(part, style),
            ]));
        }
    }
    let room = inner.height as usize;
    if lines.len() > room && room > 0 {
        lines.truncate(room - 1);
        lines.push(Line::from("   … more: widen or heighten the terminal"));
    }
    frame.render_widget(Paragraph::new(lines), inner);
}

//! The ingredients screen: the list of ingredients or solutes (searchable), and
//! the composition or properties of the one under the cursor, with the source
//! of its numbers.

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Paragraph, Row, Table, TableState, Wrap};

use crate::thermo::binary::WaterModel;

use super::super::state::{CatalogList, State};
use super::theme::{CURSOR_MARK, Theme};
use crate::model::units::trim_number;

/// Draws the ingredients screen.
pub fn render(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let [list, detail] =
        Layout::horizontal([Constraint::Percentage(50), Constraint::Percentage(50)]).areas(area);
    render_list(state, theme, frame, list);
    render_detail(state, theme, frame, detail);
}

fn is_own(state: &State, id: &str) -> bool {
    state.own.ingredients.iter().any(|i| i.id == id) || state.own.solutes.iter().any(|s| s.id == id)
}

fn render_list(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let s = &state.ingredients;
    let rows: Vec<Row> = s
        .matches
        .iter()
        .enumerate()
        .map(|(k, id)| {
            let mark = if k == s.cursor { CURSOR_MARK } else { "  " };
            let own = if is_own(state, id) { " (own)" } else { "" };
            let (name, kind) = match s.list {
                CatalogList::Ingredients => state.catalog.ingredient(id).map_or_else(
                    || (id.clone(), String::new()),
                    |i| (i.name.clone(), i.category.as_str().to_string()),
                ),
                CatalogList::Solutes => state.catalog.solute(id).map_or_else(
                    || (id.clone(), String::new()),
                    |e| {
                        (
                            e.solute.name.clone(),
                            format!("{:?}", e.solute.kind).to_lowercase(),
                        )
                    },
                ),
            };
            Row::new(vec![format!("{mark}{name}{own}"), kind])
        })
        .collect();
    let which = match s.list {
        CatalogList::Ingredients => "[Ingredients]  Solutes ",
        CatalogList::Solutes => " Ingredients  [Solutes]",
    };
    let search = if s.filter.is_empty() {
        String::new()
    } else {
        format!(" search: {} ", s.filter)
    };
    let table = Table::new(rows, [Constraint::Min(10), Constraint::Length(11)])
        .row_highlight_style(theme.selected())
        .block(
            Block::bordered()
                .title(Span::styled(format!(" {which} "), theme.title()))
                .title_bottom(format!(" {} shown {search}", s.matches.len())),
        );
    let mut ts = TableState::default();
    if !s.matches.is_empty() {
        ts.select(Some(s.cursor));
    }
    frame.render_stateful_widget(table, area, &mut ts);
}

fn row(label: &str, value: String) -> Line<'static> {
    Line::from(format!("{label:<22}{value}"))
}

fn render_detail(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let id = state.selected_ingredient_id();
    let mut lines: Vec<Line> = Vec::new();
    let mut title = " Detail ".to_string();
    match (state.ingredients.list, id) {
        (CatalogList::Ingredients, Some(id)) => {
            if let Some(i) = state.catalog.ingredient(&id) {
                title = format!(" {} ", i.name);
                lines.push(row("Id", i.id.clone()));
                lines.push(row("Category", i.category.as_str().into()));
                lines.push(Line::from(Span::styled(
                    "Composition, mass %",
                    theme.title(),
                )));
                let mut parts = vec![
                    ("water", i.water_pct),
                    ("fat", i.fat_pct),
                    ("protein", i.protein_pct),
                    ("other solids", i.other_solids_pct),
                ];
                parts.extend(i.solutes_pct.iter().map(|(s, p)| (s.as_str(), *p)));
                for (label, pct) in parts.into_iter().filter(|(_, p)| *p > 0.0) {
                    lines.push(row(&format!("  {label}"), format!("{pct:>7.2}")));
                }
                lines.push(row("  total", format!("{:>7.2}", i.total_pct())));
                lines.push(row(
                    "Density",
                    format!("{} g/mL", trim_number(i.density_g_ml)),
                ));
                let allergens = if i.allergens.is_empty() {
                    "none listed".to_string()
                } else {
                    i.allergens.join(", ")
                };
                lines.push(row("Allergens", allergens));
                lines.push(Line::from(Span::styled("Source", theme.title())));
                lines.push(Line::from(i.source.clone()));
            }
        }
        (CatalogList::Solutes, Some(id)) => {
            if let Some(e) = state.catalog.solute(&id) {
                let s = &e.solute;
                title = format!(" {} ", s.name);
                lines.push(row("Id", s.id.clone()));
                lines.push(row("Kind", format!("{:?}", s.kind).to_lowercase()));
                lines.push(row(
                    "Molar mass",
                    format!("{} g/mol", trim_number(s.molar_mass_g_mol)),
                ));
                lines.push(row("Dissociation factor", trim_number(s.dissociation)));
                let model = match &s.model {
                    WaterModel::Ideal { norrish_k } if *norrish_k > 0.0 => {
                        format!("ideal, Norrish K {}", trim_number(*norrish_k))
                    }
                    WaterModel::Ideal { .. } => "ideal".into(),
                    WaterModel::NorrishSeries { norrish_k, .. } => {
                        format!("fitted series, then Norrish K {}", trim_number(*norrish_k))
                    }
                    WaterModel::Tabulated { .. } => "tabulated measurements".into(),
                    _ => "electrolyte (Pitzer)".into(),
                };
                lines.push(row("Water model", model));
                lines.push(row(
                    "Sweetness",
                    s.sweetness
                        .map_or("not sweet / unknown".into(), trim_number),
                ));
                lines.push(row(
                    "Solubility at 0 °C",
                    s.solubility_g_per_100g_water_0c
                        .map_or("unknown".into(), |x| {
                            format!("{} g/100 g water", trim_number(x))
                        }),
                ));
                lines.push(Line::from(Span::styled("Source", theme.title())));
                lines.push(Line::from(s.source.clone()));
            }
        }
        (_, None) => lines.push(Line::from("Nothing matches the search; Esc clears it.")),
    }
    frame.render_widget(
        Paragraph::new(lines)
            .wrap(Wrap { trim: false })
            .block(Block::bordered().title(Span::styled(title, theme.title()))),
        area,
    );
}

//! The settings screen: each setting with its value, the one under the cursor
//! in reverse video.

use ratatui::Frame;
use ratatui::layout::{Constraint, Rect};
use ratatui::text::Span;
use ratatui::widgets::{Block, Row, Table, TableState};

use super::super::state::{SettingField, State};
use super::theme::{CURSOR_MARK, Theme};

/// Draws the settings screen.
pub fn render(state: &State, theme: Theme, frame: &mut Frame, area: Rect) {
    let t = state.settings.temp_unit.symbol();
    let rows: Vec<Row> = SettingField::ALL
        .iter()
        .enumerate()
        .map(|(k, field)| {
            let mark = if k == state.settings_cursor {
                CURSOR_MARK
            } else {
                "  "
            };
            let mut value = state.settings.field_text(*field);
            match field {
                SettingField::ServingTarget | SettingField::DrawShare => value.push_str(" %"),
                SettingField::CabinetTemp | SettingField::FreezerTemp => {
                    value.push(' ');
                    value.push_str(t);
                }
                SettingField::FreezingPointPrecision
                    if state.settings.freezing_point_precision_k.is_none() =>
                {
                    value = format!("{} (usual: a cryoscope)", usual_freezing_point_precision());
                }
                SettingField::Operator | SettingField::SiteCode | SettingField::SyncUrl
                    if value.is_empty() =>
                {
                    value = "(not set)".into()
                }
                _ => {}
            }
            Row::new(vec![format!("{mark}{}", field.label()), value])
        })
        .collect();
    let table = Table::new(rows, [Constraint::Length(42), Constraint::Min(10)])
        .row_highlight_style(theme.selected())
        .block(
            Block::bordered()
                .title(Span::styled(" Settings ", theme.title()))
                .title_bottom(" stored in the database; Enter changes the one under the cursor "),
        );
    let mut ts = TableState::default();
    ts.select(Some(state.settings_cursor));
    frame.render_stateful_widget(table, area, &mut ts);
}

/// The usual precision of a freezing-point reading, as text (K).
fn usual_freezing_point_precision() -> String {
    crate::measure::kind_defaults("freezing-point-c").map_or_else(String::new, |d| {
        crate::model::units::trim_number(d.precision)
    })
}

//! The settings screen's half of `update`: units toggle in place, numbers and
//! the operator's name are typed into a prompt. Every change is stored.

use super::super::action::{Command, Effect};
use super::super::state::{PromptPurpose, SettingField, State};
use super::common::move_cursor;
use super::common::prompt_on;
use crate::batch::shared::check_site_code;
use crate::model::units::{parse_freezing_temp, parse_number, parse_share};
use crate::model::{MassUnit, TempUnit};
use crate::sync::Target;
use crate::sync::target::has_password;

/// Handles a command on the settings screen.
pub fn command(state: &mut State, command: Command) -> Vec<Effect> {
    let len = SettingField::ALL.len();
    match command {
        c if c.moves_cursor() => {
            state.settings_cursor = move_cursor(state.settings_cursor, len, command);
            Vec::new()
        }
        Command::Toggle => {
            let field = SettingField::ALL[state.settings_cursor.min(len - 1)];
            toggle(state, field)
        }
        _ => Vec::new(),
    }
}

fn toggle(state: &mut State, field: SettingField) -> Vec<Effect> {
    let s = &mut state.settings;
    match field {
        SettingField::TempUnit => {
            s.temp_unit = match s.temp_unit {
                TempUnit::Celsius => TempUnit::Fahrenheit,
                TempUnit::Fahrenheit => TempUnit::Celsius,
            };
            stored(state)
        }
        SettingField::MassUnit => {
            s.mass_unit = match s.mass_unit {
                MassUnit::Grams => MassUnit::Imperial,
                MassUnit::Imperial => MassUnit::Grams,
            };
            stored(state)
        }
        _ => {
            let text = state.settings.field_text(field);
            let title = match field {
                SettingField::FreezingPointPrecision => "Freezing points read to, in K: a cryoscope 0.005, a probe thermometer about 0.3 (`usual`: the usual)".into(),
                _ => field.label().into(),
            };
            prompt_on(state, PromptPurpose::Setting(field), title, text);
            Vec::new()
        }
    }
}

fn stored(state: &mut State) -> Vec<Effect> {
    state.reanalyse();
    vec![Effect::SaveSettings(state.settings.clone())]
}

/// When a typed setting is more than ten times the old one, the question to put
/// first. (Only the serving share: a temperature is bounded by where mixes
/// freeze, and a tenfold step between -1.3 and -13 °C is an ordinary one.)
pub fn large_change(state: &State, field: SettingField, text: &str) -> Option<String> {
    match field {
        SettingField::ServingTarget => {
            let new = parse_share(text).ok()?;
            super::recipe::share_question(state.settings.serving_frozen_fraction, new)
        }
        _ => None,
    }
}

/// Accepts a typed setting; `Err` keeps the prompt open with the reason.
pub fn accept(state: &mut State, field: SettingField, text: &str) -> Result<Vec<Effect>, String> {
    let unit = state.settings.temp_unit;
    match field {
        SettingField::ServingTarget => state.settings.serving_frozen_fraction = parse_share(text)?,
        SettingField::CabinetTemp => {
            state.settings.cabinet_temp_c = parse_freezing_temp(text, unit)?
        }
        SettingField::FreezerTemp => {
            state.settings.freezer_temp_c = parse_freezing_temp(text, unit)?
        }
        SettingField::DrawShare => state.settings.draw_frozen_fraction = parse_share(text)?,
        SettingField::FreezingPointPrecision => {
            let t = text.trim().trim_end_matches('K').trim();
            state.settings.freezing_point_precision_k = if t.is_empty()
                || t.eq_ignore_ascii_case("usual")
            {
                None
            } else {
                let p = parse_number(t)?;
                if !(p > 0.0 && p <= 10.0) {
                    return Err("a precision above 0 K and at most 10 K, like 0.3 for a probe thermometer, or `usual`".into());
                }
                Some(p)
            };
        }
        SettingField::Operator => {
            let name = text.trim();
            if name.chars().count() > 60 {
                return Err("keep the operator's name under 60 characters".into());
            }
            state.settings.operator = name.to_string();
        }
        SettingField::SiteCode => {
            let code = check_site_code(text).map_err(|e| e.0)?;
            return Ok(vec![Effect::RenameSite(code)]);
        }
        SettingField::SyncUrl => {
            let url = text.trim();
            if has_password(url) {
                return Err(
                    "keep the password out of the log: put it in ~/.pgpass or PGPASSWORD".into(),
                );
            }
            if !url.is_empty() {
                Target::parse(url).map_err(|e| e.to_string())?;
            }
            state.settings.sync_url = url.to_string();
        }
        SettingField::TempUnit | SettingField::MassUnit => {}
    }
    Ok(stored(state))
}

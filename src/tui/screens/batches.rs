//! The batch log's half of `update`: paging through the history newest first
//! (keyset pages, fetched as the cursor nears the end of what is loaded),
//! filters, one batch's detail, and the forms that record a batch, a
//! measurement, a note, a finalisation or an amendment.

use super::super::action::{Command, Effect};
use super::super::state::{
    BatchPage, Field, Form, FormPurpose, NewBatch, Overlay, PromptPurpose, Question, RecipeSource,
    Screen, State,
};
use super::super::units::{self, parse_mass};
use super::move_cursor;
use super::recipe::{display_name, prompt};

/// Rows from the end of what is loaded at which the next page is fetched.
pub const PREFETCH_ROWS: usize = 60;

/// What can be measured on a batch: (kind as stored, label, whether it is a temperature).
pub const MEASUREMENT_KINDS: &[(&str, &str, bool)] = &[
    ("brix", "Brix, °Bx", false),
    ("ph", "pH", false),
    ("overrun-pct", "overrun, %", false),
    ("draw-temp-c", "draw temperature", true),
    ("freezing-point-c", "freezing point", true),
    ("acidity-pct", "titratable acidity, %", false),
];

/// Handles a command on the batch log (list or detail).
pub fn command(state: &mut State, command: Command) -> Vec<Effect> {
    if let Some(detail) = &state.batches.detail {
        let id = detail.row.id;
        let finalized = detail.row.finalized;
        match command {
            Command::Cancel => state.batches.detail = None,
            Command::AddMeasurement => open_measurement_form(state, id),
            Command::AddNote => prompt(
                state,
                PromptPurpose::BatchNote(id),
                "Note for this batch".into(),
                String::new(),
            ),
            Command::Finalize if finalized => state.tell("This batch is already finalised."),
            Command::Finalize => state.overlay = Some(Overlay::Confirm(Question::Finalize(id))),
            Command::Amend if !finalized => {
                state.tell("Only a finalised batch is amended; add a note instead (n).")
            }
            Command::Amend => prompt(
                state,
                PromptPurpose::BatchAmend(id),
                "Amendment: what is corrected and why".into(),
                String::new(),
            ),
            _ => {}
        }
        return Vec::new();
    }
    let len = state.batches.rows.len();
    match command {
        Command::Up
        | Command::Down
        | Command::PageUp
        | Command::PageDown
        | Command::First
        | Command::Last => {
            state.batches.cursor = move_cursor(state.batches.cursor, len, command);
            return prefetch(state);
        }
        Command::OpenDetail => {
            if let Some(row) = state.batches.rows.get(state.batches.cursor) {
                return vec![Effect::LoadBatchDetail(row.id)];
            }
        }
        Command::Search => {
            let text = state.batches.query.text.clone();
            prompt(
                state,
                PromptPurpose::BatchSearch,
                "Search batches (code, recipe, operator, lot, note)".into(),
                text,
            );
        }
        Command::ClearFilter => {
            state.batches.query.text.clear();
            state.batches.query.since = None;
            state.batches.query.recipe_id = None;
            return reload(state);
        }
        Command::FilterRecipe => {
            if state.batches.query.recipe_id.is_some() {
                state.batches.query.recipe_id = None;
                return reload(state);
            }
            match state.recipe.source {
                RecipeSource::Database { recipe_id, .. } => {
                    state.batches.query.recipe_id = Some(recipe_id);
                    return reload(state);
                }
                _ => state
                    .tell("The recipe in the editor is not in the database yet: save it first."),
            }
        }
        Command::FilterDate => {
            let text = state.batches.query.since.clone().unwrap_or_default();
            prompt(
                state,
                PromptPurpose::BatchSince,
                "Show batches made on or after (YYYY-MM-DD, empty: all)".into(),
                text,
            );
        }
        Command::StartBatch => open_batch_form(state),
        _ => {}
    }
    Vec::new()
}

/// Starts the log again from the newest batch for the current filters.
pub fn reload(state: &mut State) -> Vec<Effect> {
    state.batches.rows.clear();
    state.batches.cursor = 0;
    state.batches.more = false;
    state.batches.loading = true;
    let mut query = state.batches.query.clone();
    query.before = None;
    vec![Effect::LoadBatches(query)]
}

fn prefetch(state: &mut State) -> Vec<Effect> {
    let b = &mut state.batches;
    if !b.more || b.loading || b.cursor + PREFETCH_ROWS < b.rows.len() {
        return Vec::new();
    }
    let Some(last) = b.rows.last() else {
        return Vec::new();
    };
    let mut query = b.query.clone();
    query.before = Some((last.made_at.clone(), last.id));
    b.loading = true;
    vec![Effect::LoadBatches(query)]
}

/// Takes in a page of the log; pages for an older query are dropped.
pub fn page_arrived(state: &mut State, page: BatchPage) {
    let b = &mut state.batches;
    let mut asked = page.query.clone();
    asked.before = None;
    if asked != b.query {
        return;
    }
    b.loading = false;
    if page.query.before.is_none() {
        b.rows = page.rows;
        b.cursor = 0;
    } else {
        b.rows.extend(page.rows);
    }
    b.more = page.more;
}

/// Opens the form that records a batch of the recipe in the editor.
pub fn open_batch_form(state: &mut State) {
    let Ok(analysis) = &state.recipe.analysis else {
        state.warn("The recipe in the editor has nothing to make yet.");
        return;
    };
    let unit = state.settings.mass_unit;
    let size = match unit {
        super::super::state::MassUnit::Grams => units::trim_number(analysis.mass_g.round()),
        super::super::state::MassUnit::Imperial => {
            format!(
                "{} oz",
                units::trim_number(analysis.mass_g / units::G_PER_OZ)
            )
        }
    };
    let mut fields = vec![
        Field::new("Batch size", size),
        Field::new("Operator", state.settings.operator.clone()),
    ];
    for line in &state.recipe.recipe.lines {
        fields.push(Field::new(
            format!("Lot of {}", display_name(state, &line.ingredient)),
            String::new(),
        ));
    }
    let mut form = Form {
        purpose: FormPurpose::Batch,
        title: format!("New batch of {}", state.recipe.recipe.name),
        fields,
        focus: 0,
        summary: None,
    };
    check_form(state, &mut form);
    state.screen = Screen::Batches;
    state.overlay = Some(Overlay::Form(form));
}

fn open_measurement_form(state: &mut State, batch_id: i64) {
    let kinds: Vec<&str> = MEASUREMENT_KINDS.iter().map(|k| k.0).collect();
    let mut form = Form {
        purpose: FormPurpose::Measurement(batch_id),
        title: "Add a measurement".into(),
        fields: vec![
            Field::new(format!("What ({})", kinds.join(", ")), "brix"),
            Field::new("Value", String::new()),
        ],
        focus: 1,
        summary: None,
    };
    check_form(state, &mut form);
    state.overlay = Some(Overlay::Form(form));
}

fn value(form: &Form, at: usize) -> &str {
    form.fields.get(at).map_or("", |f| f.input.value().trim())
}

fn measurement(state: &State, form: &Form) -> Result<(String, f64), String> {
    let kind = value(form, 0);
    let Some(&(kind, _, is_temp)) = MEASUREMENT_KINDS.iter().find(|k| k.0 == kind) else {
        let kinds: Vec<&str> = MEASUREMENT_KINDS.iter().map(|k| k.0).collect();
        return Err(format!("one of: {}", kinds.join(", ")));
    };
    let text = value(form, 1);
    let v = if is_temp {
        let unit = state.settings.temp_unit;
        let t = text
            .trim_end_matches(['c', 'C', 'f', 'F'])
            .trim_end_matches('°');
        let x: f64 = t
            .replace(',', ".")
            .parse()
            .map_err(|_| format!("`{text}` is not a number"))?;
        let c = units::temp_to_c(x, unit);
        if !(-60.0..=100.0).contains(&c) {
            return Err("give a temperature between -60 and 100 °C".into());
        }
        c
    } else {
        let x = text
            .replace(',', ".")
            .parse::<f64>()
            .ok()
            .filter(|x| x.is_finite());
        let x = x.ok_or_else(|| format!("`{text}` is not a number"))?;
        if x < 0.0 {
            return Err("must be zero or more".into());
        }
        x
    };
    Ok((kind.to_string(), v))
}

/// Checks a batch or measurement form field by field.
pub fn check_form(state: &State, form: &mut Form) {
    match form.purpose {
        FormPurpose::Batch => {
            let size = parse_mass(value(form, 0), state.settings.mass_unit).err();
            let operator = value(form, 1)
                .is_empty()
                .then(|| "who makes the batch (initials will do)".to_string());
            if let Some(f) = form.fields.get_mut(0) {
                f.problem = size;
            }
            if let Some(f) = form.fields.get_mut(1) {
                f.problem = operator;
            }
        }
        FormPurpose::Measurement(_) => {
            let kind_ok = MEASUREMENT_KINDS.iter().any(|k| k.0 == value(form, 0));
            let problem = measurement(state, form).err();
            if let Some(f) = form.fields.get_mut(0) {
                f.problem = (!kind_ok).then(|| problem.clone().unwrap_or_default());
            }
            if let Some(f) = form.fields.get_mut(1) {
                f.problem = if kind_ok { problem } else { None };
            }
        }
        _ => {}
    }
}

/// Turns a submitted batch or measurement form into its effect.
pub fn submit(state: &mut State, form: &Form) -> Result<Vec<Effect>, String> {
    if let Some(f) = form.fields.iter().find(|f| f.problem.is_some()) {
        return Err(format!(
            "{}: {}",
            f.label,
            f.problem.clone().unwrap_or_default()
        ));
    }
    match form.purpose {
        FormPurpose::Batch => {
            let size_g = parse_mass(value(form, 0), state.settings.mass_unit)?;
            let current_g = state
                .recipe
                .analysis
                .as_ref()
                .map(|a| a.mass_g)
                .map_err(|e| e.clone())?;
            let recipe_id = match state.recipe.source {
                RecipeSource::Database { recipe_id, .. } => Some(recipe_id),
                _ => None,
            };
            let lots = (2..form.fields.len())
                .map(|at| value(form, at).to_string())
                .collect();
            Ok(vec![Effect::StartBatch(NewBatch {
                recipe: state.recipe.recipe.scaled(size_g / current_g),
                recipe_id,
                size_g,
                operator: value(form, 1).to_string(),
                lots,
            })])
        }
        FormPurpose::Measurement(batch_id) => {
            let (kind, value) = measurement(state, form)?;
            Ok(vec![Effect::AddMeasurement {
                batch_id,
                kind,
                value,
            }])
        }
        _ => Ok(Vec::new()),
    }
}

/// Accepts a batch prompt; `Err` keeps the prompt open with the reason.
pub fn accept(
    state: &mut State,
    purpose: &PromptPurpose,
    text: &str,
) -> Result<Vec<Effect>, String> {
    let text = text.trim();
    match purpose {
        PromptPurpose::BatchSearch => {
            state.batches.query.text = text.to_string();
            Ok(reload(state))
        }
        PromptPurpose::BatchSince => {
            if text.is_empty() {
                state.batches.query.since = None;
            } else {
                chrono::NaiveDate::parse_from_str(text, "%Y-%m-%d")
                    .map_err(|_| format!("`{text}` is not a date like 2026-03-31"))?;
                state.batches.query.since = Some(text.to_string());
            }
            Ok(reload(state))
        }
        PromptPurpose::BatchNote(id) | PromptPurpose::BatchAmend(id) => {
            if text.is_empty() {
                return Err("type the text, or Esc to back out".into());
            }
            Ok(vec![if matches!(purpose, PromptPurpose::BatchNote(_)) {
                Effect::AddNote {
                    batch_id: *id,
                    text: text.to_string(),
                }
            } else {
                Effect::Amend {
                    batch_id: *id,
                    text: text.to_string(),
                }
            }])
        }
        _ => Ok(Vec::new()),
    }
}

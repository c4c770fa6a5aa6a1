//! The batch log's half of `update`: paging through the history newest first
//! (keyset pages, fetched as the cursor nears the end of what is loaded),
//! filters, one batch's detail, and the forms that record a batch, a
//! measurement, a note, a finalisation or an amendment.

use crate::store::{Edit, MeasurementKind};

use super::super::action::{Command, Effect};
use super::super::state::{
    BatchPage, BatchRequest, Field, Form, FormPurpose, Overlay, PromptPurpose, Question,
    RecipeSource, Screen, State,
};
use super::super::units::{self, parse_mass};
use super::move_cursor;
use super::recipe::{display_name, prompt};

/// Rows from the end of what is loaded at which the next page is fetched.
pub const PREFETCH_ROWS: usize = 60;

/// Handles a command on the batch log (list or detail).
pub fn command(state: &mut State, command: Command) -> Vec<Effect> {
    if let Some(detail) = &state.batches.detail {
        let code = detail.row.code.clone();
        let finalized = detail.row.finalized;
        match command {
            Command::Cancel => state.batches.detail = None,
            Command::AddMeasurement => open_measurement_form(state, code),
            Command::AddNote => prompt(
                state,
                PromptPurpose::BatchNote(code),
                "Note for this batch (deviation, correction, tasting)".into(),
                String::new(),
            ),
            Command::Finalize if finalized => state.tell("This batch is already final."),
            Command::Finalize => {
                state.overlay = Some(Overlay::Confirm(Question::Finalize(code)));
            }
            Command::Amend if !finalized => {
                state.tell("A draft is not amended: add a note (n), or finalise it first (F).")
            }
            Command::Amend => open_amend_form(state, code),
            _ => {}
        }
        return Vec::new();
    }
    let len = state.batches.rows.len();
    match command {
        c if c.moves_cursor() => {
            state.batches.cursor = move_cursor(state.batches.cursor, len, command);
            return prefetch(state);
        }
        Command::OpenDetail => {
            if let Some(row) = state.batches.rows.get(state.batches.cursor) {
                return vec![Effect::LoadBatchDetail(row.code.clone())];
            }
        }
        Command::Search => {
            let text = state.batches.query.text.clone();
            prompt(
                state,
                PromptPurpose::BatchSearch,
                "Search batches: words in notes, lots and amendment reasons".into(),
                text,
            );
        }
        Command::ClearFilter => {
            state.batches.query.text.clear();
            state.batches.query.since = None;
            state.batches.query.recipe = None;
            return reload(state);
        }
        Command::FilterRecipe => {
            if state.batches.query.recipe.is_some() {
                state.batches.query.recipe = None;
            } else {
                state.batches.query.recipe = Some(state.recipe.recipe.name.clone());
            }
            return reload(state);
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
    let Some(cursor) = b.rows.last().and_then(|last| last.cursor.clone()) else {
        return Vec::new();
    };
    let mut query = b.query.clone();
    query.before = Some(cursor);
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

/// The measurement kinds, as typed in the form.
pub fn measurement_names() -> String {
    MeasurementKind::names()
}

fn open_measurement_form(state: &mut State, code: String) {
    let mut form = Form {
        purpose: FormPurpose::Measurement(code),
        title: "Add a measurement".into(),
        fields: vec![
            Field::new("What", "brix"),
            Field::new("Value", String::new()),
        ],
        focus: 1,
        summary: Some(format!("What: one of {}", measurement_names())),
    };
    check_form(state, &mut form);
    state.overlay = Some(Overlay::Form(form));
}

const AMEND_REASON: usize = 0;
const AMEND_LINE: usize = 1;
const AMEND_LOT: usize = 2;
const AMEND_MASS: usize = 3;
const AMEND_OPERATOR: usize = 4;

fn open_amend_form(state: &mut State, code: String) {
    let mut form = Form {
        purpose: FormPurpose::Amend(code),
        title: "Amend a final batch (a new entry; the record stays)".into(),
        fields: vec![
            Field::new("Reason", String::new()),
            Field::new("Line (ingredient or number)", String::new()),
            Field::new("Correct lot", String::new()),
            Field::new("Correct weighed mass", String::new()),
            Field::new("Correct operator", String::new()),
        ],
        focus: 0,
        summary: Some("Fill in the reason and at least one correction.".into()),
    };
    check_form(state, &mut form);
    state.overlay = Some(Overlay::Form(form));
}

fn value(form: &Form, at: usize) -> &str {
    form.fields.get(at).map_or("", |f| f.input.value().trim())
}

fn is_temperature(kind: MeasurementKind) -> bool {
    kind.unit() == "°C"
}

/// The measurement a form describes; temperatures are typed in the display unit.
fn measurement(state: &State, form: &Form) -> Result<(MeasurementKind, f64), String> {
    let kind = MeasurementKind::parse(value(form, 0))
        .ok_or_else(|| format!("one of: {}", measurement_names()))?;
    let text = value(form, 1);
    let number = |t: &str| {
        t.replace(',', ".")
            .parse::<f64>()
            .ok()
            .filter(|x| x.is_finite())
            .ok_or_else(|| format!("`{text}` is not a number"))
    };
    let v = if is_temperature(kind) {
        let t = text
            .trim_end_matches(['c', 'C', 'f', 'F'])
            .trim_end_matches('°');
        units::temp_to_c(number(t)?, state.settings.temp_unit)
    } else {
        let x = number(text)?;
        if x < 0.0 {
            return Err("must be zero or more".into());
        }
        x
    };
    Ok((kind, v))
}

fn amend_edits(state: &State, form: &Form) -> Result<Vec<Edit>, String> {
    let line = value(form, AMEND_LINE);
    let mut edits = Vec::new();
    let lot = value(form, AMEND_LOT);
    let mass = value(form, AMEND_MASS);
    if (!lot.is_empty() || !mass.is_empty()) && line.is_empty() {
        return Err("name the line the lot or mass belongs to".into());
    }
    if !lot.is_empty() {
        edits.push(Edit::Lot {
            line: line.to_string(),
            lot: lot.to_string(),
        });
    }
    if !mass.is_empty() {
        edits.push(Edit::ActualG {
            line: line.to_string(),
            grams: parse_mass(mass, state.settings.mass_unit)?,
        });
    }
    let operator = value(form, AMEND_OPERATOR);
    if !operator.is_empty() {
        edits.push(Edit::Operator(operator.to_string()));
    }
    if edits.is_empty() {
        return Err("give at least one correction: a lot, a mass or the operator".into());
    }
    Ok(edits)
}

/// Checks a batch, measurement or amendment form field by field.
pub fn check_form(state: &State, form: &mut Form) {
    let mut problems: Vec<(usize, Option<String>)> = Vec::new();
    match &form.purpose {
        FormPurpose::Batch => {
            problems.push((
                0,
                parse_mass(value(form, 0), state.settings.mass_unit).err(),
            ));
            problems.push((
                1,
                value(form, 1)
                    .is_empty()
                    .then(|| "who makes the batch (initials will do)".to_string()),
            ));
        }
        FormPurpose::Measurement(_) => {
            let kind_ok = MeasurementKind::parse(value(form, 0)).is_some();
            let problem = measurement(state, form).err();
            problems.push((0, (!kind_ok).then(|| problem.clone().unwrap_or_default())));
            problems.push((1, if kind_ok { problem } else { None }));
        }
        FormPurpose::Amend(_) => {
            problems.push((
                AMEND_REASON,
                value(form, AMEND_REASON)
                    .is_empty()
                    .then(|| "say why the record is corrected".to_string()),
            ));
            let mass = value(form, AMEND_MASS);
            problems.push((
                AMEND_MASS,
                (!mass.is_empty())
                    .then(|| parse_mass(mass, state.settings.mass_unit).err())
                    .flatten(),
            ));
        }
        _ => {}
    }
    for (at, problem) in problems {
        if let Some(f) = form.fields.get_mut(at) {
            f.problem = problem;
        }
    }
}

/// Who is signing: the operator from the settings.
fn signer(state: &State) -> Result<String, String> {
    let name = state.settings.operator.trim();
    if name.is_empty() {
        Err("set the operator's name in the settings (4) first".into())
    } else {
        Ok(name.to_string())
    }
}

/// Turns a submitted batch, measurement or amendment form into its effect.
pub fn submit(state: &mut State, form: &Form) -> Result<Vec<Effect>, String> {
    if let Some(f) = form.fields.iter().find(|f| f.problem.is_some()) {
        return Err(format!(
            "{}: {}",
            f.label,
            f.problem.clone().unwrap_or_default()
        ));
    }
    match &form.purpose {
        FormPurpose::Batch => {
            let size_g = parse_mass(value(form, 0), state.settings.mass_unit)?;
            let lots = (2..form.fields.len())
                .map(|at| value(form, at).to_string())
                .collect();
            let recipe_text = match &state.recipe.source {
                _ if state.recipe.is_dirty() => None,
                RecipeSource::Database { text, .. } => Some(text.clone()),
                RecipeSource::File { original, .. } => original.clone(),
                RecipeSource::New => None,
            };
            Ok(vec![Effect::StartBatch(BatchRequest {
                recipe: state.recipe.recipe.clone(),
                recipe_text,
                size_g,
                operator: value(form, 1).to_string(),
                lots,
                note: String::new(),
            })])
        }
        FormPurpose::Measurement(code) => {
            let (kind, value) = measurement(state, form)?;
            Ok(vec![Effect::AddMeasurement {
                code: code.clone(),
                kind,
                value,
                by: signer(state)?,
            }])
        }
        FormPurpose::Amend(code) => Ok(vec![Effect::Amend {
            code: code.clone(),
            by: signer(state)?,
            reason: value(form, AMEND_REASON).to_string(),
            edits: amend_edits(state, form)?,
        }]),
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
        PromptPurpose::BatchNote(code) => {
            if text.is_empty() {
                return Err("type the note, or Esc to back out".into());
            }
            Ok(vec![Effect::AddNote {
                code: code.clone(),
                text: text.to_string(),
                by: signer(state)?,
            }])
        }
        _ => Ok(Vec::new()),
    }
}

/// The effect of finalising a batch, once confirmed.
pub fn finalize(state: &mut State, code: String) -> Vec<Effect> {
    match signer(state) {
        Ok(by) => vec![Effect::Finalize { code, by }],
        Err(reason) => {
            state.warn(reason);
            Vec::new()
        }
    }
}

//! The batch log's forms: a new batch, a measurement, an amendment; opening
//! them, checking them field by field, and what submitting one asks for.

use super::super::action::Effect;
use super::super::state::{
    BatchRequest, Field, Form, FormPurpose, Overlay, PickItem, Picker, PickerPurpose, RecipeSource,
    Screen, State,
};
use crate::analysis::Analysis;
use crate::batch::plan::parse_size;
use crate::batch::{Edit, LineRef, MeasurementKind};
use crate::model::MassUnit;
use crate::model::units::{
    G_PER_OZ, format_volume, parse_mass, parse_number, parse_temp, trim_number,
};

/// Opens the form that records a batch of the recipe in the editor, over the
/// batch log (read again when it was not the screen shown: the list and where
/// the log stands with the hub behind the form are then current).
pub fn open_batch_form(state: &mut State) -> Vec<Effect> {
    let Ok(analysis) = &state.recipe.analysis else {
        state.warn("The recipe in the editor has nothing to make yet.");
        return Vec::new();
    };
    let size = size_text(analysis, state.settings.mass_unit);
    let mut fields = vec![
        Field::new("Batch size", size),
        Field::new("Operator", state.settings.operator.clone()),
    ];
    for line in &state.recipe.recipe.lines {
        fields.push(Field::new(
            format!("Lot of {}", state.display_name(&line.ingredient)),
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
    let arriving = state.screen != Screen::Batches;
    state.screen = Screen::Batches;
    state.overlay = Some(Overlay::Form(form));
    if arriving {
        super::batches::refresh(state)
    } else {
        Vec::new()
    }
}

/// A recipe's size as offered for editing: a drink by its volume at 20 °C (as a
/// distiller batches it), a dessert by its mass in the settings' unit.
pub fn size_text(analysis: &Analysis, unit: MassUnit) -> String {
    if analysis.style.is_drink() {
        format_volume(analysis.volume_ml)
    } else {
        match unit {
            MassUnit::Grams => trim_number(analysis.mass_g.round()),
            MassUnit::Imperial => format!("{} oz", trim_number(analysis.mass_g / G_PER_OZ)),
        }
    }
}

/// The measurement kinds, as typed in the form.
pub fn measurement_names() -> String {
    MeasurementKind::names()
}

/// The label of the reason field a signed-off batch's forms add.
const REASON: &str = "Reason (after sign-off)";

/// Opens the form that adds a reading; on a signed-off batch it asks for the
/// reason too, as the reading goes on the record's trail.
/// Opens the list of what can be measured, to pick from (search as you type);
/// picking one opens [`open_measurement_form`].
pub fn open_measurement_picker(state: &mut State, code: String, signed_off: bool) {
    let mut picker = Picker {
        purpose: PickerPurpose::MeasurementKind { code, signed_off },
        title: "What was measured?".into(),
        query: tui_input::Input::default(),
        items: Vec::new(),
        cursor: 0,
    };
    super::recipe::refresh_picker(state, &mut picker);
    state.overlay = Some(Overlay::Picker(picker));
}

/// The measurement kinds as the picker lists them: the name typed in files and on
/// the command line, what it is, and its unit.
pub fn measurement_items() -> Vec<PickItem> {
    MeasurementKind::ALL
        .into_iter()
        .map(|k| PickItem {
            key: k.as_str().to_string(),
            label: k.as_str().to_string(),
            detail: k.unit().to_string(),
        })
        .collect()
}

/// Opens the form for a reading of `kind` (a measurement kind's name).
pub fn open_measurement_form(state: &mut State, code: String, signed_off: bool, kind: &str) {
    let mut fields = vec![Field::new("What", kind), Field::new("Value", String::new())];
    if signed_off {
        fields.push(Field::new(REASON, String::new()));
    }
    let mut form = Form {
        purpose: FormPurpose::Measurement(code),
        title: if signed_off {
            "Add a measurement (on the amendment trail)".into()
        } else {
            "Add a measurement".into()
        },
        fields,
        focus: 1,
        summary: Some(format!("What: one of {}", measurement_names())),
    };
    check_form(state, &mut form);
    state.overlay = Some(Overlay::Form(form));
}

/// Opens the form that adds a note to a signed-off batch: the note and the reason
/// (it goes on the record's trail). A draft's note is a one-line prompt.
pub fn open_trail_note_form(state: &mut State, code: String) {
    let mut form = Form {
        purpose: FormPurpose::TrailNote(code),
        title: "Add a note (on the amendment trail)".into(),
        fields: vec![
            Field::new("Note", String::new()),
            Field::new(REASON, String::new()),
        ],
        focus: 0,
        summary: Some(
            "A signed-off record keeps what it showed: say why the note comes now.".into(),
        ),
    };
    check_form(state, &mut form);
    state.overlay = Some(Overlay::Form(form));
}

/// The reason field's text, when the form has one (a signed-off batch's form).
fn reason(form: &Form) -> Option<String> {
    form.fields
        .iter()
        .find(|f| f.label == REASON)
        .map(|f| f.input.value().trim().to_string())
}

const AMEND_REASON: usize = 0;
const AMEND_LINE: usize = 1;
const AMEND_LOT: usize = 2;
const AMEND_MASS: usize = 3;
const AMEND_OPERATOR: usize = 4;

pub fn open_amend_form(state: &mut State, code: String) {
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
    let v = if is_temperature(kind) {
        parse_temp(text, state.settings.temp_unit)?
    } else if kind == MeasurementKind::FreezingPointH {
        // A cryoscope reading: below zero, kept as read and recorded in °C too.
        let x = parse_number(text)?;
        if !(x < 0.0) {
            return Err("a freezing point in °H is below zero, like -0.540".into());
        }
        x
    } else {
        let x = parse_number(text)?;
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
            line: LineRef::parse(line),
            lot: lot.to_string(),
        });
    }
    if !mass.is_empty() {
        edits.push(Edit::ActualG {
            line: LineRef::parse(line),
            grams: parse_mass(mass, Some(state.settings.mass_unit))?,
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
                parse_size(value(form, 0), Some(state.settings.mass_unit))
                    .err()
                    .map(|e| e.0),
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
            if reason(form).is_some() {
                problems.push((2, reason_problem(form)));
            }
        }
        FormPurpose::TrailNote(_) => {
            problems.push((
                0,
                value(form, 0)
                    .is_empty()
                    .then(|| "type the note".to_string()),
            ));
            problems.push((1, reason_problem(form)));
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
                    .then(|| parse_mass(mass, Some(state.settings.mass_unit)).err())
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

fn reason_problem(form: &Form) -> Option<String> {
    reason(form)
        .filter(|r| r.is_empty())
        .map(|_| "say why it comes after sign-off".to_string())
}

/// Who is signing: the operator from the settings.
pub fn signer(state: &State) -> Result<String, String> {
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
            let size =
                parse_size(value(form, 0), Some(state.settings.mass_unit)).map_err(|e| e.0)?;
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
                size,
                options: state.analysis_options(),
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
                reason: reason(form),
            }])
        }
        FormPurpose::TrailNote(code) => Ok(vec![Effect::AddNote {
            code: code.clone(),
            text: value(form, 0).to_string(),
            by: signer(state)?,
            reason: reason(form),
        }]),
        FormPurpose::Amend(code) => Ok(vec![Effect::Amend {
            code: code.clone(),
            by: signer(state)?,
            reason: value(form, AMEND_REASON).to_string(),
            edits: amend_edits(state, form)?,
        }]),
        _ => Ok(Vec::new()),
    }
}

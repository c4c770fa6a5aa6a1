//! The form that characterises an ingredient of the user's own from measured
//! freezing points (the cryoscopic method of [`crate::measure::characterise`]):
//! each field checked as it is typed, the result (or why there is none) shown
//! under the fields as soon as everything reads, and on submit the sample and
//! its dissolved solids saved into the own library, like `gelu characterise`.

use super::super::action::Effect;
use super::super::state::{CatalogList, Field, Form, FormPurpose, Overlay, State};
use super::common::field_value;
use super::own_items::finish;
use crate::catalog::validate_id;
use crate::measure::{Characterisation, DilutionPoint, DryMatter, SampleSpec, characterise};
use crate::model::units::parse_number;

const ID: usize = 0;
const NAME: usize = 1;
const POINTS: usize = 2;
const DRY_MATTER: usize = 3;
const DISSOCIATION: usize = 4;

/// Opens the form, empty but for a pure solid (100 % dry matter) with i = 1.
pub fn open_characterise_form(state: &mut State) {
    let unit = state.settings.temp_unit.symbol();
    let mut form = Form {
        purpose: FormPurpose::Characterise,
        title: "Characterise an ingredient from measured freezing points".into(),
        fields: vec![
            Field::new("Id (kebab-case)", ""),
            Field::new("Name", ""),
            Field::new(format!("Points sample:water:{unit}"), ""),
            Field::new("Dry matter % (or 65 Bx)", "100"),
            Field::new("Dissociation factor i", "1"),
        ],
        focus: 0,
        summary: None,
    };
    check_form(state, &mut form);
    state.overlay = Some(Overlay::Form(form));
}

/// The points typed, separated by spaces or semicolons; temperatures in the display unit.
fn points(state: &State, text: &str) -> Result<Vec<DilutionPoint>, String> {
    let list: Vec<&str> = text
        .split([' ', ';'])
        .map(str::trim)
        .filter(|p| !p.is_empty())
        .collect();
    if list.is_empty() {
        return Err("give at least one point, like 10:90:-1.17 (10 g of sample in 90 g of water froze at -1.17)".into());
    }
    list.iter()
        .map(|p| DilutionPoint::parse(p, state.settings.temp_unit))
        .collect()
}

/// "100" or "100 %" is dry matter; "65 Bx" (or °Bx, brix) is a refractometer reading.
fn dry_matter(text: &str) -> Result<DryMatter, String> {
    let lower = text.trim().to_lowercase();
    for suffix in ["°brix", "brix", "°bx", "bx"] {
        if let Some(number) = lower.strip_suffix(suffix) {
            return parse_number(number).map(DryMatter::Brix);
        }
    }
    parse_number(lower.trim_end_matches('%')).map(DryMatter::SolidsPct)
}

fn positive(text: &str) -> Result<f64, String> {
    match parse_number(text)? {
        x if x > 0.0 => Ok(x),
        _ => Err("must be above zero (1 for sugars, 2 for table salt)".into()),
    }
}

fn field_problem(state: &State, form: &Form, at: usize) -> Result<(), String> {
    let text = field_value(form, at);
    match at {
        ID => {
            validate_id(text).map_err(|e| e.to_string())?;
            if state.catalog.ingredient(text).is_some() {
                return Err(format!("`{text}` is already used; choose another id"));
            }
            Ok(())
        }
        NAME if text.is_empty() => Err("must not be empty".into()),
        POINTS => points(state, text).map(|_| ()),
        DRY_MATTER => dry_matter(text).map(|_| ()),
        DISSOCIATION => positive(text).map(|_| ()),
        _ => Ok(()),
    }
}

/// What the form describes, characterised; `Err` says why not.
fn result(state: &State, form: &Form) -> Result<Characterisation, String> {
    if let Some(f) = form.fields.iter().find(|f| f.problem.is_some()) {
        return Err(format!(
            "{}: {}",
            f.label,
            f.problem.clone().unwrap_or_default()
        ));
    }
    let spec = SampleSpec {
        dry_matter: dry_matter(field_value(form, DRY_MATTER))?,
        dissociation: positive(field_value(form, DISSOCIATION))?,
        ..SampleSpec::new(field_value(form, ID), field_value(form, NAME))
    };
    characterise(
        &spec,
        &points(state, field_value(form, POINTS))?,
        &state.catalog,
    )
    .map_err(|e| e.to_string())
}

/// Checks every field, and shows the result or why there is none.
pub fn check_form(state: &State, form: &mut Form) {
    for at in 0..form.fields.len() {
        let problem = field_problem(state, form, at).err();
        if let Some(field) = form.fields.get_mut(at) {
            field.problem = problem;
        }
    }
    let all_typed = !field_value(form, ID).is_empty() && !field_value(form, POINTS).is_empty();
    form.summary = Some(match (all_typed, result(state, form)) {
        (false, _) => "Type the id, the name and at least one point; the result shows here.".into(),
        (true, Ok(c)) => {
            let k = match c.norrish_k {
                None => "no K (1 point)".into(),
                Some(k) if c.norrish_k_at_limit() => {
                    format!("K {k:.2} (at its limit: check the points)")
                }
                Some(k) => format!("K {k:.2}"),
            };
            format!(
                "{:.1} g/mol, {k}, sucrose eq. {:.2}, rms {:.3} K. Enter saves it.",
                c.molar_mass_g_mol, c.sucrose_equivalent, c.rms_residual_k
            )
        }
        (true, Err(why)) => why,
    });
}

/// Saves the characterised sample into the own library.
pub fn submit(state: &mut State, form: &Form) -> Result<Vec<Effect>, String> {
    let c = result(state, form)?;
    state.own.add_solute(c.solute.clone());
    state.own.add_ingredient(c.ingredient.clone());
    state.ingredients.list = CatalogList::Ingredients;
    state.tell(format!(
        "Saved your ingredient {}: its solids {:.1} g/mol from {} point(s); the readings are in its source.",
        c.name,
        c.molar_mass_g_mol,
        c.points.len()
    ));
    finish(state);
    Ok(vec![Effect::SaveOwnIngredient {
        ingredient: c.ingredient,
        solutes: vec![c.solute],
    }])
}

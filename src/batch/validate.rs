//! What a batch record must satisfy before anything of it is written, checked in
//! one place for new batches, trail entries and imports alike: a record the
//! command line could never make is refused with the reason, never stored or
//! quietly changed. (The schema checks what it can itself; these are the rules it
//! cannot express.)

use std::collections::HashMap;
use std::path::Path;

use chrono::{DateTime, Datelike, Utc};

use super::Invalid;
use super::types::{
    Amendment, Batch, BatchLine, Change, Measurement, MeasurementKind, Note, RecipeVersion, Status,
};
use super::version::content_hash;
use crate::catalog::Catalog;
use crate::model::Recipe;
use crate::model::units::MAX_AMOUNT;

type Result<T> = std::result::Result<T, Invalid>;

/// The first year a record may be dated in: earlier is a clock that was never set.
pub const FIRST_YEAR: i32 = 2000;
/// The last year a record may be dated in: later is a typing slip or a wrong clock.
pub const LAST_YEAR: i32 = 2199;
/// The longest batch code, in characters.
pub const MAX_CODE_CHARS: usize = 64;

/// A number that must be finite (not NaN or infinite); `what` names it.
pub fn check_finite(what: &str, value: f64) -> Result<()> {
    if value.is_finite() {
        Ok(())
    } else {
        Err(Invalid(format!("{what} must be a number, not {value}")))
    }
}

/// The first control character of `text` that is not allowed, as `U+XXXX`.
fn control_in(text: &str, allowed: &[char]) -> Option<String> {
    text.chars()
        .find(|c| c.is_control() && !allowed.contains(c))
        .map(|c| format!("U+{:04X}", u32::from(c)))
}

/// A name (an operator, a signer, a code, an ingredient): not blank, and no control
/// characters (escape sequences, line breaks); `what` names it.
pub fn check_name(what: &str, name: &str) -> Result<()> {
    if name.trim().is_empty() {
        return Err(Invalid(format!("{what} must not be empty")));
    }
    check_label(what, name)
}

/// A label that may be empty (a supplier lot), without control characters.
pub fn check_label(what: &str, text: &str) -> Result<()> {
    match control_in(text, &[]) {
        Some(c) => Err(Invalid(format!(
            "{what} holds the control character {c}; names and labels are plain text"
        ))),
        None => Ok(()),
    }
}

/// A text people write (a note, a reason): not blank; line breaks and tabs are
/// allowed, other control characters (escape sequences) are not.
pub fn check_text(what: &str, text: &str) -> Result<()> {
    if text.trim().is_empty() {
        return Err(Invalid(format!("{what} must not be empty")));
    }
    match control_in(text, &['\n', '\r', '\t']) {
        Some(c) => Err(Invalid(format!(
            "{what} holds the control character {c}; only line breaks and tabs are kept"
        ))),
        None => Ok(()),
    }
}

/// A batch code: plain text without spaces, at most [`MAX_CODE_CHARS`] characters.
pub fn check_code(code: &str) -> Result<()> {
    check_name("the batch code", code)?;
    if code.chars().any(char::is_whitespace) || code.chars().count() > MAX_CODE_CHARS {
        return Err(Invalid(format!(
            "the batch code `{code}` is not a code: up to {MAX_CODE_CHARS} characters without spaces, like B-20261201-0001"
        )));
    }
    Ok(())
}

/// A time a record is dated with: between [`FIRST_YEAR`] and [`LAST_YEAR`].
pub fn check_time(what: &str, t: &DateTime<Utc>) -> Result<()> {
    let year = t.year();
    if (FIRST_YEAR..=LAST_YEAR).contains(&year) {
        Ok(())
    } else {
        Err(Invalid(format!(
            "{what} is in the year {year}; records are dated {FIRST_YEAR} to {LAST_YEAR} (check the clock)"
        )))
    }
}

/// A mass (g): finite, zero or more, at most [`MAX_AMOUNT`].
pub fn check_mass(what: &str, mass_g: f64) -> Result<()> {
    check_finite(what, mass_g)?;
    if !(0.0..=MAX_AMOUNT).contains(&mass_g) {
        return Err(Invalid(format!(
            "{what} of {mass_g} g is not a mass gelu takes: give 0 to 1000 t"
        )));
    }
    Ok(())
}

/// The unit written beside a reading must be its kind's.
pub fn check_unit(kind: MeasurementKind, unit: &str) -> Result<()> {
    if unit == kind.unit() {
        Ok(())
    } else {
        Err(Invalid(format!(
            "the unit of {} is {}, not {unit}; a reading is kept in its kind's unit",
            kind.as_str(),
            kind.unit()
        )))
    }
}

/// One reading: a finite value its kind can take, a time, who took it.
pub fn check_reading(m: &Measurement) -> Result<()> {
    let kind = m.kind.as_str();
    check_finite(kind, m.value)?;
    let range = m.kind.plausible();
    if !range.contains(&m.value) {
        return Err(Invalid(format!(
            "{kind} = {} {} is not a reading: give {} to {}",
            m.value,
            m.kind.unit(),
            range.start(),
            range.end()
        )));
    }
    check_time(&format!("the {kind} reading"), &m.taken_at)?;
    check_name("the name of who measured", &m.by)
}

/// One note: its text, time and author.
pub fn check_note(n: &Note) -> Result<()> {
    check_text("a note", &n.text)?;
    check_time("a note", &n.written_at)?;
    check_name("the note's author", &n.by)
}

/// One line as planned and weighed.
fn check_line(number: usize, l: &BatchLine) -> Result<()> {
    check_name(&format!("the ingredient of line {number}"), &l.ingredient)?;
    check_mass(&format!("the planned mass of line {number}"), l.planned_g)?;
    if let Some(g) = l.actual_g {
        check_mass(&format!("the weighed mass of line {number}"), g)?;
    }
    check_label(&format!("the lot of line {number}"), &l.lot)
}

/// One change of an amendment, on its own (whether it fits the record is
/// [`super::amend::apply`]'s check).
pub fn check_change(change: &Change) -> Result<()> {
    let unmarked = |struck: bool, what: &str| {
        if struck {
            Err(Invalid(format!(
                "{what} in a change cannot be marked struck"
            )))
        } else {
            Ok(())
        }
    };
    match change {
        Change::Operator { new, .. } => check_name("the operator", new),
        Change::ActualG { line, new, .. } => {
            check_mass(&format!("the weighed mass of line {line}"), *new)
        }
        Change::Lot { line, new, .. } => check_label(&format!("the lot of line {line}"), new),
        Change::AddReading(m) => {
            unmarked(m.struck, "a reading")?;
            check_reading(m)
        }
        Change::AddNote(n) => {
            unmarked(n.struck, "a note")?;
            check_note(n)
        }
        Change::StrikeReading { old, .. } => unmarked(old.struck, "a reading"),
        Change::StrikeNote { old, .. } => unmarked(old.struck, "a note"),
        Change::ReplaceReading { reading, old, new } => {
            unmarked(old.struck || new.struck, "a reading")?;
            if (old.kind, old.taken_at, &old.by) != (new.kind, new.taken_at, &new.by) {
                return Err(Invalid(format!(
                    "a correction of reading {reading} changes only its value; its kind, time and taker stay"
                )));
            }
            check_reading(new)
        }
        Change::ReplaceNote { note, old, new } => {
            unmarked(old.struck || new.struck, "a note")?;
            if (old.written_at, &old.by) != (new.written_at, &new.by) {
                return Err(Invalid(format!(
                    "a correction of note {note} changes only its text; its time and author stay"
                )));
            }
            check_note(new)
        }
    }
}

/// One amendment of a record made at `made_at`: dated after it was made, signed,
/// with a reason and at least one valid change.
pub fn check_amendment(a: &Amendment, made_at: &DateTime<Utc>) -> Result<()> {
    check_name("the name of who amends", &a.by)?;
    check_text("the reason for an amendment", &a.reason)?;
    check_time("an amendment", &a.amended_at)?;
    if a.amended_at < *made_at {
        return Err(Invalid(format!(
            "an amendment is dated {}, before the batch was made at {} (check the clock)",
            crate::model::time::time_text(&a.amended_at),
            crate::model::time::time_text(made_at)
        )));
    }
    if a.changes.is_empty() {
        return Err(Invalid("an amendment must change something".into()));
    }
    a.changes.iter().try_for_each(check_change)
}

/// A sign-off: when and by whom, after the batch was made.
pub fn check_sign_off(made_at: &DateTime<Utc>, at: &DateTime<Utc>, by: &str) -> Result<()> {
    check_name("the name of who signs off", by)?;
    check_time("the sign-off", at)?;
    if at < made_at {
        return Err(Invalid(format!(
            "the sign-off at {} is before the batch was made at {} (check the clock)",
            crate::model::time::time_text(at),
            crate::model::time::time_text(made_at)
        )));
    }
    Ok(())
}

/// A recipe version's name and number (from 1). Whether its hash is its text's is
/// [`Recipes::check`]'s question, asked once per text.
pub fn check_version(v: &RecipeVersion) -> Result<()> {
    check_name("the recipe's name", &v.recipe)?;
    if v.version == 0 {
        return Err(Invalid("a recipe version is numbered from 1".into()));
    }
    Ok(())
}

/// A recipe version's hash must be its text's.
fn check_hash(v: &RecipeVersion) -> Result<()> {
    if content_hash(&v.text) != v.content_hash {
        return Err(Invalid(format!(
            "the recipe text of `{}` version {} does not match its recorded hash {}",
            v.recipe, v.version, v.content_hash
        )));
    }
    Ok(())
}

/// The whole record as it stands: code, names, size and masses, lines, readings,
/// notes, the sign-off its status calls for (and none on a draft), and the trail.
pub fn check_record(batch: &Batch) -> Result<()> {
    check_code(&batch.code)?;
    check_version(&batch.recipe)?;
    check_time("the time the batch was made", &batch.made_at)?;
    check_name("the operator", &batch.operator)?;
    check_finite("the batch size", batch.size_g)?;
    if !(batch.size_g > 0.0 && batch.size_g <= MAX_AMOUNT) {
        return Err(Invalid(format!(
            "a batch size of {} g is not possible; give a size above zero, up to 1000 t",
            batch.size_g
        )));
    }
    if batch.lines.is_empty() {
        return Err(Invalid("a batch needs at least one line".into()));
    }
    for (i, line) in batch.lines.iter().enumerate() {
        check_line(i + 1, line)?;
    }
    batch.measurements.iter().try_for_each(check_reading)?;
    batch.notes.iter().try_for_each(check_note)?;
    match (batch.status, &batch.finalized_at, &batch.finalized_by) {
        (Status::Draft, None, None) => {}
        (Status::Draft, _, _) => {
            return Err(Invalid(
                "a draft has no sign-off: `finalized_at` and `finalized_by` must be null".into(),
            ));
        }
        (_, None, _) => {
            return Err(Invalid(format!(
                "a {} record needs `finalized_at`, when it was signed off",
                batch.status.as_str()
            )));
        }
        (_, _, None) => {
            return Err(Invalid(format!(
                "a {} record needs `finalized_by`, who signed it off",
                batch.status.as_str()
            )));
        }
        (_, Some(at), Some(by)) => check_sign_off(&batch.made_at, at, by)?,
    }
    let derived = match (batch.status, batch.amendments.is_empty()) {
        (Status::Draft, _) => Status::Draft,
        (_, true) => Status::Final,
        (_, false) => Status::Amended,
    };
    if derived != batch.status {
        return Err(Invalid(format!(
            "`status` is {} but the record reads as {} (amended means final with amendments)",
            batch.status.as_str(),
            derived.as_str()
        )));
    }
    for (i, a) in batch.amendments.iter().enumerate() {
        check_amendment(a, &batch.made_at)
            .map_err(|e| Invalid(format!("amendment {}: {}", i + 1, e.0)))?;
    }
    Ok(())
}

/// Every line's ingredient is known: to the catalog, or as the recipe text's own
/// ingredient or solute.
pub fn check_ingredients(lines: &[BatchLine], recipe: &Recipe, catalog: &Catalog) -> Result<()> {
    for (i, l) in lines.iter().enumerate() {
        let id = l.ingredient.as_str();
        let known = catalog.ingredient(id).is_some()
            || recipe.ingredients.iter().any(|o| o.id == id)
            || recipe.solutes.iter().any(|o| o.id == id);
        if !known {
            return Err(Invalid(format!(
                "line {} is of `{id}`, which is neither in the catalog nor one of the recipe's own items",
                i + 1
            )));
        }
    }
    Ok(())
}

/// The recipe a version's text holds, read against the built-in catalog.
pub fn recipe_of(v: &RecipeVersion) -> Result<Recipe> {
    let label = format!("{} (version {})", v.recipe, v.version);
    crate::recipe_file::parse_recipe(Path::new(&label), &v.text)
        .map_err(|e| Invalid(format!("its recipe text cannot be read: {e}")))
}

/// A recipe text as checked: the text, and the recipe it holds or why not.
type Checked = (String, std::result::Result<Recipe, String>);

/// Recipe texts already checked, by content hash, so that the thousands of batches
/// of one version in an import are checked against it without hashing and reading
/// it again.
#[derive(Debug, Default)]
pub struct Recipes(HashMap<String, Checked>);

impl Recipes {
    /// Checks that the record's recipe text matches its hash, reads, and knows
    /// every line's ingredient.
    pub fn check(&mut self, batch: &Batch, catalog: &Catalog) -> Result<()> {
        let v = &batch.recipe;
        let known = self
            .0
            .get(&v.content_hash)
            .is_some_and(|(text, _)| *text == v.text);
        if !known {
            check_hash(v)?;
            let recipe = recipe_of(v).map_err(|e| e.0);
            self.0
                .insert(v.content_hash.clone(), (v.text.clone(), recipe));
        }
        match self.0.get(&v.content_hash).map(|(_, recipe)| recipe) {
            Some(Ok(recipe)) => check_ingredients(&batch.lines, recipe, catalog),
            Some(Err(why)) => Err(Invalid(why.clone())),
            None => Err(Invalid("its recipe text could not be checked".into())),
        }
    }
}

/// The record as first written, once it is checked as a record the command line
/// could have made ([`check_record`], its recipe and ingredients): its current
/// values with the trail undone, which refuses a trail that contradicts them.
pub fn first_written(batch: Batch, recipes: &mut Recipes, catalog: &Catalog) -> Result<Batch> {
    check_record(&batch)?;
    recipes.check(&batch, catalog)?;
    super::amend::original_record(batch)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_labels_and_texts_refuse_what_drives_a_terminal() {
        assert!(check_name("x", "Mara Quill").is_ok());
        assert!(check_name("x", " ").is_err());
        assert!(check_name("x", "Mara\u{1b}[2J").is_err());
        assert!(check_name("x", "Mara\nQuill").is_err());
        assert!(check_label("x", "").is_ok());
        assert!(check_label("x", "S-1\u{9b}").is_err(), "C1 controls too");
        assert!(check_text("x", "two\nlines\twith a tab").is_ok());
        assert!(check_text("x", "bell\u{7}").is_err());
        assert!(check_code("B-20261201-0001").is_ok());
        assert!(check_code("B 1").is_err());
        assert!(check_code(&"B".repeat(65)).is_err());
    }

    #[test]
    fn masses_times_and_readings_must_be_possible() {
        assert!(check_mass("m", 0.0).is_ok());
        assert!(check_mass("m", -1.0).is_err());
        assert!(check_mass("m", f64::NAN).is_err());
        assert!(check_mass("m", 2.0e9).is_err());
        let t = |y: i32| chrono::TimeZone::with_ymd_and_hms(&Utc, y, 1, 1, 0, 0, 0).unwrap();
        assert!(check_time("t", &t(2026)).is_ok());
        assert!(check_time("t", &t(9999)).is_err());
        assert!(check_time("t", &t(1970)).is_err());
        let reading = |kind, value| Measurement {
            kind,
            value,
            taken_at: t(2026),
            by: "Ines".into(),
            struck: false,
        };
        assert!(check_reading(&reading(MeasurementKind::Ph, 6.4)).is_ok());
        assert!(check_reading(&reading(MeasurementKind::Ph, 15.0)).is_err());
        assert!(check_reading(&reading(MeasurementKind::DrawTempC, -300.0)).is_err());
        assert!(check_unit(MeasurementKind::DrawTempC, "°C").is_ok());
        assert!(check_unit(MeasurementKind::DrawTempC, "°F").is_err());
    }
}

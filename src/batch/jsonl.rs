//! Batches as JSON: one object per batch, the public contract of `--json`,
//! export and import. JSON Lines export then import gives back every field exactly.

use chrono::{DateTime, Utc};
use serde::Deserialize;
use serde_json::value::RawValue;
use serde_json::{Value, json};

use super::Invalid;
use super::types::{Amendment, Batch, BatchLine, Measurement, Note, RecipeVersion, Status};
use crate::model::time;

/// The batch as its public JSON object. Keys are a contract: add, never rename.
pub fn batch_json(b: &Batch) -> Value {
    let t = |t: &DateTime<Utc>| time::time_text(t);
    json!({
        "code": b.code,
        "recipe": b.recipe.recipe,
        "recipe_version": b.recipe.version,
        "recipe_hash": b.recipe.content_hash,
        "recipe_text": b.recipe.text,
        "made_at": t(&b.made_at),
        "size_g": b.size_g,
        "operator": b.operator,
        "status": b.status.as_str(),
        "finalized_at": b.finalized_at.as_ref().map(t),
        "finalized_by": b.finalized_by,
        "notes": b.notes,
        "lines": b.lines.iter().map(|l| json!({
            "ingredient": l.ingredient, "planned_g": l.planned_g,
            "actual_g": l.actual_g, "lot": l.lot,
        })).collect::<Vec<_>>(),
        "measurements": b.measurements,
        "amendments": b.amendments,
        "prediction": b.prediction,
    })
}

/// Reads one line of an import: one batch's JSON object (a byte-order mark before
/// it and a Windows line end after it are not part of it), checked as a record the
/// command line could have made ([`super::validate::first_written`]). Returns the
/// record as first written (its trail undone) and its prediction's JSON text.
pub fn read_line<'a>(
    text: &'a str,
    recipes: &mut super::validate::Recipes,
    catalog: &crate::catalog::Catalog,
) -> Result<(Batch, &'a str), Invalid> {
    let text = text.trim_start_matches('\u{feff}').trim_end();
    let (batch, prediction) = read_batch(text)?;
    let first = super::validate::first_written(batch, recipes, catalog)?;
    Ok((first, prediction))
}

/// A batch's JSON object as read: the public keys, with the prediction kept
/// as the text it was (checked to be JSON, not parsed into a tree). Unknown keys
/// are ignored, so a newer gelu's export can be read.
#[derive(Deserialize)]
struct Wire<'a> {
    code: String,
    recipe: String,
    #[serde(deserialize_with = "version_number")]
    recipe_version: u32,
    recipe_hash: String,
    recipe_text: String,
    #[serde(deserialize_with = "time::deserialize_time")]
    made_at: DateTime<Utc>,
    size_g: f64,
    operator: String,
    status: Status,
    #[serde(default, deserialize_with = "time::deserialize_optional_time")]
    finalized_at: Option<DateTime<Utc>>,
    #[serde(default)]
    finalized_by: Option<String>,
    lines: Vec<BatchLine>,
    measurements: Vec<Measurement>,
    notes: Vec<Note>,
    amendments: Vec<Amendment>,
    #[serde(borrow)]
    prediction: &'a RawValue,
}

/// A recipe version number: a whole number from 1.
fn version_number<'de, D: serde::Deserializer<'de>>(d: D) -> std::result::Result<u32, D::Error> {
    Value::deserialize(d)?
        .as_u64()
        .and_then(|n| u32::try_from(n).ok())
        .filter(|&n| n >= 1)
        .ok_or_else(|| serde::de::Error::custom("must be a whole number from 1"))
}

fn bad(what: String) -> Invalid {
    Invalid(what)
}

/// A JSON error of a one-line record, placed by column only: "at line 1" would read
/// as the file's first line next to the line number the import reports.
fn placed(e: &serde_json::Error) -> String {
    let text = e.to_string();
    let suffix = format!(" at line {} column {}", e.line(), e.column());
    match text.strip_suffix(&suffix) {
        Some(what) if e.line() == 1 => format!("{what} (column {})", e.column()),
        _ => text,
    }
}

/// Why `text` could not be read as a batch, naming the key at fault where possible.
fn explain(text: &str, plain: serde_json::Error) -> String {
    let mut de = serde_json::Deserializer::from_str(text);
    match serde_path_to_error::deserialize::<_, Wire>(&mut de) {
        Err(e) => match e.path().to_string().as_str() {
            // The whole record, or a key that could not be read.
            "." | "?" => placed(e.inner()),
            path => format!("`{path}`: {}", placed(e.inner())),
        },
        // Only trailing text after the object is left.
        Ok(_) => placed(&plain),
    }
}

/// Reads one batch from its public JSON object, checking every field's type (and
/// that a reading's unit is its kind's); a refusal names the key at fault. Whether
/// the record as a whole could have been made is [`super::validate`]'s question.
/// Returns the batch with `prediction` left null, and the prediction as the JSON
/// text it was in `text`.
pub fn read_batch(text: &str) -> Result<(Batch, &str), Invalid> {
    if !text.trim_start().starts_with('{') {
        return Err(bad("a batch record must be a JSON object".into()));
    }
    // The plain reader is the fast path; only a refused record is read again, with
    // the path to the key at fault tracked, to say where it went wrong.
    let wire: Wire = serde_json::from_str(text).map_err(|plain| bad(explain(text, plain)))?;
    let prediction = wire.prediction.get();
    if !prediction.starts_with('{') {
        return Err(bad("`prediction` must be a JSON object".into()));
    }
    let batch = Batch {
        code: wire.code,
        recipe: RecipeVersion {
            recipe: wire.recipe,
            version: wire.recipe_version,
            content_hash: wire.recipe_hash,
            text: wire.recipe_text,
        },
        made_at: wire.made_at,
        size_g: wire.size_g,
        operator: wire.operator,
        status: wire.status,
        finalized_at: wire.finalized_at,
        finalized_by: wire.finalized_by,
        lines: wire.lines,
        measurements: wire.measurements,
        notes: wire.notes,
        amendments: wire.amendments,
        prediction: Value::Null,
    };
    Ok((batch, prediction))
}

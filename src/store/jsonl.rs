//! Batches as JSON: one object per batch, the public contract of `--json`,
//! export and import (see `import` for reading them back). JSON Lines export then
//! import gives back every field exactly.

use std::io::Write;

use serde_json::{Map, Value, json};

use super::error::{Result, StoreError};
use super::types::{
    Amendment, Batch, BatchFilter, BatchLine, Change, Measurement, MeasurementKind, Note,
    RecipeVersion, Status,
};
use super::{Store, values};

/// The batch as its public JSON object. Keys are a contract: add, never rename.
pub fn batch_json(b: &Batch) -> Value {
    let t = |t: &chrono::DateTime<chrono::Utc>| values::time_text(t);
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
        "notes": b.notes.iter().map(|n| json!({
            "text": n.text, "written_at": t(&n.written_at), "by": n.by,
        })).collect::<Vec<_>>(),
        "lines": b.lines.iter().map(|l| json!({
            "ingredient": l.ingredient, "planned_g": l.planned_g,
            "actual_g": l.actual_g, "lot": l.lot,
        })).collect::<Vec<_>>(),
        "measurements": b.measurements.iter().map(|m| json!({
            "kind": m.kind.as_str(), "value": m.value, "unit": m.kind.unit(),
            "taken_at": t(&m.taken_at), "by": m.by,
        })).collect::<Vec<_>>(),
        "amendments": b.amendments.iter().map(|a| json!({
            "amended_at": t(&a.amended_at), "by": a.by, "reason": a.reason,
            "changes": a.changes,
        })).collect::<Vec<_>>(),
        "prediction": b.prediction,
    })
}

fn bad(what: String) -> StoreError {
    StoreError::Invalid(what)
}

fn field<'a>(obj: &'a Map<String, Value>, key: &str) -> Result<&'a Value> {
    obj.get(key)
        .ok_or_else(|| bad(format!("the key `{key}` is missing")))
}

fn text(obj: &Map<String, Value>, key: &str) -> Result<String> {
    field(obj, key)?
        .as_str()
        .map(str::to_owned)
        .ok_or_else(|| bad(format!("`{key}` must be a string")))
}

fn number(obj: &Map<String, Value>, key: &str) -> Result<f64> {
    field(obj, key)?
        .as_f64()
        .ok_or_else(|| bad(format!("`{key}` must be a number")))
}

fn optional<T>(
    obj: &Map<String, Value>,
    key: &str,
    read: impl Fn(&Map<String, Value>, &str) -> Result<T>,
) -> Result<Option<T>> {
    match obj.get(key) {
        None | Some(Value::Null) => Ok(None),
        Some(_) => read(obj, key).map(Some),
    }
}

fn time(obj: &Map<String, Value>, key: &str) -> Result<chrono::DateTime<chrono::Utc>> {
    values::parse_time(&text(obj, key)?).map_err(|e| bad(format!("`{key}`: {e}")))
}

fn objects<'a>(obj: &'a Map<String, Value>, key: &str) -> Result<Vec<&'a Map<String, Value>>> {
    field(obj, key)?
        .as_array()
        .ok_or_else(|| bad(format!("`{key}` must be a list")))?
        .iter()
        .enumerate()
        .map(|(i, v)| {
            v.as_object()
                .ok_or_else(|| bad(format!("item {} of `{key}` must be an object", i + 1)))
        })
        .collect()
}

/// Reads a batch from its public JSON object, checking every field. Takes the
/// value, so the analysis snapshot (the bulk of it) is moved, not copied.
pub fn batch_from_json(v: Value) -> Result<Batch> {
    let Value::Object(mut o) = v else {
        return Err(bad("a batch must be a JSON object".into()));
    };
    let prediction = o
        .remove("prediction")
        .ok_or_else(|| bad("the key `prediction` is missing".into()))?;
    batch_from_fields(&o, prediction)
}

/// Reads a batch from the fields of its JSON object other than `prediction`.
pub(crate) fn batch_from_fields(o: &Map<String, Value>, prediction: Value) -> Result<Batch> {
    let status_text = text(o, "status")?;
    let status = Status::parse(&status_text).ok_or_else(|| {
        bad(format!(
            "`status` is `{status_text}`; use draft, final or amended"
        ))
    })?;
    let version = field(o, "recipe_version")?
        .as_u64()
        .and_then(|n| u32::try_from(n).ok())
        .filter(|&n| n >= 1)
        .ok_or_else(|| bad("`recipe_version` must be a whole number from 1".into()))?;
    let lines = objects(o, "lines")?
        .into_iter()
        .map(|l| {
            Ok(BatchLine {
                ingredient: text(l, "ingredient")?,
                planned_g: number(l, "planned_g")?,
                actual_g: optional(l, "actual_g", number)?,
                lot: text(l, "lot")?,
            })
        })
        .collect::<Result<Vec<_>>>()?;
    let measurements = objects(o, "measurements")?
        .into_iter()
        .map(|m| {
            let kind_text = text(m, "kind")?;
            let kind = MeasurementKind::parse(&kind_text).ok_or_else(|| {
                bad(format!(
                    "measurement kind `{kind_text}` is unknown; known kinds: {}",
                    MeasurementKind::names()
                ))
            })?;
            Ok(Measurement {
                kind,
                value: number(m, "value")?,
                taken_at: time(m, "taken_at")?,
                by: text(m, "by")?,
            })
        })
        .collect::<Result<Vec<_>>>()?;
    let notes = objects(o, "notes")?
        .into_iter()
        .map(|n| {
            Ok(Note {
                text: text(n, "text")?,
                written_at: time(n, "written_at")?,
                by: text(n, "by")?,
            })
        })
        .collect::<Result<Vec<_>>>()?;
    let amendments = objects(o, "amendments")?
        .into_iter()
        .map(|a| {
            let changes: Vec<Change> = serde_json::from_value(field(a, "changes")?.clone())
                .map_err(|e| bad(format!("the changes of an amendment: {e}")))?;
            Ok(Amendment {
                amended_at: time(a, "amended_at")?,
                by: text(a, "by")?,
                reason: text(a, "reason")?,
                changes,
            })
        })
        .collect::<Result<Vec<_>>>()?;
    let derived = match (status, amendments.is_empty()) {
        (Status::Draft, _) => Status::Draft,
        (_, true) => Status::Final,
        (_, false) => Status::Amended,
    };
    if derived != status {
        return Err(bad(format!(
            "`status` is {} but the record reads as {} (amended means final with amendments)",
            status.as_str(),
            derived.as_str()
        )));
    }
    Ok(Batch {
        code: text(o, "code")?,
        recipe: RecipeVersion {
            recipe: text(o, "recipe")?,
            version,
            content_hash: text(o, "recipe_hash")?,
            text: text(o, "recipe_text")?,
        },
        made_at: time(o, "made_at")?,
        size_g: number(o, "size_g")?,
        operator: text(o, "operator")?,
        status,
        finalized_at: optional(o, "finalized_at", time)?,
        finalized_by: optional(o, "finalized_by", text)?,
        lines,
        measurements,
        notes,
        amendments,
        prediction,
    })
}

/// Calls `each` for every batch matching `filter`, newest first, one page at a time.
pub(crate) fn each_batch(
    store: &Store,
    filter: &BatchFilter,
    mut each: impl FnMut(&Batch) -> Result<()>,
) -> Result<usize> {
    const PAGE: usize = 500;
    let mut page = filter.clone();
    let mut done = 0;
    loop {
        let want = if filter.limit == 0 {
            PAGE
        } else {
            PAGE.min(filter.limit - done)
        };
        if want == 0 {
            return Ok(done);
        }
        page.limit = want;
        let rows = store.list_batches(&page)?;
        for row in &rows {
            let batch = store.require(&row.code)?;
            each(&batch)?;
            done += 1;
        }
        match rows.last() {
            Some(last) if rows.len() == want => page.after = Some(last.cursor.clone()),
            _ => return Ok(done),
        }
    }
}

fn io_error(e: std::io::Error) -> StoreError {
    StoreError::Io {
        path: "the export output".into(),
        source: e,
    }
}

impl Store {
    /// Writes every batch matching `filter` as one JSON object per line; returns the count.
    pub fn export_jsonl(&self, filter: &BatchFilter, out: &mut dyn Write) -> Result<usize> {
        each_batch(self, filter, |b| {
            writeln!(out, "{}", batch_json(b)).map_err(io_error)
        })
    }
}

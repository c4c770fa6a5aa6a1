//! Writing batch records: a new batch (with its recipe version, lines, first note
//! and analysis snapshot), measurements, notes, sign-off and amendments. Each call
//! is one transaction.

use chrono::{DateTime, Utc};
use rusqlite::{Connection, OptionalExtension, Transaction, params};

use super::amend::{self, Edit};
use super::error::{Result, StoreError};
use super::recipes::{self, VersionIds};
use super::search::{self, Pending, Slot};
use super::types::{
    Amendment, Batch, BatchLine, Measurement, MeasurementKind, NewBatch, Note, Status,
};
use super::{Store, values};

/// The next free code for a day: `B-YYYYMMDD-NNNN`.
fn next_code(tx: &Transaction, made_at: &DateTime<Utc>) -> Result<String> {
    let prefix = format!("B-{}-", made_at.format("%Y%m%d"));
    let last: Option<i64> = tx.query_row(
        "SELECT max(CAST(substr(code, ?2) AS INTEGER)) FROM batches WHERE code GLOB ?1",
        params![format!("{prefix}[0-9]*"), prefix.len() as i64 + 1],
        |r| r.get(0),
    )?;
    Ok(format!("{prefix}{:04}", last.unwrap_or(0) + 1))
}

/// The row id and stored status ("draft"/"final") of a batch.
pub(crate) fn find(conn: &Connection, code: &str) -> Result<(i64, String)> {
    conn.query_row(
        "SELECT id, status FROM batches WHERE code = ?1",
        [code],
        |r| Ok((r.get(0)?, r.get(1)?)),
    )
    .optional()?
    .ok_or_else(|| StoreError::NoSuchBatch {
        code: code.to_owned(),
    })
}

/// Whether a batch with this code exists.
pub(crate) fn exists(conn: &Connection, code: &str) -> Result<bool> {
    Ok(conn
        .prepare_cached("SELECT 1 FROM batches WHERE code = ?1")?
        .query_row([code], |_| Ok(()))
        .optional()?
        .is_some())
}

/// How many rows of `table` (a literal name, never user input) belong to a batch.
fn count(tx: &Transaction, table: &'static str, batch_id: i64) -> Result<usize> {
    let sql = format!("SELECT count(*) FROM {table} WHERE batch_id = ?1");
    let n: i64 = tx
        .prepare_cached(&sql)?
        .query_row([batch_id], |r| r.get(0))?;
    Ok(n as usize)
}

fn check_finite(what: &str, value: f64) -> Result<()> {
    if value.is_finite() {
        Ok(())
    } else {
        Err(StoreError::Invalid(format!(
            "{what} must be a number, not {value}"
        )))
    }
}

fn check_name(what: &str, name: &str) -> Result<()> {
    if name.trim().is_empty() {
        Err(StoreError::Invalid(format!("{what} must not be empty")))
    } else {
        Ok(())
    }
}

/// Writes one whole record as first written (before amendments), then its trail.
/// `batch.operator` and `batch.lines` must be the values before the amendments.
/// `prediction_json` is the analysis snapshot as JSON text (`batch.prediction` is
/// not read, so an import can pass the text it read without parsing it). Its search
/// entries are queued on `search`, to be written with the transaction.
pub(crate) fn insert_record(
    tx: &Transaction,
    ids: VersionIds,
    batch: &Batch,
    prediction_json: &str,
    search: &mut Pending,
) -> Result<i64> {
    check_name("the operator", &batch.operator)?;
    check_finite("the batch size", batch.size_g)?;
    if batch.size_g <= 0.0 {
        return Err(StoreError::Invalid(format!(
            "a batch size of {} g is not possible; give a size above zero",
            batch.size_g
        )));
    }
    let now = values::time_text(&values::now());
    tx.prepare_cached(
        "INSERT INTO batches (code, recipe_id, recipe_version_id, made_at, size_g, operator,
                              status, created_at)
         VALUES (?1, ?2, ?3, ?4, ?5, ?6, 'draft', ?7)",
    )?
    .execute(params![
        batch.code,
        ids.recipe_id,
        ids.version_id,
        values::time_text(&batch.made_at),
        batch.size_g,
        batch.operator,
        now
    ])?;
    let id = tx.last_insert_rowid();
    let mut line_stmt = tx.prepare_cached(
        "INSERT INTO batch_lines (batch_id, position, ingredient, planned_g, actual_g, lot)
         VALUES (?1, ?2, ?3, ?4, ?5, ?6)",
    )?;
    for (i, line) in batch.lines.iter().enumerate() {
        check_finite("a planned mass", line.planned_g)?;
        if let Some(a) = line.actual_g {
            check_finite("an actual mass", a)?;
        }
        line_stmt.execute(params![
            id,
            i as i64 + 1,
            line.ingredient,
            line.planned_g,
            line.actual_g,
            line.lot
        ])?;
        search.push(id, Slot::Lot(i + 1), &line.lot);
    }
    tx.prepare_cached("INSERT INTO batch_predictions (batch_id, analysis) VALUES (?1, ?2)")?
        .execute(params![id, prediction_json])?;
    for (i, note) in batch.notes.iter().enumerate() {
        insert_note(tx, id, note)?;
        search.push(id, Slot::Note(i + 1), &note.text);
    }
    for m in &batch.measurements {
        insert_measurement(tx, id, m)?;
    }
    if batch.status != Status::Draft {
        let at = batch.finalized_at.unwrap_or(batch.made_at);
        let by = batch.finalized_by.clone().unwrap_or_default();
        tx.prepare_cached(
            "UPDATE batches SET status = 'final', finalized_at = ?2, finalized_by = ?3 WHERE id = ?1",
        )?
        .execute(params![id, values::time_text(&at), by])?;
    }
    for (i, a) in batch.amendments.iter().enumerate() {
        insert_amendment(tx, id, a)?;
        search.push(id, Slot::Amendment(i + 1), &search::amendment_text(a));
    }
    Ok(id)
}

fn insert_note(tx: &Transaction, batch_id: i64, note: &Note) -> Result<()> {
    check_name("a note", &note.text)?;
    tx.prepare_cached(
        "INSERT INTO batch_notes (batch_id, text, written_at, written_by) VALUES (?1, ?2, ?3, ?4)",
    )?
    .execute(params![
        batch_id,
        note.text,
        values::time_text(&note.written_at),
        note.by
    ])?;
    Ok(())
}

fn insert_measurement(tx: &Transaction, batch_id: i64, m: &Measurement) -> Result<()> {
    check_finite(m.kind.as_str(), m.value)?;
    tx.prepare_cached(
        "INSERT INTO measurements (batch_id, kind, value, unit, taken_at, taken_by)
         VALUES (?1, ?2, ?3, ?4, ?5, ?6)",
    )?
    .execute(params![
        batch_id,
        m.kind.as_str(),
        m.value,
        m.kind.unit(),
        values::time_text(&m.taken_at),
        m.by
    ])?;
    Ok(())
}

fn insert_amendment(tx: &Transaction, batch_id: i64, a: &Amendment) -> Result<()> {
    check_name("the reason for an amendment", &a.reason)?;
    let changes = serde_json::to_string(&a.changes)
        .map_err(|e| StoreError::Invalid(format!("the changes could not be written: {e}")))?;
    tx.prepare_cached(
        "INSERT INTO amendments (batch_id, amended_at, amended_by, reason, changes)
         VALUES (?1, ?2, ?3, ?4, ?5)",
    )?
    .execute(params![
        batch_id,
        values::time_text(&a.amended_at),
        a.by,
        a.reason,
        changes
    ])?;
    Ok(())
}

impl Store {
    /// Records a new draft batch: saves the recipe text as a version (when new), the
    /// lines, the first note and the analysis snapshot; returns the stored record.
    pub fn new_batch(&mut self, new: &NewBatch) -> Result<Batch> {
        if new.lines.is_empty() {
            return Err(StoreError::Invalid(
                "a batch needs at least one line".into(),
            ));
        }
        let code = self.write(|tx| {
            let (ids, version) = recipes::save_version(tx, &new.recipe, &new.recipe_text)?;
            let code = next_code(tx, &new.made_at)?;
            let notes = new
                .note
                .iter()
                .map(|text| Note {
                    text: text.clone(),
                    written_at: new.made_at,
                    by: new.operator.clone(),
                })
                .collect();
            let batch = Batch {
                code: code.clone(),
                recipe: version,
                made_at: new.made_at,
                size_g: new.size_g,
                operator: new.operator.clone(),
                status: Status::Draft,
                finalized_at: None,
                finalized_by: None,
                lines: new.lines.clone(),
                measurements: Vec::new(),
                notes,
                amendments: Vec::new(),
                prediction: new.prediction.clone(),
            };
            let mut entries = Pending::default();
            insert_record(tx, ids, &batch, &new.prediction.to_string(), &mut entries)?;
            entries.write(tx)?;
            Ok(code)
        })?;
        self.require(&code)
    }

    /// Records measurements taken now by `by`, all in one transaction.
    pub fn add_measurements(
        &mut self,
        code: &str,
        readings: &[(MeasurementKind, f64)],
        by: &str,
    ) -> Result<Vec<Measurement>> {
        check_name("the name of who measured", by)?;
        let taken_at = values::now();
        let list: Vec<Measurement> = readings
            .iter()
            .map(|&(kind, value)| Measurement {
                kind,
                value,
                taken_at,
                by: by.to_owned(),
            })
            .collect();
        self.write(|tx| {
            let (id, _) = find(tx, code)?;
            for m in &list {
                insert_measurement(tx, id, m)?;
            }
            Ok(())
        })?;
        Ok(list)
    }

    /// Records one measurement taken now by `by`.
    pub fn add_measurement(
        &mut self,
        code: &str,
        kind: MeasurementKind,
        value: f64,
        by: &str,
    ) -> Result<Measurement> {
        let mut list = self.add_measurements(code, &[(kind, value)], by)?;
        list.pop()
            .ok_or_else(|| StoreError::Invalid("no measurement was given".into()))
    }

    /// Adds a note written now by `by`.
    pub fn add_note(&mut self, code: &str, text: &str, by: &str) -> Result<Note> {
        check_name("the note's author", by)?;
        let note = Note {
            text: text.to_owned(),
            written_at: values::now(),
            by: by.to_owned(),
        };
        self.write(|tx| {
            let (id, _) = find(tx, code)?;
            insert_note(tx, id, &note)?;
            let mut entries = Pending::default();
            entries.push(id, Slot::Note(count(tx, "batch_notes", id)?), &note.text);
            entries.write(tx)
        })?;
        Ok(note)
    }

    /// Signs a draft batch off: from now on it is only amended, never changed.
    pub fn finalize(&mut self, code: &str, by: &str) -> Result<Batch> {
        check_name("the name of who signs off", by)?;
        let at = values::time_text(&values::now());
        self.write(|tx| {
            let (id, status) = find(tx, code)?;
            if status != "draft" {
                return Err(StoreError::Invalid(format!(
                    "{code} is already final; correct it with `gelu batch amend`"
                )));
            }
            tx.execute(
                "UPDATE batches SET status = 'final', finalized_at = ?2, finalized_by = ?3
                 WHERE id = ?1 AND status = 'draft'",
                params![id, at, by],
            )?;
            Ok(())
        })?;
        self.require(code)
    }

    /// Corrects a batch by a new entry on its trail; the record itself is not touched.
    pub fn amend(
        &mut self,
        code: &str,
        by: &str,
        reason: &str,
        edits: &[Edit],
    ) -> Result<Amendment> {
        check_name("the name of who amends", by)?;
        check_name("the reason for an amendment", reason)?;
        if edits.is_empty() {
            return Err(StoreError::Invalid(
                "an amendment needs at least one change (operator, actual mass or lot)".into(),
            ));
        }
        self.write(|tx| {
            let (id, _) = find(tx, code)?;
            let current = Store::read_batch(tx, code)?.ok_or_else(|| StoreError::NoSuchBatch {
                code: code.to_owned(),
            })?;
            let changes = amend::changes_for(edits, &current.operator, &current.lines)?;
            let a = Amendment {
                amended_at: values::now(),
                by: by.to_owned(),
                reason: reason.to_owned(),
                changes,
            };
            insert_amendment(tx, id, &a)?;
            let mut entries = Pending::default();
            let n = count(tx, "amendments", id)?;
            entries.push(id, Slot::Amendment(n), &search::amendment_text(&a));
            entries.write(tx)?;
            Ok(a)
        })
    }

    /// The batch, or an error naming the missing code.
    pub(crate) fn require(&self, code: &str) -> Result<Batch> {
        self.batch(code)?.ok_or_else(|| StoreError::NoSuchBatch {
            code: code.to_owned(),
        })
    }
}

/// The lines of a batch before its amendments, from the current lines and its trail.
pub(crate) fn original_record(batch: &Batch) -> Result<(String, Vec<BatchLine>)> {
    let mut operator = batch.operator.clone();
    let mut lines = batch.lines.clone();
    for a in batch.amendments.iter().rev() {
        for c in a.changes.iter().rev() {
            amend::revert(c, &mut operator, &mut lines)?;
        }
    }
    Ok((operator, lines))
}

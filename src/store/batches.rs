//! Changing the batch log one request at a time: a new batch (with its recipe
//! version, lines, first note and prediction), measurements, notes, sign-off
//! and amendments. Each call is one transaction; the rows themselves are written by
//! [`records`].

use std::collections::HashSet;

use chrono::{DateTime, Utc};
use rusqlite::{Connection, OptionalExtension, Transaction, params};

use super::Store;
use super::error::{Result, StoreError};
use super::recipes;
use super::records::{self, NewRecord};
use super::seals;
use super::search::{self, Pending, Slot};
use super::site;
use crate::batch::amend::{self, Edit};
use crate::batch::validate::{Recipes, check_amendment, check_name, check_note, check_sign_off};
use crate::batch::{Amendment, Batch, Measurement, MeasurementKind, NewBatch, Note, Status};
use crate::catalog::Catalog;
use crate::clock;
use crate::model::time::time_text;

/// The next free code of this site for a day: `B-YYYYMMDD-SITE-NNNN`.
fn next_code(tx: &Transaction, made_at: &DateTime<Utc>) -> Result<String> {
    let prefix = site::code_prefix(&site::site_code(tx)?, &made_at.format("%Y%m%d").to_string());
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

/// Which of `codes` are already in the log (one query for them all).
pub(crate) fn existing_codes(conn: &Connection, codes: &[&str]) -> Result<HashSet<String>> {
    let list = serde_json::to_string(codes)
        .map_err(|e| StoreError::Invalid(format!("batch codes could not be listed: {e}")))?;
    let mut stmt = conn.prepare_cached(
        "SELECT code FROM batches WHERE code IN (SELECT value FROM json_each(?1))",
    )?;
    let found = stmt
        .query_map([list], |r| r.get(0))?
        .collect::<rusqlite::Result<_>>()?;
    Ok(found)
}

/// Signs off the draft batch with row id `id`: when (RFC 3339) and by whom, and
/// seals the record as it stands. The one statement that makes a record final,
/// here or when a sign-off is pulled from the hub.
pub(crate) fn sign_off(tx: &Transaction, id: i64, at: &str, by: &str) -> Result<()> {
    tx.execute(
        "UPDATE batches SET status = 'final', finalized_at = ?2, finalized_by = ?3
         WHERE id = ?1 AND status = 'draft'",
        params![id, at, by],
    )?;
    seals::seal_now(tx, id)
}

/// Refuses a reason given for a draft's reading or note (it would be dropped).
fn no_reason_on_a_draft(code: &str, reason: Option<&str>, what: &str) -> Result<()> {
    match reason {
        None => Ok(()),
        Some(_) => Err(StoreError::Invalid(format!(
            "{code} is a draft: it takes {what} as they come, without a reason; leave out the reason \
             (a reason is for a record already signed off)"
        ))),
    }
}

/// The reason for a reading or note on a signed-off record, which is required.
fn reason_after_sign_off<'a>(code: &str, reason: Option<&'a str>, what: &str) -> Result<&'a str> {
    reason.filter(|r| !r.trim().is_empty()).ok_or_else(|| {
        StoreError::Invalid(format!(
            "{code} is signed off: a new {what} goes on its amendment trail, dated and signed, \
             with the reason for it; give one with --reason"
        ))
    })
}

/// Appends one entry to a record's trail (its search entry too, and a seal when it
/// is signed off): the edits, as changes against the record as it stands. (A draft
/// may be amended too, by the command line: that is how its weighed masses are
/// recorded.)
fn append_amendment(
    tx: &Transaction,
    id: i64,
    code: &str,
    by: &str,
    reason: &str,
    edits: &[Edit],
    at: DateTime<Utc>,
) -> Result<Amendment> {
    let current = Store::read_batch(tx, code)?.ok_or_else(|| StoreError::NoSuchBatch {
        code: code.to_owned(),
    })?;
    let a = Amendment {
        amended_at: at,
        by: by.to_owned(),
        reason: reason.to_owned(),
        changes: amend::changes_for(edits, &current)?,
    };
    check_amendment(&a, &current.made_at)?;
    records::insert_amendments(tx, &[(id, &a)])?;
    let mut entries = Pending::default();
    let n = count(tx, "amendments", id)?;
    entries.push(id, Slot::Amendment(n), &search::amendment_text(&a));
    entries.write(tx)?;
    if current.status != Status::Draft {
        seals::seal_now(tx, id)?;
    }
    Ok(a)
}

/// How many rows of `table` (a literal name, never user input) belong to a batch.
fn count(tx: &Transaction, table: &'static str, batch_id: i64) -> Result<usize> {
    let sql = format!("SELECT count(*) FROM {table} WHERE batch_id = ?1");
    let n: i64 = tx
        .prepare_cached(&sql)?
        .query_row([batch_id], |r| r.get(0))?;
    Ok(n as usize)
}

impl Store {
    /// Records a new draft batch: saves the recipe text as a version (when new), the
    /// lines, the first note and the prediction; returns the stored record. It is
    /// checked as an import is: its recipe text must read and name its lines.
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
                    struck: false,
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
            Recipes::default().check(&batch, Catalog::builtin())?;
            let mut entries = Pending::default();
            let prediction_json = new.prediction.to_string();
            let record = NewRecord {
                ids,
                batch: &batch,
                prediction_json: &prediction_json,
            };
            records::insert_records(tx, &[record], &mut entries)?;
            entries.write(tx)?;
            Ok(code)
        })?;
        self.require(&code)
    }

    /// Records readings taken now by `by`, all in one transaction. On a draft they
    /// join the record as they come (and `reason` must be `None`); on a signed-off
    /// record they go on its amendment trail, one entry with `reason` (required).
    pub fn add_measurements(
        &mut self,
        code: &str,
        readings: &[(MeasurementKind, f64)],
        by: &str,
        reason: Option<&str>,
    ) -> Result<Vec<Measurement>> {
        check_name("the name of who measured", by)?;
        if readings.is_empty() {
            return Err(StoreError::Invalid("no measurement was given".into()));
        }
        let taken_at = clock::now();
        let list: Vec<Measurement> = readings
            .iter()
            .map(|&(kind, value)| Measurement {
                kind,
                value,
                taken_at,
                by: by.to_owned(),
                struck: false,
            })
            .collect();
        self.write(|tx| {
            let (id, status) = find(tx, code)?;
            if status == "draft" {
                no_reason_on_a_draft(code, reason, "readings")?;
                let rows: Vec<(i64, &Measurement)> = list.iter().map(|m| (id, m)).collect();
                return records::insert_measurements(tx, &rows);
            }
            let edits: Vec<Edit> = list.iter().cloned().map(Edit::AddReading).collect();
            let why = reason_after_sign_off(code, reason, "reading")?;
            append_amendment(tx, id, code, by, why, &edits, taken_at).map(drop)
        })?;
        Ok(list)
    }

    /// Records one reading taken now by `by` (see [`Store::add_measurements`]).
    pub fn add_measurement(
        &mut self,
        code: &str,
        kind: MeasurementKind,
        value: f64,
        by: &str,
        reason: Option<&str>,
    ) -> Result<Measurement> {
        let mut list = self.add_measurements(code, &[(kind, value)], by, reason)?;
        list.pop()
            .ok_or_else(|| StoreError::Invalid("no measurement was given".into()))
    }

    /// Adds a note written now by `by`: to a draft as it comes (`reason` must be
    /// `None`), to a signed-off record as an entry on its trail with `reason`.
    pub fn add_note(
        &mut self,
        code: &str,
        text: &str,
        by: &str,
        reason: Option<&str>,
    ) -> Result<Note> {
        let note = Note {
            text: text.to_owned(),
            written_at: clock::now(),
            by: by.to_owned(),
            struck: false,
        };
        check_note(&note)?;
        self.write(|tx| {
            let (id, status) = find(tx, code)?;
            if status == "draft" {
                no_reason_on_a_draft(code, reason, "notes")?;
                records::insert_notes(tx, &[(id, &note)])?;
                let mut entries = Pending::default();
                entries.push(id, Slot::Note(count(tx, "batch_notes", id)?), &note.text);
                return entries.write(tx);
            }
            let why = reason_after_sign_off(code, reason, "note")?;
            let edits = [Edit::AddNote(note.clone())];
            append_amendment(tx, id, code, by, why, &edits, note.written_at).map(drop)
        })?;
        Ok(note)
    }

    /// Signs a draft batch off: from now on it is only amended, never changed. The
    /// record is sealed as signed off.
    pub fn finalize(&mut self, code: &str, by: &str) -> Result<Batch> {
        let now = clock::now();
        self.write(|tx| {
            let (id, status) = find(tx, code)?;
            if status != "draft" {
                return Err(StoreError::Invalid(format!(
                    "{code} is already final; correct it with `gelu batch amend`"
                )));
            }
            let made_at = Store::read_batch(tx, code)?
                .map(|b| b.made_at)
                .ok_or_else(|| StoreError::NoSuchBatch {
                    code: code.to_owned(),
                })?;
            check_sign_off(&made_at, &now, by)?;
            sign_off(tx, id, &time_text(&now), by)
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
        if edits.is_empty() {
            return Err(StoreError::Invalid(
                "an amendment needs at least one change (operator, actual mass, lot, or a reading or note struck out or corrected)".into(),
            ));
        }
        let now = clock::now();
        self.write(|tx| {
            let (id, _) = find(tx, code)?;
            append_amendment(tx, id, code, by, reason, edits, now)
        })
    }

    /// The batch, or an error naming the missing code.
    pub(crate) fn require(&self, code: &str) -> Result<Batch> {
        self.batch(code)?.ok_or_else(|| StoreError::NoSuchBatch {
            code: code.to_owned(),
        })
    }
}

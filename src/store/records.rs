//! Writing whole batch records, one or thousands at a time. Every table's rows go
//! in multi-row INSERTs (see [`rows`]), so an import runs a few statements per
//! hundred records instead of eight per record; a single new batch takes the same
//! path with one record.

use rusqlite::{ToSql, Transaction};

use super::error::{Result, StoreError};
use super::recipes::VersionIds;
use super::rows;
use super::seals::{self, NewSeal};
use super::search::{self, Pending, Slot};
use crate::batch::seal::seal;
use crate::batch::validate::{check_note, check_reading, check_record, check_text};
use crate::batch::{Amendment, Batch, Measurement, Note, Status};
use crate::clock;
use crate::model::time::time_text;

/// Rows per statement (a power of two; see [`rows::insert`]).
const GROUP: usize = 32;

/// A record to write as first written (before its amendments are applied).
pub(crate) struct NewRecord<'a> {
    /// Its recipe version's row ids.
    pub ids: VersionIds,
    /// The record as first written (operator, lines, readings and notes before
    /// its trail), with its trail in `amendments`.
    pub batch: &'a Batch,
    /// Its prediction as JSON text (`batch.prediction` is not read, so an
    /// import can pass the text it read without parsing it).
    pub prediction_json: &'a str,
}

/// How a record's sign-off is stored: status, and when and by whom.
struct SignOff<'a> {
    made_at: String,
    status: &'static str,
    at: Option<String>,
    by: Option<&'a str>,
}

/// The sign-off as stored: exactly what the record says ([`check_record`] has made
/// sure a final record has both fields and a draft neither).
fn sign_off(batch: &Batch) -> SignOff<'_> {
    SignOff {
        made_at: time_text(&batch.made_at),
        status: if batch.status == Status::Draft {
            "draft"
        } else {
            "final"
        },
        at: batch.finalized_at.as_ref().map(time_text),
        by: batch.finalized_by.as_deref(),
    }
}

/// Writes whole records (with lines, prediction, notes, measurements, amendments
/// and, when signed off, their seal) and queues their search entries on `search`;
/// returns their row ids, in order. Everything is checked before anything is
/// written.
///
/// A record that is not a draft is written signed off at once, lines and all. The
/// schema refuses lines, readings and notes for a final batch, so that is only
/// possible inside [`super::guards::without_insert_guards`], as an import does;
/// elsewhere it fails whole.
pub(crate) fn insert_records(
    tx: &Transaction,
    records: &[NewRecord],
    search: &mut Pending,
) -> Result<Vec<i64>> {
    for r in records {
        check_record(r.batch)?;
    }
    // Row ids as SQLite would give them (the write lock is held, batches are never
    // deleted), chosen here so that every table can be written many records at a time.
    let first: i64 = tx.query_row("SELECT coalesce(max(id), 0) + 1 FROM batches", [], |r| {
        r.get(0)
    })?;
    let ids: Vec<i64> = (first..).take(records.len()).collect();
    let now = time_text(&clock::now());

    let signed: Vec<SignOff> = records.iter().map(|r| sign_off(r.batch)).collect();
    let heads: Vec<[&dyn ToSql; 11]> = records
        .iter()
        .zip(&ids)
        .zip(&signed)
        .map(|((r, id), s)| {
            [
                id as &dyn ToSql,
                &r.batch.code,
                &r.ids.recipe_id,
                &r.ids.version_id,
                &s.made_at,
                &r.batch.size_g,
                &r.batch.operator,
                &s.status,
                &s.at,
                &s.by,
                &now,
            ]
        })
        .collect();
    rows::insert(
        tx,
        "INSERT INTO batches (id, code, recipe_id, recipe_version_id, made_at, size_g, \
         operator, status, finalized_at, finalized_by, created_at)",
        &heads,
        GROUP,
    )?;

    let most_lines = records
        .iter()
        .map(|r| r.batch.lines.len())
        .max()
        .unwrap_or(0);
    let positions: Vec<i64> = (1..=most_lines as i64).collect();
    let lines: Vec<[&dyn ToSql; 6]> = records
        .iter()
        .zip(&ids)
        .flat_map(|(r, id)| {
            r.batch.lines.iter().zip(&positions).map(move |(l, p)| {
                [
                    id as &dyn ToSql,
                    p,
                    &l.ingredient,
                    &l.planned_g,
                    &l.actual_g,
                    &l.lot,
                ]
            })
        })
        .collect();
    rows::insert(
        tx,
        "INSERT INTO batch_lines (batch_id, position, ingredient, planned_g, actual_g, lot)",
        &lines,
        GROUP,
    )?;

    let predictions: Vec<[&dyn ToSql; 2]> = records
        .iter()
        .zip(&ids)
        .map(|(r, id)| [id as &dyn ToSql, &r.prediction_json])
        .collect();
    rows::insert(
        tx,
        "INSERT INTO batch_predictions (batch_id, analysis)",
        &predictions,
        GROUP,
    )?;

    let trail =
        |each: fn(&Batch) -> usize| -> usize { records.iter().map(|r| each(r.batch)).sum() };
    let mut notes = Vec::with_capacity(trail(|b| b.notes.len()));
    let mut measurements = Vec::with_capacity(trail(|b| b.measurements.len()));
    let mut amendments = Vec::with_capacity(trail(|b| b.amendments.len()));
    let mut sealed: Vec<NewSeal> = Vec::new();
    for (r, &id) in records.iter().zip(&ids) {
        let b = r.batch;
        if b.status != Status::Draft {
            let n = b.amendments.len();
            sealed.push((id, n, seal(b, n, r.prediction_json)));
        }
        let lots: Vec<&str> = b.lines.iter().map(|l| l.lot.as_str()).collect();
        search.push(id, Slot::Lots, &lots.join(" "));
        for (i, note) in b.notes.iter().enumerate() {
            notes.push((id, note));
            search.push(id, Slot::Note(i + 1), &note.text);
        }
        measurements.extend(b.measurements.iter().map(|m| (id, m)));
        for (i, a) in b.amendments.iter().enumerate() {
            amendments.push((id, a));
            search.push(id, Slot::Amendment(i + 1), &search::amendment_text(a));
        }
    }
    insert_notes(tx, &notes)?;
    insert_measurements(tx, &measurements)?;
    insert_amendments(tx, &amendments)?;
    seals::insert(tx, &sealed)?;
    Ok(ids)
}

/// Writes notes, each with the row id of its batch.
pub(crate) fn insert_notes(tx: &Transaction, notes: &[(i64, &Note)]) -> Result<()> {
    for (_, n) in notes {
        check_note(n)?;
    }
    let times: Vec<String> = notes
        .iter()
        .map(|(_, n)| time_text(&n.written_at))
        .collect();
    let rows: Vec<[&dyn ToSql; 4]> = notes
        .iter()
        .zip(&times)
        .map(|((id, n), t)| [id as &dyn ToSql, &n.text, t, &n.by])
        .collect();
    rows::insert(
        tx,
        "INSERT INTO batch_notes (batch_id, text, written_at, written_by)",
        &rows,
        GROUP,
    )
}

/// Writes measurements, each with the row id of its batch.
pub(crate) fn insert_measurements(tx: &Transaction, list: &[(i64, &Measurement)]) -> Result<()> {
    for (_, m) in list {
        check_reading(m)?;
    }
    let texts: Vec<(&str, &str, String)> = list
        .iter()
        .map(|(_, m)| (m.kind.as_str(), m.kind.unit(), time_text(&m.taken_at)))
        .collect();
    let rows: Vec<[&dyn ToSql; 6]> = list
        .iter()
        .zip(&texts)
        .map(|((id, m), (kind, unit, at))| [id as &dyn ToSql, kind, &m.value, unit, at, &m.by])
        .collect();
    rows::insert(
        tx,
        "INSERT INTO measurements (batch_id, kind, value, unit, taken_at, taken_by)",
        &rows,
        GROUP,
    )
}

/// Writes amendments, each with the row id of the batch it corrects.
pub(crate) fn insert_amendments(tx: &Transaction, list: &[(i64, &Amendment)]) -> Result<()> {
    let mut texts = Vec::with_capacity(list.len());
    for (_, a) in list {
        check_text("the reason for an amendment", &a.reason)?;
        let changes = serde_json::to_string(&a.changes)
            .map_err(|e| StoreError::Invalid(format!("the changes could not be written: {e}")))?;
        texts.push((time_text(&a.amended_at), changes));
    }
    let rows: Vec<[&dyn ToSql; 5]> = list
        .iter()
        .zip(&texts)
        .map(|((id, a), (at, changes))| [id as &dyn ToSql, at, &a.by, &a.reason, changes])
        .collect();
    rows::insert(
        tx,
        "INSERT INTO amendments (batch_id, amended_at, amended_by, reason, changes)",
        &rows,
        GROUP,
    )
}

//! Reading one whole batch record: its head, lines, readings, notes, prediction
//! and amendment trail as stored (the record as first written), and the record as
//! it stands, with the trail applied.

use rusqlite::{Connection, OptionalExtension};

use super::Store;
use super::columns::{status, time};
use super::error::{Result, StoreError};
use crate::batch::amend;
use crate::batch::{
    Amendment, Batch, BatchLine, Change, Measurement, MeasurementKind, Note, RecipeVersion, Status,
};
use crate::model::time as times;

/// `select` over the rows of `table` (a literal name) for batch `?1`, in list order:
/// by place in the list (a pulled row's place where it was written; a row written
/// here, its rank among the batch's rows), then by `time` (the column that says when
/// it was written), then as stored. A log that never synchronised lists its rows as
/// they were written; logs that did list every batch's rows alike.
pub(crate) fn in_list_order(select: &str, table: &'static str, time: &'static str) -> String {
    format!(
        "{select} FROM {table} e WHERE batch_id = ?1 ORDER BY coalesce(position, \
         (SELECT count(*) FROM {table} p WHERE p.batch_id = e.batch_id AND p.id <= e.id)), \
         {time}, id"
    )
}

/// Which record to read.
#[derive(Debug, Clone, Copy)]
pub(crate) enum Key<'a> {
    /// By its code.
    Code(&'a str),
    /// By its row id.
    Id(i64),
}

/// A record as stored: as first written, with its trail in `amendments` (not
/// applied) and its prediction as the stored text.
pub(crate) struct Stored {
    /// The batch's row id.
    pub id: i64,
    /// The record as first written; `status` is draft or final, as stored.
    pub first: Batch,
    /// The prediction, as stored.
    pub prediction_json: String,
}

impl Stored {
    /// The record as it stands: its trail applied, its status from both.
    pub fn current(self) -> Result<Batch> {
        let mut batch = self.first;
        amend::apply_trail(&mut batch)
            .map_err(|e| StoreError::Invalid(format!("batch {}: {}", batch.code, e.0)))?;
        batch.status = status(
            if batch.status == Status::Draft {
                "draft"
            } else {
                "final"
            },
            !batch.amendments.is_empty(),
        );
        batch.prediction =
            serde_json::from_str(&self.prediction_json).unwrap_or(serde_json::Value::Null);
        Ok(batch)
    }
}

const HEAD: &str = "SELECT b.id, b.code, r.name, v.version, v.content_hash, v.text, b.made_at,
        b.size_g, b.operator, b.status, b.finalized_at, b.finalized_by, p.analysis
 FROM batches b
 JOIN recipes r ON r.id = b.recipe_id
 JOIN recipe_versions v ON v.id = b.recipe_version_id
 LEFT JOIN batch_predictions p ON p.batch_id = b.id";

/// The record as stored, or `None`.
pub(crate) fn read_stored(conn: &Connection, key: Key) -> Result<Option<Stored>> {
    let (sql, arg) = match key {
        Key::Code(code) => (
            format!("{HEAD} WHERE b.code = ?1"),
            rusqlite::types::Value::Text(code.to_owned()),
        ),
        Key::Id(id) => (
            format!("{HEAD} WHERE b.id = ?1"),
            rusqlite::types::Value::Integer(id),
        ),
    };
    let head = conn
        .prepare_cached(&sql)?
        .query_row([arg], |r| {
            let finalized_at: Option<String> = r.get(10)?;
            let prediction: Option<String> = r.get(12)?;
            Ok(Stored {
                id: r.get(0)?,
                first: Batch {
                    code: r.get(1)?,
                    recipe: RecipeVersion {
                        recipe: r.get(2)?,
                        version: r.get(3)?,
                        content_hash: r.get(4)?,
                        text: r.get(5)?,
                    },
                    made_at: time(r, 6)?,
                    size_g: r.get(7)?,
                    operator: r.get(8)?,
                    status: status(&r.get::<_, String>(9)?, false),
                    finalized_at: finalized_at
                        .map(|t| times::parse_time(&t))
                        .transpose()
                        .map_err(|e| {
                            rusqlite::Error::FromSqlConversionFailure(
                                10,
                                rusqlite::types::Type::Text,
                                e.into(),
                            )
                        })?,
                    finalized_by: r.get(11)?,
                    lines: Vec::new(),
                    measurements: Vec::new(),
                    notes: Vec::new(),
                    amendments: Vec::new(),
                    prediction: serde_json::Value::Null,
                },
                prediction_json: prediction.unwrap_or_default(),
            })
        })
        .optional()?;
    let Some(mut stored) = head else {
        return Ok(None);
    };
    let id = stored.id;
    let batch = &mut stored.first;
    let code = batch.code.clone();
    batch.lines = conn
        .prepare_cached(
            "SELECT ingredient, planned_g, actual_g, lot FROM batch_lines
             WHERE batch_id = ?1 ORDER BY position",
        )?
        .query_map([id], |r| {
            Ok(BatchLine {
                ingredient: r.get(0)?,
                planned_g: r.get(1)?,
                actual_g: r.get(2)?,
                lot: r.get(3)?,
            })
        })?
        .collect::<rusqlite::Result<_>>()?;
    let mut stmt = conn.prepare_cached(&in_list_order(
        "SELECT kind, value, taken_at, taken_by",
        "measurements",
        "taken_at",
    ))?;
    let mut rows = stmt.query([id])?;
    while let Some(r) = rows.next()? {
        let kind_text: String = r.get(0)?;
        let kind = MeasurementKind::parse(&kind_text).ok_or_else(|| {
            StoreError::Invalid(format!(
                "batch {code} holds a measurement of unknown kind `{kind_text}` (made by a newer gelu?)"
            ))
        })?;
        batch.measurements.push(Measurement {
            kind,
            value: r.get(1)?,
            taken_at: time(r, 2)?,
            by: r.get(3)?,
            struck: false,
        });
    }
    batch.notes = conn
        .prepare_cached(&in_list_order(
            "SELECT text, written_at, written_by",
            "batch_notes",
            "written_at",
        ))?
        .query_map([id], |r| {
            Ok(Note {
                text: r.get(0)?,
                written_at: time(r, 1)?,
                by: r.get(2)?,
                struck: false,
            })
        })?
        .collect::<rusqlite::Result<_>>()?;
    let mut stmt = conn.prepare_cached(&in_list_order(
        "SELECT amended_at, amended_by, reason, changes",
        "amendments",
        "amended_at",
    ))?;
    let mut rows = stmt.query([id])?;
    while let Some(r) = rows.next()? {
        let changes_text: String = r.get(3)?;
        let changes: Vec<Change> = serde_json::from_str(&changes_text).map_err(|e| {
            StoreError::Invalid(format!("an amendment of {code} could not be read: {e}"))
        })?;
        batch.amendments.push(Amendment {
            amended_at: time(r, 0)?,
            by: r.get(1)?,
            reason: r.get(2)?,
            changes,
        });
    }
    Ok(Some(stored))
}

impl Store {
    /// The whole record of one batch, amendments applied, or `None`.
    pub fn batch(&self, code: &str) -> Result<Option<Batch>> {
        Store::read_batch(&self.conn, code)
    }

    pub(crate) fn read_batch(conn: &Connection, code: &str) -> Result<Option<Batch>> {
        read_stored(conn, Key::Code(code))?
            .map(Stored::current)
            .transpose()
    }
}

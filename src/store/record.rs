//! Reading one whole batch record by its code: its head, lines, readings, notes,
//! prediction and amendment trail, with the trail applied.

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

impl Store {
    /// The whole record of one batch, amendments applied, or `None`.
    pub fn batch(&self, code: &str) -> Result<Option<Batch>> {
        Store::read_batch(&self.conn, code)
    }

    pub(crate) fn read_batch(conn: &Connection, code: &str) -> Result<Option<Batch>> {
        let head = conn
            .prepare_cached(
                "SELECT b.id, b.code, r.name, v.version, v.content_hash, v.text, b.made_at,
                        b.size_g, b.operator, b.status, b.finalized_at, b.finalized_by, p.analysis
                 FROM batches b
                 JOIN recipes r ON r.id = b.recipe_id
                 JOIN recipe_versions v ON v.id = b.recipe_version_id
                 LEFT JOIN batch_predictions p ON p.batch_id = b.id
                 WHERE b.code = ?1",
            )?
            .query_row([code], |r| {
                let finalized_at: Option<String> = r.get(10)?;
                let prediction: Option<String> = r.get(12)?;
                Ok((
                    r.get::<_, i64>(0)?,
                    Batch {
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
                        prediction: prediction
                            .and_then(|p| serde_json::from_str(&p).ok())
                            .unwrap_or(serde_json::Value::Null),
                    },
                ))
            })
            .optional()?;
        let Some((id, mut batch)) = head else {
            return Ok(None);
        };
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
        let mut measurements = Vec::new();
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
            measurements.push(Measurement {
                kind,
                value: r.get(1)?,
                taken_at: time(r, 2)?,
                by: r.get(3)?,
            });
        }
        batch.measurements = measurements;
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
                })
            })?
            .collect::<rusqlite::Result<_>>()?;
        let mut amendments = Vec::new();
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
            amendments.push(Amendment {
                amended_at: time(r, 0)?,
                by: r.get(1)?,
                reason: r.get(2)?,
                changes,
            });
        }
        for a in &amendments {
            for c in &a.changes {
                amend::apply(c, &mut batch.operator, &mut batch.lines)?;
            }
        }
        batch.status = status(
            if batch.status == Status::Draft {
                "draft"
            } else {
                "final"
            },
            !amendments.is_empty(),
        );
        batch.amendments = amendments;
        Ok(Some(batch))
    }
}

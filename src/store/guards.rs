//! The insert-time guard triggers, lifted for the length of one bulk write.
//!
//! Three triggers in the schema check each new row: a batch's recipe version belongs
//! to its recipe, no line is added to a final batch, and a final batch is never
//! updated. Each firing runs a small sub-program; on an import they are about a
//! fifth of the work, though every record an import writes passes them by
//! construction (its version ids come from one row of `recipe_versions`, and its
//! lines are written while it is still a draft, just before it is signed off).
//!
//! So an import drops them inside its own transaction and creates them again, from
//! the very text the schema holds, before that transaction commits. No other
//! connection can write meanwhile (the transaction holds the write lock), none ever
//! reads a schema without them, and if anything fails the rollback brings them back.

use rusqlite::{OptionalExtension, Transaction};

use super::error::Result;

/// The triggers an import lifts (names as in schema.sql).
const INSERT_GUARDS: [&str; 3] = [
    "batches_version_matches_recipe",
    "batch_lines_insert_open",
    "batches_final_is_final",
];

/// Runs `work` with the insert-time guards dropped, then creates them again from the
/// SQL they had. On an error the guards are not recreated here: the caller's
/// transaction must then be rolled back, which restores them.
pub(crate) fn without_insert_guards<T>(
    tx: &Transaction,
    work: impl FnOnce() -> Result<T>,
) -> Result<T> {
    let mut lifted = Vec::with_capacity(INSERT_GUARDS.len());
    for name in INSERT_GUARDS {
        let sql: Option<String> = tx
            .query_row(
                "SELECT sql FROM sqlite_schema WHERE type = 'trigger' AND name = ?1",
                [name],
                |r| r.get(0),
            )
            .optional()?;
        if let Some(sql) = sql {
            // The name is one of the literals above, never input.
            tx.execute_batch(&format!("DROP TRIGGER {name}"))?;
            lifted.push(sql);
        }
    }
    let value = work()?;
    for sql in &lifted {
        tx.execute_batch(sql)?;
    }
    Ok(value)
}

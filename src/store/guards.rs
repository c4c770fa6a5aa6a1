//! The insert-time guards, lifted for the length of one bulk write: two triggers
//! (inside its transaction) and foreign-key enforcement (on its connection).
//!
//! Four triggers in the schema check each new row: a batch's recipe version belongs
//! to its recipe, and no line, reading or note is added to a final batch. Each
//! firing runs a small sub-program; on an import they were about a fifth of the
//! work, though every record an import writes passes them by construction: its
//! version ids come from one row of `recipe_versions`, and its lines, readings and
//! notes belong to a record the same transaction has just written whole, draft or
//! signed off (readings and notes after sign-off are on its trail, not in those
//! tables). The triggers that refuse updates and deletes stay in place: an import
//! only inserts.
//!
//! So an import drops them inside its own transaction and creates them again, from
//! the very text the schema holds, before that transaction commits. No other
//! connection can write meanwhile (the transaction holds the write lock), none ever
//! reads a schema without them, and if anything fails the rollback brings them back.

use rusqlite::{Connection, OptionalExtension, Transaction};

use super::error::Result;

/// The triggers an import lifts (names as in schema.sql).
const INSERT_GUARDS: [&str; 4] = [
    "batches_version_matches_recipe",
    "batch_lines_insert_open",
    "measurements_insert_open",
    "batch_notes_insert_open",
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

/// Runs `work` with foreign keys unenforced on `conn`, then enforces them again.
/// SQLite reads this setting per connection and only between transactions, so no
/// other connection is affected and no transaction sees it change. An import uses
/// it: each row it writes points at a batch of the same transaction (with the row id
/// it was just given) or at a recipe version it has just looked up or added, and
/// `gelu db check` runs SQLite's foreign-key check over the whole file.
pub(crate) fn without_foreign_keys<T>(
    conn: &mut Connection,
    work: impl FnOnce(&mut Connection) -> Result<T>,
) -> Result<T> {
    conn.pragma_update(None, "foreign_keys", false)?;
    let out = work(conn);
    conn.pragma_update(None, "foreign_keys", true)?;
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::store::error::StoreError;

    #[test]
    fn foreign_keys_are_enforced_again_after_the_work_even_when_it_fails() {
        let mut conn = Connection::open_in_memory().unwrap();
        conn.execute_batch(
            "PRAGMA foreign_keys = ON;
             CREATE TABLE p (id INTEGER PRIMARY KEY);
             CREATE TABLE c (p INTEGER REFERENCES p(id));",
        )
        .unwrap();
        let failed: Result<()> = without_foreign_keys(&mut conn, |conn| {
            conn.execute("INSERT INTO c VALUES (7)", [])?;
            Err(StoreError::Invalid("stop".into()))
        });
        assert!(failed.is_err());
        let on: bool = conn
            .query_row("PRAGMA foreign_keys", [], |r| r.get(0))
            .unwrap();
        assert!(on);
        assert!(conn.execute("INSERT INTO c VALUES (8)", []).is_err());
    }
}

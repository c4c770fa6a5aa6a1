//! Whether every protection of the schema is in place: each table (with its
//! constraints), index and trigger exactly as gelu's migrations made it, nothing
//! missing, nothing rewritten, nothing added. The expected schema is built afresh
//! in memory from `schema.sql`, up to the version the file says it has.

use rusqlite::Connection;

use super::error::Result;
use super::migrate::migrations;

/// The schema objects that matter, by (type, name): their SQL as stored.
fn objects(conn: &Connection) -> Result<Vec<(String, String, String)>> {
    // FTS5 keeps its own shadow tables, whose text is SQLite's, not ours.
    Ok(conn
        .prepare(
            "SELECT type, name, sql FROM sqlite_schema
             WHERE sql IS NOT NULL AND name NOT LIKE 'sqlite_%'
               AND name NOT LIKE 'batch_search_%'
             ORDER BY type, name",
        )?
        .query_map([], |r| Ok((r.get(0)?, r.get(1)?, r.get(2)?)))?
        .collect::<rusqlite::Result<_>>()?)
}

/// The schema gelu's migrations make, up to `version`.
fn expected(version: i64) -> Result<Vec<(String, String, String)>> {
    let conn = Connection::open_in_memory()?;
    for m in migrations().iter().filter(|m| m.version <= version) {
        conn.execute_batch(m.sql)?;
    }
    objects(&conn)
}

/// One sentence per table, index or trigger that is missing, differs from what
/// gelu made, or was added by someone else.
pub(crate) fn problems(conn: &Connection, version: i64) -> Result<Vec<String>> {
    let want = expected(version)?;
    let have = objects(conn)?;
    let mut out = Vec::new();
    for (kind, name, sql) in &want {
        match have.iter().find(|(k, n, _)| k == kind && n == name) {
            None => out.push(format!(
                "schema: the {kind} {name} is missing: a protection of the log is gone"
            )),
            Some((_, _, found)) if found != sql => out.push(format!(
                "schema: the {kind} {name} differs from the one gelu made: it was changed outside gelu"
            )),
            Some(_) => {}
        }
    }
    for (kind, name, _) in &have {
        if !want.iter().any(|(k, n, _)| k == kind && n == name) {
            out.push(format!(
                "schema: the {kind} {name} is not one gelu made: it was added outside gelu"
            ));
        }
    }
    Ok(out)
}

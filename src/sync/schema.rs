//! The hub's schema (`hub.sql`, embedded), versioned like the local one: a list of
//! `-- migration N` sections, the version kept in `gelu.meta`. The first sync sets it
//! up; a later gelu upgrades it; a hub newer than the program is refused untouched.
//! Setting up and upgrading run in one transaction under a lock, so terminals that
//! sync at once do it once.

use postgres::{Client, GenericClient};

use super::SyncError;
use crate::store::migrate::{Migration, parse_migrations};

/// The hub's schema, as shipped.
pub const HUB_SQL: &str = include_str!("hub.sql");

/// The lock that setting up or upgrading the hub takes.
const SCHEMA_LOCK: i64 = 1_734_700_150;

/// The shipped sections.
pub fn migrations() -> Vec<Migration<'static>> {
    parse_migrations(HUB_SQL)
}

/// The hub schema version this build writes.
pub fn latest_version() -> i64 {
    migrations().last().map_or(0, |m| m.version)
}

/// The version the hub has (0: not set up). Read from the catalog tables with the
/// statement's snapshot (not the cached catalog), so a schema another terminal has
/// just committed is seen.
fn found_version(client: &mut impl GenericClient) -> Result<i64, postgres::Error> {
    let row = client.query_one(
        "SELECT EXISTS (SELECT 1 FROM pg_catalog.pg_class c
                        JOIN pg_catalog.pg_namespace n ON n.oid = c.relnamespace
                        WHERE n.nspname = 'gelu' AND c.relname = 'meta')",
        &[],
    )?;
    if !row.get::<_, bool>(0) {
        return Ok(0);
    }
    let row = client.query_opt(
        "SELECT value FROM gelu.meta WHERE key = 'schema_version'",
        &[],
    )?;
    Ok(row
        .and_then(|r| r.get::<_, String>(0).parse().ok())
        .unwrap_or(0))
}

/// Checks the hub's schema, setting it up or upgrading it when older; returns the
/// hub's id.
pub fn ensure(client: &mut Client, server: &str) -> Result<String, SyncError> {
    let fail = |e| SyncError::from_pg(server, e, false);
    let supported = latest_version();
    let mut found = found_version(client).map_err(fail)?;
    if found < supported {
        // The lock is taken before the transaction begins, so the transaction sees
        // what a terminal that held it before has committed.
        client
            .execute("SELECT pg_advisory_lock($1)", &[&SCHEMA_LOCK])
            .map_err(fail)?;
        let set_up = set_up(client, server, supported);
        client
            .execute("SELECT pg_advisory_unlock($1)", &[&SCHEMA_LOCK])
            .map_err(fail)?;
        found = set_up?;
    }
    if found > supported {
        return Err(SyncError::TooNew {
            server: server.to_owned(),
            found,
            supported,
        });
    }
    let row = client
        .query_one("SELECT value FROM gelu.meta WHERE key = 'hub_id'", &[])
        .map_err(fail)?;
    Ok(row.get(0))
}

/// Sets up or upgrades the hub in one transaction (the caller holds the lock);
/// returns the version it then has.
fn set_up(client: &mut Client, server: &str, supported: i64) -> Result<i64, SyncError> {
    let fail = |e| SyncError::from_pg(server, e, false);
    let mut tx = client.transaction().map_err(fail)?;
    let found = found_version(&mut tx).map_err(fail)?;
    if found >= supported {
        return Ok(found);
    }
    for step in migrations().iter().filter(|m| m.version > found) {
        tx.batch_execute(step.sql)
            .map_err(|e| set_up_failed(server, e))?;
    }
    tx.execute(
        "INSERT INTO gelu.meta (key, value) VALUES ('schema_version', $1)
         ON CONFLICT (key) DO UPDATE SET value = excluded.value",
        &[&supported.to_string()],
    )
    .map_err(|e| set_up_failed(server, e))?;
    tx.commit().map_err(fail)?;
    Ok(supported)
}

fn set_up_failed(server: &str, e: postgres::Error) -> SyncError {
    match e.as_db_error() {
        // insufficient_privilege
        Some(db) if db.code().code() == "42501" => SyncError::NotSetUp {
            server: server.to_owned(),
            detail: db.message().to_owned(),
        },
        _ => SyncError::from_pg(server, e, false),
    }
}

#[cfg(test)]
mod tests {
    #[test]
    fn hub_sections_are_numbered_one_to_n() {
        let steps = super::migrations();
        assert!(!steps.is_empty());
        for (i, m) in steps.iter().enumerate() {
            assert_eq!(m.version, i as i64 + 1);
        }
    }
}

//! This log's site code: read it, and rename it while no batch carries it yet and the
//! log has never synchronised (after that, codes and the hub know it by its name).

use rusqlite::{Connection, OptionalExtension, params};

use super::Store;
use super::error::{Result, StoreError};
use crate::batch::shared::check_site_code;

/// The settings key of the site code.
pub const SITE_CODE_KEY: &str = "site_code";

/// The settings key of the hub's address (never with a password).
pub const SYNC_URL_KEY: &str = "sync_url";

/// The site code (migration 4 gives every log one).
pub(crate) fn site_code(conn: &Connection) -> Result<String> {
    conn.prepare_cached("SELECT value FROM settings WHERE key = ?1")?
        .query_row([SITE_CODE_KEY], |r| r.get(0))
        .optional()?
        .ok_or_else(|| StoreError::Invalid("this batch log has no site code".into()))
}

/// The prefix of batch codes written here: `B-YYYYMMDD-SITE-`, so that a GLOB on it
/// finds only this site's codes of that day.
pub(crate) fn code_prefix(site: &str, day: &str) -> String {
    format!("B-{day}-{site}-")
}

impl Store {
    /// This log's site code.
    pub fn site_code(&self) -> Result<String> {
        site_code(&self.conn)
    }

    /// Why the site code can no longer change, if it cannot.
    pub fn site_code_fixed(&self) -> Result<Option<String>> {
        fixed(&self.conn)
    }

    /// Renames this log's site; refused once a batch carries the code or the log has
    /// synchronised. Returns the code as stored (capitals).
    pub fn set_site_code(&mut self, text: &str) -> Result<String> {
        let code = check_site_code(text)?;
        self.write(|tx| {
            if let Some(why) = fixed(tx)? {
                return Err(StoreError::Invalid(why));
            }
            tx.execute(
                "INSERT INTO settings (key, value) VALUES (?1, ?2)
                 ON CONFLICT (key) DO UPDATE SET value = excluded.value",
                params![SITE_CODE_KEY, code],
            )?;
            Ok(code.clone())
        })
    }
}

fn fixed(conn: &Connection) -> Result<Option<String>> {
    let site = site_code(conn)?;
    let written: bool = conn.query_row(
        "SELECT EXISTS (SELECT 1 FROM batches WHERE code GLOB ?1)",
        [format!("B-[0-9]*-{site}-[0-9]*")],
        |r| r.get(0),
    )?;
    if written {
        return Ok(Some(format!(
            "the site code {site} is fixed: batches were written under it"
        )));
    }
    let synced: bool = conn.query_row(
        "SELECT EXISTS (SELECT 1 FROM sync_state WHERE key = 'hub')",
        [],
        |r| r.get(0),
    )?;
    Ok(
        synced
            .then(|| format!("the site code {site} is fixed: this log has synchronised under it")),
    )
}

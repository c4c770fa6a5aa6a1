//! The batch log: a local SQLite file holding recipes and their immutable
//! versions, batches with their lines, lots, measurements, notes, predictions
//! and the append-only amendment trail, plus settings. This is the only module that
//! speaks SQLite and it holds no domain logic: it keeps and hands out the batch
//! domain's plain types ([`crate::batch::Batch`], [`crate::batch::BatchSummary`], ...).
//!
//! - [`open`]: where the file lives, what is refused, connection settings.
//! - [`migrate`]: the forward-only migrations of `schema.sql`.
//! - [`tx`]: immediate write transactions with a bounded retry.
//! - `recipes`, `batches`, `records`: writing records; `record`, `list`: reading them.
//! - `import` (with `guards` and `checkpoint`): JSON Lines in; [`Store::each_batch`]: out.
//! - `calibrations`: the versions of the corrections fitted from batches, and
//!   the switches that put them in force.
//! - `site`: this log's site code. `outbox` (what waits to be sent to the hub),
//!   `pulled` (writing what came from it), `conflicts`: what `crate::sync` needs.
//!
//! Every write is one transaction: a crash or a refused request leaves nothing half
//! written. Final records are never updated in place; triggers in the schema enforce it.

pub mod backup;
mod batches;
mod calibrations;
mod checkpoint;
mod columns;
mod conflicts;
mod error;
mod export;
mod guards;
mod import;
mod list;
pub mod migrate;
pub mod open;
mod outbox;
mod pulled;
mod recipes;
mod record;
mod records;
mod rows;
mod search;
mod seed;
mod settings;
mod site;
mod sync_types;
pub mod tx;
mod types;

use std::path::{Path, PathBuf};

use rusqlite::Connection;

pub use calibrations::{CalibrationSwitch, CalibrationVersion, scope_words};
pub use error::{Result, StoreError};
pub use settings::{CABINET_TEMP_KEY, FREEZER_TEMP_KEY};
pub use site::{SITE_CODE_KEY, SYNC_URL_KEY};
pub use sync_types::*;
pub use types::*;

/// An open batch log.
pub struct Store {
    conn: Connection,
    path: PathBuf,
    migrated: migrate::Migrated,
}

impl std::fmt::Debug for Store {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Store").field("path", &self.path).finish()
    }
}

impl Store {
    /// Opens the batch log at `path`, creating, migrating and (when new) seeding it.
    pub fn open(path: &Path) -> Result<Store> {
        let mut conn = open::connect(path)?;
        let migrated =
            migrate::migrate(&mut conn, path, &migrate::migrations(), &seed::seed_samples)?;
        Ok(Store {
            conn,
            path: path.to_path_buf(),
            migrated,
        })
    }

    /// Opens an existing batch log to read only: nothing is created, migrated or
    /// written, and a log of an older schema is read as it is. `None` when the
    /// file holds no log yet.
    pub fn open_read_only(path: &Path) -> Result<Option<Store>> {
        let (conn, version) = open::connect_read_only(path)?;
        if version == 0 {
            return Ok(None);
        }
        Ok(Some(Store {
            conn,
            path: path.to_path_buf(),
            migrated: migrate::Migrated {
                from: version,
                to: version,
                backup: None,
            },
        }))
    }

    /// Opens the batch log in the platform's data directory, creating the folder.
    pub fn open_default() -> Result<Store> {
        let path = open::default_path()?;
        if let Some(dir) = path.parent() {
            std::fs::create_dir_all(dir).map_err(|source| StoreError::Io {
                path: dir.to_path_buf(),
                source,
            })?;
        }
        Store::open(&path)
    }

    /// The database file.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// The schema version the file had before this open, and the backup made, if any.
    pub fn migration(&self) -> &migrate::Migrated {
        &self.migrated
    }

    /// Runs SQLite's integrity and foreign-key checks and checks that every analysis
    /// prediction is JSON; returns the problems found.
    pub fn check(&self) -> Result<Vec<String>> {
        let mut problems = Vec::new();
        let mut integrity = self.conn.prepare("PRAGMA integrity_check")?;
        let rows = integrity.query_map([], |r| r.get::<_, String>(0))?;
        for row in rows {
            let line = row?;
            if line != "ok" {
                problems.push(format!("integrity: {line}"));
            }
        }
        let mut fk = self.conn.prepare("PRAGMA foreign_key_check")?;
        let rows = fk.query_map([], |r| {
            Ok(format!(
                "foreign key: row {} of {} points to a missing row of {}",
                r.get::<_, Option<i64>>(1)?.unwrap_or(-1),
                r.get::<_, String>(0)?,
                r.get::<_, String>(2)?
            ))
        })?;
        for row in rows {
            problems.push(row?);
        }
        // The store checks each prediction as it writes it; the schema does not (see
        // migration 2), so this is where a prediction written by other means shows up.
        let mut predictions = self.conn.prepare(
            "SELECT batch_id FROM batch_predictions WHERE NOT json_valid(analysis) ORDER BY batch_id",
        )?;
        let rows = predictions.query_map([], |r| r.get::<_, i64>(0))?;
        for row in rows {
            problems.push(format!(
                "prediction: the prediction of batch row {} is not valid JSON",
                row?
            ));
        }
        let version = migrate::user_version(&self.conn)?;
        if version != migrate::latest_version() {
            problems.push(format!(
                "schema version is {version}, expected {}",
                migrate::latest_version()
            ));
        }
        Ok(problems)
    }

    /// Writes a consistent copy to `dest` (SQLite's online backup; safe while others write).
    pub fn backup_to(&self, dest: &Path) -> Result<()> {
        backup::copy_to(&self.conn, dest)
    }

    /// Runs `work` in one immediate write transaction, retried when busy.
    fn write<T>(&mut self, work: impl FnMut(&rusqlite::Transaction) -> Result<T>) -> Result<T> {
        tx::write(&mut self.conn, &self.path, work)
    }
}

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
mod protections;
mod pulled;
mod recipes;
mod record;
mod records;
mod rows;
mod seals;
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

/// What runs inside a migration besides its SQL: the seed of a new log, and the
/// seals of records signed off before seals were kept.
const HOOKS: migrate::Hooks<'static> = migrate::Hooks {
    seed: &seed::seed_samples,
    after: &seals::seal_unsealed,
};

impl Store {
    /// Opens the batch log at `path`, migrating it; a path where no file exists
    /// gets a new log, seeded with the sample recipes. An empty file is refused.
    pub fn open(path: &Path) -> Result<Store> {
        let mut created = false;
        if !path.exists() {
            created = open::create(path, |conn, at| {
                migrate::migrate(conn, at, &migrate::migrations(), &HOOKS).map(drop)
            })?;
        }
        let mut conn = open::connect(path)?;
        let mut migrated = migrate::migrate(&mut conn, path, &migrate::migrations(), &HOOKS)?;
        if created {
            migrated.from = 0;
        }
        Ok(Store {
            conn,
            path: path.to_path_buf(),
            migrated,
        })
    }

    /// Opens an existing batch log to read only: nothing is created, migrated or
    /// written, and a log of an older schema is read as it is (for commands that
    /// only read, and for a log that cannot be written). `None` when the file holds
    /// no log yet.
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

    /// Runs SQLite's integrity and foreign-key checks; checks that every analysis
    /// prediction is JSON, that every protection of the schema is in place as gelu
    /// made it, that every recipe version's text matches its hash, and that every
    /// signed-off record matches its seals; returns the problems found, one
    /// sentence each, naming the record, version or schema object.
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
                "schema version is {version}, expected {} (open the log once with write access to upgrade it)",
                migrate::latest_version()
            ));
        }
        problems.extend(protections::problems(&self.conn, version)?);
        let mut versions = self.conn.prepare(
            "SELECT r.name, v.version, v.content_hash, v.text FROM recipe_versions v
             JOIN recipes r ON r.id = v.recipe_id ORDER BY r.name, v.version",
        )?;
        let rows = versions.query_map([], |r| {
            Ok(crate::batch::RecipeVersion {
                recipe: r.get(0)?,
                version: r.get(1)?,
                content_hash: r.get(2)?,
                text: r.get(3)?,
            })
        })?;
        for row in rows {
            let v = row?;
            if crate::batch::version::content_hash(&v.text) != v.content_hash {
                problems.push(format!(
                    "recipe `{}` version {}: its text no longer matches its hash: it was changed outside gelu",
                    v.recipe, v.version
                ));
            }
        }
        let sealed: bool = self.conn.query_row(
            "SELECT EXISTS (SELECT 1 FROM sqlite_schema WHERE name = 'batch_seals')",
            [],
            |r| r.get(0),
        )?;
        if sealed {
            problems.extend(seals::problems(&self.conn)?);
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

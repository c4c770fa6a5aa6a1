//! Copies of the database through SQLite's online backup API: consistent even
//! while other processes write, and never over an existing file.

use std::path::{Path, PathBuf};
use std::time::Duration;

use rusqlite::Connection;
use rusqlite::backup::{Backup, StepResult};

use super::error::{Result, StoreError};
use crate::clock;

/// How many times a backup step that met a lock is tried again.
const BUSY_STEPS: u32 = 200;

/// Writes a consistent copy of the open database to `dest`, which must not exist yet.
pub fn copy_to(conn: &Connection, dest: &Path) -> Result<()> {
    if dest.exists() {
        return Err(StoreError::Invalid(format!(
            "{} already exists; a backup never replaces a file, so choose a new name",
            dest.display()
        )));
    }
    let mut target = Connection::open(dest).map_err(|e| super::error::classify(dest, e))?;
    let backup = Backup::new(conn, &mut target)?;
    let mut busy = 0;
    loop {
        // -1: copy every page in one step, so writers cannot make it start over.
        match backup.step(-1)? {
            StepResult::Done => break,
            StepResult::More => {}
            StepResult::Busy | StepResult::Locked => {
                busy += 1;
                if busy > BUSY_STEPS {
                    return Err(StoreError::Busy {
                        path: dest.to_path_buf(),
                    });
                }
                std::thread::sleep(Duration::from_millis(25));
            }
            _ => {}
        }
    }
    Ok(())
}

/// Writes a copy beside `path`, named after the schema version and the time, before
/// a migration. Returns the copy's path.
pub fn beside(conn: &Connection, path: &Path, version: i64) -> Result<PathBuf> {
    let stamp = clock::now().format("%Y%m%dT%H%M%S%.3fZ");
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "gelu.db".to_owned());
    let dest = path.with_file_name(format!("{name}.schema-v{version}.{stamp}.bak"));
    copy_to(conn, &dest)?;
    Ok(dest)
}

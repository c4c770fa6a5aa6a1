//! `gelu db ...`: where the batch log is, checking it, and backing it up. Also the
//! one place the command line opens the store (`--db`, `GELU_DB`, or the default).

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use std::io::Write;

use anyhow::Context;

use crate::report::inert::inert;
use crate::store::{Store, StoreError, open};

/// Arguments of `gelu db`.
#[derive(Debug, clap::Args)]
pub struct DbArgs {
    /// What to do.
    #[command(subcommand)]
    pub command: DbCommand,
}

/// The `gelu db` subcommands.
#[derive(Debug, clap::Subcommand)]
pub enum DbCommand {
    /// Print the batch log's file path.
    Path,
    /// Check the log: SQLite's integrity and foreign-key checks, every protection of
    /// the schema, and every signed-off record against its seal (exit 1 on a problem).
    Check,
    /// Write a consistent copy to PATH (safe while others write).
    Backup {
        /// Where to write the copy; must not exist yet.
        path: PathBuf,
    },
}

/// The database file the command line uses.
pub fn resolve_path(db: Option<&Path>) -> anyhow::Result<PathBuf> {
    match db {
        Some(p) => Ok(p.to_path_buf()),
        None => Ok(open::default_path()?),
    }
}

/// Opens the batch log the command line uses (creating and seeding it when new).
pub fn open_store(db: Option<&Path>) -> anyhow::Result<Store> {
    let store = match db {
        Some(p) => Store::open(p)?,
        None => Store::open_default()?,
    };
    if let Some(notice) = store.migration().notice(store.path()) {
        eprintln!("gelu: {}", inert(&notice));
    }
    Ok(store)
}

/// Opens the batch log for a command that only reads: as [`open_store`] does, or,
/// when the log cannot be written, read-only as it is.
pub fn open_for_reading(db: Option<&Path>) -> anyhow::Result<Store> {
    match open_store(db) {
        Err(e) if matches!(e.downcast_ref(), Some(StoreError::ReadOnly { .. })) => {
            let path = resolve_path(db)?;
            Store::open_read_only(&path)?
                .ok_or_else(|| anyhow::anyhow!("{} holds no batch log yet", path.display()))
        }
        other => other,
    }
}

/// Runs `gelu db`.
pub fn run(args: &DbArgs, db: Option<&Path>) -> anyhow::Result<ExitCode> {
    match &args.command {
        DbCommand::Path => {
            writeln!(std::io::stdout(), "{}", resolve_path(db)?.display())?;
            Ok(ExitCode::SUCCESS)
        }
        DbCommand::Check => {
            let path = resolve_path(db)?;
            if !path.exists() {
                anyhow::bail!(
                    "there is no batch log at {}; nothing to check",
                    path.display()
                );
            }
            let opened = match Store::open(&path) {
                Err(StoreError::ReadOnly { .. }) => Store::open_read_only(&path).and_then(|s| {
                    s.ok_or_else(|| {
                        StoreError::Invalid(format!("{} holds no batch log yet", path.display()))
                    })
                }),
                other => other,
            };
            let problems = match opened {
                Ok(store) => store.check()?,
                Err(e @ (StoreError::Corrupt { .. } | StoreError::NotADatabase { .. })) => {
                    vec![e.to_string()]
                }
                Err(e) => return Err(e.into()),
            };
            let mut out = std::io::stdout().lock();
            let shown = inert(&path.display().to_string()).into_owned();
            if problems.is_empty() {
                writeln!(out, "{shown}: ok")?;
                Ok(ExitCode::SUCCESS)
            } else {
                for p in &problems {
                    writeln!(out, "{shown}: {}", inert(p))?;
                }
                eprintln!(
                    "gelu: {} problem(s) found. Do not write to this file; copy it somewhere safe \
                     and restore from a backup.",
                    problems.len()
                );
                Ok(ExitCode::from(1))
            }
        }
        DbCommand::Backup { path } => {
            let store = open_store(db)?;
            store
                .backup_to(path)
                .with_context(|| format!("backing up {}", store.path().display()))?;
            writeln!(std::io::stdout(), "{}", path.display())?;
            Ok(ExitCode::SUCCESS)
        }
    }
}

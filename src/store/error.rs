//! The errors of the batch log. Each message says what happened, what to check,
//! and whether the user's data is safe (it always is: the store never writes half a
//! record, because every write is one transaction).

use std::path::PathBuf;

/// Everything that can go wrong opening or using the batch log.
#[derive(Debug, thiserror::Error)]
pub enum StoreError {
    /// The file was made by a newer gelu whose schema this one does not know.
    #[error(
        "{path} was made by a newer gelu (schema version {found}; this gelu knows up to version {supported}). \
         Nothing was changed: the data is untouched. Use the newer gelu, or point --db (or GELU_DB) at another file."
    )]
    TooNew {
        /// The database file.
        path: PathBuf,
        /// Schema version found in the file.
        found: i64,
        /// Newest schema version this build knows.
        supported: i64,
    },
    /// The file is an SQLite database of some other program.
    #[error(
        "{path} is an SQLite database but not a gelu batch log. Nothing was changed. \
         Check the --db path (or GELU_DB)."
    )]
    NotGelu {
        /// The database file.
        path: PathBuf,
    },
    /// The file is not an SQLite database at all (or its header is destroyed).
    #[error(
        "{path} is not a gelu batch log (it is not an SQLite database, or its header is damaged). \
         Nothing was changed. Check the --db path (or GELU_DB); if it was a batch log, restore it from a backup."
    )]
    NotADatabase {
        /// The file.
        path: PathBuf,
    },
    /// SQLite found damage inside the file.
    #[error(
        "{path} is damaged ({detail}). Nothing more was written to it. Copy the file somewhere safe, \
         run `gelu db check`, and restore from a backup if it fails."
    )]
    Corrupt {
        /// The database file.
        path: PathBuf,
        /// What SQLite reported.
        detail: String,
    },
    /// The file is empty: a batch log never is, so this one was truncated.
    #[error(
        "{path} is an empty file (0 bytes), not a batch log. Nothing was changed. If it was your \
         batch log, it has been cut short: restore it from a backup (gelu keeps a copy beside the \
         log before each upgrade; `gelu db backup` makes others). To start a new log, give a path \
         where no file exists."
    )]
    EmptyFile {
        /// The file.
        path: PathBuf,
    },
    /// The file or its folder cannot be written.
    #[error(
        "{path} cannot be written (the file, its folder, or its -wal/-shm files are read-only). \
         Nothing was changed. Check the permissions, or use a copy with --db."
    )]
    ReadOnly {
        /// The database file.
        path: PathBuf,
    },
    /// The file could not be opened or created at all.
    #[error(
        "{path} could not be opened or created. Nothing was changed. Check that its folder exists \
         and can be written, or give another file with --db (or GELU_DB)."
    )]
    CannotOpen {
        /// The database file.
        path: PathBuf,
    },
    /// Other gelu processes held the database for too long.
    #[error(
        "{path} stayed busy (other gelu processes were writing) and the change was not made; \
         nothing was written. Try again."
    )]
    Busy {
        /// The database file.
        path: PathBuf,
    },
    /// No platform data directory could be found for the default database.
    #[error(
        "no data directory was found for the default batch log; give one with --db PATH or GELU_DB"
    )]
    NoDataDir,
    /// A file next to the database (a backup, an export) could not be read or written.
    #[error("{path}: {source}. The batch log itself was not changed.")]
    Io {
        /// The file.
        path: PathBuf,
        /// The operating system's error.
        source: std::io::Error,
    },
    /// An import stopped before the end of its input: the records of the
    /// transactions before were written and stay; nothing at or after `line` was.
    #[error("{}", import_stopped(*.line, .report, .cause))]
    ImportStopped {
        /// The 1-based line it stopped at.
        line: usize,
        /// What it did before it stopped.
        report: super::types::ImportReport,
        /// Why it stopped.
        cause: String,
    },
    /// No batch has this code.
    #[error("no batch has the code {code}; `gelu batch list` shows the codes")]
    NoSuchBatch {
        /// The code asked for.
        code: String,
    },
    /// A request the store refuses, such as an empty amendment reason.
    #[error("{0}. Nothing was written.")]
    Invalid(String),
    /// Any other database error.
    #[error("database error: {0}. The change was not made; data already saved is safe.")]
    Sql(#[from] rusqlite::Error),
}

/// What an import that stopped tells the user: where, why, what it wrote, and how
/// to go on.
fn import_stopped(line: usize, report: &super::types::ImportReport, cause: &str) -> String {
    let cause = cause.trim_end_matches('.');
    match report.imported {
        0 => format!(
            "the import stopped at line {line}: {cause}. No record was written to the batch log."
        ),
        n => format!(
            "the import stopped at line {line}: {cause}. {n} {} written before it stopped and \
             stay in the batch log; run the same import again to resume (codes already present \
             are skipped).",
            if n == 1 { "record was" } else { "records were" }
        ),
    }
}

/// Shorthand for results of the store.
pub type Result<T, E = StoreError> = std::result::Result<T, E>;

/// Whether an SQLite error means "another connection holds the lock".
pub(crate) fn is_busy(e: &rusqlite::Error) -> bool {
    matches!(
        e.sqlite_error_code(),
        Some(rusqlite::ErrorCode::DatabaseBusy | rusqlite::ErrorCode::DatabaseLocked)
    )
}

/// Turns low-level errors about the file itself into the clear messages above.
pub(crate) fn classify(path: &std::path::Path, e: rusqlite::Error) -> StoreError {
    let path = path.to_path_buf();
    match e.sqlite_error_code() {
        Some(rusqlite::ErrorCode::NotADatabase) => StoreError::NotADatabase { path },
        Some(rusqlite::ErrorCode::DatabaseCorrupt) => StoreError::Corrupt {
            path,
            detail: e.to_string(),
        },
        Some(rusqlite::ErrorCode::ReadOnly) => StoreError::ReadOnly { path },
        Some(rusqlite::ErrorCode::CannotOpen) => StoreError::CannotOpen { path },
        Some(rusqlite::ErrorCode::DatabaseBusy | rusqlite::ErrorCode::DatabaseLocked) => {
            StoreError::Busy { path }
        }
        _ => StoreError::Sql(e),
    }
}

impl From<crate::batch::Invalid> for StoreError {
    fn from(e: crate::batch::Invalid) -> Self {
        StoreError::Invalid(e.0)
    }
}

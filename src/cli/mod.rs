//! The command line: clap definitions (the raw flags as typed) and the
//! subcommands, which resolve them into typed options for the library.
//! Only this module and `main` decide exit codes: 0 done, 1 done with refusals
//! (a file that could not be reported, an import line refused, a check that found
//! a problem), 2 an error, 141 output into a closed pipe (quietly). Text from
//! files and records is shown inert ([`crate::report::inert`]).

mod balance;
mod batch;
mod characterise;
mod db;
pub mod own;
mod report;
pub mod sync;

use std::path::PathBuf;
use std::process::ExitCode;

use clap::{Parser, Subcommand};

/// gelu: formulate frozen desserts and liqueurs, predict how they freeze, and log their batches.
#[derive(Debug, Parser)]
#[command(name = "gelu", version, about, long_about = None)]
pub struct Cli {
    /// The batch-log database file (default: the platform's data directory; also GELU_DB).
    #[arg(long, global = true, env = "GELU_DB", value_name = "PATH")]
    pub db: Option<PathBuf>,
    /// What to do; with none, open the workspace.
    #[command(subcommand)]
    pub command: Option<Command>,
}

/// The subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Analyse recipe files: freezing point, frozen share, composition, warnings.
    Report(report::ReportArgs),
    /// Characterise an ingredient from measured freezing points of known dilutions.
    Characterise(characterise::CharacteriseArgs),
    /// Balance recipe files: new amounts that reach their targets.
    Balance(balance::BalanceArgs),
    /// The batch log: record, list, show, measure, finalize, amend, export, import.
    Batch(batch::BatchArgs),
    /// The batch-log database: path, check, backup.
    Db(db::DbArgs),
    /// Synchronise the batch log with the hub (a PostgreSQL server): send what it
    /// lacks, receive what the log lacks; --status says what waits.
    Sync(sync::SyncArgs),
    /// This log's site code (carried by new batch codes); give one to rename it.
    Site(sync::SiteArgs),
    /// Open a recipe file in the workspace.
    Edit {
        /// The recipe file (TOML).
        file: PathBuf,
    },
}

fn workspace(db: Option<PathBuf>, file: Option<PathBuf>) -> anyhow::Result<ExitCode> {
    use std::io::IsTerminal;
    if !std::io::stdin().is_terminal() || !std::io::stdout().is_terminal() {
        anyhow::bail!(
            "the workspace needs a terminal (its input and output are not one here): run it in a \
             terminal window or over SSH with a terminal; for a recipe's figures as plain text, \
             use `gelu report FILE`, and for the batch log `gelu batch`"
        );
    }
    crate::tui::run(&crate::tui::Launch { db, file }).map(|()| ExitCode::SUCCESS)
}

/// The exit code of a command whose reader went away (output into a closed pipe,
/// as `gelu batch list | head -1` does): 128 + SIGPIPE, what a shell reports for
/// the tools that end on that signal. Nothing is printed.
const CLOSED_PIPE: u8 = 141;

/// Whether an error comes from writing into a pipe nobody reads any more.
fn closed_pipe(e: &anyhow::Error) -> bool {
    e.chain().any(|cause| {
        cause
            .downcast_ref::<std::io::Error>()
            .is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe)
    })
}

/// Parses the command line, runs it, and maps the outcome to an exit code.
pub fn run() -> ExitCode {
    let cli = Cli::parse();
    let outcome = match cli.command {
        Some(Command::Report(args)) => report::run(&args, cli.db.as_deref()),
        Some(Command::Characterise(args)) => characterise::run(&args),
        Some(Command::Balance(args)) => balance::run(&args, cli.db.as_deref()),
        Some(Command::Batch(args)) => batch::run(&args, cli.db.as_deref()),
        Some(Command::Db(args)) => db::run(&args, cli.db.as_deref()),
        Some(Command::Sync(args)) => sync::run(&args, cli.db.as_deref()),
        Some(Command::Site(args)) => sync::run_site(&args, cli.db.as_deref()),
        Some(Command::Edit { file }) => workspace(cli.db, Some(file)),
        // Without a terminal (a pipe, a script) print the sample report instead.
        None if !std::io::IsTerminal::is_terminal(&std::io::stdout()) => report::run_samples(),
        None => workspace(cli.db, None),
    };
    match outcome {
        Ok(code) => code,
        Err(e) if closed_pipe(&e) => ExitCode::from(CLOSED_PIPE),
        Err(e) => {
            eprintln!("gelu: {}", crate::report::inert::inert(&format!("{e:#}")));
            ExitCode::from(2)
        }
    }
}

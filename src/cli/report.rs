//! `gelu report FILE...`: the analysis of recipe files as text or JSON lines.

use std::process::ExitCode;

/// Arguments of `gelu report`.
#[derive(Debug, clap::Args)]
pub struct ReportArgs {
    /// Recipe files (TOML).
    #[arg(required = true, value_name = "FILE")]
    pub files: Vec<std::path::PathBuf>,
}

/// Runs `gelu report`.
pub fn run(_args: &ReportArgs) -> anyhow::Result<ExitCode> {
    anyhow::bail!("report is being written")
}

/// Prints the analysis of the built-in sample recipes.
pub fn run_samples() -> anyhow::Result<ExitCode> {
    anyhow::bail!("report is being written")
}

//! `gelu balance FILE...`: new amounts that reach each file's targets. The
//! flags add to or override the file's `[balance]` table; the answer prints as
//! text or one JSON object per file per line; `--write` saves the new amounts
//! into the file (comments and layout kept), `-o OUT` writes the balanced
//! recipe to OUT. Exit code 0 when every file balances, 1 when any is
//! infeasible or cannot be read or balanced (the others still print), 2 on
//! bad usage.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use super::own::LogCorrections;
use crate::balance::{Balance, Objective, Request, Status, Target, balance, parse_target};
use crate::catalog::Catalog;
use crate::model::OwnItems;
use crate::model::Recipe;
use crate::recipe_file::{Expect, SaveError, parse_recipe_using, save_recipe};
use crate::report::balance::{balance_json, balance_text};

/// Arguments of `gelu balance`.
#[derive(Debug, clap::Args)]
pub struct BalanceArgs {
    /// Recipe files (TOML), each with its targets in a `[balance]` table or given here.
    #[arg(required = true, value_name = "FILE")]
    pub files: Vec<PathBuf>,
    /// One compact JSON object per file per line.
    #[arg(long)]
    pub json: bool,
    /// Save the new amounts into each balanced file, keeping its comments and layout.
    #[arg(long, conflicts_with = "output")]
    pub write: bool,
    /// Write the balanced recipe to OUT (one FILE only).
    #[arg(short = 'o', long = "output", value_name = "OUT")]
    pub output: Option<PathBuf>,
    /// A target, adding to or overriding the file's: NAME=VALUE, NAME=LOW..HIGH,
    /// NAME=..HIGH or NAME=LOW.. (fat_pct=6..9, abv_pct=25, frozen_at.-12=0.65..0.70); repeatable.
    #[arg(
        long = "target",
        value_name = "NAME=VALUE|LOW..HIGH",
        value_parser = target_arg,
        allow_hyphen_values = true
    )]
    pub targets: Vec<Target>,
    /// Only lines of this ingredient may change (instead of the file's `vary`); repeatable.
    #[arg(long = "vary", value_name = "ID")]
    pub vary: Vec<String>,
    /// What to make least: nearest (least change, the default) or cost (least cost).
    #[arg(long, value_name = "nearest|cost", value_parser = objective_arg)]
    pub objective: Option<Objective>,
}

fn target_arg(text: &str) -> Result<Target, String> {
    parse_target(text).map_err(|e| e.to_string())
}

fn objective_arg(text: &str) -> Result<Objective, String> {
    Objective::parse(text)
        .ok_or_else(|| format!("`{text}`: give nearest (least change) or cost (least cost)"))
}

/// The file's request with the command line's flags applied.
fn request_for(recipe: &Recipe, args: &BalanceArgs) -> Request {
    let mut request = recipe.balance.clone();
    for t in &args.targets {
        request.set_target(t.clone());
    }
    if !args.vary.is_empty() {
        request.vary = Some(args.vary.clone());
    }
    if let Some(o) = args.objective {
        request.objective = o;
    }
    request
}

/// What became of one file.
enum Outcome {
    /// Balanced (and written, if asked).
    Balanced,
    /// The targets cannot all hold.
    Infeasible,
    /// Not read, not balanced or not written.
    Failed,
}

fn fail(path: &Path, message: impl std::fmt::Display) -> Outcome {
    eprintln!("gelu: {}: {message}", path.display());
    Outcome::Failed
}

fn balance_file(
    path: &Path,
    args: &BalanceArgs,
    own: &OwnItems,
    log: &LogCorrections,
    out: &mut impl Write,
) -> anyhow::Result<Outcome> {
    let text = match std::fs::read_to_string(path) {
        Ok(t) => t,
        Err(e) => return Ok(fail(path, format!("cannot read the file: {e}"))),
    };
    // The user's own items from the batch log that the recipe uses are copied
    // into it (so a file written with --write or -o never depends on the log);
    // the recipe's own items are layered on the built-in catalog by balancing.
    let catalog = Catalog::builtin();
    let recipe = match parse_recipe_using(path, &text, own) {
        Ok((r, _)) => r,
        Err(e) => {
            eprintln!("gelu: {e}");
            return Ok(Outcome::Failed);
        }
    };
    let request = request_for(&recipe, args);
    if request.targets.is_empty() {
        return Ok(fail(
            path,
            "no targets: give them in the file's [balance] table or with --target NAME=VALUE",
        ));
    }
    let b = match balance(&recipe, catalog, &request) {
        Ok(b) => b,
        Err(e) => return Ok(fail(path, e)),
    };
    if args.json {
        let file = path.display().to_string();
        let calibrated = match &b.analysis {
            Some(a) => log.calibrated(&b.recipe, a).unwrap_or_default(),
            None => Vec::new(),
        };
        writeln!(out, "{}", balance_json(&file, &b, &calibrated))?;
    } else {
        writeln!(out, "{}", balance_text(&recipe, &b))?;
    }
    out.flush()?;
    Ok(match b.status {
        Status::Infeasible => {
            if args.write || args.output.is_some() {
                eprintln!(
                    "gelu: {}: nothing written: the targets cannot all be met",
                    path.display()
                );
            }
            Outcome::Infeasible
        }
        Status::Balanced => match write(path, &text, &b, args) {
            Ok(()) => Outcome::Balanced,
            Err(e) => {
                eprintln!("gelu: {e}");
                Outcome::Failed
            }
        },
    })
}

/// Writes the balanced recipe where the flags ask: back into the file, or to OUT.
fn write(path: &Path, text: &str, b: &Balance, args: &BalanceArgs) -> Result<(), SaveError> {
    let (target, expect) = match (&args.output, args.write) {
        (Some(out), _) => (out.as_path(), Expect::Anything),
        // Back into the file only if it still holds what was read.
        (None, true) => (path, Expect::Text(text)),
        (None, false) => return Ok(()),
    };
    let saved = save_recipe(target, Some(text), &b.recipe, expect)?;
    if !saved.kept_layout {
        eprintln!(
            "gelu: {}: written afresh (the file's comments and layout could not be kept)",
            target.display()
        );
    }
    Ok(())
}

/// Runs `gelu balance`.
pub fn run(args: &BalanceArgs, db: Option<&Path>) -> anyhow::Result<ExitCode> {
    if args.output.is_some() && args.files.len() > 1 {
        anyhow::bail!(
            "-o writes one balanced recipe: give one FILE, or use --write to save each file in place"
        );
    }
    let own = super::own::load_own_items(db).unwrap_or_else(|e| {
        eprintln!("gelu: your own items could not be read from the batch log: {e:#}");
        OwnItems::default()
    });
    let log = super::own::log_corrections(db);
    let stdout = std::io::stdout();
    let mut out = stdout.lock();
    let mut missed = 0usize;
    for path in &args.files {
        match balance_file(path, args, &own, &log, &mut out)? {
            Outcome::Balanced => {}
            Outcome::Infeasible | Outcome::Failed => missed += 1,
        }
    }
    if missed > 0 {
        eprintln!(
            "gelu: {missed} of {} recipe files could not be balanced",
            args.files.len()
        );
        return Ok(ExitCode::from(1));
    }
    Ok(ExitCode::SUCCESS)
}

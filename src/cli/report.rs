//! `gelu report FILE...`: the analysis of recipe files as text or JSON lines.
//! A bad file is reported on stderr with its line and column; the others still
//! report, and the exit code is 1.

use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use super::own::LogCorrections;
use crate::analysis::{Options, analyze};
use crate::catalog::Catalog;
use crate::model::TempUnit;
use crate::model::units::{parse_freezing_temp, parse_share};
use crate::model::{OwnItems, Recipe};
use crate::recipe_file::{parse_recipe, read_recipe_using};
use crate::report::inert::inert;
use crate::report::json::write_report_json;
use crate::report::text::{calibrated_text, report_text};
use crate::samples::SAMPLE_RECIPES;

/// Arguments of `gelu report`.
#[derive(Debug, clap::Args)]
pub struct ReportArgs {
    /// Recipe files (TOML).
    #[arg(required = true, value_name = "FILE")]
    pub files: Vec<PathBuf>,
    /// One compact JSON object per recipe per line (temperatures in °C).
    #[arg(long)]
    pub json: bool,
    /// Also report the frozen share at TEMP (°C, or with a C/F suffix like 0F); repeatable.
    #[arg(long = "at", value_name = "TEMP", value_parser = at_temp, allow_hyphen_values = true)]
    pub at: Vec<f64>,
    /// Share of water frozen at serving (0..1), overriding the recipes' own.
    #[arg(long, value_name = "SHARE", value_parser = parse_share)]
    pub serving_target: Option<f64>,
    /// Show temperatures in °F in the text report.
    #[arg(long)]
    pub fahrenheit: bool,
    /// The cabinet and freezer to report the frozen share in.
    #[command(flatten)]
    pub temps: super::own::TempArgs,
}

/// `--at`: a temperature in °C, or with a C or F suffix.
fn at_temp(text: &str) -> Result<f64, String> {
    parse_freezing_temp(text, TempUnit::Celsius)
}

fn emit(
    out: &mut impl Write,
    recipe: &Recipe,
    options: &Options,
    log: &LogCorrections,
    json: bool,
    unit: TempUnit,
) -> Result<(), String> {
    let a = analyze(recipe, Catalog::builtin(), options).map_err(|e| e.to_string())?;
    let calibrated = log.calibrated(recipe, &a)?;
    if json {
        write_report_json(&a, &calibrated, &mut *out)
            .map_err(|e| e.to_string())
            .and_then(|_| writeln!(out).map_err(|e| e.to_string()))
    } else {
        let mut text = report_text(&a, unit);
        let extra = calibrated_text(&calibrated, unit);
        if !extra.is_empty() {
            if !text.ends_with('\n') {
                text.push('\n');
            }
            text.push('\n');
            text.push_str(&extra);
        }
        writeln!(out, "{text}").map_err(|e| e.to_string())
    }
}

/// The report of one file, or why there is none.
fn report_file(
    path: &Path,
    own: &OwnItems,
    options: &Options,
    log: &LogCorrections,
    json: bool,
    unit: TempUnit,
) -> Result<Vec<u8>, String> {
    let (recipe, _, _) = read_recipe_using(path, own).map_err(|e| e.to_string())?;
    let mut buf = Vec::with_capacity(if json { 6 << 10 } else { 4 << 10 });
    emit(&mut buf, &recipe, options, log, json, unit)
        .map_err(|e| format!("{}: {e}", path.display()))?;
    Ok(buf)
}

/// Files reported per round; each round is shared among the worker threads and
/// written out in order before the next starts, so memory stays bounded.
const FILES_PER_ROUND: usize = 512;

/// Reports `files` on all cores, returning the outcomes in file order.
fn report_round(
    files: &[PathBuf],
    own: &OwnItems,
    options: &Options,
    log: &LogCorrections,
    json: bool,
    unit: TempUnit,
) -> Vec<Result<Vec<u8>, String>> {
    let threads = std::thread::available_parallelism()
        .map_or(1, |n| n.get())
        .clamp(1, 8);
    let per_thread = files.len().div_ceil(threads).max(1);
    std::thread::scope(|scope| {
        let workers: Vec<_> = files
            .chunks(per_thread)
            .map(|chunk| {
                scope.spawn(move || {
                    chunk
                        .iter()
                        .map(|p| report_file(p, own, options, log, json, unit))
                        .collect::<Vec<_>>()
                })
            })
            .collect();
        workers
            .into_iter()
            .flat_map(|w| {
                w.join()
                    .unwrap_or_else(|_| vec![Err("internal error while reporting".to_string())])
            })
            .collect()
    })
}

/// Runs `gelu report`; recipes may use the user's own items in the batch log
/// (`db`, else the default log, read only).
pub fn run(args: &ReportArgs, db: Option<&Path>) -> anyhow::Result<ExitCode> {
    // A log that cannot be read stops no report: recipes that need none of its
    // items still report, and one that does says which id is unknown.
    let own = super::own::load_own_items(db).unwrap_or_else(|e| {
        eprintln!("gelu: your own items could not be read from the batch log: {e:#}");
        OwnItems::default()
    });
    // JSON carries °C only, its messages included.
    let unit = if args.fahrenheit && !args.json {
        TempUnit::Fahrenheit
    } else {
        TempUnit::Celsius
    };
    let options = Options {
        serving_frozen_fraction: args.serving_target,
        at_temps_c: args.at.clone(),
        temp_unit: unit,
        ..super::own::analysis_options(db, &args.temps)
    };
    let log = super::own::log_corrections(db);
    let stdout = std::io::stdout();
    let mut out = BufWriter::new(stdout.lock());
    let mut failed = 0usize;
    for round in args.files.chunks(FILES_PER_ROUND) {
        for outcome in report_round(round, &own, &options, &log, args.json, unit) {
            match outcome {
                Ok(bytes) => out.write_all(&bytes)?,
                Err(message) => {
                    out.flush()?;
                    eprintln!("gelu: {}", inert(&message));
                    failed += 1;
                }
            }
        }
    }
    out.flush()?;
    if failed > 0 {
        eprintln!(
            "gelu: {failed} of {} recipe files could not be reported",
            args.files.len()
        );
        return Ok(ExitCode::from(1));
    }
    Ok(ExitCode::SUCCESS)
}

/// Prints the text analysis of the built-in sample recipes.
pub fn run_samples() -> anyhow::Result<ExitCode> {
    let stdout = std::io::stdout();
    let mut out = BufWriter::new(stdout.lock());
    for (name, text) in SAMPLE_RECIPES {
        let recipe = parse_recipe(Path::new(name), text)?;
        emit(
            &mut out,
            &recipe,
            &Options::default(),
            &LogCorrections::default(),
            false,
            TempUnit::Celsius,
        )
        .map_err(anyhow::Error::msg)?;
    }
    out.flush()?;
    Ok(ExitCode::SUCCESS)
}

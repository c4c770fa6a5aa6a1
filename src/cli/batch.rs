//! `gelu batch ...`: the batch log as plain text. Each subcommand resolves its
//! flags into typed requests for [`crate::store`] and prints the result as text,
//! or as JSON (one object per batch per line) with `--json`.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::{Context, bail};
use chrono::{DateTime, NaiveDate, Utc};

use super::db::open_store;
use crate::recipe_file::read_recipe;
use crate::store::jsonl::batch_json;
use crate::store::plan::{BatchSize, Plan, plan_batch};
use crate::store::{Batch, BatchFilter, Edit, MeasurementKind, Store, values};

/// Arguments of `gelu batch`.
#[derive(Debug, clap::Args)]
pub struct BatchArgs {
    /// What to do.
    #[command(subcommand)]
    pub command: BatchCommand,
}

/// Filters shared by `list` and `export`.
#[derive(Debug, clap::Args)]
pub struct FilterArgs {
    /// Only batches of this recipe (its exact name).
    #[arg(long, value_name = "NAME")]
    pub recipe: Option<String>,
    /// Made on or after DATE (YYYY-MM-DD, UTC, or an RFC 3339 time).
    #[arg(long, value_name = "DATE")]
    pub since: Option<String>,
    /// Made on or before DATE (YYYY-MM-DD includes that whole day).
    #[arg(long, value_name = "DATE")]
    pub until: Option<String>,
    /// Words to find in notes, supplier lots and amendment reasons (`gloss*` for a prefix).
    #[arg(long, value_name = "TEXT")]
    pub search: Option<String>,
}

/// The `gelu batch` subcommands.
#[derive(Debug, clap::Subcommand)]
pub enum BatchCommand {
    /// Record a new batch of a recipe scaled to a size; prints its code.
    New {
        /// The recipe file (TOML).
        recipe: PathBuf,
        /// Batch size: g, kg, or for liqueurs mL or L (5kg, 800g, 1.5L).
        #[arg(long, value_name = "SIZE")]
        size: String,
        /// Who makes it (default: the login name).
        #[arg(long, value_name = "NAME")]
        by: Option<String>,
        /// Supplier lot of an ingredient (or line number), repeatable: --lot sucrose=S-2611.
        #[arg(long = "lot", value_name = "INGREDIENT=LOT")]
        lots: Vec<String>,
        /// A first note.
        #[arg(long, value_name = "TEXT")]
        note: Option<String>,
        /// Print the whole batch as JSON instead of its code.
        #[arg(long)]
        json: bool,
    },
    /// List batches, newest first.
    List {
        #[command(flatten)]
        filter: FilterArgs,
        /// At most N batches (0: all).
        #[arg(long, value_name = "N", default_value_t = 50)]
        limit: usize,
        /// One JSON object per batch per line.
        #[arg(long)]
        json: bool,
    },
    /// Show a whole record, predicted against measured.
    Show {
        /// Batch code.
        code: String,
        /// As JSON.
        #[arg(long)]
        json: bool,
    },
    /// Record measurements: brix=31.5 ph=3.4 draw-temp-c=-6.5 ...
    Measure {
        /// Batch code.
        code: String,
        /// KIND=VALUE readings.
        #[arg(required = true, value_name = "KIND=VALUE")]
        readings: Vec<String>,
        /// Who measured (default: the login name).
        #[arg(long, value_name = "NAME")]
        by: Option<String>,
    },
    /// Add a note (deviation, corrective action, tasting).
    Note {
        /// Batch code.
        code: String,
        /// The note.
        text: String,
        /// Who writes it (default: the login name).
        #[arg(long, value_name = "NAME")]
        by: Option<String>,
    },
    /// Sign a batch off: from then on it is corrected only by amendments.
    Finalize {
        /// Batch code.
        code: String,
        /// Who signs off (default: the login name).
        #[arg(long, value_name = "NAME")]
        by: Option<String>,
    },
    /// Correct a batch by a new entry on its amendment trail.
    Amend {
        /// Batch code.
        code: String,
        /// Why (required; kept with the record).
        #[arg(long, value_name = "TEXT")]
        reason: String,
        /// Who amends (default: the login name).
        #[arg(long, value_name = "NAME")]
        by: Option<String>,
        /// The corrected operator's name.
        #[arg(long, value_name = "NAME")]
        operator: Option<String>,
        /// The weighed mass of a line in g, repeatable: --actual sucrose=812.
        #[arg(long = "actual", value_name = "INGREDIENT=G")]
        actuals: Vec<String>,
        /// The supplier lot of a line, repeatable: --lot whole-milk=M-2612-04.
        #[arg(long = "lot", value_name = "INGREDIENT=LOT")]
        lots: Vec<String>,
    },
    /// Write batches as JSON Lines (lossless) or CSV to standard output.
    Export {
        /// jsonl or csv.
        #[arg(long, value_name = "FORMAT", default_value = "jsonl")]
        format: ExportFormat,
        #[command(flatten)]
        filter: FilterArgs,
        /// At most N batches (0: all).
        #[arg(long, value_name = "N", default_value_t = 0)]
        limit: usize,
    },
    /// Read batches from a JSON Lines export; codes already present are skipped.
    Import {
        /// The .jsonl file.
        file: PathBuf,
    },
}

/// Export formats.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum ExportFormat {
    /// One JSON object per batch per line; import reads it back exactly.
    Jsonl,
    /// One row per batch, for spreadsheets.
    Csv,
}

/// `--by`, or the login name.
fn who(by: &Option<String>) -> anyhow::Result<String> {
    if let Some(name) = by.as_deref().map(str::trim).filter(|n| !n.is_empty()) {
        return Ok(name.to_owned());
    }
    for var in ["USER", "LOGNAME", "USERNAME"] {
        if let Ok(name) = std::env::var(var)
            && !name.trim().is_empty()
        {
            return Ok(name.trim().to_owned());
        }
    }
    bail!("say who you are with --by NAME (records carry a name)")
}

/// Splits `KEY=VALUE`.
fn pair<'a>(text: &'a str, what: &str) -> anyhow::Result<(&'a str, &'a str)> {
    match text.split_once('=') {
        Some((k, v)) if !k.trim().is_empty() => Ok((k.trim(), v.trim())),
        _ => bail!("`{text}` should look like {what}"),
    }
}

fn grams(text: &str, whole: &str) -> anyhow::Result<f64> {
    text.parse::<f64>()
        .ok()
        .filter(|g| g.is_finite())
        .with_context(|| format!("`{whole}`: `{text}` is not a number of grams"))
}

/// A `--since`/`--until` value; a bare date is midnight UTC (the day after, for `until`).
fn date(text: &str, end_of_day: bool) -> anyhow::Result<DateTime<Utc>> {
    if let Ok(day) = NaiveDate::parse_from_str(text, "%Y-%m-%d") {
        let day = if end_of_day {
            day.succ_opt().unwrap_or(day)
        } else {
            day
        };
        return Ok(day.and_hms_opt(0, 0, 0).unwrap_or_default().and_utc());
    }
    values::parse_time(text)
        .with_context(|| format!("`{text}` is not a date; use YYYY-MM-DD or an RFC 3339 time"))
}

fn filter(args: &FilterArgs, limit: usize) -> anyhow::Result<BatchFilter> {
    Ok(BatchFilter {
        recipe: args.recipe.clone(),
        since: args.since.as_deref().map(|d| date(d, false)).transpose()?,
        until: args.until.as_deref().map(|d| date(d, true)).transpose()?,
        search: args.search.clone(),
        limit,
        after: None,
    })
}

fn lots(list: &[String]) -> anyhow::Result<Vec<(String, String)>> {
    list.iter()
        .map(|l| pair(l, "INGREDIENT=LOT").map(|(k, v)| (k.to_owned(), v.to_owned())))
        .collect()
}

fn fmt_g(g: f64) -> String {
    format!("{g:.1}")
}

fn fmt_time(t: &DateTime<Utc>) -> String {
    t.format("%Y-%m-%d %H:%M UTC").to_string()
}

/// The whole record as text.
fn show_text(b: &Batch) -> String {
    let mut out = String::new();
    let mut line = |s: String| {
        out.push_str(&s);
        out.push('\n');
    };
    line(format!("{}  {}", b.code, b.status.as_str().to_uppercase()));
    line(format!(
        "recipe   {} (version {}, {})",
        b.recipe.recipe, b.recipe.version, b.recipe.content_hash
    ));
    line(format!(
        "made     {} by {}",
        fmt_time(&b.made_at),
        b.operator
    ));
    line(format!("size     {} g", fmt_g(b.size_g)));
    if let (Some(at), Some(by)) = (&b.finalized_at, &b.finalized_by) {
        line(format!("final    {} by {}", fmt_time(at), by));
    }
    line(String::new());
    line(format!(
        "{:<4} {:<24} {:>10} {:>10}  lot",
        "line", "ingredient", "planned g", "actual g"
    ));
    for (i, l) in b.lines.iter().enumerate() {
        line(format!(
            "{:<4} {:<24} {:>10} {:>10}  {}",
            i + 1,
            l.ingredient,
            fmt_g(l.planned_g),
            l.actual_g.map(fmt_g).unwrap_or_else(|| "-".into()),
            if l.lot.is_empty() { "-" } else { &l.lot }
        ));
    }
    line(String::new());
    line("measured against predicted".into());
    let predicted = |kind: MeasurementKind| {
        kind.prediction_key()
            .and_then(|k| b.prediction.get(k))
            .and_then(|v| v.as_f64())
    };
    for kind in MeasurementKind::ALL {
        if let Some(p) = predicted(kind)
            && !b.measurements.iter().any(|m| m.kind == kind)
        {
            line(format!(
                "  {:<22} {:>10} {:<6} predicted {p:.2}",
                kind.as_str(),
                "-",
                kind.unit()
            ));
        }
    }
    for m in &b.measurements {
        let against = match predicted(m.kind) {
            Some(p) => format!("predicted {p:.2}, difference {:+.2}", m.value - p),
            None => String::new(),
        };
        line(format!(
            "  {:<22} {:>10} {:<6} {against}  ({} by {})",
            m.kind.as_str(),
            format!("{:.2}", m.value),
            m.kind.unit(),
            fmt_time(&m.taken_at),
            m.by
        ));
    }
    if !b.notes.is_empty() {
        line(String::new());
        line("notes".into());
        for n in &b.notes {
            line(format!(
                "  {} {}: {}",
                fmt_time(&n.written_at),
                n.by,
                n.text
            ));
        }
    }
    if !b.amendments.is_empty() {
        line(String::new());
        line("amendments".into());
        for a in &b.amendments {
            line(format!(
                "  {} {}: {}",
                fmt_time(&a.amended_at),
                a.by,
                a.reason
            ));
            for c in &a.changes {
                let change = serde_json::to_string(c).unwrap_or_default();
                line(format!("    {change}"));
            }
        }
    }
    out
}

fn print_json(b: &Batch) {
    println!("{}", batch_json(b));
}

fn show(store: &Store, code: &str, json: bool) -> anyhow::Result<ExitCode> {
    let b = store
        .batch(code)?
        .ok_or_else(|| crate::store::StoreError::NoSuchBatch { code: code.into() })?;
    if json {
        print_json(&b);
    } else {
        print!("{}", show_text(&b));
    }
    Ok(ExitCode::SUCCESS)
}

fn new_batch(
    db: Option<&Path>,
    recipe: &Path,
    size: &str,
    by: &Option<String>,
    lot_args: &[String],
    note: Option<&str>,
    json: bool,
) -> anyhow::Result<ExitCode> {
    let (parsed, text) = read_recipe(recipe)?;
    let size = BatchSize::parse(size)?;
    let operator = who(by)?;
    let lots = lots(lot_args)?;
    let planned = plan_batch(&Plan {
        recipe: &parsed,
        recipe_text: &text,
        size,
        operator: &operator,
        lots: &lots,
        note,
        made_at: values::now(),
    })?;
    let mut store = open_store(db)?;
    let b = store.new_batch(&planned)?;
    if json {
        print_json(&b);
    } else {
        println!("{}", b.code);
    }
    Ok(ExitCode::SUCCESS)
}

/// Runs `gelu batch`.
pub fn run(args: &BatchArgs, db: Option<&Path>) -> anyhow::Result<ExitCode> {
    match &args.command {
        BatchCommand::New {
            recipe,
            size,
            by,
            lots,
            note,
            json,
        } => new_batch(db, recipe, size, by, lots, note.as_deref(), *json),
        BatchCommand::List {
            filter: f,
            limit,
            json,
        } => {
            let store = open_store(db)?;
            let rows = store.list_batches(&filter(f, *limit)?)?;
            if *json {
                for row in &rows {
                    print_json(
                        &store
                            .batch(&row.code)?
                            .with_context(|| format!("{} disappeared while listing", row.code))?,
                    );
                }
            } else {
                for r in &rows {
                    println!(
                        "{:<16} {}  {:<8} {:>10} g  {} v{}  ({})",
                        r.code,
                        fmt_time(&r.made_at),
                        r.status.as_str(),
                        fmt_g(r.size_g),
                        r.recipe,
                        r.recipe_version,
                        r.operator
                    );
                }
                if rows.is_empty() {
                    eprintln!("no batches match");
                }
            }
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Show { code, json } => show(&open_store(db)?, code, *json),
        BatchCommand::Measure { code, readings, by } => {
            let list = readings
                .iter()
                .map(|r| {
                    let (k, v) = pair(r, "KIND=VALUE, like brix=31.5")?;
                    let kind = MeasurementKind::parse(k).with_context(|| {
                        format!(
                            "`{k}` is not a kind of measurement; use one of {}",
                            MeasurementKind::names()
                        )
                    })?;
                    let value = v
                        .parse::<f64>()
                        .ok()
                        .filter(|x| x.is_finite())
                        .with_context(|| format!("`{r}`: `{v}` is not a number"))?;
                    Ok((kind, value))
                })
                .collect::<anyhow::Result<Vec<_>>>()?;
            let who = who(by)?;
            let mut store = open_store(db)?;
            let saved = store.add_measurements(code, &list, &who)?;
            println!("{code}: {} measurement(s) recorded", saved.len());
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Note { code, text, by } => {
            let who = who(by)?;
            open_store(db)?.add_note(code, text, &who)?;
            println!("{code}: note added");
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Finalize { code, by } => {
            let who = who(by)?;
            open_store(db)?.finalize(code, &who)?;
            println!("{code}: final");
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Amend {
            code,
            reason,
            by,
            operator,
            actuals,
            lots: lot_args,
        } => {
            let mut edits = Vec::new();
            if let Some(name) = operator {
                edits.push(Edit::Operator(name.clone()));
            }
            for a in actuals {
                let (line, g) = pair(a, "INGREDIENT=G, like sucrose=812")?;
                edits.push(Edit::ActualG {
                    line: line.to_owned(),
                    grams: grams(g, a)?,
                });
            }
            for (line, lot) in lots(lot_args)? {
                edits.push(Edit::Lot { line, lot });
            }
            let who = who(by)?;
            let a = open_store(db)?.amend(code, &who, reason, &edits)?;
            println!("{code}: amended ({} change(s))", a.changes.len());
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Export {
            format,
            filter: f,
            limit,
        } => {
            let store = open_store(db)?;
            let stdout = std::io::stdout();
            let mut out = std::io::BufWriter::new(stdout.lock());
            let f = filter(f, *limit)?;
            let count = match format {
                ExportFormat::Jsonl => store.export_jsonl(&f, &mut out)?,
                ExportFormat::Csv => store.export_csv(&f, &mut out)?,
            };
            out.flush().context("writing the export")?;
            eprintln!("{count} batch(es) exported");
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Import { file } => {
            let handle = std::fs::File::open(file)
                .with_context(|| format!("cannot open {}", file.display()))?;
            let mut reader = std::io::BufReader::new(handle);
            let mut store = open_store(db)?;
            let report = store.import_jsonl(&mut reader)?;
            for (n, why) in &report.errors {
                eprintln!(
                    "{}:{n}: {why}; nothing of this line was written",
                    file.display()
                );
            }
            println!(
                "{} imported, {} skipped (code already present), {} refused",
                report.imported,
                report.skipped_existing,
                report.errors.len()
            );
            Ok(if report.errors.is_empty() {
                ExitCode::SUCCESS
            } else {
                ExitCode::from(1)
            })
        }
    }
}

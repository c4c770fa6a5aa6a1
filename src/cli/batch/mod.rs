//! `gelu batch ...`: the batch log as plain text. Each subcommand resolves its
//! flags ([`args`]) into typed requests for [`crate::store`] and prints the result
//! as text (record text shown inert), or as JSON (one object per batch per line)
//! with `--json`. Commands that only read open a log they cannot write read-only.

mod args;
mod calibrate;
mod compare;
mod precision;

use std::io::Write;
use std::path::Path;
use std::process::ExitCode;

use anyhow::{Context, bail};

pub use args::{
    BatchArgs, BatchCommand, Corrections, ExportFormat, FilterArgs, NewArgs, Selection,
};

use super::db::{open_for_reading, open_store};
use crate::batch::compare::{comparisons, comparisons_json};
use crate::batch::export::Format;
use crate::batch::jsonl::batch_json;
use crate::batch::plan::{Plan, parse_size, plan_batch_drawn};
use crate::batch::reading::all_as_recorded;
use crate::batch::{Batch, BatchFilter, Edit, LineRef, MeasurementKind};
use crate::catalog::Catalog;
use crate::clock;
use crate::model::time::{DayEnd, parse_date_bound};
use crate::model::units::{parse_number, parse_share};
use crate::model::{OwnItems, Recipe};
use crate::recipe_file::{append_own_items, parse_recipe, read_recipe_using};
use crate::report::batch_text::{batch_text, summary_line};
use crate::report::inert::inert;
use crate::store::{Store, StoreError};

/// `--by`, or the login name.
pub(crate) fn who(by: &Option<String>) -> anyhow::Result<String> {
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
    parse_number(text)
        .ok()
        .with_context(|| format!("`{whole}`: `{text}` is not a number of grams"))
}

fn date(text: &str, end: DayEnd) -> anyhow::Result<chrono::DateTime<chrono::Utc>> {
    parse_date_bound(text, end).map_err(anyhow::Error::msg)
}

fn filter(args: &FilterArgs, limit: usize) -> anyhow::Result<BatchFilter> {
    Ok(BatchFilter {
        recipe: args.recipe.clone(),
        since: args
            .since
            .as_deref()
            .map(|d| date(d, DayEnd::Start))
            .transpose()?,
        until: args
            .until
            .as_deref()
            .map(|d| date(d, DayEnd::End))
            .transpose()?,
        search: args.search.clone(),
        limit,
        after: None,
    })
}

fn lots(list: &[String]) -> anyhow::Result<Vec<(LineRef, String)>> {
    list.iter()
        .map(|l| pair(l, "INGREDIENT=LOT").map(|(k, v)| (LineRef::parse(k), v.to_owned())))
        .collect()
}

fn print_json(out: &mut impl Write, b: &Batch) -> anyhow::Result<()> {
    writeln!(out, "{}", batch_json(b))?;
    Ok(())
}

fn show(store: &Store, code: &str, json: bool) -> anyhow::Result<ExitCode> {
    let b = store
        .batch(code)?
        .ok_or_else(|| crate::store::StoreError::NoSuchBatch { code: code.into() })?;
    let log = store.log_setting()?;
    let mut out = std::io::stdout().lock();
    if json {
        let mut value = batch_json(&b);
        if let Some(object) = value.as_object_mut() {
            let compared = comparisons(&b, &log.setting());
            object.insert("compared".into(), comparisons_json(&compared));
        }
        writeln!(out, "{value}")?;
    } else {
        write!(out, "{}", batch_text(&b, &log.setting()))?;
    }
    Ok(ExitCode::SUCCESS)
}

/// The recipe file as a batch records it: when it uses own items from the log,
/// they are added to its text (which is otherwise kept as it is), so the
/// recorded version reads without the log.
fn recorded_recipe(path: &Path, own: &OwnItems) -> anyhow::Result<(Recipe, String)> {
    let (parsed, text, borrowed) = read_recipe_using(path, own)?;
    if borrowed.is_empty() {
        return Ok((parsed, text));
    }
    let text = append_own_items(path, &text, &borrowed)?;
    let parsed = parse_recipe(path, &text)?;
    let ids: Vec<&str> = borrowed
        .ingredients
        .iter()
        .map(|i| i.id.as_str())
        .chain(borrowed.solutes.iter().map(|s| s.id.as_str()))
        .collect();
    eprintln!(
        "gelu: the recorded recipe carries your own {} from the batch log, so the record never depends on the log",
        ids.join(", ")
    );
    Ok((parsed, text))
}

fn new_batch(db: Option<&Path>, args: &NewArgs) -> anyhow::Result<ExitCode> {
    let size = parse_size(&args.size, None)?;
    let operator = who(&args.by)?;
    let lots = lots(&args.lots)?;
    let mut store = open_store(db)?;
    let (parsed, text) = recorded_recipe(&args.recipe, &super::own::own_items_of(&store)?)?;
    let planned = plan_batch_drawn(
        &Plan {
            recipe: &parsed,
            recipe_text: &text,
            size,
            operator: &operator,
            lots: &lots,
            note: args.note.as_deref(),
            made_at: clock::now(),
        },
        Catalog::builtin(),
        &super::own::options_of(Some(&store), &args.temps),
        store.draw_frozen_fraction()?,
    )?;
    let b = store.new_batch(&planned)?;
    let mut out = std::io::stdout().lock();
    if args.json {
        print_json(&mut out, &b)?;
    } else {
        writeln!(out, "{}", b.code)?;
    }
    Ok(ExitCode::SUCCESS)
}

/// A 1-based position and what follows it: `N=REST`.
fn numbered<'a>(text: &'a str, what: &str) -> anyhow::Result<(usize, &'a str)> {
    let (n, rest) = pair(text, what)?;
    let n = n
        .parse::<usize>()
        .ok()
        .filter(|&n| n >= 1)
        .with_context(|| format!("`{text}`: `{n}` is not a position (1, 2, 3...)"))?;
    Ok((n, rest))
}

/// The edits `gelu batch amend` asks for, in the order of its flags.
fn amend_edits(args: &Corrections) -> anyhow::Result<Vec<Edit>> {
    let mut edits = Vec::new();
    if let Some(name) = &args.operator {
        edits.push(Edit::Operator(name.clone()));
    }
    for a in &args.actuals {
        let (line, g) = pair(a, "INGREDIENT=G, like sucrose=812")?;
        edits.push(Edit::ActualG {
            line: LineRef::parse(line),
            grams: grams(g, a)?,
        });
    }
    for (line, lot) in lots(&args.lots)? {
        edits.push(Edit::Lot { line, lot });
    }
    edits.extend(args.strike_readings.iter().map(|&n| Edit::StrikeReading(n)));
    for r in &args.replace_readings {
        let (reading, v) = numbered(r, "N=VALUE, like 2=-6.5")?;
        let value = parse_number(v)
            .ok()
            .with_context(|| format!("`{r}`: `{v}` is not a number"))?;
        edits.push(Edit::ReplaceReading { reading, value });
    }
    edits.extend(args.strike_notes.iter().map(|&n| Edit::StrikeNote(n)));
    for r in &args.replace_notes {
        let (note, text) = numbered(r, "N=TEXT, like 1=first run of the day")?;
        edits.push(Edit::ReplaceNote {
            note,
            text: text.to_owned(),
        });
    }
    Ok(edits)
}

fn import(db: Option<&Path>, file: &Path) -> anyhow::Result<ExitCode> {
    let handle =
        std::fs::File::open(file).with_context(|| format!("cannot open {}", file.display()))?;
    let mut reader = std::io::BufReader::new(handle);
    let mut store = open_store(db)?;
    let shown = file.display().to_string();
    let refused = |errors: &[(usize, String)]| {
        for (n, why) in errors {
            eprintln!(
                "{}:{n}: {}; nothing of this line was written",
                inert(&shown),
                inert(why)
            );
        }
    };
    let report = match store.import_jsonl(&mut reader) {
        Ok(report) => report,
        Err(StoreError::ImportStopped {
            line,
            report,
            cause,
        }) => {
            refused(&report.errors);
            let stop = StoreError::ImportStopped {
                line,
                report,
                cause,
            };
            eprintln!(
                "gelu: {}:{line}: {}",
                inert(&shown),
                inert(&stop.to_string())
            );
            return Ok(ExitCode::from(2));
        }
        Err(e) => return Err(e.into()),
    };
    refused(&report.errors);
    writeln!(
        std::io::stdout(),
        "{} imported, {} skipped (code already present), {} refused",
        report.imported,
        report.skipped_existing,
        report.errors.len()
    )?;
    Ok(if report.errors.is_empty() {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(1)
    })
}

/// Runs `gelu batch`.
pub fn run(args: &BatchArgs, db: Option<&Path>) -> anyhow::Result<ExitCode> {
    match &args.command {
        BatchCommand::New(new) => new_batch(db, new),
        BatchCommand::List {
            filter: f,
            limit,
            json,
        } => {
            let store = open_for_reading(db)?;
            let rows = store.list_batches(&filter(f, *limit)?)?;
            let mut out = std::io::BufWriter::new(std::io::stdout().lock());
            if *json {
                for row in &rows {
                    let b = store
                        .batch(&row.code)?
                        .with_context(|| format!("{} disappeared while listing", row.code))?;
                    print_json(&mut out, &b)?;
                }
            } else {
                for r in &rows {
                    writeln!(out, "{}", summary_line(r))?;
                }
            }
            out.flush()?;
            if rows.is_empty() && !*json {
                eprintln!("no batches match");
            }
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Show { code, json } => show(&open_for_reading(db)?, code, *json),
        BatchCommand::Measure {
            code,
            readings,
            by,
            reason,
        } => {
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
                    let value = parse_number(v)
                        .ok()
                        .with_context(|| format!("`{r}`: `{v}` is not a number"))?;
                    Ok((kind, value))
                })
                .collect::<anyhow::Result<Vec<_>>>()?;
            let who = who(by)?;
            let mut store = open_store(db)?;
            let saved =
                store.add_measurements(code, &all_as_recorded(&list), &who, reason.as_deref())?;
            let where_ = if reason.is_some() {
                " on the amendment trail"
            } else {
                ""
            };
            writeln!(
                std::io::stdout(),
                "{}: {} measurement(s) recorded{where_}",
                inert(code),
                saved.len()
            )?;
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Note {
            code,
            text,
            by,
            reason,
        } => {
            let who = who(by)?;
            open_store(db)?.add_note(code, text, &who, reason.as_deref())?;
            let where_ = if reason.is_some() {
                " on the amendment trail"
            } else {
                ""
            };
            writeln!(std::io::stdout(), "{}: note added{where_}", inert(code))?;
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Finalize { code, by } => {
            let who = who(by)?;
            open_store(db)?.finalize(code, &who)?;
            writeln!(std::io::stdout(), "{}: final", inert(code))?;
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Amend {
            code,
            reason,
            by,
            corrections,
        } => {
            let edits = amend_edits(corrections)?;
            let who = who(by)?;
            let a = open_store(db)?.amend(code, &who, reason, &edits)?;
            writeln!(
                std::io::stdout(),
                "{}: amended ({} change(s))",
                inert(code),
                a.changes.len()
            )?;
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Compare {
            batches:
                Selection {
                    recipe,
                    style,
                    since,
                },
            kind,
            precisions,
            json,
        } => {
            let store = open_store(db)?;
            let mut log = store.log_setting()?;
            log.override_precisions(&precisions.list);
            let f = filter(
                &FilterArgs {
                    recipe: recipe.clone(),
                    since: since.clone(),
                    until: None,
                    search: None,
                },
                0,
            )?;
            let pairs = store.measured_pairs(&f, *style, *kind, &log.setting())?;
            compare::print(&pairs, *json)
        }
        BatchCommand::Calibrate {
            kind,
            batches:
                Selection {
                    recipe,
                    style,
                    since,
                },
            precisions,
            turn_on,
            turn_off,
            by,
            json,
        } => {
            let request = calibrate::Request {
                kind: *kind,
                recipe: recipe.clone(),
                style: *style,
                since: since
                    .as_deref()
                    .map(|d| date(d, DayEnd::Start))
                    .transpose()?,
            };
            let turn = match (turn_on, turn_off) {
                (true, _) => Some(true),
                (_, true) => Some(false),
                _ => None,
            };
            let by = if turn.is_some() {
                who(by)?
            } else {
                String::new()
            };
            let mut store = open_store(db)?;
            calibrate::run(&mut store, &request, &precisions.list, turn, &by, *json)
        }
        BatchCommand::Calibrations { json } => calibrate::history(&open_store(db)?, *json),
        BatchCommand::Precision { set } => precision::run(&mut open_store(db)?, set),
        BatchCommand::DrawShare { share } => {
            let mut store = open_store(db)?;
            if let Some(text) = share {
                let share = parse_share(text).map_err(anyhow::Error::msg)?;
                store.set_draw_frozen_fraction(share)?;
            }
            println!(
                "draw temperatures are predicted at {} % of the water frozen",
                crate::model::units::trim_number(100.0 * store.draw_frozen_fraction()?)
            );
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Export {
            format,
            filter: f,
            limit,
        } => {
            let store = open_for_reading(db)?;
            let stdout = std::io::stdout();
            let mut out = std::io::BufWriter::new(stdout.lock());
            let f = filter(f, *limit)?;
            let format = match format {
                ExportFormat::Jsonl => Format::Jsonl,
                ExportFormat::Csv => Format::Csv,
            };
            let count = store.export(&f, format, &mut out)?;
            out.flush().context("writing the export")?;
            eprintln!("{count} batch(es) exported");
            Ok(ExitCode::SUCCESS)
        }
        BatchCommand::Import { file } => import(db, file),
    }
}

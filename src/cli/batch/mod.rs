//! `gelu batch ...`: the batch log as plain text. Each subcommand resolves its
//! flags ([`args`]) into typed requests for [`crate::store`] and prints the result
//! as text, or as JSON (one object per batch per line) with `--json`.

mod args;
mod calibrate;
mod compare;

use std::io::Write;
use std::path::Path;
use std::process::ExitCode;

use anyhow::{Context, bail};

pub use args::{BatchArgs, BatchCommand, ExportFormat, FilterArgs, NewArgs, Selection};

use super::db::open_store;
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
use crate::store::Store;

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

fn print_json(b: &Batch) {
    println!("{}", batch_json(b));
}

fn show(store: &Store, code: &str, json: bool) -> anyhow::Result<ExitCode> {
    let b = store
        .batch(code)?
        .ok_or_else(|| crate::store::StoreError::NoSuchBatch { code: code.into() })?;
    let log = store.log_setting()?;
    if json {
        let mut value = batch_json(&b);
        if let Some(object) = value.as_object_mut() {
            let compared = comparisons(&b, &log.setting());
            object.insert("compared".into(), comparisons_json(&compared));
        }
        println!("{value}");
    } else {
        print!("{}", batch_text(&b, &log.setting()));
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
    if args.json {
        print_json(&b);
    } else {
        println!("{}", b.code);
    }
    Ok(ExitCode::SUCCESS)
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
                    println!("{}", summary_line(r));
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
                    let value = parse_number(v)
                        .ok()
                        .with_context(|| format!("`{r}`: `{v}` is not a number"))?;
                    Ok((kind, value))
                })
                .collect::<anyhow::Result<Vec<_>>>()?;
            let who = who(by)?;
            let mut store = open_store(db)?;
            let saved = store.add_measurements(code, &all_as_recorded(&list), &who)?;
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
                    line: LineRef::parse(line),
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
            log.precisions.clone_from(&precisions.list);
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
            let store = open_store(db)?;
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

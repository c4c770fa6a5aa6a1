//! Importing batch records made elsewhere (JSON Lines or [`Batch`] values). A code
//! already present is skipped and counted; a refused record is reported by its line
//! number and nothing of it is written. Lines are written in chunks, one transaction
//! each: a chunk is first tried whole, and only if some record in it is refused by
//! the database is it written again record by record behind savepoints. (Savepoints
//! on every record would make the full-text index flush once per record.)

use std::collections::{BTreeMap, HashMap};
use std::io::BufRead;

use rusqlite::Transaction;
use serde_json::value::RawValue;
use serde_json::{Map, Value};

use super::Store;
use super::batches::{self, original_record};
use super::error::{Result, StoreError, is_busy};
use super::jsonl::batch_from_fields;
use super::recipes::{self, VersionIds};
use super::search::Pending;
use super::types::{Batch, ImportReport, RecipeVersion};

/// How many records share one transaction (a crash loses at most one chunk, and
/// running the import again skips what was written).
const CHUNK: usize = 5_000;

/// A record ready to write: as first written (before its amendments), with its
/// analysis snapshot as JSON text.
struct Record {
    first: Batch,
    prediction_json: String,
}

/// A record to import: its 1-based number, and the record, or why it was refused
/// before anything was written.
type Item = (usize, std::result::Result<Record, String>);

/// The record as first written, rebuilt from the current values and the trail.
fn first_written(batch: Batch) -> std::result::Result<Batch, String> {
    let (operator, lines) = original_record(&batch).map_err(|e| e.to_string())?;
    Ok(Batch {
        operator,
        lines,
        ..batch
    })
}

fn record(batch: Batch) -> std::result::Result<Record, String> {
    let prediction_json = batch.prediction.to_string();
    let first = first_written(Batch {
        prediction: Value::Null,
        ..batch
    })?;
    Ok(Record {
        first,
        prediction_json,
    })
}

/// Reads one line. The analysis snapshot, most of the line, is kept as the text
/// it was (checked to be JSON) rather than parsed into a tree and written out again.
fn parse_line(text: &str) -> std::result::Result<Record, String> {
    let raw: BTreeMap<String, Box<RawValue>> =
        serde_json::from_str(text).map_err(|e| format!("not a JSON object: {e}"))?;
    let mut fields = Map::new();
    let mut prediction = None;
    for (key, value) in raw {
        if key == "prediction" {
            prediction = Some(value);
        } else {
            let parsed: Value = serde_json::from_str(value.get())
                .map_err(|e| format!("`{key}` could not be read: {e}"))?;
            fields.insert(key, parsed);
        }
    }
    let prediction = prediction.ok_or("the key `prediction` is missing")?;
    if !prediction.get().trim_start().starts_with('{') {
        return Err("`prediction` must be a JSON object".into());
    }
    let batch = batch_from_fields(&fields, Value::Null).map_err(|e| e.to_string())?;
    Ok(Record {
        first: first_written(batch)?,
        prediction_json: prediction.get().to_owned(),
    })
}

/// The message of an error that refuses one record, or the error itself when it is
/// about the file or the lock (those stop the import).
fn refusal(e: StoreError) -> std::result::Result<String, StoreError> {
    match e {
        StoreError::Invalid(msg) => Ok(msg),
        StoreError::Sql(e) if !is_busy(&e) => Ok(e.to_string()),
        other => Err(other),
    }
}

/// Recipe versions already found or added in this chunk, so that the thousands of
/// batches of one version are not each hashed and looked up again.
#[derive(Default)]
struct Versions(HashMap<(String, u32), (RecipeVersion, VersionIds)>);

impl Versions {
    fn ids(&mut self, tx: &Transaction, v: &RecipeVersion) -> Result<VersionIds> {
        let key = (v.recipe.clone(), v.version);
        if let Some((known, ids)) = self.0.get(&key)
            && known == v
        {
            return Ok(*ids);
        }
        let ids = recipes::ensure_version(tx, v)?;
        self.0.insert(key, (v.clone(), ids));
        Ok(ids)
    }
}

fn write_one(
    tx: &Transaction,
    versions: &mut Versions,
    search: &mut Pending,
    record: &Record,
) -> Result<()> {
    let ids = versions.ids(tx, &record.first.recipe)?;
    batches::insert_record(tx, ids, &record.first, &record.prediction_json, search).map(|_| ())
}

fn write_chunk(tx: &Transaction, items: &[Item], careful: bool) -> Result<ImportReport> {
    let mut report = ImportReport::default();
    // Rolled back with the chunk, so never shared between attempts.
    let mut versions = Versions::default();
    let mut search = Pending::default();
    for (number, item) in items {
        let record = match item {
            Err(why) => {
                report.errors.push((*number, why.clone()));
                continue;
            }
            Ok(record) => record,
        };
        if batches::exists(tx, &record.first.code)? {
            report.skipped_existing += 1;
        } else if !careful {
            write_one(tx, &mut versions, &mut search, record)?;
            report.imported += 1;
        } else {
            tx.execute_batch("SAVEPOINT import_record")?;
            let queued = search.len();
            match write_one(tx, &mut versions, &mut search, record) {
                Ok(()) => {
                    tx.execute_batch("RELEASE import_record")?;
                    report.imported += 1;
                }
                Err(e) => {
                    tx.execute_batch("ROLLBACK TO import_record; RELEASE import_record")?;
                    // The versions it added and its search entries are gone with it.
                    versions.0.clear();
                    search.truncate(queued);
                    report.errors.push((*number, refusal(e)?));
                }
            }
        }
    }
    search.write(tx)?;
    Ok(report)
}

fn merge(into: &mut ImportReport, part: ImportReport) {
    into.imported += part.imported;
    into.skipped_existing += part.skipped_existing;
    into.errors.extend(part.errors);
}

impl Store {
    fn import_chunk(&mut self, items: &[Item]) -> Result<ImportReport> {
        match self.write(|tx| write_chunk(tx, items, false)) {
            Ok(report) => Ok(report),
            Err(e) => {
                // Something was refused: nothing of the chunk was kept; redo it carefully.
                refusal(e)?;
                self.write(|tx| write_chunk(tx, items, true))
            }
        }
    }

    /// Writes batches recorded elsewhere, as an import does; a refused batch is
    /// reported by its 1-based position and nothing of it is written.
    pub fn import_batches(&mut self, list: &[Batch]) -> Result<ImportReport> {
        let mut report = ImportReport::default();
        for (start, part) in list.chunks(CHUNK).enumerate() {
            let items: Vec<Item> = part
                .iter()
                .enumerate()
                .map(|(i, b)| (start * CHUNK + i + 1, record(b.clone())))
                .collect();
            merge(&mut report, self.import_chunk(&items)?);
        }
        Ok(report)
    }

    /// Reads JSON Lines of batches. A code already present is skipped and counted; a
    /// malformed line is reported by number and nothing of it is written.
    pub fn import_jsonl(&mut self, input: &mut dyn BufRead) -> Result<ImportReport> {
        let mut report = ImportReport::default();
        let mut items: Vec<Item> = Vec::with_capacity(CHUNK);
        let mut number = 0;
        let mut line = String::new();
        loop {
            line.clear();
            let read = input
                .read_line(&mut line)
                .map_err(|source| StoreError::Io {
                    path: "the import file".into(),
                    source,
                })?;
            if read > 0 {
                number += 1;
                if !line.trim().is_empty() {
                    items.push((number, parse_line(&line)));
                }
            }
            if items.len() >= CHUNK || (read == 0 && !items.is_empty()) {
                merge(&mut report, self.import_chunk(&items)?);
                items.clear();
            }
            if read == 0 {
                return Ok(report);
            }
        }
    }
}

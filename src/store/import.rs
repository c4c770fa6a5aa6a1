//! Importing batch records made elsewhere (JSON Lines or [`Batch`] values). A code
//! already present is skipped and counted; a refused record is reported by its line
//! number with the reason, and nothing of it is written. Every record is checked as
//! a record the command line could have made ([`crate::batch::validate`]), its trail
//! against its fields ([`crate::batch::amend::original_record`]); nothing of it is
//! changed on the way in. A line is read up to [`MAX_LINE_BYTES`]; a longer one is
//! refused and skipped without being held in memory. An import that stops part-way
//! ([`StoreError::ImportStopped`]) says where, and how many records it had written.
//!
//! Lines are read and checked on a second
//! thread and written in transactions of a few thousand records: a transaction is
//! first tried whole, all its new records in a few multi-row statements, and only if
//! the database refuses something in it is it written again record by record behind
//! savepoints. (Savepoints on every record would make the full-text index flush once
//! per record.) The insert-time guards are lifted while an import writes (see
//! [`super::guards`]) and its checkpoints run on a third thread (see
//! [`super::checkpoint`]).

use std::collections::{HashMap, HashSet};
use std::io::BufRead;
use std::path::Path;

use rusqlite::{Connection, Transaction};
use serde_json::Value;

use super::Store;
use super::batches;
use super::checkpoint::{self, Checkpoints};
use super::error::{Result, StoreError, is_busy};
use super::guards;
use super::recipes::{self, VersionIds};
use super::records::{self, NewRecord};
use super::search::Pending;
use super::tx;
use super::types::ImportReport;
use crate::batch::jsonl::read_line;
use crate::batch::validate::{Recipes, first_written};
use crate::batch::{Batch, RecipeVersion};
use crate::catalog::Catalog;

/// About how many records share one transaction (a crash loses at most one, and
/// running the import again skips what was written).
const CHUNK: usize = 5_000;

/// How many records the reader hands to the writer at a time.
const PIECE: usize = 250;

/// The longest line an import reads (16 MiB): a record with its recipe text and
/// full prediction is a few kilobytes; a longer line is refused and skipped
/// without being held in memory.
pub const MAX_LINE_BYTES: usize = 16 << 20;

/// A record ready to write: as first written (before its amendments), with its
/// prediction as JSON text.
struct Record {
    first: Batch,
    prediction_json: String,
}

/// A record to import: its 1-based number, and the record, or why it was refused
/// before anything was written.
type Item = (usize, std::result::Result<Record, String>);

fn record(batch: Batch, recipes: &mut Recipes) -> std::result::Result<Record, String> {
    let prediction_json = batch.prediction.to_string();
    let first = first_written(
        Batch {
            prediction: Value::Null,
            ..batch
        },
        recipes,
        Catalog::builtin(),
    )
    .map_err(|e| e.0)?;
    Ok(Record {
        first,
        prediction_json,
    })
}

/// Reads one line. The prediction, most of the line, is kept as the text
/// it was (checked to be JSON) rather than parsed into a tree and written out again.
fn parse_line(text: &str, recipes: &mut Recipes) -> std::result::Result<Record, String> {
    let (first, prediction) = read_line(text, recipes, Catalog::builtin()).map_err(|e| e.0)?;
    Ok(Record {
        first,
        prediction_json: prediction.to_owned(),
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

/// Recipe versions already found or added in this transaction, so that the
/// thousands of batches of one version are not each hashed and looked up again.
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

/// What one transaction of an import has done so far. It is rolled back with the
/// transaction, so a new one is made for every attempt.
#[derive(Default)]
struct Tally {
    report: ImportReport,
    versions: Versions,
    search: Pending,
    /// Codes written by this transaction, so a code twice in one file is written once.
    written: HashSet<String>,
}

fn write_one(tx: &Transaction, tally: &mut Tally, record: &Record) -> Result<()> {
    let new = NewRecord {
        ids: tally.versions.ids(tx, &record.first.recipe)?,
        batch: &record.first,
        prediction_json: &record.prediction_json,
    };
    records::insert_records(tx, &[new], &mut tally.search).map(|_| ())
}

/// Writes some records of a transaction: the new ones all at once, or (`careful`)
/// one at a time behind savepoints, so that a record the database refuses is
/// reported and the others kept.
fn write_items(tx: &Transaction, items: &[Item], careful: bool, tally: &mut Tally) -> Result<()> {
    let codes: Vec<&str> = items
        .iter()
        .filter_map(|(_, item)| item.as_ref().ok().map(|r| r.first.code.as_str()))
        .collect();
    let present = batches::existing_codes(tx, &codes)?;
    let mut fresh: Vec<NewRecord> = Vec::new();
    for (number, item) in items {
        let record = match item {
            Err(why) => {
                tally.report.errors.push((*number, why.clone()));
                continue;
            }
            Ok(record) => record,
        };
        let code = &record.first.code;
        if present.contains(code) || tally.written.contains(code) {
            tally.report.skipped_existing += 1;
        } else if !careful {
            fresh.push(NewRecord {
                ids: tally.versions.ids(tx, &record.first.recipe)?,
                batch: &record.first,
                prediction_json: &record.prediction_json,
            });
            tally.written.insert(code.clone());
        } else {
            tx.execute_batch("SAVEPOINT import_record")?;
            let queued = tally.search.len();
            match write_one(tx, tally, record) {
                Ok(()) => {
                    tx.execute_batch("RELEASE import_record")?;
                    tally.report.imported += 1;
                    tally.written.insert(code.clone());
                }
                Err(e) => {
                    tx.execute_batch("ROLLBACK TO import_record; RELEASE import_record")?;
                    // The versions it added and its search entries are gone with it.
                    tally.versions.0.clear();
                    tally.search.truncate(queued);
                    tally.report.errors.push((*number, refusal(e)?));
                }
            }
        }
    }
    tally.report.imported += records::insert_records(tx, &fresh, &mut tally.search)?.len();
    Ok(())
}

/// Writes every piece of one transaction again, one record at a time.
fn write_carefully(tx: &Transaction, pieces: &[Vec<Item>]) -> Result<ImportReport> {
    guards::without_insert_guards(tx, || {
        let mut tally = Tally::default();
        for piece in pieces {
            write_items(tx, piece, true, &mut tally)?;
        }
        tally.search.write(tx)?;
        Ok(tally.report)
    })
}

fn merge(into: &mut ImportReport, part: ImportReport) {
    into.imported += part.imported;
    into.skipped_existing += part.skipped_existing;
    into.errors.extend(part.errors);
}

/// Why an import's writes stopped: the first line of the transaction that failed
/// (nothing of it was kept), and the error.
type WriteStop = (usize, StoreError);

/// Writes the pieces `next` hands out, in transactions of about [`CHUNK`] records.
/// Each piece is written as soon as it comes, so a reader on another thread checks
/// the next piece meanwhile. A transaction is first tried whole; if the database
/// refuses something in it, it is rolled back and written again record by record.
/// Returns what the committed transactions did, and why it stopped, if it did.
fn write_pieces(
    conn: &mut Connection,
    path: &Path,
    checkpoints: &Checkpoints,
    mut next: impl FnMut() -> Option<Vec<Item>>,
    mut spent: impl FnMut(Vec<Vec<Item>>),
) -> (ImportReport, Option<WriteStop>) {
    let mut report = ImportReport::default();
    let mut finished = false;
    while !finished {
        let Some(first) = next() else { break };
        let first_line = first.first().map_or(0, |(n, _)| *n);
        let mut taken = vec![first];
        checkpoints.before_transaction();
        let attempt = tx::write(conn, path, |tx| {
            guards::without_insert_guards(tx, || {
                let mut tally = Tally::default();
                // A retry after a busy file starts with what was taken before.
                for piece in &taken {
                    write_items(tx, piece, false, &mut tally)?;
                }
                while !finished && taken.iter().map(Vec::len).sum::<usize>() < CHUNK {
                    match next() {
                        Some(piece) => {
                            taken.push(piece);
                            write_items(tx, &taken[taken.len() - 1], false, &mut tally)?;
                        }
                        None => finished = true,
                    }
                }
                tally.search.write(tx)?;
                Ok(tally.report)
            })
        });
        let part = match attempt {
            Ok(part) => Ok(part),
            // Something was refused: nothing of this transaction was kept.
            Err(e) => match refusal(e) {
                Ok(_) => tx::write(conn, path, |tx| write_carefully(tx, &taken)),
                Err(e) => Err(e),
            },
        };
        match part {
            Ok(part) => {
                checkpoints.committed();
                merge(&mut report, part);
                spent(taken);
            }
            Err(e) => return (report, Some((first_line, e))),
        }
    }
    (report, None)
}

impl Store {
    /// Runs an import's writes: foreign keys unenforced on this connection (every
    /// row an import writes points at rows of the same transaction or at recipe
    /// versions it has just looked up; see [`guards`]) and checkpoints on a second
    /// thread (see [`checkpoint`]). Written pieces are handed to `spent`.
    fn import_pieces(
        &mut self,
        next: impl FnMut() -> Option<Vec<Item>>,
        spent: impl FnMut(Vec<Vec<Item>>),
    ) -> Result<(ImportReport, Option<WriteStop>)> {
        let path = self.path.clone();
        guards::without_foreign_keys(&mut self.conn, |conn| {
            checkpoint::with_checkpointer(conn, &path, |conn, checkpoints| {
                Ok(write_pieces(conn, &path, checkpoints, next, spent))
            })
        })
    }

    /// Writes batches recorded elsewhere, as an import does; a refused batch is
    /// reported by its 1-based position and nothing of it is written.
    pub fn import_batches(&mut self, list: &[Batch]) -> Result<ImportReport> {
        let mut recipes = Recipes::default();
        let mut pieces = list.chunks(PIECE).enumerate().map(move |(start, part)| {
            part.iter()
                .enumerate()
                .map(|(i, b)| (start * PIECE + i + 1, record(b.clone(), &mut recipes)))
                .collect::<Vec<Item>>()
        });
        let (report, stop) = self.import_pieces(|| pieces.next(), drop)?;
        match stop {
            None => Ok(report),
            Some((line, e)) => Err(stopped(line, report, e.to_string())),
        }
    }

    /// Reads JSON Lines of batches. A code already present is skipped and counted; a
    /// line refused is reported by number with the reason, and nothing of it is
    /// written. Lines are read and checked on a second thread while the ones before
    /// are written. When the input cannot be read on, or the log refuses a write,
    /// the import stops with [`StoreError::ImportStopped`], which says at which line
    /// and how many records were written before; a CSV export is refused at its
    /// first line.
    pub fn import_jsonl(&mut self, input: &mut (dyn BufRead + Send)) -> Result<ImportReport> {
        std::thread::scope(|scope| {
            // A few pieces wait while one is written: memory stays near one transaction.
            let (pieces, parsed) = std::sync::mpsc::sync_channel::<Vec<Item>>(4);
            // Written pieces go back to the reader to be freed, off the writer's path.
            let (give_back, spent) = std::sync::mpsc::channel::<Vec<Vec<Item>>>();
            let reader = scope.spawn(move || read_pieces(input, pieces, &spent));
            let written = self.import_pieces(
                || parsed.recv().ok(),
                // Moved in, so the reader sees the end when the writer is done.
                move |taken| {
                    // The reader may have stopped; then they are freed here.
                    let _ = give_back.send(taken);
                },
            );
            // After an error the reader stops at its next piece, as no one listens.
            drop(parsed);
            let read = match reader.join() {
                Ok(read) => read,
                Err(_) => Err((0, "the import's reader stopped on an internal error".into())),
            };
            let (report, stop) = written?;
            match (stop, read) {
                (Some((line, e)), _) => Err(stopped(line, report, e.to_string())),
                (None, Err((line, why))) => Err(stopped(line, report, why)),
                (None, Ok(())) => Ok(report),
            }
        })
    }
}

fn stopped(line: usize, report: ImportReport, cause: String) -> StoreError {
    StoreError::ImportStopped {
        line,
        report,
        cause,
    }
}

/// One line as read: its bytes (without the line break), or that it was too long.
enum Line {
    /// The end of the input.
    End,
    /// A whole line, at most [`MAX_LINE_BYTES`].
    Text,
    /// A line longer than [`MAX_LINE_BYTES`]: skipped to its end, not kept.
    TooLong,
}

/// Reads one line into `buf` (cleared first), keeping at most `max` bytes of it.
fn read_bounded(input: &mut dyn BufRead, buf: &mut Vec<u8>, max: usize) -> std::io::Result<Line> {
    buf.clear();
    let mut read_any = false;
    let mut too_long = false;
    loop {
        let available = match input.fill_buf() {
            Ok(b) => b,
            Err(e) if e.kind() == std::io::ErrorKind::Interrupted => continue,
            Err(e) => return Err(e),
        };
        if available.is_empty() {
            break;
        }
        read_any = true;
        let (chunk, done) = match available.iter().position(|&b| b == b'\n') {
            Some(i) => (&available[..i], Some(i + 1)),
            None => (available, None),
        };
        if !too_long && buf.len() + chunk.len() <= max {
            buf.extend_from_slice(chunk);
        } else {
            too_long = true;
            buf.clear();
        }
        let used = done.unwrap_or(available.len());
        input.consume(used);
        if done.is_some() {
            break;
        }
    }
    Ok(match (read_any, too_long) {
        (false, _) => Line::End,
        (true, false) => Line::Text,
        (true, true) => Line::TooLong,
    })
}

/// Reads and checks lines, handing them on a piece at a time, and frees the pieces
/// the writer hands back; stops early when the writer has stopped listening. When
/// the input cannot be read on, what was read before is handed on first, and the
/// line and reason returned.
fn read_pieces(
    input: &mut (dyn BufRead + Send),
    pieces: std::sync::mpsc::SyncSender<Vec<Item>>,
    spent: &std::sync::mpsc::Receiver<Vec<Vec<Item>>>,
) -> std::result::Result<(), (usize, String)> {
    let mut items: Vec<Item> = Vec::with_capacity(PIECE);
    let mut recipes = Recipes::default();
    let mut number = 0;
    let mut line = Vec::new();
    let mut failed = None;
    loop {
        let read = match read_bounded(input, &mut line, MAX_LINE_BYTES) {
            Ok(read) => read,
            Err(e) => {
                failed = Some((number + 1, format!("the file could not be read on: {e}")));
                Line::End
            }
        };
        let end = matches!(read, Line::End);
        if !end {
            number += 1;
        }
        match read {
            Line::End => {}
            Line::TooLong => items.push((
                number,
                Err(format!(
                    "the line is longer than {} MiB, so it cannot be a batch record",
                    MAX_LINE_BYTES >> 20
                )),
            )),
            Line::Text => match std::str::from_utf8(&line) {
                Err(e) => items.push((
                    number,
                    Err(format!(
                        "the line is not UTF-8 text (byte {} is not), so it cannot be a batch record",
                        e.valid_up_to() + 1
                    )),
                )),
                Ok(text) if number == 1 && crate::batch::csv::is_export_header(text) => {
                    return Err((
                        1,
                        "this is a CSV export; import reads JSON Lines, as `gelu batch export` \
                         writes by default (--format jsonl)"
                            .into(),
                    ));
                }
                Ok(text) if text.trim().is_empty() => {}
                Ok(text) => items.push((number, parse_line(text, &mut recipes))),
            },
        }
        if items.len() >= PIECE || (end && !items.is_empty()) {
            while let Ok(done) = spent.try_recv() {
                drop(done);
            }
            if pieces
                .send(std::mem::replace(&mut items, Vec::with_capacity(PIECE)))
                .is_err()
            {
                return Ok(());
            }
        }
        if end {
            // No more pieces (the writer sees the end), then free what the writer
            // hands back until it is done.
            drop(pieces);
            for done in spent {
                drop(done);
            }
            return failed.map_or(Ok(()), Err);
        }
    }
}

//! Writing batch records out for people and other programs: JSON Lines (lossless;
//! import reads it back) or CSV (for spreadsheets, one row per event of a record;
//! see [`super::csv`]), one record at a time, to any writer the caller opens.

use std::io::{self, Write};

use super::types::Batch;
use super::{csv, jsonl};

/// The export formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    /// One JSON object per batch per line.
    Jsonl,
    /// One row per event of a record, with a header.
    Csv,
}

/// Writes what comes before the first record (the CSV header).
pub fn write_start(format: Format, out: &mut dyn Write) -> io::Result<()> {
    match format {
        Format::Jsonl => Ok(()),
        Format::Csv => writeln!(out, "{}", csv::header()),
    }
}

/// Writes one record.
pub fn write_record(format: Format, batch: &Batch, out: &mut dyn Write) -> io::Result<()> {
    match format {
        Format::Jsonl => writeln!(out, "{}", jsonl::batch_json(batch)),
        Format::Csv => out.write_all(csv::rows(batch).as_bytes()),
    }
}

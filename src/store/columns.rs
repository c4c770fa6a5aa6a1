//! Reading the columns every query shares: times stored as RFC 3339 text, and a
//! batch's status from its stored state and trail.

use chrono::{DateTime, Utc};
use rusqlite::Row;

use crate::batch::Status;
use crate::model::time::parse_time;

/// Column `i` of `row` as a time.
pub(crate) fn time(row: &Row, i: usize) -> rusqlite::Result<DateTime<Utc>> {
    let text: String = row.get(i)?;
    parse_time(&text).map_err(|e| {
        rusqlite::Error::FromSqlConversionFailure(i, rusqlite::types::Type::Text, e.into())
    })
}

/// A batch's status from its stored state (`draft`/`final`) and whether it has amendments.
pub(crate) fn status(stored: &str, amended: bool) -> Status {
    match (stored, amended) {
        ("draft", _) => Status::Draft,
        (_, true) => Status::Amended,
        _ => Status::Final,
    }
}

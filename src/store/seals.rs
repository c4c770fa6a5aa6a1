//! Seals of signed-off records (the table `batch_seals`; the hash is the batch
//! domain's, [`crate::batch::seal`]): written at sign-off, at every entry on a
//! record's trail, for every signed-off record an import writes, and for records
//! signed off before seals were kept, when their log is upgraded. `gelu db check`
//! recomputes them to say which records were changed behind gelu's back.

use rusqlite::{Connection, ToSql, Transaction};

use super::error::Result;
use super::record::{Key, Stored, read_stored};
use super::rows;
use crate::batch::amend;
use crate::batch::seal::seal;
use crate::clock;
use crate::model::time::time_text;

/// A seal to write: the batch's row id, how many trail entries it covers, the hash.
pub(crate) type NewSeal = (i64, usize, String);

/// Writes seals, many rows per statement.
pub(crate) fn insert(tx: &Transaction, seals: &[NewSeal]) -> Result<()> {
    let now = time_text(&clock::now());
    let counts: Vec<i64> = seals.iter().map(|s| s.1 as i64).collect();
    let rows: Vec<[&dyn ToSql; 4]> = seals
        .iter()
        .zip(&counts)
        .map(|((id, _, hash), n)| [id as &dyn ToSql, n, &now, hash])
        .collect();
    rows::insert(
        tx,
        "INSERT INTO batch_seals (batch_id, amendments, sealed_at, hash)",
        &rows,
        32,
    )
}

/// Seals the record with row id `id` as it is stored now, over its whole trail.
pub(crate) fn seal_now(tx: &Transaction, id: i64) -> Result<()> {
    if let Some(s) = read_stored(tx, Key::Id(id))? {
        let n = s.first.amendments.len();
        let hash = seal(&s.first, n, &s.prediction_json);
        insert(tx, &[(id, n, hash)])?;
    }
    Ok(())
}

/// Seals every signed-off record that has no seal yet (run when a log is upgraded).
pub(crate) fn seal_unsealed(tx: &Transaction) -> Result<()> {
    let ids: Vec<i64> = tx
        .prepare(
            "SELECT id FROM batches b WHERE status = 'final'
             AND NOT EXISTS (SELECT 1 FROM batch_seals s WHERE s.batch_id = b.id)
             ORDER BY id",
        )?
        .query_map([], |r| r.get(0))?
        .collect::<rusqlite::Result<_>>()?;
    for id in ids {
        seal_now(tx, id)?;
    }
    Ok(())
}

/// What is wrong with one record against its seals, if anything: at most one
/// sentence, naming the record by its code.
fn record_problem(stored: Stored, seals: &[(usize, String, String)]) -> Option<String> {
    let code = stored.first.code.clone();
    let entries = stored.first.amendments.len();
    let signed = stored.first.status != crate::batch::Status::Draft;
    let mut check = stored.first.clone();
    if let Err(e) = amend::apply_trail(&mut check) {
        return Some(format!("record {code}: {}", e.0));
    }
    match (signed, seals.last()) {
        (false, None) => return None,
        (false, Some(_)) => {
            return Some(format!(
                "record {code} is stored as a draft but was sealed at sign-off: its sign-off was undone outside gelu"
            ));
        }
        (true, None) => {
            return Some(format!(
                "record {code} is signed off but has no seal: it was signed off outside gelu"
            ));
        }
        (true, Some((last, _, _))) if *last < entries => {
            return Some(format!(
                "record {code} holds {entries} amendments, but gelu sealed {last}: entries were added outside gelu"
            ));
        }
        _ => {}
    }
    for (n, hash, sealed_at) in seals {
        if *n > entries {
            return Some(format!(
                "record {code} holds {entries} amendments, but gelu sealed {n}: entries were removed outside gelu"
            ));
        }
        if seal(&stored.first, *n, &stored.prediction_json) != *hash {
            let when = if *n == 0 {
                "signed off".to_owned()
            } else {
                format!("amended (entry {n})")
            };
            return Some(format!(
                "record {code} was changed outside gelu: it no longer matches the seal made when it was {when}, at {sealed_at}"
            ));
        }
    }
    None
}

/// Every record that does not match its seals (or should have one and has none),
/// one sentence each, by row id.
pub(crate) fn problems(conn: &Connection) -> Result<Vec<String>> {
    let mut seals: Vec<(i64, usize, String, String)> = conn
        .prepare(
            "SELECT batch_id, amendments, hash, sealed_at FROM batch_seals ORDER BY batch_id, amendments",
        )?
        .query_map([], |r| {
            Ok((
                r.get(0)?,
                r.get::<_, i64>(1)? as usize,
                r.get(2)?,
                r.get(3)?,
            ))
        })?
        .collect::<rusqlite::Result<_>>()?;
    seals.reverse();
    let ids: Vec<i64> = conn
        .prepare("SELECT id FROM batches ORDER BY id")?
        .query_map([], |r| r.get(0))?
        .collect::<rusqlite::Result<_>>()?;
    let mut out = Vec::new();
    for id in ids {
        let mut mine = Vec::new();
        while seals.last().is_some_and(|s| s.0 <= id) {
            if let Some((batch, n, hash, at)) = seals.pop()
                && batch == id
            {
                mine.push((n, hash, at));
            }
        }
        match read_stored(conn, Key::Id(id)) {
            Ok(Some(stored)) => out.extend(record_problem(stored, &mine)),
            Ok(None) => {}
            Err(e) => out.push(format!("record in row {id} cannot be read: {e}")),
        }
    }
    Ok(out)
}

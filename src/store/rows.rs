//! Multi-row INSERTs: many rows in one statement, so a bulk write runs a few
//! statements (each with its own start-up and statement journal) instead of one
//! per row.

use rusqlite::{ToSql, Transaction, params_from_iter};

use super::error::Result;

/// `head` followed by `rows` value tuples of `width` placeholders:
/// `INSERT INTO t (a, b) VALUES (?, ?), (?, ?)`.
fn sql(head: &str, width: usize, rows: usize) -> String {
    let tuple = format!("({})", vec!["?"; width].join(", "));
    format!("{head} VALUES {}", vec![tuple; rows].join(", "))
}

/// Inserts `rows` with `head` (`INSERT INTO table (columns)`): `group` rows per
/// statement (a power of two), then what is left in halving statements (16, 8, ...,
/// 1 rows), so no table needs more than a handful of prepared statements in the
/// cache. Each row holds one value per column.
pub(crate) fn insert<const W: usize>(
    tx: &Transaction,
    head: &str,
    rows: &[[&dyn ToSql; W]],
    group: usize,
) -> Result<()> {
    debug_assert!(group.is_power_of_two());
    let mut rest = rows;
    let mut size = group.max(1);
    while !rest.is_empty() {
        while size > rest.len() {
            size /= 2;
        }
        let (part, after) = rest.split_at(size);
        tx.prepare_cached(&sql(head, W, size))?
            .execute(params_from_iter(part.iter().flatten()))?;
        rest = after;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_statement_has_one_tuple_per_row() {
        assert_eq!(
            sql("INSERT INTO t (a, b)", 2, 3),
            "INSERT INTO t (a, b) VALUES (?, ?), (?, ?), (?, ?)"
        );
    }

    #[test]
    fn rows_are_written_in_groups_and_the_rest() {
        let mut conn = rusqlite::Connection::open_in_memory().unwrap();
        conn.execute_batch("CREATE TABLE t (a INTEGER, b TEXT)")
            .unwrap();
        let tx = conn.transaction().unwrap();
        let numbers: Vec<i64> = (0..7).collect();
        let words: Vec<String> = numbers.iter().map(|n| format!("w{n}")).collect();
        let rows: Vec<[&dyn ToSql; 2]> = numbers
            .iter()
            .zip(&words)
            .map(|(n, w)| [n as &dyn ToSql, w as &dyn ToSql])
            .collect();
        insert(&tx, "INSERT INTO t (a, b)", &rows, 4).unwrap();
        let got: Vec<(i64, String)> = tx
            .prepare("SELECT a, b FROM t ORDER BY rowid")
            .unwrap()
            .query_map([], |r| Ok((r.get(0)?, r.get(1)?)))
            .unwrap()
            .collect::<rusqlite::Result<_>>()
            .unwrap();
        // 7 rows: one statement of 4, then 2, then 1, in order.
        let expected: Vec<(i64, String)> = (0..7).map(|n| (n, format!("w{n}"))).collect();
        assert_eq!(got, expected);
    }
}

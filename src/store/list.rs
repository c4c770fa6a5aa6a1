//! The batch list: filters, full-text search and keyset pagination (no OFFSET,
//! so scrolling far down a million rows costs the same as the first page).

use rusqlite::types::Value as SqlValue;

use super::Store;
use super::columns::{status, time};
use super::error::Result;
use super::search::{PER_BATCH, fts_query};
use crate::batch::{BatchCursor, BatchFilter, BatchSummary, drink_volume_from};
use crate::model::Style;
use crate::model::time::time_text;

/// From how many index matches a search walks the batches instead of sorting matches.
const MANY_MATCHES: i64 = 2_000;

impl Store {
    /// Whether a full-text query has at least `n` matching index rows (bounded work).
    fn matches_at_least(&self, query: &str, n: i64) -> Result<bool> {
        let found: i64 = self
            .conn
            .prepare_cached(
                "SELECT count(*) FROM (SELECT 1 FROM batch_search WHERE batch_search MATCH ?1 LIMIT ?2)",
            )?
            .query_row(rusqlite::params![query, n], |r| r.get(0))?;
        Ok(found >= n)
    }

    /// Batches matching `filter`, newest first; pass the last row's cursor as
    /// `filter.after` for the next page.
    pub fn list_batches(&self, filter: &BatchFilter) -> Result<Vec<BatchSummary>> {
        let mut sql = String::from(
            "SELECT b.id, b.code, r.name, v.version, b.made_at, b.size_g, b.operator, b.status,
                    EXISTS (SELECT 1 FROM amendments a WHERE a.batch_id = b.id),
                    (SELECT json_extract(c.value, '$.new')
                       FROM amendments a, json_each(a.changes) c
                      WHERE a.batch_id = b.id AND json_extract(c.value, '$.field') = 'operator'
                      ORDER BY a.id DESC, c.key DESC LIMIT 1),
                    (SELECT json_extract(p.analysis, '$.style', '$.volume_ml')
                       FROM batch_predictions p WHERE p.batch_id = b.id)
             FROM batches b
             JOIN recipes r ON r.id = b.recipe_id
             JOIN recipe_versions v ON v.id = b.recipe_version_id
             WHERE 1 = 1",
        );
        let mut args: Vec<SqlValue> = Vec::new();
        push_filters(&mut sql, &mut args, filter);
        if let Some(query) = filter.search.as_deref().and_then(fts_query) {
            // Few matches: collect them and sort. Many: walk the batches newest first,
            // which stops as soon as the page is full, testing each against the index
            // (whole words). A prefix is different: FTS5 builds its whole list of
            // matches on every query, so it is not counted first and not probed one
            // batch at a time. Its page is taken from the newest index entries when
            // that is provably the true page (always, with few matches); else it is
            // counted, to pick between the two exact plans.
            let newest = if query.has_prefix {
                self.page_from_newest_entries(&query.fts, filter)?
            } else {
                None
            };
            let clause = if let Some(ids) = newest {
                let list = ids.iter().map(i64::to_string).collect::<Vec<_>>().join(",");
                args.push(SqlValue::Text(format!("[{list}]")));
                sql.push_str(&format!(
                    " AND b.id IN (SELECT value FROM json_each(?{}))",
                    args.len()
                ));
                String::new()
            } else if !self.matches_at_least(&query.fts, MANY_MATCHES)? {
                format!(
                    " AND b.id IN (SELECT rowid / {PER_BATCH} FROM batch_search \
                       WHERE batch_search MATCH ?)"
                )
            } else if query.has_prefix {
                format!(
                    " AND +b.id IN (SELECT rowid / {PER_BATCH} FROM batch_search \
                       WHERE batch_search MATCH ?)"
                )
            } else {
                format!(
                    " AND EXISTS (SELECT 1 FROM batch_search WHERE batch_search MATCH ? \
                       AND rowid >= b.id * {PER_BATCH} AND rowid < (b.id + 1) * {PER_BATCH})"
                )
            };
            if !clause.is_empty() {
                args.push(SqlValue::Text(query.fts));
                sql.push_str(&clause.replace('?', &format!("?{}", args.len())));
            }
        }
        sql.push_str(" ORDER BY b.made_at DESC, b.id DESC");
        if filter.limit > 0 {
            args.push(SqlValue::Integer(filter.limit as i64));
            sql.push_str(&format!(" LIMIT ?{}", args.len()));
        }
        let mut stmt = self.conn.prepare_cached(&sql)?;
        let rows = stmt.query_map(rusqlite::params_from_iter(args), |r| {
            let made_at_text: String = r.get(4)?;
            let amended_operator: Option<String> = r.get(9)?;
            // ["liqueur", 20000.0] from the prediction (absent for old records).
            let recorded: Option<(Option<String>, Option<f64>)> = r
                .get::<_, Option<String>>(10)?
                .and_then(|text| serde_json::from_str(&text).ok());
            Ok(BatchSummary {
                code: r.get(1)?,
                recipe: r.get(2)?,
                recipe_version: r.get(3)?,
                made_at: time(r, 4)?,
                size_g: r.get(5)?,
                drink_volume_ml: recorded.and_then(|(style, volume)| {
                    drink_volume_from(style.as_deref().and_then(Style::parse), volume)
                }),
                operator: match amended_operator {
                    Some(name) => name,
                    None => r.get(6)?,
                },
                status: status(&r.get::<_, String>(7)?, r.get(8)?),
                cursor: BatchCursor {
                    made_at: made_at_text,
                    id: r.get(0)?,
                },
            })
        })?;
        Ok(rows.collect::<rusqlite::Result<_>>()?)
    }

    /// For a search with many matches: the ids of the page, read from the newest
    /// index entries (index rowids grow with batch ids), or `None` when that cannot
    /// be proven to be the true page, newest by made-at time. It is proven when no
    /// batch older in id than the entries read is newer in time than the page's
    /// last row (imports of old records can break that; then the caller falls back).
    fn page_from_newest_entries(
        &self,
        fts: &str,
        filter: &BatchFilter,
    ) -> Result<Option<Vec<i64>>> {
        if filter.limit == 0 {
            return Ok(None);
        }
        let budget = filter.limit.saturating_mul(ENTRY_BUDGET_PER_ROW);
        let mut seen: Vec<i64> = Vec::new();
        {
            let mut stmt = self.conn.prepare_cached(&format!(
                "SELECT rowid / {PER_BATCH} FROM batch_search WHERE batch_search MATCH ?1 ORDER BY rowid DESC"
            ))?;
            let mut rows = stmt.query([fts])?;
            while let Some(row) = rows.next()? {
                let id: i64 = row.get(0)?;
                // The entries of one batch are adjacent in rowid order.
                if seen.last() != Some(&id) {
                    seen.push(id);
                    if seen.len() >= budget {
                        break;
                    }
                }
            }
        }
        let every_match_read = seen.len() < budget;
        let Some(&oldest_read) = seen.last() else {
            return Ok(Some(Vec::new()));
        };
        // The page among the batches read, with the other filters.
        let mut sql = String::from("SELECT b.id, b.made_at FROM batches b WHERE 1 = 1");
        let mut args: Vec<SqlValue> = Vec::new();
        push_filters(&mut sql, &mut args, filter);
        let list = seen
            .iter()
            .map(i64::to_string)
            .collect::<Vec<_>>()
            .join(",");
        args.push(SqlValue::Text(format!("[{list}]")));
        sql.push_str(&format!(
            " AND b.id IN (SELECT value FROM json_each(?{}))",
            args.len()
        ));
        args.push(SqlValue::Integer(filter.limit as i64));
        sql.push_str(&format!(
            " ORDER BY b.made_at DESC, b.id DESC LIMIT ?{}",
            args.len()
        ));
        let page: Vec<(i64, String)> = self
            .conn
            .prepare(&sql)?
            .query_map(rusqlite::params_from_iter(args), |r| {
                Ok((r.get(0)?, r.get(1)?))
            })?
            .collect::<rusqlite::Result<_>>()?;
        if every_match_read {
            return Ok(Some(page.into_iter().map(|(id, _)| id).collect()));
        }
        let Some((last_id, last_made_at)) =
            page.last().cloned().filter(|_| page.len() == filter.limit)
        else {
            return Ok(None);
        };
        // Is any batch not read (lower id) newer than the page's last row?
        let mut sql = String::from("SELECT EXISTS (SELECT 1 FROM batches b WHERE 1 = 1");
        let mut args: Vec<SqlValue> = Vec::new();
        push_filters(&mut sql, &mut args, filter);
        args.push(SqlValue::Text(last_made_at));
        args.push(SqlValue::Integer(last_id));
        args.push(SqlValue::Integer(oldest_read));
        let n = args.len();
        sql.push_str(&format!(
            " AND (b.made_at, b.id) > (?{}, ?{}) AND b.id < ?{n})",
            n - 2,
            n - 1
        ));
        let newer_unread: bool = self
            .conn
            .prepare(&sql)?
            .query_row(rusqlite::params_from_iter(args), |r| r.get(0))?;
        Ok((!newer_unread).then(|| page.into_iter().map(|(id, _)| id).collect()))
    }
}

/// How many distinct batches of index entries a newest-entries page may read per
/// row it shows, before the search falls back to collecting every match.
const ENTRY_BUDGET_PER_ROW: usize = 20;

/// Appends the recipe, date and cursor filters as numbered parameters.
fn push_filters(sql: &mut String, args: &mut Vec<SqlValue>, filter: &BatchFilter) {
    let mut arg = |sql: &mut String, clause: &str, value: SqlValue| {
        args.push(value);
        sql.push_str(&clause.replace('?', &format!("?{}", args.len())));
    };
    if let Some(recipe) = &filter.recipe {
        arg(
            sql,
            " AND b.recipe_id = (SELECT id FROM recipes WHERE name = ?)",
            SqlValue::Text(recipe.clone()),
        );
    }
    if let Some(since) = &filter.since {
        arg(sql, " AND b.made_at >= ?", SqlValue::Text(time_text(since)));
    }
    if let Some(until) = &filter.until {
        arg(sql, " AND b.made_at < ?", SqlValue::Text(time_text(until)));
    }
    if let Some(after) = &filter.after {
        // A row-value comparison, so SQLite seeks the index to the cursor.
        arg(
            sql,
            " AND (b.made_at, b.id) < (?",
            SqlValue::Text(after.made_at.clone()),
        );
        arg(sql, ", ?)", SqlValue::Integer(after.id));
    }
}

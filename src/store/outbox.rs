//! What waits to be sent to the hub, read a page at a time, and marking it sent.
//!
//! Rows are appended with growing row ids, so "sent" is a watermark per table (every
//! row up to it is on the hub, or came from it) plus `sync_heads` (the batches the
//! hub holds, with their identity) and two queues that sent rows leave: sign-offs
//! and decisions made here. A push takes its bounds first (one statement, so one
//! snapshot): rows written while it runs wait for the next sync. The watermarks move
//! only after the hub has committed a page, so a push killed at any moment sends
//! again at most the page it was sending, which the hub takes as already held.

use rusqlite::{Connection, OptionalExtension, Row, params};

use super::Store;
use super::columns::time;
use super::error::{Result, StoreError};
use super::site::site_code;
use super::sync_types::{PushBounds, PushMarks, PushPage, SyncStatus};
use crate::batch::BatchLine;
use crate::batch::shared::{
    EntryBody, SharedDecision, SharedEntry, SharedFinal, SharedHead, SharedVersion,
};

/// The entry tables, their watermark keys, and the column that says when.
pub(crate) const ENTRY_TABLES: [(&str, &str, &str); 3] = [
    ("measurements", "push.measurements", "taken_at"),
    ("batch_notes", "push.notes", "written_at"),
    ("amendments", "push.amendments", "amended_at"),
];

/// A value of `sync_state`, as a number (0 when unset).
pub(crate) fn mark(conn: &Connection, key: &str) -> Result<i64> {
    let text: Option<String> = conn
        .prepare_cached("SELECT value FROM sync_state WHERE key = ?1")?
        .query_row([key], |r| r.get(0))
        .optional()?;
    Ok(text.and_then(|t| t.parse().ok()).unwrap_or(0))
}

/// Sets a value of `sync_state`.
pub(crate) fn set_mark(conn: &Connection, key: &str, value: &str) -> Result<()> {
    conn.prepare_cached(
        "INSERT INTO sync_state (key, value) VALUES (?1, ?2)
         ON CONFLICT (key) DO UPDATE SET value = excluded.value",
    )?
    .execute(params![key, value])?;
    Ok(())
}

/// Raises a watermark (never lowers it).
pub(crate) fn raise_mark(conn: &Connection, key: &str, value: i64) -> Result<()> {
    if value > mark(conn, key)? {
        set_mark(conn, key, &value.to_string())?;
    }
    Ok(())
}

fn count(conn: &Connection, sql: &str, args: impl rusqlite::Params) -> Result<usize> {
    let n: i64 = conn.prepare_cached(sql)?.query_row(args, |r| r.get(0))?;
    Ok(n as usize)
}

/// The batch heads of `where_sql` (on `b`), with their lines, as first written.
/// Returns (row id, head, stored status, finalized_at, finalized_by).
type HeadRow = (i64, SharedHead, bool, Option<String>, Option<String>);

pub(crate) fn read_heads(
    conn: &Connection,
    site: &str,
    where_sql: &str,
    args: impl rusqlite::Params,
) -> Result<Vec<HeadRow>> {
    let sql = format!(
        "SELECT b.id, b.code, r.name, coalesce(v.origin_version, v.version), v.content_hash,
                b.made_at, b.size_g, b.operator, b.status, b.finalized_at, b.finalized_by,
                coalesce(p.analysis, 'null'), h.site
         FROM batches b
         JOIN recipes r ON r.id = b.recipe_id
         JOIN recipe_versions v ON v.id = b.recipe_version_id
         LEFT JOIN batch_predictions p ON p.batch_id = b.id
         LEFT JOIN sync_heads h ON h.batch_id = b.id
         WHERE {where_sql} ORDER BY b.id"
    );
    let mut stmt = conn.prepare_cached(&sql)?;
    let mut rows = stmt.query(args)?;
    let mut out = Vec::new();
    while let Some(r) = rows.next()? {
        out.push((
            r.get(0)?,
            SharedHead {
                code: r.get(1)?,
                site: r
                    .get::<_, Option<String>>(12)?
                    .unwrap_or_else(|| site.to_owned()),
                recipe: r.get(2)?,
                recipe_version: r.get(3)?,
                recipe_hash: r.get(4)?,
                made_at: time(r, 5)?,
                size_g: r.get(6)?,
                operator: r.get(7)?,
                lines: Vec::new(),
                prediction: r.get(11)?,
            },
            r.get::<_, String>(8)? == "final",
            r.get(9)?,
            r.get(10)?,
        ));
    }
    drop(rows);
    if let (Some(first), Some(last)) = (out.first(), out.last()) {
        let (first, last) = (first.0, last.0);
        let mut stmt = conn.prepare_cached(
            "SELECT batch_id, ingredient, planned_g, actual_g, lot FROM batch_lines
             WHERE batch_id BETWEEN ?1 AND ?2 ORDER BY batch_id, position",
        )?;
        let mut rows = stmt.query([first, last])?;
        let mut at = 0;
        while let Some(r) = rows.next()? {
            let id: i64 = r.get(0)?;
            while at < out.len() && out[at].0 < id {
                at += 1;
            }
            if at < out.len() && out[at].0 == id {
                out[at].1.lines.push(BatchLine {
                    ingredient: r.get(1)?,
                    planned_g: r.get(2)?,
                    actual_g: r.get(3)?,
                    lot: r.get(4)?,
                });
            }
        }
    }
    Ok(out)
}

/// The head of one batch row, as first written.
pub(crate) fn read_head(conn: &Connection, site: &str, id: i64) -> Result<Option<SharedHead>> {
    let rows = read_heads(conn, site, "b.id = ?1", [id])?;
    Ok(rows.into_iter().next().map(|r| r.1))
}

/// An entry row's body from the columns `kind, value, unit, at, by` (measurements),
/// `text, at, by` (notes) or `at, by, reason, changes` (amendments), from `i`.
fn body(table: &str, r: &Row, i: usize) -> rusqlite::Result<EntryBody> {
    Ok(match table {
        "measurements" => EntryBody::Measurement {
            kind: r.get(i)?,
            value: r.get(i + 1)?,
            unit: r.get(i + 2)?,
            taken_at: time(r, i + 3)?,
            by: r.get(i + 4)?,
        },
        "batch_notes" => EntryBody::Note {
            text: r.get(i)?,
            written_at: time(r, i + 1)?,
            by: r.get(i + 2)?,
        },
        _ => EntryBody::Amendment {
            amended_at: time(r, i)?,
            by: r.get(i + 1)?,
            reason: r.get(i + 2)?,
            changes: r.get(i + 3)?,
        },
    })
}

/// The body columns of an entry table, in [`body`]'s order.
fn body_columns(table: &str) -> &'static str {
    match table {
        "measurements" => "e.kind, e.value, e.unit, e.taken_at, e.taken_by",
        "batch_notes" => "e.text, e.written_at, e.written_by",
        _ => "e.amended_at, e.amended_by, e.reason, e.changes",
    }
}

/// Written here (`site IS NULL`) entries of `table` matching `where_sql`, with their
/// place in the list, in row order, at most `limit`: (row id, batch row id, place, body).
fn read_entries(
    conn: &Connection,
    table: &'static str,
    where_sql: &str,
    args: impl rusqlite::Params,
    limit: i64,
) -> Result<Vec<(i64, i64, u32, EntryBody)>> {
    let sql = format!(
        "SELECT e.id, e.batch_id, coalesce(e.position,
                (SELECT count(*) FROM {table} p WHERE p.batch_id = e.batch_id AND p.id <= e.id)),
                {}
         FROM {table} e WHERE e.site IS NULL AND {where_sql} ORDER BY e.id LIMIT {limit}",
        body_columns(table)
    );
    let mut stmt = conn.prepare_cached(&sql)?;
    let rows = stmt.query_map(args, |r| {
        Ok((r.get(0)?, r.get(1)?, r.get(2)?, body(table, r, 3)?))
    })?;
    Ok(rows.collect::<rusqlite::Result<_>>()?)
}

impl Store {
    /// What waits to be sent, what waits for a person, and when the last sync was.
    pub fn sync_status(&self) -> Result<SyncStatus> {
        let c = &self.conn;
        let mut entries = 0;
        for (table, key, _) in ENTRY_TABLES {
            entries += count(
                c,
                &format!("SELECT count(*) FROM {table} WHERE id > ?1 AND site IS NULL"),
                [mark(c, key)?],
            )?;
        }
        Ok(SyncStatus {
            site: site_code(c)?,
            hub: c
                .query_row("SELECT value FROM sync_state WHERE key = 'hub'", [], |r| {
                    r.get(0)
                })
                .optional()?,
            last_sync: c
                .query_row(
                    "SELECT value FROM sync_state WHERE key = 'last_sync'",
                    [],
                    |r| r.get(0),
                )
                .optional()?,
            versions: count(
                c,
                "SELECT count(*) FROM recipe_versions WHERE id > ?1 AND site IS NULL",
                [mark(c, "push.versions")?],
            )?,
            batches: count(
                c,
                "SELECT count(*) FROM batches b WHERE b.id > ?1
                 AND NOT EXISTS (SELECT 1 FROM sync_heads h WHERE h.batch_id = b.id)",
                [mark(c, "push.heads")?],
            )?,
            entries,
            finals: count(c, "SELECT count(*) FROM sync_finals_waiting", [])?,
            decisions: count(c, "SELECT count(*) FROM sync_decisions_waiting", [])?,
            conflicts: count(
                c,
                "SELECT count(*) FROM sync_conflicts WHERE decided_at IS NULL AND kind <> 'held-entry'",
                [],
            )?,
        })
    }

    /// Starts a sync with the hub known by `hub_id`. A log that last synchronised
    /// with another hub sends everything written here again (the new hub lacks it)
    /// and pulls from the start. Returns whether it started over.
    pub fn sync_begin(&mut self, hub_id: &str) -> Result<bool> {
        self.write(|tx| {
            let known: Option<String> = tx
                .query_row("SELECT value FROM sync_state WHERE key = 'hub'", [], |r| {
                    r.get(0)
                })
                .optional()?;
            match known {
                Some(id) if id == hub_id => Ok(false),
                known => {
                    tx.execute("DELETE FROM sync_state WHERE key <> 'last_sync'", [])?;
                    tx.execute("DELETE FROM sync_heads WHERE pulled = 0", [])?;
                    set_mark(tx, "hub", hub_id)?;
                    Ok(known.is_some())
                }
            }
        })
    }

    /// Whether this log has ever synchronised with a hub.
    pub fn has_synced(&self) -> Result<bool> {
        Ok(self.conn.query_row(
            "SELECT EXISTS (SELECT 1 FROM sync_state WHERE key = 'hub')",
            [],
            |r| r.get(0),
        )?)
    }

    /// How far a pull has got with the hub's rows of one kind (0 at first).
    pub fn sync_mark(&self, key: &str) -> Result<i64> {
        mark(&self.conn, key)
    }

    /// Records the end of a sync (RFC 3339 time).
    pub fn sync_end(&mut self, at: &str) -> Result<()> {
        self.write(|tx| set_mark(tx, "last_sync", at))
    }

    /// Where a push starts and stops (one snapshot of the log).
    pub fn push_bounds(&self) -> Result<PushBounds> {
        let c = &self.conn;
        let (versions, heads, m, n, a) = c.query_row(
            "SELECT (SELECT coalesce(max(id), 0) FROM recipe_versions),
                    (SELECT coalesce(max(id), 0) FROM batches),
                    (SELECT coalesce(max(id), 0) FROM measurements),
                    (SELECT coalesce(max(id), 0) FROM batch_notes),
                    (SELECT coalesce(max(id), 0) FROM amendments)",
            [],
            |r| Ok((r.get(0)?, r.get(1)?, r.get(2)?, r.get(3)?, r.get(4)?)),
        )?;
        Ok(PushBounds {
            site: site_code(c)?,
            versions,
            heads,
            heads_from: mark(c, "push.heads")?,
            entries: [m, n, a],
        })
    }

    /// The next page of records to send (at most about `limit`), in the order the
    /// hub needs them: recipe versions, batches (each with its sign-off and entries),
    /// entries on batches already there, sign-offs, decisions. An empty page with no
    /// marks means the push is done.
    pub fn next_push_page(&self, bounds: &PushBounds, limit: usize) -> Result<PushPage> {
        let c = &self.conn;
        let site = bounds.site.as_str();
        let limit = limit.max(1) as i64;
        let mut page = PushPage::default();

        let from = mark(c, "push.versions")?;
        if from < bounds.versions {
            let mut stmt = c.prepare_cached(
                "SELECT v.id, r.name, coalesce(v.origin_version, v.version), v.content_hash, v.text
                 FROM recipe_versions v JOIN recipes r ON r.id = v.recipe_id
                 WHERE v.id > ?1 AND v.id <= ?2 AND v.site IS NULL ORDER BY v.id LIMIT ?3",
            )?;
            let rows = stmt.query_map(params![from, bounds.versions, limit], |r| {
                Ok((
                    r.get::<_, i64>(0)?,
                    SharedVersion {
                        recipe: r.get(1)?,
                        version: r.get(2)?,
                        content_hash: r.get(3)?,
                        text: r.get(4)?,
                        site: site.to_owned(),
                    },
                ))
            })?;
            let rows: Vec<(i64, SharedVersion)> = rows.collect::<rusqlite::Result<_>>()?;
            let through = match rows.last() {
                Some((id, _)) if rows.len() as i64 == limit => *id,
                _ => bounds.versions,
            };
            page.versions = rows.into_iter().map(|(_, v)| v).collect();
            page.marks.through.push(("push.versions", through));
            return Ok(page);
        }

        let from = mark(c, "push.heads")?;
        if from < bounds.heads {
            let heads = read_heads(
                c,
                site,
                "b.id IN (SELECT id FROM batches WHERE id > ?1 AND id <= ?2
                    AND NOT EXISTS (SELECT 1 FROM sync_heads s WHERE s.batch_id = batches.id)
                    ORDER BY id LIMIT ?3)",
                params![from, bounds.heads, limit],
            )?;
            let through = match heads.last() {
                Some((id, ..)) if heads.len() as i64 == limit => *id,
                _ => bounds.heads,
            };
            if let (Some(first), Some(last)) = (heads.first(), heads.last()) {
                let (first, last) = (first.0, last.0);
                let mut hashes = std::collections::HashMap::new();
                for (id, head, is_final, at, by) in &heads {
                    let hash = head.hash();
                    if *is_final {
                        page.finals.push(SharedFinal {
                            code: head.code.clone(),
                            head_hash: hash.clone(),
                            at: final_time(at.as_deref(), head)?,
                            by: by.clone().unwrap_or_default(),
                            site: site.to_owned(),
                        });
                        page.marks.finals.push(*id);
                    }
                    page.marks.heads.push((*id, hash.clone()));
                    hashes.insert(*id, (head.code.clone(), hash));
                }
                for (i, (table, _, _)) in ENTRY_TABLES.iter().enumerate() {
                    for (_, batch_id, position, body) in read_entries(
                        c,
                        table,
                        "e.batch_id BETWEEN ?1 AND ?2 AND e.id <= ?3",
                        params![first, last, bounds.entries[i]],
                        -1,
                    )? {
                        if let Some((code, hash)) = hashes.get(&batch_id) {
                            page.entries.push(SharedEntry {
                                code: code.clone(),
                                head_hash: hash.clone(),
                                position,
                                site: site.to_owned(),
                                body,
                            });
                        }
                    }
                }
            }
            page.heads = heads.into_iter().map(|h| h.1).collect();
            page.marks.through.push(("push.heads", through));
            return Ok(page);
        }

        for (i, (table, key, _)) in ENTRY_TABLES.iter().enumerate() {
            let from = mark(c, key)?;
            if from >= bounds.entries[i] {
                continue;
            }
            // Entries of batches sent during this push went with their batch.
            let rows = read_entries(
                c,
                table,
                "e.id > ?1 AND e.id <= ?2 AND NOT (e.batch_id > ?3 AND e.batch_id <= ?4
                   AND EXISTS (SELECT 1 FROM sync_heads s WHERE s.batch_id = e.batch_id AND s.pulled = 0))",
                params![from, bounds.entries[i], bounds.heads_from, bounds.heads],
                limit,
            )?;
            let mut through = match rows.last() {
                Some((id, ..)) if rows.len() as i64 == limit => *id,
                _ => bounds.entries[i],
            };
            for (id, batch_id, position, body) in rows {
                let head: Option<(String, String)> = c
                    .prepare_cached(
                        "SELECT b.code, h.head_hash FROM batches b
                         JOIN sync_heads h ON h.batch_id = b.id WHERE b.id = ?1",
                    )?
                    .query_row([batch_id], |r| Ok((r.get(0)?, r.get(1)?)))
                    .optional()?;
                let Some((code, head_hash)) = head else {
                    // Its batch is not on the hub (it came after this push began):
                    // stop before it; it goes next time.
                    through = id - 1;
                    break;
                };
                page.entries.push(SharedEntry {
                    code,
                    head_hash,
                    position,
                    site: site.to_owned(),
                    body,
                });
            }
            if page.entries.is_empty() && through <= from {
                // The first waiting entry's batch is not on the hub yet: next time.
                continue;
            }
            page.marks.through.push((key, through));
            return Ok(page);
        }

        let mut stmt = c.prepare_cached(
            "SELECT w.batch_id, b.code, h.head_hash, b.finalized_at, b.finalized_by
             FROM sync_finals_waiting w JOIN batches b ON b.id = w.batch_id
             JOIN sync_heads h ON h.batch_id = w.batch_id
             WHERE b.status = 'final' ORDER BY w.batch_id LIMIT ?1",
        )?;
        let finals = stmt.query_map([limit], |r| {
            Ok((
                r.get::<_, i64>(0)?,
                SharedFinal {
                    code: r.get(1)?,
                    head_hash: r.get(2)?,
                    at: time(r, 3)?,
                    by: r.get(4)?,
                    site: site.to_owned(),
                },
            ))
        })?;
        for row in finals {
            let (id, f) = row?;
            page.finals.push(f);
            page.marks.finals.push(id);
        }
        if !page.finals.is_empty() {
            return Ok(page);
        }

        let mut stmt = c.prepare_cached(
            "SELECT c.id, c.kind, c.code, c.decided_at, c.decided_by, c.decision
             FROM sync_decisions_waiting w JOIN sync_conflicts c ON c.id = w.conflict_id
             WHERE c.decided_at IS NOT NULL ORDER BY c.id LIMIT ?1",
        )?;
        let decisions = stmt.query_map([limit], |r| {
            Ok((
                r.get::<_, i64>(0)?,
                SharedDecision {
                    kind: r.get(1)?,
                    code: r.get(2)?,
                    decided_at: time(r, 3)?,
                    by: r.get(4)?,
                    decision: r.get(5)?,
                    site: site.to_owned(),
                },
            ))
        })?;
        for row in decisions {
            let (id, d) = row?;
            page.decisions.push(d);
            page.marks.decisions.push(id);
        }
        Ok(page)
    }

    /// Marks a page as held by the hub (call once the hub has committed it).
    pub fn commit_push(&mut self, page: &PushPage) -> Result<()> {
        let marks: &PushMarks = &page.marks;
        let site = self.site_code()?;
        self.write(|tx| {
            for (key, through) in &marks.through {
                raise_mark(tx, key, *through)?;
            }
            let mut heads = tx.prepare_cached(
                "INSERT OR IGNORE INTO sync_heads (batch_id, site, head_hash, pulled)
                 VALUES (?1, ?2, ?3, 0)",
            )?;
            for (id, hash) in &marks.heads {
                heads.execute(params![id, site, hash])?;
            }
            let mut finals =
                tx.prepare_cached("DELETE FROM sync_finals_waiting WHERE batch_id = ?1")?;
            for id in &marks.finals {
                finals.execute([id])?;
            }
            let mut decisions =
                tx.prepare_cached("DELETE FROM sync_decisions_waiting WHERE conflict_id = ?1")?;
            for id in &marks.decisions {
                decisions.execute([id])?;
            }
            Ok(())
        })
    }
}

/// A stored sign-off time (a final batch always has one; the made time otherwise).
fn final_time(at: Option<&str>, head: &SharedHead) -> Result<chrono::DateTime<chrono::Utc>> {
    match at {
        Some(text) => crate::model::time::parse_time(text).map_err(|e| {
            StoreError::Invalid(format!(
                "the sign-off time of {} could not be read: {e}",
                head.code
            ))
        }),
        None => Ok(head.made_at),
    }
}

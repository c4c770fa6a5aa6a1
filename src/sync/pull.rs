//! Pulling what the hub holds and the log lacks: every row numbered above what this
//! log has seen, up to the highest number committed when the pull began (rows are
//! numbered in commit order, so none below it can still appear), kind by kind in the
//! order records depend on each other, a page per transaction here. Rows written by
//! this site are not sent back.

use postgres::Row;
use postgres::types::ToSql;

use super::{Hub, SyncError, SyncReport};
use crate::batch::BatchLine;
use crate::batch::shared::{
    EntryBody, SharedDecision, SharedEntry, SharedFinal, SharedHead, SharedVersion,
};
use crate::store::{PullOutcome, PulledPage, Store};

/// The hub's tables, in the order records depend on each other. A batch's
/// readings, notes and trail entries come before its sign-off: a record is sealed
/// when it is signed off (see `crate::batch::seal`), so what it held at sign-off
/// where it was written must be in place here first. (A push sends a sign-off in
/// the same hub transaction as the rows written before it, so one pass up to the
/// same highest row number always holds both.)
const TABLES: [&str; 7] = [
    "recipe_versions",
    "batches",
    "measurements",
    "notes",
    "amendments",
    "finalisations",
    "decisions",
];

fn columns(table: &str) -> &'static str {
    match table {
        "recipe_versions" => "recipe, version, content_hash, text, site",
        "batches" => {
            "code, head_hash, site, recipe, recipe_version, recipe_hash, made_at, size_g, operator, prediction"
        }
        "finalisations" => "code, head_hash, hash, finalized_at, finalized_by, site",
        "measurements" => {
            "code, head_hash, hash, position, site, kind, value, unit, taken_at, taken_by"
        }
        "notes" => "code, head_hash, hash, position, site, text, written_at, written_by",
        "amendments" => {
            "code, head_hash, hash, position, site, amended_at, amended_by, reason, changes"
        }
        _ => "hash, kind, code, decided_at, decided_by, decision, site",
    }
}

fn entry(r: &Row, body: EntryBody) -> (SharedEntry, String) {
    (
        SharedEntry {
            code: r.get(1),
            head_hash: r.get(2),
            position: r.get::<_, i32>(4).max(1) as u32,
            site: r.get(5),
            body,
        },
        r.get(3),
    )
}

/// Turns rows of one table (`seq` first) into a page.
fn page_of(table: &str, rows: &[Row], page: &mut PulledPage) {
    for r in rows {
        match table {
            "recipe_versions" => page.versions.push(SharedVersion {
                recipe: r.get(1),
                version: r.get::<_, i32>(2).max(1) as u32,
                content_hash: r.get(3),
                text: r.get(4),
                site: r.get(5),
            }),
            "batches" => page.heads.push((
                SharedHead {
                    code: r.get(1),
                    site: r.get(3),
                    recipe: r.get(4),
                    recipe_version: r.get::<_, i32>(5).max(1) as u32,
                    recipe_hash: r.get(6),
                    made_at: r.get(7),
                    size_g: r.get(8),
                    operator: r.get(9),
                    lines: Vec::new(),
                    prediction: r.get(10),
                },
                r.get(2),
            )),
            "finalisations" => page.finals.push((
                SharedFinal {
                    code: r.get(1),
                    head_hash: r.get(2),
                    at: r.get(4),
                    by: r.get(5),
                    site: r.get(6),
                },
                r.get(3),
            )),
            "measurements" => page.entries.push(entry(
                r,
                EntryBody::Measurement {
                    kind: r.get(6),
                    value: r.get(7),
                    unit: r.get(8),
                    taken_at: r.get(9),
                    by: r.get(10),
                },
            )),
            "notes" => page.entries.push(entry(
                r,
                EntryBody::Note {
                    text: r.get(6),
                    written_at: r.get(7),
                    by: r.get(8),
                },
            )),
            "amendments" => page.entries.push(entry(
                r,
                EntryBody::Amendment {
                    amended_at: r.get(6),
                    by: r.get(7),
                    reason: r.get(8),
                    changes: r.get(9),
                },
            )),
            _ => page.decisions.push((
                SharedDecision {
                    kind: r.get(2),
                    code: r.get(3),
                    decided_at: r.get(4),
                    by: r.get(5),
                    decision: r.get(6),
                    site: r.get(7),
                },
                r.get(1),
            )),
        }
    }
}

/// The lines of the batches named by `$1` (codes) and `$2` (head identities), each
/// batch's in order. Each batch's are found through the primary key: the subquery's
/// ORDER BY keeps it a look-up per batch (a subquery with one is not merged into the
/// outer query), where a plain join let the planner sort every line the hub holds.
const LINES_SQL: &str = "SELECT w.code, w.head_hash, l.ingredient, l.planned_g, l.actual_g, l.lot
     FROM unnest($1::text[], $2::text[]) WITH ORDINALITY AS w (code, head_hash, n)
     CROSS JOIN LATERAL (
         SELECT position, ingredient, planned_g, actual_g, lot FROM gelu.batch_lines
         WHERE code = w.code AND head_hash = w.head_hash ORDER BY position
     ) l
     ORDER BY w.n, l.position";

/// Fills in the lines of the page's batches (one query for them all).
fn add_lines(hub: &mut Hub, page: &mut PulledPage) -> Result<(), postgres::Error> {
    if page.heads.is_empty() {
        return Ok(());
    }
    let codes: Vec<&str> = page.heads.iter().map(|(h, _)| h.code.as_str()).collect();
    let hashes: Vec<&str> = page.heads.iter().map(|(_, h)| h.as_str()).collect();
    let rows = hub.client.query(LINES_SQL, &[&codes, &hashes])?;
    let mut at: std::collections::HashMap<(String, String), Vec<BatchLine>> =
        std::collections::HashMap::new();
    for r in rows {
        at.entry((r.get(0), r.get(1))).or_default().push(BatchLine {
            ingredient: r.get(2),
            planned_g: r.get(3),
            actual_g: r.get(4),
            lot: r.get(5),
        });
    }
    for (head, hash) in &mut page.heads {
        if let Some(lines) = at.remove(&(head.code.clone(), hash.clone())) {
            head.lines = lines;
        }
    }
    Ok(())
}

fn add(report: &mut SyncReport, out: &PullOutcome) {
    let p = &mut report.pulled;
    p.recipe_versions += out.versions;
    p.batches += out.batches;
    p.finalisations += out.finals;
    p.entries += out.entries;
    p.decisions += out.decisions;
    report.new_conflicts += out.conflicts;
    report.altered += out.altered;
}

/// Pulls every kind of record in turn, a page at a time.
pub(crate) fn pull(
    hub: &mut Hub,
    store: &mut Store,
    report: &mut SyncReport,
) -> Result<(), SyncError> {
    let site = store.site_code()?;
    let maxima: Vec<String> = TABLES
        .iter()
        .map(|t| format!("(SELECT coalesce(max(seq), 0) FROM gelu.{t})"))
        .collect();
    let top: i64 = hub
        .client
        .query_one(&format!("SELECT greatest({})", maxima.join(", ")), &[])
        .map_err(|e| hub.fail(e))?
        .get(0);
    let limit = super::PAGE as i64;
    for table in TABLES {
        let key = format!("pull.{table}");
        let mut from = store.sync_mark(&key)?;
        while from < top {
            let sql = format!(
                "SELECT seq, {} FROM gelu.{table} WHERE seq > $1 AND seq <= $2 AND site <> $3
                 ORDER BY seq LIMIT $4",
                columns(table)
            );
            let args: [&(dyn ToSql + Sync); 4] = [&from, &top, &site, &limit];
            let rows = hub.client.query(&sql, &args).map_err(|e| hub.fail(e))?;
            let through = match rows.last() {
                Some(r) if rows.len() as i64 == limit => r.get(0),
                _ => top,
            };
            let mut page = PulledPage::default();
            page_of(table, &rows, &mut page);
            add_lines(hub, &mut page).map_err(|e| hub.fail(e))?;
            page.marks.push((key.clone(), through));
            let out = store.write_pulled(&page)?;
            add(report, &out);
            from = through;
        }
    }
    Ok(())
}

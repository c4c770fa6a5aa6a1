//! Sending what the log holds and the hub lacks, a page per transaction on the hub.
//! Each statement inserts a whole column of values at once (`unnest`) and skips
//! rows the hub already holds, so a page sent twice (after a kill) is taken once.

use chrono::{DateTime, Utc};
use postgres::Transaction;

use super::{Hub, SyncError, SyncReport};
use crate::batch::shared::{EntryBody, SharedEntry};
use crate::store::{PushPage, Store};

/// The lock every writer of the hub takes (also taken by its insert triggers).
pub(crate) const WRITER_LOCK: i64 = 1_734_700_149;

fn send_page(tx: &mut Transaction, page: &PushPage) -> Result<(), postgres::Error> {
    tx.execute("SELECT pg_advisory_xact_lock($1)", &[&WRITER_LOCK])?;
    if !page.versions.is_empty() {
        let v = &page.versions;
        let recipe: Vec<&str> = v.iter().map(|v| v.recipe.as_str()).collect();
        let version: Vec<i32> = v.iter().map(|v| v.version as i32).collect();
        let hash: Vec<&str> = v.iter().map(|v| v.content_hash.as_str()).collect();
        let text: Vec<&str> = v.iter().map(|v| v.text.as_str()).collect();
        let site: Vec<&str> = v.iter().map(|v| v.site.as_str()).collect();
        tx.execute(
            "INSERT INTO gelu.recipe_versions (recipe, version, content_hash, text, site)
             SELECT * FROM unnest($1::text[], $2::int[], $3::text[], $4::text[], $5::text[])
             ON CONFLICT DO NOTHING",
            &[&recipe, &version, &hash, &text, &site],
        )?;
    }
    if !page.heads.is_empty() {
        let h = &page.heads;
        let hashes: Vec<String> = h.iter().map(|h| h.hash()).collect();
        let code: Vec<&str> = h.iter().map(|h| h.code.as_str()).collect();
        let site: Vec<&str> = h.iter().map(|h| h.site.as_str()).collect();
        let recipe: Vec<&str> = h.iter().map(|h| h.recipe.as_str()).collect();
        let version: Vec<i32> = h.iter().map(|h| h.recipe_version as i32).collect();
        let recipe_hash: Vec<&str> = h.iter().map(|h| h.recipe_hash.as_str()).collect();
        let made_at: Vec<DateTime<Utc>> = h.iter().map(|h| h.made_at).collect();
        let size_g: Vec<f64> = h.iter().map(|h| h.size_g).collect();
        let operator: Vec<&str> = h.iter().map(|h| h.operator.as_str()).collect();
        let prediction: Vec<&str> = h.iter().map(|h| h.prediction.as_str()).collect();
        tx.execute(
            "INSERT INTO gelu.batches (code, head_hash, site, recipe, recipe_version, recipe_hash,
                                       made_at, size_g, operator, prediction)
             SELECT * FROM unnest($1::text[], $2::text[], $3::text[], $4::text[], $5::int[],
                                  $6::text[], $7::timestamptz[], $8::float8[], $9::text[], $10::text[])
             ON CONFLICT DO NOTHING",
            &[
                &code,
                &hashes,
                &site,
                &recipe,
                &version,
                &recipe_hash,
                &made_at,
                &size_g,
                &operator,
                &prediction,
            ],
        )?;
        let (mut l_code, mut l_hash, mut l_pos, mut l_ing) = (vec![], vec![], vec![], vec![]);
        let (mut l_planned, mut l_actual, mut l_lot) = (vec![], vec![], vec![]);
        for (head, hash) in h.iter().zip(&hashes) {
            for (i, line) in head.lines.iter().enumerate() {
                l_code.push(head.code.as_str());
                l_hash.push(hash.as_str());
                l_pos.push(i as i32 + 1);
                l_ing.push(line.ingredient.as_str());
                l_planned.push(line.planned_g);
                l_actual.push(line.actual_g);
                l_lot.push(line.lot.as_str());
            }
        }
        tx.execute(
            "INSERT INTO gelu.batch_lines (code, head_hash, position, ingredient, planned_g, actual_g, lot)
             SELECT * FROM unnest($1::text[], $2::text[], $3::int[], $4::text[], $5::float8[],
                                  $6::float8[], $7::text[])
             ON CONFLICT DO NOTHING",
            &[&l_code, &l_hash, &l_pos, &l_ing, &l_planned, &l_actual, &l_lot],
        )?;
    }
    if !page.finals.is_empty() {
        let f = &page.finals;
        let code: Vec<&str> = f.iter().map(|f| f.code.as_str()).collect();
        let head: Vec<&str> = f.iter().map(|f| f.head_hash.as_str()).collect();
        let hash: Vec<String> = f.iter().map(|f| f.hash()).collect();
        let at: Vec<DateTime<Utc>> = f.iter().map(|f| f.at).collect();
        let by: Vec<&str> = f.iter().map(|f| f.by.as_str()).collect();
        let site: Vec<&str> = f.iter().map(|f| f.site.as_str()).collect();
        tx.execute(
            "INSERT INTO gelu.finalisations (code, head_hash, hash, finalized_at, finalized_by, site)
             SELECT * FROM unnest($1::text[], $2::text[], $3::text[], $4::timestamptz[],
                                  $5::text[], $6::text[])
             ON CONFLICT DO NOTHING",
            &[&code, &head, &hash, &at, &by, &site],
        )?;
    }
    send_entries(tx, &page.entries)?;
    if !page.decisions.is_empty() {
        let d = &page.decisions;
        let hash: Vec<String> = d.iter().map(|d| d.hash()).collect();
        let kind: Vec<&str> = d.iter().map(|d| d.kind.as_str()).collect();
        let code: Vec<&str> = d.iter().map(|d| d.code.as_str()).collect();
        let at: Vec<DateTime<Utc>> = d.iter().map(|d| d.decided_at).collect();
        let by: Vec<&str> = d.iter().map(|d| d.by.as_str()).collect();
        let what: Vec<&str> = d.iter().map(|d| d.decision.as_str()).collect();
        let site: Vec<&str> = d.iter().map(|d| d.site.as_str()).collect();
        tx.execute(
            "INSERT INTO gelu.decisions (hash, kind, code, decided_at, decided_by, decision, site)
             SELECT * FROM unnest($1::text[], $2::text[], $3::text[], $4::timestamptz[],
                                  $5::text[], $6::text[], $7::text[])
             ON CONFLICT DO NOTHING",
            &[&hash, &kind, &code, &at, &by, &what, &site],
        )?;
    }
    Ok(())
}

/// The columns every entry shares: code, head hash, identity, place, site.
#[derive(Default)]
struct Common<'a> {
    code: Vec<&'a str>,
    head: Vec<&'a str>,
    hash: Vec<String>,
    position: Vec<i32>,
    site: Vec<&'a str>,
}

impl<'a> Common<'a> {
    fn push(&mut self, e: &'a SharedEntry) {
        self.code.push(&e.code);
        self.head.push(&e.head_hash);
        self.hash.push(e.hash());
        self.position.push(e.position as i32);
        self.site.push(&e.site);
    }
}

fn send_entries(tx: &mut Transaction, entries: &[SharedEntry]) -> Result<(), postgres::Error> {
    let (mut m, mut n, mut a) = (Common::default(), Common::default(), Common::default());
    let (mut m_kind, mut m_value, mut m_unit, mut m_at, mut m_by) =
        (vec![], vec![], vec![], vec![], vec![]);
    let (mut n_text, mut n_at, mut n_by) = (vec![], vec![], vec![]);
    let (mut a_at, mut a_by, mut a_reason, mut a_changes) = (vec![], vec![], vec![], vec![]);
    for e in entries {
        match &e.body {
            EntryBody::Measurement {
                kind,
                value,
                unit,
                taken_at,
                by,
            } => {
                m.push(e);
                m_kind.push(kind.as_str());
                m_value.push(*value);
                m_unit.push(unit.as_str());
                m_at.push(*taken_at);
                m_by.push(by.as_str());
            }
            EntryBody::Note {
                text,
                written_at,
                by,
            } => {
                n.push(e);
                n_text.push(text.as_str());
                n_at.push(*written_at);
                n_by.push(by.as_str());
            }
            EntryBody::Amendment {
                amended_at,
                by,
                reason,
                changes,
            } => {
                a.push(e);
                a_at.push(*amended_at);
                a_by.push(by.as_str());
                a_reason.push(reason.as_str());
                a_changes.push(changes.as_str());
            }
        }
    }
    if !m.code.is_empty() {
        tx.execute(
            "INSERT INTO gelu.measurements (code, head_hash, hash, position, site, kind, value, unit, taken_at, taken_by)
             SELECT * FROM unnest($1::text[], $2::text[], $3::text[], $4::int[], $5::text[],
                                  $6::text[], $7::float8[], $8::text[], $9::timestamptz[], $10::text[])
             ON CONFLICT DO NOTHING",
            &[&m.code, &m.head, &m.hash, &m.position, &m.site, &m_kind, &m_value, &m_unit, &m_at, &m_by],
        )?;
    }
    if !n.code.is_empty() {
        tx.execute(
            "INSERT INTO gelu.notes (code, head_hash, hash, position, site, text, written_at, written_by)
             SELECT * FROM unnest($1::text[], $2::text[], $3::text[], $4::int[], $5::text[],
                                  $6::text[], $7::timestamptz[], $8::text[])
             ON CONFLICT DO NOTHING",
            &[&n.code, &n.head, &n.hash, &n.position, &n.site, &n_text, &n_at, &n_by],
        )?;
    }
    if !a.code.is_empty() {
        tx.execute(
            "INSERT INTO gelu.amendments (code, head_hash, hash, position, site, amended_at, amended_by, reason, changes)
             SELECT * FROM unnest($1::text[], $2::text[], $3::text[], $4::int[], $5::text[],
                                  $6::timestamptz[], $7::text[], $8::text[], $9::text[])
             ON CONFLICT DO NOTHING",
            &[&a.code, &a.head, &a.hash, &a.position, &a.site, &a_at, &a_by, &a_reason, &a_changes],
        )?;
    }
    Ok(())
}

/// Adds what a page holds to the counts of what was sent.
fn count(report: &mut SyncReport, page: &PushPage) {
    let p = &mut report.pushed;
    p.recipe_versions += page.versions.len();
    p.batches += page.heads.len();
    p.finalisations += page.finals.len();
    p.entries += page.entries.len();
    p.decisions += page.decisions.len();
}

/// Sends every page until nothing written before the push began waits.
pub(crate) fn push(
    hub: &mut Hub,
    store: &mut Store,
    report: &mut SyncReport,
) -> Result<(), SyncError> {
    let bounds = store.push_bounds()?;
    loop {
        let page = store.next_push_page(&bounds, super::PAGE)?;
        if page.is_done() {
            return Ok(());
        }
        if !page.is_empty() {
            let server = hub.target.shown.clone();
            let fail = |e| SyncError::from_pg(&server, e, false);
            let mut tx = hub.client.transaction().map_err(fail)?;
            send_page(&mut tx, &page).map_err(fail)?;
            tx.commit().map_err(fail)?;
        }
        store.commit_push(&page)?;
        count(report, &page);
    }
}

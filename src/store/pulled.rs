//! Writing records pulled from the hub: one page in one transaction, with how far
//! the pull has got, so a pull killed at any moment resumes where its last page
//! ended and writes nothing twice. A record already here (same identity) is skipped;
//! one that claims a code held here by other content is kept aside as a conflict,
//! whole, and never written over anything; one that no longer matches its identity
//! (changed on the hub behind gelu's back) is refused and kept aside, flagged.
//! Batches go through the import path's record writer; sign-offs through the same
//! statement `gelu batch finalize` uses.

use std::collections::HashMap;

use rusqlite::{OptionalExtension, Transaction, params};

use super::Store;
use super::batches;
use super::error::{Result, StoreError};
use super::outbox::{ENTRY_TABLES, mark, raise_mark, read_head, set_mark};
use super::recipes::{self, VersionIds};
use super::records::{self, NewRecord};
use super::seals;
use super::search::{self, Pending, Slot};
use super::site::site_code;
use super::sync_types::{PullOutcome, PulledPage};
use crate::batch::shared::{
    EntryBody, SharedDecision, SharedEntry, SharedFinal, SharedHead, SharedVersion, json_forms,
};
use crate::batch::{Amendment, Batch, Change, RecipeVersion, Status};
use crate::clock;
use crate::model::time::time_text;

/// Keeps a record aside. Returns whether it was new (the same record found again is
/// kept once).
fn hold(
    tx: &Transaction,
    kind: &str,
    code: &str,
    site: &str,
    hash: &str,
    detail: &str,
    record: &serde_json::Value,
) -> Result<bool> {
    let n = tx
        .prepare_cached(
            "INSERT OR IGNORE INTO sync_conflicts (kind, code, site, entry_hash, found_at, detail, record)
             VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7)",
        )?
        .execute(params![
            kind,
            code,
            site,
            hash,
            time_text(&clock::now()),
            detail,
            record.to_string()
        ])?;
    Ok(n == 1)
}

/// A batch here by its code: (row id, its identity on the hub, or as computed).
fn local_head(tx: &Transaction, site: &str, code: &str) -> Result<Option<(i64, String)>> {
    let found: Option<(i64, Option<String>)> = tx
        .prepare_cached(
            "SELECT b.id, h.head_hash FROM batches b LEFT JOIN sync_heads h ON h.batch_id = b.id
             WHERE b.code = ?1",
        )?
        .query_row([code], |r| Ok((r.get(0)?, r.get(1)?)))
        .optional()?;
    match found {
        None => Ok(None),
        Some((id, Some(hash))) => Ok(Some((id, hash))),
        Some((id, None)) => {
            let head = read_head(tx, site, id)?.ok_or_else(|| StoreError::NoSuchBatch {
                code: code.to_owned(),
            })?;
            Ok(Some((id, head.hash())))
        }
    }
}

/// The local row ids of a recipe version pulled or saved here, by name, hash and
/// its number where it was saved.
fn version_ids(
    tx: &Transaction,
    recipe: &str,
    version: u32,
    hash: &str,
) -> Result<Option<VersionIds>> {
    Ok(tx
        .prepare_cached(
            "SELECT r.id, v.id FROM recipe_versions v JOIN recipes r ON r.id = v.recipe_id
             WHERE r.name = ?1 AND v.content_hash = ?3
             ORDER BY (coalesce(v.origin_version, v.version) = ?2) DESC, v.version LIMIT 1",
        )?
        .query_row(params![recipe, version, hash], |r| {
            Ok(VersionIds {
                recipe_id: r.get(0)?,
                version_id: r.get(1)?,
            })
        })
        .optional()?)
}

fn write_version(tx: &Transaction, v: &SharedVersion, out: &mut PullOutcome) -> Result<()> {
    if !v.is_intact() {
        let detail = format!(
            "recipe `{}` version {} from site {} no longer matches its hash on the hub: refused",
            v.recipe, v.version, v.site
        );
        let code = format!("{} v{}", v.recipe, v.version);
        out.altered += usize::from(hold(
            tx,
            "altered",
            &code,
            &v.site,
            &v.content_hash,
            &detail,
            &json_forms::version(v),
        )?);
        return Ok(());
    }
    if version_ids(tx, &v.recipe, v.version, &v.content_hash)?.is_some() {
        return Ok(());
    }
    let recipe = RecipeVersion {
        recipe: v.recipe.clone(),
        version: v.version,
        content_hash: v.content_hash.clone(),
        text: v.text.clone(),
    };
    let taken: Option<u32> = tx
        .prepare_cached(
            "SELECT v.version FROM recipe_versions v JOIN recipes r ON r.id = v.recipe_id
             WHERE r.name = ?1 AND v.version = ?2",
        )?
        .query_row(params![v.recipe, v.version], |r| r.get(0))
        .optional()?;
    let number = match taken {
        None => v.version,
        Some(_) => {
            let next: u32 = tx.query_row(
                "SELECT max(v.version) + 1 FROM recipe_versions v JOIN recipes r ON r.id = v.recipe_id
                 WHERE r.name = ?1",
                [&v.recipe],
                |r| r.get(0),
            )?;
            let detail = format!(
                "recipe `{}` version {} from site {} has other text than version {} here; \
                 both are kept, and here it is version {next}",
                v.recipe, v.version, v.site, v.version
            );
            out.conflicts += usize::from(hold(
                tx,
                "recipe-version",
                &format!("{} v{}", v.recipe, v.version),
                &v.site,
                &v.content_hash,
                &detail,
                &json_forms::version(v),
            )?);
            next
        }
    };
    recipes::insert_pulled_version(tx, &recipe, number, &v.site)?;
    out.versions += 1;
    Ok(())
}

/// A pulled batch to write: its head, identity, and recipe version's row ids.
struct NewHead<'a> {
    head: &'a SharedHead,
    hash: &'a str,
    ids: VersionIds,
}

fn write_heads(
    tx: &Transaction,
    site: &str,
    heads: &[(SharedHead, String)],
    entries: &mut Pending,
    out: &mut PullOutcome,
) -> Result<()> {
    let mut fresh: Vec<NewHead> = Vec::new();
    let mut seen: HashMap<&str, &str> = HashMap::new();
    for (head, hash) in heads {
        if head.hash() != *hash {
            let detail = format!(
                "batch {} from site {} no longer matches its identity on the hub \
                 (changed there behind gelu's back): refused",
                head.code, head.site
            );
            out.altered += usize::from(hold(
                tx,
                "altered",
                &head.code,
                &head.site,
                hash,
                &detail,
                &json_forms::head(head, hash),
            )?);
            continue;
        }
        let here = match seen.get(head.code.as_str()) {
            Some(h) => Some((*h).to_owned()),
            None => local_head(tx, site, &head.code)?.map(|(_, h)| h),
        };
        match here {
            Some(h) if h == *hash => {}
            Some(_) => {
                let detail = format!(
                    "batch {} from site {} has other content than batch {} here; both are kept",
                    head.code, head.site, head.code
                );
                out.conflicts += usize::from(hold(
                    tx,
                    "batch",
                    &head.code,
                    &head.site,
                    hash,
                    &detail,
                    &json_forms::head(head, hash),
                )?);
            }
            None => {
                let ids = version_ids(tx, &head.recipe, head.recipe_version, &head.recipe_hash)?
                    .ok_or_else(|| {
                        StoreError::Invalid(format!(
                            "batch {} names recipe `{}` version {} ({}), which the hub did not send",
                            head.code, head.recipe, head.recipe_version, head.recipe_hash
                        ))
                    })?;
                seen.insert(&head.code, hash);
                fresh.push(NewHead { head, hash, ids });
            }
        }
    }
    let batches: Vec<Batch> = fresh
        .iter()
        .map(|n| Batch {
            code: n.head.code.clone(),
            recipe: RecipeVersion {
                recipe: n.head.recipe.clone(),
                version: n.head.recipe_version,
                content_hash: n.head.recipe_hash.clone(),
                text: String::new(),
            },
            made_at: n.head.made_at,
            size_g: n.head.size_g,
            operator: n.head.operator.clone(),
            status: Status::Draft,
            finalized_at: None,
            finalized_by: None,
            lines: n.head.lines.clone(),
            measurements: Vec::new(),
            notes: Vec::new(),
            amendments: Vec::new(),
            prediction: serde_json::Value::Null,
        })
        .collect();
    let records: Vec<NewRecord> = fresh
        .iter()
        .zip(&batches)
        .map(|(n, b)| NewRecord {
            ids: n.ids,
            batch: b,
            prediction_json: &n.head.prediction,
        })
        .collect();
    let ids = records::insert_records(tx, &records, entries)?;
    let mut stmt = tx.prepare_cached(
        "INSERT INTO sync_heads (batch_id, site, head_hash, pulled) VALUES (?1, ?2, ?3, 1)",
    )?;
    for (id, n) in ids.iter().zip(&fresh) {
        stmt.execute(params![id, n.head.site, n.hash])?;
    }
    out.batches += fresh.len();
    Ok(())
}

/// The batch row an entry or sign-off belongs to, when the batch here is the one it
/// was written on; otherwise it is kept aside with the batch it belongs to.
fn owner(
    tx: &Transaction,
    site: &str,
    code: &str,
    head_hash: &str,
    cache: &mut HashMap<String, Option<(i64, String)>>,
) -> Result<Option<i64>> {
    if !cache.contains_key(code) {
        let found = local_head(tx, site, code)?;
        cache.insert(code.to_owned(), found);
    }
    Ok(match cache.get(code) {
        Some(Some((id, hash))) if hash == head_hash => Some(*id),
        _ => None,
    })
}

fn write_final(
    tx: &Transaction,
    site: &str,
    f: &SharedFinal,
    hash: &str,
    cache: &mut HashMap<String, Option<(i64, String)>>,
    out: &mut PullOutcome,
) -> Result<()> {
    let record = json_forms::final_(f, hash);
    if f.hash() != hash {
        let detail = format!(
            "the sign-off of {} from site {} no longer matches its identity on the hub: refused",
            f.code, f.site
        );
        out.altered += usize::from(hold(
            tx, "altered", &f.code, &f.site, hash, &detail, &record,
        )?);
        return Ok(());
    }
    let Some(id) = owner(tx, site, &f.code, &f.head_hash, cache)? else {
        let detail = format!("the sign-off of {} as written at site {}", f.code, f.site);
        hold(tx, "held-entry", &f.code, &f.site, hash, &detail, &record)?;
        return Ok(());
    };
    let (status, at, by): (String, Option<String>, Option<String>) = tx.query_row(
        "SELECT status, finalized_at, finalized_by FROM batches WHERE id = ?1",
        [id],
        |r| Ok((r.get(0)?, r.get(1)?, r.get(2)?)),
    )?;
    if status == "draft" {
        batches::sign_off(tx, id, &time_text(&f.at), &f.by)?;
        tx.execute("DELETE FROM sync_finals_waiting WHERE batch_id = ?1", [id])?;
        out.finals += 1;
    } else if at.as_deref() != Some(time_text(&f.at).as_str()) || by.as_deref() != Some(&f.by) {
        let detail = format!(
            "{} was signed off here by {} at {}, and at site {} by {} at {}; both are kept",
            f.code,
            by.unwrap_or_default(),
            at.unwrap_or_default(),
            f.site,
            f.by,
            time_text(&f.at)
        );
        out.conflicts += usize::from(hold(
            tx,
            "finalisation",
            &f.code,
            &f.site,
            hash,
            &detail,
            &record,
        )?);
    }
    Ok(())
}

/// Whether batch row `id` already holds the entry with identity `hash` in `table`
/// (pulled before). An identity names its batch's code and head, so an entry
/// already here is on the row [`owner`] found; looking it up there uses the index
/// kept batch first (migration 6).
fn held(tx: &Transaction, table: &str, id: i64, hash: &str) -> Result<bool> {
    Ok(tx
        .prepare_cached(&format!(
            "SELECT EXISTS (SELECT 1 FROM {table} WHERE batch_id = ?1 AND entry_hash = ?2)"
        ))?
        .query_row(params![id, hash], |r| r.get(0))?)
}

fn write_entry(
    tx: &Transaction,
    site: &str,
    e: &SharedEntry,
    hash: &str,
    cache: &mut HashMap<String, Option<(i64, String)>>,
    search_entries: &mut Pending,
    out: &mut PullOutcome,
) -> Result<()> {
    let record = json_forms::entry(e, hash);
    if e.hash() != hash {
        let detail = format!(
            "a {} on {} from site {} no longer matches its identity on the hub: refused",
            e.body.kind(),
            e.code,
            e.site
        );
        out.altered += usize::from(hold(
            tx, "altered", &e.code, &e.site, hash, &detail, &record,
        )?);
        return Ok(());
    }
    let Some(id) = owner(tx, site, &e.code, &e.head_hash, cache)? else {
        let detail = format!(
            "a {} on {} as written at site {}",
            e.body.kind(),
            e.code,
            e.site
        );
        hold(tx, "held-entry", &e.code, &e.site, hash, &detail, &record)?;
        return Ok(());
    };
    let table = match e.body {
        EntryBody::Measurement { .. } => "measurements",
        EntryBody::Note { .. } => "batch_notes",
        EntryBody::Amendment { .. } => "amendments",
    };
    if held(tx, table, id, hash)? {
        // Pulled before (a log that starts over with another hub pulls everything
        // again), whether its record has been signed off here since or not.
        return Ok(());
    }
    let signed_off: bool = tx
        .prepare_cached("SELECT status = 'final' FROM batches WHERE id = ?1")?
        .query_row([id], |r| r.get(0))?;
    if signed_off && table != "amendments" {
        // A record signed off here takes new readings and notes only on its trail:
        // a bare reading or note for it (which no gelu that syncs writes) is kept
        // aside whole for a person to decide, never slipped into the record.
        let detail = format!(
            "a {} on {} from site {} arrived after the record was signed off here; \
             a signed-off record takes new readings and notes on its amendment trail",
            e.body.kind(),
            e.code,
            e.site
        );
        out.conflicts += usize::from(hold(
            tx,
            "late-entry",
            &e.code,
            &e.site,
            hash,
            &detail,
            &record,
        )?);
        return Ok(());
    }
    let count = |tx: &Transaction| -> Result<usize> {
        let n: i64 = tx
            .prepare_cached(&format!("SELECT count(*) FROM {table} WHERE batch_id = ?1"))?
            .query_row([id], |r| r.get(0))?;
        Ok(n as usize)
    };
    match &e.body {
        EntryBody::Measurement {
            kind,
            value,
            unit,
            taken_at,
            by,
        } => {
            crate::batch::validate::check_finite(kind, *value)?;
            tx.prepare_cached(
                "INSERT INTO measurements (batch_id, kind, value, unit, taken_at, taken_by, site, position, entry_hash)
                 VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9)",
            )?
            .execute(params![id, kind, value, unit, time_text(taken_at), by, e.site, e.position, hash])?;
        }
        EntryBody::Note {
            text,
            written_at,
            by,
        } => {
            crate::batch::validate::check_name("a note", text)?;
            tx.prepare_cached(
                "INSERT INTO batch_notes (batch_id, text, written_at, written_by, site, position, entry_hash)
                 VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7)",
            )?
            .execute(params![id, text, time_text(written_at), by, e.site, e.position, hash])?;
            search_entries.push(id, Slot::Note(count(tx)?), text);
        }
        EntryBody::Amendment {
            amended_at,
            by,
            reason,
            changes,
        } => {
            crate::batch::validate::check_name("the reason for an amendment", reason)?;
            if serde_json::from_str::<serde_json::Value>(changes).is_err() {
                return Err(StoreError::Invalid(format!(
                    "an amendment of {} from site {} holds changes that are not JSON",
                    e.code, e.site
                )));
            }
            tx.prepare_cached(
                "INSERT INTO amendments (batch_id, amended_at, amended_by, reason, changes, site, position, entry_hash)
                 VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8)",
            )?
            .execute(params![id, time_text(amended_at), by, reason, changes, e.site, e.position, hash])?;
            // The words of the changes this build can read are searchable too.
            let words = match serde_json::from_str::<Vec<Change>>(changes) {
                Ok(changes) => search::amendment_text(&Amendment {
                    amended_at: *amended_at,
                    by: by.clone(),
                    reason: reason.clone(),
                    changes,
                }),
                Err(_) => reason.clone(),
            };
            search_entries.push(id, Slot::Amendment(count(tx)?), &words);
            if signed_off {
                // Every entry on a signed-off record's trail is sealed, as here.
                seals::seal_now(tx, id)?;
            }
        }
    }
    out.entries += 1;
    Ok(())
}

fn write_decision(
    tx: &Transaction,
    d: &SharedDecision,
    hash: &str,
    out: &mut PullOutcome,
) -> Result<()> {
    if d.hash() != hash {
        return Ok(());
    }
    let n = tx
        .prepare_cached(
            "UPDATE sync_conflicts SET decided_at = ?3, decided_by = ?4, decision = ?5
             WHERE kind = ?1 AND code = ?2 AND decided_at IS NULL",
        )?
        .execute(params![
            d.kind,
            d.code,
            time_text(&d.decided_at),
            d.by,
            format!("at site {}: {}", d.site, d.decision)
        ])?;
    out.decisions += n;
    Ok(())
}

impl Store {
    /// Writes one page pulled from the hub, and its progress marks, in one transaction.
    pub fn write_pulled(&mut self, page: &PulledPage) -> Result<PullOutcome> {
        self.write(|tx| {
            let site = site_code(tx)?;
            let mut out = PullOutcome::default();
            // Where every row is sent or came from the hub, rows added now came from
            // it too: the watermarks follow, so what waits is still found quickly.
            let before = maxima(tx)?;
            for v in &page.versions {
                write_version(tx, v, &mut out)?;
            }
            let mut search_entries = Pending::default();
            write_heads(tx, &site, &page.heads, &mut search_entries, &mut out)?;
            let mut cache = HashMap::new();
            for (f, hash) in &page.finals {
                write_final(tx, &site, f, hash, &mut cache, &mut out)?;
            }
            for (e, hash) in &page.entries {
                write_entry(
                    tx,
                    &site,
                    e,
                    hash,
                    &mut cache,
                    &mut search_entries,
                    &mut out,
                )?;
            }
            for (d, hash) in &page.decisions {
                write_decision(tx, d, hash, &mut out)?;
            }
            search_entries.write(tx)?;
            let after = maxima(tx)?;
            for ((key, old), new) in before.iter().zip(&after) {
                if mark(tx, key)? >= *old {
                    raise_mark(tx, key, new.1)?;
                }
            }
            for (key, value) in &page.marks {
                set_mark(tx, key, &value.to_string())?;
            }
            Ok(out)
        })
    }
}

/// The push watermarks with the largest row id of their tables.
fn maxima(tx: &Transaction) -> Result<Vec<(&'static str, i64)>> {
    let mut out = Vec::new();
    let tables = [
        ("recipe_versions", "push.versions"),
        ("batches", "push.heads"),
    ]
    .into_iter()
    .chain(ENTRY_TABLES.iter().map(|(t, k, _)| (*t, *k)));
    for (table, key) in tables {
        let max: i64 = tx.query_row(
            &format!("SELECT coalesce(max(id), 0) FROM {table}"),
            [],
            |r| r.get(0),
        )?;
        out.push((key, max));
    }
    Ok(out)
}

//! The conflicts a sync kept aside: listing them, and a person's decision on one,
//! written once (who, when, what) and queued for the hub so every site sees it.

use rusqlite::params;

use super::Store;
use super::error::{Result, StoreError};
use super::sync_types::Conflict;
use crate::batch::validate::check_name;
use crate::clock;
use crate::model::time::time_text;

impl Store {
    /// The conflicts kept, oldest first; with `open_only`, those not yet decided.
    /// Entries kept aside with the batch they belong to are listed too.
    pub fn conflicts(&self, open_only: bool) -> Result<Vec<Conflict>> {
        let mut stmt = self.conn.prepare_cached(
            "SELECT id, kind, code, site, entry_hash, found_at, detail, record,
                    decided_at, decided_by, decision
             FROM sync_conflicts WHERE NOT ?1 OR decided_at IS NULL ORDER BY id",
        )?;
        let rows = stmt.query_map([open_only], |r| {
            let decided = match (r.get(8)?, r.get(9)?, r.get(10)?) {
                (Some(at), Some(by), Some(what)) => Some((at, by, what)),
                _ => None,
            };
            Ok(Conflict {
                id: r.get(0)?,
                kind: r.get(1)?,
                code: r.get(2)?,
                site: r.get(3)?,
                entry_hash: r.get(4)?,
                found_at: r.get(5)?,
                detail: r.get(6)?,
                record: r.get(7)?,
                decided,
            })
        })?;
        Ok(rows.collect::<rusqlite::Result<_>>()?)
    }

    /// Records a person's decision on every open conflict over `code` (a batch code,
    /// or `Recipe vN`): both records stay as they are; the decision says what holds.
    /// Returns how many conflicts it closed.
    pub fn resolve_conflict(&mut self, code: &str, by: &str, decision: &str) -> Result<usize> {
        check_name("the name of who decides", by)?;
        check_name("the decision", decision)?;
        let at = time_text(&clock::now());
        self.write(|tx| {
            let ids: Vec<i64> = tx
                .prepare(
                    "SELECT id FROM sync_conflicts
                     WHERE code = ?1 AND decided_at IS NULL AND kind <> 'held-entry' ORDER BY id",
                )?
                .query_map([code], |r| r.get(0))?
                .collect::<rusqlite::Result<_>>()?;
            if ids.is_empty() {
                return Err(StoreError::Invalid(format!(
                    "no open conflict is about `{code}`; `gelu sync --conflicts` lists them"
                )));
            }
            for id in &ids {
                tx.execute(
                    "UPDATE sync_conflicts SET decided_at = ?2, decided_by = ?3, decision = ?4
                     WHERE id = ?1",
                    params![id, at, by, decision],
                )?;
                tx.execute(
                    "INSERT OR IGNORE INTO sync_decisions_waiting (conflict_id) VALUES (?1)",
                    [id],
                )?;
            }
            Ok(ids.len())
        })
    }
}

//! The full-text index over notes, supplier lots and amendment reasons (the FTS5
//! table `batch_search`). It is contentless and append-only, like what it indexes,
//! and the store writes it itself rather than through triggers: entries are
//! gathered and written together at the end of a transaction, so FTS5 keeps them
//! in memory and flushes once, instead of once per statement.
//!
//! Each entry's rowid is `batch_id * 2^20` plus a slot (a line's position; 2^18 plus
//! a note's number; 2^19 plus an amendment's number), so a match names its batch
//! without a lookup: `rowid >> 20`.

use rusqlite::Transaction;

use super::error::Result;
use super::types::{Amendment, Change};

/// Entries per batch (`2^20`); the slots of one batch lie below it.
pub(crate) const PER_BATCH: i64 = 1 << 20;
const NOTES: i64 = 1 << 18;
const AMENDMENTS: i64 = 1 << 19;

/// Which part of a batch an entry indexes.
#[derive(Debug, Clone, Copy)]
pub(crate) enum Slot {
    /// The lot of the line at this 1-based position.
    Lot(usize),
    /// The n-th note (1-based).
    Note(usize),
    /// The n-th amendment (1-based).
    Amendment(usize),
}

fn rowid(batch_id: i64, slot: Slot) -> i64 {
    let offset = match slot {
        Slot::Lot(p) => p as i64,
        Slot::Note(n) => NOTES + n as i64,
        Slot::Amendment(n) => AMENDMENTS + n as i64,
    };
    batch_id * PER_BATCH + offset
}

/// The searchable words of an amendment: its reason and the new values.
pub(crate) fn amendment_text(a: &Amendment) -> String {
    let mut text = a.reason.clone();
    for c in &a.changes {
        text.push(' ');
        match c {
            Change::Operator { new, .. } | Change::Lot { new, .. } => text.push_str(new),
            Change::ActualG { new, .. } => text.push_str(&new.to_string()),
        }
    }
    text
}

/// Entries waiting to be written with the transaction.
#[derive(Debug, Default)]
pub(crate) struct Pending(Vec<(i64, String)>);

impl Pending {
    /// Queues one entry (empty text is not indexed).
    pub fn push(&mut self, batch_id: i64, slot: Slot, text: &str) {
        if !text.trim().is_empty() {
            self.0.push((rowid(batch_id, slot), text.to_owned()));
        }
    }

    /// How many entries are queued (to drop those of a record that was rolled back).
    pub fn len(&self) -> usize {
        self.0.len()
    }

    /// Drops the entries queued after the first `len`.
    pub fn truncate(&mut self, len: usize) {
        self.0.truncate(len);
    }

    /// Writes the queued entries; call last in the transaction.
    pub fn write(self, tx: &Transaction) -> Result<()> {
        let mut stmt =
            tx.prepare_cached("INSERT INTO batch_search (rowid, body) VALUES (?1, ?2)")?;
        for (id, text) in &self.0 {
            stmt.execute(rusqlite::params![id, text])?;
        }
        Ok(())
    }
}

/// An FTS5 query matching every word the user typed (each as a prefix), with
/// FTS syntax characters taken literally.
pub(crate) fn fts_query(text: &str) -> Option<String> {
    let terms: Vec<String> = text
        .split_whitespace()
        .map(|w| w.replace('"', ""))
        .filter(|w| !w.is_empty())
        .map(|w| format!("\"{w}\"*"))
        .collect();
    (!terms.is_empty()).then(|| terms.join(" "))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn search_words_become_quoted_prefixes() {
        assert_eq!(fts_query("  "), None);
        assert_eq!(
            fts_query("L-2026 \"odd\" AND"),
            Some("\"L-2026\"* \"odd\"* \"AND\"*".into())
        );
    }

    #[test]
    fn slots_of_one_batch_stay_inside_its_range() {
        for slot in [Slot::Lot(1), Slot::Note(1), Slot::Amendment(9_999)] {
            let id = rowid(42, slot);
            assert_eq!(id >> 20, 42);
        }
        assert_ne!(rowid(1, Slot::Lot(3)), rowid(1, Slot::Note(3)));
    }
}

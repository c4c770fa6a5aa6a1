//! The full-text index over notes, supplier lots and amendment reasons (the FTS5
//! table `batch_search`). It is contentless and append-only, like what it indexes,
//! and the store writes it itself rather than through triggers: entries are
//! gathered and written together at the end of a transaction, so FTS5 keeps them
//! in memory and flushes once, instead of once per statement.
//!
//! Each entry's rowid is `batch_id * 2^20` plus a slot, so a match names its batch
//! without a lookup: `rowid >> 20`. The slots: 0 for the lots of all lines as first
//! recorded, in one entry; 2^18 plus a note's number; 2^19 plus an amendment's
//! number. (Logs written before schema version 2 hold one entry per line instead,
//! at the line's position; they are searched the same way.) One entry for all the
//! lots, not one per line, keeps an import's index writes to two or three a batch,
//! and lets a search for two lot codes find the batch that used both.

use rusqlite::Transaction;

use super::error::Result;
use crate::batch::{Amendment, Change};

/// Entries per batch (`2^20`); the slots of one batch lie below it.
pub(crate) const PER_BATCH: i64 = 1 << 20;
const NOTES: i64 = 1 << 18;
const AMENDMENTS: i64 = 1 << 19;

/// Which part of a batch an entry indexes.
#[derive(Debug, Clone, Copy)]
pub(crate) enum Slot {
    /// The lots of every line, as first recorded.
    Lots,
    /// The n-th note (1-based).
    Note(usize),
    /// The n-th amendment (1-based).
    Amendment(usize),
}

fn rowid(batch_id: i64, slot: Slot) -> i64 {
    let offset = match slot {
        Slot::Lots => 0,
        Slot::Note(n) => NOTES + n as i64,
        Slot::Amendment(n) => AMENDMENTS + n as i64,
    };
    batch_id * PER_BATCH + offset
}

/// The searchable words of an amendment: its reason and the new values (a note
/// added or corrected after sign-off is found like any other note).
pub(crate) fn amendment_text(a: &Amendment) -> String {
    let mut text = a.reason.clone();
    for c in &a.changes {
        text.push(' ');
        match c {
            Change::Operator { new, .. } | Change::Lot { new, .. } => text.push_str(new),
            Change::ActualG { new, .. } => text.push_str(&new.to_string()),
            Change::AddNote(n) | Change::ReplaceNote { new: n, .. } => text.push_str(&n.text),
            Change::AddReading(m) | Change::ReplaceReading { new: m, .. } => {
                text.push_str(m.kind.as_str())
            }
            Change::StrikeReading { .. } | Change::StrikeNote { .. } => {}
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

    /// Writes the queued entries; call last in the transaction. One row per
    /// statement on purpose: a multi-row INSERT opens a savepoint on the FTS5 table,
    /// and FTS5 flushes its in-memory index at every savepoint, which made a bulk
    /// import twice as slow here.
    pub fn write(self, tx: &Transaction) -> Result<()> {
        let mut stmt =
            tx.prepare_cached("INSERT INTO batch_search (rowid, body) VALUES (?1, ?2)")?;
        for (id, text) in &self.0 {
            stmt.execute(rusqlite::params![id, text])?;
        }
        Ok(())
    }
}

/// A search the user typed, as an FTS5 query.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) struct Query {
    /// The FTS5 MATCH text.
    pub fts: String,
    /// Whether some word is a prefix (`gloss*`): slower to probe one batch at a time.
    pub has_prefix: bool,
}

/// Every word must appear as a whole word (a lot code like `S-2611-7` is a phrase
/// of its parts); a word ending in `*` matches as a prefix. FTS syntax characters are
/// taken literally.
pub(crate) fn fts_query(text: &str) -> Option<Query> {
    let mut has_prefix = false;
    let terms: Vec<String> = text
        .split_whitespace()
        .filter_map(|w| {
            let prefix = w.ends_with('*');
            let word = w.replace(['"', '*'], "");
            if word.is_empty() {
                return None;
            }
            has_prefix |= prefix;
            Some(if prefix {
                format!("\"{word}\"*")
            } else {
                format!("\"{word}\"")
            })
        })
        .collect();
    (!terms.is_empty()).then(|| Query {
        fts: terms.join(" "),
        has_prefix,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn search_words_are_quoted_and_stars_make_prefixes() {
        assert_eq!(fts_query("  * "), None);
        let q = fts_query("L-2026 \"odd\" AND").unwrap();
        assert_eq!(q.fts, "\"L-2026\" \"odd\" \"AND\"");
        assert!(!q.has_prefix);
        let q = fts_query("gloss*").unwrap();
        assert_eq!(q.fts, "\"gloss\"*");
        assert!(q.has_prefix);
    }

    #[test]
    fn slots_of_one_batch_stay_inside_its_range() {
        for slot in [Slot::Lots, Slot::Note(1), Slot::Amendment(9_999)] {
            let id = rowid(42, slot);
            assert_eq!(id >> 20, 42);
        }
        let slots = [
            rowid(1, Slot::Lots),
            rowid(1, Slot::Note(1)),
            rowid(1, Slot::Amendment(1)),
        ];
        assert!(slots[0] < slots[1] && slots[1] < slots[2]);
    }
}

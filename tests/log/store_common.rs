//! What the batch-log store tests share: the whole log as JSON Lines, and the codes
//! a search finds.

// Each test file uses only some of these.
#![allow(dead_code)]

use gelu::batch::BatchFilter;
use gelu::batch::export::Format;
use gelu::store::Store;

/// Every batch as exported, one JSON object per line, newest first.
pub fn export(store: &Store) -> String {
    let mut out = Vec::new();
    store
        .export(&BatchFilter::default(), Format::Jsonl, &mut out)
        .unwrap();
    String::from_utf8(out).unwrap()
}

/// The codes of the batches a full-text search for `words` lists, newest first.
pub fn search(store: &Store, words: &str) -> Vec<String> {
    store
        .list_batches(&BatchFilter {
            search: Some(words.into()),
            ..Default::default()
        })
        .unwrap()
        .into_iter()
        .map(|b| b.code)
        .collect()
}

/// Hands out `good` bytes, then fails as a broken disk or pipe would.
pub struct FailingAfter {
    /// What is read before the failure.
    pub good: std::io::Cursor<Vec<u8>>,
}

impl std::io::Read for FailingAfter {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        match self.good.read(buf)? {
            0 => Err(std::io::Error::other("the disk went away")),
            n => Ok(n),
        }
    }
}

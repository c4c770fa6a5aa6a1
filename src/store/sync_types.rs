//! What the store reports and takes for synchronising: what waits to be sent, a
//! page of records to send (with what to mark once the hub holds them), a page of
//! records pulled (with how far the pull has got), and the conflicts kept.

use crate::batch::shared::{SharedDecision, SharedEntry, SharedFinal, SharedHead, SharedVersion};

/// What waits to be sent to the hub, and what waits for a person.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct SyncStatus {
    /// This log's site code.
    pub site: String,
    /// The hub this log last synchronised with (its id), if any.
    pub hub: Option<String>,
    /// When the last sync ended (RFC 3339), if ever.
    pub last_sync: Option<String>,
    /// Recipe versions saved here and not yet sent.
    pub versions: usize,
    /// Batches written here and not yet sent.
    pub batches: usize,
    /// Readings, notes and amendments written here and not yet sent.
    pub entries: usize,
    /// Sign-offs made here and not yet sent.
    pub finals: usize,
    /// Decisions on conflicts taken here and not yet sent.
    pub decisions: usize,
    /// Conflicts kept and not yet decided.
    pub conflicts: usize,
}

impl SyncStatus {
    /// Every record waiting to be sent.
    pub fn waiting(&self) -> usize {
        self.versions + self.batches + self.entries + self.finals + self.decisions
    }
}

/// Where one push stops: rows written after it began wait for the next sync.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PushBounds {
    pub(crate) site: String,
    pub(crate) versions: i64,
    pub(crate) heads: i64,
    /// The batches watermark when the push began: entries of batches after it are
    /// sent with their batch.
    pub(crate) heads_from: i64,
    pub(crate) entries: [i64; 3],
}

/// What to mark in the log once the hub holds a page.
#[derive(Debug, Clone, PartialEq, Default)]
pub(crate) struct PushMarks {
    /// (watermark key, row id through which every row is sent or was pulled).
    pub through: Vec<(&'static str, i64)>,
    /// Batches now on the hub: (row id, head hash).
    pub heads: Vec<(i64, String)>,
    /// Sign-offs sent: their batches' row ids.
    pub finals: Vec<i64>,
    /// Decisions sent: their conflicts' row ids.
    pub decisions: Vec<i64>,
}

/// Records to send to the hub in one transaction there.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PushPage {
    /// Recipe versions.
    pub versions: Vec<SharedVersion>,
    /// Batches as first written.
    pub heads: Vec<SharedHead>,
    /// Sign-offs.
    pub finals: Vec<SharedFinal>,
    /// Readings, notes and amendments.
    pub entries: Vec<SharedEntry>,
    /// Decisions on conflicts.
    pub decisions: Vec<SharedDecision>,
    pub(crate) marks: PushMarks,
}

impl PushPage {
    /// How many records it holds.
    pub fn len(&self) -> usize {
        self.versions.len()
            + self.heads.len()
            + self.finals.len()
            + self.entries.len()
            + self.decisions.len()
    }

    /// Whether it holds no record (it may still mark progress).
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Whether it holds no record and marks nothing: the push is done.
    pub fn is_done(&self) -> bool {
        self.is_empty() && self.marks == PushMarks::default()
    }
}

/// Records pulled from the hub, to write in one transaction here, and how far the
/// pull has got once they are written: (key, value) pairs of the caller's choosing.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PulledPage {
    /// Recipe versions.
    pub versions: Vec<SharedVersion>,
    /// Batches as first written, each with the identity the hub gives it.
    pub heads: Vec<(SharedHead, String)>,
    /// Sign-offs, each with its identity on the hub.
    pub finals: Vec<(SharedFinal, String)>,
    /// Readings, notes and amendments, each with its identity on the hub.
    pub entries: Vec<(SharedEntry, String)>,
    /// Decisions, each with its identity on the hub.
    pub decisions: Vec<(SharedDecision, String)>,
    /// Progress to record with them.
    pub marks: Vec<(String, i64)>,
}

/// What writing a pulled page did.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PullOutcome {
    /// Recipe versions written.
    pub versions: usize,
    /// Batches written.
    pub batches: usize,
    /// Sign-offs applied.
    pub finals: usize,
    /// Readings, notes and amendments written.
    pub entries: usize,
    /// Decisions applied.
    pub decisions: usize,
    /// Records kept aside as conflicts (same code, other content).
    pub conflicts: usize,
    /// Records refused because they no longer match their identity (changed on the
    /// hub behind gelu's back); kept aside and shown.
    pub altered: usize,
}

/// A conflict kept in the log.
#[derive(Debug, Clone, PartialEq)]
pub struct Conflict {
    /// Its number in this log.
    pub id: i64,
    /// `batch`, `recipe-version`, `finalisation`, `altered` or `held-entry`.
    pub kind: String,
    /// The code both records claim.
    pub code: String,
    /// The site of the record kept aside.
    pub site: String,
    /// Its identity.
    pub entry_hash: String,
    /// When it was found (RFC 3339).
    pub found_at: String,
    /// What happened, in plain words.
    pub detail: String,
    /// The record kept aside, as pulled (JSON text).
    pub record: String,
    /// The decision, once taken: (when, who, what).
    pub decided: Option<(String, String, String)>,
}

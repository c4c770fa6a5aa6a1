//! The batch log's part of the state: the query, the rows loaded so far, one
//! batch's detail, and a new batch about to be recorded.

use crate::batch::compare::Comparison;
use crate::batch::{BatchCursor, MeasurementKind};
use crate::model::Recipe;

/// What the batch log shows.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct BatchQuery {
    /// Only batches of this recipe (its name in the database).
    pub recipe: Option<String>,
    /// Only batches made on or after this date (YYYY-MM-DD).
    pub since: Option<String>,
    /// Only batches whose text contains this.
    pub text: String,
    /// Keyset cursor: only batches older than this row; `None` = the newest page.
    pub before: Option<BatchCursor>,
    /// Rows per page.
    pub limit: usize,
}

/// One row of the batch log.
#[derive(Debug, Clone, PartialEq)]
pub struct BatchRow {
    /// Batch code, unique.
    pub code: String,
    /// When it was made (ISO 8601, UTC).
    pub made_at: String,
    /// Recipe name.
    pub recipe_name: String,
    /// Recipe version.
    pub version: u32,
    /// Batch size (g).
    pub size_g: f64,
    /// Who made it.
    pub operator: String,
    /// Draft, final or amended.
    pub status: String,
    /// Whether it is finalised (final or amended).
    pub finalized: bool,
    /// Where the row sits in the log, to fetch the rows after it.
    pub cursor: Option<BatchCursor>,
}

/// A page of the batch log.
#[derive(Debug, Clone, PartialEq)]
pub struct BatchPage {
    /// The query it answers.
    pub query: BatchQuery,
    /// Rows, newest first.
    pub rows: Vec<BatchRow>,
    /// Whether older rows exist.
    pub more: bool,
}

/// One measurement of a batch.
#[derive(Debug, Clone, PartialEq)]
pub struct MeasurementRow {
    /// When (UTC, to the minute).
    pub at: String,
    /// What.
    pub kind: MeasurementKind,
    /// The value, in the kind's unit.
    pub value: f64,
    /// Who measured.
    pub by: String,
    /// Whether an amendment struck it out (it keeps its place, marked).
    pub struck: bool,
}

/// One entry of a batch's amendment trail, in words.
#[derive(Debug, Clone, PartialEq)]
pub struct TrailRow {
    /// When (UTC, to the minute).
    pub at: String,
    /// Who.
    pub by: String,
    /// Why.
    pub reason: String,
    /// What it changed or added, one line each.
    pub changes: Vec<String>,
}

/// One batch in full.
#[derive(Debug, Clone, PartialEq)]
pub struct BatchDetailView {
    /// The row.
    pub row: BatchRow,
    /// Lines: ingredient, planned mass (g), lot.
    pub lines: Vec<(String, f64, String)>,
    /// Predicted against measured.
    pub comparisons: Vec<Comparison>,
    /// Every reading, in the order recorded (numbered as amendments name them).
    pub measurements: Vec<MeasurementRow>,
    /// Every note, in the order recorded: when, who, text (a struck one marked).
    pub notes: Vec<(String, String, String)>,
    /// The amendment trail, oldest first: readings and notes added after sign-off
    /// and every correction.
    pub trail: Vec<TrailRow>,
}

/// A new batch to record.
#[derive(Debug, Clone, PartialEq)]
pub struct BatchRequest {
    /// The recipe as in the editor (the store scales it to the size).
    pub recipe: Recipe,
    /// Its TOML text as stored, when the editor holds it unchanged.
    pub recipe_text: Option<String>,
    /// Batch size (g).
    pub size_g: f64,
    /// Who makes it.
    pub operator: String,
    /// Lot of each line, in line order (may be empty).
    pub lots: Vec<String>,
    /// A first note (may be empty).
    pub note: String,
}

/// The batch log screen.
#[derive(Debug, Clone, Default)]
pub struct BatchesState {
    /// The query of the rows shown (without the keyset cursor).
    pub query: BatchQuery,
    /// Rows loaded so far, newest first.
    pub rows: Vec<BatchRow>,
    /// Whether older rows exist beyond those loaded.
    pub more: bool,
    /// Whether a page is on its way.
    pub loading: bool,
    /// Row under the cursor.
    pub cursor: usize,
    /// The open batch.
    pub detail: Option<BatchDetailView>,
}

//! The batch log's part of the state: the query, the rows loaded so far, one
//! batch's detail, and a new batch about to be recorded.

use crate::batch::compare::{Comparison, WithCorrections};
use crate::batch::{BatchCursor, MeasurementKind};
use crate::measure::{Correction, KindSummary, Scope};
use crate::model::{Amount, Recipe};

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
    /// A liqueur's or spirit's batch volume at 20 °C (mL), shown before its
    /// mass; `None` for other styles or when not recorded.
    pub volume_ml: Option<f64>,
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

/// What the compare view asks the log for.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct CompareRequest {
    /// Only batches of this recipe.
    pub recipe: Option<String>,
    /// Only batches made on or after this date (YYYY-MM-DD).
    pub since: Option<String>,
    /// What a correction would be for: the recipe filtered on, else the style of
    /// the recipe in the editor.
    pub scope: Option<Scope>,
}

/// One measured kind in the compare view.
#[derive(Debug, Clone, PartialEq)]
pub struct KindView {
    /// Count, bias, RMSE, worst and flagged batches, chart points.
    pub summary: KindSummary,
    /// The statistics with the corrections in force, when any applied.
    pub corrected: Option<WithCorrections>,
    /// The correction fitted for the request's scope, or why there is none.
    pub preview: Result<Correction, String>,
    /// The correction in force for the request's scope, if any.
    pub in_force: Option<Correction>,
}

/// Predicted against measured over the batches shown.
#[derive(Debug, Clone, PartialEq)]
pub struct CompareView {
    /// What was asked.
    pub request: CompareRequest,
    /// One entry per measured kind, in the log's order.
    pub kinds: Vec<KindView>,
    /// The kind under the cursor.
    pub cursor: usize,
}

impl CompareView {
    /// The entry for `kind`.
    pub fn kind(&self, kind: &str) -> Option<&KindView> {
        self.kinds.iter().find(|k| k.summary.kind == kind)
    }
}

/// A new batch to record.
#[derive(Debug, Clone, PartialEq)]
pub struct BatchRequest {
    /// The recipe as in the editor (the store scales it to the size).
    pub recipe: Recipe,
    /// Its TOML text as stored, when the editor holds it unchanged.
    pub recipe_text: Option<String>,
    /// Batch size: a mass, or a volume at 20 °C.
    pub size: Amount,
    /// The analysis options of the prediction (the settings' cabinet and freezer).
    pub options: crate::analysis::Options,
    /// Who makes it.
    pub operator: String,
    /// Lot of each line, in line order (may be empty).
    pub lots: Vec<String>,
    /// A first note (may be empty).
    pub note: String,
}

/// Where this log stands with the hub, as the batch log shows it.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct SyncView {
    /// This log's site code.
    pub site: String,
    /// Whether a hub is set (the `sync_url` setting or GELU_SYNC_URL).
    pub hub_set: bool,
    /// When the last sync ended (RFC 3339), if ever.
    pub last_sync: Option<String>,
    /// Records waiting to be sent.
    pub waiting: usize,
    /// Conflicts waiting for a person.
    pub conflicts: usize,
    /// Whether a sync is running now.
    pub running: bool,
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
    /// The compare view, when open (or on its way: `loading`).
    pub compare: Option<CompareView>,
    /// Where the log stands with the hub.
    pub sync: SyncView,
}

//! The batch domain's plain data: batches, their lines, measurements, notes and
//! amendments, recipe versions, and what to list. The store hands these out and
//! takes them in; no SQL here. Times are UTC with millisecond precision, masses
//! are grams.

use chrono::{DateTime, Utc};
use serde::{Deserialize, Serialize};

/// Where a batch record stands.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Status {
    /// Still being made: lines and lots may be added.
    Draft,
    /// Signed off: never changed again, only amended.
    Final,
    /// Final, with at least one amendment on its trail.
    Amended,
}

impl Status {
    /// The word used in JSON and on screen.
    pub fn as_str(self) -> &'static str {
        match self {
            Status::Draft => "draft",
            Status::Final => "final",
            Status::Amended => "amended",
        }
    }

    /// Parses `draft`, `final` or `amended`.
    pub fn parse(text: &str) -> Option<Status> {
        match text {
            "draft" => Some(Status::Draft),
            "final" => Some(Status::Final),
            "amended" => Some(Status::Amended),
            _ => None,
        }
    }
}

/// One immutable version of a recipe.
#[derive(Debug, Clone, PartialEq)]
pub struct RecipeVersion {
    /// The recipe's name.
    pub recipe: String,
    /// Version number, 1-based, per recipe.
    pub version: u32,
    /// `sha256:` and the hex SHA-256 of `text`.
    pub content_hash: String,
    /// The recipe file's TOML text, exactly as saved.
    pub text: String,
}

/// One ingredient line of a batch.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct BatchLine {
    /// Ingredient id, as in the recipe.
    pub ingredient: String,
    /// Planned mass (g), from the recipe scaled to the batch size.
    pub planned_g: f64,
    /// Mass actually weighed (g), once recorded.
    pub actual_g: Option<f64>,
    /// Supplier lot ("" when not recorded).
    pub lot: String,
}

/// What was measured on a batch.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum MeasurementKind {
    /// Refractometer reading (°Bx).
    Brix,
    /// pH.
    Ph,
    /// Overrun (%).
    OverrunPct,
    /// Draw temperature at the freezer (°C).
    DrawTempC,
    /// Serving temperature (°C).
    ServingTempC,
    /// Measured initial freezing point (°C).
    FreezingPointC,
    /// Mass of the finished batch (g).
    MassG,
    /// Alcohol by volume at 20 °C (% vol).
    AbvPct,
    /// Titratable acidity (% as lactic acid).
    TitratableAcidityPct,
    /// Pasteurisation temperature (°C).
    PasteuriseTempC,
    /// Pasteurisation hold (s).
    PasteuriseTimeS,
    /// A cryoscope reading of the freezing point in degrees Hortvet (°H), kept as
    /// taken; it is recorded beside it converted to °C (see [`crate::batch::reading`]).
    FreezingPointH,
}

impl MeasurementKind {
    /// Every kind, in the order they are listed to the user.
    pub const ALL: [MeasurementKind; 12] = [
        MeasurementKind::Brix,
        MeasurementKind::Ph,
        MeasurementKind::OverrunPct,
        MeasurementKind::DrawTempC,
        MeasurementKind::ServingTempC,
        MeasurementKind::FreezingPointC,
        MeasurementKind::MassG,
        MeasurementKind::AbvPct,
        MeasurementKind::TitratableAcidityPct,
        MeasurementKind::PasteuriseTempC,
        MeasurementKind::PasteuriseTimeS,
        MeasurementKind::FreezingPointH,
    ];

    /// The kebab-case name used on the command line and in JSON.
    pub fn as_str(self) -> &'static str {
        match self {
            MeasurementKind::Brix => "brix",
            MeasurementKind::Ph => "ph",
            MeasurementKind::OverrunPct => "overrun-pct",
            MeasurementKind::DrawTempC => "draw-temp-c",
            MeasurementKind::ServingTempC => "serving-temp-c",
            MeasurementKind::FreezingPointC => "freezing-point-c",
            MeasurementKind::MassG => "mass-g",
            MeasurementKind::AbvPct => "abv-pct",
            MeasurementKind::TitratableAcidityPct => "titratable-acidity-pct",
            MeasurementKind::PasteuriseTempC => "pasteurise-temp-c",
            MeasurementKind::PasteuriseTimeS => "pasteurise-time-s",
            MeasurementKind::FreezingPointH => "freezing-point-h",
        }
    }

    /// The unit the value is in.
    pub fn unit(self) -> &'static str {
        match self {
            MeasurementKind::Brix => "°Bx",
            MeasurementKind::Ph => "pH",
            MeasurementKind::OverrunPct | MeasurementKind::TitratableAcidityPct => "%",
            MeasurementKind::DrawTempC
            | MeasurementKind::ServingTempC
            | MeasurementKind::FreezingPointC
            | MeasurementKind::PasteuriseTempC => "°C",
            MeasurementKind::MassG => "g",
            MeasurementKind::AbvPct => "% vol",
            MeasurementKind::PasteuriseTimeS => "s",
            MeasurementKind::FreezingPointH => "°H",
        }
    }

    /// The values a reading of this kind can take, in its unit (wider than any
    /// kitchen or still sees, so that only nonsense is refused).
    pub fn plausible(self) -> std::ops::RangeInclusive<f64> {
        match self {
            MeasurementKind::Brix
            | MeasurementKind::AbvPct
            | MeasurementKind::TitratableAcidityPct => 0.0..=100.0,
            MeasurementKind::Ph => 0.0..=14.0,
            MeasurementKind::OverrunPct => 0.0..=1000.0,
            MeasurementKind::DrawTempC
            | MeasurementKind::ServingTempC
            | MeasurementKind::FreezingPointC
            | MeasurementKind::FreezingPointH
            | MeasurementKind::PasteuriseTempC => -273.15..=1000.0,
            MeasurementKind::MassG => 0.0..=crate::model::units::MAX_AMOUNT,
            MeasurementKind::PasteuriseTimeS => 0.0..=1.0e7,
        }
    }

    /// The key of the prediction this kind is compared with in a batch's
    /// recorded prediction, if gelu predicts the kind (`brix` and `draw_temp_c`
    /// are recorded since this version; older batches lack them).
    pub fn prediction_key(self) -> Option<&'static str> {
        match self {
            MeasurementKind::FreezingPointC => Some("freezing_point_c"),
            MeasurementKind::ServingTempC => Some("serving_temp_c"),
            MeasurementKind::MassG => Some("mass_g"),
            MeasurementKind::AbvPct => Some("abv_pct"),
            MeasurementKind::Brix => Some("brix"),
            MeasurementKind::DrawTempC => Some("draw_temp_c"),
            _ => None,
        }
    }

    /// Parses a kebab-case kind name.
    pub fn parse(text: &str) -> Option<MeasurementKind> {
        MeasurementKind::ALL
            .into_iter()
            .find(|k| k.as_str() == text)
    }

    /// The valid names, comma-separated, for error messages.
    pub fn names() -> String {
        MeasurementKind::ALL
            .iter()
            .map(|k| k.as_str())
            .collect::<Vec<_>>()
            .join(", ")
    }
}

impl<'de> Deserialize<'de> for MeasurementKind {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        crate::model::time::deserialize_text(d, "a measurement kind as a string", |text| {
            MeasurementKind::parse(text).ok_or_else(|| {
                format!(
                    "measurement kind `{text}` is unknown; known kinds: {}",
                    MeasurementKind::names()
                )
            })
        })
    }
}

impl Serialize for MeasurementKind {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.as_str())
    }
}

fn is_false(b: &bool) -> bool {
    !*b
}

/// One measurement taken on a batch. Its JSON object is `{kind, value, unit,
/// taken_at, by}`, plus `struck: true` once an amendment has struck it out; a
/// `unit` other than the kind's is refused when read.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(try_from = "ReadingJson", into = "ReadingJson")]
pub struct Measurement {
    /// What was measured.
    pub kind: MeasurementKind,
    /// The value, in `kind.unit()`.
    pub value: f64,
    /// When it was taken.
    pub taken_at: DateTime<Utc>,
    /// Who took it.
    pub by: String,
    /// Whether an amendment has struck it out (it stays on the record, marked).
    pub struck: bool,
}

/// A reading's public JSON object.
#[derive(Serialize, Deserialize)]
struct ReadingJson {
    kind: MeasurementKind,
    value: f64,
    unit: String,
    #[serde(
        serialize_with = "crate::model::time::serialize_time",
        deserialize_with = "crate::model::time::deserialize_time"
    )]
    taken_at: DateTime<Utc>,
    by: String,
    #[serde(default, skip_serializing_if = "is_false")]
    struck: bool,
}

impl TryFrom<ReadingJson> for Measurement {
    type Error = String;
    fn try_from(r: ReadingJson) -> Result<Self, String> {
        super::validate::check_unit(r.kind, &r.unit).map_err(|e| e.0)?;
        Ok(Measurement {
            kind: r.kind,
            value: r.value,
            taken_at: r.taken_at,
            by: r.by,
            struck: r.struck,
        })
    }
}

impl From<Measurement> for ReadingJson {
    fn from(m: Measurement) -> Self {
        ReadingJson {
            kind: m.kind,
            value: m.value,
            unit: m.kind.unit().to_owned(),
            taken_at: m.taken_at,
            by: m.by,
            struck: m.struck,
        }
    }
}

/// A note on a batch (deviations, corrective actions, sensory remarks). Its JSON
/// object is `{text, written_at, by}`, plus `struck: true` once struck out.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Note {
    /// The text.
    pub text: String,
    /// When it was written.
    #[serde(
        serialize_with = "crate::model::time::serialize_time",
        deserialize_with = "crate::model::time::deserialize_time"
    )]
    pub written_at: DateTime<Utc>,
    /// Who wrote it.
    pub by: String,
    /// Whether an amendment has struck it out (it stays on the record, marked).
    #[serde(default, skip_serializing_if = "is_false")]
    pub struck: bool,
}

/// One correction inside an amendment; `old` is what it replaced. Readings and
/// notes are named by their 1-based position on the record, which never changes:
/// a struck entry keeps its place, marked.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "field", rename_all = "kebab-case")]
pub enum Change {
    /// The operator's name.
    Operator {
        /// Value before.
        old: String,
        /// Value after.
        new: String,
    },
    /// The weighed mass of one line (g).
    ActualG {
        /// Line number, 1-based.
        line: usize,
        /// The line's ingredient, for readers.
        ingredient: String,
        /// Value before (g).
        old: Option<f64>,
        /// Value after (g).
        new: f64,
    },
    /// The supplier lot of one line.
    Lot {
        /// Line number, 1-based.
        line: usize,
        /// The line's ingredient, for readers.
        ingredient: String,
        /// Value before.
        old: String,
        /// Value after.
        new: String,
    },
    /// A reading taken after sign-off: `{field, kind, value, unit, taken_at, by}`.
    AddReading(Measurement),
    /// A note written after sign-off: `{field, text, written_at, by}`.
    AddNote(Note),
    /// A reading struck out (it stays on the record, marked struck).
    StrikeReading {
        /// The reading's 1-based position.
        reading: usize,
        /// The reading as it stood.
        old: Measurement,
    },
    /// A reading corrected.
    ReplaceReading {
        /// The reading's 1-based position.
        reading: usize,
        /// The reading as it stood.
        old: Measurement,
        /// The reading as corrected.
        new: Measurement,
    },
    /// A note struck out (it stays on the record, marked struck).
    StrikeNote {
        /// The note's 1-based position.
        note: usize,
        /// The note as it stood.
        old: Note,
    },
    /// A note corrected.
    ReplaceNote {
        /// The note's 1-based position.
        note: usize,
        /// The note as it stood.
        old: Note,
        /// The note as corrected.
        new: Note,
    },
}

/// A correction of a batch record: a new entry that references it. Readings and
/// notes added after sign-off are entries like any other.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Amendment {
    /// When it was made.
    #[serde(
        serialize_with = "crate::model::time::serialize_time",
        deserialize_with = "crate::model::time::deserialize_time"
    )]
    pub amended_at: DateTime<Utc>,
    /// Who made it.
    pub by: String,
    /// Why (required).
    pub reason: String,
    /// What it changes, in order.
    pub changes: Vec<Change>,
}

/// A complete batch record, with every amendment applied to its fields.
#[derive(Debug, Clone, PartialEq)]
pub struct Batch {
    /// Human-friendly unique code, like `B-20261201-0003`.
    pub code: String,
    /// The recipe version it was made from.
    pub recipe: RecipeVersion,
    /// When it was made.
    pub made_at: DateTime<Utc>,
    /// Planned size (g).
    pub size_g: f64,
    /// Who made it (as amended).
    pub operator: String,
    /// Draft, final or amended.
    pub status: Status,
    /// When it was signed off, once final.
    pub finalized_at: Option<DateTime<Utc>>,
    /// Who signed it off, once final.
    pub finalized_by: Option<String>,
    /// The lines (as amended).
    pub lines: Vec<BatchLine>,
    /// Every reading, in the order recorded: those taken before sign-off, then
    /// those added on the trail; struck ones stay, marked.
    pub measurements: Vec<Measurement>,
    /// Every note, in the same order and on the same terms as the readings.
    pub notes: Vec<Note>,
    /// The amendment trail, oldest first.
    pub amendments: Vec<Amendment>,
    /// The prediction taken when the batch was made (public analysis JSON).
    pub prediction: serde_json::Value,
}

/// What `new_batch` needs: a recipe version's text plus everything about the batch.
#[derive(Debug, Clone, PartialEq)]
pub struct NewBatch {
    /// The recipe's name.
    pub recipe: String,
    /// The recipe's TOML text; saved as a new version when it differs from the newest.
    pub recipe_text: String,
    /// When it was made.
    pub made_at: DateTime<Utc>,
    /// Planned size (g).
    pub size_g: f64,
    /// Who made it.
    pub operator: String,
    /// The lines, in recipe order.
    pub lines: Vec<BatchLine>,
    /// A first note, if any.
    pub note: Option<String>,
    /// The prediction (public analysis JSON).
    pub prediction: serde_json::Value,
}

/// Where a page of the batch list ends, to fetch the next one (keyset pagination).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct BatchCursor {
    pub(crate) made_at: String,
    pub(crate) id: i64,
}

/// One row of the batch list.
#[derive(Debug, Clone, PartialEq)]
pub struct BatchSummary {
    /// Batch code.
    pub code: String,
    /// Recipe name.
    pub recipe: String,
    /// Recipe version number.
    pub recipe_version: u32,
    /// When it was made.
    pub made_at: DateTime<Utc>,
    /// Planned size (g).
    pub size_g: f64,
    /// A liqueur's or spirit's planned volume at 20 °C (mL), as its prediction
    /// recorded it; `None` for other styles (sized by mass) or when not recorded.
    pub drink_volume_ml: Option<f64>,
    /// Who made it (as amended).
    pub operator: String,
    /// Draft, final or amended.
    pub status: Status,
    /// Pass to [`BatchFilter::after`] to get the rows after this one.
    pub cursor: BatchCursor,
}

/// A drink's volume from a batch's style and its prediction's recorded
/// `volume_ml`: the volume (mL) of a liqueur or spirit, `None` for anything
/// else or nothing recorded.
pub fn drink_volume_from(
    style: Option<crate::model::Style>,
    volume_ml: Option<f64>,
) -> Option<f64> {
    style
        .filter(|s| s.is_drink())
        .and(volume_ml)
        .filter(|v| v.is_finite() && *v > 0.0)
}

/// Which batches to list. Results are newest first.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct BatchFilter {
    /// Only this recipe (exact name).
    pub recipe: Option<String>,
    /// Made at or after this time.
    pub since: Option<DateTime<Utc>>,
    /// Made before this time.
    pub until: Option<DateTime<Utc>>,
    /// Full-text search over notes, lots and amendment reasons: whole words, or
    /// prefixes when a word ends in `*`.
    pub search: Option<String>,
    /// At most this many rows (0 means no limit).
    pub limit: usize,
    /// Continue after this row of an earlier page.
    pub after: Option<BatchCursor>,
}

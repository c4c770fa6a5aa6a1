//! The flags of `gelu batch` as the user types them (clap); `mod.rs` resolves
//! them into typed requests.

use std::path::PathBuf;

use crate::cli::own::TempArgs;

use crate::batch::MeasurementKind;
use crate::model::Style;

/// Arguments of `gelu batch`.
#[derive(Debug, clap::Args)]
pub struct BatchArgs {
    /// What to do.
    #[command(subcommand)]
    pub command: BatchCommand,
}

/// Filters shared by `list` and `export`.
#[derive(Debug, clap::Args)]
pub struct FilterArgs {
    /// Only batches of this recipe (its exact name).
    #[arg(long, value_name = "NAME")]
    pub recipe: Option<String>,
    /// Made on or after DATE (YYYY-MM-DD, UTC, or an RFC 3339 time).
    #[arg(long, value_name = "DATE")]
    pub since: Option<String>,
    /// Made on or before DATE (YYYY-MM-DD includes that whole day).
    #[arg(long, value_name = "DATE")]
    pub until: Option<String>,
    /// Words to find in notes, supplier lots and amendment reasons (`gloss*` for a prefix).
    #[arg(long, value_name = "TEXT")]
    pub search: Option<String>,
}

/// Which batches `compare` and `calibrate` learn from.
#[derive(Debug, clap::Args)]
pub struct Selection {
    /// Only batches of this recipe (its exact name).
    #[arg(long, value_name = "NAME")]
    pub recipe: Option<String>,
    /// Only batches of recipes of this style (ice-cream, gelato, sorbet, ...).
    #[arg(long, value_name = "STYLE", value_parser = super::compare::style_name)]
    pub style: Option<Style>,
    /// Made on or after DATE (YYYY-MM-DD, UTC, or an RFC 3339 time).
    #[arg(long, value_name = "DATE")]
    pub since: Option<String>,
}

/// Instrument precisions, shared by `compare` and `calibrate`.
#[derive(Debug, clap::Args)]
pub struct Precisions {
    /// The precision of your instrument for a kind, repeatable: a reading is
    /// weighted and judged by it (--precision freezing-point-c=0.3 for a probe
    /// thermometer; the default assumes a cryoscope's 0.005 K).
    #[arg(long = "precision", value_name = "KIND=PRECISION", value_parser = super::compare::precision)]
    pub list: Vec<(MeasurementKind, f64)>,
}

/// The `gelu batch` subcommands.
#[derive(Debug, clap::Subcommand)]
pub enum BatchCommand {
    /// Record a new batch of a recipe scaled to a size; prints its code.
    New(NewArgs),
    /// List batches, newest first.
    List {
        #[command(flatten)]
        filter: FilterArgs,
        /// At most N batches (0: all).
        #[arg(long, value_name = "N", default_value_t = 50)]
        limit: usize,
        /// One JSON object per batch per line.
        #[arg(long)]
        json: bool,
    },
    /// Show a whole record, predicted against measured.
    Show {
        /// Batch code.
        code: String,
        /// As JSON.
        #[arg(long)]
        json: bool,
    },
    /// Record measurements: brix=31.5 ph=3.4 draw-temp-c=-6.5 ... (on a signed-off
    /// batch they go on its amendment trail, with --reason)
    Measure {
        /// Batch code.
        code: String,
        /// KIND=VALUE readings.
        #[arg(required = true, value_name = "KIND=VALUE")]
        readings: Vec<String>,
        /// Who measured (default: the login name).
        #[arg(long, value_name = "NAME")]
        by: Option<String>,
        /// Why readings are added after sign-off (required then; kept on the trail).
        #[arg(long, value_name = "TEXT")]
        reason: Option<String>,
    },
    /// Add a note (deviation, corrective action, tasting); on a signed-off batch it
    /// goes on its amendment trail, with --reason.
    Note {
        /// Batch code.
        code: String,
        /// The note.
        text: String,
        /// Who writes it (default: the login name).
        #[arg(long, value_name = "NAME")]
        by: Option<String>,
        /// Why a note is added after sign-off (required then; kept on the trail).
        #[arg(long, value_name = "TEXT")]
        reason: Option<String>,
    },
    /// Sign a batch off: from then on it is corrected only by amendments.
    Finalize {
        /// Batch code.
        code: String,
        /// Who signs off (default: the login name).
        #[arg(long, value_name = "NAME")]
        by: Option<String>,
    },
    /// Correct a batch by a new entry on its amendment trail.
    Amend {
        /// Batch code.
        code: String,
        /// Why (required; kept with the record).
        #[arg(long, value_name = "TEXT")]
        reason: String,
        /// Who amends (default: the login name).
        #[arg(long, value_name = "NAME")]
        by: Option<String>,
        #[command(flatten)]
        corrections: Corrections,
    },
    /// Predicted against measured over the log, per kind: count, bias, RMSE,
    /// the worst batches, those far off with likely causes, and a chart.
    Compare {
        #[command(flatten)]
        batches: Selection,
        /// Only this kind (freezing-point-c, abv-pct, brix, draw-temp-c, ...).
        #[arg(long, value_name = "KIND", value_parser = super::compare::predicted_kind)]
        kind: Option<MeasurementKind>,
        #[command(flatten)]
        precisions: Precisions,
        /// One JSON object per kind per line.
        #[arg(long)]
        json: bool,
    },
    /// Fit a correction of one kind for a recipe or a style from the logged
    /// batches and show how it would change the predictions; --turn-on puts it
    /// in force as a new version, --turn-off takes it out.
    #[command(group(clap::ArgGroup::new("scope").required(true).args(["recipe", "style"])))]
    Calibrate {
        /// The kind to correct (freezing-point-c, brix, abv-pct, draw-temp-c, ...).
        #[arg(long, value_name = "KIND", value_parser = super::compare::predicted_kind)]
        kind: MeasurementKind,
        #[command(flatten)]
        batches: Selection,
        #[command(flatten)]
        precisions: Precisions,
        /// Store the correction as a new version and put it in force.
        #[arg(long, conflicts_with = "turn_off")]
        turn_on: bool,
        /// Take the correction in force out (its versions stay in the log).
        #[arg(long)]
        turn_off: bool,
        /// Who turns it on or off (default: the login name).
        #[arg(long, value_name = "NAME")]
        by: Option<String>,
        /// As one JSON object.
        #[arg(long)]
        json: bool,
    },
    /// Every stored correction version, and who put which in force or took it out, when.
    Calibrations {
        /// One JSON object per version, then per switch, per line.
        #[arg(long)]
        json: bool,
    },
    /// Show, or set, this log's instrument precisions: how finely your
    /// instruments read each kind gelu predicts (a cryoscope 0.005 K, a probe
    /// thermometer 0.3 K). `compare` and `calibrate` weigh and judge readings by
    /// them; their --precision flag wins for one run.
    Precision {
        /// KIND=PRECISION to set (in the kind's difference unit, like
        /// freezing-point-c=0.3), or KIND=usual to go back to the usual one.
        #[arg(value_name = "KIND=PRECISION", value_parser = super::precision::setting)]
        set: Vec<(MeasurementKind, Option<f64>)>,
    },
    /// Show, or set, the share of water frozen at draw the log predicts draw
    /// temperatures at (default 0.5: about half the water is frozen at draw,
    /// McGee, On Food and Cooking).
    DrawShare {
        /// The new share (0..1, or a percentage like 45%).
        share: Option<String>,
    },
    /// Write batches as JSON Lines (lossless) or CSV to standard output.
    Export {
        /// jsonl or csv.
        #[arg(long, value_name = "FORMAT", default_value = "jsonl")]
        format: ExportFormat,
        #[command(flatten)]
        filter: FilterArgs,
        /// At most N batches (0: all).
        #[arg(long, value_name = "N", default_value_t = 0)]
        limit: usize,
    },
    /// Read batches from a JSON Lines export; codes already present are skipped.
    Import {
        /// The .jsonl file.
        file: PathBuf,
    },
}

/// What `gelu batch amend` corrects (at least one).
#[derive(Debug, clap::Args)]
pub struct Corrections {
    /// The corrected operator's name.
    #[arg(long, value_name = "NAME")]
    pub operator: Option<String>,
    /// The weighed mass of a line in g, repeatable: --actual sucrose=812.
    #[arg(long = "actual", value_name = "INGREDIENT=G")]
    pub actuals: Vec<String>,
    /// The supplier lot of a line, repeatable: --lot whole-milk=M-2612-04.
    #[arg(long = "lot", value_name = "INGREDIENT=LOT")]
    pub lots: Vec<String>,
    /// Strike out reading N (as `batch show` numbers them; it stays, marked), repeatable.
    #[arg(long = "strike-reading", value_name = "N")]
    pub strike_readings: Vec<usize>,
    /// Correct the value of reading N, repeatable: --replace-reading 2=-6.5.
    #[arg(
        long = "replace-reading",
        value_name = "N=VALUE",
        allow_hyphen_values = true
    )]
    pub replace_readings: Vec<String>,
    /// Strike out note N (it stays, marked), repeatable.
    #[arg(long = "strike-note", value_name = "N")]
    pub strike_notes: Vec<usize>,
    /// Correct the text of note N, repeatable: --replace-note "1=first run of the day".
    #[arg(long = "replace-note", value_name = "N=TEXT")]
    pub replace_notes: Vec<String>,
}

/// Export formats.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum ExportFormat {
    /// One JSON object per batch per line; import reads it back exactly.
    Jsonl,
    /// One row per batch, for spreadsheets.
    Csv,
}

/// Arguments of `gelu batch new`.
#[derive(Debug, clap::Args)]
pub struct NewArgs {
    /// The recipe file (TOML).
    pub recipe: PathBuf,
    /// Batch size: g, kg, or for liqueurs mL or L (5kg, 800g, 1.5L).
    #[arg(long, value_name = "SIZE")]
    pub size: String,
    /// Who makes it (default: the login name).
    #[arg(long, value_name = "NAME")]
    pub by: Option<String>,
    /// Supplier lot of an ingredient (or line number), repeatable: --lot sucrose=S-2611.
    #[arg(long = "lot", value_name = "INGREDIENT=LOT")]
    pub lots: Vec<String>,
    /// A first note.
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
    /// The cabinet and freezer the prediction is made for.
    #[command(flatten)]
    pub temps: TempArgs,
    /// Print the whole batch as JSON instead of its code.
    #[arg(long)]
    pub json: bool,
}

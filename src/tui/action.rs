//! What can happen to the workspace: [`Command`]s are the named things a key can
//! do (the keymap binds them); [`Action`]s are everything `update` accepts
//! (commands, typed characters, and the results of effects); [`Effect`]s are the
//! I/O that `update` asks the loop to carry out.

use std::path::PathBuf;

use crate::batch::{Edit, MeasurementKind};
use crate::model::Recipe;

use super::state::{RecipeEntry, RecipeSource, Settings};

/// Declares the commands once: the enum, the list of all of them, and their names
/// and descriptions, so help text and tests can never drift from the enum.
macro_rules! commands {
    ($( $name:ident => $id:literal, $desc:literal; )*) => {
        /// A named thing a key can do; the keymap binds keys to these.
        #[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
        pub enum Command {
            $( #[doc = $desc] $name, )*
        }

        impl Command {
            /// Every command, in declaration order.
            pub const ALL: &'static [Command] = &[$(Command::$name),*];

            /// Stable kebab-case name.
            pub fn name(self) -> &'static str {
                match self { $(Command::$name => $id,)* }
            }

            /// One-line description, shown in the help overlay.
            pub fn description(self) -> &'static str {
                match self { $(Command::$name => $desc,)* }
            }
        }
    };
}

impl Command {
    /// Whether the command moves a list cursor (every list screen handles these alike).
    pub fn moves_cursor(self) -> bool {
        matches!(
            self,
            Command::Up
                | Command::Down
                | Command::PageUp
                | Command::PageDown
                | Command::First
                | Command::Last
        )
    }
}

commands! {
    Quit => "quit", "Leave gelu (asks first when there are unsaved changes)";
    Help => "help", "Show every key of the current mode";
    NextScreen => "next-screen", "Go to the next screen";
    PrevScreen => "prev-screen", "Go to the previous screen";
    ShowRecipe => "show-recipe", "Go to the recipe screen";
    ShowIngredients => "show-ingredients", "Go to the ingredients screen";
    ShowBatches => "show-batches", "Go to the batch log";
    ShowSettings => "show-settings", "Go to the settings";
    Up => "up", "Move the cursor up";
    Down => "down", "Move the cursor down";
    PageUp => "page-up", "Move the cursor a page up";
    PageDown => "page-down", "Move the cursor a page down";
    First => "first", "Move the cursor to the first row";
    Last => "last", "Move the cursor to the last row";
    AddLine => "add-line", "Add a line: pick an ingredient, then type its amount";
    EditAmount => "edit-amount", "Change the amount of the line under the cursor";
    DeleteLine => "delete-line", "Delete the line under the cursor";
    MoveLineUp => "move-line-up", "Move the line under the cursor up";
    MoveLineDown => "move-line-down", "Move the line under the cursor down";
    ScaleRecipe => "scale", "Scale the whole recipe to a new total mass";
    SetServingTarget => "serving-target", "Set the share of water frozen at serving for this recipe";
    Rename => "rename", "Rename the recipe";
    Undo => "undo", "Undo the last change to the recipe";
    Redo => "redo", "Redo the change last undone";
    Save => "save", "Save: back to its file, or as a new version in the database";
    SaveAsNew => "save-as-new", "Save as a new recipe in the database under a new name";
    SaveVersion => "save-version", "Save as the next version of the recipe of this name in the database";
    OpenRecipe => "open-recipe", "Open a recipe from the database (asks first over unsaved changes)";
    OpenFile => "open-file", "Open a recipe from a TOML file (asks first over unsaved changes)";
    ShowWarnings => "warnings", "Read every warning and caution in full";
    Search => "search", "Search the list by text";
    ClearFilter => "clear-filter", "Clear the search and filters";
    SwitchList => "switch-list", "Switch between solutes and ingredients";
    NewIngredient => "new-ingredient", "Create your own ingredient";
    NewSolute => "new-solute", "Create your own solute";
    EditOwn => "edit-own", "Edit your own solute or ingredient under the cursor";
    CharacteriseIngredient => "characterise", "Characterise an ingredient of your own from measured freezing points";
    AddToRecipe => "add-to-recipe", "Add the ingredient under the cursor to the recipe";
    OpenDetail => "open-detail", "Open the batch under the cursor";
    NewRecipe => "new-recipe", "Start a new, blank recipe of a style (asks first over unsaved changes)";
    CopyToFile => "copy-to-file", "Write a copy of the recipe to a new TOML file";
    MakeAgain => "make-again", "Open the recipe version this batch was made from, to make it again";
    ExportBatches => "export-batches", "Export the batches shown to a CSV or JSON Lines file";
    RefreshBatches => "refresh-batches", "Read the batch log again (what other terminals and the command line wrote)";
    FilterRecipe => "filter-recipe", "Show only batches of the recipe in the editor (again: all)";
    FilterDate => "filter-date", "Show only batches made on or after a date";
    CompareBatches => "compare", "Predicted against measured over the batches shown: bias, RMSE, chart";
    Calibrate => "calibrate", "Put in force the correction fitted for the kind under the cursor (asks first)";
    CalibrationOff => "calibration-off", "Take out the correction in force for the kind under the cursor (asks first)";
    StartBatch => "start-batch", "Start a batch from the recipe in the editor";
    OpenBalance => "balance", "Balance the recipe: targets, the lines that may move, the new amounts side by side";
    ReduceToStrength => "reduce-to-strength", "Reduce a spirit or liqueur to a strength (% vol) with water";
    EditBalanceRow => "change-row", "Change the row under the cursor: a target's range, or whether a line may move";
    AddTarget => "add-target", "Add a target: NAME=VALUE or NAME=LOW..HIGH (fat_pct=6..9)";
    DeleteTarget => "delete-target", "Remove the target under the cursor";
    SwitchObjective => "switch-objective", "Switch between least change and least cost";
    SetPrice => "set-price", "Set the price per kg of the line's ingredient (kept in the batch log)";
    AcceptBalance => "accept-balance", "Accept the new amounts as one step (undo takes them back)";
    AddMeasurement => "add-measurement", "Add a measurement to the open batch";
    AddNote => "add-note", "Add a note to the open batch";
    Finalize => "finalize", "Finalise the open batch (it can then only be amended)";
    Amend => "amend", "Amend a finalised batch with a correcting note";
    SyncNow => "sync-now", "Synchronise the batch log with the hub now (send and receive)";
    Toggle => "toggle", "Change the setting under the cursor";
    Confirm => "confirm", "Accept";
    Cancel => "cancel", "Back out without changing anything";
    Yes => "yes", "Yes";
    No => "no", "No";
    SaveFirst => "save-first", "Save the recipe first, then go on";
    NextField => "next-field", "Go to the next field";
    PrevField => "prev-field", "Go to the previous field";
    CursorLeft => "cursor-left", "Move the text cursor left";
    CursorRight => "cursor-right", "Move the text cursor right";
    CursorHome => "cursor-home", "Move the text cursor to the start";
    CursorEnd => "cursor-end", "Move the text cursor to the end";
    DeleteBack => "delete-back", "Delete the character before the text cursor";
    DeleteForward => "delete-forward", "Delete the character under the text cursor";
    DeleteWord => "delete-word", "Delete the word before the text cursor";
    ClearField => "clear-field", "Clear the whole field";
}

/// Everything `update` accepts.
#[derive(Debug, Clone, PartialEq)]
pub enum Action {
    /// A command from the keymap.
    Command(Command),
    /// A character typed into the text field in focus.
    Insert(char),
    /// A recipe was loaded from a file or the database.
    RecipeLoaded {
        /// The recipe.
        recipe: Recipe,
        /// Where it came from (and where Save writes it back).
        source: RecipeSource,
    },
    /// A save finished; the recipe now lives at `source`.
    Saved {
        /// Where the recipe was saved.
        source: RecipeSource,
        /// The recipe as saved.
        recipe: Recipe,
        /// What to tell the user.
        message: String,
    },
    /// The recipes in the database, for the open dialog.
    RecipeList(Vec<RecipeEntry>),
    /// Settings read from the database at start.
    SettingsLoaded(Settings),
    /// A page of the batch log arrived.
    BatchesPage(super::state::BatchPage),
    /// One batch's detail arrived.
    BatchDetail(Box<super::state::BatchDetailView>),
    /// The compare view's figures arrived.
    ComparisonLoaded(Box<super::state::CompareView>),
    /// A correction was put in force or taken out; the message says which.
    CorrectionChanged(String),
    /// The user's own solutes and ingredients, read from the database at start.
    OwnLibraryLoaded(super::state::OwnLibrary),
    /// A batch was recorded, or changed (measurement, note, sign-off, amendment).
    BatchChanged {
        /// Its code.
        code: String,
        /// What to tell the user.
        message: String,
    },
    /// Where the log stands with the hub (read from the log, or after a sync).
    SyncState(super::state::SyncView),
    /// A sync finished: what it moved, and where the log now stands.
    Synced {
        /// What to tell the user.
        message: String,
        /// Where the log now stands.
        state: super::state::SyncView,
    },
    /// Something the loop did went wrong; the message says what and that data is safe.
    Failed(String),
    /// Something the loop did went right; the message says what.
    Info(String),
}

/// I/O for the loop to carry out; the outcome comes back as an [`Action`].
#[derive(Debug, Clone, PartialEq)]
pub enum Effect {
    /// Restore the terminal and leave.
    Quit,
    /// Read a recipe file.
    OpenFile(PathBuf),
    /// Write a copy of the recipe to a new file (never over an existing one).
    CopyToFile {
        /// The new file.
        path: PathBuf,
        /// The recipe as in the editor.
        recipe: Recipe,
    },
    /// Open the recipe version a batch was made from.
    LoadBatchRecipe(String),
    /// Export the batches a query shows (all of them, not only the loaded page).
    ExportBatches {
        /// Which batches.
        query: super::state::BatchQuery,
        /// The new file; its extension (.csv, else JSON Lines) picks the format.
        path: PathBuf,
    },
    /// Write the recipe back to its file, keeping the comments and layout of `original`.
    SaveFile {
        /// The file.
        path: PathBuf,
        /// The file's text when it was read (`None` for a new file).
        original: Option<String>,
        /// The recipe to write.
        recipe: Recipe,
    },
    /// Save the recipe as a new version of a recipe in the database.
    SaveVersion {
        /// The recipe's name in the database.
        name: String,
        /// The recipe.
        recipe: Recipe,
    },
    /// Save the recipe as a new recipe in the database.
    SaveNewRecipe(Recipe),
    /// List the recipes in the database.
    ListRecipes,
    /// Load the newest version of the recipe with this name from the database.
    LoadRecipe(String),
    /// Store the settings in the database.
    SaveSettings(Settings),
    /// Store one of the user's own solutes.
    SaveOwnSolute(crate::model::Solute),
    /// Store one of the user's own ingredients (with the own solutes it uses).
    SaveOwnIngredient {
        /// The ingredient.
        ingredient: crate::model::Ingredient,
        /// The user's own solutes it contains.
        solutes: Vec<crate::model::Solute>,
    },
    /// Read where the log stands with the hub.
    LoadSyncState,
    /// Synchronise with the hub now.
    SyncNow,
    /// Rename this log's site.
    RenameSite(String),
    /// Fetch a page of the batch log.
    LoadBatches(super::state::BatchQuery),
    /// Fetch one batch's detail by code.
    LoadBatchDetail(String),
    /// Fetch predicted against measured over the batches asked for.
    LoadComparison(super::state::CompareRequest),
    /// Store a correction as a new version and put it in force.
    TurnOnCorrection {
        /// The correction as fitted.
        correction: crate::measure::Correction,
        /// Who.
        by: String,
    },
    /// Take the correction of a kind and scope out of force.
    TurnOffCorrection {
        /// The kind.
        kind: String,
        /// The scope.
        scope: crate::measure::Scope,
        /// Who.
        by: String,
    },
    /// Record a new batch.
    StartBatch(super::state::BatchRequest),
    /// Add a measurement to a batch.
    AddMeasurement {
        /// Batch code.
        code: String,
        /// What was measured.
        kind: MeasurementKind,
        /// The value, in the unit of the kind (°C for temperatures).
        value: f64,
        /// Who measured.
        by: String,
        /// Why, when the batch is signed off (the reading goes on its trail).
        reason: Option<String>,
    },
    /// Add a note to a batch.
    AddNote {
        /// Batch code.
        code: String,
        /// The note.
        text: String,
        /// Who wrote it.
        by: String,
        /// Why, when the batch is signed off (the note goes on its trail).
        reason: Option<String>,
    },
    /// Finalise (sign off) a batch.
    Finalize {
        /// Batch code.
        code: String,
        /// Who signs off.
        by: String,
    },
    /// Amend a finalised batch: a new entry on its trail.
    Amend {
        /// Batch code.
        code: String,
        /// Who amends.
        by: String,
        /// Why.
        reason: String,
        /// What changes.
        edits: Vec<Edit>,
    },
}

impl Effect {
    /// What the workspace says while a slow effect runs (one that reads the whole
    /// log or writes a large file), so the screen never looks frozen. A sync is not
    /// among them: it runs in the background.
    pub fn busy_words(&self) -> Option<&'static str> {
        match self {
            Effect::LoadComparison(_) => Some("Setting the predictions against the readings..."),
            Effect::ExportBatches { .. } => Some("Exporting the batches shown..."),
            _ => None,
        }
    }
}

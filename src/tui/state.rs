//! The whole state of the workspace: one struct the loop owns, which `update`
//! changes and `view` draws. Nothing here does I/O.

use std::path::PathBuf;

use tui_input::Input;

use crate::analysis::{
    self, Analysis, DEFAULT_CABINET_TEMP_C, DEFAULT_FREEZER_TEMP_C, DEFAULT_SERVING_TARGET, Options,
};
use crate::catalog::Catalog;
use crate::model::{Ingredient, Recipe, Solute};
use crate::store::{BatchCursor, MeasurementKind};

use super::action::RecipeEntry;
use super::keymap::Context;

/// The screens, in tab order.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Screen {
    /// The recipe editor.
    Recipe,
    /// The solute and ingredient browser.
    Ingredients,
    /// The batch log.
    Batches,
    /// The settings.
    Settings,
}

impl Screen {
    /// Every screen, in tab order.
    pub const ALL: [Screen; 4] = [
        Screen::Recipe,
        Screen::Ingredients,
        Screen::Batches,
        Screen::Settings,
    ];

    /// The tab title.
    pub fn title(self) -> &'static str {
        match self {
            Screen::Recipe => "Recipe",
            Screen::Ingredients => "Ingredients",
            Screen::Batches => "Batches",
            Screen::Settings => "Settings",
        }
    }

    /// The browsing mode of the screen.
    pub fn context(self) -> Context {
        match self {
            Screen::Recipe => Context::Recipe,
            Screen::Ingredients => Context::Ingredients,
            Screen::Batches => Context::Batches,
            Screen::Settings => Context::Settings,
        }
    }
}

/// How temperatures are shown.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum TempUnit {
    /// Degrees Celsius.
    #[default]
    Celsius,
    /// Degrees Fahrenheit.
    Fahrenheit,
}

/// How masses are shown.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum MassUnit {
    /// Grams and kilograms.
    #[default]
    Grams,
    /// Ounces and pounds (avoirdupois).
    Imperial,
}

/// The user's settings, stored in the database.
#[derive(Debug, Clone, PartialEq)]
pub struct Settings {
    /// Temperature display.
    pub temp_unit: TempUnit,
    /// Mass display and entry.
    pub mass_unit: MassUnit,
    /// Share of water frozen at serving for recipes that set none (0..1).
    pub serving_target: f64,
    /// Display-cabinet temperature (°C).
    pub cabinet_temp_c: f64,
    /// Freezer temperature (°C).
    pub freezer_temp_c: f64,
    /// Who is working, written on new batches.
    pub operator: String,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            temp_unit: TempUnit::Celsius,
            mass_unit: MassUnit::Grams,
            serving_target: DEFAULT_SERVING_TARGET,
            cabinet_temp_c: DEFAULT_CABINET_TEMP_C,
            freezer_temp_c: DEFAULT_FREEZER_TEMP_C,
            operator: String::new(),
        }
    }
}

/// Where the recipe in the editor came from, and where Save writes it.
#[derive(Debug, Clone, PartialEq, Default)]
pub enum RecipeSource {
    /// Not saved anywhere yet.
    #[default]
    New,
    /// A TOML file.
    File {
        /// The file.
        path: PathBuf,
        /// Its text when read, so saving keeps comments and layout.
        original: Option<String>,
    },
    /// A recipe in the database.
    Database {
        /// The recipe's name there.
        name: String,
        /// The version in the editor.
        version: u32,
        /// That version's TOML text, as stored.
        text: String,
    },
}

/// The recipe editor.
#[derive(Debug, Clone)]
pub struct RecipeState {
    /// The recipe as edited.
    pub recipe: Recipe,
    /// The recipe as last saved or loaded (unsaved changes = difference).
    pub saved: Recipe,
    /// Where it lives.
    pub source: RecipeSource,
    /// Line under the cursor.
    pub cursor: usize,
    /// Earlier states, most recent last.
    pub undo: Vec<Recipe>,
    /// Undone states, most recent last.
    pub redo: Vec<Recipe>,
    /// The analysis of `recipe`, or why there is none.
    pub analysis: Result<Analysis, String>,
}

impl RecipeState {
    /// Whether the recipe differs from what was last saved or loaded.
    pub fn is_dirty(&self) -> bool {
        self.recipe != self.saved
    }
}

/// Which list the ingredients screen shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum CatalogList {
    /// Ingredients (a cook's things to weigh out).
    #[default]
    Ingredients,
    /// Solutes (what dissolves).
    Solutes,
}

/// The ingredients screen.
#[derive(Debug, Clone, Default)]
pub struct IngredientsState {
    /// Which list.
    pub list: CatalogList,
    /// Search text.
    pub filter: String,
    /// Ids matching the filter, in display order.
    pub matches: Vec<String>,
    /// Row under the cursor.
    pub cursor: usize,
}

/// The user's own solutes and ingredients.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct OwnLibrary {
    /// Own solutes.
    pub solutes: Vec<Solute>,
    /// Own ingredients.
    pub ingredients: Vec<Ingredient>,
}

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

/// A figure predicted for a batch, with what was measured.
#[derive(Debug, Clone, PartialEq)]
pub struct Comparison {
    /// What.
    pub kind: MeasurementKind,
    /// The prediction, in the kind's unit.
    pub predicted: Option<f64>,
    /// The latest measurement, in the kind's unit.
    pub measured: Option<f64>,
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
    /// Measurements, oldest first.
    pub measurements: Vec<MeasurementRow>,
    /// Notes and amendments, oldest first: when, who, text.
    pub notes: Vec<(String, String, String)>,
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

/// The rows of the settings screen.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SettingField {
    /// °C or °F.
    TempUnit,
    /// g or oz/lb.
    MassUnit,
    /// Default serving target.
    ServingTarget,
    /// Cabinet temperature.
    CabinetTemp,
    /// Freezer temperature.
    FreezerTemp,
    /// Operator name.
    Operator,
}

impl SettingField {
    /// Every setting, in screen order.
    pub const ALL: [SettingField; 6] = [
        SettingField::TempUnit,
        SettingField::MassUnit,
        SettingField::ServingTarget,
        SettingField::CabinetTemp,
        SettingField::FreezerTemp,
        SettingField::Operator,
    ];

    /// The label on screen.
    pub fn label(self) -> &'static str {
        match self {
            SettingField::TempUnit => "Temperatures in",
            SettingField::MassUnit => "Masses in",
            SettingField::ServingTarget => "Default serving target (water frozen)",
            SettingField::CabinetTemp => "Display cabinet temperature",
            SettingField::FreezerTemp => "Freezer temperature",
            SettingField::Operator => "Operator",
        }
    }
}

/// What a one-line prompt is for.
#[derive(Debug, Clone, PartialEq)]
pub enum PromptPurpose {
    /// The amount of a new line of this ingredient.
    NewLineAmount(String),
    /// A new amount for the line at this index.
    LineAmount(usize),
    /// A new total mass for the recipe.
    ScaleTotal,
    /// The recipe's serving target.
    ServingTarget,
    /// A new name for the recipe.
    Rename,
    /// The name to save a new recipe under.
    SaveAsName,
    /// A recipe file to open.
    OpenFilePath,
    /// Live search of the ingredients screen.
    IngredientSearch,
    /// Live search of the batch log.
    BatchSearch,
    /// The date from which batches are shown.
    BatchSince,
    /// A note for the batch with this code.
    BatchNote(String),
    /// A setting's value.
    Setting(SettingField),
}

/// A one-line prompt.
#[derive(Debug, Clone)]
pub struct Prompt {
    /// What it is for.
    pub purpose: PromptPurpose,
    /// The question.
    pub title: String,
    /// The text typed.
    pub input: Input,
    /// Why the text is not accepted, when it is not.
    pub error: Option<String>,
}

/// What the picker picks.
#[derive(Debug, Clone, PartialEq)]
pub enum PickerPurpose {
    /// An ingredient for a new line.
    Ingredient,
    /// A recipe in the database to open.
    Recipe(Vec<RecipeEntry>),
}

/// One row the picker offers.
#[derive(Debug, Clone, PartialEq)]
pub struct PickItem {
    /// The id returned when picked (ingredient id, or database id as text).
    pub key: String,
    /// What the user reads.
    pub label: String,
    /// A second column (category, version).
    pub detail: String,
}

/// A search-as-you-type picker.
#[derive(Debug, Clone)]
pub struct Picker {
    /// What it picks.
    pub purpose: PickerPurpose,
    /// The question.
    pub title: String,
    /// The search text.
    pub query: Input,
    /// Items matching the search, best first.
    pub items: Vec<PickItem>,
    /// Item under the cursor.
    pub cursor: usize,
}

/// What a form is for.
#[derive(Debug, Clone, PartialEq)]
pub enum FormPurpose {
    /// A new own ingredient, or editing the own ingredient at this index.
    Ingredient(Option<usize>),
    /// A new own solute, or editing the own solute at this index.
    Solute(Option<usize>),
    /// A new batch from the recipe in the editor.
    Batch,
    /// A measurement for the batch with this code.
    Measurement(String),
    /// An amendment of the batch with this code.
    Amend(String),
}

/// One field of a form.
#[derive(Debug, Clone)]
pub struct Field {
    /// The label.
    pub label: String,
    /// The text typed.
    pub input: Input,
    /// Why the field's text is not accepted, when it is not.
    pub problem: Option<String>,
}

impl Field {
    /// A field with a label and a starting value.
    pub fn new(label: impl Into<String>, value: impl Into<String>) -> Field {
        Field {
            label: label.into(),
            input: Input::new(value.into()),
            problem: None,
        }
    }
}

/// A form of several fields.
#[derive(Debug, Clone)]
pub struct Form {
    /// What it is for.
    pub purpose: FormPurpose,
    /// The title.
    pub title: String,
    /// The fields.
    pub fields: Vec<Field>,
    /// The field in focus.
    pub focus: usize,
    /// A line under the fields: a running total, or why the whole is refused.
    pub summary: Option<String>,
}

/// What help or the reader shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ReaderKind {
    /// The keys of a mode.
    Help(Context),
    /// Every warning and caution of the recipe.
    Warnings,
}

/// What a yes/no question decides.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Question {
    /// Quit despite unsaved changes.
    QuitUnsaved,
    /// Finalise the batch with this code.
    Finalize(String),
}

/// Something drawn over the screen that takes the keys.
#[derive(Debug, Clone)]
pub enum Overlay {
    /// A one-line prompt.
    Prompt(Prompt),
    /// A picker.
    Picker(Picker),
    /// A form.
    Form(Form),
    /// Help or the warnings, scrolled to a row.
    Reader(ReaderKind, usize),
    /// A yes/no question.
    Confirm(Question),
}

/// A line in the status bar.
#[derive(Debug, Clone, PartialEq)]
pub struct Message {
    /// The text.
    pub text: String,
    /// Whether it reports a problem.
    pub is_error: bool,
}

/// The whole workspace.
#[derive(Debug, Clone)]
pub struct State {
    /// The screen shown.
    pub screen: Screen,
    /// The overlay taking the keys, if any.
    pub overlay: Option<Overlay>,
    /// Settings.
    pub settings: Settings,
    /// Row under the cursor on the settings screen.
    pub settings_cursor: usize,
    /// The recipe editor.
    pub recipe: RecipeState,
    /// The ingredients screen.
    pub ingredients: IngredientsState,
    /// The batch log.
    pub batches: BatchesState,
    /// The user's own solutes and ingredients.
    pub own: OwnLibrary,
    /// The built-in catalog plus the user's own items (and the recipe's).
    pub catalog: Catalog,
    /// Status-bar message.
    pub message: Option<Message>,
    /// Whether colour may be used (false under NO_COLOR).
    pub color: bool,
}

impl State {
    /// A workspace with an empty recipe and default settings.
    pub fn new(color: bool) -> State {
        let recipe = Recipe {
            name: "Untitled".into(),
            ..Recipe::default()
        };
        let mut state = State {
            screen: Screen::Recipe,
            overlay: None,
            settings: Settings::default(),
            settings_cursor: 0,
            recipe: RecipeState {
                saved: recipe.clone(),
                recipe,
                source: RecipeSource::New,
                cursor: 0,
                undo: Vec::new(),
                redo: Vec::new(),
                analysis: Err(String::new()),
            },
            ingredients: IngredientsState::default(),
            batches: BatchesState {
                query: BatchQuery {
                    limit: BATCH_PAGE,
                    ..BatchQuery::default()
                },
                ..BatchesState::default()
            },
            own: OwnLibrary::default(),
            catalog: Catalog::builtin().clone(),
            message: None,
            color,
        };
        state.refresh_catalog();
        super::screens::ingredients::refresh_matches(&mut state);
        state.reanalyse();
        state
    }

    /// The mode in effect: the overlay's, or the screen's browsing mode.
    pub fn context(&self) -> Context {
        match &self.overlay {
            Some(Overlay::Prompt(_)) => Context::Prompt,
            Some(Overlay::Picker(_)) => Context::Picker,
            Some(Overlay::Form(_)) => Context::Form,
            Some(Overlay::Reader(..)) => Context::Reader,
            Some(Overlay::Confirm(_)) => Context::Confirm,
            None if self.screen == Screen::Batches && self.batches.detail.is_some() => {
                Context::BatchDetail
            }
            None => self.screen.context(),
        }
    }

    /// The analysis options the settings give for the recipe in the editor.
    pub fn analysis_options(&self) -> Options {
        Options {
            serving_target: Some(
                self.recipe
                    .recipe
                    .serving_target
                    .unwrap_or(self.settings.serving_target),
            ),
            at_temps_c: Vec::new(),
            cabinet_temp_c: self.settings.cabinet_temp_c,
            freezer_temp_c: self.settings.freezer_temp_c,
        }
    }

    /// Recomputes the analysis of the recipe in the editor.
    pub fn reanalyse(&mut self) {
        let options = self.analysis_options();
        self.recipe.analysis = if self.recipe.recipe.lines.is_empty() {
            Err("Add a line to see how the mix freezes (press a).".into())
        } else {
            analysis::analyze(&self.recipe.recipe, Catalog::builtin(), &options)
                .map_err(|e| e.to_string())
        };
    }

    /// Rebuilds the catalog from the built-in one, the own library and the recipe's own items.
    pub fn refresh_catalog(&mut self) {
        let mut solutes = self.own.solutes.clone();
        let mut ingredients = self.own.ingredients.clone();
        for s in &self.recipe.recipe.solutes {
            if !solutes.iter().any(|o| o.id == s.id) {
                solutes.push(s.clone());
            }
        }
        for i in &self.recipe.recipe.ingredients {
            if !ingredients.iter().any(|o| o.id == i.id) {
                ingredients.push(i.clone());
            }
        }
        self.catalog = Catalog::builtin()
            .with_additions(&solutes, &ingredients)
            .unwrap_or_else(|_| Catalog::builtin().clone());
    }

    /// Shows a message in the status bar.
    pub fn tell(&mut self, text: impl Into<String>) {
        self.message = Some(Message {
            text: text.into(),
            is_error: false,
        });
    }

    /// Shows a problem in the status bar.
    pub fn warn(&mut self, text: impl Into<String>) {
        self.message = Some(Message {
            text: text.into(),
            is_error: true,
        });
    }
}

/// Rows fetched per page of the batch log.
pub const BATCH_PAGE: usize = 200;
/// Rows moved by PgUp/PgDn.
pub const PAGE_ROWS: usize = 10;

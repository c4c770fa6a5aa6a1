//! The whole state of the workspace: one struct the loop owns, which `update`
//! changes and `view` draws. Nothing here does I/O.

use std::collections::BTreeMap;
use std::path::PathBuf;

use crate::analysis::{
    self, Analysis, DEFAULT_CABINET_TEMP_C, DEFAULT_FREEZER_TEMP_C,
    DEFAULT_SERVING_FROZEN_FRACTION, Options,
};
use crate::catalog::Catalog;
use crate::model::units::trim_number;
use crate::model::{MassUnit, Recipe, TempUnit};

mod balance;
mod batches;
mod context;
mod overlay;
mod search;

pub use balance::{
    BalancePanel, name_in_celsius, shown_name, shown_range, shown_temperature, value_in_celsius,
};
pub use batches::*;
pub use context::Context;
pub use overlay::*;
pub use search::{search_key, search_rank};

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

/// The user's settings, stored in the database.
#[derive(Debug, Clone, PartialEq)]
pub struct Settings {
    /// Temperature display.
    pub temp_unit: TempUnit,
    /// Mass display and entry.
    pub mass_unit: MassUnit,
    /// Share of water frozen at serving for recipes that set none (0..1).
    pub serving_frozen_fraction: f64,
    /// Display-cabinet temperature (°C).
    pub cabinet_temp_c: f64,
    /// Freezer temperature (°C).
    pub freezer_temp_c: f64,
    /// Share of the water frozen at draw (0..1) the draw temperature is predicted at.
    pub draw_frozen_fraction: f64,
    /// This log's precision of freezing-point readings (K); `None`: the usual
    /// one (a cryoscope's, `measure::KINDS`).
    pub freezing_point_precision_k: Option<f64>,
    /// Who is working, written on new batches.
    pub operator: String,
    /// This log's site code, carried by new batch codes (renamed through the store).
    pub site_code: String,
    /// The hub's address (`sync_url`), never with a password; empty when none.
    pub sync_url: String,
    /// Prices per kg by ingredient id, for least cost (any currency).
    pub prices_per_kg: BTreeMap<String, f64>,
    /// The calibrations in force in the log (read with the settings, changed
    /// only by turning one on or off in the compare view).
    pub corrections: Vec<crate::measure::Correction>,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            temp_unit: TempUnit::Celsius,
            mass_unit: MassUnit::Grams,
            serving_frozen_fraction: DEFAULT_SERVING_FROZEN_FRACTION,
            cabinet_temp_c: DEFAULT_CABINET_TEMP_C,
            freezer_temp_c: DEFAULT_FREEZER_TEMP_C,
            draw_frozen_fraction: crate::measure::DEFAULT_DRAW_FROZEN_FRACTION,
            freezing_point_precision_k: None,
            operator: String::new(),
            site_code: String::new(),
            sync_url: String::new(),
            prices_per_kg: BTreeMap::new(),
            corrections: Vec::new(),
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
    /// The predictions of `recipe` that a calibration in force applies to,
    /// corrected (the analysis keeps the plain ones).
    pub calibrated: Vec<crate::measure::CalibratedFigure>,
    /// The balance panel, when it is open.
    pub balance: Option<BalancePanel>,
    /// What to do once the save under way goes through ("save first" answered to
    /// a question); dropped if the save fails or is backed out of.
    pub after_save: Option<AfterSave>,
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
pub use crate::model::OwnItems as OwnLibrary;

impl Settings {
    /// The value of a setting as it is typed (and shown, before its unit).
    pub fn field_text(&self, field: SettingField) -> String {
        match field {
            SettingField::TempUnit => self.temp_unit.symbol().into(),
            SettingField::MassUnit => match self.mass_unit {
                MassUnit::Grams => "g and kg".into(),
                MassUnit::Imperial => "oz and lb".into(),
            },
            SettingField::ServingTarget => trim_number(100.0 * self.serving_frozen_fraction),
            SettingField::CabinetTemp => {
                format!("{:.1}", self.temp_unit.from_c(self.cabinet_temp_c))
            }
            SettingField::FreezerTemp => {
                format!("{:.1}", self.temp_unit.from_c(self.freezer_temp_c))
            }
            SettingField::DrawShare => trim_number(100.0 * self.draw_frozen_fraction),
            SettingField::FreezingPointPrecision => match self.freezing_point_precision_k {
                Some(p) => trim_number(p),
                None => "usual".into(),
            },
            SettingField::Operator => self.operator.clone(),
            SettingField::SiteCode => self.site_code.clone(),
            SettingField::SyncUrl => self.sync_url.clone(),
        }
    }
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
    /// Share of water frozen at draw.
    DrawShare,
    /// How finely freezing points are read.
    FreezingPointPrecision,
    /// Operator name.
    Operator,
    /// This log's site code.
    SiteCode,
    /// The hub's address.
    SyncUrl,
}

impl SettingField {
    /// Every setting, in screen order.
    pub const ALL: [SettingField; 10] = [
        SettingField::TempUnit,
        SettingField::MassUnit,
        SettingField::ServingTarget,
        SettingField::CabinetTemp,
        SettingField::FreezerTemp,
        SettingField::DrawShare,
        SettingField::FreezingPointPrecision,
        SettingField::SiteCode,
        SettingField::SyncUrl,
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
            SettingField::DrawShare => "Water frozen at draw (predicted draw)",
            SettingField::FreezingPointPrecision => "Freezing points read to (K)",
            SettingField::Operator => "Operator",
            SettingField::SiteCode => "Site code (in new batch codes)",
            SettingField::SyncUrl => "Sync server (hub URL, no password)",
        }
    }
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
    /// The id under the cursor of the ingredients screen.
    pub fn selected_ingredient_id(&self) -> Option<String> {
        self.ingredients
            .matches
            .get(self.ingredients.cursor)
            .cloned()
    }

    /// Recomputes the ids the ingredients screen shows for its list and search
    /// text, sorted by name.
    pub fn refresh_ingredient_matches(&mut self) {
        let query = self.ingredients.filter.to_lowercase();
        let catalog = &self.catalog;
        let rows: Vec<(String, String)> = match self.ingredients.list {
            CatalogList::Ingredients => catalog
                .ingredients()
                .filter(|i| catalog.solute(&i.id).is_none())
                .map(|i| (i.name.clone(), i.id.clone()))
                .collect(),
            CatalogList::Solutes => catalog
                .solutes()
                .map(|s| (s.solute.name.clone(), s.solute.id.clone()))
                .collect(),
        };
        let mut ranked: Vec<((u8, usize), String, String)> = rows
            .into_iter()
            .filter_map(|(name, id)| {
                search_key(&name, &id, &query).map(|key| (key, name.to_lowercase(), id))
            })
            .collect();
        ranked.sort();
        let rows: Vec<(String, String)> = ranked.into_iter().map(|(_, n, id)| (n, id)).collect();
        self.ingredients.matches = rows.into_iter().map(|(_, id)| id).collect();
        let len = self.ingredients.matches.len();
        self.ingredients.cursor = self.ingredients.cursor.min(len.saturating_sub(1));
    }

    /// The display name of an ingredient id (the id itself when unknown).
    pub fn display_name(&self, id: &str) -> String {
        self.catalog
            .ingredient(id)
            .map_or_else(|| id.to_string(), |i| i.name.clone())
    }

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
                calibrated: Vec::new(),
                balance: None,
                after_save: None,
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
        state.refresh_ingredient_matches();
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
            None if self.screen == Screen::Batches && self.batches.compare.is_some() => {
                Context::Compare
            }
            None if self.screen == Screen::Batches && self.batches.detail.is_some() => {
                Context::BatchDetail
            }
            None if self.screen == Screen::Recipe && self.recipe.balance.is_some() => {
                Context::Balance
            }
            None => self.screen.context(),
        }
    }

    /// The analysis options the settings give for the recipe in the editor.
    pub fn analysis_options(&self) -> Options {
        Options {
            serving_frozen_fraction: Some(
                self.recipe
                    .recipe
                    .serving_frozen_fraction
                    .unwrap_or(self.settings.serving_frozen_fraction),
            ),
            at_temps_c: Vec::new(),
            cabinet_temp_c: self.settings.cabinet_temp_c,
            freezer_temp_c: self.settings.freezer_temp_c,
            cabinet_override_c: None,
            freezer_override_c: None,
            temp_unit: self.settings.temp_unit,
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
        self.recipe.calibrated = self.calibrated();
    }

    /// The recipe's predictions that the corrections in force apply to.
    fn calibrated(&self) -> Vec<crate::measure::CalibratedFigure> {
        let Ok(a) = &self.recipe.analysis else {
            return Vec::new();
        };
        crate::measure::calibrate_recipe(
            &self.recipe.recipe,
            Catalog::builtin(),
            self.settings.draw_frozen_fraction,
            a.serving_temp_c,
            &self.settings.corrections,
        )
        .unwrap_or_default()
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

/// A recipe in the database, as the open dialog lists it.
#[derive(Debug, Clone, PartialEq)]
pub struct RecipeEntry {
    /// Name (unique in the database).
    pub name: String,
    /// Newest version number.
    pub version: u32,
}

//! Carrying out effects: the only part of the workspace that reads or writes
//! files and the database. Each effect's outcome comes back as actions, and a
//! failure is an [`Action::Failed`] that says what happened and that the data
//! already stored is safe; nothing here ends the program.

mod convert;
mod hub;

use std::path::{Path, PathBuf};

use anyhow::Context as _;

use crate::batch::plan::{Plan, plan_batch_drawn};
use crate::batch::reading::as_recorded;
use crate::batch::{BatchFilter, LineRef};
use crate::catalog::Catalog;
use crate::clock;
use crate::model::OwnItems;
use crate::model::Recipe;
use crate::model::time::{DayEnd, parse_date_bound};
use crate::recipe_file::{
    parse_recipe, parse_recipe_using, read_recipe_using, recipe_to_checked_toml,
};
use crate::store::{CustomItem, Store, scope_words};

use super::action::{Action, Effect};
use super::state::{BatchPage, BatchQuery, BatchRequest, RecipeEntry, RecipeSource};

pub use convert::{load_settings, settings_pairs};

/// How the workspace was asked to start.
#[derive(Debug, Clone, Default)]
pub struct Launch {
    /// The database file (`None`: the default one).
    pub db: Option<PathBuf>,
    /// A recipe file to open (`gelu edit FILE`).
    pub file: Option<PathBuf>,
}

/// Setting that holds the name of the recipe last opened or saved in the database.
const LAST_RECIPE_KEY: &str = "workspace.last_recipe";
/// The sample recipe a new batch log opens on.
const FIRST_RUN_RECIPE: &str = "Harbour vanilla";

/// The files and database the workspace works on.
pub struct Services {
    store: Store,
    /// A sync running on its own thread, if one is.
    sync: Option<hub::SyncJob>,
}

impl Services {
    /// Opens the database the launch names (created and seeded on first use).
    pub fn open(launch: &Launch) -> anyhow::Result<Services> {
        let store = match &launch.db {
            Some(path) => Store::open(path)
                .with_context(|| format!("could not open the batch log {}", path.display()))?,
            None => Store::open_default().context("could not open the default batch log")?,
        };
        Ok(Services { store, sync: None })
    }

    /// Whether work is running in the background (a sync), whose outcome
    /// [`Services::background_outcome`] brings.
    pub fn background_running(&self) -> bool {
        self.sync.is_some()
    }

    /// The outcome of the work running in the background, as actions, once it is
    /// over; waiting for it when `wait` is true. Empty while it still runs, and
    /// when nothing runs.
    pub fn background_outcome(&mut self, wait: bool) -> Vec<Action> {
        let Some(job) = &self.sync else {
            return Vec::new();
        };
        match job.outcome(&self.store, wait) {
            Some(actions) => {
                self.sync = None;
                actions
            }
            None => Vec::new(),
        }
    }

    /// The actions that set the workspace up: settings, the user's own items and
    /// the recipe to open (the file asked for, else the first recipe in the
    /// database). A file that cannot be read is an error before anything is drawn.
    pub fn startup(&mut self, launch: &Launch) -> anyhow::Result<Vec<Action>> {
        let mut actions = vec![Action::SettingsLoaded(load_settings(&self.store))];
        match convert::load_own_library(&self.store) {
            Ok(own) => actions.push(Action::OwnLibraryLoaded(own)),
            Err(e) => actions.push(Action::Failed(format!(
                "your own solutes and ingredients could not be read: {e}"
            ))),
        }
        if let Some(path) = &launch.file {
            actions.push(self.open_file(path)?);
        } else if let Ok(recipes) = self.store.recipes() {
            // Reopen the recipe last worked on; on a new log, the house vanilla if seeded.
            let remembered = self.store.get_setting(LAST_RECIPE_KEY).ok().flatten();
            let pick = [remembered.as_deref(), Some(FIRST_RUN_RECIPE)]
                .into_iter()
                .flatten()
                .find(|name| recipes.iter().any(|r| r.name == *name))
                .or_else(|| recipes.first().map(|r| r.name.as_str()));
            if let Some(name) = pick {
                actions.push(self.load(name));
            }
        }
        // Last, so that the message line shows it.
        if let Some(notice) = self.store.migration().notice(self.store.path()) {
            actions.push(Action::Info(notice));
        }
        Ok(actions)
    }

    /// Carries out one effect.
    pub fn perform(&mut self, effect: Effect) -> Vec<Action> {
        match self.try_perform(effect) {
            Ok(actions) => actions,
            Err(e) => vec![Action::Failed(format!("{e:#}"))],
        }
    }

    fn try_perform(&mut self, effect: Effect) -> anyhow::Result<Vec<Action>> {
        let s = &mut self.store;
        Ok(match effect {
            Effect::Quit => Vec::new(),
            Effect::OpenFile(path) => vec![self.open_file(&path)?],
            Effect::CopyToFile { path, recipe } => {
                // A copy never lands over a file: it is a new file, or nothing.
                crate::recipe_file::save_recipe(
                    &path,
                    None,
                    &recipe,
                    crate::recipe_file::Expect::Absent,
                )?;
                vec![Action::Info(format!("A copy is in {}.", path.display()))]
            }
            Effect::LoadBatchRecipe(code) => {
                let loaded = self.load_batch_recipe(&code)?;
                let said = match &loaded {
                    Action::RecipeLoaded {
                        source: RecipeSource::Database { name, version, .. },
                        ..
                    } => format!(
                        "{name} version {version}, as batch {code} was made: b starts a new batch of it."
                    ),
                    _ => format!("The recipe of batch {code}."),
                };
                vec![loaded, Action::Info(said)]
            }
            Effect::ExportBatches { query, path } => {
                let format = if path
                    .extension()
                    .is_some_and(|e| e.eq_ignore_ascii_case("csv"))
                {
                    crate::batch::export::Format::Csv
                } else {
                    crate::batch::export::Format::Jsonl
                };
                let mut filter = batch_filter(&query)?;
                filter.limit = 0;
                filter.after = None;
                let count = export_to_new_file(s, &filter, format, &path)?;
                vec![Action::Info(format!(
                    "{count} batch(es) exported to {}.",
                    path.display()
                ))]
            }
            Effect::SaveFile {
                path,
                original,
                recipe,
            } => vec![save_file(&path, original.as_deref(), recipe)?],
            Effect::SaveVersion { name, recipe } => {
                let renamed = name != recipe.name;
                let saved_name = recipe.name.clone();
                let mut action = save_version(s, recipe)?;
                if renamed && let Action::Saved { message, .. } = &mut action {
                    message.push_str(" (a new name makes a new recipe in the database)");
                }
                self.remember_recipe(&saved_name);
                vec![action]
            }
            Effect::SaveNewRecipe(recipe) => {
                if !s.recipe_versions(&recipe.name)?.is_empty() {
                    anyhow::bail!(
                        "a recipe named `{}` is already in the database; save under another name (S)",
                        recipe.name
                    );
                }
                let saved_name = recipe.name.clone();
                let action = save_version(s, recipe)?;
                self.remember_recipe(&saved_name);
                vec![action]
            }
            Effect::ListRecipes => vec![Action::RecipeList(
                s.recipes()?
                    .into_iter()
                    .map(|r| RecipeEntry {
                        name: r.name,
                        version: r.latest_version,
                    })
                    .collect(),
            )],
            Effect::LoadRecipe(name) => {
                let loaded = self.load(&name);
                if matches!(loaded, Action::RecipeLoaded { .. }) {
                    self.remember_recipe(&name);
                }
                vec![loaded]
            }
            Effect::SaveSettings(settings) => {
                for (key, value) in settings_pairs(&settings) {
                    s.set_setting(key, &value)?;
                }
                Vec::new()
            }
            Effect::SaveOwnSolute(solute) => {
                let item =
                    convert::own_item(&solute.id, &solute.name, vec![solute.clone()], Vec::new());
                s.save_custom_solute(&item)?;
                Vec::new()
            }
            Effect::SaveOwnIngredient {
                ingredient,
                solutes,
            } => {
                let item: CustomItem = convert::own_item(
                    &ingredient.id,
                    &ingredient.name,
                    solutes,
                    vec![ingredient.clone()],
                );
                s.save_custom_ingredient(&item)?;
                Vec::new()
            }
            Effect::LoadBatches(query) => vec![Action::BatchesPage(load_page(s, query)?)],
            Effect::LoadSyncState => vec![Action::SyncState(hub::view(s, self.sync.is_some())?)],
            Effect::SyncNow if self.sync.is_some() => {
                vec![Action::Info("A sync is already running.".into())]
            }
            Effect::SyncNow => match hub::start_sync(s)? {
                hub::Started::Done(actions) => actions,
                hub::Started::Running(job) => {
                    self.sync = Some(job);
                    Vec::new()
                }
            },
            Effect::RenameSite(_) if self.sync.is_some() => anyhow::bail!(
                "a sync is running; rename the site when it is over (the batches screen shows it)"
            ),
            Effect::RenameSite(code) => hub::rename_site(s, &code)?,
            Effect::LoadBatchDetail(code) => match s.batch(&code)? {
                Some(batch) => {
                    let log = s.log_setting()?;
                    vec![Action::BatchDetail(Box::new(convert::detail(
                        &batch,
                        &log.setting(),
                    )))]
                }
                None => anyhow::bail!("there is no batch {code}"),
            },
            Effect::StartBatch(request) => vec![start_batch(s, request)?],
            Effect::LoadComparison(request) => vec![Action::ComparisonLoaded(Box::new(
                convert::compare_view(s, request)?,
            ))],
            Effect::TurnOnCorrection { correction, by } => {
                let version = s.turn_on_correction(&correction, &by)?;
                vec![
                    Action::SettingsLoaded(load_settings(s)),
                    Action::CorrectionChanged(format!(
                        "The correction of {} for {} is in force as version {version}: {}. Calibrated figures are marked as such.",
                        correction.kind,
                        scope_words(&correction.scope),
                        correction.basis
                    )),
                ]
            }
            Effect::TurnOffCorrection { kind, scope, by } => {
                s.turn_off_correction(&kind, &scope, &by)?;
                vec![
                    Action::SettingsLoaded(load_settings(s)),
                    Action::CorrectionChanged(format!(
                        "The correction of {kind} for {} is taken out; its versions stay in the log.",
                        scope_words(&scope)
                    )),
                ]
            }
            Effect::AddMeasurement {
                code,
                kind,
                value,
                by,
                reason,
            } => {
                let trail = reason.is_some();
                s.add_measurements(&code, &as_recorded(kind, value), &by, reason.as_deref())?;
                changed(
                    code,
                    if trail {
                        "Measurement recorded on the amendment trail."
                    } else {
                        "Measurement recorded."
                    },
                )
            }
            Effect::AddNote {
                code,
                text,
                by,
                reason,
            } => {
                let trail = reason.is_some();
                s.add_note(&code, &text, &by, reason.as_deref())?;
                changed(
                    code,
                    if trail {
                        "Note added on the amendment trail."
                    } else {
                        "Note added."
                    },
                )
            }
            Effect::Finalize { code, by } => {
                s.finalize(&code, &by)?;
                changed(
                    code,
                    "Batch finalised: from now on it is corrected by amendments.",
                )
            }
            Effect::Amend {
                code,
                by,
                reason,
                edits,
            } => {
                s.amend(&code, &by, &reason, &edits)?;
                changed(code, "Amendment recorded; the first record stays on file.")
            }
        })
    }

    /// Remembers the recipe last opened or saved from the database, to reopen it next
    /// time. Best effort: a failure here must not stop the work at hand.
    fn remember_recipe(&mut self, name: &str) {
        let _ = self.store.set_setting(LAST_RECIPE_KEY, name);
    }

    /// The user's own items in the log (none when they cannot be read; startup
    /// says so once).
    fn own(&self) -> OwnItems {
        convert::load_own_library(&self.store).unwrap_or_default()
    }

    /// Reads a recipe file, which may lean on the user's own items in the log
    /// (copied into the recipe, so saving writes them into the file).
    fn open_file(&self, path: &Path) -> anyhow::Result<Action> {
        let (recipe, text, _) =
            read_recipe_using(path, &self.own()).map_err(|e| anyhow::anyhow!("{e}"))?;
        Ok(loaded_file(path, recipe, text))
    }

    /// The recipe version a batch was made from, in the editor as that version of
    /// the log's recipe (saving it makes the next version).
    fn load_batch_recipe(&self, code: &str) -> anyhow::Result<Action> {
        let batch = self
            .store
            .batch(code)?
            .ok_or_else(|| anyhow::anyhow!("there is no batch {code}"))?;
        let v = batch.recipe;
        let label = PathBuf::from(format!("{} version {} (database)", v.recipe, v.version));
        let (recipe, _) =
            parse_recipe_using(&label, &v.text, &self.own()).map_err(|e| anyhow::anyhow!("{e}"))?;
        Ok(Action::RecipeLoaded {
            recipe,
            source: RecipeSource::Database {
                name: v.recipe,
                version: v.version,
                text: v.text,
            },
        })
    }

    fn load(&self, name: &str) -> Action {
        let found = self
            .store
            .recipes()
            .map(|all| all.into_iter().find(|r| r.name == name));
        match found {
            Ok(Some(summary)) => {
                let label = PathBuf::from(format!("{name} (database)"));
                match parse_recipe_using(&label, &summary.latest_text, &self.own()) {
                    Ok((recipe, _)) => Action::RecipeLoaded {
                        recipe,
                        source: RecipeSource::Database {
                            name: summary.name,
                            version: summary.latest_version,
                            text: summary.latest_text,
                        },
                    },
                    Err(e) => Action::Failed(format!("{e}")),
                }
            }
            Ok(None) => Action::Failed(format!("there is no recipe named `{name}`")),
            Err(e) => Action::Failed(format!("{e}")),
        }
    }
}

fn changed(code: String, message: &str) -> Vec<Action> {
    vec![Action::BatchChanged {
        message: format!("{code}: {message}"),
        code,
    }]
}

fn loaded_file(path: &Path, recipe: Recipe, text: String) -> Action {
    Action::RecipeLoaded {
        recipe,
        source: RecipeSource::File {
            path: path.to_path_buf(),
            original: Some(text),
        },
    }
}

fn save_file(path: &Path, original: Option<&str>, recipe: Recipe) -> anyhow::Result<Action> {
    let out = crate::recipe_file::save_recipe(
        path,
        original,
        &recipe,
        crate::recipe_file::Expect::Anything,
    )?;
    let how = if out.kept_layout {
        "comments and layout kept"
    } else {
        "written afresh"
    };
    Ok(Action::Saved {
        source: RecipeSource::File {
            path: path.to_path_buf(),
            original: Some(out.text),
        },
        recipe,
        message: format!("Saved {} ({how}).", path.display()),
    })
}

fn save_version(store: &mut Store, recipe: Recipe) -> anyhow::Result<Action> {
    let text = recipe_to_checked_toml(&recipe)
        .map_err(|why| anyhow::anyhow!("{} was not saved: {why}", recipe.name))?;
    let v = store.save_recipe_version(&recipe.name, &text)?;
    Ok(Action::Saved {
        message: format!(
            "Saved {} as version {} in the database.",
            v.recipe, v.version
        ),
        source: RecipeSource::Database {
            name: v.recipe,
            version: v.version,
            text: v.text,
        },
        recipe,
    })
}

/// Writes an export to `path`, a file that must not exist yet: streamed into a
/// file beside it, which is then linked into place (a link never replaces a file),
/// so a failure leaves nothing half written at `path`.
fn export_to_new_file(
    store: &Store,
    filter: &BatchFilter,
    format: crate::batch::export::Format,
    path: &Path,
) -> anyhow::Result<usize> {
    use std::io::Write as _;
    if path.exists() {
        anyhow::bail!("{} already exists; give a new file", path.display());
    }
    let mut tmp = path.as_os_str().to_owned();
    tmp.push(".exporting");
    let tmp = PathBuf::from(tmp);
    let written = (|| -> anyhow::Result<usize> {
        let file = std::fs::File::create_new(&tmp)
            .with_context(|| format!("could not create {}", tmp.display()))?;
        let mut out = std::io::BufWriter::new(file);
        let count = store.export(filter, format, &mut out)?;
        out.flush()?;
        out.into_inner().map_err(|e| e.into_error())?.sync_all()?;
        std::fs::hard_link(&tmp, path)
            .with_context(|| format!("{} could not be written", path.display()))?;
        Ok(count)
    })();
    let _ = std::fs::remove_file(&tmp);
    written
}

/// The store's filter for what the batch log screen shows.
fn batch_filter(query: &BatchQuery) -> anyhow::Result<BatchFilter> {
    let since = query
        .since
        .as_deref()
        .map(|day| parse_date_bound(day, DayEnd::Start))
        .transpose()
        .map_err(anyhow::Error::msg)?;
    Ok(BatchFilter {
        recipe: query.recipe.clone(),
        since,
        until: None,
        search: (!query.text.trim().is_empty()).then(|| query.text.clone()),
        limit: query.limit + 1,
        after: query.before.clone(),
    })
}

fn load_page(store: &Store, query: BatchQuery) -> anyhow::Result<BatchPage> {
    let filter = batch_filter(&query)?;
    let mut rows: Vec<_> = store
        .list_batches(&filter)?
        .iter()
        .map(convert::row)
        .collect();
    let more = rows.len() > query.limit;
    rows.truncate(query.limit);
    Ok(BatchPage { query, rows, more })
}

fn start_batch(store: &mut Store, request: BatchRequest) -> anyhow::Result<Action> {
    // The recorded text must read on its own: a file that leans on the user's
    // own items in the log is recorded as the recipe with them written in.
    // Never a text the reader would refuse.
    let text = match request
        .recipe_text
        .clone()
        .filter(|t| parse_recipe(Path::new(&request.recipe.name), t).is_ok())
    {
        Some(text) => text,
        None => recipe_to_checked_toml(&request.recipe).map_err(anyhow::Error::msg)?,
    };
    let lots: Vec<(LineRef, String)> = request
        .lots
        .iter()
        .enumerate()
        .filter(|(_, lot)| !lot.trim().is_empty())
        .map(|(k, lot)| (LineRef::Number(k + 1), lot.trim().to_string()))
        .collect();
    let note = (!request.note.trim().is_empty()).then_some(request.note.as_str());
    let new = plan_batch_drawn(
        &Plan {
            recipe: &request.recipe,
            recipe_text: &text,
            size: request.size,
            operator: &request.operator,
            lots: &lots,
            note,
            made_at: clock::now(),
        },
        Catalog::builtin(),
        &request.options,
        store.draw_frozen_fraction()?,
    )?;
    let batch = store.new_batch(&new)?;
    Ok(Action::BatchChanged {
        message: format!(
            "Recorded batch {} of {} (version {}).",
            batch.code, batch.recipe.recipe, batch.recipe.version
        ),
        code: batch.code,
    })
}

//! What the commands that read recipe files (`gelu report`, `gelu batch new`,
//! `gelu balance`) take from the batch log: the user's own solutes and
//! ingredients ([`load_own_items`]) and the cabinet and freezer temperatures of
//! the settings ([`analysis_options`]), so that the command line and the
//! workspace predict alike.

use std::path::Path;

use crate::analysis::{Analysis, Options};
use crate::catalog::Catalog;
use crate::measure::{CalibratedFigure, Correction, calibrate_recipe};
use crate::model::TempUnit;
use crate::model::units::parse_freezing_temp;
use crate::model::{OwnItems, Recipe};
use crate::recipe_file::own_items_in;
use crate::store::{CABINET_TEMP_KEY, FREEZER_TEMP_KEY, Store, open};

/// The user's own items from the batch log at `db`, or from the default log
/// when `db` is `None`. The log is opened read-only and never created or
/// migrated to read them: no file there means no own items. An item whose id
/// the built-in catalog now uses is left out, with a notice on stderr (the
/// built-in one is what recipes get). Recipes read with
/// [`crate::recipe_file::read_recipe_using`] copy in what they use, so the
/// analysis needs only the built-in catalog; to use them as a catalog instead,
/// `Catalog::builtin().with_additions(&own.solutes, &own.ingredients)`.
pub fn load_own_items(db: Option<&Path>) -> anyhow::Result<OwnItems> {
    match read_only_log(db)? {
        Some(store) => Ok(without_builtin_clashes(own_items_in(&store)?)),
        None => Ok(OwnItems::default()),
    }
}

/// The log at `db` (else the default one) opened read-only, or `None` when there
/// is none: it is never created or migrated just to be read.
fn read_only_log(db: Option<&Path>) -> anyhow::Result<Option<Store>> {
    let path = match db {
        Some(p) => p.to_path_buf(),
        None => match open::default_path() {
            Ok(p) => p,
            Err(_) => return Ok(None),
        },
    };
    if !path.exists() {
        return Ok(None);
    }
    Ok(Store::open_read_only(&path)?)
}

/// What the batch log adds to a prediction on the command line: the
/// corrections in force and the draw share they were fitted with.
#[derive(Debug, Clone)]
pub struct LogCorrections {
    /// The corrections turned on.
    pub corrections: Vec<Correction>,
    /// Share of the water frozen at draw (0..1).
    pub draw_frozen_fraction: f64,
}

impl Default for LogCorrections {
    fn default() -> Self {
        LogCorrections {
            corrections: Vec::new(),
            draw_frozen_fraction: crate::measure::DEFAULT_DRAW_FROZEN_FRACTION,
        }
    }
}

impl LogCorrections {
    /// The predictions of `recipe` (analysed as `a`) that a correction in force
    /// applies to, corrected; none without corrections.
    pub fn calibrated(
        &self,
        recipe: &Recipe,
        a: &Analysis,
    ) -> Result<Vec<CalibratedFigure>, String> {
        calibrate_recipe(
            recipe,
            Catalog::builtin(),
            self.draw_frozen_fraction,
            a.serving_temp_c,
            &self.corrections,
        )
        .map_err(|e| e.to_string())
    }
}

/// The corrections in force in the log at `db` (else the default log,
/// read-only); none without a log, or with a notice on stderr when it cannot
/// be read (the plain predictions stand).
pub fn log_corrections(db: Option<&Path>) -> LogCorrections {
    let read = || -> anyhow::Result<LogCorrections> {
        Ok(match read_only_log(db)? {
            Some(store) => {
                let s = store.log_setting()?;
                LogCorrections {
                    corrections: s.corrections,
                    draw_frozen_fraction: s.draw_frozen_fraction,
                }
            }
            None => LogCorrections::default(),
        })
    };
    read().unwrap_or_else(|e| {
        eprintln!("gelu: the corrections in force could not be read from the batch log: {e:#}");
        LogCorrections::default()
    })
}

/// The cabinet and freezer temperatures flags (`--cabinet`, `--freezer`).
#[derive(Debug, Clone, Default, clap::Args)]
pub struct TempArgs {
    /// Display-cabinet temperature (°C, or with a C/F suffix), over the recipe's and the settings'.
    #[arg(long, value_name = "TEMP", value_parser = flag_temp, allow_hyphen_values = true)]
    pub cabinet: Option<f64>,
    /// Freezer temperature (°C, or with a C/F suffix), over the recipe's and the settings'.
    #[arg(long, value_name = "TEMP", value_parser = flag_temp, allow_hyphen_values = true)]
    pub freezer: Option<f64>,
}

fn flag_temp(text: &str) -> Result<f64, String> {
    parse_freezing_temp(text, TempUnit::Celsius)
}

/// The analysis options the command line uses: the cabinet and freezer
/// temperatures of the log's settings (`db`, else the default log, read-only;
/// the defaults without one), a recipe file's own over them, and the flags over
/// both. This is the rule the workspace follows, so both predict alike.
pub fn analysis_options(db: Option<&Path>, temps: &TempArgs) -> Options {
    options_of(read_only_log(db).ok().flatten().as_ref(), temps)
}

/// As [`analysis_options`], from a log already open (or none).
pub fn options_of(store: Option<&Store>, temps: &TempArgs) -> Options {
    let mut options = Options::default();
    if let Some(store) = store {
        let in_range = |x: &f64| (-60.0..=0.0).contains(x);
        if let Ok(Some(t)) = store.setting_number(CABINET_TEMP_KEY)
            && in_range(&t)
        {
            options.cabinet_temp_c = t;
        }
        if let Ok(Some(t)) = store.setting_number(FREEZER_TEMP_KEY)
            && in_range(&t)
        {
            options.freezer_temp_c = t;
        }
    }
    options.cabinet_override_c = temps.cabinet;
    options.freezer_override_c = temps.freezer;
    options
}

/// The own items of an open log (already opened to write, as `batch new` does).
pub fn own_items_of(store: &Store) -> anyhow::Result<OwnItems> {
    Ok(without_builtin_clashes(own_items_in(store)?))
}

fn without_builtin_clashes(mut own: OwnItems) -> OwnItems {
    let builtin = Catalog::builtin();
    let clash = |id: &str| {
        let taken = builtin.ingredient(id).is_some();
        if taken {
            eprintln!(
                "gelu: your own item `{id}` in the batch log has the id of a built-in one; recipes get the built-in one"
            );
        }
        taken
    };
    own.solutes.retain(|s| !clash(&s.id));
    own.ingredients.retain(|i| !clash(&i.id));
    own
}

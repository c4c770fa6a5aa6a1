//! `gelu characterise`: an ingredient not in the catalog, characterised from
//! measured freezing points of known dilutions (the cryoscopic method, in
//! [`crate::measure`]), printed as text or JSON, and with `--save FILE` added
//! to a recipe file as `[[solute]]` and `[[ingredient]]` tables that record the
//! measurements in their `source`.
//!
//! Exit codes: 0 done; 1 refused (measurements that cannot be right, or a
//! file that cannot take the tables safely; the reason is on stderr and
//! nothing was written); 2 bad usage (a point or a number that does not read).

use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use crate::catalog::Catalog;
use crate::measure::{
    Characterisation, DEFAULT_PRECISION_K, DilutionPoint, DryMatter, SampleSpec, characterise,
};
use crate::model::{Amount, Line, OwnItems, Recipe, Style, TempUnit};
use crate::recipe_file::{Expect, append_own_items, parse_recipe, recipe_to_toml, save_text};

/// Arguments of `gelu characterise`.
#[derive(Debug, clap::Args)]
pub struct CharacteriseArgs {
    /// The sample's name, as recipes will show it.
    #[arg(long, value_name = "NAME")]
    pub name: String,
    /// Kebab-case id to save it under (its dissolved solids become ID-solids).
    #[arg(long, value_name = "ID")]
    pub id: String,
    /// A measurement: SAMPLE_G of the sample in WATER_G of water froze at TEMP
    /// (°C, or with a C or F suffix, like --at); repeat it, or give several.
    #[arg(
        long = "point",
        required = true,
        num_args = 1..,
        value_name = "SAMPLE_G:WATER_G:TEMP",
        value_parser = point
    )]
    pub points: Vec<DilutionPoint>,
    /// Dissolved solids as mass % of the sample (default 100: a pure solid).
    #[arg(long, value_name = "S", conflicts_with = "brix")]
    pub solids_pct: Option<f64>,
    /// The sample's refractometer reading (°Brix), taken as its % of dissolved solids.
    #[arg(long, value_name = "B")]
    pub brix: Option<f64>,
    /// Van 't Hoff factor of the solids: 1 for sugars, 2 for table salt.
    #[arg(long, value_name = "I", default_value_t = 1.0)]
    pub dissociation: f64,
    /// Print one JSON object instead of text.
    #[arg(long)]
    pub json: bool,
    /// Add the solute and ingredient found to FILE (created if it does not exist).
    #[arg(long, value_name = "FILE")]
    pub save: Option<PathBuf>,
}

/// `--point`: SAMPLE_G:WATER_G:TEMP.
fn point(text: &str) -> Result<DilutionPoint, String> {
    DilutionPoint::parse(text, TempUnit::Celsius)
}

fn spec(args: &CharacteriseArgs) -> SampleSpec {
    let dry_matter = match (args.solids_pct, args.brix) {
        (_, Some(b)) => DryMatter::Brix(b),
        (Some(s), None) => DryMatter::SolidsPct(s),
        (None, None) => DryMatter::SolidsPct(100.0),
    };
    SampleSpec {
        dry_matter,
        dissociation: args.dissociation,
        precision_k: DEFAULT_PRECISION_K,
        ..SampleSpec::new(&args.id, &args.name)
    }
}

/// Runs `gelu characterise`.
pub fn run(args: &CharacteriseArgs) -> anyhow::Result<ExitCode> {
    let c = match characterise(&spec(args), &args.points, Catalog::builtin()) {
        Ok(c) => c,
        Err(e) => {
            eprintln!("gelu: cannot characterise {}: {e}", args.name);
            return Ok(ExitCode::from(1));
        }
    };
    let saved = args.save.as_deref().map(|path| save(path, &c));
    if args.json {
        println!("{}", serde_json::to_string(&c)?);
    } else {
        print!("{}", text(&c));
    }
    match saved {
        None => Ok(ExitCode::SUCCESS),
        Some(Ok(message)) => {
            if args.json {
                eprintln!("gelu: {message}");
            } else {
                println!("{message}");
            }
            Ok(ExitCode::SUCCESS)
        }
        Some(Err(reason)) => {
            eprintln!("gelu: {reason}");
            Ok(ExitCode::from(1))
        }
    }
}

/// The characterisation for people.
pub fn text(c: &Characterisation) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "{} ({})", c.name, c.id);
    let _ = writeln!(
        out,
        "  molar mass of the dissolved solids  {:.1} g/mol (effective, at infinite dilution)",
        c.molar_mass_g_mol
    );
    let _ = match c.norrish_k {
        Some(k) => writeln!(
            out,
            "  Norrish K                           {k:.2} (fitted to {} points)",
            c.points.len()
        ),
        None => writeln!(
            out,
            "  Norrish K                           none: one point gives the ideal law (K = 0)"
        ),
    };
    let _ = writeln!(
        out,
        "  sucrose equivalent                  {:.2} g of sucrose per g of solids (at {} g of solids per 100 g water)",
        c.sucrose_equivalent, c.sucrose_equivalent_reference_g_per_100g_water
    );
    let _ = writeln!(
        out,
        "  sample                              {} % dissolved solids, dissociation i = {}",
        c.solids_pct, c.dissociation
    );
    let _ = writeln!(
        out,
        "\n  {:<5} {:>9} {:>9} {:>12} {:>10} {:>11} {:>14}",
        "point", "sample g", "water g", "measured °C", "model °C", "residual K", "M alone g/mol"
    );
    for (k, p) in c.points.iter().enumerate() {
        let _ = writeln!(
            out,
            "  {:<5} {:>9} {:>9} {:>12.3} {:>10.3} {:>+11.3} {:>14.1}",
            k + 1,
            p.sample_g,
            p.water_g,
            p.freezing_point_c,
            p.model_c,
            p.residual_k,
            p.apparent_molar_mass_g_mol
        );
    }
    let _ = writeln!(out, "  rms residual {:.3} K", c.rms_residual_k);
    for caution in &c.cautions {
        let _ = writeln!(out, "\nCaution: {caution}");
    }
    let _ = writeln!(
        out,
        "\nA characterisation is an estimate from your readings: check it against a batch before relying on it."
    );
    out
}

/// The items found, as a library to add to a file.
fn items(c: &Characterisation) -> OwnItems {
    OwnItems {
        solutes: vec![c.solute.clone()],
        ingredients: vec![c.ingredient.clone()],
    }
}

/// A new file: a recipe of the first measured point, holding the items found,
/// so that `gelu report` on it gives back that point's freezing point.
fn new_file_text(path: &Path, c: &Characterisation) -> Result<String, String> {
    let first = c
        .points
        .first()
        .ok_or_else(|| "there is no measured point to write".to_string())?;
    let mut lines = vec![Line {
        ingredient: c.id.clone(),
        amount: Amount::Grams(first.sample_g),
    }];
    if first.water_g > 0.0 {
        lines.push(Line {
            ingredient: "water".into(),
            amount: Amount::Grams(first.water_g),
        });
    }
    let recipe = Recipe {
        name: c.name.clone(),
        style: Style::Other,
        notes: format!(
            "The first measured point: {} g of the sample in {} g of water froze at {} °C.",
            first.sample_g, first.water_g, first.freezing_point_c
        ),
        solutes: vec![c.solute.clone()],
        ingredients: vec![c.ingredient.clone()],
        lines,
        ..Recipe::default()
    };
    let text = format!(
        "# {} ({}), characterised by gelu from measured freezing points; the\n\
         # [[solute]] and [[ingredient]] below record the measurements in their source.\n\
         # In any recipe holding them, `ingredient = \"{}\"` means the sample as measured.\n{}",
        c.name,
        c.id,
        c.id,
        recipe_to_toml(&recipe)
    );
    parse_recipe(path, &text).map_err(|e| format!("{e}; nothing was written"))?;
    Ok(text)
}

/// Adds the items to `path` (creating it), or says why not; nothing is written on refusal.
fn save(path: &Path, c: &Characterisation) -> Result<String, String> {
    let done = |how: &str| {
        format!(
            "{how} {}: [[solute]] {} and [[ingredient]] {}",
            path.display(),
            c.solute.id,
            c.ingredient.id
        )
    };
    match std::fs::read_to_string(path) {
        Ok(original) => {
            let text = append_own_items(path, &original, &items(c)).map_err(|e| e.to_string())?;
            save_text(path, Expect::Text(&original), &text).map_err(|e| e.to_string())?;
            Ok(done("added to"))
        }
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            let text = new_file_text(path, c)?;
            save_text(path, Expect::Absent, &text).map_err(|e| e.to_string())?;
            Ok(done("created"))
        }
        Err(e) => Err(format!(
            "{}: it cannot be read ({e}); nothing was written",
            path.display()
        )),
    }
}

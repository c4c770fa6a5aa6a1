//! Writing a recipe as a fresh TOML file in the format [`super::parse_recipe`]
//! reads (for a new file, or when a file's own layout cannot be kept), and the
//! guard every save goes through: nothing is written that the reader would refuse.

use crate::model::{Amount, Recipe};
use crate::thermo::binary::WaterModel;

/// Writes a recipe as TOML in the format [`parse_recipe`] reads. Amounts by
/// mass are written in g, by volume in mL.
pub fn recipe_to_toml(recipe: &Recipe) -> String {
    use std::fmt::Write as _;
    let q = |s: &str| toml::Value::String(s.to_string()).to_string();
    let mut out = String::new();
    let _ = writeln!(out, "name = {}", q(&recipe.name));
    let _ = writeln!(out, "style = {}", q(recipe.style.as_str()));
    if !recipe.notes.is_empty() {
        let _ = writeln!(out, "notes = {}", q(&recipe.notes));
    }
    if let Some(t) = recipe.serving_frozen_fraction {
        let _ = writeln!(out, "serving_target = {t}");
    }
    for s in &recipe.solutes {
        let _ = write!(
            out,
            "\n[[solute]]\nid = {}\nname = {}\nmolar_mass_g_mol = {:?}\ndissociation = {:?}\n",
            q(&s.id),
            q(&s.name),
            s.molar_mass_g_mol,
            s.dissociation
        );
        if let WaterModel::Ideal { norrish_k } = s.model
            && norrish_k > 0.0
        {
            let _ = writeln!(out, "norrish_k = {norrish_k:?}");
        }
        if let Some(sw) = s.sweetness {
            let _ = writeln!(out, "sweetness = {sw:?}");
        }
    }
    for i in &recipe.ingredients {
        let _ = write!(
            out,
            "\n[[ingredient]]\nid = {}\nname = {}\ncategory = {}\n",
            q(&i.id),
            q(&i.name),
            q(i.category.as_str())
        );
        for (k, v) in [
            ("water_pct", i.water_pct),
            ("fat_pct", i.fat_pct),
            ("protein_pct", i.protein_pct),
            ("other_solids_pct", i.other_solids_pct),
        ] {
            if v != 0.0 {
                let _ = writeln!(out, "{k} = {v:?}");
            }
        }
        if !i.solutes_pct.is_empty() {
            let parts: Vec<String> = i
                .solutes_pct
                .iter()
                .map(|(k, v)| format!("{} = {v:?}", toml_key(k)))
                .collect();
            let _ = writeln!(out, "solutes_pct = {{ {} }}", parts.join(", "));
        }
        let _ = writeln!(out, "density_g_ml = {:?}", i.density_g_ml);
        if !i.allergens.is_empty() {
            let a: Vec<String> = i.allergens.iter().map(|a| q(a)).collect();
            let _ = writeln!(out, "allergens = [{}]", a.join(", "));
        }
    }
    for l in &recipe.lines {
        let (key, v) = match l.amount {
            Amount::Grams(g) => ("g", g),
            Amount::Millilitres(ml) => ("ml", ml),
        };
        let _ = write!(
            out,
            "\n[[line]]\ningredient = {}\n{key} = {v:?}\n",
            q(&l.ingredient)
        );
    }
    out
}

/// Whether `text`, written for `recipe`, is one the reader takes back: the values
/// of its own solutes and ingredients and its amounts are checked first (so that
/// the reason names the value, as `sweetness of house-polyol ...`), then the text
/// itself is read. Every save calls this before it writes anything.
pub fn check_reads_back(recipe: &Recipe, text: &str) -> Result<(), String> {
    crate::catalog::Catalog::builtin()
        .with_additions(&recipe.solutes, &recipe.ingredients)
        .map_err(|e| e.to_string())?;
    for l in &recipe.lines {
        crate::model::units::check_amount(l.amount)
            .map_err(|why| format!("the amount of `{}` {why}", l.ingredient))?;
    }
    super::parse_recipe(std::path::Path::new(&recipe.name), text)
        .map(drop)
        .map_err(|e| e.to_string())
}

/// [`recipe_to_toml`], refused with the reason when the reader would not take the
/// text back ([`check_reads_back`]).
pub fn recipe_to_checked_toml(recipe: &Recipe) -> Result<String, String> {
    let text = recipe_to_toml(recipe);
    check_reads_back(recipe, &text)?;
    Ok(text)
}

fn toml_key(k: &str) -> String {
    if k.bytes()
        .all(|b| b.is_ascii_alphanumeric() || b == b'-' || b == b'_')
        && !k.is_empty()
    {
        k.to_string()
    } else {
        toml::Value::String(k.to_string()).to_string()
    }
}

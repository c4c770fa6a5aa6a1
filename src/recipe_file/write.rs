//! Writing a recipe as a fresh TOML file in the format [`super::parse_recipe`]
//! reads (for a new file, or when a file's own layout cannot be kept), what it
//! asks balancing included, and the guard every save goes through: nothing is
//! written that the reader would refuse.

use crate::model::{Amount, Ingredient, Recipe, Solute};
use crate::thermo::binary::WaterModel;

use super::write_balance::{balance_tables, own_price_line, rule_of_line, rule_pairs};

/// Writes a recipe as TOML in the format [`super::parse_recipe`] reads. Amounts by
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
    if let Some(t) = recipe.cabinet_temp_c {
        let _ = writeln!(out, "cabinet_temp_c = {t:?}");
    }
    if let Some(t) = recipe.freezer_temp_c {
        let _ = writeln!(out, "freezer_temp_c = {t:?}");
    }
    out.push_str(&own_items_with_prices(
        &recipe.solutes,
        &recipe.ingredients,
        &|id| own_price_line(recipe, id),
    ));
    for (k, l) in recipe.lines.iter().enumerate() {
        let (key, v) = match l.amount {
            Amount::Grams(g) => ("g", g),
            Amount::Millilitres(ml) => ("ml", ml),
        };
        let _ = write!(
            out,
            "\n[[line]]\ningredient = {}\n{key} = {v:?}\n",
            q(&l.ingredient)
        );
        for (key, value) in rule_of_line(recipe, k).map(rule_pairs).unwrap_or_default() {
            let _ = writeln!(out, "{key} = {value}");
        }
    }
    out.push_str(&balance_tables(recipe));
    out
}

/// The `[[solute]]` and `[[ingredient]]` tables of a user's own items, each
/// starting with a blank line, in the format [`super::parse_recipe`] reads: a recipe file
/// writes them before its lines, and a characterisation appends them to a file.
pub fn own_items_toml(solutes: &[Solute], ingredients: &[Ingredient]) -> String {
    own_items_with_prices(solutes, ingredients, &|_| None)
}

/// As [`own_items_toml`], with each ingredient's `price_per_kg` line where
/// `price_line` gives one.
fn own_items_with_prices(
    solutes: &[Solute],
    ingredients: &[Ingredient],
    price_line: &dyn Fn(&str) -> Option<String>,
) -> String {
    use std::fmt::Write as _;
    let q = |s: &str| toml::Value::String(s.to_string()).to_string();
    let mut out = String::new();
    for s in solutes {
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
        if !s.source.is_empty() {
            let _ = writeln!(out, "source = {}", q(&s.source));
        }
    }
    for i in ingredients {
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
        if !i.source.is_empty() {
            let _ = writeln!(out, "source = {}", q(&i.source));
        }
        if let Some(price) = price_line(&i.id) {
            out.push_str(&price);
        }
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

/// A key as TOML: bare when it can be, quoted otherwise.
pub(super) fn toml_key(k: &str) -> String {
    if k.bytes()
        .all(|b| b.is_ascii_alphanumeric() || b == b'-' || b == b'_')
        && !k.is_empty()
    {
        k.to_string()
    } else {
        toml::Value::String(k.to_string()).to_string()
    }
}

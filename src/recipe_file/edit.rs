//! Saving a recipe back to its TOML file while keeping the user's comments,
//! spacing and key order (toml_edit): only the values that changed are
//! rewritten, each keeping the comment beside it, and an amount keeps the unit
//! the file gave it (g, kg, ml or l). A file that does not parse as TOML, or an
//! edit that would not read back as the same recipe, falls back to a freshly
//! written file, and the caller is told so.

use std::path::Path;

use toml_edit::{ArrayOfTables, DocumentMut, Item, Table, Value};

use crate::model::{Amount, Line, OwnItems, Recipe};
use crate::recipe_file::read::parse_recipe_leaning_on;
use crate::recipe_file::{
    Expect, SaveError, check_reads_back, parse_recipe, recipe_to_toml, save_text,
};

use super::write_balance::{RULE_KEYS, balance_tables, is_own, rule_of_line, rule_pairs};

/// The new text of a recipe file, and whether comments and layout were kept.
#[derive(Debug, Clone, PartialEq)]
pub struct Rewritten {
    /// The file's new text.
    pub text: String,
    /// False when the file had to be written afresh.
    pub kept_layout: bool,
}

/// The text to write for `recipe`, editing `original` in place when there is one.
pub fn rewrite(path: &Path, original: Option<&str>, recipe: &Recipe) -> Rewritten {
    let fresh = || Rewritten {
        text: recipe_to_toml(recipe),
        kept_layout: false,
    };
    let Some(original) = original else {
        return fresh();
    };
    let Ok(mut doc) = original.parse::<DocumentMut>() else {
        return fresh();
    };
    // The file as it stands, which may lean on the user's own items from the log
    // (the recipe carries copies of them, to be written into the file).
    let library = OwnItems {
        solutes: recipe.solutes.clone(),
        ingredients: recipe.ingredients.clone(),
    };
    let Ok(before) = parse_recipe_leaning_on(path, original, &library) else {
        return fresh();
    };
    edit(&mut doc, &before, recipe);
    let text = doc.to_string();
    match parse_recipe(path, &text) {
        Ok(back) if same_recipe(&back, recipe) => Rewritten {
            text,
            kept_layout: true,
        },
        _ => fresh(),
    }
}

/// Saves `recipe` to `path` as [`rewrite`] gives it, never half written (see
/// [`save_text`]) and never as a text the reader would refuse
/// ([`check_reads_back`]): a failure, or a file that is not what `expect` says,
/// leaves the old file as it was.
pub fn save_recipe(
    path: &Path,
    original: Option<&str>,
    recipe: &Recipe,
    expect: Expect<'_>,
) -> Result<Rewritten, SaveError> {
    let out = rewrite(path, original, recipe);
    check_reads_back(recipe, &out.text).map_err(|why| SaveError {
        path: path.to_path_buf(),
        reason: format!("it was not saved: {why}"),
    })?;
    save_text(path, expect, &out.text)?;
    Ok(out)
}

/// Whether two recipes agree in everything saved, amounts to a milligram (or
/// a microlitre) plus a millionth, as saved back (targets in any order: a file
/// lists them in its own).
fn same_recipe(a: &Recipe, b: &Recipe) -> bool {
    let sorted = |r: &Recipe| {
        let mut q = r.balance.clone();
        q.sort_targets();
        q
    };
    let close = |x: &Amount, y: &Amount| match (x, y) {
        (Amount::Grams(p), Amount::Grams(q)) | (Amount::Millilitres(p), Amount::Millilitres(q)) => {
            (p - q).abs() <= 1e-3 + 1e-6 * p.abs()
        }
        _ => false,
    };
    a.name == b.name
        && a.style == b.style
        && a.notes == b.notes
        && a.serving_frozen_fraction == b.serving_frozen_fraction
        && a.cabinet_temp_c == b.cabinet_temp_c
        && a.freezer_temp_c == b.freezer_temp_c
        && a.solutes == b.solutes
        && a.ingredients == b.ingredients
        && sorted(a) == sorted(b)
        && a.lines.len() == b.lines.len()
        && a.lines
            .iter()
            .zip(&b.lines)
            .all(|(x, y)| x.ingredient == y.ingredient && close(&x.amount, &y.amount))
}

/// Sets a key to a new value, keeping the comment and spacing of the old one.
fn set(table: &mut Table, key: &str, mut value: Value) {
    if let Some(old) = table.get(key).and_then(Item::as_value) {
        *value.decor_mut() = old.decor().clone();
    }
    table.insert(key, Item::Value(value));
}

/// A number as TOML: an integer when it is whole, else rounded to 0.001.
fn number(x: f64) -> Value {
    rounded(x, 3)
}

/// A number as TOML rounded to `decimals`: an integer when it is whole.
fn rounded(x: f64, decimals: i32) -> Value {
    let scale = 10f64.powi(decimals);
    let rounded = (x * scale).round() / scale;
    if rounded.fract() == 0.0 && rounded.abs() < 1e15 {
        Value::from(rounded as i64)
    } else {
        Value::from(rounded)
    }
}

const AMOUNT_KEYS: [&str; 4] = ["g", "kg", "ml", "l"];

fn write_amount(table: &mut Table, amount: Amount) {
    let old_key = AMOUNT_KEYS.into_iter().find(|k| table.contains_key(k));
    // To a milligram (or a microlitre) in whatever unit the line uses.
    let (key, value, decimals) = match (amount, old_key) {
        (Amount::Grams(g), Some("kg")) => ("kg", g / 1000.0, 6),
        (Amount::Grams(g), _) => ("g", g, 3),
        (Amount::Millilitres(ml), Some("l")) => ("l", ml / 1000.0, 6),
        (Amount::Millilitres(ml), _) => ("ml", ml, 3),
    };
    let number = |x: f64| rounded(x, decimals);
    match old_key {
        Some(old) if old == key => set(table, key, number(value)),
        Some(old) => {
            let decor = table
                .get(old)
                .and_then(Item::as_value)
                .map(|v| v.decor().clone());
            table.remove(old);
            let mut v = number(value);
            if let Some(d) = decor {
                *v.decor_mut() = d;
            }
            table.insert(key, Item::Value(v));
        }
        None => set(table, key, number(value)),
    }
}

fn write_line(table: &mut Table, line: &Line, rule: Vec<(&'static str, Value)>) {
    let same = table.get("ingredient").and_then(Item::as_str) == Some(line.ingredient.as_str());
    if !same {
        set(table, "ingredient", Value::from(line.ingredient.as_str()));
    }
    write_amount(table, line.amount);
    for key in RULE_KEYS {
        match rule.iter().find(|(k, _)| *k == key) {
            Some((_, value)) => {
                let old = table.get(key).and_then(Item::as_value);
                let same = match (old, value) {
                    (Some(Value::Boolean(a)), Value::Boolean(b)) => a.value() == b.value(),
                    (Some(old), new) => as_number(old).is_some_and(|o| Some(o) == as_number(new)),
                    (None, _) => false,
                };
                if !same {
                    set(table, key, value.clone());
                }
            }
            None => {
                table.remove(key);
            }
        }
    }
}

/// A TOML number (integer or float) as f64.
fn as_number(v: &Value) -> Option<f64> {
    v.as_float().or_else(|| v.as_integer().map(|i| i as f64))
}

fn edit(doc: &mut DocumentMut, before: &Recipe, recipe: &Recipe) {
    let root = doc.as_table_mut();
    if before.name != recipe.name {
        set(root, "name", Value::from(recipe.name.as_str()));
    }
    if before.style != recipe.style {
        set(root, "style", Value::from(recipe.style.as_str()));
    }
    if before.notes != recipe.notes {
        if recipe.notes.is_empty() {
            root.remove("notes");
        } else {
            set(root, "notes", Value::from(recipe.notes.as_str()));
        }
    }
    if before.serving_frozen_fraction != recipe.serving_frozen_fraction {
        match recipe.serving_frozen_fraction {
            Some(t) => set(root, "serving_target", number(t)),
            None => {
                root.remove("serving_target");
            }
        }
    }
    for (key, was, now) in [
        (
            "cabinet_temp_c",
            before.cabinet_temp_c,
            recipe.cabinet_temp_c,
        ),
        (
            "freezer_temp_c",
            before.freezer_temp_c,
            recipe.freezer_temp_c,
        ),
    ] {
        if was != now {
            match now {
                Some(t) => set(root, key, number(t)),
                None => {
                    root.remove(key);
                }
            }
        }
    }
    if before.lines != recipe.lines || before.balance.rules != recipe.balance.rules {
        edit_lines(root, recipe);
    }
    let own_prices = |r: &Recipe| {
        r.balance
            .prices_per_kg
            .iter()
            .filter(|(id, _)| is_own(r, id))
            .map(|(id, p)| (id.clone(), *p))
            .collect::<Vec<_>>()
    };
    if before.solutes != recipe.solutes
        || before.ingredients != recipe.ingredients
        || own_prices(before) != own_prices(recipe)
    {
        replace_own_items(root, recipe);
    }
    let mut asked = before.clone();
    asked.lines.clone_from(&recipe.lines);
    asked.ingredients.clone_from(&recipe.ingredients);
    if balance_tables(&asked) != balance_tables(recipe) {
        replace_balance_tables(root, recipe);
    }
}

/// Writes the `[prices]` and `[balance]` tables afresh (or removes them).
fn replace_balance_tables(root: &mut Table, recipe: &Recipe) {
    replace_sections(root, &balance_tables(recipe), &["prices", "balance"]);
}

/// Replaces the sections `keys` of the file with those of the `fresh` text
/// (removing those it lacks).
fn replace_sections(root: &mut Table, fresh: &str, keys: &[&str]) {
    let Ok(fresh) = fresh.parse::<DocumentMut>() else {
        return;
    };
    for key in keys {
        match fresh.get(key) {
            Some(item) => {
                root.insert(key, item.clone());
            }
            None => {
                root.remove(key);
            }
        }
    }
}

fn edit_lines(root: &mut Table, recipe: &Recipe) {
    let Some(lines) = root.get_mut("line").and_then(Item::as_array_of_tables_mut) else {
        let mut lines = ArrayOfTables::new();
        for (k, line) in recipe.lines.iter().enumerate() {
            let mut t = Table::new();
            write_line(&mut t, line, rule_of(recipe, k));
            lines.push(t);
        }
        root.insert("line", Item::ArrayOfTables(lines));
        return;
    };
    for (k, line) in recipe.lines.iter().enumerate() {
        match lines.get_mut(k) {
            Some(table) => write_line(table, line, rule_of(recipe, k)),
            None => {
                let mut t = Table::new();
                write_line(&mut t, line, rule_of(recipe, k));
                lines.push(t);
            }
        }
    }
    while lines.len() > recipe.lines.len() {
        lines.remove(lines.len() - 1);
    }
}

/// The rule keys to write on line `k`.
fn rule_of(recipe: &Recipe, k: usize) -> Vec<(&'static str, Value)> {
    rule_of_line(recipe, k).map(rule_pairs).unwrap_or_default()
}

/// The user's own solutes and ingredients are few and rarely commented: when
/// they change, their sections are written afresh.
fn replace_own_items(root: &mut Table, recipe: &Recipe) {
    replace_sections(root, &recipe_to_toml(recipe), &["solute", "ingredient"]);
}

#[cfg(test)]
mod tests {
    use super::*;

    const FILE: &str = r#"# The Quay Kitchen: a test base.
name = "Quay test"   # the house name
style = "gelato"

[[line]]
ingredient = "whole-milk"
kg = 0.6   # from the morning delivery

[[line]]
ingredient = "sucrose"
g = 150
"#;

    fn path() -> &'static Path {
        Path::new("quay-test.toml")
    }

    #[test]
    fn comments_and_units_survive_an_amount_change() {
        let mut recipe = match parse_recipe(path(), FILE) {
            Ok(r) => r,
            Err(e) => panic!("test file: {e}"),
        };
        recipe.lines[0].amount = Amount::Grams(650.0);
        recipe.lines[1].amount = Amount::Grams(160.5);
        let out = rewrite(path(), Some(FILE), &recipe);
        assert!(out.kept_layout);
        assert!(out.text.contains("# The Quay Kitchen: a test base."));
        assert!(
            out.text.contains("kg = 0.65   # from the morning delivery"),
            "{}",
            out.text
        );
        assert!(out.text.contains("g = 160.5"));
        assert!(out.text.contains("# the house name"));
    }

    #[test]
    fn lines_added_and_removed_read_back_the_same() {
        let mut recipe = match parse_recipe(path(), FILE) {
            Ok(r) => r,
            Err(e) => panic!("test file: {e}"),
        };
        recipe.lines.remove(0);
        recipe.lines.push(Line {
            ingredient: "heavy-cream".into(),
            amount: Amount::Millilitres(200.0),
        });
        recipe.name = "Quay test, lighter".into();
        let out = rewrite(path(), Some(FILE), &recipe);
        assert!(out.kept_layout);
        let back = match parse_recipe(path(), &out.text) {
            Ok(r) => r,
            Err(e) => panic!("rewritten file: {e}\n{}", out.text),
        };
        assert_eq!(back.lines, recipe.lines);
        assert_eq!(back.name, "Quay test, lighter");
        assert!(out.text.contains("# the house name"));
    }

    #[test]
    fn a_broken_file_is_written_afresh() {
        let recipe = match parse_recipe(path(), FILE) {
            Ok(r) => r,
            Err(e) => panic!("test file: {e}"),
        };
        let out = rewrite(path(), Some("name = [unclosed"), &recipe);
        assert!(!out.kept_layout);
        assert_eq!(
            parse_recipe(path(), &out.text).map(|r| r.lines),
            Ok(recipe.lines)
        );
    }
}

//! Writing what a recipe asks balancing back in the form the reader takes:
//! the rules on the lines, `price_per_kg` of the file's own ingredients, the
//! `[prices]` table and the `[balance]` table. Nothing is written that the
//! reader would refuse: a rule or a `vary` id with no line of its ingredient
//! names nothing and is left out, and a target is written as a number or a
//! `[low, high]` pair (an open side as the figure's own limit; a target open
//! above on a figure with no top cannot be written as a pair and is noted in a
//! comment instead).

use toml_edit::{Array, InlineTable, Value};

use crate::model::Recipe;
use crate::model::balancing::{Figure, LineRule, Target};

/// The keys of a rule, in the order they are written.
pub(super) const RULE_KEYS: [&str; 5] = ["fixed", "min_g", "max_g", "min_pct", "max_pct"];

/// A number as TOML, exactly as held (it reads back the same).
fn number(x: f64) -> Value {
    Value::from(x)
}

/// The rule written on line `k`: its ingredient's rule, on the first line of
/// that ingredient only.
pub(super) fn rule_of_line(recipe: &Recipe, k: usize) -> Option<&LineRule> {
    let id = &recipe.lines.get(k)?.ingredient;
    let first = recipe.lines.iter().position(|l| &l.ingredient == id)?;
    (first == k)
        .then(|| recipe.balance.rules.get(id))
        .flatten()
        .filter(|r| !r.is_empty())
}

/// The (key, value) pairs of a rule, in [`RULE_KEYS`] order.
pub(super) fn rule_pairs(rule: &LineRule) -> Vec<(&'static str, Value)> {
    let mut out = Vec::new();
    if rule.fixed {
        out.push(("fixed", Value::from(true)));
    }
    for (key, v) in rule.bounds() {
        if let Some(v) = v {
            out.push((key, number(v)));
        }
    }
    out
}

/// Whether `id` is one of the recipe's own ingredients (its price then goes in
/// its `[[ingredient]]`).
pub(super) fn is_own(recipe: &Recipe, id: &str) -> bool {
    recipe.ingredients.iter().any(|i| i.id == id)
}

/// A target's value as the file holds it, or why it cannot be written.
fn target_value(t: &Target) -> Result<Value, String> {
    let (lo, hi) = t.figure.valid_range();
    if t.is_value()
        && let Some(v) = t.low
    {
        return Ok(number(v));
    }
    let high = match t.high {
        Some(h) => h,
        None if hi.is_finite() => hi,
        None => {
            return Err(format!(
                "{} {} (a file target needs both bounds)",
                t.figure.name(),
                t.describe()
            ));
        }
    };
    let low = t.low.unwrap_or(lo);
    let mut pair = Array::new();
    pair.push(low);
    pair.push(high);
    Ok(Value::Array(pair))
}

/// The `[prices]` and `[balance]` tables as text (empty when there is nothing
/// to say), each with a blank line before it.
pub(super) fn balance_tables(recipe: &Recipe) -> String {
    use std::fmt::Write as _;
    let request = &recipe.balance;
    let mut out = String::new();
    let catalog_prices: Vec<(&String, &f64)> = request
        .prices_per_kg
        .iter()
        .filter(|(id, _)| !is_own(recipe, id))
        .collect();
    if !catalog_prices.is_empty() {
        out.push_str("\n[prices]\n");
        for (id, p) in catalog_prices {
            let _ = writeln!(out, "{} = {}", super::write::toml_key(id), number(*p));
        }
    }
    let mut body = String::new();
    if request.objective != Default::default() {
        let _ = writeln!(
            body,
            "objective = {}",
            Value::from(request.objective.as_str())
        );
    }
    if let Some(vary) = &request.vary {
        let mut ids = Array::new();
        for id in vary {
            if recipe.lines.iter().any(|l| &l.ingredient == id) {
                ids.push(id.as_str());
            }
        }
        let _ = writeln!(body, "vary = {ids}");
    }
    let mut targets: Vec<&Target> = request.targets.iter().collect();
    targets.sort_by_key(|t| t.figure.file_rank());
    let mut solutes = InlineTable::new();
    let mut frozen = Array::new();
    let mut unwritten = Vec::new();
    for t in targets {
        let value = match target_value(t) {
            Ok(v) => v,
            Err(why) => {
                unwritten.push(why);
                continue;
            }
        };
        match &t.figure {
            Figure::SolutePct(id) => {
                solutes.insert(id, value);
            }
            Figure::FrozenAt { temp_c } => {
                let mut entry = InlineTable::new();
                entry.insert("temp_c", number(*temp_c));
                entry.insert("fraction", value);
                frozen.push(entry);
            }
            plain => {
                let _ = writeln!(body, "{} = {value}", plain.name());
            }
        }
    }
    if !solutes.is_empty() {
        let _ = writeln!(body, "solutes_pct = {solutes}");
    }
    if !frozen.is_empty() {
        let _ = writeln!(body, "frozen_at = {frozen}");
    }
    for why in unwritten {
        let _ = writeln!(body, "# not kept: {why}");
    }
    if !body.is_empty() {
        out.push_str("\n[balance]\n");
        out.push_str(&body);
    }
    out
}

/// A price as written after an own ingredient's composition.
pub(super) fn own_price_line(recipe: &Recipe, id: &str) -> Option<String> {
    recipe
        .balance
        .prices_per_kg
        .get(id)
        .map(|p| format!("price_per_kg = {}\n", number(*p)))
}

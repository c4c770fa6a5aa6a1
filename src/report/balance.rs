//! A balancing answer for people and programs: each line before and after,
//! each target with its value and whether it binds, the cost, any conflict in
//! plain words and the cautions (text); and the public JSON object of
//! `gelu balance --json`, whose keys are a contract like the report's.

use std::fmt::Write as _;

use serde_json::{Map, Value};

use crate::balance::{Balance, Figure, Objective, Status};
use crate::model::units::trim_number;
use crate::model::{Amount, Recipe};

use super::json::report_json;
use crate::measure::CalibratedFigure;

/// An amount as the balance table shows it: to a tenth of a gram (or mL).
fn amount_text(amount: Amount) -> String {
    match amount {
        Amount::Grams(g) => format!("{g:.1} g"),
        Amount::Millilitres(ml) => format!("{ml:.1} mL"),
    }
}

/// What the objective means, in words.
fn objective_words(o: Objective) -> &'static str {
    match o {
        Objective::Nearest => "least change from the recipe",
        Objective::Cost => "least cost",
    }
}

/// The answer as text. `before` is the recipe as it was asked about.
pub fn balance_text(before: &Recipe, b: &Balance) -> String {
    let mut o = String::new();
    let headline = match b.status {
        Status::Balanced => format!(
            "{}: balanced ({}); every target is met",
            b.name,
            objective_words(b.objective)
        ),
        Status::Infeasible => format!(
            "{}: the targets cannot all be met ({}). Shown is the nearest recipe that can be made; it does NOT meet them",
            b.name,
            objective_words(b.objective)
        ),
    };
    let _ = writeln!(o, "{headline}");
    let _ = writeln!(o, "{}", "=".repeat(b.name.chars().count().clamp(10, 72)));
    lines_table(&mut o, before, b);
    let _ = writeln!(o);
    targets_table(&mut o, b);
    cost_lines(&mut o, before, b);
    for (k, c) in b.conflicts.iter().enumerate() {
        let _ = writeln!(o);
        let _ = writeln!(
            o,
            "Conflict {}: these cannot all hold together: {}",
            k + 1,
            c.targets.join(", ")
        );
        let _ = writeln!(o, "  Any one of these would let the others hold:");
        for r in &c.relax {
            let _ = writeln!(o, "  - {r}");
        }
    }
    if let Some(a) = &b.analysis
        && !a.cautions.is_empty()
    {
        let _ = writeln!(o);
        let _ = writeln!(o, "Cautions");
        for c in &a.cautions {
            let _ = writeln!(o, "  - {c}");
        }
    }
    o
}

/// The width of a column: its widest entry or its header.
fn column_width<'a>(entries: impl Iterator<Item = &'a str>, header: &str) -> usize {
    entries
        .map(|e| e.chars().count())
        .max()
        .unwrap_or(0)
        .max(header.chars().count())
}

fn lines_table(o: &mut String, before: &Recipe, b: &Balance) {
    let width = column_width(b.lines.iter().map(|l| l.ingredient.as_str()), "ingredient");
    let _ = writeln!(
        o,
        "  {:<width$}  {:>12}  {:>12}",
        "ingredient", "before", "after"
    );
    for (k, l) in b.lines.iter().enumerate() {
        let (was, now) = match (before.lines.get(k), b.recipe.lines.get(k)) {
            (Some(x), Some(y)) => (amount_text(x.amount), amount_text(y.amount)),
            _ => (format!("{:.1} g", l.before_g), format!("{:.1} g", l.g)),
        };
        let mark = if (l.g - l.before_g).abs() > 1e-9 {
            ""
        } else {
            "  (unchanged)"
        };
        let mut row = format!("  {:<width$}  {was:>12}  {now:>12}{mark}", l.ingredient);
        if let Some(rc) = l.reduced_cost_per_kg {
            let _ = write!(row, "  (would come in {rc:.2} per kg cheaper)");
        }
        let _ = writeln!(o, "{row}");
    }
    let total_before: f64 = b.lines.iter().map(|l| l.before_g).sum();
    let total_after: f64 = b.lines.iter().map(|l| l.g).sum();
    let _ = writeln!(
        o,
        "  {:<width$}  {:>12}  {:>12}",
        "total",
        format!("{total_before:.1} g"),
        format!("{total_after:.1} g")
    );
}

fn targets_table(o: &mut String, b: &Balance) {
    if b.targets.is_empty() {
        let _ = writeln!(o, "  no targets");
        return;
    }
    let width = column_width(b.targets.iter().map(|t| t.name.as_str()), "target");
    let _ = writeln!(
        o,
        "  {:<width$}  {:<22}  {:>12}",
        "target", "asked", "value"
    );
    for t in &b.targets {
        let figure = Figure::parse(&t.name).ok();
        let asked = figure
            .as_ref()
            .map(|f| {
                crate::balance::Target {
                    figure: f.clone(),
                    low: t.low,
                    high: t.high,
                }
                .describe()
            })
            .unwrap_or_default();
        let asked = if t.implied {
            format!("{asked} (kept)")
        } else {
            asked
        };
        let value = match (t.value, &figure) {
            (Some(v), Some(f)) => f.value_text(v),
            (Some(v), None) => trim_number(v),
            (None, _) => "none".into(),
        };
        let state = match (t.met, t.binding) {
            (true, true) => "met, binds",
            (true, false) => "met",
            (false, _) => "MISSED",
        };
        let mut row = format!("  {:<width$}  {asked:<22}  {value:>12}  {state}", t.name);
        if let (Some(p), Some(f)) = (t.shadow_price, &figure) {
            let unit = match f.unit() {
                "" => "unit".to_string(),
                "%" => "percentage point".to_string(),
                u => u.to_string(),
            };
            let _ = write!(row, "  (cost changes {p:+.4} per {unit})");
        }
        let _ = writeln!(o, "{row}");
    }
}

fn cost_lines(o: &mut String, before: &Recipe, b: &Balance) {
    if let (Some(cost), Some(per_kg)) = (b.cost, b.cost_per_kg) {
        let _ = writeln!(
            o,
            "\nCost of the batch {cost:.2}, {per_kg:.2} per kg (from the prices given)"
        );
        return;
    }
    let prices = &before.balance.prices_per_kg;
    if prices.is_empty() {
        return;
    }
    let mut missing: Vec<&str> = Vec::new();
    for l in &b.lines {
        if !prices.contains_key(&l.ingredient) && !missing.contains(&l.ingredient.as_str()) {
            missing.push(&l.ingredient);
        }
    }
    let _ = writeln!(
        o,
        "\nCost: no price per kg for {} (give one in the file's [prices])",
        missing.join(", ")
    );
}

/// The public JSON object of one answer: `name, status, objective, cost,
/// cost_per_kg, lines [{ingredient, before_g, g, reduced_cost_per_kg}],
/// targets [{name, low, high, value, met, binding, shadow_price, implied}],
/// conflicts [{targets, relax}], report` (the `gelu report --json` object of
/// the balanced recipe, with the frozen-share targets' temperatures as `at`),
/// plus `file`. `calibrated` is what the corrections in force make of the
/// balanced recipe's predictions, as `gelu report` shows them.
pub fn balance_json(file: &str, b: &Balance, calibrated: &[CalibratedFigure]) -> Value {
    let mut object = match serde_json::to_value(b) {
        Ok(Value::Object(map)) => map,
        _ => Map::new(),
    };
    object.insert("file".into(), Value::from(file));
    object.insert(
        "report".into(),
        b.analysis
            .as_ref()
            .map_or(Value::Null, |a| report_json(a, calibrated)),
    );
    Value::Object(object)
}

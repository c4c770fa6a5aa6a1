//! What a recipe file asks balancing (the `[balance]` table, the rules on its
//! lines, its prices) survives every save: a fresh write, a save back into the
//! file keeping its comments, and a version in the batch log (which stores the
//! fresh text). Random requests are written and read back (proptest).

use std::collections::BTreeMap;
use std::path::Path;

use gelu::balance::{Figure, LineRule, Objective, Request, Target};
use gelu::model::{Amount, Recipe};
use gelu::recipe_file::{parse_recipe, recipe_to_toml, rewrite};
use proptest::prelude::*;

const QUAY: &str = r#"# The Quay Kitchen: the pier gelato, balanced for the -12 °C cabinet.
name = "Quay gelato"   # the house name
style = "gelato"

[[ingredient]]
id = "quay-syrup"            # our own invert syrup
name = "Quay invert syrup"
category = "sugar"
water_pct = 25
solutes_pct = { glucose = 37.5, fructose = 37.5 }
density_g_ml = 1.38
price_per_kg = 1.9

[[line]]
ingredient = "whole-milk"
kg = 0.65   # from the morning delivery
min_pct = 50

[[line]]
ingredient = "heavy-cream"
g = 120
max_g = 200

[[line]]
ingredient = "skim-milk-powder"
g = 40

[[line]]
ingredient = "sucrose"
g = 160

[[line]]
ingredient = "quay-syrup"
g = 25

[[line]]
ingredient = "stabiliser-blend"
g = 4
fixed = true    # weighed once for the week

# Prices from the harbour wholesaler's list.
[prices]
whole-milk = 0.95
heavy-cream = 3.8
skim-milk-powder = 4.2
sucrose = 1.15
stabiliser-blend = 14

[balance]
objective = "cost"     # least cost, for the weekly order
vary = ["whole-milk", "heavy-cream", "skim-milk-powder", "sucrose", "quay-syrup"]
mass_g = 1000
fat_pct = [6, 9]       # the display gelato's range
msnf_pct = [8, 11]
total_solids_pct = [32, 40]
sweetness = [15, 20]
solutes_pct = { glucose = [0, 3] }
frozen_at = [{ temp_c = -12, fraction = [0.65, 0.70] }, { temp_c = -18, fraction = [0, 0.8] }]
"#;

fn path() -> &'static Path {
    Path::new("quay-gelato.toml")
}

fn read(text: &str) -> Recipe {
    match parse_recipe(path(), text) {
        Ok(r) => r,
        Err(e) => panic!("{e}\n{text}"),
    }
}

#[test]
fn every_key_reads_into_the_request() {
    let r = read(QUAY);
    let b = &r.balance;
    assert_eq!(b.objective, Objective::Cost);
    assert_eq!(
        b.vary.as_deref(),
        Some(
            &[
                "whole-milk",
                "heavy-cream",
                "skim-milk-powder",
                "sucrose",
                "quay-syrup"
            ]
            .map(String::from)[..]
        )
    );
    let expected = vec![
        Target::value(Figure::MassG, 1000.0),
        Target::range(Figure::FatPct, 6.0, 9.0),
        Target::range(Figure::MsnfPct, 8.0, 11.0),
        Target::range(Figure::TotalSolidsPct, 32.0, 40.0),
        Target::range(Figure::Sweetness, 15.0, 20.0),
        Target::range(Figure::SolutePct("glucose".into()), 0.0, 3.0),
        Target::range(Figure::FrozenAt { temp_c: -12.0 }, 0.65, 0.70),
        Target::range(Figure::FrozenAt { temp_c: -18.0 }, 0.0, 0.8),
    ];
    assert_eq!(b.targets, expected);
    assert_eq!(
        b.rules.get("whole-milk"),
        Some(&LineRule {
            min_pct: Some(50.0),
            ..LineRule::default()
        })
    );
    assert_eq!(
        b.rules.get("heavy-cream"),
        Some(&LineRule {
            max_g: Some(200.0),
            ..LineRule::default()
        })
    );
    assert_eq!(b.rules.get("stabiliser-blend"), Some(&LineRule::fixed()));
    assert_eq!(b.rules.len(), 3);
    assert_eq!(b.prices_per_kg.get("quay-syrup"), Some(&1.9));
    assert_eq!(b.prices_per_kg.get("sucrose"), Some(&1.15));
    assert_eq!(b.prices_per_kg.len(), 6);
}

#[test]
fn every_plain_target_name_is_a_file_key() {
    for (name, figure) in gelu::model::balancing::PLAIN.iter() {
        let value = if matches!(figure, Figure::FreezingPointC | Figure::ServingTempC) {
            -3.0
        } else {
            5.0
        };
        let text = format!(
            "name = \"Keys\"\n[[line]]\ningredient = \"water\"\ng = 1\n[balance]\n{name} = {value:?}\n"
        );
        let r = read(&text);
        assert_eq!(
            r.balance.targets,
            vec![Target::value(figure.clone(), value)]
        );
    }
}

#[test]
fn a_fresh_write_reads_back_the_same() {
    let r = read(QUAY);
    let text = recipe_to_toml(&r);
    assert_eq!(read(&text), r, "{text}");
    assert!(text.contains("[balance]") && text.contains("price_per_kg = 1.9"));
}

#[test]
fn a_save_of_new_amounts_keeps_the_balance_table_and_its_comments() {
    let mut r = read(QUAY);
    r.lines[0].amount = Amount::Grams(612.5);
    r.lines[3].amount = Amount::Grams(171.25);
    let out = rewrite(path(), Some(QUAY), &r);
    assert!(out.kept_layout);
    assert!(
        out.text
            .contains("kg = 0.6125   # from the morning delivery"),
        "{}",
        out.text
    );
    let from_balance = &QUAY[QUAY.find("# Prices from").unwrap_or(0)..];
    assert!(
        out.text.ends_with(from_balance),
        "the prices and the [balance] table are untouched:\n{}",
        out.text
    );
    assert!(
        out.text
            .contains("fixed = true    # weighed once for the week")
    );
    assert!(out.text.contains("max_g = 200"));
    assert_eq!(read(&out.text).balance, r.balance);
}

#[test]
fn a_changed_question_is_saved_and_the_rest_keeps_its_comments() {
    let mut r = read(QUAY);
    r.balance
        .set_target(Target::range(Figure::FatPct, 7.0, 8.5));
    r.balance.sort_targets();
    r.balance.rules.remove("stabiliser-blend");
    r.balance.rules.insert(
        "sucrose".into(),
        LineRule {
            max_pct: Some(18.0),
            ..LineRule::default()
        },
    );
    r.balance.prices_per_kg.insert("sucrose".into(), 1.25);
    r.balance.prices_per_kg.insert("quay-syrup".into(), 2.05);
    r.balance.objective = Objective::Nearest;
    let out = rewrite(path(), Some(QUAY), &r);
    assert!(out.kept_layout, "{}", out.text);
    let back = read(&out.text);
    assert_eq!(back.balance, r.balance, "{}", out.text);
    assert!(out.text.contains("# The Quay Kitchen"));
    assert!(out.text.contains("kg = 0.65   # from the morning delivery"));
    assert!(!out.text.contains("fixed = true"));
    assert!(out.text.contains("price_per_kg = 2.05"));
}

#[test]
fn a_target_the_file_cannot_hold_is_noted_not_written() {
    let mut r = read(QUAY);
    r.balance
        .set_target(Target::at_least(Figure::Sweetness, 16.0));
    r.balance.set_target(Target::at_most(Figure::FatPct, 9.0));
    let text = recipe_to_toml(&r);
    assert!(text.contains("# not kept: sweetness at least 16"), "{text}");
    let back = read(&text);
    // At most 9 % fat is written as [0, 9]: the same question.
    assert!(
        back.balance
            .targets
            .contains(&Target::range(Figure::FatPct, 0.0, 9.0))
    );
    assert!(
        !back
            .balance
            .targets
            .iter()
            .any(|t| t.figure == Figure::Sweetness)
    );
}

#[test]
fn a_vary_id_or_rule_without_a_line_is_left_out() {
    let mut r = read(QUAY);
    r.lines
        .retain(|l| l.ingredient != "quay-syrup" && l.ingredient != "heavy-cream");
    r.ingredients.clear();
    r.balance.prices_per_kg.remove("quay-syrup");
    let text = recipe_to_toml(&r);
    let back = read(&text);
    assert_eq!(
        back.balance.vary.as_deref(),
        Some(&["whole-milk", "skim-milk-powder", "sucrose"].map(String::from)[..])
    );
    assert!(!back.balance.rules.contains_key("heavy-cream"));
}

// ---- random requests -----------------------------------------------------------

const IDS: [&str; 5] = [
    "whole-milk",
    "heavy-cream",
    "sucrose",
    "dextrose-monohydrate",
    "water",
];

fn figure_for(k: usize, temp: f64) -> Figure {
    match k {
        16 => Figure::SolutePct("glucose".into()),
        17 => Figure::FrozenAt { temp_c: temp },
        k => gelu::model::balancing::PLAIN[k].1.clone(),
    }
}

prop_compose! {
    fn target()(k in 0usize..18, a in 0.0f64..1.0, b in 0.0f64..1.0, value in any::<bool>(),
                temp in -40.0f64..-1.0) -> Target {
        let figure = figure_for(k, (temp * 10.0).round() / 10.0);
        let (lo, hi) = figure.valid_range();
        let hi = if hi.is_finite() { hi } else { 5000.0 };
        let lo = if lo < -50.0 { -50.0 } else { lo };
        let hi = if matches!(figure, Figure::FreezingPointC | Figure::ServingTempC) { -0.1 } else { hi };
        let x = lo + a * (hi - lo);
        let y = lo + b * (hi - lo);
        let x = (x * 1000.0).round() / 1000.0;
        let y = (y * 1000.0).round() / 1000.0;
        if value { Target::value(figure, x) } else { Target::range(figure, x.min(y), x.max(y)) }
    }
}

prop_compose! {
    fn request()(targets in prop::collection::vec(target(), 0..8),
                 rules in prop::collection::vec((0u8..6, 1.0f64..500.0), 5),
                 vary in prop::option::of(prop::sample::subsequence(IDS.to_vec(), 0..5)),
                 cost in any::<bool>(),
                 prices in prop::collection::vec(prop::option::of(0.0f64..20.0), 5)) -> Request {
        let mut r = Request::default();
        for t in targets {
            let size = matches!(t.figure, Figure::MassG | Figure::VolumeMl);
            if !r.targets.iter().any(|o| o.figure == t.figure
                || (size && matches!(o.figure, Figure::MassG | Figure::VolumeMl))) {
                r.targets.push(t);
            }
        }
        r.sort_targets();
        for (id, (kind, x)) in IDS.iter().zip(rules) {
            let x = (x * 100.0).round() / 100.0;
            let rule = match kind {
                0 => LineRule::fixed(),
                1 => LineRule { min_g: Some(x), ..LineRule::default() },
                2 => LineRule { max_g: Some(x), min_g: Some(x / 2.0), ..LineRule::default() },
                3 => LineRule { max_pct: Some(x / 5.0), ..LineRule::default() },
                _ => continue,
            };
            r.rules.insert(id.to_string(), rule);
        }
        r.vary = vary.map(|v| v.into_iter().map(String::from).collect());
        r.objective = if cost { Objective::Cost } else { Objective::Nearest };
        r.prices_per_kg = IDS.iter().zip(prices)
            .filter_map(|(id, p)| p.map(|p| (id.to_string(), (p * 100.0).round() / 100.0)))
            .collect::<BTreeMap<_, _>>();
        r
    }
}

const BASE: &str = "# Breakwater test bench\nname = \"Bench\"   # kept\nstyle = \"gelato\"\n\n[[line]]\ningredient = \"whole-milk\"\ng = 600 # milk\n\n[[line]]\ningredient = \"heavy-cream\"\ng = 150\n\n[[line]]\ningredient = \"sucrose\"\ng = 150\n\n[[line]]\ningredient = \"dextrose-monohydrate\"\ng = 30\n\n[[line]]\ningredient = \"water\"\ng = 70\n";

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    #[test]
    fn any_request_survives_a_fresh_write_and_a_save_back(req in request()) {
        let mut r = read(BASE);
        r.balance = req;
        let fresh = recipe_to_toml(&r);
        prop_assert_eq!(&read(&fresh), &r, "{}", fresh);
        let out = rewrite(path(), Some(BASE), &r);
        prop_assert!(out.kept_layout, "{}", out.text);
        prop_assert!(out.text.starts_with("# Breakwater test bench\nname = \"Bench\"   # kept"));
        prop_assert!(out.text.contains("g = 600 # milk"));
        prop_assert_eq!(&read(&out.text), &r, "{}", out.text);
        // And back to nothing: the tables go, the comments stay.
        let empty = rewrite(path(), Some(&out.text), &read(BASE));
        prop_assert_eq!(read(&empty.text), read(BASE));
        prop_assert!(!empty.text.contains("[balance]") && !empty.text.contains("fixed"));
    }
}

//! Invariants of the model, over random recipes (proptest).

use std::collections::BTreeMap;

use gelu::analysis::{Analysis, Options, analyze};
use gelu::catalog::Catalog;
use gelu::model::{Amount, Category, Ingredient, Line, Recipe, Style};
use proptest::prelude::*;

fn ingredient_ids() -> Vec<String> {
    Catalog::builtin()
        .ingredients()
        .map(|i| i.id.clone())
        .collect()
}

fn solute_ids() -> Vec<String> {
    Catalog::builtin()
        .solutes()
        .map(|s| s.solute.id.clone())
        .collect()
}

fn recipe_strategy() -> impl Strategy<Value = Recipe> {
    let ids = ingredient_ids();
    prop::collection::vec((0..ids.len(), 0.1f64..1000.0), 1..8).prop_map(move |lines| Recipe {
        name: "random".into(),
        style: Style::IceCream,
        lines: lines
            .into_iter()
            .map(|(k, g)| Line {
                ingredient: ids[k].clone(),
                amount: Amount::Grams(g),
            })
            .collect(),
        ..Recipe::default()
    })
}

fn run(r: &Recipe) -> Analysis {
    analyze(r, Catalog::builtin(), &Options::default()).expect("a valid recipe analyses")
}

fn all_finite(a: &Analysis) -> bool {
    let c = &a.composition;
    let opts = [
        a.freezing_point_c,
        a.dilute_law_freezing_point_c,
        a.serving_temp_c,
        a.glass_limit_temp_c,
    ];
    [
        a.mass_g,
        a.volume_ml,
        a.abv_pct,
        a.sweetness,
        a.sugar_g_per_l,
        c.water_pct,
        c.fat_pct,
        c.msnf_pct,
        c.sugars_pct,
        c.total_solids_pct,
        c.ethanol_pct,
    ]
    .iter()
    .all(|v| v.is_finite())
        && opts.iter().flatten().all(|v| v.is_finite())
        && a.ice_curve.iter().all(|p| p.frozen_fraction.is_finite())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    #[test]
    fn adding_any_solute_never_raises_the_freezing_point(r in recipe_strategy(), pick in 0usize..100, g in 0.01f64..200.0) {
        let solutes = solute_ids();
        let before = run(&r);
        let mut more = r.clone();
        more.lines.push(Line { ingredient: solutes[pick % solutes.len()].clone(), amount: Amount::Grams(g) });
        let after = run(&more);
        match (before.freezing_point_c, after.freezing_point_c) {
            (Some(b), Some(a)) => prop_assert!(a <= b + 1e-9, "{b} -> {a}"),
            (None, Some(a)) => prop_assert!(before.composition.water_pct == 0.0, "appeared at {a}"),
            _ => {}
        }
        for (p, q) in before.ice_curve.iter().zip(&after.ice_curve) {
            prop_assert!(q.frozen_fraction <= p.frozen_fraction + 1e-9, "more ice at {} °C", p.temp_c);
        }
    }

    #[test]
    fn frozen_share_never_rises_with_temperature_and_stays_in_range(r in recipe_strategy()) {
        let a = run(&r);
        for w in a.ice_curve.windows(2) {
            // Curve runs from 0 °C downwards: colder points hold at least as much ice.
            prop_assert!(w[1].frozen_fraction >= w[0].frozen_fraction - 1e-12);
        }
        prop_assert!(a.ice_curve.iter().all(|p| (0.0..=1.0).contains(&p.frozen_fraction)));
        prop_assert!(all_finite(&a));
    }

    #[test]
    fn scaling_every_line_changes_nothing_but_mass(r in recipe_strategy(), factor in 0.01f64..100.0) {
        let a = run(&r);
        let b = run(&r.scaled(factor));
        prop_assert!((b.mass_g / a.mass_g - factor).abs() < 1e-9 * factor);
        let close = |x: f64, y: f64| (x - y).abs() < 1e-9 * x.abs().max(1.0);
        prop_assert!(close(a.composition.water_pct, b.composition.water_pct) && close(a.composition.sugars_pct, b.composition.sugars_pct));
        prop_assert!(close(a.abv_pct, b.abv_pct) && close(a.sweetness, b.sweetness));
        match (a.freezing_point_c, b.freezing_point_c) {
            (Some(x), Some(y)) => prop_assert!((x - y).abs() < 1e-9),
            (x, y) => prop_assert_eq!(x, y),
        }
        for (p, q) in a.ice_curve.iter().zip(&b.ice_curve) {
            prop_assert!((p.frozen_fraction - q.frozen_fraction).abs() < 1e-9);
        }
    }

    #[test]
    fn no_panic_or_nan_for_any_composition(
        water in 0.0f64..100.0, fat in 0.0f64..100.0, protein in 0.0f64..100.0, other in 0.0f64..100.0,
        parts in prop::collection::vec((0usize..100, 0.0f64..100.0), 0..5), grams in 0.001f64..1e6,
    ) {
        // Any composition, normalised to 100 %: the analysis succeeds with finite numbers.
        let solutes = solute_ids();
        let mut solutes_pct = BTreeMap::new();
        for (k, v) in parts {
            *solutes_pct.entry(solutes[k % solutes.len()].clone()).or_insert(0.0) += v;
        }
        let total = water + fat + protein + other + solutes_pct.values().sum::<f64>();
        prop_assume!(total > 1e-6);
        let scale = 100.0 / total;
        let ing = Ingredient {
            id: "anything".into(), name: "Anything".into(), category: Category::Other,
            water_pct: water * scale, fat_pct: fat * scale, protein_pct: protein * scale, other_solids_pct: other * scale,
            solutes_pct: solutes_pct.into_iter().map(|(k, v)| (k, v * scale)).collect(),
            density_g_ml: 1.0, allergens: vec![], source: "test".into(),
        };
        let r = Recipe {
            name: "any".into(), ingredients: vec![ing],
            lines: vec![Line { ingredient: "anything".into(), amount: Amount::Grams(grams) }],
            ..Recipe::default()
        };
        let a = run(&r);
        prop_assert!(all_finite(&a));
    }
}

#[test]
fn extreme_mixes_analyse_without_nan() {
    // All water, no water, pure ethanol, pure salt, pure sucrose.
    for id in [
        "water",
        "sucrose",
        "ethanol",
        "salt",
        "neutral-spirit-96",
        "butter",
        "cocoa-powder",
    ] {
        let r = Recipe {
            name: id.into(),
            lines: vec![Line {
                ingredient: id.into(),
                amount: Amount::Grams(100.0),
            }],
            ..Recipe::default()
        };
        let a = run(&r);
        assert!(all_finite(&a), "{id}");
        assert!(
            a.ice_curve
                .iter()
                .all(|p| (0.0..=1.0).contains(&p.frozen_fraction)),
            "{id}"
        );
    }
    let water = run(&Recipe {
        name: "w".into(),
        lines: vec![Line {
            ingredient: "water".into(),
            amount: Amount::Grams(1.0),
        }],
        ..Recipe::default()
    });
    assert_eq!(water.freezing_point_c, Some(0.0));
    assert!(
        water.ice_curve[1..]
            .iter()
            .all(|p| p.frozen_fraction == 1.0),
        "pure water is all ice below 0 °C"
    );
    let sugar = run(&Recipe {
        name: "s".into(),
        lines: vec![Line {
            ingredient: "sucrose".into(),
            amount: Amount::Grams(1.0),
        }],
        ..Recipe::default()
    });
    assert_eq!(sugar.freezing_point_c, None, "no water, no freezing point");
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    #[test]
    fn parsing_never_panics_on_damaged_files(pick in 0usize..100, cuts in prop::collection::vec((0usize..4000, 0usize..6, any::<char>()), 1..6)) {
        // Damage a sample file (delete a few characters, or insert any character)
        // and parse it: an error is fine, a panic is not; an error points inside the file.
        let (name, text) = gelu::samples::SAMPLE_RECIPES[pick % gelu::samples::SAMPLE_RECIPES.len()];
        let mut chars: Vec<char> = text.chars().collect();
        for (at, len, c) in cuts {
            let at = at % (chars.len() + 1);
            if len == 0 {
                chars.insert(at, c);
            } else {
                let end = (at + len).min(chars.len());
                chars.drain(at..end);
            }
        }
        let damaged: String = chars.into_iter().collect();
        match gelu::recipe_file::parse_recipe(std::path::Path::new(name), &damaged) {
            Err(e) => prop_assert!(e.line >= 1 && e.line <= damaged.lines().count().max(1) + 1, "{e}"),
            Ok(r) => prop_assert!(all_finite(&run(&r))),
        }
    }

    #[test]
    fn parsing_never_panics_on_any_text(text in "\\PC{0,200}") {
        // Any text either parses into a recipe with a name, or fails with a position.
        match gelu::recipe_file::parse_recipe(std::path::Path::new("any.toml"), &text) {
            Ok(r) => prop_assert!(!r.name.is_empty()),
            Err(e) => prop_assert!(e.line >= 1 && e.column >= 1),
        }
    }
}

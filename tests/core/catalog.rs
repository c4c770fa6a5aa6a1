//! The built-in catalog and sample recipes: complete, sourced and consistent.

use gelu::catalog::Catalog;
use gelu::model::Category;
use gelu::samples::SAMPLE_RECIPES;

#[test]
fn the_required_solutes_and_ingredients_are_built_in() {
    let c = Catalog::builtin();
    for id in [
        "sucrose",
        "glucose",
        "fructose",
        "galactose",
        "lactose",
        "maltose",
        "maltotriose",
        "trehalose",
        "glycerol",
        "sorbitol",
        "erythritol",
        "xylitol",
        "maltitol",
        "ethanol",
        "sodium-chloride",
        "potassium-chloride",
        "citric-acid",
        "lactic-acid",
        "milk-minerals",
    ] {
        assert!(c.solute(id).is_some(), "solute {id}");
        assert!(
            c.ingredient(id).is_some(),
            "solute {id} as a pure ingredient"
        );
    }
    for id in [
        "water",
        "whole-milk",
        "skim-milk",
        "heavy-cream",
        "butter",
        "skim-milk-powder",
        "whole-milk-powder",
        "sweetened-condensed-milk",
        "egg-yolk",
        "whole-egg",
        "dextrose-monohydrate",
        "invert-syrup",
        "honey",
        "glucose-syrup-42de",
        "glucose-syrup-63de",
        "maltodextrin-10de",
        "inulin",
        "cocoa-powder",
        "dark-chocolate",
        "strawberry-puree",
        "mango-puree",
        "lemon-juice",
        "coconut-milk",
        "salt",
        "neutral-spirit-96",
        "spirit-40",
        "stabiliser-blend",
    ] {
        assert!(c.ingredient(id).is_some(), "ingredient {id}");
    }
}

#[test]
fn every_entry_is_sourced_and_every_composition_adds_up() {
    let c = Catalog::builtin();
    for s in c.solutes() {
        assert!(
            !s.solute.source.trim().is_empty(),
            "{} has a source",
            s.solute.id
        );
        assert!(s.solute.molar_mass_g_mol > 0.0 && s.solute.dissociation > 0.0);
    }
    for i in c.ingredients() {
        assert!(!i.source.trim().is_empty(), "{} has a source", i.id);
        c.validate_ingredient(i)
            .unwrap_or_else(|e| panic!("{}: {e}", i.id));
    }
}

#[test]
fn no_source_rests_on_memory() {
    // A catalog a quality manager can sign: every value is read in a named
    // source, or says that it is assumed and why. Nothing is "from memory".
    let c = Catalog::builtin();
    let mut recalled: Vec<String> = c
        .solutes()
        .filter(|s| s.solute.source.to_lowercase().contains("memory"))
        .map(|s| format!("solute {}: {}", s.solute.id, s.solute.source))
        .collect();
    recalled.extend(
        c.ingredients()
            .filter(|i| i.source.to_lowercase().contains("memory"))
            .map(|i| format!("ingredient {}: {}", i.id, i.source)),
    );
    assert!(
        recalled.is_empty(),
        "recalled values:\n{}",
        recalled.join("\n")
    );
    // The catalog file's own comments make the same promise.
    assert!(
        !gelu::catalog::CATALOG_TOML
            .to_lowercase()
            .contains("memory"),
        "catalog.toml mentions memory"
    );
}

#[test]
fn at_least_eighty_ingredients_besides_the_pure_solutes() {
    let c = Catalog::builtin();
    let foods = c
        .ingredients()
        .filter(|i| c.solute(&i.id).is_none())
        .count();
    assert!(
        foods >= 80,
        "{foods} ingredient entries besides the solutes"
    );
}

#[test]
fn the_ingredients_makers_asked_for_are_built_in() {
    let c = Catalog::builtin();
    for id in [
        "raspberry",
        "blackberry",
        "blueberry",
        "redcurrant",
        "sour-cherry",
        "apricot",
        "peach",
        "plum",
        "orange-juice",
        "lime-juice",
        "grapefruit-juice",
        "mandarin-juice",
        "pistachio-paste",
        "hazelnut-paste",
        "almond-paste",
        "single-cream",
        "whipping-cream",
        "plain-yogurt",
        "cream-cheese",
        "mascarpone",
        "spirit-37.5-vol",
        "spirit-40-vol",
        "spirit-43-vol",
        "spirit-45-vol",
        "spirit-50-vol",
        "spirit-57-vol",
    ] {
        let listed = c.ingredients().any(|i| i.id == id);
        assert!(listed, "ingredient {id} is listed for browsing");
    }
}

#[test]
fn allergens_are_declared_where_the_food_holds_them() {
    // US major allergens and the EU list (PRACTICE.md, "Cautions"): dairy is
    // milk, eggs are egg, nut pastes are tree nuts, peanut butter is peanuts,
    // tahini is sesame.
    let c = Catalog::builtin();
    let has = |id: &str, allergen: &str| {
        c.ingredient(id)
            .unwrap_or_else(|| panic!("{id} is built in"))
            .allergens
            .iter()
            .any(|a| a == allergen)
    };
    for i in c.ingredients() {
        if i.category == Category::Dairy {
            assert!(has(&i.id, "milk"), "{} declares milk", i.id);
        }
        if i.category == Category::Egg {
            assert!(has(&i.id, "egg"), "{} declares egg", i.id);
        }
    }
    for id in ["pistachio-paste", "hazelnut-paste", "almond-paste"] {
        assert!(has(id, "tree-nuts"), "{id} declares tree nuts");
    }
    assert!(has("peanut-butter", "peanuts"));
    assert!(has("tahini", "sesame"));
    // Nothing but the listed names, so labels stay consistent.
    let known = [
        "milk",
        "egg",
        "tree-nuts",
        "peanuts",
        "soy",
        "wheat",
        "gluten",
        "sesame",
        "sulphites",
        "coconut",
    ];
    for i in c.ingredients() {
        for a in &i.allergens {
            assert!(
                known.contains(&a.as_str()),
                "{}: unknown allergen {a}",
                i.id
            );
        }
    }
}

#[test]
fn every_sample_file_is_embedded_and_parses() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/sample-recipes");
    let mut on_disk: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    on_disk.sort();
    let mut embedded: Vec<String> = SAMPLE_RECIPES.iter().map(|(n, _)| n.to_string()).collect();
    embedded.sort();
    assert_eq!(
        on_disk, embedded,
        "src/samples.rs lists every file in sample-recipes/"
    );
    for (name, text) in SAMPLE_RECIPES {
        gelu::recipe_file::parse_recipe(std::path::Path::new(name), text)
            .unwrap_or_else(|e| panic!("{e}"));
    }
}

#[test]
fn recipe_toml_round_trips() {
    for (name, text) in SAMPLE_RECIPES {
        let r = gelu::recipe_file::parse_recipe(std::path::Path::new(name), text).unwrap();
        let again = gelu::recipe_file::parse_recipe(
            std::path::Path::new(name),
            &gelu::recipe_file::recipe_to_toml(&r),
        )
        .unwrap();
        assert_eq!(r, again, "{name}");
    }
}

// ---------------------------------------------------------------------------
// Neutral spirits at any strength: `spirit-<ABV>-vol` and `spirit-<proof>-proof`.

fn ethanol_pct(id: &str) -> f64 {
    let i = Catalog::builtin()
        .ingredient(id)
        .unwrap_or_else(|| panic!("{id} resolves"));
    assert!(
        (i.water_pct + i.solutes_pct["ethanol"] - 100.0).abs() < 1e-9,
        "{id} is ethanol and water only"
    );
    i.solutes_pct["ethanol"]
}

#[test]
fn spirits_at_any_strength_match_the_oiml_r22_check_values() {
    // OIML R 22 (1975), International Alcoholometric Tables, at 20 °C, as in
    // REFERENCES.md §4: % vol -> % ethanol by mass, to the published two or
    // three decimals (tolerance 0.006, the rounding).
    for (id, mass_pct) in [
        ("spirit-40-vol", 33.30),
        ("spirit-20-vol", 16.21),
        ("spirit-10-vol", 8.015),
        ("spirit-60-vol", 52.09),
    ] {
        let got = ethanol_pct(id);
        assert!(
            (got - mass_pct).abs() < 0.006,
            "{id}: {got:.3} % ethanol by mass, OIML {mass_pct}"
        );
    }
    // Density of 40 % vol at 20 °C: 948.05 kg/m³ (tolerance 0.05 kg/m³).
    let forty = Catalog::builtin().ingredient("spirit-40-vol").unwrap();
    assert!(
        (forty.density_g_ml * 1000.0 - 948.05).abs() < 0.05,
        "40 % vol is {} kg/m³",
        forty.density_g_ml * 1000.0
    );
    assert_eq!(forty.name, "Neutral spirit, 40 % vol");
    assert!(forty.source.contains("OIML R 22"), "{}", forty.source);
}

#[test]
fn us_proof_is_twice_the_strength_by_volume() {
    // PRACTICE.md, distillers' arithmetic: US proof = 2 x ABV.
    let c = Catalog::builtin();
    for (proof, vol) in [
        ("spirit-114-proof", "spirit-57-vol"),
        ("spirit-80-proof", "spirit-40-vol"),
        ("spirit-75-proof", "spirit-37.5-vol"),
        ("spirit-200-proof", "spirit-100-vol"),
    ] {
        let p = c.ingredient(proof).unwrap_or_else(|| panic!("{proof}"));
        let v = c.ingredient(vol).unwrap_or_else(|| panic!("{vol}"));
        assert_eq!(p.solutes_pct, v.solutes_pct, "{proof} = {vol}");
        assert_eq!(p.density_g_ml, v.density_g_ml, "{proof} = {vol}");
        assert_eq!(p.id, proof);
    }
    assert_eq!(
        c.ingredient("spirit-114-proof").unwrap().name,
        "Neutral spirit, 114 US proof (57 % vol)"
    );
    assert_eq!(
        c.ingredient("spirit-37.5-vol").unwrap().name,
        "Neutral spirit, 37.5 % vol"
    );
    // A decimal strength resolves too, and strength rises with the number.
    assert!(ethanol_pct("spirit-41.5-vol") > ethanol_pct("spirit-41.45-vol"));
}

#[test]
fn spirit_forms_resolve_everywhere_without_being_listed() {
    let c = Catalog::builtin();
    // Browsing shows the usual strengths, not the whole grid.
    let listed = c
        .ingredients()
        .filter(|i| i.id.starts_with("spirit-"))
        .count();
    assert!(listed < 12, "{listed} spirits listed");
    assert!(c.ingredients().all(|i| i.id != "spirit-57.5-vol"));
    // The recipe reader's unknown-ingredient check accepts them.
    let text = "name = \"Still strength\"\nstyle = \"spirit\"\n\n[[line]]\ningredient = \"spirit-57.5-vol\"\nml = 700\n";
    let r = gelu::recipe_file::parse_recipe(std::path::Path::new("still.toml"), text)
        .unwrap_or_else(|e| panic!("{e}"));
    // And the analysis uses them: 57.5 % vol back out, within 0.05 % vol.
    let a = gelu::analysis::analyze(&r, c, &gelu::analysis::Options::default()).unwrap();
    assert!((a.abv_pct - 57.5).abs() < 0.05, "ABV {:.3}", a.abv_pct);
    // A user cannot define an own ingredient under a spirit id.
    let mine = gelu::model::Ingredient {
        id: "spirit-57-vol".into(),
        ..c.ingredient("spirit-57-vol").unwrap().clone()
    };
    assert!(c.with_additions(&[], &[mine]).is_err());
}

#[test]
fn the_kitchens_word_for_sugar_suggests_sucrose_first() {
    // "Sugar" in a kitchen means white (table, granulated, caster) sugar, which
    // is sucrose (common practice); the nearest spelling was `brown-sugar`.
    let c = Catalog::builtin();
    for id in [
        "sugar",
        "white-sugar",
        "table-sugar",
        "granulated-sugar",
        "caster-sugar",
    ] {
        assert!(c.ingredient(id).is_none(), "{id} is not an id");
        let near = c.nearest_ingredients(id);
        assert_eq!(
            near.first().map(String::as_str),
            Some("sucrose"),
            "{id}: {near:?}"
        );
    }
    assert!(c.ingredient("sucrose").is_some());
}

#[test]
fn unknown_or_out_of_range_spirits_are_refused_with_a_suggestion() {
    let c = Catalog::builtin();
    for (id, suggestion) in [
        ("spirit-150-vol", "spirit-100-vol"),
        ("spirit-0-vol", "spirit-0.05-vol"),
        ("spirit-250-proof", "spirit-200-proof"),
        ("spirit-40.12-vol", "spirit-40.1-vol"),
        ("spirit-40-abv", "spirit-40-vol"),
        ("spirit-43", "spirit-43-vol"),
        ("spirit--5-vol", "spirit-5-vol"),
    ] {
        assert!(c.ingredient(id).is_none(), "{id} is refused");
        let near = c.nearest_ingredients(id);
        assert_eq!(near.first().map(String::as_str), Some(suggestion), "{id}");
        assert!(c.ingredient(suggestion).is_some(), "{suggestion} resolves");
    }
    // The analysis says why, in words.
    let r = gelu::model::Recipe {
        name: "too strong".into(),
        lines: vec![gelu::model::Line {
            ingredient: "spirit-150-vol".into(),
            amount: gelu::model::Amount::Grams(100.0),
        }],
        ..Default::default()
    };
    let e = gelu::analysis::analyze(&r, c, &gelu::analysis::Options::default())
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("100 % vol") && e.contains("spirit-100-vol"),
        "{e}"
    );
}

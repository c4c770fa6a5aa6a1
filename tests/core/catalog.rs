//! The built-in catalog and sample recipes: complete, sourced and consistent.

use gelu::catalog::Catalog;
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

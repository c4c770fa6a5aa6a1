//! The recipe reader under attack: any text is read without a panic; a recipe it
//! reads is analysed without a panic and with finite figures, and written back out
//! as a file that reads again as the same recipe with the same analysis.

#![no_main]

use std::path::Path;

use gelu::analysis::{Options, analyze};
use gelu::catalog::Catalog;
use gelu::recipe_file::{parse_recipe, recipe_to_checked_toml, recipe_to_toml};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let path = Path::new("fuzzed.toml");
    let Ok(recipe) = parse_recipe(path, text) else {
        return;
    };
    let catalog = Catalog::builtin();
    let options = Options::default();
    let first = analyze(&recipe, catalog, &options);
    if let Ok(a) = &first {
        assert!(a.mass_g.is_finite() && a.mass_g > 0.0, "mass {}", a.mass_g);
        for p in &a.ice_curve {
            assert!(
                (0.0..=1.0).contains(&p.frozen_fraction),
                "frozen share {} at {} °C",
                p.frozen_fraction,
                p.temp_c
            );
        }
    }
    // What the reader took, the writer writes in a form the reader takes back.
    let written = match recipe_to_checked_toml(&recipe) {
        Ok(written) => written,
        Err(why) => panic!(
            "a recipe read is refused on writing: {why}\n{}",
            recipe_to_toml(&recipe)
        ),
    };
    let again = match parse_recipe(path, &written) {
        Ok(again) => again,
        Err(e) => panic!("the written recipe does not read back: {e}\n{written}"),
    };
    assert_eq!(
        again, recipe,
        "the written recipe reads back as another:\n{written}"
    );
    let second = analyze(&again, catalog, &options);
    match (&first, &second) {
        (Ok(a), Ok(b)) => assert_eq!(
            serde_json::to_string(&gelu::report::json::analysis_json(a)).ok(),
            serde_json::to_string(&gelu::report::json::analysis_json(b)).ok(),
            "the same recipe analyses differently"
        ),
        (Err(_), Err(_)) => {}
        _ => panic!("one of two equal recipes analyses, the other not"),
    }
});

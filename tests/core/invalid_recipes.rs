//! One test per file in `tests/invalid-recipes/`: each must fail with the
//! right line and column and a message that says what would be valid.

use std::path::PathBuf;

use gelu::recipe_file::read_recipe;

fn check(file: &str, line: usize, column: usize, says: &[&str]) {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/invalid-recipes")
        .join(file);
    let err = read_recipe(&path).expect_err("the file is invalid");
    let text = err.to_string();
    assert_eq!((err.line, err.column), (line, column), "{text}");
    assert!(text.contains(&format!("{file}:{line}:{column}:")), "{text}");
    for s in says {
        assert!(text.contains(s), "`{text}` should mention `{s}`");
    }
}

#[test]
fn syntax_error() {
    check("syntax-error.toml", 1, 22, &["string", "expected"]);
}

#[test]
fn unknown_ingredient_suggests_the_nearest() {
    check(
        "unknown-ingredient.toml",
        4,
        14,
        &["unknown ingredient `whole-mlik`", "`whole-milk`"],
    );
}

#[test]
fn negative_amount() {
    check("negative-amount.toml", 5, 5, &["zero or more", "-5"]);
}

#[test]
fn zero_total() {
    check("zero-total.toml", 3, 1, &["add up to nothing"]);
}

#[test]
fn nan_amount() {
    check("nan-amount.toml", 5, 5, &["finite number"]);
}

#[test]
fn infinite_amount() {
    check("infinite-amount.toml", 5, 8, &["finite number", "inf"]);
}

#[test]
fn composition_not_100() {
    check(
        "composition-not-100.toml",
        4,
        6,
        &["adds up to 90.00 %", "not 100 %"],
    );
}

#[test]
fn zero_molar_mass() {
    check(
        "zero-molar-mass.toml",
        6,
        20,
        &["molar_mass_g_mol", "positive"],
    );
}

#[test]
fn negative_dissociation() {
    check(
        "negative-dissociation.toml",
        7,
        16,
        &["dissociation", "positive", "van 't Hoff"],
    );
}

#[test]
fn unknown_solute_in_own_ingredient() {
    check(
        "unknown-solute.toml",
        4,
        6,
        &["unknown solute `sucrse`", "`sucrose`"],
    );
}

#[test]
fn two_amounts_on_one_line() {
    check("two-amounts.toml", 6, 6, &["exactly one amount"]);
}

#[test]
fn unknown_style_lists_the_valid_ones() {
    check(
        "unknown-style.toml",
        2,
        9,
        &["unknown style `popsicle`", "ice-cream", "sorbet"],
    );
}

#[test]
fn missing_name() {
    check("missing-name.toml", 1, 1, &["name"]);
}

#[test]
fn unknown_field_names_the_valid_ones() {
    check("unknown-field.toml", 5, 1, &["grams", "`g`"]);
}

#[test]
fn serving_target_out_of_range() {
    check(
        "serving-target-out-of-range.toml",
        2,
        18,
        &["between 0 and 1"],
    );
}

#[test]
fn an_absurd_amount_is_refused_where_it_is_written() {
    check("absurd-amount.toml", 5, 6, &["sucrose", "1000 t"]);
}

#[test]
fn amounts_whose_sum_would_overflow_are_refused_at_the_first() {
    check("amounts-that-overflow.toml", 5, 5, &["sucrose", "1000 t"]);
}

#[test]
fn a_sweetness_that_is_not_a_number_is_refused() {
    check("nan-sweetness.toml", 7, 13, &["sweetness"]);
}

#[test]
fn an_absurd_molar_mass_is_refused() {
    check("absurd-molar-mass.toml", 6, 20, &["molar_mass_g_mol"]);
}

#[test]
fn an_absurd_density_is_refused_where_it_is_written() {
    check("absurd-density.toml", 8, 16, &["density_g_ml"]);
}

#[test]
fn a_name_with_control_characters_is_refused() {
    check("control-character-name.toml", 1, 8, &["control character"]);
}

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

// ---- what a file asks balancing: [balance], line rules, prices ----------------

#[test]
fn balance_unknown_key_lists_the_valid_ones() {
    check(
        "balance-unknown-key.toml",
        8,
        1,
        &["unknown key `fat`", "fat_pct", "frozen_at", "sugar_g_per_l"],
    );
}

#[test]
fn balance_low_above_high() {
    check(
        "balance-low-above-high.toml",
        8,
        11,
        &["fat_pct", "above the high bound"],
    );
}

#[test]
fn balance_target_not_a_pair() {
    check(
        "balance-target-not-a-pair.toml",
        8,
        11,
        &["[low, high] pair"],
    );
}

#[test]
fn balance_target_not_a_number() {
    check(
        "balance-target-not-a-number.toml",
        8,
        13,
        &["a number (like 20) or a [low, high] pair"],
    );
}

#[test]
fn balance_target_nan() {
    check(
        "balance-target-nan.toml",
        8,
        11,
        &["fat_pct", "not a number"],
    );
}

#[test]
fn balance_vary_names_a_line() {
    check(
        "balance-vary-not-a-line.toml",
        8,
        23,
        &["`heavy-cream`", "the lines are: whole-milk"],
    );
}

#[test]
fn balance_unknown_objective() {
    check(
        "balance-unknown-objective.toml",
        8,
        13,
        &["cheapest", "\"nearest\"", "\"cost\""],
    );
}

#[test]
fn balance_two_sizes() {
    check(
        "balance-two-sizes.toml",
        9,
        13,
        &["`mass_g` or `volume_ml`, not both"],
    );
}

#[test]
fn balance_unknown_solute_suggests_the_nearest() {
    check(
        "balance-unknown-solute.toml",
        8,
        17,
        &["`glucoze`", "`glucose`"],
    );
}

#[test]
fn balance_frozen_share_above_zero() {
    check("balance-frozen-above-zero.toml", 8, 67, &["below 0 °C"]);
}

#[test]
fn line_rule_fixed_with_a_bound() {
    check(
        "line-rule-fixed-with-bound.toml",
        6,
        9,
        &["`whole-milk`", "a fixed line takes no min or max"],
    );
}

#[test]
fn line_rule_given_twice_for_one_ingredient() {
    check(
        "line-rule-twice.toml",
        15,
        9,
        &["`sucrose` already has a rule", "give it once"],
    );
}

#[test]
fn prices_unknown_ingredient_suggests_the_nearest() {
    check(
        "prices-unknown-ingredient.toml",
        9,
        1,
        &["`whole-mlik`", "`whole-milk`"],
    );
}

#[test]
fn prices_negative() {
    check(
        "prices-negative.toml",
        8,
        14,
        &["zero or more per kg", "-0.9"],
    );
}

#[test]
fn prices_of_an_own_ingredient_belong_on_it() {
    check(
        "prices-own-ingredient.toml",
        15,
        1,
        &["`quay-syrup`", "price_per_kg"],
    );
}

#[test]
fn cabinet_above_zero() {
    check(
        "cabinet-above-zero.toml",
        3,
        18,
        &["cabinet_temp_c", "between 0 and -60", "12"],
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

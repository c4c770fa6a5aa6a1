//! Every warning fires where its words say, with the thresholds of the trade
//! (PRACTICE.md, named beside each check), and cream liqueurs get the usual
//! stability cautions.

use gelu::analysis::{Analysis, Options, analyze};
use gelu::catalog::Catalog;
use gelu::model::{Amount, Line, Recipe, Style};

fn recipe(style: Style, lines: &[(&str, f64)]) -> Recipe {
    Recipe {
        name: "warnings".into(),
        style,
        lines: lines
            .iter()
            .map(|(id, g)| Line {
                ingredient: (*id).into(),
                amount: Amount::Grams(*g),
            })
            .collect(),
        ..Recipe::default()
    }
}

fn run(r: &Recipe, options: &Options) -> Analysis {
    analyze(r, Catalog::builtin(), options).expect("analyses")
}

fn codes(a: &Analysis) -> Vec<&'static str> {
    a.warnings.iter().map(|w| w.code).collect()
}

fn message<'a>(a: &'a Analysis, code: &str) -> &'a str {
    a.warnings
        .iter()
        .find(|w| w.code == code)
        .map(|w| w.message.as_str())
        .unwrap_or_else(|| panic!("no {code} in {:?}", codes(a)))
}

/// A plain ice-cream mix: about 10 % fat, 11 % MSNF, 16 % sucrose.
fn ice_cream() -> Recipe {
    recipe(
        Style::IceCream,
        &[
            ("whole-milk", 560.0),
            ("heavy-cream", 200.0),
            ("skim-milk-powder", 60.0),
            ("sucrose", 160.0),
            ("glucose-syrup-42de", 20.0),
        ],
    )
}

/// The cabinet temperature (°C) at which `share` of the mix's water is frozen.
fn cabinet_at_share(r: &Recipe, share: f64) -> f64 {
    let options = Options {
        serving_frozen_fraction: Some(share),
        ..Options::default()
    };
    run(r, &options).serving_temp_c.expect("reached")
}

const TEXTURE_CODES: [&str; 4] = [
    "soft-at-cabinet",
    "a-little-soft-at-cabinet",
    "a-little-hard-at-cabinet",
    "hard-at-cabinet",
];

#[test]
fn texture_words_and_thresholds_agree() {
    // PRACTICE.md: scoopable at about 65-70 % of the water frozen (Mullan);
    // too soft under about 60 %, too hard over about 78-80 %.
    let r = ice_cream();
    for (share, expected) in [
        (0.55, Some("soft-at-cabinet")),
        (0.62, Some("a-little-soft-at-cabinet")),
        (0.675, None),
        (0.74, Some("a-little-hard-at-cabinet")),
        (0.83, Some("hard-at-cabinet")),
    ] {
        let options = Options {
            cabinet_temp_c: cabinet_at_share(&r, share),
            ..Options::default()
        };
        let a = run(&r, &options);
        assert!(
            (a.cabinet.frozen_fraction - share).abs() < 0.005,
            "cabinet share {:.3} for {share}",
            a.cabinet.frozen_fraction
        );
        let texture: Vec<_> = codes(&a)
            .into_iter()
            .filter(|c| TEXTURE_CODES.contains(c))
            .collect();
        assert_eq!(texture, expected.into_iter().collect::<Vec<_>>(), "{share}");
        if let Some(code) = expected {
            let m = message(&a, code);
            assert!(m.contains("65-70 %"), "{m}");
            match code {
                "soft-at-cabinet" => assert!(m.contains("Too soft") && m.contains("60 %"), "{m}"),
                "hard-at-cabinet" => assert!(m.contains("Too hard") && m.contains("78 %"), "{m}"),
                _ => assert!(m.contains("A little"), "{m}"),
            }
        }
    }
}

#[test]
fn the_continuation_note_shows_once_where_a_figure_lies_beyond_the_data() {
    // The CRC sucrose data end at 42 % (4.93 K below zero); below about -5 °C
    // the curve of a sugar mix rests on the continuations.
    let r = ice_cream();
    let warm = Options {
        serving_frozen_fraction: Some(0.2),
        cabinet_temp_c: -3.0,
        freezer_temp_c: -4.0,
        ..Options::default()
    };
    let a = run(&r, &warm);
    assert!(a.serving_temp_c.is_some_and(|t| t > -5.0));
    assert!(
        !codes(&a).contains(&"serum-beyond-data"),
        "every figure is warmer than the data limit: {:?}",
        codes(&a)
    );
    // Only the freezer figure lies beyond the data: the note names it.
    let cold_freezer = Options {
        freezer_temp_c: -18.0,
        ..warm.clone()
    };
    let a = run(&r, &cold_freezer);
    let m = message(&a, "serum-beyond-data");
    assert!(m.contains("freezer"), "{m}");
    assert!(!m.contains("serving temperature"), "{m}");
    // With every figure beyond the data it is still said once, with how far the
    // classic sucrose-equivalent method agrees.
    let a = run(&r, &Options::default());
    let notes = codes(&a)
        .into_iter()
        .filter(|c| *c == "serum-beyond-data")
        .count();
    assert_eq!(notes, 1);
    let m = message(&a, "serum-beyond-data");
    assert!(m.contains("classic"), "{m}");
}

#[test]
fn dextrose_granulation_is_warned_of_in_syrups_and_liqueurs_only() {
    // PRACTICE.md: dextrose over about a quarter of the sugars tends to
    // granulate (common practice) in syrups and liqueurs kept at room
    // temperature; in a frozen dessert it is ordinary practice.
    let gelato = recipe(
        Style::Gelato,
        &[
            ("whole-milk", 620.0),
            ("heavy-cream", 120.0),
            ("skim-milk-powder", 40.0),
            ("sucrose", 120.0),
            ("dextrose-monohydrate", 90.0),
        ],
    );
    assert!(
        !codes(&run(&gelato, &Options::default())).contains(&"dextrose-granulation"),
        "a gelato with dextrose is normal practice"
    );
    let liqueur = recipe(
        Style::Liqueur,
        &[
            ("spirit-40-vol", 450.0),
            ("water", 300.0),
            ("sucrose", 150.0),
            ("dextrose-monohydrate", 100.0),
        ],
    );
    let a = run(&liqueur, &Options::default());
    let m = message(&a, "dextrose-granulation");
    assert!(
        m.contains("room temperature") && m.contains("common practice"),
        "{m}"
    );
}

#[test]
fn the_classic_method_says_where_it_does_not_apply() {
    // The sucrose-equivalent method is taught for frozen dairy-style desserts
    // (Goff & Hartel, Ice Cream, 7th ed.); with alcohol or much salt it is far off.
    let a = run(&ice_cream(), &Options::default());
    assert!(a.classic_applies, "{:?}", a.classic_note);
    let cream_liqueur = recipe(
        Style::Liqueur,
        &[
            ("heavy-cream", 350.0),
            ("sweetened-condensed-milk", 250.0),
            ("whole-milk", 180.0),
            ("neutral-spirit-96", 160.0),
            ("water", 60.0),
        ],
    );
    let a = run(&cream_liqueur, &Options::default());
    assert!(!a.classic_applies);
    let note = a.classic_note.clone().expect("says why");
    assert!(note.contains("alcohol"), "{note}");
    // The public JSON keeps the figure and adds whether it applies.
    let json = gelu::report::json::analysis_json(&a);
    assert!(json["classic_freezing_point_c"].is_number());
    assert_eq!(json["classic_applies"], serde_json::Value::Bool(false));
    // The text report does not print the figure as if it held.
    let text = gelu::report::text::report_text(&a, gelu::model::TempUnit::Celsius);
    let line = text
        .lines()
        .find(|l| l.contains("classic method"))
        .expect("a classic line");
    assert!(line.contains("not applicable"), "{line}");
    // Salt beyond a pinch: a salted-caramel base with 2 % salt.
    let salty = recipe(
        Style::IceCream,
        &[
            ("whole-milk", 560.0),
            ("heavy-cream", 200.0),
            ("skim-milk-powder", 60.0),
            ("sucrose", 160.0),
            ("salt", 20.0),
        ],
    );
    let a = run(&salty, &Options::default());
    assert!(!a.classic_applies);
    assert!(a.classic_note.unwrap_or_default().contains("salt"));
}

#[test]
fn cream_liqueurs_get_the_stability_cautions() {
    let cream_liqueur = recipe(
        Style::Liqueur,
        &[
            ("heavy-cream", 350.0),
            ("sweetened-condensed-milk", 250.0),
            ("neutral-spirit-96", 160.0),
            ("water", 60.0),
        ],
    );
    let cautions = run(&cream_liqueur, &Options::default()).cautions.join("\n");
    for words in ["curdle", "homogenise", "cool", "licensed"] {
        assert!(cautions.contains(words), "{words} in {cautions}");
    }
    let fruit_liqueur = recipe(
        Style::Liqueur,
        &[
            ("spirit-40-vol", 500.0),
            ("raspberry", 250.0),
            ("sucrose", 250.0),
        ],
    );
    let cautions = run(&fruit_liqueur, &Options::default()).cautions.join("\n");
    assert!(!cautions.contains("curdle"), "{cautions}");
    // An ice cream with a splash of cream and spirit is not a cream liqueur.
    let boozy = recipe(
        Style::IceCream,
        &[
            ("whole-milk", 560.0),
            ("heavy-cream", 200.0),
            ("sucrose", 160.0),
            ("spirit-40-vol", 40.0),
        ],
    );
    let cautions = run(&boozy, &Options::default()).cautions.join("\n");
    assert!(!cautions.contains("curdle"), "{cautions}");
}

//! The model against published values other than the CRC binary table
//! (that one is in `reference_binary.rs`). The source is named beside each check.

use std::collections::BTreeMap;

use gelu::analysis::{Options, analyze};
use gelu::catalog::Catalog;
use gelu::model::{Amount, Category, Ingredient, Line, Recipe, Solute, SoluteKind, Style};
use gelu::thermo::binary::{Binary, WATER_MOLAR_MASS_KG, WaterModel};
use gelu::thermo::ethanol::{
    abv_pct_from_mass_fraction, density_20c_kg_m3, mass_fraction_from_abv_pct,
};
use gelu::thermo::ice::{ice_activity, temp_c_for_ln_activity};

fn recipe(lines: &[(&str, f64)]) -> Recipe {
    Recipe {
        name: "reference".into(),
        style: Style::Other,
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

fn freezing_point(r: &Recipe) -> f64 {
    analyze(r, Catalog::builtin(), &Options::default())
        .expect("analyses")
        .freezing_point_c
        .expect("freezes")
}

#[test]
fn ice_activity_matches_murphy_and_koop() {
    // Murphy & Koop (2005), Q. J. R. Meteorol. Soc. 131:1539, eqs. 7 and 10, as
    // tabulated in REFERENCES.md to four decimals: tolerance 0.00006 (rounding).
    for (temp_c, expected) in [
        (-5.0, 0.9526),
        (-10.0, 0.9073),
        (-20.0, 0.8227),
        (-30.0, 0.7463),
        (-40.0, 0.6792),
    ] {
        let a = ice_activity(temp_c);
        assert!(
            (a - expected).abs() < 6e-5,
            "a_ice({temp_c}) = {a:.5}, published {expected}"
        );
    }
    // Referred to the normal melting point, pure water freezes at exactly 0 °C.
    assert_eq!(gelu::thermo::ice::ln_ice_activity(0.0), 0.0);
    assert!((temp_c_for_ln_activity(-1e-3) + 0.103).abs() < 0.001);
}

#[test]
fn ethanol_strength_matches_oiml_r22_check_values() {
    // OIML R 22 (1975), International Alcoholometric Tables, at 20 °C.
    // % vol -> % by mass to the published two or three decimals (tolerance 0.006).
    for (abv, mass_pct) in [(40.0, 33.30), (20.0, 16.21), (10.0, 8.015), (60.0, 52.09)] {
        let got = 100.0 * mass_fraction_from_abv_pct(abv);
        assert!(
            (got - mass_pct).abs() < 0.006,
            "{abv} % vol -> {got:.3} % by mass, OIML {mass_pct}"
        );
        assert!((abv_pct_from_mass_fraction(mass_pct / 100.0) - abv).abs() < 0.01);
    }
    // Density of 40 % vol: 948.05 kg/m³ (tolerance 0.05 kg/m³); water 998.20 at p = 0.
    assert!((density_20c_kg_m3(0.3330) - 948.05).abs() < 0.05);
    assert!((density_20c_kg_m3(0.0) - 998.20).abs() < 0.01);
}

#[test]
fn spirits_freeze_where_the_tables_put_them() {
    // REFERENCES.md §4: from the CRC ethanol freezing table through OIML R 22,
    // 20 % vol freezes about -8.2 °C and 40 % vol about -23.6 °C.
    // Tolerances are the CRC bands: 0.1 K below 10 K, 0.25 K beyond.
    for (abv, expected_c, tol) in [(20.0, -8.2, 0.1), (40.0, -23.6, 0.25)] {
        let p = 100.0 * mass_fraction_from_abv_pct(abv);
        let fp = freezing_point(&recipe(&[("ethanol", p), ("water", 100.0 - p)]));
        assert!(
            (fp - expected_c).abs() < tol,
            "{abv} % vol freezes at {fp:.2} °C, expected about {expected_c}"
        );
    }
    // The built-in 40 % vol spirit is the same solution.
    let fp = freezing_point(&recipe(&[("spirit-40", 100.0)]));
    assert!((fp + 23.6).abs() < 0.25, "spirit-40 freezes at {fp:.2} °C");
}

#[test]
fn whole_milk_freezes_near_the_dairy_references() {
    // Leighton (1927), J. Dairy Sci. 10:300: average milk freezes at -0.55 °C;
    // modern averages for cow's milk -0.52 to -0.53 °C (memory, so a soft check).
    // Tolerances: within 0.03 K of Leighton; within 0.015 K of the modern band.
    // (gelu gives about -0.54 °C for USDA whole milk: lactose, checked against
    // CRC, gives 0.30 K, the minerals calibrated to the classic salts term 0.23 K.)
    let fp = freezing_point(&recipe(&[("whole-milk", 1000.0)]));
    assert!((fp + 0.55).abs() < 0.03, "whole milk freezes at {fp:.3} °C");
    assert!(
        (-0.545..=-0.505).contains(&fp),
        "whole milk {fp:.3} °C, modern -0.52 to -0.53"
    );
}

#[test]
fn lactose_share_of_milk_depression_matches_leighton() {
    // Leighton (1927): in milk of 4.9 % lactose and 87.11 % water, lactose accounts
    // for 0.306 K of the depression. Tolerance 0.01 K.
    let fp = freezing_point(&recipe(&[("lactose", 4.9), ("water", 87.11)]));
    assert!((fp + 0.306).abs() < 0.01, "lactose alone: {fp:.3} °C");
}

/// The standard mix of Goff & Hartel, Ice Cream, 7th ed. (2013): 12 % fat, 11 %
/// MSNF, 15 % sucrose, 0.3 % stabiliser, 61.7 % water; MSNF split by Goff's dry
/// basis (38 % protein, 54 % lactose, 8 % ash).
fn standard_mix() -> Recipe {
    let mix = Ingredient {
        id: "standard-mix".into(),
        name: "Standard mix".into(),
        category: Category::Dairy,
        water_pct: 61.7,
        fat_pct: 12.0,
        protein_pct: 11.0 * 0.38,
        other_solids_pct: 0.3,
        solutes_pct: BTreeMap::from([
            ("lactose".to_string(), 11.0 * 0.54),
            ("milk-minerals".to_string(), 11.0 * 0.08),
            ("sucrose".to_string(), 15.0),
        ]),
        density_g_ml: 1.1,
        allergens: vec!["milk".into()],
        source: "Goff & Hartel".into(),
    };
    Recipe {
        ingredients: vec![mix],
        ..recipe(&[("standard-mix", 100.0)])
    }
}

#[test]
fn standard_mix_freezes_where_the_classic_method_puts_it() {
    // Goff & Hartel, Ice Cream, 7th ed.: the classic sucrose-equivalent method
    // puts the standard mix at about -2.5 °C. Tolerance 0.15 K.
    let a = analyze(&standard_mix(), Catalog::builtin(), &Options::default()).unwrap();
    assert!((a.composition.msnf_pct - 11.0).abs() < 1e-9);
    let fp = a.freezing_point_c.unwrap();
    assert!(
        (fp + 2.5).abs() < 0.15,
        "standard mix freezes at {fp:.3} °C"
    );
}

#[test]
fn milk_minerals_reproduce_the_classic_salts_term() {
    // Goff & Hartel: the dairy salts lower the freezing point by 2.37 °C x MSNF / water.
    // For MSNF with 7.8 % ash (USDA SR Legacy 01077 whole milk), at the standard
    // mix's 11 % MSNF and 61.7 % water: 0.4225 K. Tolerance 3 % (0.013 K).
    let ash_g = 11.0 * 0.67 / (3.15 + 4.80 + 0.67);
    let fp = freezing_point(&recipe(&[("milk-minerals", ash_g), ("water", 61.7)]));
    let classic = 2.37 * 11.0 / 61.7;
    assert!(
        (-fp - classic).abs() < 0.03 * classic,
        "salts {:.4} K vs classic {classic:.4} K",
        -fp
    );
}

#[test]
fn norrish_sucrose_and_dilute_law_match_the_worked_numbers() {
    // REFERENCES.md §3 (worked from Norrish 1966 with K = 6.47 and Murphy & Koop):
    // 40 % sucrose freezes at -4.31 °C by the Norrish form alone. Tolerance 0.02 K.
    let norrish = Binary {
        dissociation: 1.0,
        model: WaterModel::Ideal { norrish_k: 6.47 },
    };
    let m = 1000.0 * 40.0 / (60.0 * 342.30);
    let t = temp_c_for_ln_activity(norrish.ln_aw(m));
    assert!((t + 4.31).abs() < 0.02, "Norrish 40 % sucrose: {t:.3} °C");
    // The dilute law gives 3.62 K at 40 % sucrose (Kf = 1.86 K kg/mol).
    let a = analyze(
        &recipe(&[("sucrose", 40.0), ("water", 60.0)]),
        Catalog::builtin(),
        &Options::default(),
    )
    .unwrap();
    let dilute = a.dilute_law_freezing_point_c.unwrap();
    assert!((dilute + 3.62).abs() < 0.01, "dilute law {dilute:.3} °C");
}

#[test]
fn pitzer_form_with_mollers_parameters_agrees_with_crc_in_dilute_salt() {
    // Møller (1988), Geochim. Cosmochim. Acta 52:821, NaCl at 0 °C: β0 0.04926,
    // β1 0.24625, Cφ 0.005149, Aφ 0.3767. Against CRC 102nd ed. NaCl freezing
    // points up to 5 % by mass; tolerance 0.05 K. (gelu fits its own set to the
    // whole CRC range; this checks the Pitzer implementation independently.)
    let b = Binary {
        dissociation: 2.0,
        model: WaterModel::Pitzer {
            beta0: 0.04926,
            beta1: 0.24625,
            c_phi: 0.005149,
            a_phi: 0.3767,
            max_molality: 6.0,
        },
    };
    for (w, dt) in [
        (0.5, 0.30),
        (1.0, 0.59),
        (2.0, 1.19),
        (3.0, 1.79),
        (4.0, 2.41),
        (5.0, 3.05),
    ] {
        let m = 1000.0 * w / ((100.0 - w) * 58.44);
        let t = -temp_c_for_ln_activity(b.ln_aw(m));
        assert!((t - dt).abs() < 0.05, "NaCl {w} %: {t:.3} K vs CRC {dt}");
    }
}

#[test]
fn a_users_solute_given_only_m_and_i_follows_the_ideal_law() {
    // The ideal mole-fraction law with the van 't Hoff factor: ln a_w = ln x_w,
    // x_w = n_w / (n_w + i n). Checked at 0.1 and 1 mol/kg for i = 1, 2, 3.
    for i in [1.0, 2.0, 3.0] {
        for molality in [0.1, 1.0] {
            let solute = Solute {
                id: "house-solute".into(),
                name: "House solute".into(),
                kind: SoluteKind::Other,
                molar_mass_g_mol: 150.0,
                dissociation: i,
                model: WaterModel::Ideal { norrish_k: 0.0 },
                sweetness: None,
                solubility_g_per_100g_water_0c: None,
                source: "test".into(),
            };
            let r = Recipe {
                solutes: vec![solute],
                ..recipe(&[("house-solute", molality * 150.0), ("water", 1000.0)])
            };
            let a = analyze(&r, Catalog::builtin(), &Options::default()).unwrap();
            let n_w = 1.0 / WATER_MOLAR_MASS_KG;
            let ideal = temp_c_for_ln_activity((n_w / (n_w + i * molality)).ln());
            let fp = a.freezing_point_c.unwrap();
            assert!(
                (fp - ideal).abs() < 1e-3,
                "i={i}, m={molality}: {fp:.4} vs ideal {ideal:.4}"
            );
            // And the dilute law beside it is exactly -Kf i m.
            assert!((a.dilute_law_freezing_point_c.unwrap() + 1.86 * i * molality).abs() < 1e-9);
            if molality == 0.1 {
                assert!((fp + 1.86 * i * molality).abs() < 0.01 * i, "dilute limit");
            }
        }
    }
}

//! Every built-in binary solution against the published freezing points.
//!
//! Source: CRC Handbook of Chemistry and Physics, 102nd ed. (2021),
//! "Concentrative Properties of Aqueous Solutions": (solute id, mass % of solute
//! in the solution, freezing-point depression in K). The values are copied here
//! so the tests stand alone. Tolerances (from the project's acceptance rules):
//! 0.05 K where ΔT < 3 K, 0.1 K below 10 K, 0.25 K beyond.

use gelu::analysis::{Options, analyze};
use gelu::catalog::Catalog;
use gelu::model::{Amount, Line, Recipe, Style};
use gelu::thermo::binary::Binary;
use gelu::thermo::fit::tabulate_freezing_points;
use gelu::thermo::ice::temp_c_for_ln_activity;

const CRC_FREEZING: &[(&str, f64, f64)] = &[
    ("sucrose", 0.5, 0.03),
    ("sucrose", 1.0, 0.06),
    ("sucrose", 2.0, 0.11),
    ("sucrose", 3.0, 0.17),
    ("sucrose", 4.0, 0.23),
    ("sucrose", 5.0, 0.29),
    ("sucrose", 6.0, 0.35),
    ("sucrose", 7.0, 0.42),
    ("sucrose", 8.0, 0.49),
    ("sucrose", 9.0, 0.55),
    ("sucrose", 10.0, 0.63),
    ("sucrose", 11.0, 0.7),
    ("sucrose", 12.0, 0.77),
    ("sucrose", 13.0, 0.85),
    ("sucrose", 14.0, 0.93),
    ("sucrose", 15.0, 1.01),
    ("sucrose", 16.0, 1.1),
    ("sucrose", 17.0, 1.19),
    ("sucrose", 18.0, 1.27),
    ("sucrose", 19.0, 1.37),
    ("sucrose", 20.0, 1.47),
    ("sucrose", 22.0, 1.67),
    ("sucrose", 24.0, 1.89),
    ("sucrose", 26.0, 2.12),
    ("sucrose", 28.0, 2.37),
    ("sucrose", 30.0, 2.64),
    ("sucrose", 32.0, 2.94),
    ("sucrose", 34.0, 3.27),
    ("sucrose", 36.0, 3.63),
    ("sucrose", 38.0, 4.02),
    ("sucrose", 40.0, 4.45),
    ("sucrose", 42.0, 4.93),
    ("glucose", 0.5, 0.05),
    ("glucose", 1.0, 0.11),
    ("glucose", 2.0, 0.21),
    ("glucose", 3.0, 0.32),
    ("glucose", 4.0, 0.43),
    ("glucose", 5.0, 0.55),
    ("glucose", 6.0, 0.67),
    ("glucose", 7.0, 0.79),
    ("glucose", 8.0, 0.91),
    ("glucose", 9.0, 1.04),
    ("glucose", 10.0, 1.17),
    ("glucose", 11.0, 1.3),
    ("glucose", 12.0, 1.44),
    ("glucose", 13.0, 1.59),
    ("glucose", 14.0, 1.73),
    ("glucose", 15.0, 1.88),
    ("glucose", 16.0, 2.03),
    ("glucose", 17.0, 2.19),
    ("glucose", 18.0, 2.35),
    ("glucose", 19.0, 2.52),
    ("glucose", 20.0, 2.7),
    ("glucose", 22.0, 3.07),
    ("glucose", 24.0, 3.48),
    ("glucose", 26.0, 3.9),
    ("glucose", 28.0, 4.34),
    ("glucose", 30.0, 4.79),
    ("fructose", 0.5, 0.05),
    ("fructose", 1.0, 0.1),
    ("fructose", 2.0, 0.21),
    ("fructose", 3.0, 0.32),
    ("fructose", 4.0, 0.43),
    ("fructose", 5.0, 0.54),
    ("fructose", 6.0, 0.66),
    ("fructose", 7.0, 0.78),
    ("fructose", 8.0, 0.9),
    ("fructose", 9.0, 1.03),
    ("fructose", 10.0, 1.16),
    ("fructose", 11.0, 1.29),
    ("fructose", 12.0, 1.43),
    ("fructose", 13.0, 1.57),
    ("fructose", 14.0, 1.71),
    ("fructose", 15.0, 1.86),
    ("fructose", 16.0, 2.01),
    ("fructose", 17.0, 2.16),
    ("fructose", 18.0, 2.32),
    ("fructose", 19.0, 2.48),
    ("fructose", 20.0, 2.64),
    ("fructose", 22.0, 3.05),
    ("fructose", 24.0, 3.43),
    ("fructose", 26.0, 3.82),
    ("fructose", 28.0, 4.2),
    ("lactose", 0.5, 0.03),
    ("lactose", 1.0, 0.06),
    ("lactose", 1.5, 0.08),
    ("lactose", 2.0, 0.11),
    ("lactose", 2.5, 0.14),
    ("lactose", 3.0, 0.17),
    ("lactose", 3.5, 0.2),
    ("lactose", 4.0, 0.23),
    ("lactose", 4.5, 0.26),
    ("lactose", 5.0, 0.29),
    ("lactose", 5.5, 0.32),
    ("lactose", 6.0, 0.35),
    ("lactose", 6.5, 0.39),
    ("lactose", 7.0, 0.42),
    ("lactose", 7.5, 0.46),
    ("lactose", 8.0, 0.5),
    ("maltose", 0.5, 0.03),
    ("maltose", 1.0, 0.06),
    ("maltose", 2.0, 0.11),
    ("maltose", 3.0, 0.17),
    ("maltose", 4.0, 0.23),
    ("maltose", 5.0, 0.29),
    ("maltose", 6.0, 0.35),
    ("maltose", 7.0, 0.42),
    ("maltose", 8.0, 0.48),
    ("maltose", 9.0, 0.55),
    ("maltose", 10.0, 0.62),
    ("maltose", 11.0, 0.69),
    ("maltose", 12.0, 0.77),
    ("maltose", 13.0, 0.84),
    ("maltose", 14.0, 0.92),
    ("maltose", 15.0, 1.0),
    ("maltose", 16.0, 1.08),
    ("maltose", 17.0, 1.17),
    ("maltose", 18.0, 1.25),
    ("maltose", 19.0, 1.34),
    ("maltose", 20.0, 1.43),
    ("maltose", 22.0, 1.64),
    ("maltose", 24.0, 1.85),
    ("maltose", 26.0, 2.08),
    ("maltose", 28.0, 2.34),
    ("maltose", 30.0, 2.62),
    ("maltose", 32.0, 2.93),
    ("maltose", 34.0, 3.25),
    ("maltose", 36.0, 3.6),
    ("maltose", 38.0, 3.99),
    ("maltose", 40.0, 4.41),
    ("maltose", 42.0, 4.88),
    ("maltose", 44.0, 5.35),
    ("glycerol", 0.5, 0.07),
    ("glycerol", 1.0, 0.18),
    ("glycerol", 2.0, 0.41),
    ("glycerol", 3.0, 0.63),
    ("glycerol", 4.0, 0.85),
    ("glycerol", 5.0, 1.08),
    ("glycerol", 6.0, 1.32),
    ("glycerol", 7.0, 1.56),
    ("glycerol", 8.0, 1.81),
    ("glycerol", 9.0, 2.06),
    ("glycerol", 10.0, 2.32),
    ("glycerol", 12.0, 2.88),
    ("glycerol", 14.0, 3.47),
    ("glycerol", 16.0, 4.09),
    ("glycerol", 18.0, 4.76),
    ("glycerol", 20.0, 5.46),
    ("glycerol", 24.0, 7.01),
    ("glycerol", 28.0, 8.77),
    ("glycerol", 32.0, 10.74),
    ("glycerol", 36.0, 12.96),
    ("glycerol", 40.0, 15.5),
    ("ethanol", 0.5, 0.2),
    ("ethanol", 1.0, 0.4),
    ("ethanol", 2.0, 0.81),
    ("ethanol", 3.0, 1.23),
    ("ethanol", 4.0, 1.65),
    ("ethanol", 5.0, 2.09),
    ("ethanol", 6.0, 2.54),
    ("ethanol", 7.0, 2.99),
    ("ethanol", 8.0, 3.47),
    ("ethanol", 9.0, 3.96),
    ("ethanol", 10.0, 4.47),
    ("ethanol", 11.0, 5.0),
    ("ethanol", 12.0, 5.56),
    ("ethanol", 13.0, 6.13),
    ("ethanol", 14.0, 6.73),
    ("ethanol", 15.0, 7.36),
    ("ethanol", 16.0, 8.01),
    ("ethanol", 17.0, 8.69),
    ("ethanol", 18.0, 9.4),
    ("ethanol", 19.0, 10.14),
    ("ethanol", 20.0, 10.92),
    ("ethanol", 22.0, 12.6),
    ("ethanol", 24.0, 14.47),
    ("ethanol", 26.0, 16.41),
    ("ethanol", 28.0, 18.43),
    ("ethanol", 30.0, 20.47),
    ("ethanol", 32.0, 22.44),
    ("ethanol", 34.0, 24.27),
    ("ethanol", 36.0, 25.98),
    ("ethanol", 38.0, 27.62),
    ("ethanol", 40.0, 29.26),
    ("ethanol", 42.0, 30.98),
    ("ethanol", 44.0, 32.68),
    ("ethanol", 46.0, 34.36),
    ("ethanol", 48.0, 36.04),
    ("ethanol", 50.0, 37.67),
    ("ethanol", 52.0, 39.2),
    ("ethanol", 54.0, 40.65),
    ("ethanol", 56.0, 42.06),
    ("ethanol", 58.0, 43.49),
    ("ethanol", 60.0, 44.93),
    ("ethanol", 62.0, 46.28),
    ("ethanol", 64.0, 47.52),
    ("ethanol", 66.0, 48.64),
    ("ethanol", 68.0, 49.52),
    ("sodium-chloride", 0.1, 0.06),
    ("sodium-chloride", 0.2, 0.12),
    ("sodium-chloride", 0.3, 0.18),
    ("sodium-chloride", 0.4, 0.24),
    ("sodium-chloride", 0.5, 0.3),
    ("sodium-chloride", 1.0, 0.59),
    ("sodium-chloride", 1.5, 0.89),
    ("sodium-chloride", 2.0, 1.19),
    ("sodium-chloride", 2.5, 1.49),
    ("sodium-chloride", 3.0, 1.79),
    ("sodium-chloride", 3.5, 2.1),
    ("sodium-chloride", 4.0, 2.41),
    ("sodium-chloride", 4.5, 2.73),
    ("sodium-chloride", 5.0, 3.05),
    ("sodium-chloride", 6.0, 3.7),
    ("sodium-chloride", 7.0, 4.38),
    ("sodium-chloride", 8.0, 5.08),
    ("sodium-chloride", 9.0, 5.81),
    ("sodium-chloride", 10.0, 6.56),
    ("sodium-chloride", 11.0, 7.35),
    ("sodium-chloride", 12.0, 8.18),
    ("sodium-chloride", 13.0, 9.04),
    ("sodium-chloride", 14.0, 9.94),
    ("sodium-chloride", 15.0, 10.89),
    ("sodium-chloride", 16.0, 11.89),
    ("sodium-chloride", 17.0, 12.94),
    ("sodium-chloride", 18.0, 14.04),
    ("sodium-chloride", 19.0, 15.22),
    ("sodium-chloride", 20.0, 16.46),
    ("sodium-chloride", 21.0, 17.78),
    ("sodium-chloride", 22.0, 19.18),
    ("sodium-chloride", 23.0, 20.67),
    // Added with the fitted acid and potassium chloride models; same source as above.
    ("citric-acid", 0.5, 0.05),
    ("citric-acid", 1.0, 0.11),
    ("citric-acid", 2.0, 0.21),
    ("citric-acid", 3.0, 0.32),
    ("citric-acid", 4.0, 0.43),
    ("citric-acid", 5.0, 0.54),
    ("citric-acid", 6.0, 0.65),
    ("citric-acid", 7.0, 0.76),
    ("citric-acid", 8.0, 0.88),
    ("citric-acid", 9.0, 1.0),
    ("citric-acid", 10.0, 1.12),
    ("citric-acid", 12.0, 1.38),
    ("citric-acid", 14.0, 1.66),
    ("citric-acid", 16.0, 1.95),
    ("citric-acid", 18.0, 2.26),
    ("citric-acid", 20.0, 2.57),
    ("citric-acid", 22.0, 2.88),
    ("citric-acid", 24.0, 3.21),
    ("citric-acid", 26.0, 3.55),
    ("citric-acid", 28.0, 3.89),
    ("citric-acid", 30.0, 4.25),
    // D-lactic acid in the CRC table; the enantiomers and the racemate freeze alike.
    ("lactic-acid", 0.5, 0.1),
    ("lactic-acid", 1.0, 0.19),
    ("lactic-acid", 2.0, 0.38),
    ("lactic-acid", 3.0, 0.57),
    ("lactic-acid", 4.0, 0.76),
    ("lactic-acid", 5.0, 0.95),
    ("lactic-acid", 6.0, 1.16),
    ("lactic-acid", 7.0, 1.36),
    ("lactic-acid", 8.0, 1.57),
    ("lactic-acid", 9.0, 1.79),
    ("lactic-acid", 10.0, 2.02),
    ("lactic-acid", 12.0, 2.49),
    ("lactic-acid", 14.0, 2.99),
    ("lactic-acid", 16.0, 3.48),
    ("lactic-acid", 18.0, 3.96),
    ("lactic-acid", 20.0, 4.44),
    ("potassium-chloride", 0.5, 0.23),
    ("potassium-chloride", 1.0, 0.46),
    ("potassium-chloride", 2.0, 0.92),
    ("potassium-chloride", 3.0, 1.38),
    ("potassium-chloride", 4.0, 1.85),
    ("potassium-chloride", 5.0, 2.32),
    ("potassium-chloride", 6.0, 2.8),
    ("potassium-chloride", 7.0, 3.29),
    ("potassium-chloride", 8.0, 3.8),
    ("potassium-chloride", 9.0, 4.3),
    ("potassium-chloride", 10.0, 4.81),
    ("potassium-chloride", 11.0, 5.33),
    ("potassium-chloride", 12.0, 5.88),
    ("potassium-chloride", 13.0, 6.45),
];

fn tolerance_k(delta_t: f64) -> f64 {
    if delta_t < 3.0 {
        0.05
    } else if delta_t < 10.0 {
        0.1
    } else {
        0.25
    }
}

/// A binary recipe: `mass_pct` g of the pure solute per 100 g solution.
fn binary_recipe(solute: &str, mass_pct: f64) -> Recipe {
    Recipe {
        name: format!("{solute} {mass_pct} %"),
        style: Style::Other,
        lines: vec![
            Line {
                ingredient: solute.into(),
                amount: Amount::Grams(mass_pct),
            },
            Line {
                ingredient: "water".into(),
                amount: Amount::Grams(100.0 - mass_pct),
            },
        ],
        ..Recipe::default()
    }
}

#[test]
fn every_builtin_binary_solution_matches_crc_freezing_points() {
    let catalog = Catalog::builtin();
    let mut failures = Vec::new();
    for (solute, mass_pct, delta_t) in CRC_FREEZING {
        let a = analyze(
            &binary_recipe(solute, *mass_pct),
            catalog,
            &Options::default(),
        )
        .expect("analyses");
        let fp = a.freezing_point_c.expect("has a freezing point");
        let err = -fp - delta_t;
        if err.abs() > tolerance_k(*delta_t) {
            failures.push(format!(
                "{solute} {mass_pct} %: model {:.3} K, CRC {delta_t} K",
                -fp
            ));
        }
    }
    assert_eq!(CRC_FREEZING.len(), 281, "the whole CRC table is checked");
    assert!(
        failures.is_empty(),
        "outside tolerance:\n{}",
        failures.join("\n")
    );
}

#[test]
fn ethanol_interpolation_predicts_each_held_out_point() {
    // Leave-one-out check of the tabulated ethanol model: rebuild it without each
    // interior CRC point in turn and predict that point. This tests the form of
    // the model, not just that it passes through its own data.
    let rows: Vec<(f64, f64)> = CRC_FREEZING
        .iter()
        .filter(|r| r.0 == "ethanol")
        .map(|(_, w, dt)| (1000.0 * w / ((100.0 - w) * 46.07), *dt))
        .collect();
    for skip in 1..rows.len() - 1 {
        let kept: Vec<(f64, f64)> = rows
            .iter()
            .enumerate()
            .filter(|(k, _)| *k != skip)
            .map(|(_, r)| *r)
            .collect();
        let b = Binary {
            dissociation: 1.0,
            model: tabulate_freezing_points(&kept),
        };
        let (m, dt) = rows[skip];
        let predicted = -temp_c_for_ln_activity(b.ln_aw(m));
        assert!(
            (predicted - dt).abs() <= tolerance_k(dt),
            "held-out ethanol point {m:.3} mol/kg: predicted {predicted:.3} K, CRC {dt} K"
        );
    }
}

#[test]
fn sodium_chloride_eutectic_is_reached_near_the_handbook_point() {
    // Lange's Handbook of Chemistry, 15th ed., Table 5.13: NaCl-ice eutectic at
    // 23.3 % by mass and -21.1 °C. Tolerance 0.25 K (the band for ΔT beyond 10 K).
    let a = analyze(
        &binary_recipe("sodium-chloride", 23.3),
        Catalog::builtin(),
        &Options::default(),
    )
    .unwrap();
    let fp = a.freezing_point_c.unwrap();
    assert!(
        (fp + 21.1).abs() < 0.25,
        "23.3 % NaCl freezes at {fp:.2} °C"
    );
}

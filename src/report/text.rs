//! The plain-text report, for people: key figures first, then composition,
//! warnings, the frozen-share chart, and the cautions.

use std::fmt::Write as _;

use crate::analysis::{Analysis, Severity};

use super::chart::frozen_share_chart;
use super::inert::inert;
use crate::model::TempUnit;
use crate::model::units::format_volume;

fn temp_or(unit: TempUnit, t: Option<f64>, otherwise: &str) -> String {
    t.map_or_else(|| otherwise.to_string(), |t| unit.format(t))
}

/// The whole report for one recipe.
pub fn report_text(a: &Analysis, unit: TempUnit) -> String {
    let mut o = String::new();
    let c = &a.composition;
    let _ = writeln!(
        o,
        "{} ({}), {:.0} g, about {:.0} mL",
        inert(&a.name),
        a.style.as_str(),
        a.mass_g,
        a.volume_ml
    );
    let _ = writeln!(o, "{}", "=".repeat(a.name.chars().count().clamp(10, 72)));
    let _ = writeln!(
        o,
        "Freezing point        {}",
        temp_or(unit, a.freezing_point_c, "none (no water, or below -60 °C)")
    );
    if a.classic_applies {
        let _ = writeln!(
            o,
            "  classic method      {}",
            temp_or(unit, a.classic_freezing_point_c, "-")
        );
    } else {
        let why = a
            .classic_note
            .as_deref()
            .and_then(|n| n.split_once(": ").map(|(_, why)| why))
            .unwrap_or("outside its range");
        let _ = writeln!(o, "  classic method      not applicable ({why})");
    }
    let _ = writeln!(
        o,
        "  dilute-law estimate {}",
        temp_or(unit, a.dilute_law_freezing_point_c, "-")
    );
    if a.style.is_drink() {
        // For a drink the serving share and the cabinet mean nothing: what the
        // freezer does to it is what a distiller asks.
        let _ = writeln!(
            o,
            "Freezer {:<14}{} ({:.1} % of the water as ice)",
            unit.format(a.freezer.temp_c),
            a.freezer_behaviour.words(),
            100.0 * a.freezer.frozen_fraction
        );
    } else {
        let _ = writeln!(
            o,
            "Serving temperature   {}  ({:.0} % of the water frozen)",
            temp_or(unit, a.serving_temp_c, "not reached above -60 °C"),
            100.0 * a.serving_frozen_fraction
        );
        for (label, p) in [("Cabinet", &a.cabinet), ("Freezer", &a.freezer)] {
            let _ = writeln!(
                o,
                "{label} {:<14}{:.0} % of the water frozen",
                unit.format(p.temp_c),
                100.0 * p.frozen_fraction
            );
        }
    }
    for p in &a.at {
        let _ = writeln!(
            o,
            "At {:<19}{:.0} % of the water frozen",
            unit.format(p.temp_c),
            100.0 * p.frozen_fraction
        );
    }
    let _ = writeln!(
        o,
        "Sweetness             {:.1} (g sucrose per 100 g that would taste as sweet)",
        a.sweetness
    );
    if a.composition.ethanol_pct > 0.0 {
        let _ = writeln!(
            o,
            "Alcohol               {:.1} % vol at 20 °C ({:.2} % by mass), US proof {:.1}",
            a.abv_pct,
            c.ethanol_pct,
            2.0 * a.abv_pct
        );
    }
    if a.style.is_drink() {
        let _ = writeln!(o, "Sugars                {:.0} g/L", a.sugar_g_per_l);
        let _ = writeln!(
            o,
            "Volume at 20 °C       {}  (mass {:.0} g)",
            format_volume(a.volume_ml),
            a.mass_g
        );
    }
    let _ = writeln!(o, "\nComposition (mass %)");
    let rows = [
        ("water", c.water_pct),
        ("fat", c.fat_pct),
        ("MSNF", c.msnf_pct),
        ("protein", c.protein_pct),
        ("lactose", c.lactose_pct),
        ("sugars", c.sugars_pct),
        ("sweeteners, lactose aside", a.sweeteners_pct),
        ("ethanol", c.ethanol_pct),
        ("other solids", c.other_solids_pct),
        ("total solids", c.total_solids_pct),
    ];
    for (label, v) in rows {
        let _ = writeln!(o, "  {label:<28}{v:>6.2}");
    }
    let _ = writeln!(o, "  dissolved:");
    for (id, v) in &a.solutes_pct {
        let _ = writeln!(o, "    {id:<26}{v:>6.2}");
    }
    if !a.warnings.is_empty() {
        let _ = writeln!(o, "\nWarnings");
        for w in &a.warnings {
            let mark = match w.severity {
                Severity::Problem => "!!",
                Severity::Advice => "! ",
                Severity::Note => "i ",
            };
            let _ = writeln!(o, "  {mark} [{}] {}", w.code, inert(&w.message));
        }
    }
    let _ = writeln!(o, "\nShare of the water frozen");
    for line in frozen_share_chart(a, unit) {
        let _ = writeln!(o, "  {line}");
    }
    let _ = writeln!(
        o,
        "  Fat, protein, fibre, cocoa solids and stabilisers hold no water in this model."
    );
    if !a.allergens.is_empty() {
        let _ = writeln!(o, "\nAllergens: {}", inert(&a.allergens.join(", ")));
    }
    let _ = writeln!(o, "\nCautions");
    for caution in &a.cautions {
        let _ = writeln!(o, "  - {}", inert(caution));
    }
    o
}

/// The predictions that corrections in force apply to, as `gelu report` prints
/// them under the analysis: each calibrated value beside the plain one, with
/// its basis. Empty when there are none.
pub fn calibrated_text(figures: &[crate::measure::CalibratedFigure], unit: TempUnit) -> String {
    let mut o = String::new();
    if figures.is_empty() {
        return o;
    }
    let _ = writeln!(
        o,
        "Calibrated from the batch log (corrections in force; the plain predictions above stay as they are):"
    );
    for f in figures {
        let kind_unit = crate::batch::MeasurementKind::parse(&f.kind).map_or("", |k| k.unit());
        let shown = |v: f64| {
            if kind_unit == "°C" {
                format!("{:.2} {}", unit.from_c(v), unit.symbol())
            } else {
                format!("{v:.2} {kind_unit}")
            }
        };
        let _ = writeln!(
            o,
            "  {:<18} {} (plain {}; calibrated: {})",
            f.kind,
            shown(f.value),
            shown(f.predicted),
            inert(&f.basis)
        );
    }
    o
}

//! The public JSON of an analysis. These keys are a contract: add freely,
//! never rename or drop one. Temperatures are always °C; `frozen_fraction` is
//! the share of the mix's water that is ice (0..1).
//!
//! The document is a borrowed, serialisable view of the [`Analysis`], written
//! straight to the output: no intermediate tree, so thousands of recipes
//! stream out quickly.

use std::collections::BTreeMap;
use std::io::Write;

use serde::Serialize;
use serde_json::value::RawValue;

use crate::analysis::{Analysis, CurvePoint, Severity};

fn round(x: f64, places: i32) -> f64 {
    let p = 10f64.powi(places);
    (x * p).round() / p
}

#[derive(Serialize)]
struct Point {
    temp_c: f64,
    frozen_fraction: f64,
}

impl From<&CurvePoint> for Point {
    fn from(p: &CurvePoint) -> Self {
        Point {
            temp_c: round(p.temp_c, 3),
            frozen_fraction: round(p.frozen_fraction, 5),
        }
    }
}

#[derive(Serialize)]
struct CompositionDoc {
    water: f64,
    fat: f64,
    protein: f64,
    msnf: f64,
    lactose: f64,
    sugars: f64,
    total_solids: f64,
    ethanol: f64,
    other_solids: f64,
    sweeteners: f64,
}

#[derive(Serialize)]
struct WarningDoc<'a> {
    code: &'a str,
    severity: Severity,
    message: &'a str,
}

#[derive(Serialize)]
struct AnalysisDoc<'a> {
    name: &'a str,
    style: &'a str,
    mass_g: f64,
    volume_ml: f64,
    composition_pct: CompositionDoc,
    solutes_pct: BTreeMap<&'a str, f64>,
    abv_pct: f64,
    sugar_g_per_l: f64,
    sweetness: f64,
    freezing_point_c: Option<f64>,
    dilute_law_freezing_point_c: Option<f64>,
    classic_freezing_point_c: Option<f64>,
    data_limit_c: Option<f64>,
    serving_temp_c: Option<f64>,
    serving_target: f64,
    cabinet: Point,
    freezer: Point,
    freeze_concentration_limit_c: Option<f64>,
    ice_curve: Box<RawValue>,
    at: Vec<Point>,
    allergens: &'a [String],
    warnings: Vec<WarningDoc<'a>>,
    cautions: &'a [String],
}

fn doc(a: &Analysis) -> AnalysisDoc<'_> {
    let c = &a.composition;
    let opt = |v: Option<f64>| v.map(|t| round(t, 3));
    let pct = |v: f64| round(v, 4);
    AnalysisDoc {
        name: &a.name,
        style: a.style.as_str(),
        mass_g: round(a.mass_g, 3),
        volume_ml: round(a.volume_ml, 2),
        composition_pct: CompositionDoc {
            water: pct(c.water),
            fat: pct(c.fat),
            protein: pct(c.protein),
            msnf: pct(c.msnf),
            lactose: pct(c.lactose),
            sugars: pct(c.sugars),
            total_solids: pct(c.total_solids),
            ethanol: pct(c.ethanol),
            other_solids: pct(c.other_solids),
            sweeteners: pct(a.sweeteners_pct),
        },
        solutes_pct: a
            .solutes_pct
            .iter()
            .map(|(k, v)| (k.as_str(), round(*v, 5)))
            .collect(),
        abv_pct: round(a.abv_pct, 3),
        sugar_g_per_l: round(a.sugar_g_per_l, 2),
        sweetness: round(a.sweetness, 3),
        freezing_point_c: opt(a.freezing_point_c),
        dilute_law_freezing_point_c: opt(a.dilute_law_freezing_point_c),
        classic_freezing_point_c: opt(a.classic_freezing_point_c),
        data_limit_c: opt(a.data_limit_temp_c),
        serving_temp_c: opt(a.serving_temp_c),
        serving_target: a.serving_target,
        cabinet: (&a.cabinet).into(),
        freezer: (&a.freezer).into(),
        freeze_concentration_limit_c: opt(a.glass_limit_temp_c),
        ice_curve: curve_json(&a.ice_curve),
        at: a.at.iter().map(Point::from).collect(),
        allergens: &a.allergens,
        warnings: a
            .warnings
            .iter()
            .map(|w| WarningDoc {
                code: w.code,
                severity: w.severity,
                message: &w.message,
            })
            .collect(),
        cautions: &a.cautions,
    }
}

/// Appends `x` rounded to `places` decimals, as JSON (the same number that
/// `round(x, places)` printed by serde_json gives, without its cost).
fn push_fixed(out: &mut String, x: f64, places: u32) {
    use std::fmt::Write as _;
    if !x.is_finite() {
        out.push_str("null");
        return;
    }
    let scale = 10i64.pow(places);
    let n = (x * scale as f64).round() as i64;
    if n < 0 {
        out.push('-');
    }
    let (whole, frac) = (
        n.unsigned_abs() / scale as u64,
        n.unsigned_abs() % scale as u64,
    );
    let _ = write!(out, "{whole}.");
    if frac == 0 {
        out.push('0');
        return;
    }
    let digits = format!("{frac:0width$}", width = places as usize);
    out.push_str(digits.trim_end_matches('0'));
}

/// The freezing curve as a JSON array, formatted by hand: it is most of the
/// document, and this keeps a report of thousands of files fast.
fn curve_json(points: &[CurvePoint]) -> Box<RawValue> {
    let mut s = String::with_capacity(2 + points.len() * 44);
    s.push('[');
    for (k, p) in points.iter().enumerate() {
        if k > 0 {
            s.push(',');
        }
        s.push_str("{\"temp_c\":");
        push_fixed(&mut s, p.temp_c, 3);
        s.push_str(",\"frozen_fraction\":");
        push_fixed(&mut s, p.frozen_fraction, 5);
        s.push('}');
    }
    s.push(']');
    // The text is valid JSON by construction; fall back to an empty array all the same.
    RawValue::from_string(s)
        .unwrap_or_else(|_| RawValue::from_string("[]".into()).unwrap_or_default())
}

/// Writes the analysis as one compact JSON object (no newline).
pub fn write_analysis_json(a: &Analysis, out: &mut impl Write) -> serde_json::Result<()> {
    serde_json::to_writer(out, &doc(a))
}

/// The analysis as a JSON value (for storing as a snapshot).
pub fn analysis_json(a: &Analysis) -> serde_json::Value {
    // Serialising plain numbers, strings and maps cannot fail.
    serde_json::to_value(doc(a)).unwrap_or(serde_json::Value::Null)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fixed_formatting_reads_back_as_the_rounded_number() {
        for (x, places) in [
            (0.0, 5),
            (1.0, 5),
            (0.123456789, 5),
            (-12.5, 3),
            (-0.0004, 3),
            (0.7, 5),
            (-39.9999999, 3),
        ] {
            let mut s = String::new();
            push_fixed(&mut s, x, places);
            let back: f64 = s.parse().unwrap();
            assert_eq!(back, round(x, places as i32), "{x} -> {s}");
        }
        let mut s = String::new();
        push_fixed(&mut s, f64::NAN, 3);
        assert_eq!(s, "null");
    }
}

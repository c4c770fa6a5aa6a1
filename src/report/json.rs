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
    classic_applies: bool,
    classic_note: Option<&'a str>,
    data_limit_c: Option<f64>,
    serving_temp_c: Option<f64>,
    serving_target: f64,
    cabinet: Point,
    freezer: Point,
    freezer_behaviour: &'static str,
    us_proof: f64,
    freeze_concentration_limit_c: Option<f64>,
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
            water: pct(c.water_pct),
            fat: pct(c.fat_pct),
            protein: pct(c.protein_pct),
            msnf: pct(c.msnf_pct),
            lactose: pct(c.lactose_pct),
            sugars: pct(c.sugars_pct),
            total_solids: pct(c.total_solids_pct),
            ethanol: pct(c.ethanol_pct),
            other_solids: pct(c.other_solids_pct),
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
        classic_applies: a.classic_applies,
        classic_note: a.classic_note.as_deref(),
        data_limit_c: opt(a.data_limit_temp_c),
        serving_temp_c: opt(a.serving_temp_c),
        serving_target: a.serving_frozen_fraction,
        cabinet: (&a.cabinet).into(),
        freezer: (&a.freezer).into(),
        freezer_behaviour: a.freezer_behaviour.as_str(),
        us_proof: round(2.0 * a.abv_pct, 3),
        freeze_concentration_limit_c: opt(a.glass_limit_temp_c),
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

/// Appends `x` rounded to `places` decimals (at most 9), as JSON: the same
/// number that `round(x, places)` printed by serde_json gives, without its cost.
fn push_fixed(out: &mut Vec<u8>, x: f64, places: u32) {
    if !x.is_finite() {
        out.extend_from_slice(b"null");
        return;
    }
    let places = places.min(9);
    let scale = 10u64.pow(places);
    let n = (x * scale as f64).round();
    if n < 0.0 {
        out.push(b'-');
    }
    let n = n.abs() as u64;
    let (whole, mut frac) = (n / scale, n % scale);
    push_uint(out, whole);
    out.push(b'.');
    if frac == 0 {
        out.push(b'0');
        return;
    }
    let mut digits = [b'0'; 9];
    for d in digits[..places as usize].iter_mut().rev() {
        *d = b'0' + (frac % 10) as u8;
        frac /= 10;
    }
    let used = digits[..places as usize]
        .iter()
        .rposition(|d| *d != b'0')
        .map_or(1, |k| k + 1);
    out.extend_from_slice(&digits[..used]);
}

fn push_uint(out: &mut Vec<u8>, mut n: u64) {
    let mut buf = [0u8; 20];
    let mut k = buf.len();
    loop {
        k -= 1;
        buf[k] = b'0' + (n % 10) as u8;
        n /= 10;
        if n == 0 {
            break;
        }
    }
    out.extend_from_slice(&buf[k..]);
}

/// Appends `,"ice_curve":[...]` to `out`. The curve is most of the document, so
/// it is formatted by hand, which keeps a report of thousands of files fast.
fn push_curve(out: &mut Vec<u8>, points: &[CurvePoint]) {
    out.extend_from_slice(b",\"ice_curve\":[");
    for (k, p) in points.iter().enumerate() {
        if k > 0 {
            out.push(b',');
        }
        out.extend_from_slice(b"{\"temp_c\":");
        push_fixed(out, p.temp_c, 3);
        out.extend_from_slice(b",\"frozen_fraction\":");
        push_fixed(out, p.frozen_fraction, 5);
        out.push(b'}');
    }
    out.push(b']');
}

/// The analysis as compact JSON bytes (no newline). serde writes every field
/// but the curve; the curve is appended before the closing brace.
pub fn analysis_json_bytes(a: &Analysis) -> Vec<u8> {
    let mut out = Vec::with_capacity(6 << 10);
    // Writing plain numbers, strings and maps into memory cannot fail.
    if serde_json::to_writer(&mut out, &doc(a)).is_err() || out.pop() != Some(b'}') {
        return b"{}".to_vec();
    }
    push_curve(&mut out, &a.ice_curve);
    out.push(b'}');
    out
}

/// Writes the analysis as one compact JSON object (no newline).
pub fn write_analysis_json(a: &Analysis, out: &mut impl Write) -> std::io::Result<()> {
    out.write_all(&analysis_json_bytes(a))
}

/// Writes what `gelu report --json` prints for one recipe: the analysis, and
/// under `calibrated` the predictions that corrections in force in the batch log
/// apply to (`kind, predicted, value, unit, basis`; an empty list when none do),
/// as one compact JSON object (no newline). The plain figures stay as they are.
pub fn write_report_json(
    a: &Analysis,
    calibrated: &[crate::measure::CalibratedFigure],
    out: &mut impl Write,
) -> std::io::Result<()> {
    let mut bytes = analysis_json_bytes(a);
    if bytes.pop() != Some(b'}') {
        return out.write_all(b"{}");
    }
    bytes.extend_from_slice(b",\"calibrated\":");
    serde_json::to_writer(&mut bytes, calibrated)?;
    bytes.push(b'}');
    out.write_all(&bytes)
}

/// What `gelu report --json` prints for one recipe, as a JSON value (see
/// [`write_report_json`]).
pub fn report_json(
    a: &Analysis,
    calibrated: &[crate::measure::CalibratedFigure],
) -> serde_json::Value {
    let mut bytes = Vec::with_capacity(6 << 10);
    if write_report_json(a, calibrated, &mut bytes).is_err() {
        return serde_json::Value::Null;
    }
    serde_json::from_slice(&bytes).unwrap_or(serde_json::Value::Null)
}

/// The analysis as a JSON value (for storing as a prediction).
pub fn analysis_json(a: &Analysis) -> serde_json::Value {
    serde_json::from_slice(&analysis_json_bytes(a)).unwrap_or(serde_json::Value::Null)
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
            let mut s = Vec::new();
            push_fixed(&mut s, x, places);
            let back: f64 = String::from_utf8(s.clone()).unwrap().parse().unwrap();
            assert_eq!(back, round(x, places as i32), "{x} -> {s:?}");
        }
        let mut s = Vec::new();
        push_fixed(&mut s, f64::NAN, 3);
        assert_eq!(s, b"null");
    }
}

//! The public JSON of an analysis. These keys are a contract: add freely,
//! never rename or drop one. Temperatures are always °C; `frozen_fraction` is
//! the share of the mix's water that is ice (0..1).

use serde_json::{Value, json};

use crate::analysis::{Analysis, CurvePoint};

fn round(x: f64, places: i32) -> f64 {
    let p = 10f64.powi(places);
    (x * p).round() / p
}

fn curve(points: &[CurvePoint]) -> Value {
    points
        .iter()
        .map(|p| json!({"temp_c": round(p.temp_c, 3), "frozen_fraction": round(p.frozen_fraction, 5)}))
        .collect()
}

/// The analysis as one JSON object.
pub fn analysis_json(a: &Analysis) -> Value {
    let c = &a.composition;
    let opt = |v: Option<f64>| v.map(|t| round(t, 3));
    json!({
        "name": a.name,
        "style": a.style.as_str(),
        "mass_g": round(a.mass_g, 3),
        "volume_ml": round(a.volume_ml, 2),
        "composition_pct": {
            "water": round(c.water, 4), "fat": round(c.fat, 4), "protein": round(c.protein, 4),
            "msnf": round(c.msnf, 4), "lactose": round(c.lactose, 4), "sugars": round(c.sugars, 4),
            "total_solids": round(c.total_solids, 4), "ethanol": round(c.ethanol, 4),
            "other_solids": round(c.other_solids, 4), "sweeteners": round(a.sweeteners_pct, 4),
        },
        "solutes_pct": a.solutes_pct.iter().map(|(k, v)| (k.clone(), json!(round(*v, 5)))).collect::<serde_json::Map<_, _>>(),
        "abv_pct": round(a.abv_pct, 3),
        "sugar_g_per_l": round(a.sugar_g_per_l, 2),
        "sweetness": round(a.sweetness, 3),
        "freezing_point_c": opt(a.freezing_point_c),
        "dilute_law_freezing_point_c": opt(a.dilute_law_freezing_point_c),
        "serving_temp_c": opt(a.serving_temp_c),
        "serving_target": a.serving_target,
        "cabinet": {"temp_c": a.cabinet.temp_c, "frozen_fraction": round(a.cabinet.frozen_fraction, 5)},
        "freezer": {"temp_c": a.freezer.temp_c, "frozen_fraction": round(a.freezer.frozen_fraction, 5)},
        "freeze_concentration_limit_c": opt(a.glass_limit_temp_c),
        "ice_curve": curve(&a.ice_curve),
        "at": curve(&a.at),
        "allergens": a.allergens,
        "warnings": a.warnings.iter().map(|w| json!({"code": w.code, "severity": w.severity, "message": w.message})).collect::<Vec<_>>(),
        "cautions": a.cautions,
    })
}

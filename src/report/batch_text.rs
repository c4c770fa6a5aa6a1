//! A batch record as plain text for people: the whole record with its readings set
//! against the prediction, its notes and its amendment trail (readings and notes
//! numbered as amendments name them; struck ones kept, marked), and one line per
//! batch for a list. Text from the record is shown inert. (JSON and CSV forms are
//! the batch domain's, in [`crate::batch`].)

use crate::batch::compare::drink_volume_ml;
use crate::model::units::format_volume;
use std::fmt::Write as _;

use super::inert::inert;
use crate::batch::MeasurementKind;
use crate::batch::compare::{Comparison, PredictedFrom, Setting, comparisons, readings};
use crate::batch::{Batch, BatchSummary};
use crate::measure;
use crate::measure::cryoscope::hortvet_to_celsius;
pub use crate::model::time::minute_text;

fn grams(g: f64) -> String {
    format!("{g:.1}")
}

/// One row of the batch list: a liqueur's or spirit's size by its volume at
/// 20 °C (as a distiller batches it), anything else by mass.
pub fn summary_line(r: &BatchSummary) -> String {
    let size = match r.drink_volume_ml {
        Some(ml) => format_volume(ml),
        None => format!("{} g", grams(r.size_g)),
    };
    format!(
        "{:<16} {}  {:<8} {:>12}  {} v{}  ({})",
        inert(&r.code),
        minute_text(&r.made_at),
        r.status.as_str(),
        size,
        inert(&r.recipe),
        r.recipe_version,
        inert(&r.operator)
    )
}

/// "predicted -2.79", with where it comes from when not recorded and the
/// corrected figure beside it when a correction is on.
fn prediction_text(c: &Comparison) -> String {
    let Some(p) = c.predicted else {
        return String::new();
    };
    let mut text = format!("predicted {p:.2}");
    if c.predicted_from == PredictedFrom::RecipeText {
        text.push_str(" (computed now from the recorded recipe)");
    }
    if let Some(k) = &c.calibrated {
        let difference = c
            .calibrated_difference()
            .map(|d| format!(", difference {d:+.2}"))
            .unwrap_or_default();
        text.push_str(&format!(
            " [calibrated {:.2}{difference}: {}]",
            k.value, k.basis
        ));
    }
    text
}

/// The whole record as text, its readings set against its predictions
/// (`setting`: the catalog, draw share and corrections in force).
pub fn batch_text(b: &Batch, setting: &Setting<'_>) -> String {
    let mut out = String::new();
    let mut line = |s: String| {
        let _ = writeln!(out, "{s}");
    };
    line(format!(
        "{}  {}",
        inert(&b.code),
        b.status.as_str().to_uppercase()
    ));
    line(format!(
        "recipe   {} (version {}, {})",
        inert(&b.recipe.recipe),
        b.recipe.version,
        inert(&b.recipe.content_hash)
    ));
    line(format!(
        "made     {} by {}",
        minute_text(&b.made_at),
        inert(&b.operator)
    ));
    line(match drink_volume_ml(b) {
        Some(ml) => format!(
            "size     {} g ({} at 20 °C)",
            grams(b.size_g),
            format_volume(ml)
        ),
        None => format!("size     {} g", grams(b.size_g)),
    });
    if let (Some(at), Some(by)) = (&b.finalized_at, &b.finalized_by) {
        line(format!("final    {} by {}", minute_text(at), inert(by)));
    }
    line(String::new());
    line(format!(
        "{:<4} {:<24} {:>10} {:>10}  lot",
        "line", "ingredient", "planned g", "actual g"
    ));
    for (i, l) in b.lines.iter().enumerate() {
        line(format!(
            "{:<4} {:<24} {:>10} {:>10}  {}",
            i + 1,
            inert(&l.ingredient),
            grams(l.planned_g),
            l.actual_g.map(grams).unwrap_or_else(|| "-".into()),
            if l.lot.is_empty() {
                "-".into()
            } else {
                inert(&l.lot)
            }
        ));
    }
    line(String::new());
    line("measured against predicted".into());
    let compared = comparisons(b, setting);
    for c in &compared {
        if let (Some(_), None) = (c.predicted, c.measured) {
            line(format!(
                "     {:<22} {:>10} {:<6} {}",
                c.kind.as_str(),
                "-",
                c.kind.unit(),
                prediction_text(c)
            ));
        }
    }
    for (i, r) in readings(b, &compared).into_iter().enumerate() {
        let m = r.measurement;
        let c = compared.iter().find(|c| c.kind == m.kind);
        let against = match (c, r.difference()) {
            _ if m.struck => "struck out by an amendment".to_owned(),
            (Some(c), Some(d)) => format!("{}, difference {d:+.2}", prediction_text(c)),
            (Some(c), None) => c
                .no_prediction
                .as_ref()
                .map(|why| format!("no prediction: {why}"))
                .unwrap_or_default(),
            (None, _) if m.kind == MeasurementKind::FreezingPointH => format!(
                "= {:.3} °C by the IDF line, compared as freezing-point-c",
                hortvet_to_celsius(m.value)
            ),
            (None, _) => String::new(),
        };
        line(format!(
            "  {:>2} {:<22} {:>10} {:<6} {against}  ({} by {})",
            i + 1,
            m.kind.as_str(),
            format!("{:.2}", m.value),
            m.kind.unit(),
            minute_text(&m.taken_at),
            inert(&m.by)
        ));
    }
    for c in compared.iter().filter(|c| c.far_off()) {
        let d = c.calibrated_difference().or(c.difference()).unwrap_or(0.0);
        line(format!(
            "  far off: {} is {d:+.2} {} from its prediction; likely causes: {}",
            c.kind.as_str(),
            measure::kind_defaults(c.kind.as_str()).map_or("", |k| k.difference_unit),
            c.likely_causes.join("; ")
        ));
    }
    if !b.notes.is_empty() {
        line(String::new());
        line("notes".into());
        for (i, n) in b.notes.iter().enumerate() {
            line(format!(
                "  {:>2} {} {}: {}{}",
                i + 1,
                minute_text(&n.written_at),
                inert(&n.by),
                inert(&n.text),
                if n.struck {
                    "  (struck out by an amendment)"
                } else {
                    ""
                }
            ));
        }
    }
    if !b.amendments.is_empty() {
        line(String::new());
        line("amendments (after sign-off: new readings and notes, and corrections)".into());
        for (i, a) in b.amendments.iter().enumerate() {
            line(format!(
                "  {:>2} {} {}: {}",
                i + 1,
                minute_text(&a.amended_at),
                inert(&a.by),
                inert(&a.reason)
            ));
            for c in &a.changes {
                line(format!("       {}", inert(&c.to_string())));
            }
        }
    }
    out
}

//! Seals: the SHA-256 of a signed-off record as gelu wrote it, kept beside the
//! record at sign-off and at every entry on its trail, so that `gelu db check` can
//! tell which records were changed behind gelu's back (by SQL with the protecting
//! triggers dropped, or by editing the file). A seal is no signature: whoever can
//! rewrite the record can rewrite its seal too. It catches accidents and naive
//! edits, and says which record they touched.
//!
//! A seal covers the record as first written (its head, lines, readings, notes and
//! the recipe version it names), its prediction, and the first `amendments` entries
//! of its trail. Numbers are written as JSON numbers (the shortest text that reads
//! back exactly), times as stored, `-0` as `0` (the database keeps no sign on zero).

use serde_json::json;

use super::types::Batch;
use super::version::sha256_of;
use crate::model::time::time_text;

/// The seal of `first` (the record as first written, with its trail in
/// `amendments`) over its first `amendments` entries, with its prediction as the
/// stored JSON text: `sha256:` and 64 hex digits.
pub fn seal(first: &Batch, amendments: usize, prediction_json: &str) -> String {
    let n = |x: f64| x + 0.0;
    let text = json!({
        "code": first.code,
        "recipe": first.recipe.recipe,
        "recipe_version": first.recipe.version,
        "recipe_hash": first.recipe.content_hash,
        "made_at": time_text(&first.made_at),
        "size_g": n(first.size_g),
        "operator": first.operator,
        "finalized_at": first.finalized_at.as_ref().map(time_text),
        "finalized_by": first.finalized_by,
        "lines": first.lines.iter().map(|l| json!({
            "ingredient": l.ingredient, "planned_g": n(l.planned_g),
            "actual_g": l.actual_g.map(n), "lot": l.lot,
        })).collect::<Vec<_>>(),
        "measurements": first.measurements.iter().map(|m| json!({
            "kind": m.kind.as_str(), "value": n(m.value),
            "taken_at": time_text(&m.taken_at), "by": m.by,
        })).collect::<Vec<_>>(),
        "notes": first.notes.iter().map(|m| json!({
            "text": m.text, "written_at": time_text(&m.written_at), "by": m.by,
        })).collect::<Vec<_>>(),
        "amendments": &first.amendments[..amendments.min(first.amendments.len())],
    })
    .to_string();
    sha256_of(&[text.as_bytes(), b"\n", prediction_json.as_bytes()])
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::batch::{BatchLine, RecipeVersion, Status};
    use chrono::{TimeZone, Utc};

    fn record() -> Batch {
        let at = Utc.with_ymd_and_hms(2026, 12, 1, 9, 0, 0).unwrap();
        Batch {
            code: "B-20261201-0001".into(),
            recipe: RecipeVersion {
                recipe: "Harbour vanilla".into(),
                version: 1,
                content_hash: "sha256:00".into(),
                text: String::new(),
            },
            made_at: at,
            size_g: 2000.0,
            operator: "Mara".into(),
            status: Status::Final,
            finalized_at: Some(at),
            finalized_by: Some("Head".into()),
            lines: vec![BatchLine {
                ingredient: "sucrose".into(),
                planned_g: 0.0,
                actual_g: None,
                lot: "S-1".into(),
            }],
            measurements: Vec::new(),
            notes: Vec::new(),
            amendments: Vec::new(),
            prediction: serde_json::Value::Null,
        }
    }

    #[test]
    fn a_seal_changes_with_every_field_it_covers_and_only_with_them() {
        let base = record();
        let sealed = seal(&base, 0, "{}");
        assert!(sealed.starts_with("sha256:") && sealed.len() == 7 + 64);
        assert_eq!(seal(&base, 0, "{}"), sealed, "deterministic");
        let mut negative_zero = base.clone();
        negative_zero.lines[0].planned_g = -0.0;
        assert_eq!(
            seal(&negative_zero, 0, "{}"),
            sealed,
            "the store keeps no sign on 0"
        );
        let mut renamed = base.clone();
        renamed.recipe.recipe = "Another name".into();
        let mut lot = base.clone();
        lot.lines[0].lot = "S-2".into();
        let mut signer = base.clone();
        signer.finalized_by = Some("Someone".into());
        for (what, other) in [("recipe name", renamed), ("lot", lot), ("signer", signer)] {
            assert_ne!(seal(&other, 0, "{}"), sealed, "{what}");
        }
        assert_ne!(seal(&base, 0, "{\"a\":1}"), sealed, "the prediction");
        // What the record shows beyond the sealed part does not count.
        let mut shown = base.clone();
        shown.status = Status::Amended;
        shown.prediction = serde_json::json!({"x": 1});
        assert_eq!(seal(&shown, 0, "{}"), sealed);
    }
}

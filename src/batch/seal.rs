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

use std::io::Write;

use chrono::{DateTime, Utc};
use serde::Serialize;

use super::types::{Amendment, Batch};
use super::version::Hasher;
use crate::model::time::serialize_time;

/// A number as sealed: `-0` as `0`.
fn n(x: f64) -> f64 {
    x + 0.0
}

// What a seal covers, written as JSON in this order. The order of the fields is
// part of every seal ever made: never reorder, rename or drop one.
#[derive(Serialize)]
struct Sealed<'a> {
    code: &'a str,
    recipe: &'a str,
    recipe_version: u32,
    recipe_hash: &'a str,
    #[serde(serialize_with = "serialize_time")]
    made_at: DateTime<Utc>,
    size_g: f64,
    operator: &'a str,
    finalized_at: Option<String>,
    finalized_by: Option<&'a str>,
    lines: Vec<SealedLine<'a>>,
    measurements: Vec<SealedReading<'a>>,
    notes: Vec<SealedNote<'a>>,
    amendments: &'a [Amendment],
}

#[derive(Serialize)]
struct SealedLine<'a> {
    ingredient: &'a str,
    planned_g: f64,
    actual_g: Option<f64>,
    lot: &'a str,
}

#[derive(Serialize)]
struct SealedReading<'a> {
    kind: &'static str,
    value: f64,
    #[serde(serialize_with = "serialize_time")]
    taken_at: DateTime<Utc>,
    by: &'a str,
}

#[derive(Serialize)]
struct SealedNote<'a> {
    text: &'a str,
    #[serde(serialize_with = "serialize_time")]
    written_at: DateTime<Utc>,
    by: &'a str,
}

/// The seal of `first` (the record as first written, with its trail in
/// `amendments`) over its first `amendments` entries, with its prediction as the
/// stored JSON text: `sha256:` and 64 hex digits.
pub fn seal(first: &Batch, amendments: usize, prediction_json: &str) -> String {
    let sealed = Sealed {
        code: &first.code,
        recipe: &first.recipe.recipe,
        recipe_version: first.recipe.version,
        recipe_hash: &first.recipe.content_hash,
        made_at: first.made_at,
        size_g: n(first.size_g),
        operator: &first.operator,
        finalized_at: first
            .finalized_at
            .as_ref()
            .map(crate::model::time::time_text),
        finalized_by: first.finalized_by.as_deref(),
        lines: first
            .lines
            .iter()
            .map(|l| SealedLine {
                ingredient: &l.ingredient,
                planned_g: n(l.planned_g),
                actual_g: l.actual_g.map(n),
                lot: &l.lot,
            })
            .collect(),
        measurements: first
            .measurements
            .iter()
            .map(|m| SealedReading {
                kind: m.kind.as_str(),
                value: n(m.value),
                taken_at: m.taken_at,
                by: &m.by,
            })
            .collect(),
        notes: first
            .notes
            .iter()
            .map(|m| SealedNote {
                text: &m.text,
                written_at: m.written_at,
                by: &m.by,
            })
            .collect(),
        amendments: &first.amendments[..amendments.min(first.amendments.len())],
    };
    let mut hasher = Hasher::default();
    // Writing into a hasher never fails, and these values always serialise.
    let _ = serde_json::to_writer(&mut hasher, &sealed);
    let _ = hasher.write_all(b"\n");
    let _ = hasher.write_all(prediction_json.as_bytes());
    hasher.finish()
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

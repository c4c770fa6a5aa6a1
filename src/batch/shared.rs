//! Records as sites share them through the hub, pure: a recipe version, a batch as
//! first written (its head and lines), its sign-off, each reading, note and
//! amendment, and a person's decision on a conflict, each with a stable identity.
//!
//! A record's identity is the SHA-256 of a canonical JSON array of its content (the
//! site that wrote it is not part of it, so the same record reached by two roads is
//! one record). Entries name their batch by code and head hash and carry their place
//! in the batch's list where they were written, so the lists read alike everywhere.
//! An amendment's `changes` travel as the JSON text they were written as: this
//! module never looks inside them, so kinds of change added later travel too.

use chrono::{DateTime, Utc};
use serde_json::{Value, json};

use super::Invalid;
use super::types::BatchLine;
use super::version::content_hash;
use crate::model::time::time_text;

/// A site code: 2 to 8 capital letters or digits, starting with a letter.
pub fn check_site_code(text: &str) -> Result<String, Invalid> {
    let code = text.trim().to_uppercase();
    let fine = (2..=8).contains(&code.chars().count())
        && code
            .chars()
            .all(|c| c.is_ascii_uppercase() || c.is_ascii_digit())
        && code.starts_with(|c: char| c.is_ascii_uppercase());
    if fine {
        Ok(code)
    } else {
        Err(Invalid(format!(
            "`{}` is not a site code; give 2 to 8 letters or digits starting with a letter, like HBR or K2",
            text.trim()
        )))
    }
}

/// The identity of canonical content: `sha256:` and the hex digest of its JSON text.
fn identity(content: &Value) -> String {
    content_hash(&content.to_string())
}

/// A recipe version as the hub keeps it.
#[derive(Debug, Clone, PartialEq)]
pub struct SharedVersion {
    /// The recipe's name.
    pub recipe: String,
    /// Its number where it was saved.
    pub version: u32,
    /// `sha256:` of its text.
    pub content_hash: String,
    /// The recipe's TOML text.
    pub text: String,
    /// The site that saved it.
    pub site: String,
}

impl SharedVersion {
    /// Whether the text still matches its hash.
    pub fn is_intact(&self) -> bool {
        content_hash(&self.text) == self.content_hash
    }
}

/// A batch as first written: everything about it that never changes.
#[derive(Debug, Clone, PartialEq)]
pub struct SharedHead {
    /// Batch code.
    pub code: String,
    /// The site that wrote it.
    pub site: String,
    /// The recipe's name.
    pub recipe: String,
    /// The recipe version's number where the batch was written.
    pub recipe_version: u32,
    /// `sha256:` of the recipe version's text.
    pub recipe_hash: String,
    /// When it was made.
    pub made_at: DateTime<Utc>,
    /// Planned size (g).
    pub size_g: f64,
    /// Who made it, as first written.
    pub operator: String,
    /// The lines as first written.
    pub lines: Vec<BatchLine>,
    /// The prediction, as the JSON text it was stored as.
    pub prediction: String,
}

impl SharedHead {
    /// Its identity.
    pub fn hash(&self) -> String {
        let lines: Vec<Value> = self
            .lines
            .iter()
            .map(|l| json!([l.ingredient, l.planned_g, l.actual_g, l.lot]))
            .collect();
        identity(&json!([
            "head",
            self.code,
            self.recipe,
            self.recipe_version,
            self.recipe_hash,
            time_text(&self.made_at),
            self.size_g,
            self.operator,
            lines,
            self.prediction,
        ]))
    }
}

/// A batch's sign-off.
#[derive(Debug, Clone, PartialEq)]
pub struct SharedFinal {
    /// Batch code.
    pub code: String,
    /// The identity of the batch's head.
    pub head_hash: String,
    /// When it was signed off.
    pub at: DateTime<Utc>,
    /// Who signed it off.
    pub by: String,
    /// The site where it was signed off.
    pub site: String,
}

impl SharedFinal {
    /// Its identity.
    pub fn hash(&self) -> String {
        identity(&json!([
            "final",
            self.code,
            self.head_hash,
            time_text(&self.at),
            self.by
        ]))
    }
}

/// What an entry on a batch says.
#[derive(Debug, Clone, PartialEq)]
pub enum EntryBody {
    /// A reading: its kind and unit as written (kebab-case kind, unit text).
    Measurement {
        /// The kind's name.
        kind: String,
        /// The value, in `unit`.
        value: f64,
        /// The unit.
        unit: String,
        /// When it was taken.
        taken_at: DateTime<Utc>,
        /// Who took it.
        by: String,
    },
    /// A note.
    Note {
        /// The text.
        text: String,
        /// When it was written.
        written_at: DateTime<Utc>,
        /// Who wrote it.
        by: String,
    },
    /// An amendment; `changes` is its JSON text, never looked into here.
    Amendment {
        /// When it was made.
        amended_at: DateTime<Utc>,
        /// Who made it.
        by: String,
        /// Why.
        reason: String,
        /// The JSON array of changes, as written.
        changes: String,
    },
}

impl EntryBody {
    /// `measurement`, `note` or `amendment`.
    pub fn kind(&self) -> &'static str {
        match self {
            EntryBody::Measurement { .. } => "measurement",
            EntryBody::Note { .. } => "note",
            EntryBody::Amendment { .. } => "amendment",
        }
    }
}

/// A reading, note or amendment on a batch.
#[derive(Debug, Clone, PartialEq)]
pub struct SharedEntry {
    /// Batch code.
    pub code: String,
    /// The identity of the batch's head.
    pub head_hash: String,
    /// Its place (1-based) in the batch's list of its kind where it was written.
    pub position: u32,
    /// The site that wrote it.
    pub site: String,
    /// What it says.
    pub body: EntryBody,
}

impl SharedEntry {
    /// Its identity.
    pub fn hash(&self) -> String {
        let body = match &self.body {
            EntryBody::Measurement {
                kind,
                value,
                unit,
                taken_at,
                by,
            } => json!([kind, value, unit, time_text(taken_at), by]),
            EntryBody::Note {
                text,
                written_at,
                by,
            } => json!([text, time_text(written_at), by]),
            EntryBody::Amendment {
                amended_at,
                by,
                reason,
                changes,
            } => json!([time_text(amended_at), by, reason, changes]),
        };
        identity(&json!([
            self.body.kind(),
            self.code,
            self.head_hash,
            self.position,
            body
        ]))
    }
}

/// A person's decision on a conflict, shared so every site sees it decided.
#[derive(Debug, Clone, PartialEq)]
pub struct SharedDecision {
    /// The kind of record in conflict (`batch`, `recipe-version`, ...).
    pub kind: String,
    /// Its code.
    pub code: String,
    /// When it was decided.
    pub decided_at: DateTime<Utc>,
    /// Who decided.
    pub by: String,
    /// What was decided, in their words.
    pub decision: String,
    /// The site where it was decided.
    pub site: String,
}

impl SharedDecision {
    /// Its identity.
    pub fn hash(&self) -> String {
        identity(&json!([
            "decision",
            self.kind,
            self.code,
            time_text(&self.decided_at),
            self.by,
            self.decision
        ]))
    }
}

/// Shared records as JSON objects, to show a record kept aside as a conflict.
pub mod json_forms {
    use super::*;

    /// A recipe version.
    pub fn version(v: &SharedVersion) -> Value {
        json!({"recipe": v.recipe, "version": v.version, "content_hash": v.content_hash,
               "text": v.text, "site": v.site})
    }

    /// A batch as first written.
    pub fn head(h: &SharedHead, hash: &str) -> Value {
        json!({"code": h.code, "site": h.site, "head_hash": hash, "recipe": h.recipe,
               "recipe_version": h.recipe_version, "recipe_hash": h.recipe_hash,
               "made_at": time_text(&h.made_at), "size_g": h.size_g, "operator": h.operator,
               "lines": h.lines, "prediction": h.prediction})
    }

    /// A sign-off.
    pub fn final_(f: &SharedFinal, hash: &str) -> Value {
        json!({"code": f.code, "head_hash": f.head_hash, "finalized_at": time_text(&f.at),
               "finalized_by": f.by, "site": f.site, "hash": hash})
    }

    /// A reading, note or amendment.
    pub fn entry(e: &SharedEntry, hash: &str) -> Value {
        let body = match &e.body {
            EntryBody::Measurement {
                kind,
                value,
                unit,
                taken_at,
                by,
            } => json!({
                "kind": kind, "value": value, "unit": unit, "taken_at": time_text(taken_at), "by": by}),
            EntryBody::Note {
                text,
                written_at,
                by,
            } => json!({
                "text": text, "written_at": time_text(written_at), "by": by}),
            EntryBody::Amendment {
                amended_at,
                by,
                reason,
                changes,
            } => json!({
                "amended_at": time_text(amended_at), "by": by, "reason": reason, "changes": changes}),
        };
        json!({"entry": e.body.kind(), "code": e.code, "head_hash": e.head_hash,
               "position": e.position, "site": e.site, "hash": hash, "body": body})
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::TimeZone;

    fn head() -> SharedHead {
        SharedHead {
            code: "B-20261201-HBR-0001".into(),
            site: "HBR".into(),
            recipe: "Harbour vanilla".into(),
            recipe_version: 1,
            recipe_hash: content_hash("x"),
            made_at: Utc.with_ymd_and_hms(2026, 12, 1, 9, 0, 0).unwrap(),
            size_g: 5000.0,
            operator: "Ines".into(),
            lines: vec![BatchLine {
                ingredient: "sucrose".into(),
                planned_g: 800.0,
                actual_g: None,
                lot: "S-1".into(),
            }],
            prediction: "{\"freezing_point_c\":-2.5}".into(),
        }
    }

    #[test]
    fn identity_follows_content_not_site() {
        let a = head();
        let mut b = head();
        b.site = "KTN".into();
        assert_eq!(a.hash(), b.hash(), "the site is not part of the identity");
        b.lines[0].lot = "S-2".into();
        assert_ne!(a.hash(), b.hash());
        let mut c = head();
        c.prediction = "{\"freezing_point_c\":-2.6}".into();
        assert_ne!(a.hash(), c.hash());
        assert!(a.hash().starts_with("sha256:") && a.hash().len() == 71);
    }

    #[test]
    fn an_entry_is_known_by_its_batch_place_and_content() {
        let at = Utc.with_ymd_and_hms(2026, 12, 1, 10, 0, 0).unwrap();
        let note = |position, text: &str| SharedEntry {
            code: "B-1".into(),
            head_hash: "sha256:h".into(),
            position,
            site: "HBR".into(),
            body: EntryBody::Note {
                text: text.into(),
                written_at: at,
                by: "Ines".into(),
            },
        };
        assert_eq!(note(2, "ok").hash(), note(2, "ok").hash());
        assert_ne!(note(2, "ok").hash(), note(3, "ok").hash());
        assert_ne!(note(2, "ok").hash(), note(2, "ok!").hash());
        // Changes are opaque text: a kind of change this build does not know travels.
        let amendment = SharedEntry {
            body: EntryBody::Amendment {
                amended_at: at,
                by: "Ines".into(),
                reason: "struck".into(),
                changes: r#"[{"field":"strike-note","note":1}]"#.into(),
            },
            ..note(1, "")
        };
        assert_eq!(amendment.body.kind(), "amendment");
        assert_ne!(amendment.hash(), note(1, "").hash());
    }

    #[test]
    fn site_codes_are_short_capitals() {
        assert_eq!(check_site_code(" hbr ").unwrap(), "HBR");
        assert_eq!(check_site_code("K2").unwrap(), "K2");
        for bad in ["", "H", "2K", "HB-R", "ABCDEFGHI", "hé"] {
            assert!(check_site_code(bad).is_err(), "{bad}");
        }
    }
}

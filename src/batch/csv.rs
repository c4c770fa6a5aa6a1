//! Batches as CSV for spreadsheets, in a long layout: one row per event of a
//! record, so that nothing is left out, however many readings or notes it holds.
//!
//! Every row starts with the batch's `code`, `recipe` and `recipe_version`, then:
//!
//! | `event`     | `number`         | `at`, `by`          | `item`       | `value`, `unit` | other          |
//! |-------------|------------------|---------------------|--------------|-----------------|----------------|
//! | `batch`     |                  | made at, operator   | status       | size, g         | `text`: recipe hash |
//! | `line`      | line             |                     | ingredient   | planned, g      | `lot`          |
//! | `weighed`   | line             |                     | ingredient   | weighed, g      |                |
//! | `predicted` |                  |                     | kind         | prediction      |                |
//! | `reading`   | reading          | taken at, by        | kind         | value, unit     | `struck`       |
//! | `note`      | note             | written at, by      |              |                 | `text`, `struck` |
//! | `final`     |                  | signed off, by      |              |                 |                |
//! | `amendment` | amendment        | amended at, by      |              |                 | `text`: reason |
//! | `change`    | amendment        |                     | field        |                 | `text`: the change as JSON |
//!
//! Lines, lots, weighed masses, readings and notes are as the record stands (its
//! trail applied); a struck reading or note keeps its row, with `struck` = `yes`.
//! The trail's changes carry the values they replaced. Only JSON Lines holds the
//! recipe text and the whole prediction, and only it is read back by import.

use std::fmt::Write as _;

use super::types::{Batch, MeasurementKind};
use crate::model::time;

/// The columns, in order.
pub const COLUMNS: [&str; 13] = [
    "code",
    "recipe",
    "recipe_version",
    "event",
    "number",
    "at",
    "by",
    "item",
    "value",
    "unit",
    "lot",
    "struck",
    "text",
];

/// Quotes a field when it holds a comma, a quote or a line break (RFC 4180).
pub fn field(text: &str) -> String {
    if text.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", text.replace('"', "\"\""))
    } else {
        text.to_owned()
    }
}

/// The header row.
pub fn header() -> String {
    COLUMNS.join(",")
}

/// Whether a line is the header of a CSV export (of this gelu or an earlier one),
/// so that an import can say it reads JSON Lines instead.
pub fn is_export_header(line: &str) -> bool {
    line.trim_start_matches('\u{feff}')
        .starts_with("code,recipe,recipe_version,")
}

/// One event's cells after the batch's own three.
#[derive(Default)]
struct Event {
    event: &'static str,
    number: Option<usize>,
    at: String,
    by: String,
    item: String,
    value: Option<f64>,
    unit: &'static str,
    lot: String,
    struck: bool,
    text: String,
}

/// Every row of one batch, each ending in a line break.
pub fn rows(b: &Batch) -> String {
    let mut events = vec![Event {
        event: "batch",
        at: time::time_text(&b.made_at),
        by: b.operator.clone(),
        item: b.status.as_str().into(),
        value: Some(b.size_g),
        unit: "g",
        text: b.recipe.content_hash.clone(),
        ..Event::default()
    }];
    for (i, l) in b.lines.iter().enumerate() {
        events.push(Event {
            event: "line",
            number: Some(i + 1),
            item: l.ingredient.clone(),
            value: Some(l.planned_g),
            unit: "g",
            lot: l.lot.clone(),
            ..Event::default()
        });
        if let Some(g) = l.actual_g {
            events.push(Event {
                event: "weighed",
                number: Some(i + 1),
                item: l.ingredient.clone(),
                value: Some(g),
                unit: "g",
                ..Event::default()
            });
        }
    }
    for kind in MeasurementKind::ALL {
        // The prediction recorded with the batch (what it was made with).
        let recorded = kind
            .prediction_key()
            .and_then(|key| b.prediction.get(key))
            .and_then(serde_json::Value::as_f64);
        if let Some(p) = recorded {
            events.push(Event {
                event: "predicted",
                item: kind.as_str().into(),
                value: Some(p),
                unit: kind.unit(),
                ..Event::default()
            });
        }
    }
    for (i, m) in b.measurements.iter().enumerate() {
        events.push(Event {
            event: "reading",
            number: Some(i + 1),
            at: time::time_text(&m.taken_at),
            by: m.by.clone(),
            item: m.kind.as_str().into(),
            value: Some(m.value),
            unit: m.kind.unit(),
            struck: m.struck,
            ..Event::default()
        });
    }
    for (i, n) in b.notes.iter().enumerate() {
        events.push(Event {
            event: "note",
            number: Some(i + 1),
            at: time::time_text(&n.written_at),
            by: n.by.clone(),
            struck: n.struck,
            text: n.text.clone(),
            ..Event::default()
        });
    }
    if let (Some(at), Some(by)) = (&b.finalized_at, &b.finalized_by) {
        events.push(Event {
            event: "final",
            at: time::time_text(at),
            by: by.clone(),
            ..Event::default()
        });
    }
    for (i, a) in b.amendments.iter().enumerate() {
        events.push(Event {
            event: "amendment",
            number: Some(i + 1),
            at: time::time_text(&a.amended_at),
            by: a.by.clone(),
            text: a.reason.clone(),
            ..Event::default()
        });
        for c in &a.changes {
            let json = serde_json::to_value(c).unwrap_or_default();
            events.push(Event {
                event: "change",
                number: Some(i + 1),
                item: json["field"].as_str().unwrap_or_default().to_owned(),
                text: json.to_string(),
                ..Event::default()
            });
        }
    }
    let mut out = String::new();
    let head = format!(
        "{},{},{}",
        field(&b.code),
        field(&b.recipe.recipe),
        b.recipe.version
    );
    for e in events {
        let _ = writeln!(
            out,
            "{head},{},{},{},{},{},{},{},{},{},{}",
            e.event,
            e.number.map(|n| n.to_string()).unwrap_or_default(),
            e.at,
            field(&e.by),
            field(&e.item),
            e.value.map(|v| v.to_string()).unwrap_or_default(),
            e.unit,
            field(&e.lot),
            if e.struck { "yes" } else { "" },
            field(&e.text),
        );
    }
    out
}

#[cfg(test)]
mod tests {
    use super::{field, header, is_export_header};

    #[test]
    fn fields_are_quoted_only_when_needed() {
        assert_eq!(field("plain"), "plain");
        assert_eq!(field("a,b"), "\"a,b\"");
        assert_eq!(field("say \"hi\""), "\"say \"\"hi\"\"\"");
        assert_eq!(field("two\nlines"), "\"two\nlines\"");
    }

    #[test]
    fn an_export_header_is_recognised_old_or_new() {
        assert!(is_export_header(&header()));
        assert!(is_export_header(
            "code,recipe,recipe_version,made_at,size_g,operator,status,lots"
        ));
        assert!(!is_export_header("{\"code\": \"B-1\"}"));
    }
}

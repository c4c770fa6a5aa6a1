//! Batches as CSV, one row per batch, for spreadsheets: the record's main fields,
//! the lots, the predicted freezing point and serving temperature, and the latest
//! reading of every measurement kind. (JSON Lines is the lossless format.)

use super::types::{Batch, MeasurementKind};
use crate::model::time;

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
    let mut cols: Vec<String> = [
        "code",
        "recipe",
        "recipe_version",
        "made_at",
        "size_g",
        "operator",
        "status",
        "lots",
        "notes",
        "predicted_freezing_point_c",
        "predicted_serving_temp_c",
    ]
    .iter()
    .map(|s| (*s).to_owned())
    .collect();
    cols.extend(
        MeasurementKind::ALL
            .iter()
            .map(|k| k.as_str().replace('-', "_")),
    );
    cols.join(",")
}

/// One batch as a row.
pub fn row(b: &Batch) -> String {
    let lots: Vec<String> = b
        .lines
        .iter()
        .filter(|l| !l.lot.is_empty())
        .map(|l| format!("{}={}", l.ingredient, l.lot))
        .collect();
    let notes: Vec<&str> = b.notes.iter().map(|n| n.text.as_str()).collect();
    let predicted = |key: &str| {
        b.prediction
            .get(key)
            .and_then(|v| v.as_f64())
            .map(|v| v.to_string())
            .unwrap_or_default()
    };
    let mut cols = vec![
        field(&b.code),
        field(&b.recipe.recipe),
        b.recipe.version.to_string(),
        time::time_text(&b.made_at),
        b.size_g.to_string(),
        field(&b.operator),
        b.status.as_str().to_owned(),
        field(&lots.join("; ")),
        field(&notes.join(" | ")),
        predicted("freezing_point_c"),
        predicted("serving_temp_c"),
    ];
    for kind in MeasurementKind::ALL {
        let latest = b.measurements.iter().rev().find(|m| m.kind == kind);
        cols.push(latest.map(|m| m.value.to_string()).unwrap_or_default());
    }
    cols.join(",")
}

#[cfg(test)]
mod tests {
    use super::field;

    #[test]
    fn fields_are_quoted_only_when_needed() {
        assert_eq!(field("plain"), "plain");
        assert_eq!(field("a,b"), "\"a,b\"");
        assert_eq!(field("say \"hi\""), "\"say \"\"hi\"\"\"");
    }
}

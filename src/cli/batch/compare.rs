//! `gelu batch compare`: predicted against measured over the batches of the log,
//! per kind: the count, the bias (mean of measured minus predicted), the RMSE,
//! the batches furthest off, those far enough off to flag with their likely
//! causes, and a text chart; `--json` prints one object per kind per line.

use std::fmt::Write as _;
use std::process::ExitCode;

use crate::batch::MeasurementKind;
use crate::batch::compare::with_corrections;
use crate::measure::{self, KindSummary, render_chart, summarise};
use crate::model::Style;

/// Width and height of the chart in characters.
const CHART: (usize, usize) = (72, 14);

/// `--kind`: a kind gelu predicts.
pub fn predicted_kind(text: &str) -> Result<MeasurementKind, String> {
    MeasurementKind::parse(text)
        .filter(|k| k.prediction_key().is_some())
        .ok_or_else(|| {
            let predicted: Vec<&str> = MeasurementKind::ALL
                .iter()
                .filter(|k| k.prediction_key().is_some())
                .map(|k| k.as_str())
                .collect();
            format!(
                "`{text}` is not a kind gelu predicts; use one of {}",
                predicted.join(", ")
            )
        })
}

/// `--style`: a style name.
pub fn style_name(text: &str) -> Result<Style, String> {
    Style::parse(text).ok_or_else(|| {
        let all: Vec<&str> = Style::ALL.iter().map(|s| s.as_str()).collect();
        format!("`{text}` is not a style; use one of {}", all.join(", "))
    })
}

/// `--precision KIND=VALUE`: an instrument's precision for a kind.
pub fn precision(text: &str) -> Result<(MeasurementKind, f64), String> {
    let (kind, value) = text.split_once('=').ok_or_else(|| {
        format!("`{text}` should look like KIND=PRECISION, like freezing-point-c=0.3")
    })?;
    let kind = predicted_kind(kind.trim())?;
    let value = crate::model::units::parse_number(value)?;
    if value > 0.0 {
        Ok((kind, value))
    } else {
        Err(format!("`{text}`: a precision is above zero"))
    }
}

/// One kind's summary for people.
pub fn summary_text(s: &KindSummary) -> String {
    let mut out = String::new();
    let u = &s.unit;
    let _ = write!(
        out,
        "{}: n = {}, bias {:+.3} {u}, RMSE {:.3} {u}",
        s.kind, s.n, s.bias, s.rmse
    );
    if let (Some(sd), Some(se)) = (s.sd, s.standard_error) {
        let _ = write!(
            out,
            ", sd {sd:.3} {u} (standard error of the bias {se:.3} {u})"
        );
    }
    let _ = writeln!(out);
    let _ = writeln!(out, "  worst, furthest from the usual difference first:");
    for b in &s.worst {
        let _ = writeln!(
            out,
            "    {} {:+.3} {u} (predicted {:.2}, measured {:.2})",
            b.batch_code, b.difference, b.predicted, b.measured
        );
    }
    if s.flagged.is_empty() {
        let _ = writeln!(out, "  none far off");
    }
    for b in &s.flagged {
        let _ = writeln!(
            out,
            "  far off: {} is {:+.3} {u} from the usual difference (allowed {:.3}); likely causes: {}",
            b.batch_code,
            b.departure,
            b.allowed,
            b.likely_causes.join("; ")
        );
    }
    for l in render_chart(s, CHART.0, CHART.1) {
        let _ = writeln!(out, "  {l}");
    }
    out
}

/// Prints the summaries; says so on stderr when there is nothing to compare.
pub fn print(pairs: &[(measure::Comparison, Option<f64>)], json: bool) -> anyhow::Result<ExitCode> {
    let plain: Vec<measure::Comparison> = pairs.iter().map(|(c, _)| c.clone()).collect();
    let summaries = summarise(&plain)?;
    if summaries.is_empty() {
        eprintln!("no measured figure of these batches has a prediction to set it against");
    }
    let mut out = String::new();
    for s in &summaries {
        let corrected = with_corrections(pairs, &s.kind);
        if json {
            let mut value = serde_json::to_value(s)?;
            if let Some(object) = value.as_object_mut() {
                object.insert("calibrated".into(), serde_json::to_value(corrected)?);
            }
            let _ = writeln!(out, "{value}");
        } else {
            out.push_str(&summary_text(s));
            if let Some(k) = corrected {
                let _ = writeln!(
                    out,
                    "  with the corrections in force ({} of {} batches corrected): bias {:+.3} {u}, RMSE {:.3} {u}",
                    k.corrected,
                    s.n,
                    k.bias,
                    k.rmse,
                    u = s.unit
                );
            }
            out.push('\n');
        }
    }
    std::io::Write::write_all(&mut std::io::stdout().lock(), out.as_bytes())?;
    Ok(ExitCode::SUCCESS)
}

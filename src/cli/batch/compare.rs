//! `gelu batch compare`: predicted against measured over the batches of the log,
//! per kind: the count, the bias (mean of measured minus predicted), the RMSE,
//! the batches furthest off, those far enough off to flag with their likely
//! causes, and a text chart; `--json` prints one object per kind per line.

use std::fmt::Write as _;
use std::process::ExitCode;

use serde::Serialize;

use crate::batch::compare::{LogSetting, measured_pairs};
use crate::batch::{BatchFilter, MeasurementKind};
use crate::measure::{self, KindSummary, render_chart, summarise};
use crate::model::Style;
use crate::store::Store;

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

/// Every measured figure of the batches `filter` selects (and of `style`, and
/// of `kind`) paired with its prediction, and the corrected prediction when a
/// correction is in force for it.
pub fn gather(
    store: &Store,
    filter: &BatchFilter,
    style: Option<Style>,
    kind: Option<MeasurementKind>,
    setting: &LogSetting,
) -> anyhow::Result<Vec<(measure::Comparison, Option<f64>)>> {
    let mut pairs = Vec::new();
    store.each_batch(filter, |b| {
        pairs.extend(measured_pairs(b, &setting.setting(), style, kind));
        Ok(())
    })?;
    // Oldest first, so the chart and the lists read in time order.
    pairs.reverse();
    Ok(pairs)
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

/// The statistics of one kind with the corrections in force applied.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct WithCorrections {
    /// How many of the kind's batches a correction applied to.
    pub corrected: usize,
    /// Mean of measured minus the prediction as corrected.
    pub bias: f64,
    /// Root-mean-square of the same.
    pub rmse: f64,
}

/// The statistics of `kind` with each corrected prediction in place of the
/// plain one; `None` when no correction applied to any of its batches.
pub fn with_corrections(
    pairs: &[(measure::Comparison, Option<f64>)],
    kind: &str,
) -> Option<WithCorrections> {
    let of_kind: Vec<&(measure::Comparison, Option<f64>)> =
        pairs.iter().filter(|(c, _)| c.kind == kind).collect();
    let corrected = of_kind.iter().filter(|(_, k)| k.is_some()).count();
    if corrected == 0 {
        return None;
    }
    let d: Vec<f64> = of_kind
        .iter()
        .map(|(c, k)| c.measured - k.unwrap_or(c.predicted))
        .collect();
    let n = d.len() as f64;
    Some(WithCorrections {
        corrected,
        bias: d.iter().sum::<f64>() / n,
        rmse: (d.iter().map(|x| x * x).sum::<f64>() / n).sqrt(),
    })
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

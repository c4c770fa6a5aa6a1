//! `gelu batch calibrate` and `gelu batch calibrations`: a correction per recipe
//! or per style fitted from the logged batches ([`crate::measure::fit_correction`],
//! shrunk toward zero when there are few), shown with how it would change the
//! predictions, and put in force only when asked (`--turn-on`), as a new
//! version in the log; `--turn-off` takes it out. Nothing is ever corrected
//! silently: a corrected figure is always shown as such, beside the plain one.

use std::fmt::Write as _;
use std::process::ExitCode;

use serde::Serialize;
use serde_json::json;

use crate::batch::compare::{LogSetting, WithCorrections, fit_for, with_corrections};
use crate::batch::{BatchFilter, MeasurementKind};
use crate::measure::{CalibrationError, Correction, Scope};
use crate::model::Style;
use crate::report::batch_text::minute_text;
use crate::store::{CalibrationVersion, Store, StoreError, scope_words};

/// What to calibrate.
#[derive(Debug, Clone)]
pub struct Request {
    /// The kind.
    pub kind: MeasurementKind,
    /// One recipe, by name.
    pub recipe: Option<String>,
    /// Or one style.
    pub style: Option<Style>,
    /// Only batches made since.
    pub since: Option<chrono::DateTime<chrono::Utc>>,
}

impl Request {
    fn scope(&self) -> Scope {
        match (&self.recipe, self.style) {
            (Some(name), _) => Scope::Recipe(name.clone()),
            (None, Some(style)) => Scope::Style(style.as_str().to_string()),
            (None, None) => Scope::Style(Style::default().as_str().to_string()),
        }
    }
}

/// One batch with its prediction before and after the correction.
#[derive(Debug, Clone, Serialize)]
struct Changed {
    batch_code: String,
    predicted: f64,
    calibrated: f64,
    measured: f64,
}

/// The fitted correction and what it would change.
#[derive(Debug, Clone, Serialize)]
struct Preview {
    correction: Correction,
    before: WithCorrections,
    after: WithCorrections,
    batches: Vec<Changed>,
}

fn version_in_force(
    store: &Store,
    kind: &str,
    scope: &Scope,
) -> anyhow::Result<Option<CalibrationVersion>> {
    Ok(store
        .calibration_versions()?
        .into_iter()
        .find(|v| v.in_force && v.correction.kind == kind && &v.correction.scope == scope))
}

fn in_force_text(v: &Option<CalibrationVersion>) -> String {
    match v {
        None => "none".into(),
        Some(v) => format!(
            "version {}, {} (turned on {} by {})",
            v.version,
            v.correction.basis,
            minute_text(&v.fitted_at),
            v.fitted_by
        ),
    }
}

fn preview(
    store: &Store,
    request: &Request,
    log: &LogSetting,
) -> anyhow::Result<Result<Preview, CalibrationError>> {
    let filter = BatchFilter {
        recipe: request.recipe.clone(),
        since: request.since,
        ..BatchFilter::default()
    };
    let pairs = store.measured_pairs(&filter, request.style, Some(request.kind), &log.setting())?;
    let kind = request.kind.as_str();
    let plain: Vec<_> = pairs.iter().map(|(c, _)| c.clone()).collect();
    let correction = match fit_for(kind, &request.scope(), &pairs) {
        Ok(c) => c,
        Err(e) => return Ok(Err(e)),
    };
    let stats = |shift: f64| {
        let shifted: Vec<_> = plain
            .iter()
            .map(|c| (c.clone(), Some(c.predicted + shift)))
            .collect();
        with_corrections(&shifted, kind)
    };
    let (Some(before), Some(after)) = (stats(0.0), stats(correction.offset)) else {
        anyhow::bail!("no batches to compare");
    };
    let batches = plain
        .iter()
        .rev()
        .map(|c| Changed {
            batch_code: c.batch_code.clone(),
            predicted: c.predicted,
            calibrated: correction.apply(c.predicted),
            measured: c.measured,
        })
        .collect();
    Ok(Ok(Preview {
        correction,
        before,
        after,
        batches,
    }))
}

fn preview_text(p: &Preview, in_force: &Option<CalibrationVersion>) -> String {
    let c = &p.correction;
    let u = &c.unit;
    let mut out = String::new();
    let _ = writeln!(
        out,
        "Correction of {} for {}: {}",
        c.kind,
        scope_words(&c.scope),
        c.basis
    );
    let _ = writeln!(
        out,
        "  standard error {:.3} {u}; batch-to-batch spread {:.3} {u}",
        c.standard_error, c.batch_spread
    );
    let _ = writeln!(out, "  how it changes the predictions, newest first:");
    for b in p.batches.iter().take(10) {
        let _ = writeln!(
            out,
            "    {}  predicted {:.2} -> calibrated {:.2}, measured {:.2}",
            b.batch_code, b.predicted, b.calibrated, b.measured
        );
    }
    if p.batches.len() > 10 {
        let _ = writeln!(out, "    ... and {} more", p.batches.len() - 10);
    }
    let _ = writeln!(
        out,
        "  over these batches: bias {:+.3} {u} -> {:+.3} {u}, RMSE {:.3} {u} -> {:.3} {u}",
        p.before.bias, p.after.bias, p.before.rmse, p.after.rmse
    );
    let _ = writeln!(out, "  in force now: {}", in_force_text(in_force));
    out
}

/// Runs `gelu batch calibrate`.
pub fn run(
    store: &mut Store,
    request: &Request,
    precisions: &[(MeasurementKind, f64)],
    turn: Option<bool>,
    by: &str,
    json: bool,
) -> anyhow::Result<ExitCode> {
    let scope = request.scope();
    let kind = request.kind.as_str();
    if turn == Some(false) {
        return match store.turn_off_correction(kind, &scope, by) {
            Ok(()) => {
                println!(
                    "The correction of {kind} for {} is turned off by {by}; its versions stay in the log.",
                    scope_words(&scope)
                );
                Ok(ExitCode::SUCCESS)
            }
            Err(StoreError::Invalid(why)) => {
                eprintln!("gelu: {why}; nothing was written");
                Ok(ExitCode::from(1))
            }
            Err(e) => Err(e.into()),
        };
    }
    let mut log = store.log_setting()?;
    log.override_precisions(precisions);
    let p = match preview(store, request, &log)? {
        Ok(p) => p,
        Err(e) => {
            eprintln!("gelu: {e} ({}); nothing was written", scope_words(&scope));
            return Ok(ExitCode::from(1));
        }
    };
    let turned_on = if turn == Some(true) {
        Some(store.turn_on_correction(&p.correction, by)?)
    } else {
        None
    };
    let in_force = version_in_force(store, kind, &scope)?;
    if json {
        let mut value = serde_json::to_value(&p)?;
        if let Some(object) = value.as_object_mut() {
            object.insert(
                "in_force".into(),
                in_force.as_ref().map(version_json).into(),
            );
            object.insert("turned_on".into(), turned_on.into());
        }
        println!("{value}");
        return Ok(ExitCode::SUCCESS);
    }
    print!("{}", preview_text(&p, &in_force));
    match turned_on {
        Some(v) => println!(
            "Turned on as version {v} by {by}. Calibrated figures are marked as such, with the plain prediction beside them."
        ),
        None => println!("Nothing is changed until you put it in force: add --turn-on."),
    }
    Ok(ExitCode::SUCCESS)
}

fn version_json(v: &CalibrationVersion) -> serde_json::Value {
    let (scope, name) = match &v.correction.scope {
        Scope::Style(n) => ("style", n),
        Scope::Recipe(n) => ("recipe", n),
    };
    json!({
        "kind": v.correction.kind,
        "scope": scope,
        "name": name,
        "version": v.version,
        "offset": v.correction.offset,
        "unit": v.correction.unit,
        "basis": v.correction.basis,
        "fitted_at": crate::model::time::time_text(&v.fitted_at),
        "fitted_by": v.fitted_by,
        "in_force": v.in_force,
        "correction": v.correction,
    })
}

/// Runs `gelu batch calibrations`: every version, then every switch.
pub fn history(store: &Store, json: bool) -> anyhow::Result<ExitCode> {
    let versions = store.calibration_versions()?;
    let switches = store.calibration_switches()?;
    if versions.is_empty() {
        eprintln!("no correction has been stored; `gelu batch calibrate` fits one");
    }
    for v in &versions {
        if json {
            println!("{}", version_json(v));
        } else {
            println!(
                "{} for {}: version {}, {}; stored {} by {}{}",
                v.correction.kind,
                scope_words(&v.correction.scope),
                v.version,
                v.correction.basis,
                minute_text(&v.fitted_at),
                v.fitted_by,
                if v.in_force { "; IN FORCE" } else { "" }
            );
        }
    }
    for s in &switches {
        let (scope, name) = match &s.scope {
            Scope::Style(n) => ("style", n),
            Scope::Recipe(n) => ("recipe", n),
        };
        if json {
            println!(
                "{}",
                json!({
                    "kind": s.kind, "scope": scope, "name": name,
                    "switched": if s.version.is_some() { "on" } else { "off" },
                    "version": s.version,
                    "at": crate::model::time::time_text(&s.at), "by": s.by,
                })
            );
        } else {
            let what = match s.version {
                Some(v) => format!("version {v} turned on"),
                None => "turned off".into(),
            };
            println!(
                "{} {} for {}: {what} by {}",
                minute_text(&s.at),
                s.kind,
                scope_words(&s.scope),
                s.by
            );
        }
    }
    Ok(ExitCode::SUCCESS)
}

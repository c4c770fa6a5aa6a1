//! `gelu batch precision [KIND=PRECISION]...`: the log's own instrument
//! precisions, which `batch compare` and `batch calibrate` weigh and judge
//! readings by (the usual ones of `measure::KINDS` where none is set).

use std::process::ExitCode;

use crate::batch::MeasurementKind;
use crate::measure::kind_defaults;
use crate::model::units::trim_number;
use crate::store::Store;

use super::compare::predicted_kind;

/// Reads `KIND=PRECISION` (above zero) or `KIND=usual` (back to the usual one).
pub fn setting(text: &str) -> Result<(MeasurementKind, Option<f64>), String> {
    let (kind, value) = text.split_once('=').ok_or_else(|| {
        format!("`{text}` should look like KIND=PRECISION (freezing-point-c=0.3) or KIND=usual")
    })?;
    let kind = predicted_kind(kind.trim())?;
    if value.trim().eq_ignore_ascii_case("usual") {
        return Ok((kind, None));
    }
    let p = crate::model::units::parse_number(value)?;
    if p > 0.0 {
        Ok((kind, Some(p)))
    } else {
        Err(format!("`{text}`: a precision is above zero"))
    }
}

/// Sets what `set` asks, then lists every predicted kind's precision and where
/// it comes from.
pub fn run(store: &mut Store, set: &[(MeasurementKind, Option<f64>)]) -> anyhow::Result<ExitCode> {
    for (kind, p) in set {
        store.set_instrument_precision(*kind, *p)?;
    }
    let own = store.instrument_precisions()?;
    for kind in MeasurementKind::ALL
        .into_iter()
        .filter(|k| k.prediction_key().is_some())
    {
        let Some(d) = kind_defaults(kind.as_str()) else {
            continue;
        };
        let (p, source) = match own.iter().find(|(k, _)| *k == kind) {
            Some((_, p)) => (*p, "this log"),
            None => (d.precision, "usual"),
        };
        println!(
            "{:<18} {} {} ({source})",
            kind.as_str(),
            trim_number(p),
            d.difference_unit
        );
    }
    Ok(ExitCode::SUCCESS)
}

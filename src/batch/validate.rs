//! What a batch record must satisfy before anything of it is written, checked in
//! one place for new batches, trail entries and imports alike. (The schema checks
//! what it can itself; these are the rules it cannot express.)

use super::Invalid;
use super::types::Batch;

type Result<T> = std::result::Result<T, Invalid>;

/// A number that must be finite (not NaN or infinite); `what` names it.
pub fn check_finite(what: &str, value: f64) -> Result<()> {
    if value.is_finite() {
        Ok(())
    } else {
        Err(Invalid(format!("{what} must be a number, not {value}")))
    }
}

/// A name or text that must not be empty or blank; `what` names it.
pub fn check_name(what: &str, name: &str) -> Result<()> {
    if name.trim().is_empty() {
        Err(Invalid(format!("{what} must not be empty")))
    } else {
        Ok(())
    }
}

/// The whole record: names, a positive size, finite masses.
pub fn check_record(batch: &Batch) -> Result<()> {
    check_name("the operator", &batch.operator)?;
    check_finite("the batch size", batch.size_g)?;
    if batch.size_g <= 0.0 {
        return Err(Invalid(format!(
            "a batch size of {} g is not possible; give a size above zero",
            batch.size_g
        )));
    }
    for line in &batch.lines {
        check_finite("a planned mass", line.planned_g)?;
        if let Some(a) = line.actual_g {
            check_finite("an actual mass", a)?;
        }
    }
    for n in &batch.notes {
        check_name("a note", &n.text)?;
    }
    for m in &batch.measurements {
        check_finite(m.kind.as_str(), m.value)?;
    }
    for a in &batch.amendments {
        check_name("the reason for an amendment", &a.reason)?;
    }
    Ok(())
}

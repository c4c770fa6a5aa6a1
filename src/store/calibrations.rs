//! Calibration versions and the switches that put them in force or take them
//! out (schema migration 3), both append-only. A correction is stored as the
//! JSON of [`crate::measure::Correction`], as fitted; nothing here fits or applies one.

use chrono::{DateTime, Utc};
use rusqlite::{OptionalExtension, Transaction, params};

use super::Store;
use super::error::{Result, StoreError};
use crate::batch::validate::check_name;
use crate::clock;
use crate::measure::{Correction, Scope};
use crate::model::time::{parse_time, time_text};

/// One stored version of a correction.
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrationVersion {
    /// Version number, from 1 per kind and scope.
    pub version: u32,
    /// The correction as fitted.
    pub correction: Correction,
    /// When it was fitted and stored.
    pub fitted_at: DateTime<Utc>,
    /// Who stored it.
    pub fitted_by: String,
    /// Whether it is the one in force for its kind and scope now.
    pub in_force: bool,
}

/// A correction put in force, or taken out.
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrationSwitch {
    /// The kind.
    pub kind: String,
    /// The scope.
    pub scope: Scope,
    /// The version put in force; `None` when the correction was turned off.
    pub version: Option<u32>,
    /// When.
    pub at: DateTime<Utc>,
    /// By whom.
    pub by: String,
}

fn scope_columns(scope: &Scope) -> (&'static str, &str) {
    match scope {
        Scope::Style(name) => ("style", name),
        Scope::Recipe(name) => ("recipe", name),
    }
}

fn scope_of(kind: &str, name: String) -> Scope {
    if kind == "style" {
        Scope::Style(name)
    } else {
        Scope::Recipe(name)
    }
}

fn time(text: &str) -> Result<DateTime<Utc>> {
    parse_time(text).map_err(StoreError::Invalid)
}

fn correction(text: &str) -> Result<Correction> {
    serde_json::from_str(text)
        .map_err(|e| StoreError::Invalid(format!("a stored correction does not read: {e}")))
}

/// The id of the correction in force for a kind and scope, if any.
fn in_force_id(tx: &Transaction, kind: &str, scope: &Scope) -> Result<Option<i64>> {
    let (scope, name) = scope_columns(scope);
    Ok(tx
        .query_row(
            "SELECT calibration_id FROM calibration_switches
             WHERE kind = ?1 AND scope = ?2 AND scope_name = ?3 ORDER BY id DESC LIMIT 1",
            params![kind, scope, name],
            |r| r.get::<_, Option<i64>>(0),
        )
        .optional()?
        .flatten())
}

fn switch(tx: &Transaction, kind: &str, scope: &Scope, id: Option<i64>, by: &str) -> Result<()> {
    let (scope, name) = scope_columns(scope);
    tx.execute(
        "INSERT INTO calibration_switches
             (kind, scope, scope_name, calibration_id, switched_at, switched_by)
         VALUES (?1, ?2, ?3, ?4, ?5, ?6)",
        params![kind, scope, name, id, time_text(&clock::now()), by],
    )?;
    Ok(())
}

impl Store {
    /// Stores `correction` as the next version for its kind and scope and puts
    /// it in force, in one transaction; returns its version number.
    pub fn turn_on_correction(&mut self, correction: &Correction, by: &str) -> Result<u32> {
        check_name("the name of who turns the correction on", by)?;
        let json = serde_json::to_string(correction)
            .map_err(|e| StoreError::Invalid(format!("the correction cannot be written: {e}")))?;
        self.write(|tx| {
            let (scope, name) = scope_columns(&correction.scope);
            let version: u32 = tx.query_row(
                "SELECT coalesce(max(version), 0) + 1 FROM calibrations
                 WHERE kind = ?1 AND scope = ?2 AND scope_name = ?3",
                params![correction.kind, scope, name],
                |r| r.get(0),
            )?;
            tx.execute(
                "INSERT INTO calibrations
                     (kind, scope, scope_name, version, correction, fitted_at, fitted_by)
                 VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7)",
                params![
                    correction.kind,
                    scope,
                    name,
                    version,
                    json,
                    time_text(&clock::now()),
                    by
                ],
            )?;
            let id = tx.last_insert_rowid();
            switch(tx, &correction.kind, &correction.scope, Some(id), by)?;
            Ok(version)
        })
    }

    /// Takes the correction for `kind` and `scope` out of force (a new switch);
    /// refused when none is in force.
    pub fn turn_off_correction(&mut self, kind: &str, scope: &Scope, by: &str) -> Result<()> {
        check_name("the name of who turns the correction off", by)?;
        self.write(|tx| {
            if in_force_id(tx, kind, scope)?.is_none() {
                return Err(StoreError::Invalid(format!(
                    "no correction of {kind} for {} is in force",
                    scope_words(scope)
                )));
            }
            switch(tx, kind, scope, None, by)
        })
    }

    /// The corrections in force, one per kind and scope, by kind and scope.
    pub fn corrections_in_force(&self) -> Result<Vec<Correction>> {
        Ok(self
            .calibration_versions()?
            .into_iter()
            .filter(|v| v.in_force)
            .map(|v| v.correction)
            .collect())
    }

    /// Every stored version, by kind, scope and version.
    pub fn calibration_versions(&self) -> Result<Vec<CalibrationVersion>> {
        let mut stmt = self.conn.prepare(
            "SELECT c.version, c.correction, c.fitted_at, c.fitted_by,
                    c.id = (SELECT s.calibration_id FROM calibration_switches s
                            WHERE s.kind = c.kind AND s.scope = c.scope
                              AND s.scope_name = c.scope_name
                            ORDER BY s.id DESC LIMIT 1)
             FROM calibrations c ORDER BY c.kind, c.scope, c.scope_name, c.version",
        )?;
        let rows = stmt.query_map([], |r| {
            Ok((
                r.get::<_, u32>(0)?,
                r.get::<_, String>(1)?,
                r.get::<_, String>(2)?,
                r.get::<_, String>(3)?,
                r.get::<_, Option<bool>>(4)?,
            ))
        })?;
        let mut out = Vec::new();
        for row in rows {
            let (version, json, at, by, in_force) = row?;
            out.push(CalibrationVersion {
                version,
                correction: correction(&json)?,
                fitted_at: time(&at)?,
                fitted_by: by,
                in_force: in_force.unwrap_or(false),
            });
        }
        Ok(out)
    }

    /// Every switch, oldest first.
    pub fn calibration_switches(&self) -> Result<Vec<CalibrationSwitch>> {
        let mut stmt = self.conn.prepare(
            "SELECT s.kind, s.scope, s.scope_name, c.version, s.switched_at, s.switched_by
             FROM calibration_switches s LEFT JOIN calibrations c ON c.id = s.calibration_id
             ORDER BY s.id",
        )?;
        let rows = stmt.query_map([], |r| {
            Ok((
                r.get::<_, String>(0)?,
                r.get::<_, String>(1)?,
                r.get::<_, String>(2)?,
                r.get::<_, Option<u32>>(3)?,
                r.get::<_, String>(4)?,
                r.get::<_, String>(5)?,
            ))
        })?;
        let mut out = Vec::new();
        for row in rows {
            let (kind, scope, name, version, at, by) = row?;
            out.push(CalibrationSwitch {
                kind,
                scope: scope_of(&scope, name),
                version,
                at: time(&at)?,
                by,
            });
        }
        Ok(out)
    }
}

/// A scope in words: `recipe "Harbour vanilla"` or `style ice-cream`.
pub fn scope_words(scope: &Scope) -> String {
    match scope {
        Scope::Recipe(name) => format!("recipe \"{name}\""),
        Scope::Style(name) => format!("style {name}"),
    }
}

//! The amendment trail as pure logic: turning requested edits into recorded
//! changes (each with the value it replaces), applying a trail to the record as
//! first written, and undoing it (to rebuild that first record on import).
//!
//! Both directions check that the record holds what a change says it found: a
//! change applies only over its `old` value and is undone only over its `new` one.
//! A trail that contradicts its record is refused, never silently believed.
//! Readings and notes are named by position; a struck one keeps its place.

use std::fmt;

use super::Invalid;
use super::types::{Batch, BatchLine, Change, Measurement, Note};
use super::validate;
use crate::model::time::minute_text;

type Result<T> = std::result::Result<T, Invalid>;

/// Which line of a batch a request means: by its 1-based number, or every line of
/// an ingredient.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum LineRef {
    /// The line with this 1-based number.
    Number(usize),
    /// Every line of this ingredient id.
    Ingredient(String),
}

impl LineRef {
    /// Reads a line as people name it: a whole number is a line number, anything
    /// else an ingredient id.
    pub fn parse(text: &str) -> LineRef {
        let t = text.trim();
        match t.parse::<usize>() {
            Ok(n) => LineRef::Number(n),
            Err(_) => LineRef::Ingredient(t.to_owned()),
        }
    }
}

impl fmt::Display for LineRef {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            LineRef::Number(n) => write!(f, "line {n}"),
            LineRef::Ingredient(id) => write!(f, "`{id}`"),
        }
    }
}

/// One edit the user asks for.
#[derive(Debug, Clone, PartialEq)]
pub enum Edit {
    /// Set the operator's name.
    Operator(String),
    /// Set the weighed mass of a line (g).
    ActualG {
        /// The line (an ingredient must then be on one line only).
        line: LineRef,
        /// Mass weighed (g).
        grams: f64,
    },
    /// Set the supplier lot of a line (of every line of that ingredient).
    Lot {
        /// The line or lines.
        line: LineRef,
        /// The lot.
        lot: String,
    },
    /// Add a reading taken after sign-off.
    AddReading(Measurement),
    /// Add a note written after sign-off.
    AddNote(Note),
    /// Strike out the reading at this 1-based position.
    StrikeReading(usize),
    /// Correct the value of the reading at a 1-based position (in its kind's unit);
    /// its kind, time and taker stay.
    ReplaceReading {
        /// The reading's position.
        reading: usize,
        /// The corrected value.
        value: f64,
    },
    /// Strike out the note at this 1-based position.
    StrikeNote(usize),
    /// Correct the text of the note at a 1-based position; its time and author stay.
    ReplaceNote {
        /// The note's position.
        note: usize,
        /// The corrected text.
        text: String,
    },
}

/// The 0-based indexes of the lines `key` names: one line, or every line of an
/// ingredient.
pub fn resolve_lines(lines: &[BatchLine], key: &LineRef) -> Result<Vec<usize>> {
    match key {
        LineRef::Number(n) => {
            if *n >= 1 && *n <= lines.len() {
                Ok(vec![n - 1])
            } else {
                Err(Invalid(format!(
                    "there is no line {n}; the batch has lines 1 to {}",
                    lines.len()
                )))
            }
        }
        LineRef::Ingredient(id) => {
            let found: Vec<usize> = (0..lines.len())
                .filter(|&i| lines[i].ingredient == *id)
                .collect();
            if found.is_empty() {
                let known: Vec<&str> = lines.iter().map(|l| l.ingredient.as_str()).collect();
                return Err(Invalid(format!(
                    "the batch has no line of `{id}`; its ingredients are {}",
                    known.join(", ")
                )));
            }
            Ok(found)
        }
    }
}

/// The entry at 1-based `position` of a list of readings or notes (`what` names them).
fn entry<'a, T>(list: &'a mut [T], position: usize, what: &str) -> Result<&'a mut T> {
    let count = list.len();
    position
        .checked_sub(1)
        .and_then(|i| list.get_mut(i))
        .ok_or_else(|| {
            Invalid(if count == 0 {
                format!("there is no {what} {position}; the batch has none")
            } else {
                format!("there is no {what} {position}; the batch has {what}s 1 to {count}")
            })
        })
}

/// Turns edits into changes against the record as it stands.
pub fn changes_for(edits: &[Edit], batch: &Batch) -> Result<Vec<Change>> {
    let mut current = batch.clone();
    let mut changes = Vec::new();
    for edit in edits {
        let new = change_for(edit, &mut current)?;
        for change in &new {
            validate::check_change(change)?;
            apply(change, &mut current)?;
        }
        changes.extend(new);
    }
    Ok(changes)
}

/// The changes one edit makes to `current`.
fn change_for(edit: &Edit, current: &mut Batch) -> Result<Vec<Change>> {
    let lines = &current.lines;
    Ok(match edit {
        Edit::Operator(name) => vec![Change::Operator {
            old: current.operator.clone(),
            new: name.clone(),
        }],
        Edit::ActualG { line, grams } => {
            let found = resolve_lines(lines, line)?;
            if found.len() > 1 {
                let numbers: Vec<String> = found.iter().map(|i| (i + 1).to_string()).collect();
                return Err(Invalid(format!(
                    "{line} is on lines {}; name the line by its number",
                    numbers.join(" and ")
                )));
            }
            found
                .into_iter()
                .map(|i| Change::ActualG {
                    line: i + 1,
                    ingredient: lines[i].ingredient.clone(),
                    old: lines[i].actual_g,
                    new: *grams,
                })
                .collect()
        }
        Edit::Lot { line, lot } => resolve_lines(lines, line)?
            .into_iter()
            .map(|i| Change::Lot {
                line: i + 1,
                ingredient: lines[i].ingredient.clone(),
                old: lines[i].lot.clone(),
                new: lot.clone(),
            })
            .collect(),
        Edit::AddReading(m) => vec![Change::AddReading(m.clone())],
        Edit::AddNote(n) => vec![Change::AddNote(n.clone())],
        Edit::StrikeReading(reading) => {
            let old = entry(&mut current.measurements, *reading, "reading")?.clone();
            vec![Change::StrikeReading {
                reading: *reading,
                old,
            }]
        }
        Edit::ReplaceReading { reading, value } => {
            let old = entry(&mut current.measurements, *reading, "reading")?.clone();
            let new = Measurement {
                value: *value,
                ..old.clone()
            };
            vec![Change::ReplaceReading {
                reading: *reading,
                old,
                new,
            }]
        }
        Edit::StrikeNote(note) => {
            let old = entry(&mut current.notes, *note, "note")?.clone();
            vec![Change::StrikeNote { note: *note, old }]
        }
        Edit::ReplaceNote { note, text } => {
            let old = entry(&mut current.notes, *note, "note")?.clone();
            let new = Note {
                text: text.clone(),
                ..old.clone()
            };
            vec![Change::ReplaceNote {
                note: *note,
                old,
                new,
            }]
        }
    })
}

fn line_mut(lines: &mut [BatchLine], line: usize) -> Result<&mut BatchLine> {
    let count = lines.len();
    line.checked_sub(1)
        .and_then(|i| lines.get_mut(i))
        .ok_or_else(|| {
            Invalid(format!(
                "an amendment names line {line}, but the batch has {count} lines"
            ))
        })
}

/// Refuses unless the record holds what a change says it holds.
fn expect<T: PartialEq + fmt::Debug>(what: &str, found: &T, said: &T) -> Result<()> {
    if found == said {
        Ok(())
    } else {
        Err(Invalid(format!(
            "{what} is {found:?} on the record, but the trail says {said:?}"
        )))
    }
}

/// A reading or a note: an entry of a record that keeps its place once struck.
trait Entry: Clone + PartialEq + fmt::Debug {
    /// What it is called, with its position: "reading 2".
    const WHAT: &'static str;
    fn struck(&self) -> bool;
    fn set_struck(&mut self, struck: bool);
    /// The entry with its struck mark cleared, to compare with what a change says.
    fn unmarked(&self) -> Self {
        let mut e = self.clone();
        e.set_struck(false);
        e
    }
}

impl Entry for Measurement {
    const WHAT: &'static str = "reading";
    fn struck(&self) -> bool {
        self.struck
    }
    fn set_struck(&mut self, struck: bool) {
        self.struck = struck;
    }
}

impl Entry for Note {
    const WHAT: &'static str = "note";
    fn struck(&self) -> bool {
        self.struck
    }
    fn set_struck(&mut self, struck: bool) {
        self.struck = struck;
    }
}

/// The entry at `position`, which must be `said` and struck out or not as `struck`.
fn found<'a, T: Entry>(
    list: &'a mut [T],
    position: usize,
    said: &T,
    struck: bool,
) -> Result<&'a mut T> {
    let what = format!("{} {position}", T::WHAT);
    let e = entry(list, position, T::WHAT)?;
    if e.struck() != struck {
        let state = |s: bool| if s { "struck out" } else { "not struck out" };
        return Err(Invalid(format!(
            "{what} is {} on the record, but the trail says it is {}",
            state(e.struck()),
            state(struck)
        )));
    }
    expect(&what, &e.unmarked(), &said.unmarked())?;
    Ok(e)
}

/// Strikes out (`to` = true) or restores the entry at `position`, which must be `said`.
fn mark<T: Entry>(list: &mut [T], position: usize, said: &T, to: bool) -> Result<()> {
    found(list, position, said, !to)?.set_struck(to);
    Ok(())
}

/// Replaces the entry at `position`, which must be `from` and not struck, by `to`.
fn replace<T: Entry>(list: &mut [T], position: usize, from: &T, to: &T) -> Result<()> {
    *found(list, position, from, false)? = to.unmarked();
    Ok(())
}

/// Takes back the last entry, which must be `said` and not struck.
fn pop<T: Entry>(list: &mut Vec<T>, said: &T) -> Result<()> {
    let last = list.len();
    found(list, last, said, false)?;
    list.pop();
    Ok(())
}

/// Applies one change to the record, which must hold what the change replaces.
pub fn apply(change: &Change, b: &mut Batch) -> Result<()> {
    match change {
        Change::Operator { old, new } => {
            expect("the operator", &b.operator, old)?;
            b.operator = new.clone();
        }
        Change::ActualG { line, old, new, .. } => {
            let l = line_mut(&mut b.lines, *line)?;
            expect(
                &format!("the weighed mass of line {line}"),
                &l.actual_g,
                old,
            )?;
            l.actual_g = Some(*new);
        }
        Change::Lot { line, old, new, .. } => {
            let l = line_mut(&mut b.lines, *line)?;
            expect(&format!("the lot of line {line}"), &l.lot, old)?;
            l.lot = new.clone();
        }
        Change::AddReading(m) => b.measurements.push(m.unmarked()),
        Change::AddNote(n) => b.notes.push(n.unmarked()),
        Change::StrikeReading { reading, old } => mark(&mut b.measurements, *reading, old, true)?,
        Change::ReplaceReading { reading, old, new } => {
            replace(&mut b.measurements, *reading, old, new)?
        }
        Change::StrikeNote { note, old } => mark(&mut b.notes, *note, old, true)?,
        Change::ReplaceNote { note, old, new } => replace(&mut b.notes, *note, old, new)?,
    }
    Ok(())
}

/// Undoes one change: the record, which must hold what the change made, goes
/// back to what it was before it.
pub fn revert(change: &Change, b: &mut Batch) -> Result<()> {
    match change {
        Change::Operator { old, new } => {
            expect("the operator", &b.operator, new)?;
            b.operator = old.clone();
        }
        Change::ActualG { line, old, new, .. } => {
            let l = line_mut(&mut b.lines, *line)?;
            expect(
                &format!("the weighed mass of line {line}"),
                &l.actual_g,
                &Some(*new),
            )?;
            l.actual_g = *old;
        }
        Change::Lot { line, old, new, .. } => {
            let l = line_mut(&mut b.lines, *line)?;
            expect(&format!("the lot of line {line}"), &l.lot, new)?;
            l.lot = old.clone();
        }
        Change::AddReading(m) => pop(&mut b.measurements, m)?,
        Change::AddNote(n) => pop(&mut b.notes, n)?,
        Change::StrikeReading { reading, old } => mark(&mut b.measurements, *reading, old, false)?,
        Change::ReplaceReading { reading, old, new } => {
            replace(&mut b.measurements, *reading, new, old)?
        }
        Change::StrikeNote { note, old } => mark(&mut b.notes, *note, old, false)?,
        Change::ReplaceNote { note, old, new } => replace(&mut b.notes, *note, new, old)?,
    }
    Ok(())
}

/// A reading in words: `draw-temp-c -6.5 °C (Ines, 2026-12-01 23:10 UTC)`.
fn reading_words(m: &Measurement) -> String {
    format!(
        "{} {} {} ({}, {})",
        m.kind.as_str(),
        m.value,
        m.kind.unit(),
        m.by,
        minute_text(&m.taken_at)
    )
}

/// A note in words: `"text" (Jon, 2026-12-01 23:10 UTC)`.
fn note_words(n: &Note) -> String {
    format!("\"{}\" ({}, {})", n.text, n.by, minute_text(&n.written_at))
}

/// A change in words, for people (text output and the workspace).
impl fmt::Display for Change {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let grams = |g: Option<f64>| g.map_or("-".to_owned(), |g| format!("{g} g"));
        match self {
            Change::Operator { old, new } => write!(f, "operator: {old} -> {new}"),
            Change::ActualG {
                line,
                ingredient,
                old,
                new,
            } => write!(
                f,
                "line {line} ({ingredient}) weighed: {} -> {}",
                grams(*old),
                grams(Some(*new))
            ),
            Change::Lot {
                line,
                ingredient,
                old,
                new,
            } => {
                let lot = |l: &str| {
                    if l.is_empty() {
                        "-".to_owned()
                    } else {
                        l.to_owned()
                    }
                };
                write!(
                    f,
                    "line {line} ({ingredient}) lot: {} -> {}",
                    lot(old),
                    lot(new)
                )
            }
            Change::AddReading(m) => write!(f, "reading added: {}", reading_words(m)),
            Change::AddNote(n) => write!(f, "note added: {}", note_words(n)),
            Change::StrikeReading { reading, old } => {
                write!(f, "reading {reading} struck out: {}", reading_words(old))
            }
            Change::ReplaceReading { reading, old, new } => write!(
                f,
                "reading {reading} corrected: {} {} -> {} {}",
                old.kind.as_str(),
                old.value,
                new.value,
                new.kind.unit()
            ),
            Change::StrikeNote { note, old } => {
                write!(f, "note {note} struck out: {}", note_words(old))
            }
            Change::ReplaceNote { note, old, new } => {
                write!(
                    f,
                    "note {note} corrected: \"{}\" -> \"{}\"",
                    old.text, new.text
                )
            }
        }
    }
}

/// Names the amendment and change an error is about (both 1-based).
fn at(amendment: usize, change: usize) -> impl Fn(Invalid) -> Invalid {
    move |e| {
        Invalid(format!(
            "the amendment trail contradicts the record: amendment {amendment}, change {change}: {}",
            e.0
        ))
    }
}

/// Applies a record's trail (`amendments`) to its fields as first written.
pub fn apply_trail(first: &mut Batch) -> Result<()> {
    let trail = std::mem::take(&mut first.amendments);
    let mut outcome = Ok(());
    'all: for (i, a) in trail.iter().enumerate() {
        for (j, c) in a.changes.iter().enumerate() {
            if let Err(e) = apply(c, first).map_err(at(i + 1, j + 1)) {
                outcome = Err(e);
                break 'all;
            }
        }
    }
    first.amendments = trail;
    outcome
}

/// The record as first written, before its amendments: the current values with
/// the trail undone, newest change first (the trail itself is kept). Refused when
/// the trail contradicts the record, or when a reading or note is marked struck
/// though no amendment strikes it.
pub fn original_record(batch: Batch) -> Result<Batch> {
    let mut first = batch;
    let trail = std::mem::take(&mut first.amendments);
    for (i, a) in trail.iter().enumerate().rev() {
        for (j, c) in a.changes.iter().enumerate().rev() {
            revert(c, &mut first).map_err(at(i + 1, j + 1))?;
        }
    }
    first.amendments = trail;
    if let Some(i) = first.measurements.iter().position(|m| m.struck) {
        return Err(Invalid(format!(
            "reading {} is marked struck, but no amendment strikes it",
            i + 1
        )));
    }
    if let Some(i) = first.notes.iter().position(|n| n.struck) {
        return Err(Invalid(format!(
            "note {} is marked struck, but no amendment strikes it",
            i + 1
        )));
    }
    Ok(first)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::batch::{MeasurementKind, RecipeVersion, Status};
    use chrono::{TimeZone, Utc};

    fn batch() -> Batch {
        let at = Utc.with_ymd_and_hms(2026, 12, 1, 9, 0, 0).unwrap();
        Batch {
            code: "B-20261201-0001".into(),
            recipe: RecipeVersion {
                recipe: "r".into(),
                version: 1,
                content_hash: String::new(),
                text: String::new(),
            },
            made_at: at,
            size_g: 300.0,
            operator: "Tomas".into(),
            status: Status::Final,
            finalized_at: Some(at),
            finalized_by: Some("Tomas".into()),
            lines: ["whole-milk", "sucrose", "sucrose"]
                .iter()
                .map(|i| BatchLine {
                    ingredient: (*i).to_owned(),
                    planned_g: 100.0,
                    actual_g: None,
                    lot: String::new(),
                })
                .collect(),
            measurements: vec![Measurement {
                kind: MeasurementKind::DrawTempC,
                value: -6.5,
                taken_at: at,
                by: "Ines".into(),
                struck: false,
            }],
            notes: vec![Note {
                text: "first run".into(),
                written_at: at,
                by: "Ines".into(),
                struck: false,
            }],
            amendments: Vec::new(),
            prediction: serde_json::Value::Null,
        }
    }

    fn applied(b: &Batch, changes: &[Change]) -> Batch {
        let mut out = b.clone();
        for c in changes {
            apply(c, &mut out).unwrap();
        }
        out
    }

    #[test]
    fn edits_record_old_values_and_revert_restores_them() {
        let original = batch();
        let later = original.made_at + chrono::Duration::hours(2);
        let edits = [
            Edit::Lot {
                line: LineRef::parse("sucrose"),
                lot: "S-77".into(),
            },
            Edit::ActualG {
                line: LineRef::parse("1"),
                grams: 101.5,
            },
            Edit::Operator("Ines".into()),
            Edit::AddReading(Measurement {
                kind: MeasurementKind::DrawTempC,
                value: -5.6,
                taken_at: later,
                by: "Jon".into(),
                struck: false,
            }),
            Edit::StrikeReading(1),
            Edit::ReplaceReading {
                reading: 2,
                value: -5.9,
            },
            Edit::AddNote(Note {
                text: "hardened well".into(),
                written_at: later,
                by: "Jon".into(),
                struck: false,
            }),
            Edit::ReplaceNote {
                note: 1,
                text: "first run of the day".into(),
            },
            Edit::StrikeNote(2),
        ];
        let changes = changes_for(&edits, &original).unwrap();
        assert_eq!(changes.len(), 10, "the lot applies to both sucrose lines");
        let current = applied(&original, &changes);
        assert_eq!(current.operator, "Ines");
        assert_eq!(current.lines[0].actual_g, Some(101.5));
        assert_eq!(current.lines[2].lot, "S-77");
        assert_eq!(current.measurements.len(), 2, "a struck reading stays");
        assert!(current.measurements[0].struck);
        assert_eq!(current.measurements[0].value, -6.5, "struck, not changed");
        assert_eq!(current.measurements[1].value, -5.9);
        assert_eq!(current.measurements[1].taken_at, later);
        assert_eq!(current.notes[0].text, "first run of the day");
        assert!(current.notes[1].struck);

        let mut amended = current.clone();
        amended.amendments = vec![crate::batch::Amendment {
            amended_at: later,
            by: "Head".into(),
            reason: "corrections".into(),
            changes,
        }];
        let first = original_record(amended.clone()).unwrap();
        assert_eq!(
            Batch {
                amendments: Vec::new(),
                ..first.clone()
            },
            original
        );
        let mut again = first;
        apply_trail(&mut again).unwrap();
        assert_eq!(again, amended);
    }

    #[test]
    fn a_trail_that_contradicts_the_record_is_refused_both_ways() {
        let b = batch();
        let lie = Change::Lot {
            line: 1,
            ingredient: "whole-milk".into(),
            old: "WM-1".into(),
            new: "WM-2".into(),
        };
        let err = apply(&lie, &mut b.clone()).unwrap_err().0;
        assert!(
            err.contains("the lot of line 1") && err.contains("WM-1"),
            "{err}"
        );
        // As imported: the record shows WM-9 where the trail says it set WM-2.
        let mut shown = b.clone();
        shown.lines[0].lot = "WM-9".into();
        shown.amendments = vec![crate::batch::Amendment {
            amended_at: b.made_at,
            by: "x".into(),
            reason: "r".into(),
            changes: vec![lie],
        }];
        let err = original_record(shown).unwrap_err().0;
        assert!(err.contains("amendment 1, change 1"), "{err}");
        // A struck mark no amendment explains.
        let mut marked = b.clone();
        marked.measurements[0].struck = true;
        let err = original_record(marked).unwrap_err().0;
        assert!(err.contains("reading 1 is marked struck"), "{err}");
        // Striking twice, or a reading that is not there.
        let strike = changes_for(&[Edit::StrikeReading(1)], &b).unwrap();
        let struck = applied(&b, &strike);
        assert!(apply(&strike[0], &mut struck.clone()).is_err());
        assert!(changes_for(&[Edit::StrikeReading(2)], &b).is_err());
        assert!(
            changes_for(
                &[Edit::ReplaceNote {
                    note: 0,
                    text: "x".into()
                }],
                &b
            )
            .is_err()
        );
    }

    #[test]
    fn ambiguous_or_unknown_lines_are_refused() {
        let b = batch();
        let ambiguous = Edit::ActualG {
            line: LineRef::Ingredient("sucrose".into()),
            grams: 1.0,
        };
        assert!(changes_for(&[ambiguous], &b).is_err());
        let unknown = Edit::Lot {
            line: LineRef::Ingredient("vanilla".into()),
            lot: "V1".into(),
        };
        let err = changes_for(&[unknown], &b).unwrap_err().to_string();
        assert!(err.contains("whole-milk"), "{err}");
        assert!(resolve_lines(&b.lines, &LineRef::Number(4)).is_err());
        assert_eq!(LineRef::parse(" 2 "), LineRef::Number(2));
    }
}

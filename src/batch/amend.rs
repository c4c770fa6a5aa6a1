//! The amendment trail as pure logic: turning requested edits into recorded
//! changes (each with the value it replaces), applying a trail to the record as
//! first written, and undoing it (to rebuild that first record on import).

use std::fmt;

use super::Invalid;
use super::types::{Batch, BatchLine, Change};

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

/// Turns edits into changes against the current `operator` and `lines`.
pub fn changes_for(edits: &[Edit], operator: &str, lines: &[BatchLine]) -> Result<Vec<Change>> {
    let mut operator = operator.to_owned();
    let mut lines = lines.to_vec();
    let mut changes = Vec::new();
    for edit in edits {
        let new: Vec<Change> = match edit {
            Edit::Operator(name) => vec![Change::Operator {
                old: operator.clone(),
                new: name.clone(),
            }],
            Edit::ActualG { line, grams } => {
                if !grams.is_finite() || *grams < 0.0 {
                    return Err(Invalid(format!(
                        "{grams} g is not a mass; give grams of zero or more"
                    )));
                }
                let found = resolve_lines(&lines, line)?;
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
            Edit::Lot { line, lot } => resolve_lines(&lines, line)?
                .into_iter()
                .map(|i| Change::Lot {
                    line: i + 1,
                    ingredient: lines[i].ingredient.clone(),
                    old: lines[i].lot.clone(),
                    new: lot.clone(),
                })
                .collect(),
        };
        for change in &new {
            apply(change, &mut operator, &mut lines)?;
        }
        changes.extend(new);
    }
    Ok(changes)
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

/// Applies one change to the record.
pub fn apply(change: &Change, operator: &mut String, lines: &mut [BatchLine]) -> Result<()> {
    match change {
        Change::Operator { new, .. } => *operator = new.clone(),
        Change::ActualG { line, new, .. } => line_mut(lines, *line)?.actual_g = Some(*new),
        Change::Lot { line, new, .. } => line_mut(lines, *line)?.lot = new.clone(),
    }
    Ok(())
}

/// Undoes one change (the record goes back to what it was before it).
pub fn revert(change: &Change, operator: &mut String, lines: &mut [BatchLine]) -> Result<()> {
    match change {
        Change::Operator { old, .. } => *operator = old.clone(),
        Change::ActualG { line, old, .. } => line_mut(lines, *line)?.actual_g = *old,
        Change::Lot { line, old, .. } => line_mut(lines, *line)?.lot = old.clone(),
    }
    Ok(())
}

/// The operator and lines of a batch as first written, before its amendments:
/// the current values with the trail undone, newest change first.
pub fn original_record(batch: &Batch) -> Result<(String, Vec<BatchLine>)> {
    let mut operator = batch.operator.clone();
    let mut lines = batch.lines.clone();
    for a in batch.amendments.iter().rev() {
        for c in a.changes.iter().rev() {
            revert(c, &mut operator, &mut lines)?;
        }
    }
    Ok((operator, lines))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn lines() -> Vec<BatchLine> {
        ["whole-milk", "sucrose", "sucrose"]
            .iter()
            .map(|i| BatchLine {
                ingredient: (*i).to_owned(),
                planned_g: 100.0,
                actual_g: None,
                lot: String::new(),
            })
            .collect()
    }

    #[test]
    fn edits_record_old_values_and_revert_restores_them() {
        let original = lines();
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
        ];
        let changes = changes_for(&edits, "Tomas", &original).unwrap();
        assert_eq!(changes.len(), 4, "the lot applies to both sucrose lines");
        let (mut op, mut current) = ("Tomas".to_owned(), original.clone());
        for c in &changes {
            apply(c, &mut op, &mut current).unwrap();
        }
        assert_eq!(op, "Ines");
        assert_eq!(current[0].actual_g, Some(101.5));
        assert_eq!(current[2].lot, "S-77");
        for c in changes.iter().rev() {
            revert(c, &mut op, &mut current).unwrap();
        }
        assert_eq!((op.as_str(), current), ("Tomas", original));
    }

    #[test]
    fn ambiguous_or_unknown_lines_are_refused() {
        let l = lines();
        let ambiguous = Edit::ActualG {
            line: LineRef::Ingredient("sucrose".into()),
            grams: 1.0,
        };
        assert!(changes_for(&[ambiguous], "x", &l).is_err());
        let unknown = Edit::Lot {
            line: LineRef::Ingredient("vanilla".into()),
            lot: "V1".into(),
        };
        let err = changes_for(&[unknown], "x", &l).unwrap_err().to_string();
        assert!(err.contains("whole-milk"), "{err}");
        assert!(resolve_lines(&l, &LineRef::Number(4)).is_err());
        assert_eq!(LineRef::parse(" 2 "), LineRef::Number(2));
    }
}

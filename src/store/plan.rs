//! Planning a batch: a recipe scaled to the batch size (by mass, or by volume for
//! liqueurs through the analysis' volume), its lines with planned masses and lots,
//! and the analysis snapshot of the scaled recipe, ready for [`Store::new_batch`].
//!
//! [`Store::new_batch`]: super::Store::new_batch

use chrono::{DateTime, Utc};

use super::amend::resolve_lines;
use super::error::{Result, StoreError};
use super::types::{BatchLine, NewBatch};
use crate::analysis::{Options, analyze};
use crate::catalog::Catalog;
use crate::model::Recipe;
use crate::report::json::analysis_json;

/// How big a batch is to be.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum BatchSize {
    /// By mass (g).
    Grams(f64),
    /// By volume (mL), for liqueurs.
    Millilitres(f64),
}

impl BatchSize {
    /// Parses `5kg`, `500 g`, `1.5L`, `750mL` (units g, kg, mL, L; any case).
    pub fn parse(text: &str) -> Result<BatchSize> {
        let t = text.trim();
        let split = t.find(|c: char| c.is_ascii_alphabetic()).unwrap_or(t.len());
        let (number, unit) = t.split_at(split);
        let value: f64 = number.trim().parse().map_err(|_| {
            StoreError::Invalid(format!(
                "`{text}` is not a batch size; write a number and a unit, like 5kg, 800g, 1.5L or 750mL"
            ))
        })?;
        if !value.is_finite() || value <= 0.0 {
            return Err(StoreError::Invalid(format!(
                "`{text}`: a batch size must be above zero"
            )));
        }
        match unit.trim().to_ascii_lowercase().as_str() {
            "g" => Ok(BatchSize::Grams(value)),
            "kg" => Ok(BatchSize::Grams(value * 1000.0)),
            "ml" => Ok(BatchSize::Millilitres(value)),
            "l" => Ok(BatchSize::Millilitres(value * 1000.0)),
            other => Err(StoreError::Invalid(format!(
                "`{text}`: the unit `{other}` is not known; use g, kg, mL or L"
            ))),
        }
    }
}

/// Everything about a batch before it is recorded.
#[derive(Debug, Clone)]
pub struct Plan<'a> {
    /// The parsed recipe.
    pub recipe: &'a Recipe,
    /// The recipe file's text, saved as the recipe version.
    pub recipe_text: &'a str,
    /// The size to scale to.
    pub size: BatchSize,
    /// Who makes it.
    pub operator: &'a str,
    /// Supplier lots: (ingredient id or line number, lot).
    pub lots: &'a [(String, String)],
    /// A first note.
    pub note: Option<&'a str>,
    /// When it is made.
    pub made_at: DateTime<Utc>,
}

fn analysis_error(e: impl std::fmt::Display) -> StoreError {
    StoreError::Invalid(format!("the recipe could not be analysed: {e}"))
}

/// Scales the recipe, analyses it, and builds the new batch.
pub fn plan_batch(plan: &Plan<'_>) -> Result<NewBatch> {
    let catalog = Catalog::builtin();
    let options = Options::default();
    let base = analyze(plan.recipe, catalog, &options).map_err(analysis_error)?;
    let factor = match plan.size {
        BatchSize::Grams(g) => g / base.mass_g,
        BatchSize::Millilitres(ml) => ml / base.volume_ml,
    };
    if !factor.is_finite() || factor <= 0.0 {
        return Err(StoreError::Invalid(format!(
            "`{}` has no mass or volume to scale",
            plan.recipe.name
        )));
    }
    let scaled = plan.recipe.scaled(factor);
    let analysis = analyze(&scaled, catalog, &options).map_err(analysis_error)?;
    let mut lines: Vec<BatchLine> = scaled
        .lines
        .iter()
        .zip(&analysis.line_mass_g)
        .map(|(line, &g)| BatchLine {
            ingredient: line.ingredient.clone(),
            planned_g: g,
            actual_g: None,
            lot: String::new(),
        })
        .collect();
    for (key, lot) in plan.lots {
        for i in resolve_lines(&lines, key)? {
            lines[i].lot = lot.clone();
        }
    }
    let size_g = match plan.size {
        BatchSize::Grams(g) => g,
        BatchSize::Millilitres(_) => analysis.mass_g,
    };
    Ok(NewBatch {
        recipe: plan.recipe.name.clone(),
        recipe_text: plan.recipe_text.to_owned(),
        made_at: plan.made_at,
        size_g,
        operator: plan.operator.to_owned(),
        lines,
        note: plan.note.map(str::to_owned),
        prediction: analysis_json(&analysis),
    })
}

#[cfg(test)]
mod tests {
    use super::BatchSize;

    #[test]
    fn sizes_parse_with_units() {
        assert_eq!(BatchSize::parse("5kg").unwrap(), BatchSize::Grams(5000.0));
        assert_eq!(BatchSize::parse("800 g").unwrap(), BatchSize::Grams(800.0));
        assert_eq!(
            BatchSize::parse("1.5L").unwrap(),
            BatchSize::Millilitres(1500.0)
        );
        assert_eq!(
            BatchSize::parse("750mL").unwrap(),
            BatchSize::Millilitres(750.0)
        );
        assert!(BatchSize::parse("5 stone").is_err());
        assert!(BatchSize::parse("-2kg").is_err());
        assert!(BatchSize::parse("kg").is_err());
    }
}

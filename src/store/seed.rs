//! The first run's seed: the built-in sample recipes, saved as version 1 of each, so
//! a new workspace has something to show. Runs inside the creating migration.

use std::path::Path;

use rusqlite::Transaction;

use super::error::{Result, StoreError};
use super::recipes;
use crate::recipe_file::parse_recipe;
use crate::samples::SAMPLE_RECIPES;

/// Saves every sample recipe under the name its file gives it.
pub(crate) fn seed_samples(tx: &Transaction) -> Result<()> {
    for (file, text) in SAMPLE_RECIPES {
        let recipe = parse_recipe(Path::new(file), text).map_err(|e| {
            StoreError::Invalid(format!("the built-in sample {file} could not be read: {e}"))
        })?;
        recipes::save_version(tx, &recipe.name, text)?;
    }
    Ok(())
}

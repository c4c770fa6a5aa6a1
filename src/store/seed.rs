//! The first run's seed: the built-in sample recipes, saved as version 1 of each, so
//! a new workspace has something to show. Runs inside the creating migration.

use rusqlite::Transaction;

use super::error::Result;
use super::recipes;
use crate::samples::{SAMPLE_RECIPE_NAMES, SAMPLE_RECIPES};

/// Saves every sample recipe under its name.
pub(crate) fn seed_samples(tx: &Transaction) -> Result<()> {
    for ((_, text), name) in SAMPLE_RECIPES.iter().zip(SAMPLE_RECIPE_NAMES) {
        recipes::save_version(tx, name, text)?;
    }
    Ok(())
}

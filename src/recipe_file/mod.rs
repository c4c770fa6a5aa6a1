//! Recipe files (TOML, an open format): reading with errors that name the file,
//! line and column; writing a fresh file; and saving back into an existing file
//! while keeping its comments and layout.
//!
//! ```toml
//! name = "Harbour vanilla"
//! style = "ice-cream"
//! serving_target = 0.70
//! [[line]]
//! ingredient = "whole-milk"
//! g = 480            # or kg = 0.48, ml = 500, l = 0.5
//! ```

mod append;
mod edit;
mod library;
mod read;
mod read_balance;
mod save;
mod write;
mod write_balance;

use std::fmt;
use std::path::PathBuf;

pub use append::{AppendRefused, append_own_items};
pub use edit::{Rewritten, rewrite, save_recipe};
pub use library::{own_item_definition, own_items_in, read_own_items};
pub use read::{
    parse_recipe, parse_recipe_using, parse_recipe_with, read_recipe, read_recipe_using,
};
pub use save::{Expect, SaveError, save_text};
pub use write::{check_reads_back, own_items_toml, recipe_to_checked_toml, recipe_to_toml};

/// A recipe file that cannot be read, with where and why.
#[derive(Debug, Clone, PartialEq)]
pub struct RecipeFileError {
    /// The file.
    pub path: PathBuf,
    /// 1-based line of the problem (0 when the file could not be read at all).
    pub line: usize,
    /// 1-based column of the problem.
    pub column: usize,
    /// What is wrong and what would be valid.
    pub message: String,
}

impl fmt::Display for RecipeFileError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.line == 0 {
            write!(f, "{}: {}", self.path.display(), self.message)
        } else {
            write!(
                f,
                "{}:{}:{}: {}",
                self.path.display(),
                self.line,
                self.column,
                self.message
            )
        }
    }
}

impl std::error::Error for RecipeFileError {}

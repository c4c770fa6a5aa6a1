//! The pure core checked against the outside world: published tables and
//! standards, property tests, the catalog, and the recipe reader's errors.
//! One test binary for all of them, so `cargo test` links few binaries.

mod balance;
mod catalog;
mod invalid_recipes;
mod measure;
mod properties;
mod recipe_balance;
mod reference_binary;
mod reference_published;
mod warnings;

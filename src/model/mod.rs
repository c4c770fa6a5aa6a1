//! Plain data: solutes, ingredients, recipes and their amounts, and the one way
//! gelu reads and writes units and times as people type them. No physics and no
//! I/O here; `catalog` holds the built-in instances and `analysis` the maths.
//! `balancing` holds what a maker asks balancing (targets, line rules, prices),
//! which a recipe carries; `crate::balance` answers it.

pub mod balancing;
mod own;
mod recipe;
mod solute;
pub mod time;
pub mod units;

pub use own::OwnItems;
pub use recipe::{Amount, Line, Recipe, Style};
pub use solute::{Category, Ingredient, Solute, SoluteKind};
pub use units::{MassUnit, TempUnit};

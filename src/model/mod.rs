//! Plain data: solutes, ingredients, recipes and their amounts. No physics and
//! no I/O here; `catalog` holds the built-in instances and `analysis` the maths.

mod recipe;
mod solute;
mod units;

pub use recipe::{Amount, Line, Recipe, Style};
pub use solute::{Category, Ingredient, Solute, SoluteKind};
pub use units::TempUnit;

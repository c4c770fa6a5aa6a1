//! gelu: a keyboard-only terminal workbench for people who formulate frozen
//! desserts and liqueurs. It predicts how a mix freezes from what is dissolved
//! in it, and keeps a traceable log of the batches made from it.
//!
//! Data flows one way: file or database -> [`model::Recipe`] -> ([`catalog`]) ->
//! [`analysis::Mix`] -> [`analysis::Analysis`] -> view or report.
//!
//! - [`model`]: plain data (solutes, ingredients, recipes, amounts).
//! - [`thermo`]: pure physics (ice activity, binary water-activity models, the ZSR
//!   freezing curve, ethanol-water tables).
//! - [`catalog`]: the built-in solutes and ingredients, embedded at build time.
//! - [`analysis`]: recipe -> every figure the user sees, with warnings and cautions.
//! - [`balance`]: recipe + targets + line rules + objective -> new amounts (pure; uses analysis).
//! - [`tui`]: the terminal workspace (recipe editor, ingredients, batch log, settings).
//!
//! `model`, `thermo`, `catalog`, `analysis` and `balance` are pure: no files, no clock, no
//! terminal, no SQL.
//!
//! ```
//! use std::path::Path;
//! use gelu::analysis::{analyze, Options};
//! use gelu::catalog::Catalog;
//!
//! let text = "name = \"Syrup\"\n[[line]]\ningredient = \"sucrose\"\ng = 20\n[[line]]\ningredient = \"water\"\ng = 80\n";
//! let recipe = gelu::recipe_file::parse_recipe(Path::new("syrup.toml"), text).unwrap();
//! let a = analyze(&recipe, Catalog::builtin(), &Options::default()).unwrap();
//! // CRC Handbook: 20 % sucrose freezes 1.47 K below pure water.
//! assert!((a.freezing_point_c.unwrap() + 1.47).abs() < 0.05);
//! ```
#![forbid(unsafe_code)]
// `!(x > 0.0)` is used on purpose: it is also true for NaN, which user input can hold.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

pub mod analysis;
pub mod balance;
pub mod catalog;
pub mod cli;
pub mod model;
pub mod recipe_file;
pub mod report;
pub mod samples;
pub mod store;
pub mod thermo;
pub mod tui;

//! gelu: a keyboard-only terminal workbench for people who formulate frozen
//! desserts and liqueurs. It predicts how a mix freezes from what is dissolved
//! in it, and keeps a traceable log of the batches made from it.
//!
//! Data flows one way: file or database -> [`model::Recipe`] -> ([`catalog`]) ->
//! [`analysis::Mix`] -> [`analysis::Analysis`] -> view or report.
//!
//! The pure core (no files, no clock, no terminal, no SQL; deterministic):
//! - [`model`]: plain data (solutes, ingredients, recipes, amounts, what balancing
//!   is asked) and the one reader and writer of units, shares and times as people
//!   type them.
//! - [`thermo`]: physics (ice activity, binary water-activity models, the ZSR
//!   freezing curve, ethanol-water tables).
//! - [`catalog`]: the built-in solutes and ingredients, embedded at build time.
//! - [`analysis`]: recipe -> every figure the user sees, with warnings and cautions.
//! - [`report`]: an analysis (or a balancing answer) -> text (with a character
//!   chart) or JSON.
//! - [`batch`]: the batch domain: records, planning, amendments, measured against
//!   predicted, JSON and CSV forms.
//! - [`balance`]: recipe + targets + line rules + objective -> new amounts.
//! - [`measure`]: measured points -> a characterised solute; predicted against
//!   measured over batches; explicit calibration.
//!
//! The shell around it:
//! - [`recipe_file`]: recipe TOML files in and out, keeping comments on save.
//! - [`samples`]: the embedded demo recipes.
//! - [`store`]: the batch log in SQLite (the only module that speaks SQL).
//! - [`clock`]: the one clock.
//! - [`tui`]: the terminal workspace (recipe editor, ingredients, batch log, settings).
//! - [`cli`]: the command line; with `main`, the only place that exits.
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
pub mod batch;
pub mod catalog;
pub mod cli;
pub mod clock;
pub mod measure;
pub mod model;
pub mod recipe_file;
pub mod report;
pub mod samples;
pub mod store;
pub mod sync;
pub mod thermo;
pub mod tui;

//! Analysis (a balancing answer, a batch record) -> words and numbers for people and programs:
//! the plain-text report with its character chart, the JSON object whose keys are
//! a public contract, and a batch record as text. Every text output shows control
//! characters inert through [`inert::inert`].

pub mod balance;
pub mod batch_text;
pub mod chart;
pub mod inert;
pub mod json;
pub mod text;

//! The batch domain, pure: what a batch record is (`types`), planning one from a
//! recipe ([`plan`]), correcting it by amendments ([`amend`]), checking it
//! ([`validate`]), sealing it at sign-off ([`seal`]), setting its readings against
//! its prediction ([`compare`]), its public JSON and CSV forms ([`jsonl`],
//! [`csv`], [`export`]), and records as sites share them, each with a stable
//! identity ([`shared`]). No SQL, files or clock here: the store keeps these
//! records, the command line and the workspace show them, and times are passed in.
//!
//! The rule of the record: once signed off, a record keeps what it showed. New
//! readings and notes, and every correction, go on its amendment trail as dated,
//! signed entries with a reason; the record as first written plus its trail is the
//! record as it stands ([`amend::apply_trail`], [`amend::original_record`]).

pub mod amend;
pub mod compare;
pub mod csv;
pub mod export;
pub mod jsonl;
pub mod plan;
pub mod reading;
pub mod seal;
pub mod shared;
mod types;
pub mod validate;
pub mod version;

pub use amend::{Edit, LineRef};
pub use types::*;

/// A request or record the batch domain refuses, with the reason in plain words.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{0}")]
pub struct Invalid(pub String);

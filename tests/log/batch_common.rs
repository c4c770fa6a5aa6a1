//! What the batch-log command tests share: the sample recipe they record, and the
//! `gelu` binary pointed at a test database with a known operator name.

// Each test file uses only some of these.
#![allow(dead_code)]

use std::path::Path;
use std::process::Command;

/// The house vanilla sample recipe.
pub const VANILLA: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/sample-recipes/harbour-vanilla.toml"
);

/// `gelu --db DB`, ignoring any GELU_DB of the caller, run as user `tester`.
pub fn gelu(db: &Path) -> Command {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_gelu"));
    cmd.arg("--db")
        .arg(db)
        .env_remove("GELU_DB")
        .env("USER", "tester");
    cmd
}

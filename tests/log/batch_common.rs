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

/// `gelu --db DB ARGS...`, checked to exit with `code`; returns stdout as text.
pub fn run(db: &Path, args: &[&str], code: i32) -> String {
    let out = gelu(db).args(args).output().unwrap();
    assert_eq!(
        out.status.code(),
        Some(code),
        "gelu {args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).unwrap()
}

/// `gelu --db DB ARGS...`, which must succeed and print one JSON object.
pub fn json(db: &Path, args: &[&str]) -> serde_json::Value {
    serde_json::from_str(run(db, args, 0).trim()).unwrap()
}

/// A temporary folder and the path of a batch log in it (not created yet).
pub fn new_db() -> (tempfile::TempDir, std::path::PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("log.db");
    (dir, db)
}

/// Records a 5 kg batch of the recipe file made at `made_at`, through the library.
pub fn record(
    store: &mut gelu::store::Store,
    file: &str,
    made_at: chrono::DateTime<chrono::Utc>,
) -> gelu::batch::Batch {
    let (recipe, text) = gelu::recipe_file::read_recipe(Path::new(file)).unwrap();
    let new = gelu::batch::plan::plan_batch(
        &gelu::batch::plan::Plan {
            recipe: &recipe,
            recipe_text: &text,
            size: gelu::model::Amount::Grams(5000.0),
            operator: "Ines Harrow",
            lots: &[],
            note: None,
            made_at,
        },
        gelu::catalog::Catalog::builtin(),
        &gelu::analysis::Options::default(),
    )
    .unwrap();
    store.new_batch(&new).unwrap()
}

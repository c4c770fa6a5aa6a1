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

/// The rows of a CSV text (RFC 4180: quoted fields may hold commas, quotes and
/// line breaks), header first.
pub fn csv_rows(text: &str) -> Vec<Vec<String>> {
    let mut rows = Vec::new();
    let mut row = Vec::new();
    let mut field = String::new();
    let mut quoted = false;
    let mut chars = text.chars().peekable();
    while let Some(c) = chars.next() {
        match (quoted, c) {
            (true, '"') if chars.peek() == Some(&'"') => {
                chars.next();
                field.push('"');
            }
            (true, '"') => quoted = false,
            (true, c) => field.push(c),
            (false, '"') => quoted = true,
            (false, ',') => row.push(std::mem::take(&mut field)),
            (false, '\n') => {
                row.push(std::mem::take(&mut field));
                rows.push(std::mem::take(&mut row));
            }
            (false, '\r') => {}
            (false, c) => field.push(c),
        }
    }
    if !field.is_empty() || !row.is_empty() {
        row.push(field);
        rows.push(row);
    }
    rows
}

/// [`gelu`] as an assert_cmd command.
pub fn gelu_cmd(db: &Path) -> assert_cmd::Command {
    assert_cmd::Command::from_std(gelu(db))
}

/// Runs `gelu --db DB ARGS`, which must succeed; returns what it printed.
pub fn run_ok(db: &Path, args: &[&str]) -> String {
    let out = gelu_cmd(db).args(args).output().unwrap();
    assert!(
        out.status.success(),
        "gelu {args:?} failed: {}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).unwrap()
}

/// Runs `gelu --db DB ARGS`, which must fail with exit code 2; returns its stderr.
pub fn run_err(db: &Path, args: &[&str]) -> String {
    let out = gelu_cmd(db).args(args).output().unwrap();
    assert_eq!(out.status.code(), Some(2), "gelu {args:?} should fail");
    String::from_utf8(out.stderr).unwrap()
}

/// Makes a file immutable (`chattr +i`) for as long as it lives: even root cannot
/// write it (root ignores permission bits). `None` where chattr is not available.
pub struct Immutable(std::path::PathBuf);

impl Immutable {
    /// Sets the flag on `path`.
    pub fn set(path: &Path) -> Option<Immutable> {
        let ok = Command::new("chattr")
            .arg("+i")
            .arg(path)
            .status()
            .is_ok_and(|s| s.success());
        ok.then(|| Immutable(path.to_path_buf()))
    }
}

impl Drop for Immutable {
    fn drop(&mut self) {
        let _ = Command::new("chattr").arg("-i").arg(&self.0).status();
    }
}

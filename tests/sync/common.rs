//! What the sync tests share: a site (a batch log on a temporary file, with a known
//! site code) driven through the real `gelu` binary, and reading a hub's tables.

// Each test file uses only some of these.
#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use crate::server::ADMIN_PASSWORD;

/// The house vanilla sample recipe.
pub const VANILLA: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/sample-recipes/harbour-vanilla.toml"
);

/// One site: a batch log of its own.
pub struct Site {
    _dir: tempfile::TempDir,
    /// The log file.
    pub db: PathBuf,
    /// Its site code.
    pub code: String,
}

impl Site {
    /// A new log renamed to `code`.
    pub fn new(code: &str) -> Site {
        let dir = tempfile::tempdir().unwrap();
        let db = dir.path().join("log.db");
        let site = Site {
            _dir: dir,
            db,
            code: code.to_owned(),
        };
        let out = site.run(&["site", code]);
        assert_eq!(String::from_utf8_lossy(&out.stdout).trim(), code);
        site
    }

    /// The folder the log lives in.
    pub fn dir(&self) -> &Path {
        self._dir.path()
    }

    /// `gelu --db LOG`, as user `tester`, the hub password in PGPASSWORD (so never
    /// in a URL), no GELU_SYNC_URL or password file of the caller.
    pub fn gelu(&self) -> Command {
        let mut cmd = Command::new(env!("CARGO_BIN_EXE_gelu"));
        cmd.arg("--db")
            .arg(&self.db)
            .env_remove("GELU_DB")
            .env_remove("GELU_SYNC_URL")
            .env("PGPASSFILE", "/nonexistent/pgpass")
            .env("PGPASSWORD", ADMIN_PASSWORD)
            .env("USER", "tester");
        cmd
    }

    /// Runs gelu with `args`; panics with its stderr when it fails.
    pub fn run(&self, args: &[&str]) -> Output {
        let out = self.gelu().args(args).output().unwrap();
        assert!(
            out.status.success(),
            "gelu {args:?} failed: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        out
    }

    /// Records a 2 kg vanilla batch with a lot and a note; returns its code.
    pub fn new_batch(&self, note: &str) -> String {
        self.new_batch_of(VANILLA, note)
    }

    /// Records a 2 kg batch of `recipe` with a lot and a note; returns its code.
    pub fn new_batch_of(&self, recipe: &str, note: &str) -> String {
        let out = self.run(&[
            "batch",
            "new",
            recipe,
            "--size",
            "2kg",
            "--lot",
            "sucrose=S-1",
            "--note",
            note,
        ]);
        String::from_utf8(out.stdout).unwrap().trim().to_owned()
    }

    /// `gelu sync --server URL --json`: the report, or the failed output.
    pub fn sync(&self, url: &str) -> Result<serde_json::Value, Output> {
        let out = self
            .gelu()
            .args(["sync", "--json", "--server", url])
            .output()
            .unwrap();
        if out.status.success() {
            Ok(serde_json::from_slice(&out.stdout).unwrap())
        } else {
            Err(out)
        }
    }

    /// Syncs and panics on failure.
    pub fn sync_ok(&self, url: &str) -> serde_json::Value {
        self.sync(url).unwrap_or_else(|out| {
            panic!(
                "sync of {} failed: {}",
                self.code,
                String::from_utf8_lossy(&out.stderr)
            )
        })
    }

    /// Every batch, exported as JSON Lines, newest first.
    pub fn export(&self) -> String {
        let out = self.run(&["batch", "export", "--format", "jsonl"]);
        String::from_utf8(out.stdout).unwrap()
    }

    /// `gelu sync --status --json`.
    pub fn status(&self) -> serde_json::Value {
        let out = self.run(&["sync", "--status", "--json"]);
        serde_json::from_slice(&out.stdout).unwrap()
    }

    /// The codes in the log, newest first.
    pub fn codes(&self) -> Vec<String> {
        self.export()
            .lines()
            .map(|l| {
                let v: serde_json::Value = serde_json::from_str(l).unwrap();
                v["code"].as_str().unwrap().to_owned()
            })
            .collect()
    }

    /// `gelu db check` passes.
    pub fn check(&self) {
        self.run(&["db", "check"]);
    }
}

/// Text of a process's stderr.
pub fn stderr(out: &Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

/// A small deterministic random sequence (xorshift), seeded from the clock.
pub struct Random(pub u64);

impl Random {
    /// Seeded from the clock; prints the seed so a failure can be replayed.
    pub fn from_clock() -> Random {
        let seed = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .unwrap()
            .as_nanos() as u64
            | 1;
        eprintln!("random seed {seed}");
        Random(seed)
    }

    /// The next number.
    pub fn next(&mut self) -> u64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        self.0
    }
}

//! What the sync tests share: a site (a batch log on a temporary file, with a known
//! site code) driven through the real `gelu` binary, and reading a hub's tables.

// Each test file uses only some of these.
#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use crate::server::admin_password;

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
            .env("PGPASSWORD", admin_password())
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

/// Batch number `i` of a synthetic history written at `site`: four lines with lots,
/// a reading, a note; every third signed off, every tenth amended after that.
pub fn synthetic(i: usize, site: &str, recipe: &gelu::batch::RecipeVersion) -> gelu::batch::Batch {
    use chrono::{Duration, TimeZone, Utc};
    use gelu::batch::{
        Amendment, Batch, BatchLine, Change, Measurement, MeasurementKind, Note, Status,
    };
    // Sites keep their own clocks: no two sites write at the same millisecond.
    let offset_ms: i64 = site.bytes().map(i64::from).sum();
    let at = Utc.with_ymd_and_hms(2026, 11, 1, 6, 0, 0).unwrap()
        + Duration::minutes(i as i64)
        + Duration::milliseconds(offset_ms);
    let amended = i.is_multiple_of(10);
    // The record as it stands: an amended batch shows its corrected sucrose lot.
    let lines = ["whole-milk", "heavy-cream", "sucrose", "skim-milk-powder"]
        .iter()
        .enumerate()
        .map(|(k, ing)| BatchLine {
            ingredient: (*ing).to_owned(),
            planned_g: 500.0,
            actual_g: Some(500.0 + (i % 3) as f64),
            lot: if amended && k == 2 {
                "S-FIXED".to_owned()
            } else {
                format!("L{k}-{:05}", i / 50)
            },
        })
        .collect();
    let final_ = amended || i.is_multiple_of(3);
    Batch {
        code: format!("B-{}-{site}-{:05}", at.format("%Y%m%d"), i),
        recipe: recipe.clone(),
        made_at: at,
        size_g: 2000.0,
        operator: "cook".into(),
        status: if amended {
            Status::Amended
        } else if final_ {
            Status::Final
        } else {
            Status::Draft
        },
        finalized_at: final_.then_some(at + Duration::hours(1)),
        finalized_by: final_.then(|| "head".to_owned()),
        lines,
        measurements: vec![Measurement {
            kind: MeasurementKind::DrawTempC,
            value: -6.0 - (i % 20) as f64 / 10.0,
            taken_at: at,
            by: "cook".into(),
            struck: false,
        }],
        notes: vec![Note {
            text: format!("batch {i} of {site}"),
            written_at: at,
            by: "cook".into(),
            struck: false,
        }],
        amendments: if amended {
            vec![Amendment {
                amended_at: at + Duration::hours(2),
                by: "head".into(),
                reason: "lot misread".into(),
                changes: vec![Change::Lot {
                    line: 3,
                    ingredient: "sucrose".into(),
                    old: format!("L2-{:05}", i / 50),
                    new: "S-FIXED".into(),
                }],
            }]
        } else {
            vec![]
        },
        prediction: serde_json::json!({"freezing_point_c": -2.5, "mass_g": 2000.0}),
    }
}

impl Site {
    /// Writes `n` synthetic batches into the log (through the library's import).
    pub fn fill(&self, n: usize) {
        let mut store = gelu::store::Store::open(&self.db).unwrap();
        let r = store.recipes().unwrap().remove(0);
        let recipe = gelu::batch::RecipeVersion {
            recipe: r.name,
            version: r.latest_version,
            content_hash: gelu::batch::version::content_hash(&r.latest_text),
            text: r.latest_text,
        };
        let list: Vec<_> = (0..n).map(|i| synthetic(i, &self.code, &recipe)).collect();
        let report = store.import_batches(&list).unwrap();
        assert_eq!(report.imported, n, "{:?}", report.errors.first());
    }
}

/// Asserts two exports are identical, saying where they part (not printing them whole).
pub fn assert_same_records(a: &str, b: &str, what: &str) {
    if a == b {
        return;
    }
    let (la, lb): (Vec<&str>, Vec<&str>) = (a.lines().collect(), b.lines().collect());
    let at = la.iter().zip(&lb).position(|(x, y)| x != y);
    let cut = |s: &str| s.chars().take(600).collect::<String>();
    panic!(
        "{what}: {} and {} records; first difference at record {at:?}:\n{}\n{}",
        la.len(),
        lb.len(),
        at.map(|i| cut(la[i])).unwrap_or_default(),
        at.map(|i| cut(lb[i])).unwrap_or_default(),
    );
}

//! What the benchmarks share: the deterministic synthetic batch history and the
//! cached 1,000,000-batch log built from it through the store's own import path
//! (under target/store-bench; about a minute to build the first time).

// Each benchmark uses only part of this.
#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::time::Instant;

use chrono::{DateTime, TimeZone, Utc};
use gelu::batch::version::content_hash;
use gelu::batch::{
    Amendment, Batch, BatchLine, Change, Measurement, MeasurementKind, Note, RecipeVersion, Status,
};
use gelu::store::Store;

pub mod hub;
#[path = "../../tests/sync/server.rs"]
pub mod server;

pub const FIXTURE_BATCHES: usize = 1_000_000;
/// Bump when the generator changes, so a stale cached fixture is not reused.
const GENERATOR: u32 = 3;
const PER_DAY: usize = 900;
const WORDS: [&str; 12] = [
    "smooth",
    "firm",
    "glossy",
    "cabinet",
    "draw",
    "overrun",
    "aged",
    "overnight",
    "strained",
    "tasted",
    "steady",
    "sweet",
];
const INGREDIENTS: [&str; 4] = ["whole-milk", "heavy-cream", "sucrose", "skim-milk-powder"];

/// The seeded recipes of a fresh store, as recorded versions.
pub fn versions(store: &Store) -> Vec<RecipeVersion> {
    store
        .recipes()
        .expect("recipes")
        .into_iter()
        .map(|r| RecipeVersion {
            recipe: r.name,
            version: r.latest_version,
            content_hash: content_hash(&r.latest_text),
            text: r.latest_text,
        })
        .collect()
}

pub fn made_at(i: usize) -> DateTime<Utc> {
    let start = Utc.with_ymd_and_hms(2024, 1, 1, 6, 0, 0).unwrap();
    start
        + chrono::Duration::days((i / PER_DAY) as i64)
        + chrono::Duration::seconds((i % PER_DAY) as i64 * 60)
}

/// Batch number `i` of the synthetic history (deterministic).
pub fn synthetic(i: usize, recipes: &[RecipeVersion]) -> Batch {
    let at = made_at(i);
    let size_g = 2000.0 + (i % 40) as f64 * 100.0;
    let lines = INGREDIENTS
        .iter()
        .enumerate()
        .map(|(k, ing)| BatchLine {
            ingredient: (*ing).to_owned(),
            planned_g: size_g / 4.0,
            actual_g: Some(size_g / 4.0 + (i % 3) as f64),
            // A sack or churn lasts about 50 batches.
            lot: format!("L{k}-{:06}", i / 50),
        })
        .collect();
    let h = i.wrapping_mul(2_654_435_761);
    let mut text: Vec<&str> = (0..5)
        .map(|k| WORDS[(h >> (k * 4)) % WORDS.len()])
        .collect();
    if i % 1000 == 7 {
        text.push("cracked");
    }
    let note = Note {
        text: text.join(" "),
        written_at: at,
        by: format!("cook{}", i % 12),
        struck: false,
    };
    let amended = i % 500 == 3;
    Batch {
        code: format!("B-{}-{:04}", at.format("%Y%m%d"), i % PER_DAY + 1),
        recipe: recipes[i % recipes.len()].clone(),
        made_at: at,
        size_g,
        operator: format!("cook{}", i % 12),
        status: if amended {
            Status::Amended
        } else {
            Status::Final
        },
        finalized_at: Some(at + chrono::Duration::hours(2)),
        finalized_by: Some("head".into()),
        lines,
        measurements: vec![Measurement {
            kind: MeasurementKind::DrawTempC,
            value: -6.0 - (i % 20) as f64 / 10.0,
            taken_at: at,
            by: format!("cook{}", i % 12),
            struck: false,
        }],
        notes: vec![note],
        amendments: if amended {
            vec![Amendment {
                amended_at: at + chrono::Duration::days(1),
                by: "head".into(),
                reason: "operator name corrected".into(),
                changes: vec![Change::Operator {
                    old: format!("cook{}", (i + 1) % 12),
                    new: format!("cook{}", i % 12),
                }],
            }]
        } else {
            vec![]
        },
        prediction: serde_json::json!({
            "freezing_point_c": -2.4 - (i % 7) as f64 * 0.1,
            "serving_temp_c": -11.5,
            "mass_g": size_g,
        }),
    }
}

pub fn fixture_path() -> PathBuf {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("target/store-bench");
    dir.join(format!(
        "batches-{FIXTURE_BATCHES}-schema{}-gen{GENERATOR}.db",
        gelu::store::migrate::latest_version()
    ))
}

/// The cached 1,000,000-batch file, built on first use.
pub fn fixture() -> PathBuf {
    let path = fixture_path();
    if path.exists() {
        return path;
    }
    std::fs::create_dir_all(path.parent().unwrap()).unwrap();
    let partial = path.with_extension("partial");
    for suffix in ["", "-wal", "-shm"] {
        let _ = std::fs::remove_file(format!("{}{suffix}", partial.display()));
    }
    let started = Instant::now();
    let mut store = Store::open(&partial).unwrap();
    let recipes = versions(&store);
    const CHUNK: usize = 100_000;
    for start in (0..FIXTURE_BATCHES).step_by(CHUNK) {
        let list: Vec<Batch> = (start..(start + CHUNK).min(FIXTURE_BATCHES))
            .map(|i| synthetic(i, &recipes))
            .collect();
        let report = store.import_batches(&list).unwrap();
        assert!(report.errors.is_empty(), "{:?}", &report.errors[..1]);
    }
    drop(store);
    std::fs::rename(&partial, &path).unwrap();
    eprintln!(
        "built {FIXTURE_BATCHES}-batch fixture in {:.1} s ({} MB)",
        started.elapsed().as_secs_f64(),
        std::fs::metadata(&path)
            .map(|m| m.len() / 1_000_000)
            .unwrap_or(0)
    );
    path
}

//! Batch-log speed on a 1,000,000-batch file: opening it, the newest 50 batches of
//! one recipe, a deep keyset page, full-text searches, and importing 20,000 batches
//! into a fresh file. The fixture is built once through the store's own import path
//! (large transactions, prepared statements) and cached under target/.
//!
//! Targets: open < 50 ms, newest 50 of a recipe < 10 ms, search < 50 ms,
//! import >= 20,000 batches/s.

use std::hint::black_box;
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

use chrono::{DateTime, TimeZone, Utc};
use criterion::{BatchSize, Criterion, Throughput, criterion_group, criterion_main};
use gelu::batch::jsonl::batch_json;
use gelu::batch::version::content_hash;
use gelu::batch::{
    Amendment, Batch, BatchFilter, BatchLine, Change, Measurement, MeasurementKind, Note,
    RecipeVersion, Status,
};
use gelu::store::Store;

const FIXTURE_BATCHES: usize = 1_000_000;
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
fn versions(store: &Store) -> Vec<RecipeVersion> {
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

fn made_at(i: usize) -> DateTime<Utc> {
    let start = Utc.with_ymd_and_hms(2024, 1, 1, 6, 0, 0).unwrap();
    start
        + chrono::Duration::days((i / PER_DAY) as i64)
        + chrono::Duration::seconds((i % PER_DAY) as i64 * 60)
}

/// Batch number `i` of the synthetic history (deterministic).
fn synthetic(i: usize, recipes: &[RecipeVersion]) -> Batch {
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

fn fixture_path() -> PathBuf {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("target/store-bench");
    dir.join(format!(
        "batches-{FIXTURE_BATCHES}-schema{}-gen{GENERATOR}.db",
        gelu::store::migrate::latest_version()
    ))
}

/// The cached 1,000,000-batch file, built on first use.
fn fixture() -> PathBuf {
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

/// The fixture, opened (built on first use, so a filtered run that skips these
/// benchmarks does not build it).
fn million() -> Store {
    Store::open(&fixture()).unwrap()
}

fn on_a_million(c: &mut Criterion) {
    c.bench_function("open 1M-batch file", |b| {
        let path = fixture();
        b.iter(|| black_box(Store::open(&path).unwrap()))
    });
    c.bench_function("newest 50 of one recipe", |b| {
        let store = million();
        let newest = BatchFilter {
            recipe: Some(store.recipes().unwrap()[3].name.clone()),
            limit: 50,
            ..Default::default()
        };
        b.iter(|| {
            let rows = store.list_batches(&newest).unwrap();
            assert_eq!(rows.len(), 50);
            black_box(rows)
        })
    });
    c.bench_function("a page of 50, half a million rows down", |b| {
        let store = million();
        // The cursor of the row half way down, found by date.
        let middle = BatchFilter {
            until: Some(made_at(FIXTURE_BATCHES / 2)),
            limit: 1,
            ..Default::default()
        };
        let deep = BatchFilter {
            limit: 50,
            after: store.list_batches(&middle).unwrap().pop().map(|r| r.cursor),
            ..Default::default()
        };
        b.iter(|| {
            let rows = store.list_batches(&deep).unwrap();
            assert_eq!(rows.len(), 50);
            black_box(rows)
        })
    });
    for (label, text) in [
        ("search a lot code (50 batches)", "L2-004321"),
        ("search a rare word (1,000 batches)", "cracked"),
        ("search a common word, newest 50", "glossy"),
        ("search a common prefix, newest 50", "gloss*"),
    ] {
        c.bench_function(label, |b| {
            let store = million();
            let filter = BatchFilter {
                search: Some(text.into()),
                limit: 50,
                ..Default::default()
            };
            b.iter(|| {
                let rows = store.list_batches(&filter).unwrap();
                assert!(!rows.is_empty());
                black_box(rows)
            })
        });
    }
}

/// A full analysis snapshot (about 5 kB of JSON), as `gelu batch new` stores.
fn real_snapshot() -> serde_json::Value {
    let (file, text) = gelu::samples::SAMPLE_RECIPES[0];
    let recipe = gelu::recipe_file::parse_recipe(Path::new(file), text).unwrap();
    let plan = gelu::batch::plan::Plan {
        recipe: &recipe,
        recipe_text: text,
        size: gelu::model::Amount::Grams(5000.0),
        operator: "cook",
        lots: &[],
        note: None,
        made_at: made_at(0),
    };
    gelu::batch::plan::plan_batch(
        &plan,
        gelu::catalog::Catalog::builtin(),
        &gelu::analysis::Options::default(),
    )
    .unwrap()
    .prediction
}

fn import(c: &mut Criterion) {
    const N: usize = 20_000;
    let dir = tempfile::tempdir().unwrap();
    let recipes = versions(&Store::open(&dir.path().join("seed.db")).unwrap());
    let snapshot = real_snapshot();
    let compact: String = (0..N)
        .map(|i| format!("{}\n", batch_json(&synthetic(i, &recipes))))
        .collect();
    let full: String = (0..N)
        .map(|i| {
            let mut b = synthetic(i, &recipes);
            b.prediction = snapshot.clone();
            format!("{}\n", batch_json(&b))
        })
        .collect();
    let mut group = c.benchmark_group("import");
    group.throughput(Throughput::Elements(N as u64));
    let mut run = 0;
    for (label, text) in [
        ("20,000 batches, compact snapshots", &compact),
        ("20,000 batches, full 5 kB analysis snapshots", &full),
    ] {
        group.bench_function(label, |b| {
            b.iter_batched(
                || {
                    run += 1;
                    Store::open(&dir.path().join(format!("fresh-{run}.db"))).unwrap()
                },
                |mut store| {
                    let report = store.import_jsonl(&mut text.as_bytes()).unwrap();
                    assert_eq!(report.imported, N);
                    store
                },
                BatchSize::PerIteration,
            )
        });
    }
    group.finish();
}

criterion_group! {
    name = benches;
    config = Criterion::default()
        .sample_size(10)
        .warm_up_time(Duration::from_millis(300))
        .measurement_time(Duration::from_secs(2));
    targets = on_a_million, import
}
criterion_main!(benches);

//! Batch-log speed on a 1,000,000-batch file: opening it, the newest 50 batches of
//! one recipe, a deep keyset page, full-text searches, and importing 20,000 batches
//! into a fresh file. The fixture is built once through the store's own import path
//! (large transactions, prepared statements) and cached under target/.
//!
//! Targets: open < 50 ms, newest 50 of a recipe < 10 ms, search < 50 ms,
//! import >= 20,000 batches/s.

mod common;

use std::hint::black_box;
use std::path::Path;
use std::time::Duration;

use common::{FIXTURE_BATCHES, fixture, made_at, synthetic, versions};
use criterion::{BatchSize, Criterion, Throughput, criterion_group, criterion_main};
use gelu::batch::BatchFilter;
use gelu::batch::jsonl::batch_json;
use gelu::store::Store;

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

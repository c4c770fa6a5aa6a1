//! Pulling into a log that already holds a million batches stays as fast as pulling
//! into a new one: 2,000 new batches (four lines, a reading and a note each) pulled
//! from a local hub into a fresh log and into a copy of the cached 1,000,000-batch
//! log (benches/common, built on first use). The pulling logs sync with an account
//! that may only read, so they only pull. The million batches are marked as already
//! on the hub, as at a site that has synced them: otherwise each sync would count a
//! million records waiting to be sent, which is not what this measures.
//!
//! `cargo bench --bench sync_pull`.

mod common;

use std::path::Path;
use std::time::{Duration, Instant};

use common::hub::{self, fill, new_log, reader, target};
use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use gelu::store::Store;
use gelu::sync;

/// Marks every row of a log as already on the hub (the watermarks of a log that
/// has pushed everything), straight in its sync_state table.
fn as_if_pushed(path: &Path) {
    let conn = rusqlite::Connection::open(path).unwrap();
    for (key, table) in [
        ("push.versions", "recipe_versions"),
        ("push.heads", "batches"),
        ("push.measurements", "measurements"),
        ("push.notes", "batch_notes"),
        ("push.amendments", "amendments"),
    ] {
        conn.execute(
            &format!(
                "INSERT OR REPLACE INTO sync_state (key, value)
                 SELECT ?1, coalesce(max(id), 0) FROM {table}"
            ),
            [key],
        )
        .unwrap();
    }
}

fn benches(c: &mut Criterion) {
    let mut own = None;
    let server = hub::server(&mut own);
    let work = tempfile::tempdir_in(Path::new(env!("CARGO_MANIFEST_DIR")).join("target")).unwrap();
    const PAGE: usize = 2_000;
    let db = server.new_database("pull");
    let pusher_hub = target(&server.admin_url(&db));
    let mut pusher = new_log(&work.path().join("pusher.db"), "PSH");
    sync::sync(&mut pusher, &pusher_hub).unwrap();
    let read_only = reader(server, &db);
    let million = work.path().join("million.db");
    let started = Instant::now();
    std::fs::copy(common::fixture(), &million).unwrap();
    eprintln!(
        "copied the 1M-batch log in {:.1} s",
        started.elapsed().as_secs_f64()
    );
    let mut made = 0;
    let mut group = c.benchmark_group("pull");
    group.throughput(Throughput::Elements(PAGE as u64));
    let fresh = work.path().join("fresh.db");
    drop(new_log(&fresh, "FRS"));
    let logs = [
        (
            "2,000 new batches into a fresh log",
            Store::open(&fresh).unwrap(),
        ),
        (
            "2,000 new batches into a 1,000,000-batch log",
            Store::open(&million).unwrap(),
        ),
    ];
    for (label, store) in logs {
        // Catch up first, so each timed pull takes exactly the new page; then mark
        // the log's own rows as on the hub (a first sync starts its marks afresh).
        let mut store = store;
        sync::sync(&mut store, &read_only).unwrap();
        let path = store.path().to_path_buf();
        drop(store);
        as_if_pushed(&path);
        let mut store = Store::open(&path).unwrap();
        assert_eq!(store.sync_status().unwrap().batches, 0);
        group.bench_function(label, |b| {
            b.iter_custom(|iters| {
                let mut spent = Duration::ZERO;
                for _ in 0..iters {
                    fill(&mut pusher, "PSH", made, made + PAGE);
                    made += PAGE;
                    sync::sync(&mut pusher, &pusher_hub).unwrap();
                    let started = Instant::now();
                    let r = sync::sync(&mut store, &read_only).unwrap();
                    spent += started.elapsed();
                    assert_eq!(r.pulled.batches, PAGE);
                }
                spent
            })
        });
    }
    group.finish();
}

criterion_group! {
    name = pull_benches;
    config = Criterion::default()
        .sample_size(10)
        .warm_up_time(Duration::from_millis(200))
        .measurement_time(Duration::from_secs(2));
    targets = benches
}
criterion_main!(pull_benches);

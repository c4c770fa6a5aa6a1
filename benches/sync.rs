//! Sync speed against a local PostgreSQL hub: a throwaway server started here (the
//! test harness's, with the server's default durability: fsync and synchronous
//! commit on), or GELU_TEST_PG_URL's.
//!
//! - Pushing 100,000 batches (four lines, a reading and a note each; a third signed
//!   off) from a log to an empty hub, timed whole (`gelu::sync::sync`: connecting,
//!   setting the hub up, pushing, pulling nothing), three runs. Goal: >= 5,000
//!   batches/s. Timed by hand, not by criterion: one run takes tens of seconds.
//! - A sync with nothing new, through the library and as a whole `gelu sync`
//!   process. Goal: < 50 ms.
//!
//! `cargo bench --bench sync`; pulling into a million-batch log is
//! `cargo bench --bench sync_pull`.

mod common;

use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

use common::hub::{self, fill, new_log, target};
use common::server;
use criterion::{Criterion, criterion_group, criterion_main};
use gelu::store::Store;
use gelu::sync;

fn push_100k(server: &server::Server, work: &Path) -> (PathBuf, String) {
    const N: usize = 100_000;
    let template = work.join("kitchen-template.db");
    fill(&mut new_log(&template, "KTN"), "KTN", 0, N);
    let mut last = (PathBuf::new(), String::new());
    for run in 0..3 {
        let log = work.join(format!("kitchen-{run}.db"));
        std::fs::copy(&template, &log).unwrap();
        let db = server.new_database("push");
        let mut store = Store::open(&log).unwrap();
        let started = Instant::now();
        let report = sync::sync(&mut store, &target(&server.admin_url(&db))).unwrap();
        let took = started.elapsed().as_secs_f64();
        assert_eq!(report.pushed.batches, N);
        eprintln!(
            "push {N} batches to an empty hub, run {}: {took:.2} s = {:.0} batches/s \
             ({} records in all)",
            run + 1,
            N as f64 / took,
            report.pushed.total()
        );
        last = (log, server.admin_url(&db));
    }
    last
}

fn benches(c: &mut Criterion) {
    let mut own = None;
    let server = hub::server(&mut own);
    let work = tempfile::tempdir_in(Path::new(env!("CARGO_MANIFEST_DIR")).join("target")).unwrap();

    // 1. Pushing 100,000 batches; the last run's log and hub are kept for 2.
    let (log, url) = push_100k(server, work.path());

    // 2. Nothing new.
    let mut store = Store::open(&log).unwrap();
    let hub = target(&url);
    c.bench_function("sync with nothing new (library, 100k-batch log)", |b| {
        b.iter(|| {
            let r = sync::sync(&mut store, &hub).unwrap();
            assert_eq!(r.pushed.total() + r.pulled.total(), 0);
        })
    });
    drop(store);
    c.bench_function("sync with nothing new (whole gelu process)", |b| {
        b.iter(|| {
            let out = std::process::Command::new(env!("CARGO_BIN_EXE_gelu"))
                .arg("--db")
                .arg(&log)
                .args(["sync", "--server", &url])
                .env_remove("GELU_SYNC_URL")
                .output()
                .unwrap();
            assert!(
                out.status.success(),
                "{}",
                String::from_utf8_lossy(&out.stderr)
            );
        })
    });
}

criterion_group! {
    name = sync_benches;
    config = Criterion::default()
        .sample_size(10)
        .warm_up_time(Duration::from_millis(200))
        .measurement_time(Duration::from_secs(2));
    targets = benches
}
criterion_main!(sync_benches);

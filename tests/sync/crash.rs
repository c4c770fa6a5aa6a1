//! Syncs killed with SIGKILL at random moments, then run again: nothing is lost or
//! doubled on either side. `cargo test` runs a few rounds; the soak
//! (`cargo test --release --test sync -- --ignored killed_many`) runs many. Also four
//! terminals syncing at once.

use std::process::Stdio;
use std::time::{Duration, Instant};

use crate::common::{Random, Site, assert_same_records};
use crate::server::shared;

/// Runs `gelu sync` at `site` and kills it after a random moment within `span`,
/// `rounds` times; returns how many runs were killed before they finished.
fn kill_syncs(site: &Site, url: &str, rounds: usize, span: Duration, random: &mut Random) -> usize {
    let mut killed = 0;
    for _ in 0..rounds {
        let mut child = site
            .gelu()
            .args(["sync", "--server", url])
            .stdout(Stdio::null())
            .stderr(Stdio::null())
            .spawn()
            .unwrap();
        let wait = Duration::from_micros(random.next() % span.as_micros().max(1) as u64);
        std::thread::sleep(wait);
        if child.try_wait().unwrap().is_none() {
            child.kill().unwrap();
            killed += 1;
        }
        child.wait().unwrap();
    }
    killed
}

fn killed_syncs_lose_and_double_nothing(rounds: usize, batches: usize) {
    let server = shared();
    let db = server.new_database("crash");
    let url = server.admin(&db);
    let (kitchen, shop) = (Site::new("KTN"), Site::new("SHP"));
    kitchen.fill(batches);
    shop.fill(batches / 3);
    shop.new_batch("made by hand");

    // How long a whole push takes here, measured on a copy of the kitchen's log.
    let probe = Site::new("PRB");
    std::fs::copy(&kitchen.db, &probe.db).unwrap();
    let probe_db = server.new_database("crash_probe");
    let started = Instant::now();
    probe.sync_ok(&server.admin(&probe_db));
    // Kills land in the first 70 % of that, where a sync is still working.
    let span = started.elapsed() * 7 / 10;
    eprintln!("a whole sync takes {:?}", started.elapsed());

    let mut random = Random::from_clock();
    let killed = kill_syncs(&kitchen, &url, rounds, span, &mut random)
        + kill_syncs(&shop, &url, rounds, span, &mut random);
    eprintln!("{killed} of {} syncs killed", 2 * rounds);
    assert!(
        killed > 0,
        "no sync was killed before it finished: nothing was tested"
    );
    kitchen.sync_ok(&url);
    shop.sync_ok(&url);
    // The kitchen pulls again, killed now and then, then to the end.
    kill_syncs(&kitchen, &url, rounds, span, &mut random);
    kitchen.sync_ok(&url);

    let total = batches + batches / 3 + 1;
    let count = |table: &str| -> usize {
        server
            .sql(&db, &format!("SELECT count(*) FROM gelu.{table}"))
            .parse()
            .unwrap()
    };
    assert_eq!(count("batches"), total, "each batch once on the hub");
    // Synthetic batches have four lines; the vanilla made by hand, seven.
    assert_eq!(count("batch_lines"), 4 * (total - 1) + 7);
    assert_eq!(count("notes"), total);
    let (a, b) = (kitchen.export(), shop.export());
    assert_eq!(a.lines().count(), total, "each batch once in the log");
    assert_same_records(&a, &b, "both sites hold the same records");
    for site in [&kitchen, &shop] {
        site.check();
        assert_eq!(site.status()["waiting"]["total"], 0);
    }
}

#[test]
fn syncs_killed_at_random_moments_lose_and_double_nothing() {
    killed_syncs_lose_and_double_nothing(3, 1_500);
}

#[test]
#[ignore = "soak: many rounds; run with --ignored"]
fn killed_many_times_syncs_still_lose_and_double_nothing() {
    killed_syncs_lose_and_double_nothing(40, 6_000);
}

#[test]
fn four_terminals_syncing_at_once_end_with_the_same_records() {
    let server = shared();
    let db = server.new_database("four");
    let url = server.admin(&db);
    let sites: Vec<Site> = ["NRT", "EST", "STH", "WST"]
        .iter()
        .map(|code| {
            let s = Site::new(code);
            s.fill(300);
            s.new_batch("by hand");
            s
        })
        .collect();
    for _ in 0..2 {
        std::thread::scope(|scope| {
            let runs: Vec<_> = sites
                .iter()
                .map(|s| scope.spawn(|| s.sync_ok(&url)))
                .collect();
            for run in runs {
                run.join().unwrap();
            }
        });
    }
    // Each saw what the others had committed by then; one more round each for the rest.
    for s in &sites {
        s.sync_ok(&url);
    }
    let first = sites[0].export();
    assert_eq!(first.lines().count(), 4 * 301);
    for s in &sites[1..] {
        assert_same_records(&s.export(), &first, &s.code);
    }
    assert_eq!(
        server.sql(&db, "SELECT count(*) FROM gelu.batches"),
        (4 * 301).to_string()
    );
}

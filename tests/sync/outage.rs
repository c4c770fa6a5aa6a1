//! A hub that is down, or goes down in the middle of a sync: a clear error, the
//! local log untouched and usable, and a clean resume once the server is back.

use std::process::Stdio;
use std::time::{Duration, Instant};

use crate::common::{Site, assert_same_records, stderr};
use crate::server::{ADMIN, Server, admin_password};

#[test]
fn a_hub_that_is_down_changes_nothing_and_says_so() {
    // A port where nothing listens.
    let port = std::net::TcpListener::bind("127.0.0.1:0")
        .unwrap()
        .local_addr()
        .unwrap()
        .port();
    let site = Site::new("KTN");
    site.new_batch("made while the hub is away");
    let before = (site.export(), site.status());
    let bytes = std::fs::read(&site.db).unwrap();
    let url = format!("postgresql://{ADMIN}@127.0.0.1:{port}/hub");
    let out = site.sync(&url).unwrap_err();
    assert_eq!(out.status.code(), Some(2));
    let said = stderr(&out);
    assert!(said.contains("could not be reached"), "{said}");
    assert!(said.contains("Nothing was changed here"), "{said}");
    assert!(
        !said.contains(&admin_password()),
        "no password in messages: {said}"
    );
    assert_eq!(
        std::fs::read(&site.db).unwrap(),
        bytes,
        "the log file is untouched"
    );
    assert_eq!((site.export(), site.status()), before);
    // And it stays usable.
    site.new_batch("and another");
    site.check();

    // A wrong password is refused with its own message.
    let server = crate::server::shared();
    let db = server.new_database("refused");
    let out = site
        .gelu()
        .env("PGPASSWORD", "wrong")
        .args(["sync", "--server", &server.admin(&db)])
        .output()
        .unwrap();
    assert!(!out.status.success());
    assert!(
        stderr(&out).contains("refused the connection"),
        "{}",
        stderr(&out)
    );
}

#[test]
fn a_hub_stopped_mid_sync_gives_a_clear_error_and_a_clean_resume() {
    let server = Server::start_with(&["fsync=off"]);
    let db = server.new_database("outage");
    let url = server.admin(&db);
    let (kitchen, shop) = (Site::new("KTN"), Site::new("SHP"));
    kitchen.fill(3_000);

    let started = Instant::now();
    let child = kitchen
        .gelu()
        .args(["sync", "--server", &url])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    // Let the push get going (the hub is set up and the first pages are in).
    let deadline = Instant::now() + Duration::from_secs(20);
    while server
        .try_sql(&db, "SELECT count(*) FROM gelu.batches")
        .map(|n| n.parse::<usize>().unwrap_or(0) < 200)
        .unwrap_or(true)
    {
        assert!(Instant::now() < deadline, "the sync did not start sending");
        std::thread::sleep(Duration::from_millis(10));
    }
    server.stop_now();
    let out = child.wait_with_output().unwrap();
    eprintln!("stopped after {:?}", started.elapsed());
    assert!(
        !out.status.success(),
        "the sync cannot have finished: {}",
        stderr(&out)
    );
    let said = stderr(&out);
    assert!(
        said.contains("stopped") || said.contains("could not be reached"),
        "{said}"
    );
    assert!(
        said.contains("gelu sync") || said.contains("next sync"),
        "{said}"
    );
    // The log is whole and usable; some records still wait.
    kitchen.check();
    assert!(kitchen.status()["waiting"]["batches"].as_u64().unwrap() > 0);
    kitchen.new_batch("made while the hub was down");

    server.start_again();
    let resumed = kitchen.sync_ok(&url);
    assert!(
        resumed["pushed"]["batches"].as_u64().unwrap() > 0,
        "{resumed}"
    );
    assert_eq!(resumed["waiting"]["total"], 0, "{resumed}");
    assert_eq!(
        server.sql(&db, "SELECT count(*) FROM gelu.batches"),
        "3001",
        "each batch once on the hub"
    );
    shop.sync_ok(&url);
    assert_same_records(&kitchen.export(), &shop.export(), "after the resume");
}

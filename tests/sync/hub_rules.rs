//! The hub's own rules: records there are append-only whatever account asks; a row
//! changed behind gelu's back is refused and shown; an account that may only read
//! pulls but does not push; a hub newer than the program is refused untouched.

use crate::common::{Site, stderr};
use crate::server::{admin_password, shared};

#[test]
fn the_hub_refuses_to_change_or_delete_a_record_even_for_its_owner() {
    let server = shared();
    let db = server.new_database("append_only");
    let kitchen = Site::new("KTN");
    let code = kitchen.new_batch("a batch");
    kitchen.run(&["batch", "finalize", &code, "--by", "Ines"]);
    kitchen.sync_ok(&server.admin(&db));
    for sql in [
        "UPDATE gelu.batches SET size_g = 1",
        "DELETE FROM gelu.batch_lines",
        "UPDATE gelu.finalisations SET finalized_by = 'someone else'",
        "DELETE FROM gelu.notes",
        "TRUNCATE gelu.amendments CASCADE",
    ] {
        let err = server.try_sql(&db, sql).unwrap_err();
        assert!(err.contains("append-only"), "{sql}: {err}");
    }
    assert_eq!(server.sql(&db, "SELECT count(*) FROM gelu.batches"), "1");
}

#[test]
fn a_row_changed_on_the_hub_behind_gelus_back_is_refused_and_shown() {
    let server = shared();
    let db = server.new_database("tampered");
    let url = server.admin(&db);
    let (kitchen, shop) = (Site::new("KTN"), Site::new("SHP"));
    let changed = kitchen.new_batch("its size will be changed");
    let relotted = kitchen.new_batch("its lot will be changed");
    let noted = kitchen.new_batch("its note will be changed");
    let fine = kitchen.new_batch("left alone");
    kitchen.sync_ok(&url);
    // Someone with the owner's rights switches the triggers off and edits rows.
    server.sql(
        &db,
        &format!(
            "SET session_replication_role = replica;
             UPDATE gelu.batches SET size_g = 9999 WHERE code = '{changed}';
             UPDATE gelu.batch_lines SET lot = 'S-OTHER' WHERE code = '{relotted}' AND lot = 'S-1';
             UPDATE gelu.notes SET text = 'all fine' WHERE code = '{noted}';"
        ),
    );
    let out = shop.sync(&url).unwrap_err();
    assert_eq!(out.status.code(), Some(1));
    assert!(stderr(&out).contains("no longer match"), "{}", stderr(&out));
    let codes = shop.codes();
    assert!(codes.contains(&fine), "{codes:?}");
    assert!(
        !codes.contains(&changed) && !codes.contains(&relotted),
        "{codes:?}"
    );
    let noted_here = shop.run(&["batch", "show", &noted, "--json"]);
    let noted_here: serde_json::Value = serde_json::from_slice(&noted_here.stdout).unwrap();
    assert_eq!(
        noted_here["notes"].as_array().unwrap().len(),
        0,
        "the altered note is refused"
    );
    let listed = shop.run(&["sync", "--conflicts", "--json"]);
    let listed = String::from_utf8(listed.stdout).unwrap();
    for code in [&changed, &relotted, &noted] {
        assert!(
            listed
                .lines()
                .any(|l| l.contains("\"altered\"") && l.contains(code.as_str())),
            "{code} is flagged: {listed}"
        );
    }
    assert_eq!(shop.status()["conflicts_open"], 3);
}

#[test]
fn an_account_that_may_only_read_pulls_but_does_not_push() {
    let server = shared();
    let db = server.new_database("reader");
    let kitchen = Site::new("KTN");
    let made = kitchen.new_batch("from the kitchen");
    kitchen.sync_ok(&server.admin(&db));
    server.sql(
        &db,
        &format!(
            "DO $$ BEGIN
               IF NOT EXISTS (SELECT 1 FROM pg_roles WHERE rolname = 'shop_reader') THEN
                 CREATE ROLE shop_reader LOGIN PASSWORD '{pw}';
               END IF;
             END $$;
             GRANT CONNECT ON DATABASE {db} TO shop_reader;
             GRANT USAGE ON SCHEMA gelu TO shop_reader;
             GRANT SELECT ON ALL TABLES IN SCHEMA gelu TO shop_reader;",
            pw = admin_password()
        ),
    );
    let reader = server.url("shop_reader", &db);
    let shop = Site::new("SHP");
    let first = shop.sync_ok(&reader);
    assert_eq!(first["read_only"], true);
    assert_eq!(first["pulled"]["batches"], 1, "{first}");
    assert!(shop.codes().contains(&made));

    shop.new_batch("from the shop");
    let out = shop.sync(&reader).unwrap_err();
    assert_eq!(out.status.code(), Some(1));
    assert!(stderr(&out).contains("may only read"), "{}", stderr(&out));
    assert_eq!(shop.status()["waiting"]["batches"], 1, "it still waits");
    assert_eq!(server.sql(&db, "SELECT count(*) FROM gelu.batches"), "1");
    // The account cannot write there by other means either.
    let direct = std::process::Command::new(crate::server::pg_bin("psql"))
        .arg(&reader)
        .env("PGPASSWORD", admin_password())
        .args(["-X", "-c", "DELETE FROM gelu.meta"])
        .output()
        .unwrap();
    assert!(!direct.status.success());

    // A reader cannot set up a hub that is not there.
    let empty = server.new_database("reader_empty");
    server.sql(&empty, "GRANT CONNECT ON DATABASE postgres TO shop_reader");
    server.sql(&empty, "REVOKE CREATE ON SCHEMA public FROM PUBLIC");
    server.sql(
        "postgres",
        &format!("REVOKE CREATE ON DATABASE {empty} FROM PUBLIC"),
    );
    let out = Site::new("NEW")
        .sync(&server.url("shop_reader", &empty))
        .unwrap_err();
    assert!(stderr(&out).contains("not set up"), "{}", stderr(&out));
}

#[test]
fn a_hub_newer_than_the_program_is_refused_untouched() {
    let server = shared();
    let db = server.new_database("newer");
    let url = server.admin(&db);
    let kitchen = Site::new("KTN");
    kitchen.sync_ok(&url);
    server.sql(
        &db,
        "UPDATE gelu.meta SET value = '99' WHERE key = 'schema_version'",
    );
    kitchen.new_batch("waits");
    let before = kitchen.status();
    let out = kitchen.sync(&url).unwrap_err();
    assert!(
        stderr(&out).contains("schema version 99"),
        "{}",
        stderr(&out)
    );
    assert!(stderr(&out).contains("newer gelu"), "{}", stderr(&out));
    assert_eq!(kitchen.status(), before);
    assert_eq!(server.sql(&db, "SELECT count(*) FROM gelu.batches"), "0");
    assert_eq!(
        server.sql(
            &db,
            "SELECT value FROM gelu.meta WHERE key = 'schema_version'"
        ),
        "99"
    );
}

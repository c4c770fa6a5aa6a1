//! Two sites and one hub: each records batches offline, both sync, and both end with
//! the same set of records (their exports are identical, byte for byte); a batch
//! signed off and amended travels with its trail; a recipe version saved at one site
//! is found at the other; entries added to the other site's batches come back in the
//! same order everywhere; a sync with nothing new moves nothing.

use serde_json::Value;

use crate::common::{Site, VANILLA, assert_same_records};
use crate::server::{admin_password, shared};

fn show(site: &Site, code: &str) -> Value {
    let out = site.run(&["batch", "show", code, "--json"]);
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn two_sites_offline_then_synced_hold_the_same_records() {
    let server = shared();
    let db = server.new_database("two_sites");
    let url = server.admin(&db);
    let kitchen = Site::new("KTN");
    let shop = Site::new("SHP");

    // Offline: the kitchen makes, measures, signs off and amends a batch...
    let k1 = kitchen.new_batch("first of the day");
    assert!(k1.starts_with("B-") && k1.contains("-KTN-"), "{k1}");
    kitchen.run(&[
        "batch",
        "measure",
        &k1,
        "brix=31.5",
        "draw-temp-c=-6.2",
        "--by",
        "Ines",
    ]);
    kitchen.run(&["batch", "finalize", &k1, "--by", "Ines"]);
    kitchen.run(&[
        "batch",
        "amend",
        &k1,
        "--reason",
        "lot misread",
        "--lot",
        "sucrose=S-2",
        "--by",
        "Ines",
    ]);
    // ... and a new version of the vanilla recipe, with a batch of it.
    let edited = kitchen.dir().join("vanilla-v2.toml");
    let text = std::fs::read_to_string(VANILLA).unwrap();
    let changed = text.replacen("# ", "# less sugar this season; ", 1) + "\n# v2\n";
    std::fs::write(&edited, &changed).unwrap();
    let k2 = kitchen.new_batch_of(edited.to_str().unwrap(), "new version");
    let k2_record = show(&kitchen, &k2);
    assert_eq!(k2_record["recipe_version"], 2, "{k2_record}");

    // The shop makes two batches, notes one and signs it off.
    let s1 = shop.new_batch("shop batch");
    let s2 = shop.new_batch("second shop batch");
    shop.run(&["batch", "note", &s1, "tasted: smooth", "--by", "Tomas"]);
    shop.run(&["batch", "finalize", &s1, "--by", "Tomas"]);
    assert_eq!(shop.status()["waiting"]["batches"], 2);

    let first = kitchen.sync_ok(&url);
    assert_eq!(first["pushed"]["batches"], 2, "{first}");
    assert_eq!(first["pulled"]["batches"], 0, "{first}");
    for key in [
        "server",
        "hub",
        "site",
        "pushed",
        "pulled",
        "new_conflicts",
        "altered",
        "conflicts_open",
        "waiting",
        "started_over",
        "read_only",
        "last_sync",
        "seconds",
    ] {
        assert!(first.get(key).is_some(), "sync JSON lacks `{key}`: {first}");
    }
    assert!(
        !first["server"]
            .as_str()
            .unwrap()
            .contains(&admin_password()),
        "no password shown"
    );
    let second = shop.sync_ok(&url);
    assert_eq!(second["pushed"]["batches"], 2, "{second}");
    assert_eq!(second["pulled"]["batches"], 2, "{second}");
    assert_eq!(second["pulled"]["finalisations"], 1, "{second}");
    // k1: a reading pair and the amendment; s1's note is the shop's own.
    assert_eq!(second["pulled"]["entries"], 5, "{second}");
    let third = kitchen.sync_ok(&url);
    assert_eq!(third["pulled"]["batches"], 2, "{third}");
    assert_eq!(third["pushed"]["batches"], 0, "{third}");

    let (a, b) = (kitchen.export(), shop.export());
    assert_eq!(a.lines().count(), 4);
    assert_same_records(&a, &b, "both sites hold the same records");

    // The signed-off and amended batch came with its trail.
    let at_shop = show(&shop, &k1);
    assert_eq!(at_shop["status"], "amended");
    assert_eq!(at_shop["amendments"][0]["reason"], "lot misread");
    assert_eq!(at_shop["finalized_by"], "Ines");
    assert_eq!(at_shop, show(&kitchen, &k1));
    // The recipe version saved at the kitchen is at the shop, under the same number.
    let v2 = show(&shop, &k2);
    assert_eq!(v2["recipe_version"], 2);
    assert_eq!(v2["recipe_hash"], k2_record["recipe_hash"]);
    assert_eq!(v2["recipe_text"].as_str().unwrap(), changed);
    // A batch of that text made at the shop now uses that version.
    let s3 = shop.new_batch_of(edited.to_str().unwrap(), "shop makes v2");
    assert_eq!(show(&shop, &s3)["recipe_version"], 2);

    // Entries on the other site's batches, concurrently at the same place in a list.
    shop.run(&["batch", "note", &k2, "sold out by noon", "--by", "Tomas"]);
    kitchen.run(&["batch", "note", &k2, "ran short of vanilla", "--by", "Ines"]);
    kitchen.run(&["batch", "measure", &s2, "ph=6.5", "--by", "Ines"]);
    kitchen.sync_ok(&url);
    shop.sync_ok(&url);
    kitchen.sync_ok(&url);
    let (a, b) = (kitchen.export(), shop.export());
    assert_eq!(a.lines().count(), 5);
    assert_same_records(&a, &b, "entries added on both sides list alike");
    assert_eq!(show(&kitchen, &k2)["notes"].as_array().unwrap().len(), 3);

    // Nothing new: nothing moves, nothing waits.
    let idle = shop.sync_ok(&url);
    assert_eq!(idle["pushed"]["total"], 0, "{idle}");
    assert_eq!(idle["pulled"]["total"], 0, "{idle}");
    assert_eq!(idle["waiting"]["total"], 0, "{idle}");
    assert_eq!(shop.status()["waiting"]["total"], 0);
    kitchen.check();
    shop.check();

    // The hub holds each record once.
    let count = |table: &str| server.sql(&db, &format!("SELECT count(*) FROM gelu.{table}"));
    assert_eq!(count("batches"), "5");
    assert_eq!(count("finalisations"), "2");
    assert_eq!(
        server.sql(
            &db,
            "SELECT count(*) FROM gelu.batch_lines WHERE lot = 'S-1'"
        ),
        server.sql(
            &db,
            "SELECT count(DISTINCT code) FROM gelu.batch_lines WHERE lot = 'S-1'"
        ),
        "a lot's recall on the hub finds each batch once"
    );
}

/// `tests/fixtures/batch-log-v2.db`, written by the schema-2 release (before site codes).
const V2_DB: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/fixtures/batch-log-v2.db"
);

#[test]
fn a_log_made_before_site_codes_keeps_its_codes_and_shares_its_history() {
    let server = shared();
    let db = server.new_database("old_log");
    let url = server.admin(&db);
    let old = Site::new("OLD");
    std::fs::copy(V2_DB, &old.db).unwrap();
    let before = old.export();
    assert!(
        before.contains("\"B-20261202-0001\""),
        "the fixture's own codes"
    );
    let pushed = old.sync_ok(&url);
    assert_eq!(pushed["pushed"]["batches"], 3, "{pushed}");
    let shop = Site::new("SHP");
    shop.sync_ok(&url);
    assert_same_records(
        &shop.export(),
        &before,
        "the old log's history at another site",
    );
    assert_eq!(
        old.export(),
        before,
        "the old log itself is unchanged by syncing"
    );
}

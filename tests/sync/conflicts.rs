//! Conflicts: two logs made before site codes hold different batches under the same
//! code, and two sites save different texts as the same recipe version. Nothing is
//! overwritten: both records are kept at both sites, the conflict is shown, and a
//! person's decision at one site reaches the other.

use serde_json::Value;

use crate::common::{Site, VANILLA, stderr};
use crate::server::shared;

/// Imports one batch under the old code form, made by `operator`.
fn legacy_batch(site: &Site, code: &str, operator: &str) {
    let made = site.new_batch("template");
    let out = site.run(&["batch", "show", &made, "--json"]);
    let mut record: Value = serde_json::from_slice(&out.stdout).unwrap();
    record["code"] = code.into();
    record["operator"] = operator.into();
    let file = site.dir().join("old.jsonl");
    std::fs::write(&file, format!("{record}\n")).unwrap();
    site.run(&["batch", "import", file.to_str().unwrap()]);
}

fn conflicts(site: &Site) -> Vec<Value> {
    let out = site.run(&["sync", "--conflicts", "--all", "--json"]);
    String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect()
}

#[test]
fn same_code_other_content_is_kept_on_both_sides_and_decided_by_a_person() {
    let server = shared();
    let db = server.new_database("conflicts");
    let url = server.admin(&db);
    let (kitchen, shop) = (Site::new("KTN"), Site::new("SHP"));
    let code = "B-20261130-0001";
    legacy_batch(&kitchen, code, "Ines");
    legacy_batch(&shop, code, "Tomas");
    // Both save a different second version of the vanilla recipe.
    let text = std::fs::read_to_string(VANILLA).unwrap();
    for (site, words) in [(&kitchen, "# kitchen's v2\n"), (&shop, "# shop's v2\n")] {
        let file = site.dir().join("vanilla.toml");
        std::fs::write(&file, format!("{text}{words}")).unwrap();
        site.new_batch_of(file.to_str().unwrap(), "v2");
    }

    kitchen.sync_ok(&url);
    let shop_sync = shop.sync_ok(&url);
    assert_eq!(shop_sync["new_conflicts"], 2, "{shop_sync}");
    let kitchen_sync = kitchen.sync_ok(&url);
    assert_eq!(kitchen_sync["new_conflicts"], 2, "{kitchen_sync}");

    for (site, own, other) in [(&kitchen, "Ines", "SHP"), (&shop, "Tomas", "KTN")] {
        // The log's own record stands under the code; the other is kept aside, whole.
        let out = site.run(&["batch", "show", code, "--json"]);
        let here: Value = serde_json::from_slice(&out.stdout).unwrap();
        assert_eq!(here["operator"], own);
        let list = conflicts(site);
        let batch = list.iter().find(|c| c["kind"] == "batch").unwrap();
        assert_eq!(batch["code"], code);
        assert_eq!(batch["site"], other);
        assert_ne!(batch["record"]["operator"], own);
        assert!(batch["decided_at"].is_null());
        // The other site's v2 is kept too, under the next number here.
        let version = list.iter().find(|c| c["kind"] == "recipe-version").unwrap();
        assert_eq!(version["code"], "Harbour vanilla v2");
        assert!(
            version["detail"].as_str().unwrap().contains("version 3"),
            "{version}"
        );
        assert_eq!(site.status()["conflicts_open"], 2);
    }
    // Every batch of both v2s is in both logs.
    assert_eq!(kitchen.codes().len(), shop.codes().len());

    // A person at the kitchen decides; the shop sees it after its next sync.
    let out = kitchen
        .gelu()
        .args([
            "sync",
            "--resolve",
            code,
            "--decision",
            "two batches; the shop's was made on 30 Nov at the quay",
            "--by",
            "Ines",
        ])
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", stderr(&out));
    assert_eq!(kitchen.status()["conflicts_open"], 1);
    assert_eq!(kitchen.status()["waiting"]["decisions"], 1);
    kitchen.sync_ok(&url);
    let after = shop.sync_ok(&url);
    assert_eq!(after["pulled"]["decisions"], 1, "{after}");
    let decided = conflicts(&shop)
        .into_iter()
        .find(|c| c["kind"] == "batch")
        .unwrap();
    assert!(
        decided["decision"]
            .as_str()
            .unwrap()
            .contains("at site KTN"),
        "{decided}"
    );
    assert_eq!(
        shop.status()["conflicts_open"],
        1,
        "the recipe version is still open"
    );
    // A decision cannot be taken on nothing.
    let out = shop
        .gelu()
        .args(["sync", "--resolve", "B-19990101-0001", "--decision", "x"])
        .output()
        .unwrap();
    assert!(!out.status.success());
}

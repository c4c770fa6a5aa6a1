//! Migrating a log that has synchronised. `tests/fixtures/batch-log-v5.db` was written
//! by the release with schema version 5 through its own commands, at site QUAY: one
//! draft of its own with a reading, then a sync with a hub where site PIER had sent
//! a vanilla batch (lots, readings and notes, signed off, then a reading and a note
//! on its trail) and a draft sorbet with a reading and a note. So it holds readings,
//! notes and trail entries pulled from the hub, each with its identity there.
//! `batch-log-v5.jsonl` is what that release exported from it. Each test works on a copy.

use std::path::{Path, PathBuf};

use gelu::store::Store;
use gelu::store::migrate::latest_version;

use crate::store_common::{export, search};

const V5_DB: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/fixtures/batch-log-v5.db"
);
const V5_EXPORT: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/fixtures/batch-log-v5.jsonl"
);

fn copy_of_v5(dir: &Path) -> PathBuf {
    let path = dir.join("log.db");
    std::fs::copy(V5_DB, &path).unwrap();
    path
}

#[test]
fn a_version_5_log_opens_and_exports_exactly_what_version_5_exported() {
    let dir = tempfile::tempdir().unwrap();
    let store = Store::open(&copy_of_v5(dir.path())).unwrap();
    assert_eq!(store.migration().from, 5);
    assert_eq!(store.migration().to, latest_version());
    assert_eq!(
        export(&store),
        std::fs::read_to_string(V5_EXPORT).unwrap(),
        "every field of every record survives opening (and any migration)"
    );
    assert!(store.check().unwrap().is_empty(), "{:?}", store.check());
    assert_eq!(search(&store, "Friday boat"), ["B-20261202-PIER-0002"]);
    assert_eq!(search(&store, "S-3011-4").len(), 2);
    let status = store.sync_status().unwrap();
    assert_eq!((status.site.as_str(), status.waiting()), ("QUAY", 0));
}

//! Migrating a log that has synchronised. `tests/fixtures/batch-log-v5.db` was written
//! by the release with schema version 5 through its own commands, at site QUAY: one
//! draft of its own with a reading, then a sync with a hub where site PIER had sent
//! a vanilla batch (lots, readings and notes, signed off, then a reading and a note
//! on its trail) and a draft sorbet with a reading and a note. So it holds readings,
//! notes and trail entries pulled from the hub, each with its identity there.
//! `batch-log-v5.jsonl` is what that release exported from it. Each test works on a copy.

use std::path::{Path, PathBuf};

use gelu::batch::shared::{EntryBody, SharedEntry};
use gelu::model::time::parse_time;
use gelu::store::migrate::latest_version;
use gelu::store::{PullOutcome, PulledPage, Store};
use rusqlite::{Connection, Row};

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

/// One pulled entry row as the hub sent it: its batch's code and identity, its
/// place, its site and body, and the identity it was stored with.
fn shared_entry(r: &Row, body: EntryBody) -> rusqlite::Result<(SharedEntry, String)> {
    Ok((
        SharedEntry {
            code: r.get(0)?,
            head_hash: r.get(1)?,
            position: r.get(2)?,
            site: r.get(3)?,
            body,
        },
        r.get(4)?,
    ))
}

fn time(r: &Row, i: usize) -> rusqlite::Result<chrono::DateTime<chrono::Utc>> {
    let text: String = r.get(i)?;
    parse_time(&text).map_err(|e| rusqlite::Error::InvalidColumnName(e.to_string()))
}

/// Every reading, note and trail entry the log pulled, rebuilt from its rows.
fn pulled_entries(conn: &Connection) -> Vec<(SharedEntry, String)> {
    let head = "SELECT b.code, h.head_hash, e.position, e.site, e.entry_hash";
    let from = "JOIN batches b ON b.id = e.batch_id JOIN sync_heads h ON h.batch_id = b.id
                WHERE e.entry_hash IS NOT NULL ORDER BY e.id";
    let mut out = Vec::new();
    let sql = format!(
        "{head}, e.kind, e.value, e.unit, e.taken_at, e.taken_by FROM measurements e {from}"
    );
    let mut stmt = conn.prepare(&sql).unwrap();
    let rows = stmt.query_map([], |r| {
        let body = EntryBody::Measurement {
            kind: r.get(5)?,
            value: r.get(6)?,
            unit: r.get(7)?,
            taken_at: time(r, 8)?,
            by: r.get(9)?,
        };
        shared_entry(r, body)
    });
    out.extend(rows.unwrap().map(|e| e.unwrap()));
    let sql = format!("{head}, e.text, e.written_at, e.written_by FROM batch_notes e {from}");
    let mut stmt = conn.prepare(&sql).unwrap();
    let rows = stmt.query_map([], |r| {
        let body = EntryBody::Note {
            text: r.get(5)?,
            written_at: time(r, 6)?,
            by: r.get(7)?,
        };
        shared_entry(r, body)
    });
    out.extend(rows.unwrap().map(|e| e.unwrap()));
    let sql =
        format!("{head}, e.amended_at, e.amended_by, e.reason, e.changes FROM amendments e {from}");
    let mut stmt = conn.prepare(&sql).unwrap();
    let rows = stmt.query_map([], |r| {
        let body = EntryBody::Amendment {
            amended_at: time(r, 5)?,
            by: r.get(6)?,
            reason: r.get(7)?,
            changes: r.get(8)?,
        };
        shared_entry(r, body)
    });
    out.extend(rows.unwrap().map(|e| e.unwrap()));
    out
}

/// What a later pull sends again (a log that starts over with another hub pulls
/// everything from the start) is recognised as held, whether the record it belongs
/// to is still a draft or signed off here since: nothing is written twice, and
/// nothing is kept aside as a conflict.
#[test]
fn entries_pulled_under_version_5_are_taken_once_when_pulled_again() {
    let dir = tempfile::tempdir().unwrap();
    let path = copy_of_v5(dir.path());
    let mut store = Store::open(&path).unwrap();
    let entries = pulled_entries(&Connection::open(&path).unwrap());
    assert_eq!(entries.len(), 8, "3 readings, 3 notes, 2 trail entries");
    for (e, hash) in &entries {
        assert_eq!(&e.hash(), hash, "rebuilt as the hub sent it: {e:?}");
    }
    let before = export(&store);
    let page = PulledPage {
        entries,
        ..PulledPage::default()
    };
    let out = store.write_pulled(&page).unwrap();
    assert_eq!(out, PullOutcome::default());
    assert_eq!(export(&store), before);
    assert!(store.conflicts(false).unwrap().is_empty());
    assert!(store.check().unwrap().is_empty(), "{:?}", store.check());
}

/// The indexes on a table, with the columns each keeps, in order.
fn indexes(conn: &Connection, table: &str) -> Vec<(String, Vec<String>)> {
    let names: Vec<String> = conn
        .prepare("SELECT name FROM pragma_index_list(?1) ORDER BY name")
        .unwrap()
        .query_map([table], |r| r.get(0))
        .unwrap()
        .collect::<rusqlite::Result<_>>()
        .unwrap();
    names
        .into_iter()
        .map(|name| {
            let columns = conn
                .prepare("SELECT name FROM pragma_index_info(?1) ORDER BY seqno")
                .unwrap()
                .query_map([&name], |r| r.get(0))
                .unwrap()
                .collect::<rusqlite::Result<_>>()
                .unwrap();
            (name, columns)
        })
        .collect()
}

/// Migration 6: a pulled entry's identity is kept beside its batch's (batch first),
/// not alone in hash order, where each new entry went to a random page of an index
/// as large as everything ever pulled.
#[test]
fn after_the_upgrade_pulled_identities_are_kept_by_batch() {
    let dir = tempfile::tempdir().unwrap();
    let path = copy_of_v5(dir.path());
    drop(Store::open(&path).unwrap());
    let conn = Connection::open(&path).unwrap();
    for table in ["measurements", "batch_notes", "amendments"] {
        let found = indexes(&conn, table);
        let with_hash: Vec<&Vec<String>> = found
            .iter()
            .map(|(_, columns)| columns)
            .filter(|columns| columns.iter().any(|c| c == "entry_hash"))
            .collect();
        assert_eq!(
            with_hash,
            [&vec!["batch_id".to_owned(), "entry_hash".to_owned()]],
            "{table}: {found:?}"
        );
    }
}

//! The sync benchmarks' hub and sites: a server (a throwaway one with the server's
//! default durability, or GELU_TEST_PG_URL's) and logs filled with the synthetic
//! history under a site's own codes.

use std::path::Path;

use gelu::batch::{Batch, RecipeVersion};
use gelu::store::Store;
use gelu::sync::Target;

use super::server;

/// The server to measure against: GELU_TEST_PG_URL's, or a new one with fsync and
/// synchronous commit on (kept in `own`).
pub fn server(own: &mut Option<server::Server>) -> &server::Server {
    if std::env::var("GELU_TEST_PG_URL").is_ok_and(|u| !u.trim().is_empty()) {
        return server::shared();
    }
    own.get_or_insert_with(server::Server::start)
}

/// Batch `i` of site `site`: the shared synthetic history, under this site's codes.
pub fn batch_of(site: &str, i: usize, recipes: &[RecipeVersion]) -> Batch {
    let mut b = super::synthetic(i, recipes);
    b.code = format!("B-{}-{site}-{i:07}", b.made_at.format("%Y%m%d"));
    b
}

/// Adds batches `from..to` of `site` to the log.
pub fn fill(store: &mut Store, site: &str, from: usize, to: usize) {
    let recipes = super::versions(store);
    for start in (from..to).step_by(50_000) {
        let list: Vec<Batch> = (start..(start + 50_000).min(to))
            .map(|i| batch_of(site, i, &recipes))
            .collect();
        let report = store.import_batches(&list).unwrap();
        assert!(report.errors.is_empty(), "{:?}", report.errors.first());
    }
}

/// A new log of site `site` at `path`.
pub fn new_log(path: &Path, site: &str) -> Store {
    let mut store = Store::open(path).unwrap();
    store.set_site_code(site).unwrap();
    store
}

pub fn target(url: &str) -> Target {
    Target::parse(url).unwrap()
}

/// An account that may only read the hub: a log synced with it only pulls.
pub fn reader(server: &server::Server, db: &str) -> Target {
    server.sql(
        db,
        &format!(
            "DO $$ BEGIN
               IF NOT EXISTS (SELECT 1 FROM pg_roles WHERE rolname = 'bench_reader') THEN
                 CREATE ROLE bench_reader LOGIN PASSWORD '{pw}';
               END IF;
             END $$;
             GRANT USAGE ON SCHEMA gelu TO bench_reader;
             GRANT SELECT ON ALL TABLES IN SCHEMA gelu TO bench_reader;",
            pw = server::admin_password()
        ),
    );
    let url = server.url("bench_reader", db);
    let mut t = target(&url);
    t.config.password(server::admin_password());
    t
}

//! Several sites, one history: batch logs synchronised through a PostgreSQL hub.
//! One test binary, so the server harness (`server.rs`) lives in one place: it
//! starts a throwaway server for the run (or uses GELU_TEST_PG_URL) and each test
//! works in a database of its own on it; the tests that stop the server start their
//! own. Sites are real `gelu` processes on temporary batch logs.

mod common;
mod server;

mod conflicts;
mod crash;
mod hub_rules;
mod outage;
mod tls;
mod two_sites;
mod workspace;

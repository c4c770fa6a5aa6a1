//! The batch log and the command line: the store on temporary files (WAL and
//! locking are real), migrations, imports, crash and concurrency runs of the real
//! binary, and `gelu report` / `gelu batch` through assert_cmd. One test binary.

mod batch_common;
mod store_common;

mod batch_cli;
mod batch_processes;
mod batch_trail;
mod calibrate_cli;
mod characterise_cli;
mod cli_balance;
mod cli_edges;
mod cli_report;
mod compare_cli;
mod db_check;
mod import_refusals;
mod own_items_cli;
mod store_import;
mod store_migrate;
mod store_migrate_v5;
mod store_open;
mod store_records;

//! `gelu sync`: push to and pull from the hub, say what waits (`--status`), list
//! the conflicts kept (`--conflicts`) and record a person's decision on one
//! (`--resolve`); and `gelu site`: this log's site code. `--json` prints one object.

use std::path::Path;
use std::process::ExitCode;

use anyhow::bail;
use serde_json::{Value, json};

use super::batch::who;
use super::db::open_store;
use crate::store::{SYNC_URL_KEY, Store, SyncStatus};
use crate::sync::{self, Moved, SyncReport, Target};

/// Arguments of `gelu sync`.
#[derive(Debug, clap::Args)]
pub struct SyncArgs {
    /// The hub: postgresql://USER@HOST:PORT/DB (add ?sslmode=require or verify-full for
    /// TLS). Default: GELU_SYNC_URL, then the log's `sync_url` setting. The password
    /// comes from PGPASSWORD or ~/.pgpass.
    #[arg(long, env = "GELU_SYNC_URL", value_name = "URL")]
    pub server: Option<String>,
    /// Print one JSON object instead of text.
    #[arg(long)]
    pub json: bool,
    /// Say what waits to be sent and what waits for a person; do not connect.
    #[arg(long, conflicts_with_all = ["conflicts", "resolve"])]
    pub status: bool,
    /// List the conflicts kept (same code, other content), decided ones too with --all.
    #[arg(long, conflicts_with = "resolve")]
    pub conflicts: bool,
    /// With --conflicts: list decided ones too.
    #[arg(long, requires = "conflicts")]
    pub all: bool,
    /// Record a decision on the open conflicts over CODE (a batch code, or `Recipe vN`).
    #[arg(long, value_name = "CODE", requires = "decision")]
    pub resolve: Option<String>,
    /// What was decided, in words (kept with the conflict and sent to every site).
    #[arg(long, value_name = "TEXT", requires = "resolve")]
    pub decision: Option<String>,
    /// Who decides (default: the login name).
    #[arg(long, value_name = "NAME", requires = "resolve")]
    pub by: Option<String>,
}

/// Arguments of `gelu site`.
#[derive(Debug, clap::Args)]
pub struct SiteArgs {
    /// A new site code (2 to 8 letters or digits); possible until the first batch is
    /// written under the code or the log first synchronises.
    pub rename: Option<String>,
}

fn moved_json(m: &Moved) -> Value {
    json!({
        "recipe_versions": m.recipe_versions,
        "batches": m.batches,
        "finalisations": m.finalisations,
        "entries": m.entries,
        "decisions": m.decisions,
        "total": m.total(),
    })
}

fn waiting_json(s: &SyncStatus) -> Value {
    json!({
        "recipe_versions": s.versions,
        "batches": s.batches,
        "finalisations": s.finals,
        "entries": s.entries,
        "decisions": s.decisions,
        "total": s.waiting(),
    })
}

/// The JSON object of a sync (keys are a contract: add, never rename).
pub fn report_json(site: &str, r: &SyncReport) -> Value {
    json!({
        "server": r.server,
        "hub": r.hub,
        "site": site,
        "pushed": moved_json(&r.pushed),
        "pulled": moved_json(&r.pulled),
        "new_conflicts": r.new_conflicts,
        "altered": r.altered,
        "conflicts_open": r.status.conflicts,
        "waiting": waiting_json(&r.status),
        "started_over": r.started_over,
        "read_only": r.read_only,
        "last_sync": r.status.last_sync,
        "seconds": r.seconds,
    })
}

fn moved_text(m: &Moved) -> String {
    if m.total() == 0 {
        return "nothing".into();
    }
    let parts: Vec<String> = [
        (m.batches, "batch(es)"),
        (m.recipe_versions, "recipe version(s)"),
        (m.finalisations, "sign-off(s)"),
        (m.entries, "reading(s), note(s) and amendment(s)"),
        (m.decisions, "decision(s)"),
    ]
    .into_iter()
    .filter(|(n, _)| *n > 0)
    .map(|(n, what)| format!("{n} {what}"))
    .collect();
    parts.join(", ")
}

/// The hub to use: `--server` or GELU_SYNC_URL, then the log's setting.
fn server(args: &SyncArgs, store: &Store) -> anyhow::Result<String> {
    if let Some(url) = args.server.as_deref().filter(|u| !u.trim().is_empty()) {
        return Ok(url.to_owned());
    }
    match store.get_setting(SYNC_URL_KEY)? {
        Some(url) if !url.trim().is_empty() => Ok(url),
        _ => bail!(
            "no hub is set: give --server postgresql://USER@HOST/DB, set GELU_SYNC_URL, or set \
             the sync server in the workspace's settings. Nothing was changed."
        ),
    }
}

fn status(store: &Store, args: &SyncArgs) -> anyhow::Result<ExitCode> {
    let s = store.sync_status()?;
    let configured = server(args, store)
        .ok()
        .and_then(|u| Target::parse(&u).ok())
        .map(|t| t.shown);
    if args.json {
        println!(
            "{}",
            json!({
                "site": s.site,
                "server": configured,
                "hub": s.hub,
                "last_sync": s.last_sync,
                "waiting": waiting_json(&s),
                "conflicts_open": s.conflicts,
            })
        );
    } else {
        println!("site {}", s.site);
        println!(
            "hub: {}",
            configured
                .as_deref()
                .unwrap_or("none set (--server or GELU_SYNC_URL)")
        );
        println!("last sync: {}", s.last_sync.as_deref().unwrap_or("never"));
        println!(
            "waiting to be sent: {} ({} batch(es), {} recipe version(s), {} sign-off(s), \
             {} reading(s)/note(s)/amendment(s), {} decision(s))",
            s.waiting(),
            s.batches,
            s.versions,
            s.finals,
            s.entries,
            s.decisions
        );
        println!("conflicts to decide: {}", s.conflicts);
    }
    Ok(ExitCode::SUCCESS)
}

fn conflicts(store: &Store, args: &SyncArgs) -> anyhow::Result<ExitCode> {
    for c in store.conflicts(!args.all)? {
        if args.json {
            let record: Value = serde_json::from_str(&c.record).unwrap_or(Value::Null);
            println!(
                "{}",
                json!({
                    "id": c.id, "kind": c.kind, "code": c.code, "site": c.site,
                    "hash": c.entry_hash, "found_at": c.found_at, "detail": c.detail,
                    "record": record,
                    "decided_at": c.decided.as_ref().map(|d| &d.0),
                    "decided_by": c.decided.as_ref().map(|d| &d.1),
                    "decision": c.decided.as_ref().map(|d| &d.2),
                })
            );
        } else {
            let state = match &c.decided {
                Some((at, by, what)) => format!("decided {at} by {by}: {what}"),
                None if c.kind == "held-entry" => "kept with its batch".into(),
                None => "open".into(),
            };
            println!(
                "#{} {} {} [{}] {}: {}",
                c.id, c.kind, c.code, c.site, state, c.detail
            );
        }
    }
    Ok(ExitCode::SUCCESS)
}

/// Runs `gelu sync`.
pub fn run(args: &SyncArgs, db: Option<&Path>) -> anyhow::Result<ExitCode> {
    let mut store = open_store(db)?;
    if args.status {
        return status(&store, args);
    }
    if args.conflicts {
        return conflicts(&store, args);
    }
    if let (Some(code), Some(decision)) = (&args.resolve, &args.decision) {
        let by = who(&args.by)?;
        let n = store.resolve_conflict(code, &by, decision)?;
        println!(
            "{code}: {n} conflict(s) decided; the decision goes to the hub with the next sync"
        );
        return Ok(ExitCode::SUCCESS);
    }
    let url = server(args, &store)?;
    let target = Target::parse(&url)?;
    let report = sync::sync(&mut store, &target)?;
    let site = store.site_code()?;
    if args.json {
        println!("{}", report_json(&site, &report));
    } else {
        println!(
            "synchronised site {site} with {} in {:.2} s",
            report.server, report.seconds
        );
        println!("sent: {}", moved_text(&report.pushed));
        println!("received: {}", moved_text(&report.pulled));
        if report.status.conflicts > 0 {
            println!(
                "conflicts to decide: {} (`gelu sync --conflicts` lists them)",
                report.status.conflicts
            );
        }
    }
    let mut code = ExitCode::SUCCESS;
    if report.altered > 0 {
        eprintln!(
            "gelu: {} record(s) on the hub no longer match their identity (changed there behind \
             gelu's back); they were refused and are kept aside: `gelu sync --conflicts`",
            report.altered
        );
        code = ExitCode::from(1);
    }
    // A read-only sync fails only when records other than recipe versions wait: every
    // new log's built-in sample versions wait until a sync that may write, and reach
    // other sites' users only through the batches made from them.
    let s = &report.status;
    let unsent = s.batches + s.entries + s.finals + s.decisions;
    if report.read_only && unsent > 0 {
        eprintln!(
            "gelu: this account may only read the hub: {unsent} record(s) (batches, sign-offs, \
             readings, notes, amendments, decisions) wait here and were not sent"
        );
        code = ExitCode::from(1);
    }
    Ok(code)
}

/// Runs `gelu site`.
pub fn run_site(args: &SiteArgs, db: Option<&Path>) -> anyhow::Result<ExitCode> {
    let mut store = open_store(db)?;
    match &args.rename {
        Some(code) => println!("{}", store.set_site_code(code)?),
        None => {
            println!("{}", store.site_code()?);
            if let Some(why) = store.site_code_fixed()? {
                eprintln!("{why}");
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}

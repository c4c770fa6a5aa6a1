//! The hub's effects: where the log stands (read from the log, no network), a sync
//! now, and renaming the site. The hub is GELU_SYNC_URL, else the `sync_url`
//! setting; its password comes from PGPASSWORD or ~/.pgpass, never the log.
//!
//! A sync runs on a thread of its own with its own connection to the log, so the
//! workspace stays usable while it waits on the network (SQLite's write lock and
//! busy timeout keep the two writers apart, as with two terminals on one log). Its
//! outcome comes back through a channel as actions. Quitting during a sync stops it
//! where it is; a sync is safe to stop at any moment, and the next one resumes.

use std::sync::mpsc::{self, Receiver, TryRecvError};

use crate::store::{SYNC_URL_KEY, Store};
use crate::sync::{self, SyncReport, Target};

use super::super::action::Action;
use super::super::state::SyncView;
use super::convert::load_settings;

/// The hub's address, if one is set.
fn hub_url(store: &Store) -> Option<String> {
    std::env::var("GELU_SYNC_URL")
        .ok()
        .filter(|u| !u.trim().is_empty())
        .or_else(|| store.get_setting(SYNC_URL_KEY).ok().flatten())
        .filter(|u| !u.trim().is_empty())
}

/// Where the log stands with the hub; `running` says whether a sync is running now.
/// A log with no hub set that never synchronised is not counted through (on a large
/// single-site log that would cost a scan, and nothing waits for anyone there).
pub fn view(store: &Store, running: bool) -> anyhow::Result<SyncView> {
    let hub_set = hub_url(store).is_some();
    if !hub_set && !store.has_synced()? {
        return Ok(SyncView {
            site: store.site_code()?,
            running,
            ..SyncView::default()
        });
    }
    let s = store.sync_status()?;
    Ok(SyncView {
        waiting: s.waiting(),
        site: s.site,
        hub_set,
        last_sync: s.last_sync,
        conflicts: s.conflicts,
        running,
    })
}

fn said(r: &SyncReport) -> String {
    let mut text = format!(
        "Synchronised: {} record(s) sent, {} received",
        r.pushed.total(),
        r.pulled.total()
    );
    if r.new_conflicts > 0 {
        text.push_str(&format!(
            "; {} new conflict(s) kept for you to decide (gelu sync --conflicts)",
            r.new_conflicts
        ));
    }
    if r.altered > 0 {
        text.push_str(&format!(
            "; {} record(s) changed on the hub behind gelu's back were refused",
            r.altered
        ));
    }
    if r.read_only {
        text.push_str("; this account may only read, so nothing was sent");
    }
    text.push('.');
    text
}

/// A sync asked for: over at once (no hub is set), or running on its own thread.
pub enum Started {
    /// What the workspace is told now.
    Done(Vec<Action>),
    /// The sync's outcome arrives here when it is over.
    Running(SyncJob),
}

/// A sync running on its own thread.
pub struct SyncJob {
    /// What the sync says when it is over: how it went, or why it failed.
    outcome: Receiver<Result<String, String>>,
}

impl SyncJob {
    /// The sync's outcome as actions, if it is over (waiting for it when `wait` is
    /// true), with where the log now stands read through `store`. A sync thread that
    /// ended without a word (it panicked) is reported as a failure.
    pub fn outcome(&self, store: &Store, wait: bool) -> Option<Vec<Action>> {
        let got = if wait {
            self.outcome.recv().map_err(|_| TryRecvError::Disconnected)
        } else {
            self.outcome.try_recv()
        };
        let said = match got {
            Ok(said) => said,
            Err(TryRecvError::Empty) => return None,
            Err(TryRecvError::Disconnected) => Err(
                "The sync stopped unexpectedly; the log is as its last finished step left it, \
                 and the next sync resumes from there."
                    .into(),
            ),
        };
        let state = match view(store, false) {
            Ok(state) => state,
            Err(e) => return Some(vec![Action::Failed(format!("{e:#}"))]),
        };
        Some(match said {
            Ok(message) => vec![Action::Synced { message, state }],
            Err(e) => vec![Action::Failed(e), Action::SyncState(state)],
        })
    }
}

/// Starts a sync now, on its own thread and its own connection to the log; a failure
/// says what happened and leaves the log as it was.
pub fn start_sync(store: &Store) -> anyhow::Result<Started> {
    let Some(url) = hub_url(store) else {
        return Ok(Started::Done(vec![
            Action::Failed(
                "No hub is set: give the sync server in the settings (4), or GELU_SYNC_URL.".into(),
            ),
            Action::SyncState(view(store, false)?),
        ]));
    };
    let path = store.path().to_path_buf();
    let (tell, outcome) = mpsc::channel();
    std::thread::Builder::new()
        .name("gelu-sync".into())
        .spawn(move || {
            let said = Store::open(&path)
                .map_err(|e| format!("the sync could not open the batch log: {e}"))
                .and_then(|mut own| {
                    Target::parse(&url)
                        .and_then(|target| sync::sync(&mut own, &target))
                        .map(|report| said(&report))
                        .map_err(|e| e.to_string())
                });
            // The workspace may have quit meanwhile; then nobody is left to tell.
            let _ = tell.send(said);
        })?;
    Ok(Started::Running(SyncJob { outcome }))
}

/// Renames the site, then reads the settings again.
pub fn rename_site(store: &mut Store, code: &str) -> anyhow::Result<Vec<Action>> {
    let code = store.set_site_code(code)?;
    Ok(vec![
        Action::SettingsLoaded(load_settings(store)),
        Action::SyncState(view(store, false)?),
        Action::Info(format!("This log's site code is now {code}.")),
    ])
}

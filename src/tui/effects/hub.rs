//! The hub's effects: where the log stands (read from the log, no network), a sync
//! now, and renaming the site. The hub is GELU_SYNC_URL, else the `sync_url`
//! setting; its password comes from PGPASSWORD or ~/.pgpass, never the log.

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

/// Where the log stands with the hub. A log with no hub set that never synchronised
/// is not counted through (on a large single-site log that would cost a scan, and
/// nothing waits for anyone there).
pub fn view(store: &Store) -> anyhow::Result<SyncView> {
    let hub_set = hub_url(store).is_some();
    if !hub_set && !store.has_synced()? {
        return Ok(SyncView {
            site: store.site_code()?,
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
        running: false,
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

/// Synchronises now; a failure says what happened and leaves the log as it was.
pub fn sync_now(store: &mut Store) -> anyhow::Result<Vec<Action>> {
    let Some(url) = hub_url(store) else {
        return Ok(vec![
            Action::Failed(
                "No hub is set: give the sync server in the settings (4), or GELU_SYNC_URL.".into(),
            ),
            Action::SyncState(view(store)?),
        ]);
    };
    let outcome = Target::parse(&url).and_then(|target| sync::sync(store, &target));
    let state = view(store)?;
    Ok(match outcome {
        Ok(report) => vec![Action::Synced {
            message: said(&report),
            state,
        }],
        Err(e) => vec![Action::Failed(e.to_string()), Action::SyncState(state)],
    })
}

/// Renames the site, then reads the settings again.
pub fn rename_site(store: &mut Store, code: &str) -> anyhow::Result<Vec<Action>> {
    let code = store.set_site_code(code)?;
    Ok(vec![
        Action::SettingsLoaded(load_settings(store)),
        Action::SyncState(view(store)?),
        Action::Info(format!("This log's site code is now {code}.")),
    ])
}

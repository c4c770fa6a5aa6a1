//! The workspace's sync: `S` on the batches screen starts a sync on a thread of its
//! own, the workspace stays usable meanwhile (a reload while it runs still shows it
//! running), and its outcome arrives as a message with the other site's batches in
//! the list.

use std::collections::VecDeque;

use gelu::tui::app::{drain, drain_showing};
use gelu::tui::effects::Services;
use gelu::tui::{Action, Command, Launch, State};

use crate::common::Site;
use crate::server::shared;

fn message(state: &State) -> String {
    state
        .message
        .as_ref()
        .map(|m| m.text.clone())
        .unwrap_or_default()
}

/// The workspace on `site`'s log with `url` as its hub (the test's URL carries the
/// password, since this process has no PGPASSWORD; a real log is given a URL
/// without one), its startup and `then` carried out.
fn workspace(site: &Site, url: &str, then: &[Command]) -> (State, Services) {
    {
        let mut store = gelu::store::Store::open(&site.db).unwrap();
        store.set_setting(gelu::store::SYNC_URL_KEY, url).unwrap();
    }
    let launch = Launch {
        db: Some(site.db.clone()),
        file: None,
    };
    let mut services = Services::open(&launch).unwrap();
    let mut state = State::new(false);
    let mut queue: VecDeque<Action> = services.startup(&launch).unwrap().into();
    queue.extend(then.iter().map(|c| Action::Command(*c)));
    assert!(!drain(&mut state, &mut services, &mut queue));
    (state, services)
}

/// Runs `command` as the terminal's loop does: without waiting for work it starts
/// in the background.
fn press_without_waiting(state: &mut State, services: &mut Services, command: Command) {
    let mut queue = VecDeque::from([Action::Command(command)]);
    assert!(!drain_showing(state, services, &mut queue, &mut |_| {}));
}

#[test]
fn the_workspace_syncs_in_the_background_and_brings_the_other_sites_batches() {
    let server = shared();
    let db = server.new_database("workspace_sync");
    let kitchen = Site::new("KTN");
    let made = kitchen.new_batch("made in the kitchen");
    kitchen.sync_ok(&server.admin(&db));

    // The shop's log knows its hub from the settings.
    let shop = Site::new("SHP");
    let (mut state, mut services) =
        workspace(&shop, &server.admin_url(&db), &[Command::ShowBatches]);
    assert!(state.batches.rows.is_empty(), "the shop has no batches yet");
    assert!(state.batches.sync.hub_set);

    // `S` returns at once with the sync running on its own thread.
    press_without_waiting(&mut state, &mut services, Command::SyncNow);
    assert!(state.batches.sync.running);
    assert!(services.background_running());
    assert!(
        message(&state).contains("background"),
        "{}",
        message(&state)
    );
    // Working on meanwhile: a refresh reads the log again and still shows it running.
    press_without_waiting(&mut state, &mut services, Command::RefreshBatches);
    assert!(
        state.batches.sync.running,
        "a reload forgot the running sync"
    );
    // Asking again while it runs starts nothing.
    press_without_waiting(&mut state, &mut services, Command::SyncNow);
    assert!(
        message(&state).contains("already running"),
        "{}",
        message(&state)
    );

    // The outcome arrives as actions; the other site's batch is in the list.
    let mut queue: VecDeque<Action> = services.background_outcome(true).into();
    assert!(!services.background_running());
    assert!(!drain(&mut state, &mut services, &mut queue));
    let said = message(&state);
    assert!(said.starts_with("Synchronised:"), "{said}");
    assert!(said.contains("received"), "{said}");
    assert!(!state.batches.sync.running);
    assert!(state.batches.sync.last_sync.is_some());
    assert!(
        state.batches.rows.iter().any(|r| r.code == made),
        "{made} not among {:?}",
        state
            .batches
            .rows
            .iter()
            .map(|r| &r.code)
            .collect::<Vec<_>>()
    );
}

#[test]
fn a_workspace_sync_with_the_hub_out_of_reach_says_so_and_can_be_run_again() {
    let server = shared();
    let shop = Site::new("SHP");
    // A database that does not exist on the server: the hub refuses at once.
    let (mut state, mut services) = workspace(
        &shop,
        &server.admin_url("no_such_database_here"),
        &[Command::ShowBatches, Command::SyncNow],
    );
    assert!(!state.batches.sync.running, "the failed sync is over");
    assert!(!services.background_running());
    let said = message(&state);
    assert!(said.contains("no_such_database_here"), "{said}");
    assert!(state.batches.sync.last_sync.is_none());
    // A second try starts a new sync (and fails the same way).
    let mut queue = VecDeque::from([Action::Command(Command::SyncNow)]);
    assert!(!drain(&mut state, &mut services, &mut queue));
    assert!(message(&state).contains("no_such_database_here"));
}

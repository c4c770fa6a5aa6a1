//! The hub: a PostgreSQL server that site logs synchronise through. This is the
//! only module that speaks PostgreSQL, and it holds no domain logic: it moves the
//! batch domain's shared records ([`crate::batch::shared`]) between the local log
//! ([`crate::store`]) and the server, in pages.
//!
//! - [`target`]: the server URL, TLS mode and credentials; [`tls`]: rustls.
//! - [`schema`]: the hub's own schema (`hub.sql`), created and upgraded by gelu.
//! - `push`: what the log holds and the hub lacks; `pull`: the reverse.
//!
//! A sync pushes, then pulls. Each page is one transaction on the hub and one in
//! the log, and progress is recorded only after both hold it, so a sync killed at any
//! moment (or cut off by the server) leaves both sides whole and the next run goes on
//! where it stopped; a record sent twice is taken once. A server that cannot be
//! reached changes nothing here.

mod pull;
mod push;
pub mod schema;
pub mod target;
pub mod tls;

use std::sync::mpsc;
use std::time::{Duration, Instant};

use crate::clock;
use crate::model::time::time_text;
use crate::store::{Store, StoreError, SyncStatus};
pub use target::Target;

/// Records per page (one transaction on each side).
pub const PAGE: usize = 2_000;

/// Why a sync could not run or stopped. Each message says what happened to the data.
#[derive(Debug, thiserror::Error)]
pub enum SyncError {
    /// The server address or TLS settings could not be used.
    #[error("{0}. Nothing was changed.")]
    Config(String),
    /// The server could not be reached.
    #[error(
        "the hub at {server} could not be reached ({detail}). Nothing was changed here: the \
         batch log is as it was and stays usable; what waits goes with the next sync."
    )]
    Unreachable {
        /// The server, without password.
        server: String,
        /// What the connection reported.
        detail: String,
    },
    /// The server refused the login or the database.
    #[error(
        "the hub at {server} refused the connection ({detail}). Check the account, the \
         database and the password (in PGPASSWORD or ~/.pgpass, never in the log). \
         Nothing was changed here."
    )]
    Refused {
        /// The server, without password.
        server: String,
        /// What the server said.
        detail: String,
    },
    /// The hub's schema is newer than this program.
    #[error(
        "the hub at {server} has gelu hub schema version {found}; this gelu knows up to \
         version {supported}. Nothing was changed on either side: use the newer gelu."
    )]
    TooNew {
        /// The server, without password.
        server: String,
        /// The version found.
        found: i64,
        /// The newest this program knows.
        supported: i64,
    },
    /// The hub is not set up (or is older) and this account may not set it up.
    #[error(
        "the hub at {server} is not set up for this gelu and this account may not set it up \
         ({detail}). Sync once with an account that may create the `gelu` schema in that \
         database. Nothing was changed here."
    )]
    NotSetUp {
        /// The server, without password.
        server: String,
        /// What the server said.
        detail: String,
    },
    /// The connection broke or the server refused something in the middle of a sync.
    #[error(
        "the sync with {server} stopped: {detail}. What was sent or pulled before it stopped \
         is kept on both sides and the log stays usable; run `gelu sync` again to go on."
    )]
    Interrupted {
        /// The server, without password.
        server: String,
        /// What happened.
        detail: String,
    },
    /// The local log refused or failed.
    #[error(transparent)]
    Store(#[from] StoreError),
}

impl SyncError {
    /// Sorts a PostgreSQL error met while connecting (`connecting`) or later.
    pub(crate) fn from_pg(server: &str, e: postgres::Error, connecting: bool) -> SyncError {
        let server = server.to_owned();
        if let Some(db) = e.as_db_error() {
            let detail = db.message().to_owned();
            let code = db.code().code();
            return match code {
                // Invalid authorisation, password, unknown database or role.
                "28000" | "28P01" | "3D000" => SyncError::Refused { server, detail },
                _ if connecting => SyncError::Refused { server, detail },
                _ => SyncError::Interrupted { server, detail },
            };
        }
        let detail = std::error::Error::source(&e)
            .map(|s| s.to_string())
            .unwrap_or_else(|| e.to_string());
        if connecting {
            SyncError::Unreachable { server, detail }
        } else {
            SyncError::Interrupted { server, detail }
        }
    }
}

/// Counts of records moved one way.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Moved {
    /// Recipe versions.
    pub recipe_versions: usize,
    /// Batches (as first written, with their lines).
    pub batches: usize,
    /// Sign-offs.
    pub finalisations: usize,
    /// Readings, notes and amendments.
    pub entries: usize,
    /// Decisions on conflicts.
    pub decisions: usize,
}

impl Moved {
    /// Every record counted.
    pub fn total(&self) -> usize {
        self.recipe_versions + self.batches + self.finalisations + self.entries + self.decisions
    }
}

/// What a sync did.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct SyncReport {
    /// The server, without password.
    pub server: String,
    /// The hub's id.
    pub hub: String,
    /// What was sent.
    pub pushed: Moved,
    /// What was written here from the hub.
    pub pulled: Moved,
    /// Conflicts found in this sync (kept aside, shown, for a person to decide).
    pub new_conflicts: usize,
    /// Records refused because they no longer match their identity (changed on the
    /// hub behind gelu's back), kept aside and shown.
    pub altered: usize,
    /// Whether this log had synchronised with another hub and started over.
    pub started_over: bool,
    /// Whether the account may only read (then nothing was sent).
    pub read_only: bool,
    /// What waits and what is open after the sync.
    pub status: SyncStatus,
    /// How long it took (s).
    pub seconds: f64,
}

/// A connection to the hub, its schema checked (and created or upgraded).
pub struct Hub {
    client: postgres::Client,
    target: Target,
    id: String,
    may_write: bool,
}

impl Hub {
    /// Connects, checks the hub's schema version, sets it up or upgrades it.
    pub fn connect(target: &Target) -> Result<Hub, SyncError> {
        let mut client = connect_within(target, ANSWER_WITHIN)?;
        let id = schema::ensure(&mut client, &target.shown)?;
        let may_write: bool = client
            .query_one("SELECT has_table_privilege('gelu.batches', 'INSERT')", &[])
            .map_err(|e| SyncError::from_pg(&target.shown, e, false))?
            .get(0);
        Ok(Hub {
            client,
            target: target.clone(),
            id,
            may_write,
        })
    }

    /// The hub's id (made when its schema was created).
    pub fn id(&self) -> &str {
        &self.id
    }

    fn fail(&self, e: postgres::Error) -> SyncError {
        SyncError::from_pg(&self.target.shown, e, false)
    }
}

/// How long a hub may take to open a connection: reach it, agree on TLS and log
/// in (a few hundred milliseconds on a sound network; the socket alone may take
/// 10 s).
pub const ANSWER_WITHIN: Duration = Duration::from_secs(30);

/// Opens a connection to the hub, giving up after `within`. The socket's own
/// timeout covers only reaching the host: a server that accepts the connection
/// but never answers (wedged, or a proxy with nothing behind it) would otherwise
/// hold the sync for ever. The attempt runs on a thread of its own; one that gives
/// up leaves that thread waiting on its socket until the server or the system
/// closes it, which holds no lock and writes nothing.
fn connect_within(target: &Target, within: Duration) -> Result<postgres::Client, SyncError> {
    let (tell, answer) = mpsc::channel();
    let config = target.config.clone();
    let attempt = if target.tls == target::TlsMode::Off {
        std::thread::Builder::new()
            .name("gelu-hub-connect".into())
            .spawn(move || drop(tell.send(config.connect(postgres::NoTls))))
    } else {
        let tls = tls::connector(target)?;
        std::thread::Builder::new()
            .name("gelu-hub-connect".into())
            .spawn(move || drop(tell.send(config.connect(tls))))
    };
    attempt.map_err(|e| SyncError::Unreachable {
        server: target.shown.clone(),
        detail: format!("no thread to connect on: {e}"),
    })?;
    match answer.recv_timeout(within) {
        Ok(connected) => connected.map_err(|e| SyncError::from_pg(&target.shown, e, true)),
        Err(_) => Err(SyncError::Unreachable {
            server: target.shown.clone(),
            detail: format!(
                "it took the connection but did not answer within {} s",
                within.as_secs_f64()
            ),
        }),
    }
}

/// Pushes what the log holds and the hub lacks, then pulls what the hub holds and
/// the log lacks.
pub fn sync(store: &mut Store, target: &Target) -> Result<SyncReport, SyncError> {
    let started = Instant::now();
    let mut hub = Hub::connect(target)?;
    let started_over = store.sync_begin(hub.id())?;
    let mut report = SyncReport {
        server: target.shown.clone(),
        hub: hub.id().to_owned(),
        started_over,
        read_only: !hub.may_write,
        ..SyncReport::default()
    };
    if hub.may_write {
        push::push(&mut hub, store, &mut report)?;
    }
    pull::pull(&mut hub, store, &mut report)?;
    store.sync_end(&time_text(&clock::now()))?;
    report.status = store.sync_status()?;
    report.seconds = started.elapsed().as_secs_f64();
    Ok(report)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A server that takes connections and never says a word: the connection
    /// gives up after the time allowed, with an error that says so.
    #[test]
    fn a_hub_that_never_answers_is_given_up_on() {
        let silent = std::net::TcpListener::bind("127.0.0.1:0").unwrap();
        let port = silent.local_addr().unwrap().port();
        let target = Target::parse(&format!("postgresql://kitchen@127.0.0.1:{port}/hub")).unwrap();
        let Err(e) = connect_within(&target, Duration::from_millis(300)) else {
            panic!("a silent server was taken for a hub");
        };
        // The listener is still open: the attempt was given up, not refused.
        assert!(silent.local_addr().is_ok());
        assert!(matches!(e, SyncError::Unreachable { .. }), "{e}");
        let said = e.to_string();
        assert!(said.contains("did not answer within 0.3 s"), "{said}");
        assert!(said.contains("Nothing was changed here"), "{said}");
    }
}

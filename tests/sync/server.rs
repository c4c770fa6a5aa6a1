//! A throwaway PostgreSQL server for the sync tests and benchmarks: `initdb` in a
//! temporary folder, a free port on 127.0.0.1, password logins over TCP, run as the
//! `postgres` user when the tests run as root (the server refuses root). It is
//! stopped when dropped, and a watchdog process stops it and removes its folder when
//! the test process ends by any road (a panic, an abort, a kill).
//!
//! `GELU_TEST_PG_URL` (a superuser URL, password included) points the tests at a
//! server of your own instead: each test then works in a database of its own there.
//! Tests that stop the server always start one of their own. A server that cannot be
//! started fails the test with the reason: these tests never skip.

// The benchmarks use only part of this.
#![allow(dead_code)]

use std::net::TcpListener;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::sync::OnceLock;
use std::sync::atomic::{AtomicUsize, Ordering};

/// The superuser the throwaway servers are made with, and its password (tests only;
/// with GELU_TEST_PG_URL, that URL's password, so one PGPASSWORD serves every server).
pub const ADMIN: &str = "gelu_admin";
const DEFAULT_PASSWORD: &str = "harbour-test";

/// GELU_TEST_PG_URL, when set.
fn external() -> Option<postgres::Config> {
    let url = std::env::var("GELU_TEST_PG_URL").ok()?;
    if url.trim().is_empty() {
        return None;
    }
    Some(
        url.parse()
            .expect("GELU_TEST_PG_URL is not a PostgreSQL URL"),
    )
}

/// The password of the superuser of every test server.
pub fn admin_password() -> String {
    external()
        .and_then(|c| {
            c.get_password()
                .map(|p| String::from_utf8_lossy(p).into_owned())
        })
        .unwrap_or_else(|| DEFAULT_PASSWORD.to_owned())
}

/// A PostgreSQL program: from GELU_PG_BIN, the PATH, or the newest
/// /usr/lib/postgresql/*/bin.
pub fn pg_bin(name: &str) -> PathBuf {
    if let Ok(dir) = std::env::var("GELU_PG_BIN") {
        return Path::new(&dir).join(name);
    }
    let mut dirs: Vec<PathBuf> = std::fs::read_dir("/usr/lib/postgresql")
        .map(|d| {
            d.filter_map(|e| e.ok())
                .map(|e| e.path().join("bin"))
                .collect()
        })
        .unwrap_or_default();
    dirs.sort();
    if let Some(dir) = dirs.iter().rev().find(|d| d.join(name).exists()) {
        return dir.join(name);
    }
    PathBuf::from(name)
}

fn is_root() -> bool {
    Command::new("id")
        .arg("-u")
        .output()
        .map(|o| String::from_utf8_lossy(&o.stdout).trim() == "0")
        .unwrap_or(false)
}

/// A server program run as the `postgres` user when we are root.
fn as_server_user(program: PathBuf) -> Command {
    if is_root() {
        let mut cmd = Command::new("runuser");
        cmd.args(["-u", "postgres", "--"]).arg(program);
        cmd
    } else {
        Command::new(program)
    }
}

fn free_port() -> u16 {
    TcpListener::bind("127.0.0.1:0")
        .and_then(|l| l.local_addr())
        .map(|a| a.port())
        .expect("no free port on 127.0.0.1")
}

fn run(cmd: &mut Command, what: &str) {
    let out = cmd
        .stdin(Stdio::null())
        .output()
        .unwrap_or_else(|e| panic!("{what}: could not run ({e}); is PostgreSQL installed? (apt-get install postgresql, or set GELU_PG_BIN)"));
    assert!(
        out.status.success(),
        "{what} failed: {}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
}

/// A throwaway server.
pub struct Server {
    dir: PathBuf,
    /// Its TCP port on 127.0.0.1.
    pub port: u16,
    /// Set when it is someone else's server (GELU_TEST_PG_URL): never stopped here.
    external: Option<String>,
}

impl Server {
    /// Starts a new server with default durability settings (fsync on).
    pub fn start() -> Server {
        Server::start_with(&[])
    }

    /// Starts a new server; `settings` are extra `-c name=value` settings.
    pub fn start_with(settings: &[&str]) -> Server {
        let base = std::env::temp_dir().join(format!(
            "gelu-pg-{}-{}",
            std::process::id(),
            NEXT.fetch_add(1, Ordering::SeqCst)
        ));
        let _ = std::fs::remove_dir_all(&base);
        std::fs::create_dir_all(&base).expect("a folder for the server");
        let data = base.join("data");
        let pwfile = base.join("pw");
        std::fs::write(&pwfile, admin_password()).expect("password file");
        if is_root() {
            run(
                Command::new("chown")
                    .args(["-R", "postgres:postgres"])
                    .arg(&base),
                "chown the server folder",
            );
        }
        run(
            as_server_user(pg_bin("initdb"))
                .arg("-D")
                .arg(&data)
                .args([
                    "-U",
                    ADMIN,
                    "--auth-local=trust",
                    "--auth-host=scram-sha-256",
                ])
                .arg(format!("--pwfile={}", pwfile.display()))
                .args(["--no-sync", "-E", "UTF8", "--locale=C"]),
            "initdb",
        );
        let server = Server {
            dir: base.clone(),
            port: free_port(),
            external: None,
        };
        server.watchdog(&base, &data);
        let mut options = format!(
            "-c listen_addresses=127.0.0.1 -p {} -k {} -c max_connections=60",
            server.port,
            base.display()
        );
        for s in settings {
            options.push_str(&format!(" -c {s}"));
        }
        std::fs::write(base.join("options"), &options).expect("options");
        server.start_again();
        server
    }

    /// Starts the (stopped) server again on the same port.
    pub fn start_again(&self) {
        let options = std::fs::read_to_string(self.dir.join("options")).expect("options");
        run(
            as_server_user(pg_bin("pg_ctl"))
                .arg("-D")
                .arg(self.dir.join("data"))
                .arg("-l")
                .arg(self.dir.join("log"))
                .args(["-w", "-t", "60", "-o", &options, "start"]),
            "pg_ctl start",
        );
    }

    /// Puts `line` first in the server's pg_hba.conf and reloads it.
    pub fn prepend_hba(&self, line: &str) {
        let path = self.dir.join("data/pg_hba.conf");
        let old = std::fs::read_to_string(&path).expect("pg_hba.conf");
        std::fs::write(&path, format!("{line}\n{old}")).expect("pg_hba.conf");
        run(
            as_server_user(pg_bin("pg_ctl"))
                .arg("-D")
                .arg(self.dir.join("data"))
                .arg("reload"),
            "pg_ctl reload",
        );
    }

    /// The folder the server keeps its files in (readable by the server's user).
    pub fn folder(&self) -> &Path {
        &self.dir
    }

    /// Stops the server at once (as a crash or a pulled plug would).
    pub fn stop_now(&self) {
        run(
            as_server_user(pg_bin("pg_ctl"))
                .arg("-D")
                .arg(self.dir.join("data"))
                .args(["-w", "-m", "immediate", "stop"]),
            "pg_ctl stop",
        );
    }

    /// A process that waits for this test process to end, then stops the server and
    /// removes its folder, however the test process ended. It outlives this process
    /// by design, so it is never waited for.
    #[allow(clippy::zombie_processes)]
    fn watchdog(&self, base: &Path, data: &Path) {
        let script = format!(
            "while kill -0 {pid} 2>/dev/null; do sleep 0.5; done; \
             {stop} {ctl} -D '{data}' -m immediate stop >/dev/null 2>&1; rm -rf '{base}'",
            pid = std::process::id(),
            stop = if is_root() {
                "runuser -u postgres --"
            } else {
                ""
            },
            ctl = pg_bin("pg_ctl").display(),
            data = data.display(),
            base = base.display(),
        );
        Command::new("sh")
            .args(["-c", &script])
            .stdin(Stdio::null())
            .stdout(Stdio::null())
            .stderr(Stdio::null())
            .spawn()
            .expect("the server's watchdog");
    }

    /// The superuser URL of database `db`, password included (for psql).
    pub fn admin_url(&self, db: &str) -> String {
        match &self.external {
            Some(url) => with_database(url, db),
            None => format!(
                "postgresql://{ADMIN}:{}@127.0.0.1:{}/{db}",
                admin_password(),
                self.port
            ),
        }
    }

    /// The superuser's URL of database `db` without the password (gelu finds it in
    /// PGPASSWORD).
    pub fn admin(&self, db: &str) -> String {
        let user = match &self.external {
            Some(_) => external()
                .and_then(|c| c.get_user().map(str::to_owned))
                .unwrap_or_else(|| ADMIN.to_owned()),
            None => ADMIN.to_owned(),
        };
        self.url(&user, db)
    }

    /// The URL of database `db` for `user`, without a password.
    pub fn url(&self, user: &str, db: &str) -> String {
        let admin = self.admin_url(db);
        let (scheme, rest) = admin.split_once("://").unwrap_or(("postgresql", &admin));
        let host = rest.split_once('@').map_or(rest, |(_, h)| h);
        format!("{scheme}://{user}@{host}")
    }

    /// A new empty database, by a name unique in this run.
    pub fn new_database(&self, name: &str) -> String {
        let db = format!("{name}_{}", NEXT.fetch_add(1, Ordering::SeqCst));
        self.sql("postgres", &format!("CREATE DATABASE {db}"));
        db
    }

    /// Runs SQL as the superuser (psql), panicking with its message when it fails.
    pub fn sql(&self, db: &str, sql: &str) -> String {
        let out = self.try_sql(db, sql);
        out.unwrap_or_else(|e| panic!("{sql}: {e}"))
    }

    /// Runs SQL as the superuser; the output (unaligned, tuples only) or the error.
    pub fn try_sql(&self, db: &str, sql: &str) -> Result<String, String> {
        let out = Command::new(pg_bin("psql"))
            .arg(self.admin_url(db))
            .args(["-X", "-q", "-A", "-t", "-v", "ON_ERROR_STOP=1", "-c", sql])
            .stdin(Stdio::null())
            .output()
            .map_err(|e| format!("psql could not run: {e}"))?;
        if out.status.success() {
            Ok(String::from_utf8_lossy(&out.stdout).trim().to_owned())
        } else {
            Err(String::from_utf8_lossy(&out.stderr).into_owned())
        }
    }
}

impl Drop for Server {
    fn drop(&mut self) {
        if self.external.is_none() {
            let _ = as_server_user(pg_bin("pg_ctl"))
                .arg("-D")
                .arg(self.dir.join("data"))
                .args(["-m", "immediate", "stop"])
                .stdout(Stdio::null())
                .stderr(Stdio::null())
                .status();
            let _ = std::fs::remove_dir_all(&self.dir);
        }
    }
}

fn with_database(url: &str, db: &str) -> String {
    let (base, query) = match url.split_once('?') {
        Some((b, q)) => (b, format!("?{q}")),
        None => (url, String::new()),
    };
    let scheme_end = base.find("://").map_or(0, |i| i + 3);
    let host_end = base[scheme_end..]
        .find('/')
        .map_or(base.len(), |i| scheme_end + i);
    format!("{}/{db}{query}", &base[..host_end])
}

static NEXT: AtomicUsize = AtomicUsize::new(0);

/// The server the tests share: GELU_TEST_PG_URL's, or one started for this run.
pub fn shared() -> &'static Server {
    static SHARED: OnceLock<Server> = OnceLock::new();
    SHARED.get_or_init(|| match std::env::var("GELU_TEST_PG_URL") {
        Ok(url) if !url.trim().is_empty() => Server {
            dir: PathBuf::new(),
            port: 0,
            external: Some(url),
        },
        // Tests need not survive a power cut: faster without fsync.
        _ => Server::start_with(&[
            "fsync=off",
            "synchronous_commit=off",
            "full_page_writes=off",
        ]),
    })
}

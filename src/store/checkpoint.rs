//! Checkpoints on a second connection and thread while a bulk write runs.
//!
//! In WAL mode every committed page is written twice: to the WAL, then (by a
//! checkpoint) into the database file, with an fsync of each. By default SQLite runs
//! the checkpoint in the committing connection, so an import stops writing while its
//! last transaction is copied. During an import the writer's automatic checkpoints are
//! off and a second connection checkpoints after each commit (PASSIVE: it never holds
//! the writer up), so the copy overlaps the next transaction. The WAL can only start
//! over once a checkpoint has caught up, so when it has grown past [`WAL_LIMIT_FRAMES`]
//! the writer waits for one before its next transaction; and before the import
//! returns it waits for a last one, so its cost is counted in the import.

use std::path::Path;
use std::sync::{Condvar, Mutex};

use rusqlite::Connection;

use super::error::Result;
use super::open;

/// About 256 MiB of 4 KiB pages: the WAL may hold this much before the writer waits.
const WAL_LIMIT_FRAMES: i64 = 65_536;

/// SQLite's default `wal_autocheckpoint`, restored after the bulk write.
const AUTOCHECKPOINT_PAGES: i64 = 1_000;

#[derive(Default)]
struct State {
    /// Checkpoints asked for (each commit asks for one).
    asked: u64,
    /// Checkpoints finished (or given up, as a checkpoint is never required).
    done: u64,
    /// Frames in the WAL at the last checkpoint.
    wal_frames: i64,
    /// Whether the bulk write is over.
    stop: bool,
}

/// The writer's side of the checkpointer.
pub(crate) struct Checkpoints {
    state: Mutex<State>,
    changed: Condvar,
}

impl Checkpoints {
    fn lock(&self) -> std::sync::MutexGuard<'_, State> {
        self.state.lock().unwrap_or_else(|e| e.into_inner())
    }

    /// Call after each commit: the checkpointer copies what it wrote.
    pub fn committed(&self) {
        self.lock().asked += 1;
        self.changed.notify_all();
    }

    /// Asks for a checkpoint and waits until it is done.
    fn catch_up(&self) {
        let mut state = self.lock();
        state.asked += 1;
        let target = state.asked;
        self.changed.notify_all();
        while state.done < target {
            state = self.changed.wait(state).unwrap_or_else(|e| e.into_inner());
        }
    }

    /// Call before each transaction: waits for a checkpoint when the WAL is long, so
    /// that it starts over.
    pub fn before_transaction(&self) {
        if self.lock().wal_frames > WAL_LIMIT_FRAMES {
            self.catch_up();
        }
    }

    /// The checkpointer's loop: one PASSIVE checkpoint per request (requests that
    /// pile up are served by one).
    fn serve(&self, conn: &Connection) {
        let mut state = self.lock();
        loop {
            while state.done == state.asked && !state.stop {
                state = self.changed.wait(state).unwrap_or_else(|e| e.into_inner());
            }
            if state.done == state.asked {
                return;
            }
            let target = state.asked;
            drop(state);
            // A checkpoint that fails (another process holds the file) is left to
            // SQLite's next automatic one; nothing depends on it.
            let frames = conn
                .query_row("PRAGMA wal_checkpoint(PASSIVE)", [], |r| r.get::<_, i64>(1))
                .ok();
            state = self.lock();
            if let Some(frames) = frames {
                state.wal_frames = frames;
            }
            state.done = target;
            self.changed.notify_all();
        }
    }
}

/// Runs `work` on `conn` with its automatic checkpoints off and a checkpointer on a
/// second connection to the same file; waits for a last checkpoint, then restores
/// the automatic ones. If the second connection cannot be opened, `work` runs with
/// SQLite's own checkpoints.
pub(crate) fn with_checkpointer<T>(
    conn: &mut Connection,
    path: &Path,
    work: impl FnOnce(&mut Connection, &Checkpoints) -> Result<T>,
) -> Result<T> {
    let checkpoints = Checkpoints {
        state: Mutex::new(State::default()),
        changed: Condvar::new(),
    };
    let Ok(second) = open::connect(path) else {
        // No one serves it, and no one waits on it: the WAL length it knows stays
        // at zero, and SQLite's own checkpoints stay on.
        return work(conn, &checkpoints);
    };
    conn.pragma_update(None, "wal_autocheckpoint", 0)?;
    let out = std::thread::scope(|scope| {
        let served = &checkpoints;
        let checkpointer = scope.spawn(move || served.serve(&second));
        // Stops the checkpointer however `work` ends, even by a panic, so that the
        // scope can join it.
        let stop = StopOnDrop(&checkpoints);
        let out = work(conn, &checkpoints);
        checkpoints.catch_up();
        drop(stop);
        checkpointer.join().expect("the checkpointer panicked");
        out
    });
    conn.pragma_update(None, "wal_autocheckpoint", AUTOCHECKPOINT_PAGES)?;
    out
}

/// Tells the checkpointer to finish when dropped.
struct StopOnDrop<'a>(&'a Checkpoints);

impl Drop for StopOnDrop<'_> {
    fn drop(&mut self) {
        self.0.lock().stop = true;
        self.0.changed.notify_all();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pragma(conn: &Connection, name: &str) -> i64 {
        conn.query_row(&format!("PRAGMA {name}"), [], |r| r.get(0))
            .unwrap()
    }

    /// (frames in the WAL, frames copied into the database) as a checkpoint sees them.
    fn wal(conn: &Connection) -> (i64, i64) {
        conn.query_row("PRAGMA wal_checkpoint(PASSIVE)", [], |r| {
            Ok((r.get(1)?, r.get(2)?))
        })
        .unwrap()
    }

    #[test]
    fn writes_are_checkpointed_by_the_second_connection_and_settings_restored() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("t.db");
        let mut conn = open::connect(&path).unwrap();
        // Marked as a batch log, so that the second connection accepts the file.
        conn.pragma_update(None, "application_id", open::APPLICATION_ID)
            .unwrap();
        conn.execute_batch("CREATE TABLE t (x BLOB)").unwrap();
        with_checkpointer(&mut conn, &path, |conn, checkpoints| {
            assert_eq!(pragma(conn, "wal_autocheckpoint"), 0);
            for _ in 0..5 {
                checkpoints.before_transaction();
                let tx = conn.transaction()?;
                for _ in 0..200 {
                    tx.execute("INSERT INTO t VALUES (zeroblob(4000))", [])?;
                }
                tx.commit()?;
                checkpoints.committed();
            }
            Ok(())
        })
        .unwrap();
        assert_eq!(pragma(&conn, "wal_autocheckpoint"), AUTOCHECKPOINT_PAGES);
        let (frames, copied) = wal(&conn);
        assert!(frames > 1_000, "the WAL held the writes: {frames} frames");
        assert_eq!(copied, frames, "every frame was copied before returning");
    }

    #[test]
    fn a_panic_in_the_work_does_not_leave_the_checkpointer_waiting() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("t.db");
        let mut conn = open::connect(&path).unwrap();
        let caught = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            let _ = with_checkpointer(&mut conn, &path, |_, checkpoints| -> Result<()> {
                checkpoints.committed();
                panic!("the work failed");
            });
        }));
        assert!(
            caught.is_err(),
            "the panic comes through, and nothing hangs"
        );
    }

    #[test]
    fn a_long_wal_makes_the_writer_wait_for_a_checkpoint() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("t.db");
        let mut conn = open::connect(&path).unwrap();
        with_checkpointer(&mut conn, &path, |_, checkpoints| {
            checkpoints.lock().wal_frames = WAL_LIMIT_FRAMES + 1;
            let before = checkpoints.lock().done;
            checkpoints.before_transaction();
            assert_eq!(
                checkpoints.lock().done,
                before + 1,
                "one checkpoint ran first"
            );
            // That checkpoint found a short WAL, so the next transaction does not wait.
            assert!(checkpoints.lock().wal_frames <= WAL_LIMIT_FRAMES);
            checkpoints.before_transaction();
            assert_eq!(checkpoints.lock().done, before + 1);
            Ok(())
        })
        .unwrap();
    }
}

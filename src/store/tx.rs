//! Write transactions: `BEGIN IMMEDIATE` (so a writer takes the lock up front and
//! never deadlocks upgrading a read), SQLite's busy timeout, and a bounded retry with
//! back-off on top, so several processes writing at once all get through and no
//! "database is locked" reaches the user unless the file stays busy for long.

use std::path::Path;
use std::time::Duration;

use rusqlite::{Connection, Transaction, TransactionBehavior};

use super::error::{Result, StoreError, is_busy};

/// How long SQLite itself waits for a lock before reporting busy.
pub const BUSY_TIMEOUT: Duration = Duration::from_secs(5);

/// How many times a busy write is tried before giving up.
const ATTEMPTS: u32 = 6;

/// Whether a store error is a lock conflict worth retrying.
fn retryable(e: &StoreError) -> bool {
    match e {
        StoreError::Sql(e) => is_busy(e),
        StoreError::Busy { .. } => true,
        _ => false,
    }
}

/// A pause that grows with each attempt, with a little jitter so processes spread out.
fn back_off(attempt: u32) {
    let jitter_ms = u64::from(std::process::id() % 17) + u64::from(attempt) * 7;
    let base_ms = 25u64 << attempt.min(5);
    std::thread::sleep(Duration::from_millis(base_ms + jitter_ms));
}

/// Runs `work` in one immediate transaction and commits it, retrying when busy.
/// On any error the transaction is rolled back: nothing of it is written.
pub fn write<T>(
    conn: &mut Connection,
    path: &Path,
    mut work: impl FnMut(&Transaction) -> Result<T>,
) -> Result<T> {
    retry(path, || {
        let tx = conn.transaction_with_behavior(TransactionBehavior::Immediate)?;
        let value = work(&tx)?;
        tx.commit()?;
        Ok(value)
    })
}

/// Runs `step` until it succeeds, fails for a reason other than a lock, or runs out
/// of attempts (then reports [`StoreError::Busy`]).
pub fn retry<T>(path: &Path, mut step: impl FnMut() -> Result<T>) -> Result<T> {
    let mut attempt = 0;
    loop {
        match step() {
            Err(e) if retryable(&e) => {
                attempt += 1;
                if attempt >= ATTEMPTS {
                    return Err(StoreError::Busy {
                        path: path.to_path_buf(),
                    });
                }
                back_off(attempt);
            }
            other => return other,
        }
    }
}

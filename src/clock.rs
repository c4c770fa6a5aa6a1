//! The one clock: the current time, truncated to the millisecond that records
//! keep. Only the shell (the command line, the workspace's effects and the store's
//! own time stamps) reads it; the pure core takes times as arguments.

use chrono::{DateTime, Utc};

/// The current time (UTC), truncated to the millisecond.
pub fn now() -> DateTime<Utc> {
    crate::model::time::to_millis(Utc::now())
}

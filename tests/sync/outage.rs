//! A hub that is down, or goes down in the middle of a sync.

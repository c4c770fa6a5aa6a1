//! Syncs killed at random moments.

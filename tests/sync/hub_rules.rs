//! The hub's own rules.

//! The terminal workspace: pure `update` tests, keymap rules, snapshots of every
//! screen, effects against a real database, and the real binary in a
//! pseudo-terminal. One test binary.

mod common;

mod balance;
mod cautions;
mod effects;
mod keep_work;
mod keymap;
mod measure_loop;
mod pty;
mod snapshots;
mod update;

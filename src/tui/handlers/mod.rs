//! The per-screen halves of `update`: what each screen's commands, prompts and
//! forms do to the state. Each file holds one screen (the batch log's forms have
//! their own); `common` holds what they all use.

mod common;

pub mod balance;
pub mod batch_forms;
pub mod batches;
pub mod characterise;
pub mod ingredients;
pub mod own_items;
pub mod recipe;
pub mod settings;

//! The balance panel's part of the state: the question being asked of the
//! recipe in the editor (targets, which lines may move, the objective), the
//! row under the cursor, and the answer to the question as it stands.

use crate::balance::{Balance, Request};

/// The balance panel on the recipe screen.
#[derive(Debug, Clone, PartialEq)]
pub struct BalancePanel {
    /// The question: targets, which lines may move, the objective, and the
    /// recipe's own rules and prices (the batch log's prices are added when
    /// solving, never stored with the recipe).
    pub request: Request,
    /// Where the targets came from, in words.
    pub source: String,
    /// Row under the cursor: the recipe's lines first, then the targets.
    pub cursor: usize,
    /// The answer to the question as it stands, or why there is none.
    pub answer: Result<Balance, String>,
}

impl BalancePanel {
    /// The target under the cursor, by index, when the cursor is on a target.
    pub fn target_at_cursor(&self, lines: usize) -> Option<usize> {
        self.cursor
            .checked_sub(lines)
            .filter(|k| *k < self.request.targets.len())
    }
}

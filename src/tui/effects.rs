//! Carrying out effects: the only part of the workspace that reads or writes
//! files and the database. Each effect's outcome comes back as actions.

use super::action::{Action, Effect};
use super::app::Launch;

/// The files and database the workspace works on.
pub struct Services {}

impl Services {
    /// Opens the database the launch names.
    pub fn open(_launch: &Launch) -> anyhow::Result<Services> {
        Ok(Services {})
    }

    /// The actions that set the workspace up: settings, and the recipe to open.
    pub fn startup(&mut self, _launch: &Launch) -> Vec<Action> {
        Vec::new()
    }

    /// Carries out one effect.
    pub fn perform(&mut self, effect: Effect) -> Vec<Action> {
        vec![Action::Failed(format!("not available yet: {effect:?}"))]
    }
}

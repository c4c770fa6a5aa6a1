//! What the store reports that is not a batch record: the recipes it knows, the
//! user's own items as stored, and what an import did. (The records themselves are
//! the batch domain's types, in [`crate::batch`].)

/// A recipe known to the store, with its newest version.
#[derive(Debug, Clone, PartialEq)]
pub struct RecipeSummary {
    /// The recipe's name.
    pub name: String,
    /// Its newest version number (1-based).
    pub latest_version: u32,
    /// The TOML text of that version.
    pub latest_text: String,
}

/// A user-defined solute or ingredient, kept as the TOML text of its definition.
#[derive(Debug, Clone, PartialEq)]
pub struct CustomItem {
    /// Kebab-case id.
    pub id: String,
    /// Display name.
    pub name: String,
    /// The TOML definition.
    pub definition: String,
}

/// What an import did.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct ImportReport {
    /// Batches written.
    pub imported: usize,
    /// Lines whose code was already present (left as they were).
    pub skipped_existing: usize,
    /// Lines refused, with their 1-based line number and why; nothing of them was written.
    pub errors: Vec<(usize, String)>,
}

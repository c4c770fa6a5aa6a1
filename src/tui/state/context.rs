//! The modes of the workspace: the browsing mode of a screen, or an overlay (a text
//! field, a picker, a form, a reader, a question). The keymap binds keys per mode.

/// A mode of the workspace, deciding what keys mean.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Context {
    /// Keys every browsing mode shares (screens, help, quit).
    Global,
    /// Browsing the recipe's lines.
    Recipe,
    /// Browsing solutes and ingredients.
    Ingredients,
    /// Browsing the batch log.
    Batches,
    /// Looking at one batch.
    BatchDetail,
    /// Predicted against measured over the batches of the log.
    Compare,
    /// The balance panel on the recipe screen.
    Balance,
    /// Browsing the settings.
    Settings,
    /// Typing into a one-line prompt.
    Prompt,
    /// Typing into a search-as-you-type picker.
    Picker,
    /// Filling in a form of several fields.
    Form,
    /// Reading help or the full warnings.
    Reader,
    /// Answering a yes/no question.
    Confirm,
}

impl Context {
    /// Every context.
    pub const ALL: [Context; 13] = [
        Context::Global,
        Context::Recipe,
        Context::Ingredients,
        Context::Batches,
        Context::BatchDetail,
        Context::Compare,
        Context::Balance,
        Context::Settings,
        Context::Prompt,
        Context::Picker,
        Context::Form,
        Context::Reader,
        Context::Confirm,
    ];

    /// Whether the mode browses (and so also answers to the global keys).
    pub fn is_browsing(self) -> bool {
        matches!(
            self,
            Context::Recipe
                | Context::Ingredients
                | Context::Batches
                | Context::BatchDetail
                | Context::Compare
                | Context::Settings
        )
    }

    /// Whether typed characters go into a text field.
    pub fn takes_text(self) -> bool {
        matches!(self, Context::Prompt | Context::Picker | Context::Form)
    }

    /// How the help overlay titles the mode.
    pub fn title(self) -> &'static str {
        match self {
            Context::Global => "Everywhere you browse",
            Context::Recipe => "Recipe",
            Context::Ingredients => "Ingredients",
            Context::Batches => "Batch log",
            Context::BatchDetail => "One batch",
            Context::Compare => "Predicted against measured",
            Context::Balance => "Balancing the recipe",
            Context::Settings => "Settings",
            Context::Prompt => "Typing a value",
            Context::Picker => "Picking from a list",
            Context::Form => "Filling in a form",
            Context::Reader => "Reading",
            Context::Confirm => "Answering a question",
        }
    }
}

//! Overlays: the prompt, the picker, forms, the reader and questions, each
//! with what it is for, plus the status-bar message.

use tui_input::Input;

use super::Context;
use super::RecipeEntry;
use super::SettingField;

/// What a one-line prompt is for.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum PromptPurpose {
    /// The amount of a new line of this ingredient.
    NewLineAmount(String),
    /// A new amount for the line at this index.
    LineAmount(usize),
    /// A new total mass for the recipe.
    ScaleTotal,
    /// The recipe's serving target.
    ServingTarget,
    /// A new name for the recipe.
    Rename,
    /// The name to save a new recipe under.
    SaveAsName,
    /// A recipe file to open.
    OpenFilePath,
    /// Live search of the ingredients screen.
    IngredientSearch,
    /// Live search of the batch log.
    BatchSearch,
    /// The date from which batches are shown.
    BatchSince,
    /// A note for the batch with this code.
    BatchNote(String),
    /// A setting's value.
    Setting(SettingField),
    /// A balance target: a new one (`None`), or the range of the one at this index.
    BalanceTarget(Option<usize>),
    /// The price per kg of this ingredient, kept in the batch log.
    Price(String),
    /// The strength (% vol) to reduce the recipe to with water.
    ReduceToStrength,
    /// A new file to write a copy of the recipe to.
    CopyToFile,
    /// A file to export the batches shown to (.csv or .jsonl).
    ExportBatches,
}

/// A one-line prompt.
#[derive(Debug, Clone)]
pub struct Prompt {
    /// What it is for.
    pub purpose: PromptPurpose,
    /// The question.
    pub title: String,
    /// The text typed.
    pub input: Input,
    /// Why the text is not accepted, when it is not.
    pub error: Option<String>,
    /// Whether the whole text is selected (an old value offered for editing):
    /// typing replaces it, a deletion clears it, moving the cursor keeps it.
    pub selected: bool,
}

/// What the picker picks.
#[derive(Debug, Clone, PartialEq)]
pub enum PickerPurpose {
    /// An ingredient for a new line.
    Ingredient,
    /// A recipe in the database to open.
    Recipe(Vec<RecipeEntry>),
    /// The style of a new, blank recipe.
    Style,
    /// What a measurement of this batch is of (its code, and whether it is
    /// signed off, so the reading goes on its trail).
    MeasurementKind {
        /// The batch's code.
        code: String,
        /// Whether it is signed off.
        signed_off: bool,
    },
}

/// One row the picker offers.
#[derive(Debug, Clone, PartialEq)]
pub struct PickItem {
    /// The id returned when picked (ingredient id, or database id as text).
    pub key: String,
    /// What the user reads.
    pub label: String,
    /// A second column (category, version).
    pub detail: String,
}

/// A search-as-you-type picker.
#[derive(Debug, Clone)]
pub struct Picker {
    /// What it picks.
    pub purpose: PickerPurpose,
    /// The question.
    pub title: String,
    /// The search text.
    pub query: Input,
    /// Items matching the search, best first.
    pub items: Vec<PickItem>,
    /// Item under the cursor.
    pub cursor: usize,
}

/// What a form is for.
#[derive(Debug, Clone, PartialEq)]
pub enum FormPurpose {
    /// A new own ingredient, or editing the own ingredient at this index.
    Ingredient(Option<usize>),
    /// A new own solute, or editing the own solute at this index.
    Solute(Option<usize>),
    /// A new batch from the recipe in the editor.
    Batch,
    /// A measurement for the batch with this code.
    Measurement(String),
    /// A note, with its reason, for the signed-off batch with this code.
    TrailNote(String),
    /// An amendment of the batch with this code.
    Amend(String),
    /// An ingredient characterised from measured freezing points.
    Characterise,
}

/// One field of a form.
#[derive(Debug, Clone)]
pub struct Field {
    /// The label.
    pub label: String,
    /// The text typed.
    pub input: Input,
    /// Why the field's text is not accepted, when it is not.
    pub problem: Option<String>,
    /// Whether its starting value is selected: typing replaces it (as in a
    /// prompt), until it is edited or the focus leaves it.
    pub selected: bool,
}

impl Field {
    /// A field with a label and a starting value.
    /// A field with a label and a starting value, shown selected when there is one.
    pub fn new(label: impl Into<String>, value: impl Into<String>) -> Field {
        let value = value.into();
        Field {
            label: label.into(),
            selected: !value.is_empty(),
            input: Input::new(value),
            problem: None,
        }
    }
}

/// A form of several fields.
#[derive(Debug, Clone)]
pub struct Form {
    /// What it is for.
    pub purpose: FormPurpose,
    /// The title.
    pub title: String,
    /// The fields.
    pub fields: Vec<Field>,
    /// The field in focus.
    pub focus: usize,
    /// A line under the fields: a running total, or why the whole is refused.
    pub summary: Option<String>,
}

/// What help or the reader shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ReaderKind {
    /// The keys of a mode.
    Help(Context),
    /// Every warning and caution of the recipe.
    Warnings,
}

/// Where another recipe is opened from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum OpenFrom {
    /// A recipe in the batch log (the database).
    Log,
    /// A recipe file.
    File,
    /// A new, blank recipe (its style picked from a list).
    Blank,
    /// The recipe version the batch open in the detail was made from, to make it again.
    BatchRecipe,
}

/// What to do once a save asked for by a question has gone through.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum AfterSave {
    /// Leave gelu.
    Quit,
    /// Go on opening another recipe.
    Open(OpenFrom),
}

/// What a question decides.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Question {
    /// Quit despite unsaved changes (or save first).
    QuitUnsaved,
    /// Open another recipe over unsaved changes (or save first).
    OpenUnsaved(OpenFrom),
    /// Finalise the batch with this code.
    Finalize(String),
    /// Put in force the correction of this kind the compare view offers.
    TurnOnCorrection(String),
    /// Take out the correction of this kind in force for the compare view's scope.
    TurnOffCorrection(String),
    /// Apply a value more than ten times the old one, typed in a prompt.
    LargeChange {
        /// The prompt it was typed in.
        purpose: PromptPurpose,
        /// The prompt's question.
        title: String,
        /// The text typed.
        text: String,
        /// The question put, in words ("160 g to 1700 g ...").
        said: String,
    },
}

impl Question {
    /// Whether "save first" is one of its answers (a question over unsaved work).
    pub fn offers_save(&self) -> bool {
        matches!(self, Question::QuitUnsaved | Question::OpenUnsaved(_))
    }
}

/// Something drawn over the screen that takes the keys.
#[derive(Debug, Clone)]
pub enum Overlay {
    /// A one-line prompt.
    Prompt(Prompt),
    /// A picker.
    Picker(Picker),
    /// A form.
    Form(Form),
    /// Help or the warnings, scrolled to a row.
    Reader(ReaderKind, usize),
    /// A yes/no question.
    Confirm(Question),
}

/// A line in the status bar.
#[derive(Debug, Clone, PartialEq)]
pub struct Message {
    /// The text.
    pub text: String,
    /// Whether it reports a problem.
    pub is_error: bool,
}

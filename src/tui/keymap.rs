//! The one keymap table. Every key the workspace answers to is a row here; the
//! help overlay and the status-bar hints are generated from it, and the tests
//! check it (no key bound twice in a mode, every command reachable).
//!
//! A [`Context`] is a mode: the browsing mode of a screen, or an overlay (a text
//! prompt, the picker, a form, help, a question). Browsing modes fall back to
//! [`Context::Global`]; text modes do not, so typing never fires a shortcut.

use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyEventKind, KeyModifiers};

use super::action::{Action, Command};
use super::state::Context;

/// A key with its modifiers (Shift is folded into the character).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct Key {
    /// The key.
    pub code: KeyCode,
    /// Ctrl and Alt (Shift only for non-character keys).
    pub mods: KeyModifiers,
}

impl Key {
    /// A key without modifiers.
    pub const fn plain(code: KeyCode) -> Key {
        Key {
            code,
            mods: KeyModifiers::NONE,
        }
    }

    /// A character key.
    pub const fn ch(c: char) -> Key {
        Key::plain(KeyCode::Char(c))
    }

    /// Ctrl plus a character.
    pub const fn ctrl(c: char) -> Key {
        Key {
            code: KeyCode::Char(c),
            mods: KeyModifiers::CONTROL,
        }
    }

    /// Shift plus a non-character key.
    pub const fn shift(code: KeyCode) -> Key {
        Key {
            code,
            mods: KeyModifiers::SHIFT,
        }
    }

    /// The key of a terminal event, normalised; `None` for releases.
    pub fn from_event(event: KeyEvent) -> Option<Key> {
        if event.kind == KeyEventKind::Release {
            return None;
        }
        let mut mods =
            event.modifiers & (KeyModifiers::CONTROL | KeyModifiers::ALT | KeyModifiers::SHIFT);
        if matches!(event.code, KeyCode::Char(_) | KeyCode::BackTab) {
            mods.remove(KeyModifiers::SHIFT);
        }
        let code = match event.code {
            KeyCode::Char(c) if mods.contains(KeyModifiers::CONTROL) => {
                KeyCode::Char(c.to_ascii_lowercase())
            }
            other => other,
        };
        Some(Key { code, mods })
    }

    /// How the key is written in help and hints.
    pub fn label(self) -> String {
        let base = match self.code {
            KeyCode::Char(' ') => "Space".to_string(),
            KeyCode::Char(c) if self.mods.contains(KeyModifiers::CONTROL) => {
                c.to_ascii_uppercase().to_string()
            }
            KeyCode::Char(c) => c.to_string(),
            KeyCode::F(n) => format!("F{n}"),
            KeyCode::Up => "Up".into(),
            KeyCode::Down => "Down".into(),
            KeyCode::Left => "Left".into(),
            KeyCode::Right => "Right".into(),
            KeyCode::PageUp => "PgUp".into(),
            KeyCode::PageDown => "PgDn".into(),
            KeyCode::Home => "Home".into(),
            KeyCode::End => "End".into(),
            KeyCode::Enter => "Enter".into(),
            KeyCode::Esc => "Esc".into(),
            KeyCode::Tab => "Tab".into(),
            KeyCode::BackTab => "Shift-Tab".into(),
            KeyCode::Backspace => "Backspace".into(),
            KeyCode::Delete => "Del".into(),
            KeyCode::Insert => "Ins".into(),
            other => format!("{other:?}"),
        };
        let mut label = String::new();
        if self.mods.contains(KeyModifiers::CONTROL) {
            label.push_str("Ctrl-");
        }
        if self.mods.contains(KeyModifiers::ALT) {
            label.push_str("Alt-");
        }
        if self.mods.contains(KeyModifiers::SHIFT) {
            label.push_str("Shift-");
        }
        label.push_str(&base);
        label
    }
}

/// One row of the keymap.
#[derive(Debug, Clone, Copy)]
pub struct Binding {
    /// The modes the row applies in.
    pub contexts: &'static [Context],
    /// The key.
    pub key: Key,
    /// What it does.
    pub command: Command,
    /// Short word for the status bar, when the row is worth a hint there.
    pub hint: Option<&'static str>,
}

use Context as C;
use KeyCode as K;

const GLOBAL: &[Context] = &[C::Global];
const RECIPE: &[Context] = &[C::Recipe];
const INGREDIENTS: &[Context] = &[C::Ingredients];
const BATCHES: &[Context] = &[C::Batches];
const DETAIL: &[Context] = &[C::BatchDetail];
const COMPARE: &[Context] = &[C::Compare];
const SETTINGS: &[Context] = &[C::Settings];
const BALANCE: &[Context] = &[C::Balance];
const LISTS: &[Context] = &[
    C::Recipe,
    C::Ingredients,
    C::Batches,
    C::Compare,
    C::Settings,
    C::Reader,
    C::Balance,
];
const SEARCHABLE: &[Context] = &[C::Ingredients, C::Batches];
const TEXT: &[Context] = &[C::Prompt, C::Picker, C::Form];
const ANSWERS: &[Context] = &[C::Prompt, C::Picker, C::Form];
const CHOOSING: &[Context] = &[C::Picker];
const FORM: &[Context] = &[C::Form];
const READER: &[Context] = &[C::Reader];
const CONFIRM: &[Context] = &[C::Confirm];
const BACK: &[Context] = &[C::BatchDetail, C::Compare, C::Confirm];
const STARTS_BATCH: &[Context] = &[C::Recipe, C::Batches];

const fn bind(
    contexts: &'static [Context],
    key: Key,
    command: Command,
    hint: Option<&'static str>,
) -> Binding {
    Binding {
        contexts,
        key,
        command,
        hint,
    }
}

/// The keymap: every binding of every mode.
pub const KEYMAP: &[Binding] = &[
    // Everywhere you browse.
    bind(GLOBAL, Key::ch('q'), Command::Quit, Some("quit")),
    bind(GLOBAL, Key::ctrl('c'), Command::Quit, None),
    bind(GLOBAL, Key::ch('?'), Command::Help, Some("help")),
    bind(GLOBAL, Key::plain(K::F(1)), Command::Help, None),
    bind(GLOBAL, Key::plain(K::Tab), Command::NextScreen, None),
    bind(GLOBAL, Key::plain(K::BackTab), Command::PrevScreen, None),
    bind(GLOBAL, Key::ch('1'), Command::ShowRecipe, None),
    bind(GLOBAL, Key::ch('2'), Command::ShowIngredients, None),
    bind(GLOBAL, Key::ch('3'), Command::ShowBatches, None),
    bind(GLOBAL, Key::ch('4'), Command::ShowSettings, None),
    // Moving through lists.
    bind(LISTS, Key::plain(K::Up), Command::Up, None),
    bind(LISTS, Key::ch('k'), Command::Up, None),
    bind(LISTS, Key::plain(K::Down), Command::Down, None),
    bind(LISTS, Key::ch('j'), Command::Down, None),
    bind(LISTS, Key::plain(K::PageUp), Command::PageUp, None),
    bind(LISTS, Key::plain(K::PageDown), Command::PageDown, None),
    bind(LISTS, Key::plain(K::Home), Command::First, None),
    bind(LISTS, Key::ch('g'), Command::First, None),
    bind(LISTS, Key::plain(K::End), Command::Last, None),
    bind(LISTS, Key::ch('G'), Command::Last, None),
    // The recipe.
    bind(RECIPE, Key::ch('a'), Command::AddLine, Some("add")),
    bind(RECIPE, Key::plain(K::Insert), Command::AddLine, None),
    bind(
        RECIPE,
        Key::plain(K::Enter),
        Command::EditAmount,
        Some("amount"),
    ),
    bind(RECIPE, Key::ch('e'), Command::EditAmount, None),
    bind(RECIPE, Key::ch('d'), Command::DeleteLine, Some("delete")),
    bind(RECIPE, Key::plain(K::Delete), Command::DeleteLine, None),
    bind(RECIPE, Key::ch('K'), Command::MoveLineUp, None),
    bind(RECIPE, Key::shift(K::Up), Command::MoveLineUp, None),
    bind(RECIPE, Key::ch('J'), Command::MoveLineDown, None),
    bind(RECIPE, Key::shift(K::Down), Command::MoveLineDown, None),
    bind(RECIPE, Key::ch('s'), Command::ScaleRecipe, Some("scale")),
    bind(RECIPE, Key::ch('t'), Command::SetServingTarget, None),
    bind(RECIPE, Key::ch('r'), Command::Rename, None),
    bind(RECIPE, Key::ch('u'), Command::Undo, Some("undo")),
    bind(RECIPE, Key::ctrl('z'), Command::Undo, None),
    bind(RECIPE, Key::ctrl('r'), Command::Redo, None),
    bind(RECIPE, Key::ctrl('y'), Command::Redo, None),
    bind(RECIPE, Key::ctrl('s'), Command::Save, Some("save")),
    bind(RECIPE, Key::ch('S'), Command::SaveAsNew, None),
    bind(RECIPE, Key::ch('v'), Command::SaveVersion, None),
    bind(RECIPE, Key::ch('o'), Command::OpenRecipe, None),
    bind(RECIPE, Key::ch('O'), Command::OpenFile, None),
    bind(RECIPE, Key::ch('N'), Command::NewRecipe, None),
    bind(RECIPE, Key::ch('W'), Command::CopyToFile, None),
    bind(
        RECIPE,
        Key::ch('w'),
        Command::ShowWarnings,
        Some("warnings"),
    ),
    bind(
        STARTS_BATCH,
        Key::ch('b'),
        Command::StartBatch,
        Some("batch"),
    ),
    bind(BATCHES, Key::ch('S'), Command::SyncNow, Some("sync")),
    bind(BATCHES, Key::ch('x'), Command::ExportBatches, None),
    bind(
        &[C::Batches, C::BatchDetail],
        Key::ch('r'),
        Command::RefreshBatches,
        Some("refresh"),
    ),
    bind(RECIPE, Key::ch('B'), Command::OpenBalance, Some("balance")),
    bind(RECIPE, Key::ch('R'), Command::ReduceToStrength, None),
    // The balance panel on the recipe screen.
    bind(BALANCE, Key::ch('?'), Command::Help, Some("help")),
    bind(BALANCE, Key::plain(K::F(1)), Command::Help, None),
    bind(
        BALANCE,
        Key::ch('a'),
        Command::AcceptBalance,
        Some("accept"),
    ),
    bind(BALANCE, Key::plain(K::Esc), Command::Cancel, Some("cancel")),
    bind(
        BALANCE,
        Key::plain(K::Enter),
        Command::EditBalanceRow,
        Some("change"),
    ),
    bind(BALANCE, Key::ch(' '), Command::EditBalanceRow, None),
    bind(BALANCE, Key::ch('e'), Command::EditBalanceRow, None),
    bind(
        BALANCE,
        Key::ch('n'),
        Command::AddTarget,
        Some("add target"),
    ),
    bind(BALANCE, Key::ch('d'), Command::DeleteTarget, None),
    bind(BALANCE, Key::plain(K::Delete), Command::DeleteTarget, None),
    bind(BALANCE, Key::ch('p'), Command::SetPrice, Some("price")),
    bind(
        BALANCE,
        Key::ch('c'),
        Command::SwitchObjective,
        Some("least cost"),
    ),
    // Ingredients.
    bind(SEARCHABLE, Key::ch('/'), Command::Search, Some("search")),
    bind(SEARCHABLE, Key::plain(K::Esc), Command::ClearFilter, None),
    bind(
        INGREDIENTS,
        Key::ch('s'),
        Command::SwitchList,
        Some("solutes/ingredients"),
    ),
    bind(INGREDIENTS, Key::plain(K::Left), Command::SwitchList, None),
    bind(INGREDIENTS, Key::plain(K::Right), Command::SwitchList, None),
    bind(
        INGREDIENTS,
        Key::ch('n'),
        Command::NewIngredient,
        Some("new ingredient"),
    ),
    bind(
        INGREDIENTS,
        Key::ch('N'),
        Command::NewSolute,
        Some("new solute"),
    ),
    bind(INGREDIENTS, Key::ch('e'), Command::EditOwn, Some("edit")),
    bind(INGREDIENTS, Key::plain(K::Enter), Command::EditOwn, None),
    bind(
        INGREDIENTS,
        Key::ch('a'),
        Command::AddToRecipe,
        Some("add to recipe"),
    ),
    bind(
        INGREDIENTS,
        Key::ch('m'),
        Command::CharacteriseIngredient,
        Some("measure one"),
    ),
    // The batch log.
    bind(
        BATCHES,
        Key::plain(K::Enter),
        Command::OpenDetail,
        Some("open"),
    ),
    bind(
        BATCHES,
        Key::ch('f'),
        Command::FilterRecipe,
        Some("this recipe"),
    ),
    bind(
        BATCHES,
        Key::ch('D'),
        Command::FilterDate,
        Some("since date"),
    ),
    bind(
        BATCHES,
        Key::ch('c'),
        Command::CompareBatches,
        Some("compare"),
    ),
    bind(COMPARE, Key::ch('C'), Command::Calibrate, Some("calibrate")),
    bind(
        COMPARE,
        Key::ch('X'),
        Command::CalibrationOff,
        Some("calibration off"),
    ),
    bind(
        DETAIL,
        Key::ch('m'),
        Command::AddMeasurement,
        Some("measure"),
    ),
    bind(DETAIL, Key::ch('n'), Command::AddNote, Some("note")),
    bind(DETAIL, Key::ch('F'), Command::Finalize, Some("finalise")),
    bind(DETAIL, Key::ch('A'), Command::Amend, Some("amend")),
    bind(BACK, Key::plain(K::Esc), Command::Cancel, Some("back")),
    bind(DETAIL, Key::ch('e'), Command::MakeAgain, Some("make again")),
    // Settings.
    bind(
        SETTINGS,
        Key::plain(K::Enter),
        Command::Toggle,
        Some("change"),
    ),
    bind(SETTINGS, Key::ch(' '), Command::Toggle, None),
    bind(SETTINGS, Key::ch('e'), Command::Toggle, None),
    // Text fields, the picker and forms.
    bind(
        ANSWERS,
        Key::plain(K::Enter),
        Command::Confirm,
        Some("accept"),
    ),
    bind(ANSWERS, Key::plain(K::Esc), Command::Cancel, Some("cancel")),
    bind(CHOOSING, Key::plain(K::Up), Command::Up, None),
    bind(CHOOSING, Key::plain(K::Down), Command::Down, Some("choose")),
    bind(CHOOSING, Key::plain(K::PageUp), Command::PageUp, None),
    bind(CHOOSING, Key::plain(K::PageDown), Command::PageDown, None),
    bind(
        FORM,
        Key::plain(K::Tab),
        Command::NextField,
        Some("next field"),
    ),
    bind(FORM, Key::plain(K::Down), Command::NextField, None),
    bind(FORM, Key::plain(K::BackTab), Command::PrevField, None),
    bind(FORM, Key::plain(K::Up), Command::PrevField, None),
    bind(TEXT, Key::plain(K::Left), Command::CursorLeft, None),
    bind(TEXT, Key::plain(K::Right), Command::CursorRight, None),
    bind(TEXT, Key::plain(K::Home), Command::CursorHome, None),
    bind(TEXT, Key::plain(K::End), Command::CursorEnd, None),
    bind(TEXT, Key::plain(K::Backspace), Command::DeleteBack, None),
    bind(TEXT, Key::plain(K::Delete), Command::DeleteForward, None),
    bind(TEXT, Key::ctrl('w'), Command::DeleteWord, None),
    bind(TEXT, Key::ctrl('u'), Command::ClearField, None),
    // Reading help or warnings.
    bind(READER, Key::plain(K::Esc), Command::Cancel, Some("close")),
    bind(READER, Key::ch('q'), Command::Cancel, None),
    bind(READER, Key::ch('?'), Command::Cancel, None),
    bind(READER, Key::plain(K::F(1)), Command::Cancel, None),
    bind(READER, Key::plain(K::Enter), Command::Cancel, None),
    // Questions.
    bind(CONFIRM, Key::ch('y'), Command::Yes, Some("yes")),
    bind(CONFIRM, Key::ch('n'), Command::No, Some("no")),
    bind(
        CONFIRM,
        Key::ch('s'),
        Command::SaveFirst,
        Some("save first"),
    ),
];

/// The bindings that apply in exactly `context` (without the global fallback).
pub fn bindings_in(context: Context) -> impl Iterator<Item = &'static Binding> {
    KEYMAP.iter().filter(move |b| b.contexts.contains(&context))
}

/// The bindings in effect in `context`: its own, then the global ones if it browses.
pub fn effective_bindings(context: Context) -> Vec<&'static Binding> {
    let mut all: Vec<&'static Binding> = bindings_in(context).collect();
    if context.is_browsing() {
        all.extend(bindings_in(Context::Global));
    }
    all
}

/// What a key means in `context`, if anything.
pub fn lookup(context: Context, key: Key) -> Option<Command> {
    effective_bindings(context)
        .into_iter()
        .find(|b| b.key == key)
        .map(|b| b.command)
}

/// Turns a terminal key event into an action in `context`: a bound command, a
/// typed character in a text mode, or nothing.
pub fn action_for(context: Context, event: KeyEvent) -> Option<Action> {
    let key = Key::from_event(event)?;
    if let Some(command) = lookup(context, key) {
        return Some(Action::Command(command));
    }
    match key.code {
        KeyCode::Char(c)
            if context.takes_text()
                && !key
                    .mods
                    .intersects(KeyModifiers::CONTROL | KeyModifiers::ALT) =>
        {
            Some(Action::Insert(c))
        }
        _ => None,
    }
}

/// How the first key of `command` in `context` is written, for text that
/// names a key (so the text follows the table).
pub fn key_label(context: Context, command: Command) -> String {
    effective_bindings(context)
        .into_iter()
        .find(|b| b.command == command)
        .map_or_else(|| command.name().to_string(), |b| b.key.label())
}

/// The status-bar hints of `context`: (keys, word) pairs, in table order.
pub fn hints(context: Context) -> Vec<(String, &'static str)> {
    let mut out: Vec<(String, &'static str)> = Vec::new();
    let mut seen: Vec<Command> = Vec::new();
    let mut ordered: Vec<&'static Binding> = Vec::new();
    if context.is_browsing() {
        ordered.extend(bindings_in(Context::Global));
    }
    ordered.extend(bindings_in(context));
    for b in ordered {
        if let Some(word) = b.hint
            && !seen.contains(&b.command)
        {
            seen.push(b.command);
            out.push((b.key.label(), word));
        }
    }
    out
}

/// One help row: the keys of a command in a mode, its name and description.
#[derive(Debug, Clone, PartialEq)]
pub struct HelpRow {
    /// Keys, comma-separated.
    pub keys: String,
    /// The command.
    pub command: Command,
}

/// The help rows of exactly `context`, one per command, keys joined.
pub fn help_rows(context: Context) -> Vec<HelpRow> {
    let mut rows: Vec<HelpRow> = Vec::new();
    for b in bindings_in(context) {
        match rows.iter_mut().find(|r| r.command == b.command) {
            Some(row) => {
                row.keys.push_str(", ");
                row.keys.push_str(&b.key.label());
            }
            None => rows.push(HelpRow {
                keys: b.key.label(),
                command: b.command,
            }),
        }
    }
    rows
}

//! `update(&mut State, Action) -> Vec<Effect>`: the only place the workspace's
//! state changes. No I/O: anything that reads or writes a file or the database
//! is returned as an [`Effect`] for the loop to carry out.
//!
//! Commands go first to the overlay in focus (prompt, picker, form, reader,
//! question), then to the global keys, then to the screen shown.

use tui_input::{Input, InputRequest};

use super::action::{Action, Command, Effect};
use super::handlers::{
    balance, batch_forms, batches, characterise, ingredients, own_items, recipe, settings,
};
use super::state::{AfterSave, Overlay, PickerPurpose, Question, ReaderKind, Screen, State};

/// Applies one action to the state and returns the effects it asks for.
pub fn update(state: &mut State, action: Action) -> Vec<Effect> {
    match action {
        Action::Command(command) => command_update(state, command),
        Action::Insert(c) => {
            edit_text(state, InputRequest::InsertChar(c));
            Vec::new()
        }
        Action::RecipeLoaded { recipe, source } => {
            recipe::loaded(state, recipe, source);
            Vec::new()
        }
        Action::Saved {
            source,
            recipe: saved,
            message,
        } => {
            recipe::saved(state, source, saved);
            state.tell(message);
            match state.recipe.after_save.take() {
                Some(AfterSave::Quit) => vec![Effect::Quit],
                Some(AfterSave::Open(from)) => recipe::open(state, from),
                None => Vec::new(),
            }
        }
        Action::RecipeList(entries) => {
            recipe::open_recipe_picker(state, entries);
            Vec::new()
        }
        Action::SettingsLoaded(loaded) => {
            state.settings = loaded;
            state.reanalyse();
            Vec::new()
        }
        Action::BatchesPage(page) => {
            batches::page_arrived(state, page);
            Vec::new()
        }
        Action::BatchDetail(detail) => {
            state.batches.detail = Some(*detail);
            Vec::new()
        }
        Action::ComparisonLoaded(view) => {
            batches::comparison_arrived(state, *view);
            Vec::new()
        }
        Action::CorrectionChanged(message) => {
            state.tell(message);
            batches::reload_comparison(state)
        }
        Action::OwnLibraryLoaded(own) => {
            state.own = own;
            state.refresh_catalog();
            state.refresh_ingredient_matches();
            state.reanalyse();
            Vec::new()
        }
        Action::BatchChanged { code, message } => {
            state.tell(message);
            let mut effects = batches::reload(state);
            effects.push(Effect::LoadBatchDetail(code));
            effects
        }
        Action::SyncState(view) => {
            state.batches.sync = view;
            Vec::new()
        }
        Action::Synced {
            message,
            state: view,
        } => {
            state.batches.sync = view;
            state.tell(message);
            batches::reload(state)
        }
        Action::Failed(text) => {
            state.batches.loading = false;
            // A save that failed does not go on to quit or open anything.
            state.recipe.after_save = None;
            state.warn(text);
            Vec::new()
        }
        Action::Info(text) => {
            state.tell(text);
            Vec::new()
        }
    }
}

fn command_update(state: &mut State, command: Command) -> Vec<Effect> {
    if state.overlay.is_some() {
        return overlay_update(state, command);
    }
    state.message = None;
    match command {
        Command::Quit => request_quit(state),
        Command::Help => {
            let context = state.context();
            state.overlay = Some(Overlay::Reader(ReaderKind::Help(context), 0));
            Vec::new()
        }
        Command::NextScreen => show(state, cycle(state.screen, 1)),
        Command::PrevScreen => show(state, cycle(state.screen, Screen::ALL.len() - 1)),
        Command::ShowRecipe => show(state, Screen::Recipe),
        Command::ShowIngredients => show(state, Screen::Ingredients),
        Command::ShowBatches => show(state, Screen::Batches),
        Command::ShowSettings => show(state, Screen::Settings),
        _ => match state.screen {
            Screen::Recipe if state.recipe.balance.is_some() => balance::command(state, command),
            Screen::Recipe => recipe::command(state, command),
            Screen::Ingredients => ingredients::command(state, command),
            Screen::Batches => batches::command(state, command),
            Screen::Settings => settings::command(state, command),
        },
    }
}

fn cycle(screen: Screen, step: usize) -> Screen {
    let at = Screen::ALL.iter().position(|s| *s == screen).unwrap_or(0);
    Screen::ALL[(at + step) % Screen::ALL.len()]
}

fn show(state: &mut State, screen: Screen) -> Vec<Effect> {
    let arriving = state.screen != screen;
    state.screen = screen;
    // The batch log is read again each time it is shown: other terminals and the
    // command line write to it too.
    if screen == Screen::Batches && (arriving || state.batches.rows.is_empty()) {
        return batches::refresh(state);
    }
    Vec::new()
}

fn request_quit(state: &mut State) -> Vec<Effect> {
    if state.recipe.is_dirty() {
        state.overlay = Some(Overlay::Confirm(Question::QuitUnsaved));
        Vec::new()
    } else {
        vec![Effect::Quit]
    }
}

fn overlay_update(state: &mut State, command: Command) -> Vec<Effect> {
    let Some(overlay) = state.overlay.take() else {
        return Vec::new();
    };
    match overlay {
        Overlay::Reader(kind, scroll) => {
            let last = reader_rows(state, kind).saturating_sub(1);
            let scroll = match command {
                Command::Cancel => return Vec::new(),
                Command::Up => scroll.saturating_sub(1),
                Command::Down => scroll + 1,
                Command::PageUp => scroll.saturating_sub(super::state::PAGE_ROWS),
                Command::PageDown => scroll + super::state::PAGE_ROWS,
                Command::First => 0,
                Command::Last => last,
                _ => scroll,
            }
            .min(last);
            state.overlay = Some(Overlay::Reader(kind, scroll));
            Vec::new()
        }
        Overlay::Confirm(question) => match command {
            Command::Yes => match question {
                Question::QuitUnsaved => vec![Effect::Quit],
                Question::OpenUnsaved(from) => recipe::open(state, from),
                Question::Finalize(code) => batches::finalize(state, code),
                Question::TurnOnCorrection(kind) => batches::turn_on(state, &kind),
                Question::TurnOffCorrection(kind) => batches::turn_off(state, &kind),
                Question::LargeChange {
                    purpose,
                    title,
                    text,
                    ..
                } => apply_prompt(state, reopened(purpose, title, text)),
            },
            Command::SaveFirst if question.offers_save() => {
                state.recipe.after_save = Some(match question {
                    Question::OpenUnsaved(from) => AfterSave::Open(from),
                    _ => AfterSave::Quit,
                });
                recipe::save(state)
            }
            Command::No | Command::Cancel => {
                if let Question::LargeChange {
                    purpose,
                    title,
                    text,
                    ..
                } = question
                {
                    state.overlay = Some(Overlay::Prompt(reopened(purpose, title, text)));
                }
                Vec::new()
            }
            _ => {
                state.overlay = Some(Overlay::Confirm(question));
                Vec::new()
            }
        },
        Overlay::Prompt(prompt) => match command {
            Command::Cancel => {
                cancel_prompt(state, &prompt.purpose);
                Vec::new()
            }
            Command::Confirm => accept_prompt(state, prompt),
            other => {
                state.overlay = Some(Overlay::Prompt(prompt));
                text_command(state, other);
                Vec::new()
            }
        },
        Overlay::Picker(mut picker) => match command {
            Command::Cancel => Vec::new(),
            Command::Confirm => {
                let picked = picker.items.get(picker.cursor).cloned();
                match (picked, picker.purpose) {
                    (Some(item), PickerPurpose::Ingredient) => {
                        recipe::ask_new_line_amount(state, &item.key);
                        Vec::new()
                    }
                    (Some(item), PickerPurpose::Recipe(_)) => vec![Effect::LoadRecipe(item.key)],
                    (Some(item), PickerPurpose::Style) => {
                        if let Some(style) = crate::model::Style::parse(&item.key) {
                            recipe::new_blank(state, style);
                        }
                        Vec::new()
                    }
                    (Some(item), PickerPurpose::MeasurementKind { code, signed_off }) => {
                        batch_forms::open_measurement_form(state, code, signed_off, &item.key);
                        Vec::new()
                    }
                    (None, purpose) => {
                        picker.purpose = purpose;
                        state.overlay = Some(Overlay::Picker(picker));
                        Vec::new()
                    }
                }
            }
            Command::Up => {
                picker.cursor = picker.cursor.saturating_sub(1);
                state.overlay = Some(Overlay::Picker(picker));
                Vec::new()
            }
            Command::Down | Command::PageDown | Command::PageUp => {
                let step = if command == Command::Down {
                    1
                } else {
                    super::state::PAGE_ROWS
                };
                picker.cursor = if command == Command::PageUp {
                    picker.cursor.saturating_sub(step)
                } else {
                    (picker.cursor + step).min(picker.items.len().saturating_sub(1))
                };
                state.overlay = Some(Overlay::Picker(picker));
                Vec::new()
            }
            other => {
                state.overlay = Some(Overlay::Picker(picker));
                text_command(state, other);
                Vec::new()
            }
        },
        Overlay::Form(mut form) => match command {
            Command::Cancel => Vec::new(),
            Command::NextField => {
                unselect(&mut form);
                form.focus = (form.focus + 1) % form.fields.len().max(1);
                state.overlay = Some(Overlay::Form(form));
                Vec::new()
            }
            Command::PrevField => {
                unselect(&mut form);
                let n = form.fields.len().max(1);
                form.focus = (form.focus + n - 1) % n;
                state.overlay = Some(Overlay::Form(form));
                Vec::new()
            }
            Command::Confirm => submit_form(state, form),
            other => {
                state.overlay = Some(Overlay::Form(form));
                text_command(state, other);
                Vec::new()
            }
        },
    }
}

/// About how many rows the reader's text takes: enough to bound scrolling
/// (the view shows the last screenful at most).
fn reader_rows(state: &State, kind: ReaderKind) -> usize {
    match kind {
        ReaderKind::Help(context) => {
            let mut sections = vec![context];
            if context.is_browsing() {
                sections.push(super::state::Context::Global);
            }
            sections
                .into_iter()
                .map(|c| super::keymap::help_rows(c).len() + 3)
                .sum()
        }
        ReaderKind::Warnings => match &state.recipe.analysis {
            Ok(a) => a
                .warnings
                .iter()
                .map(|w| w.message.as_str())
                .chain(a.cautions.iter().map(String::as_str))
                .map(|t| t.chars().count() / 40 + 2)
                .sum(),
            Err(_) => 2,
        },
    }
}

/// The text request of a text-editing command, if it is one.
fn text_request(command: Command) -> Option<InputRequest> {
    Some(match command {
        Command::CursorLeft => InputRequest::GoToPrevChar,
        Command::CursorRight => InputRequest::GoToNextChar,
        Command::CursorHome => InputRequest::GoToStart,
        Command::CursorEnd => InputRequest::GoToEnd,
        Command::DeleteBack => InputRequest::DeletePrevChar,
        Command::DeleteForward => InputRequest::DeleteNextChar,
        Command::DeleteWord => InputRequest::DeletePrevWord,
        Command::ClearField => InputRequest::DeleteLine,
        _ => return None,
    })
}

fn text_command(state: &mut State, command: Command) {
    if let Some(request) = text_request(command) {
        edit_text(state, request);
    }
}

fn focused_input(overlay: &mut Overlay) -> Option<&mut Input> {
    match overlay {
        Overlay::Prompt(p) => Some(&mut p.input),
        Overlay::Picker(p) => Some(&mut p.query),
        Overlay::Form(f) => f.fields.get_mut(f.focus).map(|field| &mut field.input),
        Overlay::Reader(..) | Overlay::Confirm(_) => None,
    }
}

/// Applies a text request to the field in focus, then lets the overlay react
/// (live search, picker matches, field checks). A prompt's selected old value is
/// replaced by what is typed, cleared by a deletion, and kept by a cursor move.
fn edit_text(state: &mut State, request: InputRequest) {
    let Some(overlay) = state.overlay.as_mut() else {
        return;
    };
    let replaces = !matches!(
        request,
        InputRequest::GoToPrevChar
            | InputRequest::GoToNextChar
            | InputRequest::GoToStart
            | InputRequest::GoToEnd
    );
    // A form's selected starting value, likewise: typing replaces it.
    if let Overlay::Form(f) = overlay {
        let focus = f.focus;
        if let Some(field) = f.fields.get_mut(focus)
            && field.selected
        {
            field.selected = false;
            if replaces {
                field.input = Input::default();
                if matches!(request, InputRequest::InsertChar(_)) {
                    field.input.handle(request);
                }
                if let Some(Overlay::Form(mut form)) = state.overlay.take() {
                    check_form(state, &mut form);
                    state.overlay = Some(Overlay::Form(form));
                }
                return;
            }
        }
    }
    if let Overlay::Prompt(p) = overlay
        && p.selected
    {
        p.selected = false;
        if replaces {
            p.input = Input::default();
            if matches!(request, InputRequest::InsertChar(_)) {
                p.input.handle(request);
            }
            p.error = None;
            let live = p.input.value().to_string();
            let purpose = p.purpose.clone();
            live_prompt(state, &purpose, &live);
            return;
        }
    }
    let Some(input) = focused_input(overlay) else {
        return;
    };
    if input.handle(request).is_none_or(|changed| !changed.value) {
        return;
    }
    match state.overlay.take() {
        Some(Overlay::Prompt(mut prompt)) => {
            prompt.error = None;
            let live = prompt.input.value().to_string();
            let purpose = prompt.purpose.clone();
            state.overlay = Some(Overlay::Prompt(prompt));
            live_prompt(state, &purpose, &live);
        }
        Some(Overlay::Picker(mut picker)) => {
            recipe::refresh_picker(state, &mut picker);
            state.overlay = Some(Overlay::Picker(picker));
        }
        Some(Overlay::Form(mut form)) => {
            check_form(state, &mut form);
            state.overlay = Some(Overlay::Form(form));
        }
        other => state.overlay = other,
    }
}

/// The field in focus keeps its text as it is when the focus leaves it.
fn unselect(form: &mut super::state::Form) {
    if let Some(field) = form.fields.get_mut(form.focus) {
        field.selected = false;
    }
}

fn live_prompt(state: &mut State, purpose: &super::state::PromptPurpose, text: &str) {
    use super::state::PromptPurpose as P;
    match purpose {
        P::IngredientSearch => ingredients::set_filter(state, text),
        P::BatchSearch => {
            state.batches.query.text = text.to_string();
        }
        _ => {}
    }
}

fn cancel_prompt(state: &mut State, purpose: &super::state::PromptPurpose) {
    use super::state::PromptPurpose as P;
    if matches!(purpose, P::SaveAsName) {
        // Backing out of the name backs out of a "save first" too.
        state.recipe.after_save = None;
    }
    if matches!(purpose, P::IngredientSearch) {
        ingredients::set_filter(state, "");
    }
    if matches!(purpose, P::BatchSearch) {
        state.batches.query.text.clear();
    }
}

/// A prompt opened again on text typed before (after a question about it).
fn reopened(
    purpose: super::state::PromptPurpose,
    title: String,
    text: String,
) -> super::state::Prompt {
    super::state::Prompt {
        purpose,
        title,
        input: Input::new(text),
        error: None,
        selected: false,
    }
}

/// Accepts a prompt, asking first when its value is more than ten times the old.
fn accept_prompt(state: &mut State, prompt: super::state::Prompt) -> Vec<Effect> {
    use super::state::PromptPurpose as P;
    let text = prompt.input.value().to_string();
    let large = match &prompt.purpose {
        P::LineAmount(_) | P::ScaleTotal | P::ServingTarget => {
            recipe::large_change(state, &prompt.purpose, &text)
        }
        P::Setting(field) => settings::large_change(state, *field, &text),
        _ => None,
    };
    if let Some(said) = large {
        state.overlay = Some(Overlay::Confirm(Question::LargeChange {
            purpose: prompt.purpose,
            title: prompt.title,
            text,
            said,
        }));
        return Vec::new();
    }
    apply_prompt(state, prompt)
}

/// Applies a prompt's text; a refusal keeps the prompt open with the reason.
fn apply_prompt(state: &mut State, prompt: super::state::Prompt) -> Vec<Effect> {
    use super::state::PromptPurpose as P;
    let text = prompt.input.value().to_string();
    let outcome = match &prompt.purpose {
        P::NewLineAmount(_)
        | P::LineAmount(_)
        | P::ScaleTotal
        | P::ServingTarget
        | P::Rename
        | P::SaveAsName
        | P::OpenFilePath
        | P::CopyToFile => recipe::accept(state, &prompt.purpose, &text),
        P::IngredientSearch => Ok(Vec::new()),
        P::BatchSearch | P::BatchSince | P::BatchNote(_) | P::ExportBatches => {
            batches::accept(state, &prompt.purpose, &text)
        }
        P::Setting(field) => settings::accept(state, *field, &text),
        P::BalanceTarget(_) | P::Price(_) | P::ReduceToStrength => {
            balance::accept(state, &prompt.purpose, &text)
        }
    };
    match outcome {
        Ok(effects) => effects,
        Err(reason) => {
            state.overlay = Some(Overlay::Prompt(super::state::Prompt {
                error: Some(reason),
                selected: false,
                ..prompt
            }));
            Vec::new()
        }
    }
}

fn check_form(state: &State, form: &mut super::state::Form) {
    use super::state::FormPurpose as F;
    match &form.purpose {
        F::Ingredient(_) | F::Solute(_) => own_items::check_form(state, form),
        F::Batch | F::Measurement(_) | F::TrailNote(_) | F::Amend(_) => {
            batch_forms::check_form(state, form)
        }
        F::Characterise => characterise::check_form(state, form),
    }
}

fn submit_form(state: &mut State, mut form: super::state::Form) -> Vec<Effect> {
    use super::state::FormPurpose as F;
    check_form(state, &mut form);
    let outcome = match &form.purpose {
        F::Ingredient(_) | F::Solute(_) => own_items::submit(state, &form),
        F::Batch | F::Measurement(_) | F::TrailNote(_) | F::Amend(_) => {
            batch_forms::submit(state, &form)
        }
        F::Characterise => characterise::submit(state, &form),
    };
    match outcome {
        Ok(effects) => effects,
        Err(reason) => {
            form.summary = Some(reason);
            state.overlay = Some(Overlay::Form(form));
            Vec::new()
        }
    }
}

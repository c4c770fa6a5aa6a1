//! The batch log's half of `update`: paging through the history newest first
//! (keyset pages, fetched as the cursor nears the end of what is loaded),
//! filters, one batch's detail, notes and sign-off. The forms that record a
//! batch, a measurement or an amendment are in `batch_forms`.

use super::super::action::{Command, Effect};
use super::super::state::{
    BatchPage, CompareRequest, CompareView, KindView, OpenFrom, Overlay, PromptPurpose, Question,
    State,
};
use super::batch_forms::{
    open_amend_form, open_batch_form, open_measurement_picker, open_trail_note_form, signer,
};
use super::common::{move_cursor, prompt};
use crate::measure::Scope;
use crate::model::time::{DayEnd, parse_date_bound};

/// Rows from the end of what is loaded at which the next page is fetched.
pub const PREFETCH_ROWS: usize = 60;

/// Handles a command on the batch log (list, detail or compare view).
pub fn command(state: &mut State, command: Command) -> Vec<Effect> {
    if let Some(view) = &mut state.batches.compare {
        match command {
            c if c.moves_cursor() => view.cursor = move_cursor(view.cursor, view.kinds.len(), c),
            Command::Cancel => state.batches.compare = None,
            Command::Calibrate => ask_turn_on(state),
            Command::CalibrationOff => ask_turn_off(state),
            _ => {}
        }
        return Vec::new();
    }
    if let Some(detail) = &state.batches.detail {
        let code = detail.row.code.clone();
        let finalized = detail.row.finalized;
        match command {
            Command::Cancel => state.batches.detail = None,
            Command::AddMeasurement => open_measurement_picker(state, code, finalized),
            Command::AddNote if finalized => open_trail_note_form(state, code),
            Command::AddNote => prompt(
                state,
                PromptPurpose::BatchNote(code),
                "Note for this batch (deviation, correction, tasting)".into(),
                String::new(),
            ),
            Command::Finalize if finalized => state.tell("This batch is already final."),
            Command::Finalize => {
                state.overlay = Some(Overlay::Confirm(Question::Finalize(code)));
            }
            Command::Amend if !finalized => {
                state.tell("A draft is not amended: add a note (n), or finalise it first (F).")
            }
            Command::Amend => open_amend_form(state, code),
            Command::RefreshBatches => return refresh(state),
            Command::MakeAgain => {
                return super::recipe::open_or_ask(state, OpenFrom::BatchRecipe);
            }
            _ => {}
        }
        return Vec::new();
    }
    let len = state.batches.rows.len();
    match command {
        c if c.moves_cursor() => {
            state.batches.cursor = move_cursor(state.batches.cursor, len, command);
            return prefetch(state);
        }
        Command::OpenDetail => {
            if let Some(row) = state.batches.rows.get(state.batches.cursor) {
                return vec![Effect::LoadBatchDetail(row.code.clone())];
            }
        }
        Command::RefreshBatches => return refresh(state),
        Command::ExportBatches => prompt(
            state,
            PromptPurpose::ExportBatches,
            "Export the batches shown to a new file (.csv or .jsonl)".into(),
            "batches.csv".into(),
        ),
        Command::Search => {
            let text = state.batches.query.text.clone();
            prompt(
                state,
                PromptPurpose::BatchSearch,
                "Search batches: words in notes, lots and amendment reasons".into(),
                text,
            );
        }
        Command::ClearFilter => {
            state.batches.query.text.clear();
            state.batches.query.since = None;
            state.batches.query.recipe = None;
            return reload(state);
        }
        Command::FilterRecipe => {
            if state.batches.query.recipe.is_some() {
                state.batches.query.recipe = None;
            } else {
                state.batches.query.recipe = Some(state.recipe.recipe.name.clone());
            }
            return reload(state);
        }
        Command::FilterDate => {
            let text = state.batches.query.since.clone().unwrap_or_default();
            prompt(
                state,
                PromptPurpose::BatchSince,
                "Show batches made on or after (YYYY-MM-DD, empty: all)".into(),
                text,
            );
        }
        Command::StartBatch => return open_batch_form(state),
        Command::CompareBatches => return open_comparison(state),
        Command::SyncNow if state.batches.sync.running => state.tell("A sync is already running."),
        Command::SyncNow => {
            state.batches.sync.running = true;
            state.tell("Synchronising with the hub in the background; keep working meanwhile.");
            return vec![Effect::SyncNow];
        }
        _ => {}
    }
    Vec::new()
}

/// Asks for predicted against measured over the batches the list shows; a
/// correction would be for the recipe filtered on, else for the style of the
/// recipe in the editor.
fn open_comparison(state: &mut State) -> Vec<Effect> {
    let query = &state.batches.query;
    let scope = match &query.recipe {
        Some(name) => Scope::Recipe(name.clone()),
        None => Scope::Style(state.recipe.recipe.style.as_str().to_string()),
    };
    let request = CompareRequest {
        recipe: query.recipe.clone(),
        since: query.since.clone(),
        scope: Some(scope),
    };
    state.tell("Setting the predictions against what was measured…");
    vec![Effect::LoadComparison(request)]
}

/// Takes in the compare view; a view of the same request keeps its cursor.
pub fn comparison_arrived(state: &mut State, mut view: CompareView) {
    if let Some(old) = &state.batches.compare
        && old.request == view.request
    {
        view.cursor = old.cursor.min(view.kinds.len().saturating_sub(1));
    }
    state.batches.detail = None;
    state.batches.compare = Some(view);
}

/// Asks the log again for the compare view shown, if one is.
pub fn reload_comparison(state: &State) -> Vec<Effect> {
    state
        .batches
        .compare
        .as_ref()
        .map(|v| vec![Effect::LoadComparison(v.request.clone())])
        .unwrap_or_default()
}

fn kind_under_cursor(state: &State) -> Option<&KindView> {
    let view = state.batches.compare.as_ref()?;
    view.kinds.get(view.cursor)
}

fn ask_turn_on(state: &mut State) {
    let Some(k) = kind_under_cursor(state) else {
        return;
    };
    let kind = k.summary.kind.clone();
    match &k.preview {
        Ok(_) => state.overlay = Some(Overlay::Confirm(Question::TurnOnCorrection(kind))),
        Err(why) => {
            let why = format!("No correction of {kind} to put in force: {why}");
            state.tell(why);
        }
    }
}

fn ask_turn_off(state: &mut State) {
    let Some(k) = kind_under_cursor(state) else {
        return;
    };
    let kind = k.summary.kind.clone();
    if k.in_force.is_some() {
        state.overlay = Some(Overlay::Confirm(Question::TurnOffCorrection(kind)));
    } else {
        state.tell(format!("No correction of {kind} is in force here."));
    }
}

/// The effect of putting the offered correction of `kind` in force, once confirmed.
pub fn turn_on(state: &mut State, kind: &str) -> Vec<Effect> {
    let by = match signer(state) {
        Ok(by) => by,
        Err(reason) => {
            state.warn(reason);
            return Vec::new();
        }
    };
    match state
        .batches
        .compare
        .as_ref()
        .and_then(|v| v.kind(kind))
        .map(|k| k.preview.clone())
    {
        Some(Ok(correction)) => vec![Effect::TurnOnCorrection { correction, by }],
        _ => Vec::new(),
    }
}

/// The effect of taking the correction of `kind` out of force, once confirmed.
pub fn turn_off(state: &mut State, kind: &str) -> Vec<Effect> {
    let by = match signer(state) {
        Ok(by) => by,
        Err(reason) => {
            state.warn(reason);
            return Vec::new();
        }
    };
    let scope = state
        .batches
        .compare
        .as_ref()
        .and_then(|v| v.request.scope.clone());
    match scope {
        Some(scope) => vec![Effect::TurnOffCorrection {
            kind: kind.to_string(),
            scope,
            by,
        }],
        None => Vec::new(),
    }
}

/// Starts the log again from the newest batch for the current filters.
/// Reads the log again: the list from the top, the batch open in the detail (if
/// any), and where the log stands with the hub.
pub fn refresh(state: &mut State) -> Vec<Effect> {
    let mut effects = if state.batches.loading {
        Vec::new()
    } else {
        reload(state)
    };
    if let Some(detail) = &state.batches.detail {
        effects.push(Effect::LoadBatchDetail(detail.row.code.clone()));
    }
    effects.push(Effect::LoadSyncState);
    effects
}

/// Reads the list again from its newest row.
pub fn reload(state: &mut State) -> Vec<Effect> {
    state.batches.rows.clear();
    state.batches.cursor = 0;
    state.batches.more = false;
    state.batches.loading = true;
    let mut query = state.batches.query.clone();
    query.before = None;
    vec![Effect::LoadBatches(query)]
}

fn prefetch(state: &mut State) -> Vec<Effect> {
    let b = &mut state.batches;
    if !b.more || b.loading || b.cursor + PREFETCH_ROWS < b.rows.len() {
        return Vec::new();
    }
    let Some(cursor) = b.rows.last().and_then(|last| last.cursor.clone()) else {
        return Vec::new();
    };
    let mut query = b.query.clone();
    query.before = Some(cursor);
    b.loading = true;
    vec![Effect::LoadBatches(query)]
}

/// Takes in a page of the log; pages for an older query are dropped.
pub fn page_arrived(state: &mut State, page: BatchPage) {
    let b = &mut state.batches;
    let mut asked = page.query.clone();
    asked.before = None;
    if asked != b.query {
        return;
    }
    b.loading = false;
    if page.query.before.is_none() {
        b.rows = page.rows;
        b.cursor = 0;
    } else {
        b.rows.extend(page.rows);
    }
    b.more = page.more;
}

/// Accepts a batch prompt; `Err` keeps the prompt open with the reason.
pub fn accept(
    state: &mut State,
    purpose: &PromptPurpose,
    text: &str,
) -> Result<Vec<Effect>, String> {
    let text = text.trim();
    match purpose {
        PromptPurpose::BatchSearch => {
            state.batches.query.text = text.to_string();
            Ok(reload(state))
        }
        PromptPurpose::ExportBatches => {
            if text.is_empty() {
                return Err("type the path of the new file, like batches.csv".into());
            }
            Ok(vec![Effect::ExportBatches {
                query: state.batches.query.clone(),
                path: text.into(),
            }])
        }
        PromptPurpose::BatchSince => {
            if text.is_empty() {
                state.batches.query.since = None;
            } else {
                parse_date_bound(text, DayEnd::Start)?;
                state.batches.query.since = Some(text.to_string());
            }
            Ok(reload(state))
        }
        PromptPurpose::BatchNote(code) => {
            if text.is_empty() {
                return Err("type the note, or Esc to back out".into());
            }
            Ok(vec![Effect::AddNote {
                code: code.clone(),
                text: text.to_string(),
                by: signer(state)?,
                reason: None,
            }])
        }
        _ => Ok(Vec::new()),
    }
}

/// The effect of finalising a batch, once confirmed.
pub fn finalize(state: &mut State, code: String) -> Vec<Effect> {
    match signer(state) {
        Ok(by) => vec![Effect::Finalize { code, by }],
        Err(reason) => {
            state.warn(reason);
            Vec::new()
        }
    }
}

//! Workspace benchmarks (criterion):
//! - from a key press to a finished frame at 120x40 with the recipe screen open
//!   (the key moves a line, so the recipe changes and is analysed again);
//! - the first frame after start on a database holding 1,000,000 batches
//!   (open, migrate check, settings, own items, the first recipe, one frame);
//! - the batch log's first page and a page-down deep in it, on the same database.
//!
//! The million-batch database is built once (through the store's JSON-lines
//! import) under target/gelu-bench/ and reused by later runs.

use std::collections::VecDeque;
use std::io::{BufReader, Read};
use std::path::{Path, PathBuf};
use std::time::Duration;

use criterion::{Criterion, criterion_group, criterion_main};
use gelu::analysis::Options;
use gelu::batch::jsonl::batch_json;
use gelu::batch::plan::{Plan, plan_batch};
use gelu::catalog::Catalog;
use gelu::recipe_file::parse_recipe;
use gelu::samples::SAMPLE_RECIPES;
use gelu::store::Store;
use gelu::tui::Launch;
use gelu::tui::app::drain;
use gelu::tui::effects::Services;
use gelu::tui::keymap::action_for;
use gelu::tui::state::{RecipeSource, State};
use gelu::tui::{Action, Command, update, view};
use ratatui::Terminal;
use ratatui::backend::TestBackend;
use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyModifiers};

const BATCHES: usize = 1_000_000;

fn terminal(width: u16, height: u16) -> Terminal<TestBackend> {
    match Terminal::new(TestBackend::new(width, height)) {
        Ok(t) => t,
        Err(e) => panic!("test terminal: {e}"),
    }
}

fn sample_state() -> State {
    let mut state = State::new(true);
    let (file, text) = SAMPLE_RECIPES
        .iter()
        .find(|(f, _)| f.contains("vanilla"))
        .copied()
        .unwrap_or(SAMPLE_RECIPES[0]);
    let recipe = match parse_recipe(Path::new(file), text) {
        Ok(r) => r,
        Err(e) => panic!("sample {file}: {e}"),
    };
    update(
        &mut state,
        Action::RecipeLoaded {
            recipe,
            source: RecipeSource::New,
        },
    );
    state
}

fn key_to_frame(c: &mut Criterion) {
    let mut state = sample_state();
    let mut term = terminal(120, 40);
    let keys = [
        KeyEvent::new(KeyCode::Char('J'), KeyModifiers::SHIFT),
        KeyEvent::new(KeyCode::Char('K'), KeyModifiers::SHIFT),
    ];
    let mut k = 0usize;
    c.bench_function("key_to_frame_recipe_120x40", |b| {
        b.iter(|| {
            k += 1;
            if let Some(action) = action_for(state.context(), keys[k % 2]) {
                let effects = update(&mut state, action);
                assert!(effects.is_empty());
            }
            if let Err(e) = term.draw(|f| view(&state, f)) {
                panic!("draw: {e}");
            }
        })
    });
    let mut state = sample_state();
    update(&mut state, Action::Command(Command::EditAmount));
    let mut typed = 0usize;
    c.bench_function("typed_digit_to_frame_120x40", |b| {
        b.iter(|| {
            typed += 1;
            let key = if typed.is_multiple_of(2) {
                KeyEvent::new(KeyCode::Backspace, KeyModifiers::NONE)
            } else {
                KeyEvent::new(KeyCode::Char('5'), KeyModifiers::NONE)
            };
            if let Some(action) = action_for(state.context(), key) {
                update(&mut state, action);
            }
            if let Err(e) = term.draw(|f| view(&state, f)) {
                panic!("draw: {e}");
            }
        })
    });
}

/// Generates JSON lines of `count` batches copied from one template, each with
/// its own code and time (90 s apart, newest last).
struct Lines {
    template: serde_json::Value,
    next: usize,
    count: usize,
    buf: Vec<u8>,
    at: usize,
}

impl Read for Lines {
    fn read(&mut self, out: &mut [u8]) -> std::io::Result<usize> {
        if self.at == self.buf.len() {
            if self.next == self.count {
                return Ok(0);
            }
            let t = chrono::DateTime::from_timestamp(1_700_000_000 + 90 * self.next as i64, 0)
                .unwrap_or_default();
            let mut v = self.template.clone();
            v["code"] = format!("B-{}-{:05}", t.format("%Y%m%d"), self.next % 100_000).into();
            v["made_at"] = t.format("%Y-%m-%dT%H:%M:%S%.3fZ").to_string().into();
            v["notes"] = serde_json::json!([{
                "text": format!("bench batch {} at the harbour kitchen", self.next),
                "written_at": t.format("%Y-%m-%dT%H:%M:%S%.3fZ").to_string(),
                "by": "RW"
            }]);
            self.buf = serde_json::to_vec(&v).unwrap_or_default();
            self.buf.push(b'\n');
            self.at = 0;
            self.next += 1;
        }
        let n = out.len().min(self.buf.len() - self.at);
        out[..n].copy_from_slice(&self.buf[self.at..self.at + n]);
        self.at += n;
        Ok(n)
    }
}

/// The million-batch database, built on first use.
fn million_db() -> PathBuf {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target/gelu-bench");
    let db = dir.join("million.db");
    let done = dir.join("million.done");
    if done.exists() && db.exists() {
        return db;
    }
    let _ = std::fs::remove_dir_all(&dir);
    if let Err(e) = std::fs::create_dir_all(&dir) {
        panic!("{}: {e}", dir.display());
    }
    let mut store = match Store::open(&db) {
        Ok(s) => s,
        Err(e) => panic!("open {}: {e}", db.display()),
    };
    let (file, text) = SAMPLE_RECIPES[0];
    let recipe = match parse_recipe(Path::new(file), text) {
        Ok(r) => r,
        Err(e) => panic!("{e}"),
    };
    let planned = plan_batch(
        &Plan {
            recipe: &recipe,
            recipe_text: text,
            size: gelu::model::Amount::Grams(5000.0),
            operator: "RW",
            lots: &[],
            note: None,
            made_at: gelu::clock::now(),
        },
        Catalog::builtin(),
        &Options::default(),
    );
    let first = match planned
        .map_err(gelu::store::StoreError::from)
        .and_then(|p| store.new_batch(&p))
    {
        Ok(b) => b,
        Err(e) => panic!("template batch: {e}"),
    };
    let mut template = batch_json(&first);
    // Keep the rows small: a short prediction instead of the whole curve.
    template["prediction"] = serde_json::json!({
        "freezing_point_c": -2.7, "serving_temp_c": -11.0, "mass_g": 5000.0
    });
    let lines = Lines {
        template,
        next: 0,
        count: BATCHES - 1,
        buf: Vec::new(),
        at: 0,
    };
    let started = std::time::Instant::now();
    match store.import_jsonl(&mut BufReader::new(lines)) {
        Ok(report) => {
            assert!(
                report.errors.is_empty(),
                "import refused lines: {:?}",
                &report.errors[..report.errors.len().min(3)]
            );
            eprintln!(
                "built {} with {} batches in {:.0} s",
                db.display(),
                report.imported + 1,
                started.elapsed().as_secs_f64()
            );
        }
        Err(e) => panic!("import: {e}"),
    }
    if let Err(e) = std::fs::write(&done, "1") {
        panic!("{e}");
    }
    db
}

fn start(db: &Path) -> (State, Services) {
    let launch = Launch {
        db: Some(db.to_path_buf()),
        file: None,
    };
    let mut services = match Services::open(&launch) {
        Ok(s) => s,
        Err(e) => panic!("{e:#}"),
    };
    let mut state = State::new(true);
    let startup = match services.startup(&launch) {
        Ok(a) => a,
        Err(e) => panic!("{e:#}"),
    };
    let mut queue: VecDeque<Action> = startup.into();
    drain(&mut state, &mut services, &mut queue);
    (state, services)
}

fn million(c: &mut Criterion) {
    let db = million_db();
    let mut group = c.benchmark_group("million_batches");
    group.sample_size(20);
    group.measurement_time(Duration::from_secs(10));
    group.bench_function("first_frame_after_start_120x40", |b| {
        b.iter(|| {
            let (state, services) = start(&db);
            let mut term = terminal(120, 40);
            if let Err(e) = term.draw(|f| view(&state, f)) {
                panic!("{e}");
            }
            drop(services);
        })
    });
    let (mut state, mut services) = start(&db);
    let mut term = terminal(120, 40);
    group.bench_function("open_batch_log_first_page", |b| {
        b.iter(|| {
            state.batches.rows.clear();
            state.screen = gelu::tui::state::Screen::Recipe;
            let mut queue = VecDeque::from([Action::Command(Command::ShowBatches)]);
            drain(&mut state, &mut services, &mut queue);
            if let Err(e) = term.draw(|f| view(&state, f)) {
                panic!("{e}");
            }
        })
    });
    // Deep in the log: keep paging down; every 20 keys a keyset page is fetched.
    group.bench_function("page_down_deep_in_the_log", |b| {
        b.iter(|| {
            let mut queue = VecDeque::from([Action::Command(Command::PageDown)]);
            drain(&mut state, &mut services, &mut queue);
            if let Err(e) = term.draw(|f| view(&state, f)) {
                panic!("{e}");
            }
        })
    });
    eprintln!("rows loaded after paging: {}", state.batches.rows.len());
    group.finish();
}

criterion_group!(benches, key_to_frame, million);
criterion_main!(benches);

//! The workspace's effects against a real temporary database and real files:
//! settings and own ingredients persist, recipes save as versions and load
//! back, a file is saved keeping its comments, and a batch goes through its
//! whole life (record, list, note, measurement, sign-off, amendment).

use gelu::model::TempUnit;
use std::collections::VecDeque;

use crate::common::{cmd, type_text};
use gelu::tui::Launch;
use gelu::tui::app::drain;
use gelu::tui::effects::Services;
use gelu::tui::state::{Overlay, RecipeSource, Screen};
use gelu::tui::{Action, Command, State};

fn open(db: &std::path::Path, file: Option<std::path::PathBuf>) -> (State, Services) {
    let launch = Launch {
        db: Some(db.to_path_buf()),
        file,
    };
    let mut services = match Services::open(&launch) {
        Ok(s) => s,
        Err(e) => panic!("{e:#}"),
    };
    let mut state = State::new(false);
    let actions = match services.startup(&launch) {
        Ok(a) => a,
        Err(e) => panic!("{e:#}"),
    };
    let mut queue: VecDeque<Action> = actions.into();
    assert!(!drain(&mut state, &mut services, &mut queue));
    (state, services)
}

/// Runs a command and carries out whatever it asks for.
fn run(state: &mut State, services: &mut Services, command: Command) {
    let mut queue = VecDeque::from([Action::Command(command)]);
    assert!(
        !drain(state, services, &mut queue),
        "nothing here should quit"
    );
}

fn tempdir() -> tempfile::TempDir {
    match tempfile::tempdir() {
        Ok(d) => d,
        Err(e) => panic!("{e}"),
    }
}

#[test]
fn a_new_database_opens_on_a_seeded_recipe() {
    let dir = tempdir();
    let (state, _) = open(&dir.path().join("log.db"), None);
    assert!(matches!(
        state.recipe.source,
        RecipeSource::Database { version: 1, .. }
    ));
    assert!(!state.recipe.recipe.lines.is_empty());
    assert!(state.recipe.analysis.is_ok());
}

#[test]
fn an_upgraded_log_is_announced_on_the_message_line() {
    let dir = tempdir();
    let path = dir.path().join("log.db");
    let fixture = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/fixtures/batch-log-v1.db"
    );
    if let Err(e) = std::fs::copy(fixture, &path) {
        panic!("{e}");
    }
    let (state, _) = open(&path, None);
    let message = state.message.map(|m| (m.text, m.is_error));
    assert!(
        matches!(&message, Some((text, false)) if text.contains("upgraded from schema version 1")),
        "{message:?}"
    );
    let (state, _) = open(&path, None);
    assert!(
        state.message.is_none_or(|m| !m.text.contains("upgraded")),
        "said once, when it happened"
    );
}

#[test]
fn the_workspace_reopens_the_recipe_last_worked_on() {
    let dir = tempdir();
    let db = dir.path().join("log.db");
    {
        // A new log opens on the house vanilla.
        let (mut s, mut services) = open(&db, None);
        assert_eq!(s.recipe.recipe.name, "Harbour vanilla");
        run(&mut s, &mut services, Command::OpenRecipe);
        type_text(&mut s, "lemon sorbet");
        run(&mut s, &mut services, Command::Confirm);
        assert_eq!(s.recipe.recipe.name, "Quay lemon sorbet");
    }
    let (s, _) = open(&db, None);
    assert_eq!(
        s.recipe.recipe.name, "Quay lemon sorbet",
        "reopened after a restart"
    );
}

#[test]
fn settings_and_own_ingredients_survive_a_restart() {
    let dir = tempdir();
    let db = dir.path().join("log.db");
    {
        let (mut s, mut services) = open(&db, None);
        run(&mut s, &mut services, Command::ShowSettings);
        run(&mut s, &mut services, Command::Toggle);
        run(&mut s, &mut services, Command::Last);
        run(&mut s, &mut services, Command::Toggle);
        type_text(&mut s, "JT");
        run(&mut s, &mut services, Command::Confirm);
        run(&mut s, &mut services, Command::ShowIngredients);
        run(&mut s, &mut services, Command::NewSolute);
        for v in [
            "kelp-sugar",
            "Kelp sugar",
            "182.17",
            "1",
            "",
            "60",
            "own lab sheet",
        ] {
            cmd(&mut s, Command::ClearField);
            type_text(&mut s, v);
            cmd(&mut s, Command::NextField);
        }
        run(&mut s, &mut services, Command::Confirm);
        assert!(s.overlay.is_none(), "the solute form was accepted");
        assert!(
            s.message.as_ref().is_some_and(|m| !m.is_error),
            "{:?}",
            s.message
        );
    }
    let (s, _) = open(&db, None);
    assert_eq!(s.settings.temp_unit, TempUnit::Fahrenheit);
    assert_eq!(s.settings.operator, "JT");
    assert_eq!(s.own.solutes.len(), 1);
    assert!(s.catalog.solute("kelp-sugar").is_some());
}

#[test]
fn a_recipe_saves_as_versions_and_as_a_new_recipe() {
    let dir = tempdir();
    let (mut s, mut services) = open(&dir.path().join("log.db"), None);
    let name = s.recipe.recipe.name.clone();
    run(&mut s, &mut services, Command::DeleteLine);
    assert!(s.recipe.is_dirty());
    run(&mut s, &mut services, Command::Save);
    assert!(!s.recipe.is_dirty(), "{:?}", s.message);
    assert!(
        matches!(&s.recipe.source, RecipeSource::Database { name: n, version: 2, .. } if *n == name)
    );
    run(&mut s, &mut services, Command::SaveAsNew);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "Slipway trial");
    let mut queue = VecDeque::from([Action::Command(Command::Confirm)]);
    drain(&mut s, &mut services, &mut queue);
    assert!(
        matches!(&s.recipe.source, RecipeSource::Database { name, version: 1, .. } if name == "Slipway trial")
    );
    // The same name again is refused, and nothing is lost.
    run(&mut s, &mut services, Command::SaveAsNew);
    let mut queue = VecDeque::from([Action::Command(Command::Confirm)]);
    drain(&mut s, &mut services, &mut queue);
    assert!(
        s.message
            .as_ref()
            .is_some_and(|m| m.is_error && m.text.contains("already"))
    );
    // Open the first recipe again from the database.
    run(&mut s, &mut services, Command::OpenRecipe);
    assert!(matches!(s.overlay, Some(Overlay::Picker(_))));
    type_text(&mut s, &name);
    run(&mut s, &mut services, Command::Confirm);
    assert_eq!(s.recipe.recipe.name, name);
    assert!(matches!(
        &s.recipe.source,
        RecipeSource::Database { version: 2, .. }
    ));
}

#[test]
fn a_file_is_saved_back_with_its_comments() {
    let dir = tempdir();
    let file = dir.path().join("quay.toml");
    let text = "# Quay Kitchen trial, keep this comment\nname = \"Quay trial\"\nstyle = \"sorbet\"\n\n[[line]]\ningredient = \"water\"\ng = 600 # filtered\n\n[[line]]\ningredient = \"sucrose\"\ng = 250\n";
    if let Err(e) = std::fs::write(&file, text) {
        panic!("{e}");
    }
    let (mut s, mut services) = open(&dir.path().join("log.db"), Some(file.clone()));
    assert_eq!(s.recipe.recipe.name, "Quay trial");
    run(&mut s, &mut services, Command::EditAmount);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "650");
    run(&mut s, &mut services, Command::Confirm);
    run(&mut s, &mut services, Command::Save);
    assert!(!s.recipe.is_dirty(), "{:?}", s.message);
    let saved = std::fs::read_to_string(&file).unwrap_or_default();
    assert!(
        saved.contains("# Quay Kitchen trial, keep this comment"),
        "{saved}"
    );
    assert!(saved.contains("g = 650 # filtered"), "{saved}");
    // A missing file is an error before the workspace opens.
    let launch = Launch {
        db: Some(dir.path().join("log.db")),
        file: Some(dir.path().join("missing.toml")),
    };
    let started = Services::open(&launch).and_then(|mut sv| sv.startup(&launch));
    assert!(started.is_err());
}

#[test]
fn a_batch_goes_from_draft_to_amended() {
    let dir = tempdir();
    let (mut s, mut services) = open(&dir.path().join("log.db"), None);
    s.settings.operator = "RW".into();
    run(&mut s, &mut services, Command::StartBatch);
    for v in ["4 kg", "RW", "MILK-2231"] {
        cmd(&mut s, Command::ClearField);
        type_text(&mut s, v);
        cmd(&mut s, Command::NextField);
    }
    run(&mut s, &mut services, Command::Confirm);
    assert_eq!(s.screen, Screen::Batches);
    let Some(detail) = s.batches.detail.clone() else {
        panic!("the new batch opens: {:?}", s.message);
    };
    let code = detail.row.code.clone();
    assert_eq!(detail.lines[0].2, "MILK-2231");
    assert!((detail.row.size_g - 4000.0).abs() < 1e-6);
    assert!(
        s.batches.rows.iter().any(|r| r.code == code),
        "and is in the list"
    );
    // A note, a measurement, then sign-off.
    run(&mut s, &mut services, Command::AddNote);
    type_text(&mut s, "Drawn at the slipway freezer");
    run(&mut s, &mut services, Command::Confirm);
    run(&mut s, &mut services, Command::AddMeasurement);
    type_text(&mut s, "-2.6");
    if let Some(Overlay::Form(f)) = &mut s.overlay {
        f.focus = 0;
    }
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "freezing-point-c");
    run(&mut s, &mut services, Command::Confirm);
    run(&mut s, &mut services, Command::Finalize);
    run(&mut s, &mut services, Command::Yes);
    let Some(detail) = s.batches.detail.clone() else {
        panic!("detail stays open");
    };
    assert!(detail.row.finalized, "{:?}", s.message);
    assert_eq!(detail.notes.len(), 1);
    assert!(
        detail
            .comparisons
            .iter()
            .any(|c| c.measured == Some(-2.6) && c.predicted.is_some())
    );
    // Correct the lot by an amendment.
    run(&mut s, &mut services, Command::Amend);
    for v in ["Lot misread at weighing", "1", "MILK-2213"] {
        cmd(&mut s, Command::ClearField);
        type_text(&mut s, v);
        cmd(&mut s, Command::NextField);
    }
    run(&mut s, &mut services, Command::Confirm);
    let Some(detail) = s.batches.detail.clone() else {
        panic!("detail stays open");
    };
    assert_eq!(detail.row.status, "amended", "{:?}", s.message);
    assert_eq!(detail.lines[0].2, "MILK-2213");
    // Search finds it by the note's words; a date in the future finds nothing.
    run(&mut s, &mut services, Command::Cancel);
    run(&mut s, &mut services, Command::Search);
    type_text(&mut s, "slipway");
    run(&mut s, &mut services, Command::Confirm);
    assert_eq!(s.batches.rows.len(), 1);
    run(&mut s, &mut services, Command::FilterDate);
    type_text(&mut s, "2999-01-01");
    run(&mut s, &mut services, Command::Confirm);
    assert!(s.batches.rows.is_empty());
}

#[test]
fn a_recipe_the_reader_would_refuse_is_never_saved() {
    let dir = tempdir();
    let (state, mut services) = open(&dir.path().join("log.db"), None);
    let mut recipe = state.recipe.recipe.clone();
    recipe.name = "Not a number".into();
    recipe.solutes.push(gelu::model::Solute {
        id: "house-polyol".into(),
        name: "House polyol".into(),
        kind: gelu::model::SoluteKind::Other,
        molar_mass_g_mol: 182.17,
        dissociation: 1.0,
        model: gelu::thermo::binary::WaterModel::Ideal { norrish_k: 0.0 },
        sweetness: Some(f64::NAN),
        solubility_g_per_100g_water_0c: None,
        source: "test".into(),
    });
    let actions = services.perform(gelu::tui::Effect::SaveNewRecipe(recipe.clone()));
    assert!(
        matches!(&actions[..], [Action::Failed(m)] if m.contains("sweetness")),
        "{actions:?}"
    );
    let listed = services.perform(gelu::tui::Effect::ListRecipes);
    let [Action::RecipeList(entries)] = &listed[..] else {
        panic!("{listed:?}");
    };
    assert!(
        entries.iter().all(|e| e.name != "Not a number"),
        "{entries:?}"
    );
    let file = dir.path().join("nan.toml");
    let actions = services.perform(gelu::tui::Effect::SaveFile {
        path: file.clone(),
        original: None,
        recipe,
    });
    assert!(matches!(&actions[..], [Action::Failed(_)]), "{actions:?}");
    assert!(
        !file.exists(),
        "nothing is written that would not read back"
    );
}

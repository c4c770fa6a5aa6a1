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
fn prices_and_a_balanced_recipes_targets_survive_a_restart() {
    let dir = tempdir();
    let db = dir.path().join("log.db");
    let (name, targets) = {
        let (mut s, mut services) = open(&db, None);
        run(&mut s, &mut services, Command::OpenBalance);
        assert!(s.recipe.balance.is_some());
        // An invented wholesale price for the first line's ingredient.
        run(&mut s, &mut services, Command::SetPrice);
        cmd(&mut s, Command::ClearField);
        type_text(&mut s, "0.95");
        run(&mut s, &mut services, Command::Confirm);
        let targets = s
            .recipe
            .balance
            .as_ref()
            .map(|p| p.request.targets.clone())
            .unwrap_or_default();
        run(&mut s, &mut services, Command::AcceptBalance);
        assert!(s.recipe.balance.is_none(), "{:?}", s.message);
        run(&mut s, &mut services, Command::Save);
        assert!(!s.recipe.is_dirty(), "{:?}", s.message);
        (s.recipe.recipe.name.clone(), targets)
    };
    let (s, _) = open(&db, None);
    assert_eq!(s.recipe.recipe.name, name);
    let first = &s.recipe.recipe.lines[0].ingredient;
    assert_eq!(s.settings.prices_per_kg.get(first), Some(&0.95));
    assert!(!targets.is_empty());
    assert_eq!(
        s.recipe.recipe.balance.targets, targets,
        "the version in the log keeps the targets"
    );
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
    // What was measured is picked from the list, then its value typed.
    run(&mut s, &mut services, Command::AddMeasurement);
    type_text(&mut s, "freezing point c");
    run(&mut s, &mut services, Command::Confirm);
    type_text(&mut s, "-2.6");
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
fn a_file_leaning_on_an_own_item_opens_and_saves_carrying_it() {
    use gelu::model::{Category, Ingredient};
    let dir = tempdir();
    let db = dir.path().join("log.db");
    // The Quay Kitchen's own syrup, kept in the log (demo numbers).
    let syrup = Ingredient {
        id: "quay-fig-syrup".into(),
        name: "Quay fig syrup".into(),
        category: Category::Sugar,
        water_pct: 35.0,
        fat_pct: 0.0,
        protein_pct: 0.0,
        other_solids_pct: 0.0,
        solutes_pct: [
            ("glucose".to_string(), 33.0),
            ("fructose".to_string(), 32.0),
        ]
        .into(),
        density_g_ml: 1.3,
        allergens: Vec::new(),
        source: "demo: the Quay Kitchen's own sheet".into(),
    };
    {
        let mut store = match gelu::store::Store::open(&db) {
            Ok(s) => s,
            Err(e) => panic!("{e}"),
        };
        let item = gelu::store::CustomItem {
            id: syrup.id.clone(),
            name: syrup.name.clone(),
            definition: gelu::recipe_file::own_item_definition(
                &syrup.name,
                &[],
                std::slice::from_ref(&syrup),
            ),
        };
        if let Err(e) = store.save_custom_ingredient(&item) {
            panic!("{e}");
        }
    }
    let file = dir.path().join("fig.toml");
    let text = "# Quay fig sorbet, keep this comment\nname = \"Quay fig sorbet\"\nstyle = \"sorbet\"\n\n[[line]]\ningredient = \"water\"\ng = 600\n\n[[line]]\ningredient = \"quay-fig-syrup\"\ng = 300 # from the cellar\n";
    if let Err(e) = std::fs::write(&file, text) {
        panic!("{e}");
    }
    let (mut s, mut services) = open(&db, Some(file.clone()));
    assert_eq!(s.recipe.recipe.name, "Quay fig sorbet", "{:?}", s.message);
    assert_eq!(s.recipe.recipe.ingredients, vec![syrup.clone()]);
    assert!(s.recipe.analysis.is_ok());
    // A change, then save: the file now carries the syrup and keeps its words.
    run(&mut s, &mut services, Command::EditAmount);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "620");
    run(&mut s, &mut services, Command::Confirm);
    run(&mut s, &mut services, Command::Save);
    let saved = std::fs::read_to_string(&file).unwrap_or_default();
    assert!(
        saved.contains("# Quay fig sorbet, keep this comment"),
        "{saved}"
    );
    assert!(saved.contains("g = 300 # from the cellar"), "{saved}");
    let alone = gelu::recipe_file::parse_recipe(&file, &saved);
    assert!(
        alone.is_ok_and(|r| r.ingredients == vec![syrup.clone()]),
        "the file reads without the log:\n{saved}"
    );
    // Opened again as it was and recorded as a batch: the record reads alone too.
    if let Err(e) = std::fs::write(&file, text) {
        panic!("{e}");
    }
    let (mut s, mut services) = open(&db, Some(file.clone()));
    s.settings.operator = "QK".into();
    run(&mut s, &mut services, Command::StartBatch);
    run(&mut s, &mut services, Command::Confirm);
    let Some(detail) = s.batches.detail.clone() else {
        panic!("the batch was recorded: {:?}", s.message);
    };
    let store = match gelu::store::Store::open(&db) {
        Ok(st) => st,
        Err(e) => panic!("{e}"),
    };
    let recorded = match store.batch(&detail.row.code) {
        Ok(Some(b)) => b.recipe.text,
        other => panic!("{other:?}"),
    };
    let alone = gelu::recipe_file::parse_recipe(&file, &recorded);
    assert!(
        alone.is_ok_and(|r| r.ingredients == vec![syrup]),
        "{recorded}"
    );
}

/// `count` batches of the sample recipe whose file name holds `sample`, each
/// with a freezing point read `offset_k` warmer than predicted, in the log `db`.
fn measured_batches(db: &std::path::Path, sample: &str, count: usize, offset_k: f64) {
    use gelu::batch::MeasurementKind;
    use gelu::batch::plan::{Plan, plan_batch};
    let mut store = match gelu::store::Store::open(db) {
        Ok(s) => s,
        Err(e) => panic!("{e}"),
    };
    let Some((name, text)) = gelu::samples::SAMPLE_RECIPES
        .iter()
        .find(|(n, _)| n.contains(sample))
    else {
        panic!("the {sample} sample");
    };
    let recipe = match gelu::recipe_file::parse_recipe(std::path::Path::new(name), text) {
        Ok(r) => r,
        Err(e) => panic!("{e}"),
    };
    for _ in 0..count {
        let new = plan_batch(
            &Plan {
                recipe: &recipe,
                recipe_text: text,
                size: gelu::model::Amount::Grams(5000.0),
                operator: "RW",
                lots: &[],
                note: None,
                made_at: gelu::clock::now(),
            },
            gelu::catalog::Catalog::builtin(),
            &gelu::analysis::Options::default(),
        );
        let b = match new.map(|n| store.new_batch(&n)) {
            Ok(Ok(b)) => b,
            other => panic!("{other:?}"),
        };
        let p = b.prediction["freezing_point_c"]
            .as_f64()
            .unwrap_or(f64::NAN);
        if let Err(e) = store.add_measurements(
            &b.code,
            &[(MeasurementKind::FreezingPointC, p + offset_k)],
            "RW",
            None,
        ) {
            panic!("{e}");
        }
    }
}

#[test]
fn a_correction_with_nothing_to_fit_says_which_batches_it_looked_at() {
    // Gelato batches measured, the editor on the house vanilla (an ice cream): a
    // correction here would be for ice creams, and there are none.
    let dir = tempdir();
    let db = dir.path().join("log.db");
    measured_batches(&db, "pier-gelato", 2, 0.1);
    let (mut s, mut services) = open(&db, None);
    assert_eq!(s.recipe.recipe.style.as_str(), "ice-cream");
    run(&mut s, &mut services, Command::ShowBatches);
    run(&mut s, &mut services, Command::CompareBatches);
    let Some(view) = s.batches.compare.clone() else {
        panic!("the compare view opens: {:?}", s.message);
    };
    let fp = view
        .kinds
        .iter()
        .find(|k| k.summary.kind == "freezing-point-c");
    let said = fp.map(|k| format!("{:?}", k.preview)).unwrap_or_default();
    assert!(fp.is_some_and(|k| k.summary.n == 2), "{said}");
    assert!(said.contains("no batch of style ice-cream"), "{said}");
}

#[test]
fn the_measurement_loop_runs_against_the_log() {
    use gelu::batch::MeasurementKind;
    let dir = tempdir();
    let db = dir.path().join("log.db");
    // Six vanilla batches whose freezing point read 0.2 K warmer than predicted.
    measured_batches(&db, "vanilla", 6, 0.2);
    let (mut s, mut services) = open(&db, None);
    s.settings.operator = "RW".into();
    // An ingredient characterised in the form is saved into the log.
    run(&mut s, &mut services, Command::ShowIngredients);
    run(&mut s, &mut services, Command::CharacteriseIngredient);
    for v in [
        "slipway-dextrose",
        "Slipway dextrose",
        "10:90:-1.17 20:80:-2.70",
        "100",
        "1",
    ] {
        cmd(&mut s, Command::ClearField);
        type_text(&mut s, v);
        cmd(&mut s, Command::NextField);
    }
    run(&mut s, &mut services, Command::Confirm);
    assert!(s.overlay.is_none(), "{:?}", s.message);
    // The compare view of the vanilla batches, then its correction put in force.
    run(&mut s, &mut services, Command::ShowBatches);
    run(&mut s, &mut services, Command::CompareBatches);
    let Some(view) = s.batches.compare.clone() else {
        panic!("the compare view opens: {:?}", s.message);
    };
    let at = view
        .kinds
        .iter()
        .position(|k| k.summary.kind == "freezing-point-c")
        .unwrap_or(usize::MAX);
    assert_eq!(view.kinds[at].summary.n, 6);
    assert!((view.kinds[at].summary.bias - 0.2).abs() < 1e-9);
    for _ in 0..at {
        cmd(&mut s, Command::Down);
    }
    run(&mut s, &mut services, Command::Calibrate);
    run(&mut s, &mut services, Command::Yes);
    let Some(view) = s.batches.compare.clone() else {
        panic!("the compare view stays open");
    };
    let k = &view.kinds[at];
    assert!(k.in_force.is_some(), "{:?}", s.message);
    assert!(
        k.corrected
            .is_some_and(|c| c.corrected == 6 && c.bias.abs() < 0.2)
    );
    run(&mut s, &mut services, Command::Cancel);
    // A batch's detail shows the calibrated figure beside the plain one.
    run(&mut s, &mut services, Command::OpenDetail);
    let Some(detail) = s.batches.detail.clone() else {
        panic!("detail");
    };
    let fp = detail
        .comparisons
        .iter()
        .find(|c| c.kind == MeasurementKind::FreezingPointC);
    assert!(
        fp.is_some_and(|c| c.predicted.is_some()
            && c.calibrated
                .as_ref()
                .is_some_and(|k| k.basis.contains("from 6 batches"))),
        "{fp:?}"
    );
    // After a restart the own ingredient is there.
    drop(services);
    let (s, _) = open(&db, None);
    assert!(s.own.ingredient("slipway-dextrose").is_some());
}

#[test]
fn syncing_without_a_hub_says_how_to_set_one_and_the_site_can_be_renamed_before_a_batch() {
    let dir = tempdir();
    let db = dir.path().join("log.db");
    let (mut s, mut services) = open(&db, None);
    run(&mut s, &mut services, Command::ShowBatches);
    assert!(!s.batches.sync.site.is_empty(), "the log has a site code");
    assert!(!s.batches.sync.hub_set);
    // (This test assumes GELU_SYNC_URL is not set where the tests run.)
    run(&mut s, &mut services, Command::SyncNow);
    assert!(!s.batches.sync.running, "the sync is over");
    let said = s
        .message
        .as_ref()
        .map(|m| m.text.clone())
        .unwrap_or_default();
    assert!(said.contains("No hub is set"), "{said}");
    let mut queue = VecDeque::from([Action::Command(Command::ShowSettings)]);
    drain(&mut s, &mut services, &mut queue);
    let mut queue: VecDeque<Action> = services
        .perform(gelu::tui::Effect::RenameSite("QAY".into()))
        .into();
    drain(&mut s, &mut services, &mut queue);
    assert_eq!(s.settings.site_code, "QAY");
    assert_eq!(s.batches.sync.site, "QAY");
}

#[test]
fn settings_stored_by_earlier_releases_keep_their_meaning() {
    // The keys a log already holds are a contract with the files users have: the
    // serving share is stored under `workspace.serving_target` since the first release.
    let dir = tempdir();
    let db = dir.path().join("log.db");
    {
        let mut store = match gelu::store::Store::open(&db) {
            Ok(s) => s,
            Err(e) => panic!("{e}"),
        };
        for (key, value) in [
            ("workspace.serving_target", "0.6"),
            ("workspace.cabinet_temp_c", "-11.5"),
            ("workspace.temp_unit", "f"),
        ] {
            if let Err(e) = store.set_setting(key, value) {
                panic!("{e}");
            }
        }
    }
    let (s, _) = open(&db, None);
    assert_eq!(s.settings.serving_frozen_fraction, 0.6);
    assert_eq!(s.settings.cabinet_temp_c, -11.5);
    assert_eq!(s.settings.temp_unit, TempUnit::Fahrenheit);
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

#[test]
fn the_basics_a_maker_reaches_for_new_copy_make_again_export() {
    let dir = tempdir();
    let db = dir.path().join("log.db");
    let (mut s, mut services) = open(&db, None);
    s.settings.operator = "RW".into();
    // Copy the recipe out to a new TOML file; a second copy never overwrites it.
    let copy = dir.path().join("vanilla-copy.toml");
    run(&mut s, &mut services, Command::CopyToFile);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, &copy.display().to_string());
    run(&mut s, &mut services, Command::Confirm);
    let text = std::fs::read_to_string(&copy).unwrap_or_default();
    let back = gelu::recipe_file::parse_recipe(&copy, &text);
    assert!(
        back.is_ok_and(|r| r.lines == s.recipe.recipe.lines),
        "{text}"
    );
    run(&mut s, &mut services, Command::CopyToFile);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, &copy.display().to_string());
    run(&mut s, &mut services, Command::Confirm);
    assert_eq!(std::fs::read_to_string(&copy).unwrap_or_default(), text);
    assert!(
        s.message
            .as_ref()
            .is_some_and(|m| m.text.contains("unchanged")
                || m.text.contains("exists")
                || m.text.contains("appeared")),
        "{:?}",
        s.message
    );
    // Two batches of it.
    for size in ["3 kg", "4 kg"] {
        cmd(&mut s, Command::ShowRecipe);
        run(&mut s, &mut services, Command::StartBatch);
        cmd(&mut s, Command::ClearField);
        type_text(&mut s, size);
        run(&mut s, &mut services, Command::Confirm);
    }
    let Some(detail) = s.batches.detail.clone() else {
        panic!("the batch opens: {:?}", s.message);
    };
    // Make it again: the batch's recipe version opens in the editor.
    let version = detail.row.version;
    run(&mut s, &mut services, Command::MakeAgain);
    assert_eq!(s.screen, Screen::Recipe, "the recipe opens in the editor");
    assert!(
        matches!(&s.recipe.source, RecipeSource::Database { version: v, .. } if *v == version),
        "{:?}",
        s.recipe.source
    );
    assert_eq!(s.recipe.recipe.name, detail.row.recipe_name);
    assert!(
        s.message.as_ref().is_some_and(|m| m
            .text
            .contains(&format!("as batch {} was made", detail.row.code))),
        "{:?}",
        s.message
    );
    // Export the batches shown: CSV and JSON Lines, never over a file.
    run(&mut s, &mut services, Command::ShowBatches);
    cmd(&mut s, Command::Cancel);
    for (file, lines) in [("shown.jsonl", 2usize), ("shown.csv", 0)] {
        let path = dir.path().join(file);
        run(&mut s, &mut services, Command::ExportBatches);
        cmd(&mut s, Command::ClearField);
        type_text(&mut s, &path.display().to_string());
        run(&mut s, &mut services, Command::Confirm);
        let out = std::fs::read_to_string(&path).unwrap_or_default();
        assert!(!out.is_empty(), "{:?} {:?}", s.message, s.overlay.is_some());
        if lines > 0 {
            assert_eq!(out.lines().count(), lines, "{out}");
        } else {
            assert!(out.starts_with("code,"), "{out}");
            assert!(out.contains(&detail.row.code), "{out}");
        }
        assert!(
            s.message
                .as_ref()
                .is_some_and(|m| m.text.contains("2 batch(es) exported")),
            "{:?}",
            s.message
        );
    }
    // A blank recipe of a style, picked from the list.
    cmd(&mut s, Command::ShowRecipe);
    run(&mut s, &mut services, Command::NewRecipe);
    type_text(&mut s, "liqueur");
    run(&mut s, &mut services, Command::Confirm);
    assert_eq!(s.recipe.recipe.style, gelu::model::Style::Liqueur);
    assert!(s.recipe.recipe.lines.is_empty());
    assert!(matches!(s.recipe.source, RecipeSource::New));
}

#[test]
fn a_slow_effect_is_announced_on_screen_before_it_runs_and_the_words_go_after() {
    let dir = tempdir();
    let (mut s, mut services) = open(&dir.path().join("log.db"), None);
    run(&mut s, &mut services, Command::ShowBatches);
    cmd(&mut s, Command::ExportBatches);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, &dir.path().join("all.csv").display().to_string());
    let mut shown: Vec<String> = Vec::new();
    let mut queue = VecDeque::from([Action::Command(Command::Confirm)]);
    let quit = gelu::tui::app::drain_showing(&mut s, &mut services, &mut queue, &mut |st| {
        shown.push(
            st.message
                .as_ref()
                .map(|m| m.text.clone())
                .unwrap_or_default(),
        );
    });
    assert!(!quit);
    assert_eq!(shown.len(), 1, "one frame before the export: {shown:?}");
    assert!(shown[0].contains("Exporting"), "{shown:?}");
    let after = s
        .message
        .as_ref()
        .map(|m| m.text.clone())
        .unwrap_or_default();
    assert!(after.contains("exported"), "{after}");
}

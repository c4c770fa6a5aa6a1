//! The user's own items from the batch log on the command line: `gelu report`
//! and `gelu batch new` use them given `--db` or the default log (read, never
//! created to read them), a file's own definition comes first, and a recorded
//! batch carries the items its recipe used, so it never depends on the log.

use std::path::Path;

use assert_cmd::Command;
use gelu::model::{Category, Ingredient, Solute, SoluteKind};
use gelu::recipe_file::own_item_definition;
use gelu::store::{CustomItem, Store};
use gelu::thermo::binary::WaterModel;
use serde_json::Value;

/// An own solute and the purée holding it, as the Tide Mill kitchen keeps them
/// (demo numbers).
fn quince() -> (Solute, Ingredient) {
    let solute = Solute {
        id: "tide-mill-quince-solids".into(),
        name: "Tide Mill quince solids".into(),
        kind: SoluteKind::Other,
        molar_mass_g_mol: 172.0,
        dissociation: 1.0,
        model: WaterModel::Ideal { norrish_k: 2.0 },
        sweetness: None,
        solubility_g_per_100g_water_0c: None,
        source: "demo: the Tide Mill kitchen's own reading".into(),
    };
    let ingredient = Ingredient {
        id: "tide-mill-quince".into(),
        name: "Tide Mill quince purée".into(),
        category: Category::Fruit,
        water_pct: 84.0,
        fat_pct: 0.0,
        protein_pct: 0.0,
        other_solids_pct: 2.0,
        solutes_pct: [(solute.id.clone(), 14.0)].into(),
        density_g_ml: 1.06,
        allergens: Vec::new(),
        source: "demo: the Tide Mill kitchen's own reading".into(),
    };
    (solute, ingredient)
}

/// A batch log at `db` holding the quince as the user's own ingredient.
fn log_with_quince(db: &Path) {
    let (solute, ingredient) = quince();
    let mut store = Store::open(db).unwrap();
    store
        .save_custom_ingredient(&CustomItem {
            id: ingredient.id.clone(),
            name: ingredient.name.clone(),
            definition: own_item_definition(&ingredient.name.clone(), &[solute], &[ingredient]),
        })
        .unwrap();
}

const SORBET: &str = "# The Tide Mill quince sorbet.\n\
name = \"Tide Mill quince sorbet\"\n\
style = \"sorbet\"\n\
\n\
[[line]]\n\
ingredient = \"tide-mill-quince\"\n\
g = 600   # from the autumn batch\n\
\n\
[[line]]\n\
ingredient = \"sucrose\"\n\
g = 220\n\
\n\
[[line]]\n\
ingredient = \"water\"\n\
g = 180\n";

fn gelu(home: &Path) -> Command {
    let mut cmd = Command::cargo_bin("gelu").expect("binary built");
    cmd.env_remove("GELU_DB")
        .env("XDG_DATA_HOME", home.join("data"))
        .env("HOME", home)
        .env("USER", "tester");
    cmd
}

/// `gelu report --json [--db DB] FILE`: the freezing point it reports.
fn report(home: &Path, db: Option<&Path>, file: &Path) -> f64 {
    let mut cmd = gelu(home);
    cmd.args(["report", "--json"]);
    if let Some(db) = db {
        cmd.arg("--db").arg(db);
    }
    freezing_point(&cmd.arg(file).output().unwrap())
}

fn freezing_point(out: &std::process::Output) -> f64 {
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: Value = serde_json::from_str(String::from_utf8_lossy(&out.stdout).trim()).unwrap();
    v["freezing_point_c"].as_f64().unwrap()
}

/// The sorbet with the quince written into the file itself: what the log's
/// items must give.
fn self_contained(dir: &Path) -> std::path::PathBuf {
    let (solute, ingredient) = quince();
    sorbet_holding(dir, "self-contained.toml", solute, ingredient)
}

/// The sorbet file `name` in `dir`, with these own items written in.
fn sorbet_holding(
    dir: &Path,
    name: &str,
    solute: Solute,
    ingredient: Ingredient,
) -> std::path::PathBuf {
    let path = dir.join(name);
    let text = format!(
        "{SORBET}{}",
        gelu::recipe_file::own_items_toml(&[solute], &[ingredient])
    );
    std::fs::write(&path, text).unwrap();
    path
}

#[test]
fn report_uses_the_logs_own_items_given_db_and_the_default_log() {
    let home = tempfile::tempdir().unwrap();
    let file = home.path().join("sorbet.toml");
    std::fs::write(&file, SORBET).unwrap();
    let expected = report(home.path(), None, &self_contained(home.path()));

    // Without a log, the ingredient is unknown, and no log is created to look.
    let out = gelu(home.path())
        .args(["report", "--json"])
        .arg(&file)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("tide-mill-quince"));
    assert!(
        !home.path().join("data").exists(),
        "reading own items must not create the default log"
    );

    // Given --db.
    let db = home.path().join("kitchen.db");
    log_with_quince(&db);
    assert!((report(home.path(), Some(&db), &file) - expected).abs() < 1e-9);

    // The default log, found where the platform keeps it, read as it is.
    let default = home.path().join("data").join("gelu").join("batches.db");
    std::fs::create_dir_all(default.parent().unwrap()).unwrap();
    log_with_quince(&default);
    let before = std::fs::read(&default).unwrap();
    assert!((report(home.path(), None, &file) - expected).abs() < 1e-9);
    assert_eq!(
        std::fs::read(&default).unwrap(),
        before,
        "read, not written"
    );
}

#[test]
fn a_files_own_definition_comes_before_the_logs() {
    let home = tempfile::tempdir().unwrap();
    let db = home.path().join("kitchen.db");
    log_with_quince(&db);
    // The file defines its own quince purée: half the solids, so it freezes warmer.
    let (solute, mut ingredient) = quince();
    ingredient.water_pct = 91.0;
    ingredient.solutes_pct = [(solute.id.clone(), 7.0)].into();
    let file = sorbet_holding(home.path(), "own.toml", solute, ingredient);
    let log = report(home.path(), None, &self_contained(home.path()));
    let own = report(home.path(), Some(&db), &file);
    assert!(
        own > log + 0.1,
        "the file's purée ({own}) against the log's ({log})"
    );
}

#[test]
fn a_batch_records_the_own_items_its_recipe_used() {
    let home = tempfile::tempdir().unwrap();
    let db = home.path().join("kitchen.db");
    log_with_quince(&db);
    let file = home.path().join("sorbet.toml");
    std::fs::write(&file, SORBET).unwrap();
    let out = gelu(home.path())
        .args(["batch", "new", "--size", "2kg", "--json", "--db"])
        .arg(&db)
        .arg(&file)
        .output()
        .unwrap();
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let b: Value = serde_json::from_str(String::from_utf8_lossy(&out.stdout).trim()).unwrap();
    let text = b["recipe_text"].as_str().unwrap();
    assert!(
        text.starts_with(SORBET),
        "the file's text comes first:\n{text}"
    );
    assert!(text.contains("id = \"tide-mill-quince\""), "{text}");
    assert!(text.contains("id = \"tide-mill-quince-solids\""), "{text}");
    // The recorded text reads on its own, with no log at all.
    let recorded = home.path().join("recorded.toml");
    std::fs::write(&recorded, text).unwrap();
    let alone = report(home.path(), None, &recorded);
    let predicted = b["prediction"]["freezing_point_c"].as_f64().unwrap();
    assert!(
        (alone - predicted).abs() < 0.001,
        "{alone} against {predicted}"
    );
}

#[test]
fn gelu_balance_uses_the_logs_own_items_and_writes_them_into_the_file() {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("log.db");
    log_with_quince(&db);
    let file = dir.path().join("quince.toml");
    std::fs::write(&file, SORBET).unwrap();
    // Without the log the quince is unknown, and the file cannot be balanced.
    gelu(dir.path())
        .args(["balance", "--target", "mass_g=2000"])
        .arg(&file)
        .assert()
        .code(1);
    // With it, the sorbet balances and the written file carries the quince itself.
    gelu(dir.path())
        .arg("--db")
        .arg(&db)
        .args(["balance", "--target", "mass_g=2000", "--write"])
        .arg(&file)
        .assert()
        .success();
    let written = std::fs::read_to_string(&file).unwrap();
    assert!(
        written.contains("# The Tide Mill quince sorbet."),
        "{written}"
    );
    assert!(written.contains("id = \"tide-mill-quince\""), "{written}");
    let report = gelu(dir.path())
        .args(["report", "--json"])
        .arg(&file)
        .output()
        .unwrap();
    assert!(report.status.success(), "the file no longer needs the log");
    let v: Value = serde_json::from_slice(&report.stdout).unwrap();
    assert!((v["mass_g"].as_f64().unwrap() - 2000.0).abs() < 2.0, "{v}");
}

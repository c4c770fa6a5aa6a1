//! `gelu report` as a user runs it: arguments, output and exit codes.

use assert_cmd::Command;

fn gelu() -> Command {
    let mut cmd = Command::cargo_bin("gelu").expect("binary built");
    // No batch log of the machine's user is read (its own items, settings and
    // corrections would change the figures): the log named here does not exist.
    cmd.env(
        "GELU_DB",
        std::path::Path::new(env!("CARGO_TARGET_TMPDIR")).join("no-such-log.db"),
    );
    cmd
}

const SAMPLES: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/sample-recipes");

fn sample_files() -> Vec<std::path::PathBuf> {
    let mut v: Vec<_> = std::fs::read_dir(SAMPLES)
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    v.sort();
    v
}

#[test]
fn every_sample_recipe_reports_as_json_in_file_order() {
    let files = sample_files();
    assert!(files.len() >= 8);
    let out = gelu()
        .arg("report")
        .arg("--json")
        .args(&files)
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    let text = String::from_utf8(out).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(lines.len(), files.len());
    for (line, file) in lines.iter().zip(&files) {
        let v: serde_json::Value = serde_json::from_str(line).unwrap();
        let expected_name = std::fs::read_to_string(file).unwrap();
        assert!(
            expected_name.contains(v["name"].as_str().unwrap()),
            "order of files kept"
        );
        for key in [
            "name",
            "mass_g",
            "composition_pct",
            "solutes_pct",
            "abv_pct",
            "sweetness",
            "freezing_point_c",
            "dilute_law_freezing_point_c",
            "serving_temp_c",
            "serving_target",
            "ice_curve",
            "at",
            "warnings",
        ] {
            assert!(v.get(key).is_some(), "missing key {key}");
        }
        for key in [
            "water",
            "fat",
            "protein",
            "msnf",
            "lactose",
            "sugars",
            "total_solids",
            "ethanol",
            "other_solids",
        ] {
            assert!(
                v["composition_pct"][key].is_number(),
                "composition_pct.{key}"
            );
        }
        // water + fat + protein + other solids + every solute = 100 %.
        let c = &v["composition_pct"];
        let solutes: f64 = v["solutes_pct"]
            .as_object()
            .unwrap()
            .values()
            .map(|x| x.as_f64().unwrap())
            .sum();
        let total = c["water"].as_f64().unwrap()
            + c["fat"].as_f64().unwrap()
            + c["protein"].as_f64().unwrap()
            + c["other_solids"].as_f64().unwrap()
            + solutes;
        assert!((total - 100.0).abs() < 0.01, "parts add up to {total}");
        let curve = v["ice_curve"].as_array().unwrap();
        assert_eq!(curve.len(), 81, "0 to -40 °C every 0.5 K");
        assert_eq!(curve[80]["temp_c"].as_f64().unwrap(), -40.0);
    }
}

#[test]
fn at_takes_celsius_and_fahrenheit() {
    let file = format!("{SAMPLES}/harbour-vanilla.toml");
    let out = gelu()
        .args([
            "report",
            "--json",
            "--at",
            "-18",
            "--at",
            "0F",
            "--at=-10C",
            &file,
        ])
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    let v: serde_json::Value = serde_json::from_slice(&out).unwrap();
    let at = v["at"].as_array().unwrap();
    assert_eq!(at.len(), 3);
    assert_eq!(at[0]["temp_c"].as_f64().unwrap(), -18.0);
    assert!(
        (at[1]["temp_c"].as_f64().unwrap() + 17.778).abs() < 0.001,
        "0 °F is -17.78 °C"
    );
    assert_eq!(at[2]["temp_c"].as_f64().unwrap(), -10.0);
    gelu()
        .args(["report", "--at", "warm", &file])
        .assert()
        .failure();
}

#[test]
fn serving_target_overrides_the_recipe() {
    let file = format!("{SAMPLES}/harbour-vanilla.toml");
    let get = |target: &str| {
        let out = gelu()
            .args(["report", "--json", "--serving-target", target, &file])
            .assert()
            .success()
            .get_output()
            .stdout
            .clone();
        let v: serde_json::Value = serde_json::from_slice(&out).unwrap();
        (
            v["serving_target"].as_f64().unwrap(),
            v["serving_temp_c"].as_f64().unwrap(),
        )
    };
    let (t60, s60) = get("0.6");
    let (t75, s75) = get("0.75");
    assert_eq!((t60, t75), (0.6, 0.75));
    assert!(s75 < s60, "more ice needs a colder cabinet");
    // A share reads as people mean it: 70 (or 70 %) is the fraction 0.70.
    assert_eq!(get("70").0, 0.70);
    assert_eq!(get("70 %").0, 0.70);
    for bad in ["170", "0", "1", "most"] {
        gelu()
            .args(["report", "--serving-target", bad, &file])
            .assert()
            .failure();
    }
}

#[test]
fn a_bad_file_fails_clearly_and_the_others_still_report() {
    let good = format!("{SAMPLES}/lemon-sorbet.toml");
    let bad = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/invalid-recipes/unknown-ingredient.toml"
    );
    let assert = gelu()
        .args(["report", "--json", bad, &good])
        .assert()
        .code(1);
    let out = assert.get_output();
    assert_eq!(
        String::from_utf8_lossy(&out.stdout).lines().count(),
        1,
        "the good file still reports"
    );
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("unknown-ingredient.toml:4:14"), "{err}");
    assert!(err.contains("whole-milk"), "{err}");
    let missing = gelu()
        .args(["report", "/no/such/file.toml"])
        .assert()
        .code(1)
        .get_output()
        .stderr
        .clone();
    assert!(String::from_utf8_lossy(&missing).contains("cannot read the file"));
}

#[test]
fn text_report_puts_key_figures_first_and_shows_cautions() {
    let file = format!("{SAMPLES}/dark-rum-custard.toml");
    let out = gelu()
        .args(["report", &file])
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    let text = String::from_utf8(out).unwrap();
    let first: Vec<&str> = text.lines().take(4).collect();
    assert!(first[2].starts_with("Freezing point"), "{first:?}");
    for needle in [
        "Composition (mass %)",
        "Share of the water frozen",
        "Pasteurise",
        "flammable",
        "Allergens: egg, milk",
    ] {
        assert!(text.contains(needle), "missing {needle}");
    }
}

/// The cabinet `gelu report` reports for: the log's setting, a recipe file's
/// own over it, and the `--cabinet` flag over both (the workspace's rule).
#[test]
fn the_cabinet_comes_from_the_settings_the_recipe_and_the_flag() {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("log.db");
    {
        let mut store = gelu::store::Store::open(&db).unwrap();
        store
            .set_setting(gelu::store::CABINET_TEMP_KEY, "-11")
            .unwrap();
        store
            .set_setting(gelu::store::FREEZER_TEMP_KEY, "-22")
            .unwrap();
    }
    let plain = format!("{SAMPLES}/lemon-sorbet.toml");
    let own = dir.path().join("own-cabinet.toml");
    let text = std::fs::read_to_string(&plain).unwrap();
    let text = text.replacen("style = ", "cabinet_temp_c = -14.5\nstyle = ", 1);
    std::fs::write(&own, text).unwrap();
    let cabinet = |file: &std::path::Path, flags: &[&str]| {
        let out = gelu()
            .env_remove("GELU_DB")
            .arg("--db")
            .arg(&db)
            .args(["report", "--json"])
            .args(flags)
            .arg(file)
            .output()
            .unwrap();
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        (
            v["cabinet"]["temp_c"].as_f64().unwrap(),
            v["freezer"]["temp_c"].as_f64().unwrap(),
        )
    };
    let plain = std::path::Path::new(&plain);
    assert_eq!(cabinet(plain, &[]), (-11.0, -22.0), "the log's settings");
    assert_eq!(
        cabinet(&own, &[]),
        (-14.5, -22.0),
        "the recipe's own cabinet"
    );
    assert_eq!(
        cabinet(&own, &["--cabinet", "-12", "--freezer", "0F"]).0,
        -12.0,
        "the flag over the recipe"
    );
    // 0 °F is -17.78 °C (JSON gives temperatures to 0.001 K).
    assert!((cabinet(plain, &["--freezer", "0F"]).1 + 160.0 / 9.0).abs() < 1e-3);
    // A prediction recorded with a batch is made for the same cabinet.
    let out = gelu()
        .env_remove("GELU_DB")
        .env("USER", "tester")
        .arg("--db")
        .arg(&db)
        .args(["batch", "new", "--size", "2kg", "--json"])
        .arg(&own)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let b: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(b["prediction"]["cabinet"]["temp_c"].as_f64(), Some(-14.5));
    assert_eq!(b["prediction"]["freezer"]["temp_c"].as_f64(), Some(-22.0));
}

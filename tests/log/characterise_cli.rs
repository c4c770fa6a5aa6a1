//! `gelu characterise` as a user runs it: text and JSON, exit codes, `--save`
//! into a new file and into an existing commented recipe, and a recipe then using
//! the saved ingredient through `gelu report`.
//!
//! Freezing points: CRC Handbook of Chemistry and Physics, 102nd ed. (2021),
//! "Concentrative Properties of Aqueous Solutions", glucose (180.155 g/mol):
//! 10.0 % freezes 1.17 K and 20.0 % 2.70 K below pure water (two decimals, so
//! ±0.005 K of rounding); 15.0 %, not used to fit, freezes 1.88 K below.

use std::path::Path;

use assert_cmd::Command;
use serde_json::Value;

/// The CRC glucose rows as points: 10 g in 90 g of water, 20 g in 80 g.
const GLUCOSE_POINTS: [&str; 2] = ["10:90:-1.17", "20:80:-2.70"];

fn gelu(data_home: &Path) -> Command {
    let mut cmd = Command::cargo_bin("gelu").expect("binary built");
    // No batch log of the machine's user is read or created by these runs.
    cmd.env_remove("GELU_DB")
        .env("XDG_DATA_HOME", data_home)
        .env("HOME", data_home);
    cmd
}

/// `gelu ARGS...`, checked to exit with `code`; returns stdout as text.
fn run(data_home: &Path, args: &[&str], code: i32) -> String {
    let out = gelu(data_home).args(args).output().unwrap();
    assert_eq!(out.status.code(), Some(code), "{args:?}: {}", stderr(&out));
    stdout(&out)
}

/// `gelu ARGS...`, which must succeed and print one JSON object.
fn json(data_home: &Path, args: &[&str]) -> Value {
    serde_json::from_str(run(data_home, args, 0).trim()).unwrap()
}

fn characterise(data_home: &Path, extra: &[&str]) -> std::process::Output {
    gelu(data_home)
        .args([
            "characterise",
            "--name",
            "Breakwater dextrose",
            "--id",
            "breakwater-dextrose",
            "--point",
        ])
        .args(GLUCOSE_POINTS)
        .args(extra)
        .output()
        .unwrap()
}

fn stdout(out: &std::process::Output) -> String {
    String::from_utf8(out.stdout.clone()).unwrap()
}

fn stderr(out: &std::process::Output) -> String {
    String::from_utf8(out.stderr.clone()).unwrap()
}

#[test]
fn json_keeps_the_contract_and_recovers_the_molar_mass() {
    let home = tempfile::tempdir().unwrap();
    let out = characterise(home.path(), &["--json"]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let text = stdout(&out);
    assert_eq!(text.lines().count(), 1, "one object on one line: {text}");
    let v: Value = serde_json::from_str(text.trim()).unwrap();
    for key in [
        "molar_mass_g_mol",
        "norrish_k",
        "sucrose_equivalent",
        "points",
    ] {
        assert!(v.get(key).is_some(), "missing {key}: {v}");
    }
    // Glucose back within 3 % (the tolerance of the core check on the same rows).
    let m = v["molar_mass_g_mol"].as_f64().unwrap();
    assert!((m / 180.155 - 1.0).abs() < 0.03, "{m}");
    assert!(v["norrish_k"].is_number(), "two points fit a K: {v}");
    let points = v["points"].as_array().unwrap();
    assert_eq!(points.len(), 2);
    for (p, (sample, water, temp)) in points
        .iter()
        .zip([(10.0, 90.0, -1.17), (20.0, 80.0, -2.70)])
    {
        assert_eq!(p["sample_g"], sample);
        assert_eq!(p["water_g"], water);
        assert!((p["freezing_point_c"].as_f64().unwrap() - temp).abs() < 1e-12);
        for key in ["model_c", "residual_k"] {
            assert!(p[key].is_number(), "points[].{key}: {p}");
        }
    }
    // Nothing was written anywhere: no batch log was created to run this.
    assert_eq!(std::fs::read_dir(home.path()).unwrap().count(), 0);
}

#[test]
fn one_point_gives_a_null_norrish_k_and_fahrenheit_reads_like_at() {
    let home = tempfile::tempdir().unwrap();
    // -1.17 °C is 29.894 °F.
    let v = json(
        home.path(),
        &[
            "characterise",
            "--name",
            "Quay glucose",
            "--id",
            "quay-glucose",
            "--point",
            "10:90:29.894F",
            "--json",
        ],
    );
    assert!(v["norrish_k"].is_null(), "{v}");
    let t = v["points"][0]["freezing_point_c"].as_f64().unwrap();
    assert!((t + 1.17).abs() < 1e-9, "{t}");
}

#[test]
fn the_text_report_names_what_was_found() {
    let home = tempfile::tempdir().unwrap();
    let out = characterise(home.path(), &[]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let text = stdout(&out);
    for words in [
        "Breakwater dextrose",
        "g/mol",
        "Norrish K",
        "sucrose equivalent",
        "residual",
    ] {
        assert!(text.contains(words), "`{words}` missing:\n{text}");
    }
    // The CRC rows give a K well inside its range: nothing to be wary of.
    assert!(!text.contains("Caution"), "{text}");
    let out = characterise(home.path(), &["--json"]);
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["cautions"], serde_json::json!([]), "{v}");
}

#[test]
fn a_norrish_k_held_at_its_limit_is_flagged_in_text_and_json() {
    // Invented readings (a demo): a spread no sugar's non-ideality gives.
    let home = tempfile::tempdir().unwrap();
    let args = [
        "characterise",
        "--name",
        "Quince puree",
        "--id",
        "quince",
        "--solids-pct",
        "15",
        "--point",
        "10:100:-0.55",
        "20:100:-1.12",
    ];
    let text = run(home.path(), &args, 0);
    assert!(
        text.contains("Caution: Norrish K is held at its limit"),
        "{text}"
    );
    let v = json(home.path(), &[&args[..], &["--json"]].concat());
    assert!(
        v["cautions"][0]
            .as_str()
            .is_some_and(|c| c.contains("limit")),
        "{v}"
    );
}

#[test]
fn refused_measurements_exit_1_with_the_reason() {
    let home = tempfile::tempdir().unwrap();
    let cases: [(&[&str], &str); 3] = [
        (&["--point", "10:90:0.4"], "not below 0 °C"),
        (&["--point", "10:90:-1.17", "--solids-pct", "120"], "100 %"),
        (&["--point", "10:90:-1.17", "20:80:-0.50"], "froze warmer"),
    ];
    for (args, reason) in cases {
        let out = gelu(home.path())
            .args(["characterise", "--name", "Odd", "--id", "odd-sample"])
            .args(args)
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(1), "{args:?}: {}", stderr(&out));
        assert!(stderr(&out).contains(reason), "{args:?}: {}", stderr(&out));
        assert!(stdout(&out).is_empty(), "{args:?}");
    }
}

#[test]
fn bad_usage_exits_2() {
    let home = tempfile::tempdir().unwrap();
    let cases: [&[&str]; 4] = [
        // A point without its temperature.
        &["--name", "A", "--id", "a-sample", "--point", "10:90"],
        // A temperature that is not one.
        &["--name", "A", "--id", "a-sample", "--point", "10:90:cold"],
        // No id.
        &["--name", "A", "--point", "10:90:-1.17"],
        // Solids and Brix both.
        &[
            "--name",
            "A",
            "--id",
            "a-sample",
            "--point",
            "10:90:-1.17",
            "--solids-pct",
            "50",
            "--brix",
            "50",
        ],
    ];
    for args in cases {
        run(home.path(), &[&["characterise"], args].concat(), 2);
    }
}

#[test]
fn dissociation_and_brix_are_passed_on() {
    // CRC NaCl rows (58.443 g/mol): 1.0 % freezes 0.59 K, 3.0 % 1.79 K. With
    // i = 2 the effective molar mass lies 0-15 % above the formula weight (the
    // core check's bounds); without it, about half.
    let home = tempfile::tempdir().unwrap();
    let v = json(
        home.path(),
        &[
            "characterise",
            "--name",
            "Quay salt",
            "--id",
            "quay-salt",
            "--dissociation",
            "2",
            "--point",
            "1:99:-0.59",
            "3:97:-1.79",
            "--json",
        ],
    );
    assert_eq!(v["dissociation"], 2.0);
    let ratio = v["molar_mass_g_mol"].as_f64().unwrap() / 58.443;
    assert!((1.0..1.15).contains(&ratio), "{ratio}");
    // --brix: the sample's dissolved solids, here 25 °Bx.
    let v = json(
        home.path(),
        &[
            "characterise",
            "--name",
            "Quay syrup",
            "--id",
            "quay-syrup",
            "--brix",
            "25",
            "--point",
            "40:60:-1.17",
            "--json",
        ],
    );
    assert_eq!(v["solids_pct"], 25.0);
}

/// A commented recipe of the invented Quay Kitchen that will use the sample.
const QUAY_FILE: &str = "# The Quay Kitchen: a dextrose syrup test.\n\
name = \"Quay syrup test\"   # the house name\n\
style = \"other\"\n\
\n\
[[line]]\n\
ingredient = \"water\"\n\
g = 85   # from the filter tap\n";

#[test]
fn save_appends_to_an_existing_commented_file_and_a_recipe_then_uses_it() {
    let home = tempfile::tempdir().unwrap();
    let file = home.path().join("quay-syrup-test.toml");
    std::fs::write(&file, QUAY_FILE).unwrap();
    let out = characterise(home.path(), &["--save", file.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let saved = std::fs::read_to_string(&file).unwrap();
    assert!(
        saved.starts_with(QUAY_FILE),
        "the file's own text is kept to the byte:\n{saved}"
    );
    assert!(saved.contains("[[solute]]"), "{saved}");
    assert!(saved.contains("[[ingredient]]"), "{saved}");
    assert!(saved.contains("id = \"breakwater-dextrose\""), "{saved}");
    assert!(
        saved.contains("id = \"breakwater-dextrose-solids\""),
        "{saved}"
    );
    // The measurements are in the sources.
    assert!(saved.contains("froze at -1.17 °C"), "{saved}");
    assert!(saved.contains("froze at -2.7 °C"), "{saved}");
    // Now the recipe uses the sample: 15 g in 85 g of water is CRC's 15 % row
    // (1.88 K). Tolerance: 0.05 K, as in the core check of the saved solute.
    let with_line = format!("{saved}\n[[line]]\ningredient = \"breakwater-dextrose\"\ng = 15\n");
    std::fs::write(&file, &with_line).unwrap();
    let v = json(home.path(), &["report", "--json", file.to_str().unwrap()]);
    let fp = v["freezing_point_c"].as_f64().unwrap();
    assert!((fp + 1.88).abs() < 0.05, "{fp}");
    // Saving the same id again is refused and leaves the file as it was.
    let again = characterise(home.path(), &["--save", file.to_str().unwrap()]);
    assert_eq!(again.status.code(), Some(1), "{}", stderr(&again));
    assert!(
        stderr(&again).contains("breakwater-dextrose"),
        "{}",
        stderr(&again)
    );
    assert_eq!(std::fs::read_to_string(&file).unwrap(), with_line);
}

#[test]
fn save_creates_a_new_file_that_reports_the_measured_dilution() {
    let home = tempfile::tempdir().unwrap();
    let file = home.path().join("breakwater-dextrose.toml");
    let out = characterise(home.path(), &["--save", file.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let saved = std::fs::read_to_string(&file).unwrap();
    assert!(saved.contains("[[solute]]") && saved.contains("[[ingredient]]"));
    // The new file is a recipe of the first measured point: 10 g in 90 g of
    // water, which froze at -1.17 °C; the model must give that back within the
    // 0.05 K of the core check.
    let v = json(home.path(), &["report", "--json", file.to_str().unwrap()]);
    let fp = v["freezing_point_c"].as_f64().unwrap();
    assert!((fp + 1.17).abs() < 0.05, "{fp}");
}

#[test]
fn a_file_that_cannot_be_appended_safely_is_refused_untouched() {
    let home = tempfile::tempdir().unwrap();
    let cases = [
        ("broken.toml", "name = [unclosed\n"),
        (
            "inline.toml",
            "name = \"Inline\"\nsolute = [{ id = \"x\", name = \"X\", molar_mass_g_mol = 100.0 }]\n",
        ),
    ];
    for (name, text) in cases {
        let file = home.path().join(name);
        std::fs::write(&file, text).unwrap();
        let out = characterise(home.path(), &["--save", file.to_str().unwrap()]);
        assert_eq!(out.status.code(), Some(1), "{name}: {}", stderr(&out));
        assert!(
            stderr(&out).contains("nothing was written"),
            "{name}: {}",
            stderr(&out)
        );
        assert_eq!(std::fs::read_to_string(&file).unwrap(), text, "{name}");
    }
}

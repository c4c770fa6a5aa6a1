//! `gelu balance` as a user runs it: text and JSON, `--write` keeping the
//! file's comments, `-o`, the flags overriding the file's `[balance]` table,
//! exit codes 0/1/2; and, sampled, the end-to-end property: whenever balancing
//! says balanced, `gelu report` on the written recipe meets every target
//! within the tolerances the issue sets (0.05 K, 0.005 of a frozen share,
//! 0.05 % vol, 0.5 g/L, 0.1 % of a volume) and the line rules hold.

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use gelu::balance::{Figure, LineRule, Target};
use gelu::model::Amount;
use gelu::recipe_file::{read_recipe, recipe_to_toml};
use proptest::prelude::*;
use serde_json::Value;

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

/// The pier kiosk's gelato, to be brought to 65-70 % frozen at -12 °C.
const PIER: &str = r#"# The Quay Kitchen: pier gelato for the -12 °C display cabinet.
name = "Pier milk gelato"
style = "gelato"
serving_target = 0.65

[[line]]
ingredient = "whole-milk"
g = 650   # the morning milk

[[line]]
ingredient = "heavy-cream"
kg = 0.12

[[line]]
ingredient = "skim-milk-powder"
g = 40

[[line]]
ingredient = "sucrose"
g = 160

[[line]]
ingredient = "dextrose-monohydrate"
g = 25
max_g = 40   # more tastes thin

[[line]]
ingredient = "stabiliser-blend"
g = 4
fixed = true   # weighed for the week

# What the cabinet needs.
[balance]
mass_g = 1000
fat_pct = [6, 9]
frozen_at = [{ temp_c = -12, fraction = [0.65, 0.70] }]
"#;

/// Milk and sugar alone: fat of 20 % cannot be had.
const MILK_ICE: &str = r#"name = "Breakwater milk ice"
style = "ice-cream"

[[line]]
ingredient = "whole-milk"
g = 800

[[line]]
ingredient = "sucrose"
g = 200

[balance]
fat_pct = [20, 24]
"#;

fn tempdir() -> tempfile::TempDir {
    tempfile::tempdir().expect("a temporary folder")
}

fn put(dir: &Path, name: &str, text: &str) -> PathBuf {
    let path = dir.join(name);
    std::fs::write(&path, text).expect("write the test file");
    path
}

/// The names of an answer's targets.
fn target_names(v: &Value) -> Vec<String> {
    v["targets"]
        .as_array()
        .into_iter()
        .flatten()
        .filter_map(|t| t["name"].as_str().map(String::from))
        .collect()
}

/// Runs `gelu balance --json` with `args` on `file`, expecting `code`; the answer.
fn balance_json(args: &[&str], file: &Path, code: i32) -> Value {
    let out = gelu()
        .args(["balance", "--json"])
        .args(args)
        .arg(file)
        .assert()
        .code(code);
    json_lines(&out.get_output().stdout)
        .into_iter()
        .next()
        .unwrap_or_default()
}

fn json_lines(out: &[u8]) -> Vec<Value> {
    String::from_utf8_lossy(out)
        .lines()
        .map(|l| serde_json::from_str(l).expect("one JSON object per line"))
        .collect()
}

#[test]
fn text_shows_each_line_before_and_after_and_each_target() {
    let dir = tempdir();
    let file = put(dir.path(), "pier.toml", PIER);
    let out = gelu().arg("balance").arg(&file).assert().success();
    let text = String::from_utf8_lossy(&out.get_output().stdout).into_owned();
    assert!(text.contains("Pier milk gelato: balanced"), "{text}");
    for id in ["whole-milk", "heavy-cream", "sucrose", "stabiliser-blend"] {
        assert!(text.contains(id), "{id}:\n{text}");
    }
    assert!(text.contains("650.0 g"), "the amount before:\n{text}");
    let row = text
        .lines()
        .find(|l| l.trim_start().starts_with("frozen_at.-12"))
        .unwrap_or_default();
    assert!(row.contains("0.65 to 0.7") && row.contains("met"), "{text}");
    assert!(
        text.lines().any(|l| l.contains("binds")),
        "a binding target is named:\n{text}"
    );
    assert!(text.contains("Pasteurise"), "the cautions:\n{text}");
    // Nothing was written without --write.
    assert_eq!(std::fs::read_to_string(&file).unwrap_or_default(), PIER);
}

#[test]
fn json_has_the_public_keys_and_the_report_of_the_balanced_recipe() {
    let dir = tempdir();
    let pier = put(dir.path(), "pier.toml", PIER);
    let out_file = dir.path().join("pier-balanced.toml");
    let out = gelu()
        .args(["balance", "--json", "-o"])
        .arg(&out_file)
        .arg(&pier)
        .assert()
        .success();
    let lines = json_lines(&out.get_output().stdout);
    assert_eq!(lines.len(), 1);
    let v = &lines[0];
    for key in [
        "name",
        "status",
        "objective",
        "cost",
        "cost_per_kg",
        "lines",
        "targets",
        "conflicts",
        "report",
    ] {
        assert!(v.get(key).is_some(), "missing {key}: {v}");
    }
    assert_eq!(v["status"], "balanced");
    assert_eq!(v["objective"], "nearest");
    assert_eq!(v["lines"][0]["ingredient"], "whole-milk");
    assert_eq!(v["lines"][0]["before_g"], 650.0);
    assert_eq!(v["lines"][5]["g"], 4.0, "the fixed line stays");
    for t in v["targets"].as_array().into_iter().flatten() {
        for key in [
            "name",
            "low",
            "high",
            "value",
            "met",
            "binding",
            "shadow_price",
        ] {
            assert!(t.get(key).is_some(), "target lacks {key}: {t}");
        }
        assert_eq!(t["met"], true);
    }
    // The report is `gelu report --json --at -12` of the balanced recipe.
    let report = gelu()
        .args(["report", "--json", "--at", "-12"])
        .arg(&out_file)
        .assert()
        .success();
    let report = &json_lines(&report.get_output().stdout)[0];
    let keys = |x: &Value| {
        let mut k: Vec<String> = x
            .as_object()
            .into_iter()
            .flatten()
            .map(|(k, _)| k.clone())
            .collect();
        k.sort();
        k
    };
    assert_eq!(keys(&v["report"]), keys(report));
    // The file keeps amounts to a milligram: the figures agree to that.
    for key in ["fat", "msnf", "sugars", "total_solids", "water"] {
        let (a, b) = (
            v["report"]["composition_pct"][key].as_f64(),
            report["composition_pct"][key].as_f64(),
        );
        assert!(
            matches!((a, b), (Some(a), Some(b)) if (a - b).abs() < 1e-3),
            "{key}: {a:?} against {b:?}"
        );
    }
    let frozen = |x: &Value| x["at"][0]["frozen_fraction"].as_f64().unwrap_or(f64::NAN);
    assert!((frozen(&v["report"]) - frozen(report)).abs() < 1e-4);
}

#[test]
fn write_saves_the_new_amounts_keeping_comments_and_units() {
    let dir = tempdir();
    let file = put(dir.path(), "pier.toml", PIER);
    gelu()
        .args(["balance", "--write"])
        .arg(&file)
        .assert()
        .success();
    let saved = std::fs::read_to_string(&file).unwrap_or_default();
    assert_ne!(saved, PIER, "the amounts changed");
    for kept in [
        "# The Quay Kitchen: pier gelato for the -12 °C display cabinet.",
        "# the morning milk",
        "max_g = 40   # more tastes thin",
        "fixed = true   # weighed for the week",
        "# What the cabinet needs.\n[balance]\nmass_g = 1000\nfat_pct = [6, 9]\nfrozen_at = [{ temp_c = -12, fraction = [0.65, 0.70] }]\n",
    ] {
        assert!(saved.contains(kept), "`{kept}` kept:\n{saved}");
    }
    assert!(saved.contains("kg = 0."), "the cream stays in kg:\n{saved}");
    let (recipe, _) = read_recipe(&file).expect("the saved file reads");
    assert_eq!(recipe.lines[5].amount, Amount::Grams(4.0));
    // Balanced again, it is already where it should be.
    let again = gelu()
        .args(["balance", "--json"])
        .arg(&file)
        .assert()
        .success();
    let v = &json_lines(&again.get_output().stdout)[0];
    for line in v["lines"].as_array().into_iter().flatten() {
        let (before, after) = (line["before_g"].as_f64(), line["g"].as_f64());
        assert!(
            matches!((before, after), (Some(b), Some(a)) if (a - b).abs() < 0.05),
            "{line}"
        );
    }
}

#[test]
fn an_infeasible_file_exits_1_names_the_conflict_and_writes_nothing() {
    let dir = tempdir();
    let ice = put(dir.path(), "milk-ice.toml", MILK_ICE);
    let pier = put(dir.path(), "pier.toml", PIER);
    let out = gelu()
        .args(["balance", "--write"])
        .arg(&ice)
        .arg(&pier)
        .assert()
        .code(1);
    let text = String::from_utf8_lossy(&out.get_output().stdout).into_owned();
    let err = String::from_utf8_lossy(&out.get_output().stderr).into_owned();
    assert!(text.contains("cannot all be met"), "{text}");
    assert!(
        text.contains("Conflict 1") && text.contains("fat_pct"),
        "{text}"
    );
    assert!(text.contains("lower the minimum for fat"), "{text}");
    assert!(
        text.contains("Pier milk gelato: balanced"),
        "the other file still balances"
    );
    assert!(err.contains("nothing written"), "{err}");
    assert_eq!(std::fs::read_to_string(&ice).unwrap_or_default(), MILK_ICE);
    assert_ne!(std::fs::read_to_string(&pier).unwrap_or_default(), PIER);
}

#[test]
fn an_unreadable_file_exits_1_and_the_others_still_print() {
    let dir = tempdir();
    let bad = put(
        dir.path(),
        "bad.toml",
        "name = \"Bad\"\n[[line]]\ningredient = \"whole-milk\"\ng = 600\n[balance]\nfat_pct = [9, 6]\n",
    );
    let pier = put(dir.path(), "pier.toml", PIER);
    let out = gelu()
        .args(["balance", "--json"])
        .arg(&bad)
        .arg(dir.path().join("missing.toml"))
        .arg(&pier)
        .assert()
        .code(1);
    let lines = json_lines(&out.get_output().stdout);
    assert_eq!(lines.len(), 1);
    assert_eq!(lines[0]["name"], "Pier milk gelato");
    let err = String::from_utf8_lossy(&out.get_output().stderr).into_owned();
    assert!(err.contains("bad.toml:6:11:"), "file:line:column:\n{err}");
    assert!(err.contains("missing.toml"), "{err}");
    assert!(err.contains("2 of 3"), "{err}");
}

#[test]
fn bad_usage_exits_2() {
    let dir = tempdir();
    let pier = put(dir.path(), "pier.toml", PIER);
    let other = put(dir.path(), "other.toml", PIER);
    gelu()
        .args(["balance", "--target", "fatt_pct=6..9"])
        .arg(&pier)
        .assert()
        .code(2);
    gelu()
        .args(["balance", "--target", "fat_pct=9..6"])
        .arg(&pier)
        .assert()
        .code(2);
    gelu()
        .args(["balance", "--objective", "cheapest"])
        .arg(&pier)
        .assert()
        .code(2);
    let out = gelu()
        .args(["balance", "-o"])
        .arg(dir.path().join("out.toml"))
        .arg(&pier)
        .arg(&other)
        .assert()
        .code(2);
    assert!(String::from_utf8_lossy(&out.get_output().stderr).contains("one FILE"));
    gelu()
        .args(["balance", "--write", "-o"])
        .arg(dir.path().join("out.toml"))
        .arg(&pier)
        .assert()
        .code(2);
    gelu().arg("balance").assert().code(2);
    assert!(!dir.path().join("out.toml").exists());
}

#[test]
fn flags_add_to_and_override_the_file() {
    let samples = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-recipes");
    let cherry = samples.join("sour-cherry-liqueur.toml");
    // The file asks 22 % vol; the flag asks 25, and only spirit, sugar and water may move.
    let v = balance_json(
        &[
            "--target",
            "abv_pct=25",
            "--vary",
            "spirit-57-vol",
            "--vary",
            "sucrose",
            "--vary",
            "water",
        ],
        &cherry,
        0,
    );
    let abv = v["targets"]
        .as_array()
        .into_iter()
        .flatten()
        .find(|t| t["name"] == "abv_pct")
        .cloned()
        .unwrap_or_default();
    assert_eq!(abv["low"], 25.0);
    assert!(
        (abv["value"].as_f64().unwrap_or(0.0) - 25.0).abs() <= 0.05,
        "{abv}"
    );
    let names = target_names(&v);
    assert!(
        names.iter().any(|n| n == "volume_ml") && names.iter().any(|n| n == "sugar_g_per_l"),
        "the file's other targets stay: {names:?}"
    );
    // With only the water free, the sugar cannot follow: the sugar is named
    // among the lines that may not vary.
    let v = balance_json(&["--target", "abv_pct=25", "--vary", "water"], &cherry, 1);
    assert_eq!(v["status"], "infeasible");
    let named = v["conflicts"].to_string();
    assert!(named.contains("line.sucrose.fixed"), "{named}");
    assert_eq!(
        v["lines"][0]["g"], v["lines"][0]["before_g"],
        "the spirit stays"
    );
    // A size flag replaces the file's size.
    let v = balance_json(&["--target", "mass_g=1500"], &cherry, 0);
    let names = target_names(&v);
    assert!(
        names.iter().any(|n| n == "mass_g") && !names.iter().any(|n| n == "volume_ml"),
        "{names:?}"
    );
    // Least cost needs a price for every line: said plainly, exit 1.
    let out = gelu()
        .args(["balance", "--objective", "cost"])
        .arg(&cherry)
        .assert()
        .code(1);
    let err = String::from_utf8_lossy(&out.get_output().stderr).into_owned();
    assert!(
        err.contains("price") && err.contains("sour-cherry"),
        "{err}"
    );
}

#[test]
fn least_cost_reports_the_cost_and_shadow_prices() {
    let dir = tempdir();
    let text = format!(
        "{PIER}\n[prices]\nwhole-milk = 0.95\nheavy-cream = 3.8\nskim-milk-powder = 4.2\nsucrose = 1.15\ndextrose-monohydrate = 1.6\nstabiliser-blend = 14\n"
    );
    let file = put(dir.path(), "pier-priced.toml", &text);
    let out = gelu()
        .args(["balance", "--json", "--objective", "cost"])
        .arg(&file)
        .assert()
        .success();
    let v = &json_lines(&out.get_output().stdout)[0];
    assert_eq!(v["objective"], "cost");
    let cost = v["cost"].as_f64().unwrap_or(f64::NAN);
    // The batch's cost is the sum of each line's mass times its price.
    let prices = [0.95, 3.8, 4.2, 1.15, 1.6, 14.0];
    let sum: f64 = v["lines"]
        .as_array()
        .into_iter()
        .flatten()
        .zip(prices)
        .map(|(l, p)| l["g"].as_f64().unwrap_or(f64::NAN) * p / 1000.0)
        .sum();
    assert!((cost - sum).abs() < 1e-9, "{cost} against {sum}");
    assert!(
        v["targets"]
            .as_array()
            .into_iter()
            .flatten()
            .any(|t| t["binding"] == true && t["shadow_price"].is_f64())
    );
    let text = gelu()
        .args(["balance", "--objective", "cost"])
        .arg(&file)
        .assert()
        .success();
    let text = String::from_utf8_lossy(&text.get_output().stdout).into_owned();
    assert!(
        text.contains("Cost of the batch") && text.contains("per kg"),
        "{text}"
    );
}

// ---- the end-to-end property, sampled -----------------------------------------

/// The value of a target's figure in a `gelu report --json` object.
fn report_value(report: &Value, name: &str) -> Option<f64> {
    let c = &report["composition_pct"];
    let plain = |key: &str| report[key].as_f64();
    match Figure::parse(name).ok()? {
        Figure::MassG => plain("mass_g"),
        Figure::VolumeMl => plain("volume_ml"),
        Figure::FatPct => c["fat"].as_f64(),
        Figure::MsnfPct => c["msnf"].as_f64(),
        Figure::ProteinPct => c["protein"].as_f64(),
        Figure::LactosePct => c["lactose"].as_f64(),
        Figure::SugarsPct => c["sugars"].as_f64(),
        Figure::TotalSolidsPct => c["total_solids"].as_f64(),
        Figure::WaterPct => c["water"].as_f64(),
        Figure::EthanolPct => c["ethanol"].as_f64(),
        Figure::OtherSolidsPct => c["other_solids"].as_f64(),
        Figure::Sweetness => plain("sweetness"),
        Figure::AbvPct => plain("abv_pct"),
        Figure::SugarGPerL => plain("sugar_g_per_l"),
        Figure::FreezingPointC => plain("freezing_point_c"),
        Figure::ServingTempC => plain("serving_temp_c"),
        Figure::SolutePct(id) => Some(report["solutes_pct"][id.as_str()].as_f64().unwrap_or(0.0)),
        Figure::FrozenAt { temp_c } => report["at"]
            .as_array()?
            .iter()
            .find(|p| p["temp_c"].as_f64() == Some(temp_c))
            .and_then(|p| p["frozen_fraction"].as_f64()),
    }
}

/// How close the report must come: the issue's tolerances for the full-model
/// figures; for the linear ones the engine's 0.001 plus the report's rounding
/// of composition to 0.0001 (a mass to 0.001 g, a sweetness to 0.001).
fn tolerance(figure: &Figure, bound: f64) -> f64 {
    match figure {
        Figure::FreezingPointC | Figure::ServingTempC => 0.05,
        Figure::FrozenAt { .. } => 0.005,
        Figure::AbvPct => 0.05,
        Figure::SugarGPerL => 0.5,
        Figure::VolumeMl | Figure::MassG => 0.001 * bound.abs(),
        _ => 0.001 + 0.0001,
    }
}

const POOL: [(&str, f64); 8] = [
    ("whole-milk", 600.0),
    ("heavy-cream", 150.0),
    ("skim-milk-powder", 40.0),
    ("sucrose", 150.0),
    ("dextrose-monohydrate", 30.0),
    ("glucose-syrup-42de", 40.0),
    ("stabiliser-blend", 4.0),
    ("water", 50.0),
];

fn figures() -> Vec<Figure> {
    vec![
        Figure::FatPct,
        Figure::MsnfPct,
        Figure::TotalSolidsPct,
        Figure::Sweetness,
        Figure::FreezingPointC,
        Figure::ServingTempC,
        Figure::FrozenAt { temp_c: -12.0 },
        Figure::FrozenAt { temp_c: -18.0 },
        Figure::MassG,
    ]
}

prop_compose! {
    /// A recipe file with targets around its present figures and some line rules.
    fn case()(lines in prop::sample::subsequence((1..POOL.len()).collect::<Vec<_>>(), 2..6),
              scale in prop::collection::vec(0.5f64..1.5, POOL.len()),
              picks in prop::sample::subsequence((0..9usize).collect::<Vec<_>>(), 1..4),
              shifts in prop::collection::vec(-0.15f64..0.15, 9),
              widths in prop::collection::vec(0.0f64..0.08, 9),
              rules in prop::collection::vec(0u8..5, POOL.len())) -> (String, Vec<Target>) {
        let mut recipe = gelu::model::Recipe {
            name: "Breakwater trial".into(),
            style: gelu::model::Style::Gelato,
            ..Default::default()
        };
        // Milk in every trial, so there is water to freeze.
        for k in std::iter::once(&0).chain(&lines) {
            let (id, g) = POOL[*k];
            recipe.lines.push(gelu::model::Line { ingredient: id.into(), amount: Amount::Grams((g * scale[*k]).round()) });
        }
        let options = gelu::analysis::Options { at_temps_c: vec![-12.0, -18.0], ..Default::default() };
        let a = gelu::analysis::analyze(&recipe, gelu::catalog::Catalog::builtin(), &options).expect("analysis");
        let all = figures();
        let mut targets = Vec::new();
        for k in picks {
            let f = all[k].clone();
            let Some(v) = gelu::balance::Figure::value_in(&f, &a) else { continue };
            let center = v + shifts[k] * v.abs().max(1.0);
            let half = widths[k] * v.abs().max(1.0);
            let (lo, hi) = match &f {
                Figure::FrozenAt { .. } => (0.0, 1.0),
                Figure::FreezingPointC | Figure::ServingTempC => (-40.0, -0.1),
                Figure::MassG => (10.0, 1e6),
                _ => (0.0, 100.0),
            };
            let round = |x: f64| (x.clamp(lo, hi) * 1000.0).round() / 1000.0;
            targets.push(Target::range(f, round(center - half), round(center + half)));
        }
        recipe.balance.targets = targets.clone();
        for (line, kind) in recipe.lines.clone().iter().zip(&rules[..]) {
            let g = line.amount.grams(1.0);
            let rule = match kind {
                0 => LineRule::fixed(),
                1 => LineRule { max_g: Some((1.4 * g).round()), ..LineRule::default() },
                2 => LineRule { min_g: Some((0.6 * g).round()), ..LineRule::default() },
                _ => continue,
            };
            recipe.balance.rules.insert(line.ingredient.clone(), rule);
        }
        (recipe_to_toml(&recipe), targets)
    }
}

proptest! {
    // Each case runs the binary twice: a handful of cases keeps this quick.
    #![proptest_config(ProptestConfig::with_cases(10))]

    #[test]
    fn a_balanced_answer_written_out_meets_every_target_in_gelu_report((text, targets) in case()) {
        let dir = tempdir();
        let file = put(dir.path(), "trial.toml", &text);
        let out_file = dir.path().join("trial-balanced.toml");
        prop_assume!(!targets.is_empty());
        let run = gelu().args(["balance", "--json", "-o"]).arg(&out_file).arg(&file).output().expect("gelu runs");
        let lines = json_lines(&run.stdout);
        prop_assert_eq!(lines.len(), 1, "{}", String::from_utf8_lossy(&run.stderr));
        let v = &lines[0];
        if v["status"] == "infeasible" {
            prop_assert_eq!(run.status.code(), Some(1));
            prop_assert!(!out_file.exists(), "an infeasible answer is not written");
            prop_assert!(v["conflicts"].as_array().is_some_and(|c| !c.is_empty()));
            return Ok(());
        }
        prop_assert_eq!(run.status.code(), Some(0));
        let mut report = gelu();
        report.args(["report", "--json"]);
        for t in &targets {
            if let Figure::FrozenAt { temp_c } = t.figure {
                report.arg("--at").arg(temp_c.to_string());
            }
        }
        let report = report.arg(&out_file).output().expect("gelu report runs");
        let report = &json_lines(&report.stdout)[0];
        for t in &targets {
            let name = t.figure.name();
            let value = report_value(report, &name);
            prop_assert!(value.is_some(), "{} has a value", name);
            let value = value.unwrap_or(f64::NAN);
            if let Some(low) = t.low {
                prop_assert!(value >= low - tolerance(&t.figure, low), "{}: {} below {}", name, value, low);
            }
            if let Some(high) = t.high {
                prop_assert!(value <= high + tolerance(&t.figure, high), "{}: {} above {}", name, value, high);
            }
        }
        // The rules hold in the file written.
        let (asked, _) = read_recipe(&file).expect("the trial reads");
        let (written, _) = read_recipe(&out_file).expect("the answer reads");
        prop_assert_eq!(&written.balance, &asked.balance, "the question is kept");
        for (before, after) in asked.lines.iter().zip(&written.lines) {
            let g = after.amount.grams(1.0);
            prop_assert!(g >= 0.0);
            let Some(rule) = asked.balance.rules.get(&before.ingredient) else { continue };
            if rule.fixed {
                prop_assert_eq!(after.amount, before.amount);
            }
            if let Some(min) = rule.min_g {
                prop_assert!(g >= min - 1e-3, "{} {} < {}", before.ingredient, g, min);
            }
            if let Some(max) = rule.max_g {
                prop_assert!(g <= max + 1e-3, "{} {} > {}", before.ingredient, g, max);
            }
        }
    }
}

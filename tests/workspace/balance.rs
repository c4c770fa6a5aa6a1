//! The balance panel through `update`: prefilled from the style (composition
//! ranges after Goff and Goff & Hartel, as PRACTICE.md tabulates them, and
//! 65-70 % of the water frozen in the cabinet, after Mullan) or from the
//! recipe's own targets, targets edited, lines held or let move, prices kept
//! in the batch log, accepted as one undoable step or cancelled; and the quick
//! reduce-to-strength of the recipe screen.

use crate::common::{cmd, liqueur_state, loaded_state, type_text};
use gelu::balance::{Figure, Status, Target};
use gelu::model::Amount;
use gelu::tui::state::{BalancePanel, Context, Overlay};
use gelu::tui::{Command, Effect, State};

fn panel(s: &State) -> &BalancePanel {
    match &s.recipe.balance {
        Some(p) => p,
        None => panic!("the balance panel should be open"),
    }
}

fn names(s: &State) -> Vec<String> {
    panel(s)
        .request
        .targets
        .iter()
        .map(|t| t.figure.name())
        .collect()
}

fn answer(s: &State) -> &gelu::balance::Balance {
    match &panel(s).answer {
        Ok(b) => b,
        Err(e) => panic!("no answer: {e}"),
    }
}

fn prompt_error(s: &State) -> Option<String> {
    match &s.overlay {
        Some(Overlay::Prompt(p)) => p.error.clone(),
        other => panic!("expected a prompt, found {other:?}"),
    }
}

/// Moves the panel's cursor to the target named `name`.
fn to_target(s: &mut State, name: &str) {
    cmd(s, Command::First);
    let lines = s.recipe.recipe.lines.len();
    let Some(k) = names(s).iter().position(|n| n == name) else {
        panic!("no target {name}: {:?}", names(s));
    };
    for _ in 0..lines + k {
        cmd(s, Command::Down);
    }
}

#[test]
fn a_gelato_opens_with_its_styles_ranges_and_the_frozen_share_in_the_cabinet() {
    let mut s = loaded_state();
    let before = s.recipe.recipe.clone();
    cmd(&mut s, Command::OpenBalance);
    assert_eq!(s.context(), Context::Balance);
    assert_eq!(
        names(&s),
        [
            "mass_g",
            "fat_pct",
            "msnf_pct",
            "total_solids_pct",
            "frozen_at.-13"
        ]
    );
    let targets = &panel(&s).request.targets;
    // Gelato: fat 4-10 %, MSNF 8-11 %, total solids 32-40 % (PRACTICE.md, after
    // Goff and Goff & Hartel); 65-70 % of the water frozen where it is served
    // (Mullan), at the settings' cabinet temperature (-13 °C by default).
    assert_eq!(targets[1], Target::range(Figure::FatPct, 4.0, 10.0));
    assert_eq!(targets[2], Target::range(Figure::MsnfPct, 8.0, 11.0));
    assert_eq!(
        targets[3],
        Target::range(Figure::TotalSolidsPct, 32.0, 40.0)
    );
    assert_eq!(
        targets[4],
        Target::range(Figure::FrozenAt { temp_c: -13.0 }, 0.65, 0.70)
    );
    assert_eq!(targets[0], Target::value(Figure::MassG, 1000.0));
    let b = answer(&s);
    assert_eq!(b.status, Status::Balanced);
    assert!(b.targets.iter().all(|t| t.met));
    assert_eq!(s.recipe.recipe, before, "nothing changes until accepted");
}

#[test]
fn the_cabinet_temperature_comes_from_the_settings() {
    let mut s = loaded_state();
    s.settings.cabinet_temp_c = -11.5;
    cmd(&mut s, Command::OpenBalance);
    assert!(
        names(&s).contains(&"frozen_at.-11.5".to_string()),
        "{:?}",
        names(&s)
    );
}

#[test]
fn a_liqueur_opens_with_its_volume_strength_and_sugar() {
    let mut s = liqueur_state();
    cmd(&mut s, Command::OpenBalance);
    assert_eq!(names(&s), ["volume_ml", "abv_pct", "sugar_g_per_l"]);
    let a = match &s.recipe.analysis {
        Ok(a) => a.clone(),
        Err(e) => panic!("{e}"),
    };
    let t = &panel(&s).request.targets;
    assert!(t.iter().all(Target::is_value));
    assert!((t[1].low.unwrap_or(0.0) - a.abv_pct).abs() < 0.01);
    assert!((t[2].low.unwrap_or(0.0) - a.sugar_g_per_l).abs() < 0.1);
    assert_eq!(answer(&s).status, Status::Balanced);
}

#[test]
fn a_recipe_with_its_own_targets_opens_with_them() {
    let mut s = loaded_state();
    s.recipe.recipe.balance.targets = vec![Target::range(Figure::FatPct, 7.0, 8.0)];
    cmd(&mut s, Command::OpenBalance);
    assert_eq!(names(&s), ["fat_pct"]);
    assert!(panel(&s).source.contains("own targets"));
}

#[test]
fn a_target_is_changed_and_the_answer_follows() {
    let mut s = loaded_state();
    cmd(&mut s, Command::OpenBalance);
    to_target(&mut s, "frozen_at.-13");
    cmd(&mut s, Command::EditBalanceRow);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "0.60..0.63");
    cmd(&mut s, Command::Confirm);
    assert!(s.overlay.is_none());
    let frozen = answer(&s)
        .targets
        .iter()
        .find(|t| t.name == "frozen_at.-13")
        .and_then(|t| t.value)
        .unwrap_or(f64::NAN);
    assert!(
        (0.595..=0.635).contains(&frozen),
        "solved again for the new range: {frozen}"
    );
    // One-sided ranges are for the command line: the panel keeps what a file keeps.
    cmd(&mut s, Command::EditBalanceRow);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "..0.7");
    cmd(&mut s, Command::Confirm);
    assert!(prompt_error(&s).is_some_and(|e| e.contains("both ends")));
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "lots");
    cmd(&mut s, Command::Confirm);
    assert!(prompt_error(&s).is_some_and(|e| e.contains("not a number")));
    cmd(&mut s, Command::Cancel);
    assert_eq!(s.context(), Context::Balance);
}

#[test]
fn targets_are_added_and_removed() {
    let mut s = loaded_state();
    cmd(&mut s, Command::OpenBalance);
    cmd(&mut s, Command::AddTarget);
    type_text(&mut s, "sweetness=16..18");
    cmd(&mut s, Command::Confirm);
    assert!(names(&s).contains(&"sweetness".to_string()));
    let sweet = answer(&s)
        .targets
        .iter()
        .find(|t| t.name == "sweetness")
        .and_then(|t| t.value)
        .unwrap_or(f64::NAN);
    assert!((16.0 - 0.001..=18.001).contains(&sweet), "{sweet}");
    // The cursor is on the new target: remove it.
    cmd(&mut s, Command::DeleteTarget);
    assert!(!names(&s).contains(&"sweetness".to_string()));
    cmd(&mut s, Command::AddTarget);
    type_text(&mut s, "solutes_pct.glucoze=0..3");
    cmd(&mut s, Command::Confirm);
    assert!(prompt_error(&s).is_some_and(|e| e.contains("glucose")));
}

#[test]
fn a_held_line_keeps_its_amount() {
    let mut s = loaded_state();
    cmd(&mut s, Command::OpenBalance);
    cmd(&mut s, Command::First);
    assert_ne!(answer(&s).lines[0].g, 620.0, "the milk moves at first");
    cmd(&mut s, Command::EditBalanceRow);
    assert!(!panel(&s).request.may_vary("whole-milk"));
    assert_eq!(answer(&s).lines[0].g, 620.0);
    assert_eq!(answer(&s).status, Status::Balanced);
    cmd(&mut s, Command::EditBalanceRow);
    assert!(panel(&s).request.may_vary("whole-milk"));
    assert_eq!(panel(&s).request.vary, None, "every line moves again");
}

#[test]
fn accepting_is_one_undoable_step_that_keeps_the_question() {
    let mut s = loaded_state();
    let before = s.recipe.recipe.clone();
    cmd(&mut s, Command::OpenBalance);
    let new: Vec<Amount> = answer(&s).recipe.lines.iter().map(|l| l.amount).collect();
    let asked = panel(&s).request.targets.clone();
    cmd(&mut s, Command::AcceptBalance);
    assert!(s.recipe.balance.is_none(), "the panel closes");
    assert_eq!(s.context(), Context::Recipe);
    let now: Vec<Amount> = s.recipe.recipe.lines.iter().map(|l| l.amount).collect();
    assert_eq!(now, new);
    assert_eq!(s.recipe.recipe.balance.targets, asked);
    assert!(s.recipe.is_dirty());
    cmd(&mut s, Command::Undo);
    assert_eq!(
        s.recipe.recipe, before,
        "one undo takes back amounts and targets"
    );
    cmd(&mut s, Command::Redo);
    assert_eq!(s.recipe.recipe.balance.targets, asked);
}

#[test]
fn cancel_leaves_the_recipe_as_it_was() {
    let mut s = loaded_state();
    let before = s.recipe.recipe.clone();
    cmd(&mut s, Command::OpenBalance);
    cmd(&mut s, Command::AddTarget);
    type_text(&mut s, "fat_pct=5..6");
    cmd(&mut s, Command::Confirm);
    cmd(&mut s, Command::Cancel);
    assert!(s.recipe.balance.is_none());
    assert_eq!(s.recipe.recipe, before);
    assert!(!s.recipe.is_dirty());
    assert!(s.recipe.undo.is_empty());
}

#[test]
fn an_impossible_question_is_explained_and_cannot_be_accepted() {
    let mut s = loaded_state();
    let before = s.recipe.recipe.clone();
    cmd(&mut s, Command::OpenBalance);
    // Nothing in the recipe holds more than heavy cream's 37 % fat (USDA SR
    // Legacy 01053), so 40 % of the mix cannot be fat.
    to_target(&mut s, "fat_pct");
    cmd(&mut s, Command::EditBalanceRow);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "40..45");
    cmd(&mut s, Command::Confirm);
    let b = answer(&s);
    assert_eq!(b.status, Status::Infeasible);
    assert!(
        b.conflicts
            .iter()
            .any(|c| c.targets.contains(&"fat_pct".to_string()))
    );
    cmd(&mut s, Command::AcceptBalance);
    assert!(
        s.message
            .as_ref()
            .is_some_and(|m| m.is_error && m.text.contains("cannot all be met"))
    );
    assert!(s.recipe.balance.is_some(), "the panel stays open");
    assert_eq!(s.recipe.recipe, before);
}

#[test]
fn prices_are_kept_in_the_log_and_least_cost_uses_them() {
    let mut s = loaded_state();
    cmd(&mut s, Command::OpenBalance);
    cmd(&mut s, Command::SwitchObjective);
    match &panel(&s).answer {
        Err(e) => assert!(e.contains("missing") && e.contains("whole-milk"), "{e}"),
        Ok(b) => panic!("least cost without prices: {:?}", b.status),
    }
    // Invented prices of the harbour wholesaler, per kg.
    let prices = [0.95, 3.8, 4.2, 1.15, 1.6, 14.0];
    cmd(&mut s, Command::First);
    for (k, price) in prices.iter().enumerate() {
        cmd(&mut s, Command::SetPrice);
        cmd(&mut s, Command::ClearField);
        type_text(&mut s, &price.to_string());
        let effects = cmd(&mut s, Command::Confirm);
        let id = s.recipe.recipe.lines[k].ingredient.clone();
        assert!(
            effects.iter().any(|e| matches!(e, Effect::SaveSettings(settings) if settings.prices_per_kg.get(&id) == Some(price))),
            "the price of {id} is stored: {effects:?}"
        );
        cmd(&mut s, Command::Down);
    }
    let b = answer(&s);
    assert_eq!(b.status, Status::Balanced);
    let cost: f64 = b
        .lines
        .iter()
        .zip(prices)
        .map(|(l, p)| l.g * p / 1000.0)
        .sum();
    assert!(b.cost.is_some_and(|c| (c - cost).abs() < 1e-9));
    // A price is refused when it is no price.
    cmd(&mut s, Command::First);
    cmd(&mut s, Command::SetPrice);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "-2");
    cmd(&mut s, Command::Confirm);
    assert!(prompt_error(&s).is_some_and(|e| e.contains("zero or more")));
}

#[test]
fn reduce_to_strength_takes_water_as_one_step() {
    let mut s = liqueur_state();
    let before = s.recipe.recipe.clone();
    cmd(&mut s, Command::ReduceToStrength);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "20");
    cmd(&mut s, Command::Confirm);
    assert!(s.overlay.is_none(), "{:?}", s.overlay);
    let abv = s.recipe.analysis.as_ref().map_or(f64::NAN, |a| a.abv_pct);
    assert!((abv - 20.0).abs() <= 0.05, "{abv} % vol");
    // Only the water changed.
    for (b, a) in before.lines.iter().zip(&s.recipe.recipe.lines) {
        if b.ingredient != "water" {
            assert_eq!(b.amount, a.amount);
        }
    }
    assert!(
        s.message
            .as_ref()
            .is_some_and(|m| m.text.contains("off the heat"))
    );
    cmd(&mut s, Command::Undo);
    assert_eq!(s.recipe.recipe, before);
    // Water cannot make it stronger than its spirit and sugar alone.
    cmd(&mut s, Command::ReduceToStrength);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "60");
    cmd(&mut s, Command::Confirm);
    assert!(prompt_error(&s).is_some_and(|e| e.contains("water alone cannot reach")));
}

#[test]
fn reduce_to_strength_is_refused_without_alcohol() {
    let mut s = loaded_state();
    cmd(&mut s, Command::ReduceToStrength);
    assert!(s.overlay.is_none());
    assert!(
        s.message
            .as_ref()
            .is_some_and(|m| m.text.contains("no alcohol"))
    );
}

#[test]
fn with_fahrenheit_settings_the_panel_reads_and_shows_temperatures_in_fahrenheit() {
    use gelu::model::units::TempUnit;
    let mut s = loaded_state();
    s.settings.temp_unit = TempUnit::Fahrenheit;
    // -13 °C is 8.6 °F (F = C x 9/5 + 32).
    cmd(&mut s, Command::OpenBalance);
    let screen = crate::common::draw(&s, 120, 40);
    assert!(screen.contains("frozen_at.8.6°F"), "{screen}");
    assert!(!screen.contains("frozen_at.-13"), "{screen}");
    // A bare temperature is in the settings' unit: 28 °F is -2.22 °C.
    cmd(&mut s, Command::AddTarget);
    type_text(&mut s, "freezing_point_c=28..30");
    cmd(&mut s, Command::Confirm);
    assert!(s.overlay.is_none(), "{:?}", prompt_error(&s));
    let t = panel(&s)
        .request
        .targets
        .iter()
        .find(|t| t.figure == Figure::FreezingPointC)
        .cloned();
    let (low, high) = t.map_or((f64::NAN, f64::NAN), |t| {
        (t.low.unwrap_or(f64::NAN), t.high.unwrap_or(f64::NAN))
    });
    assert!((low - (-2.222)).abs() < 0.001, "{low}");
    assert!((high - (-1.111)).abs() < 0.001, "{high}");
    let screen = crate::common::draw(&s, 120, 40);
    assert!(screen.contains("28..30"), "{screen}");
    // A frozen share at a temperature typed with its unit: 14 °F is -10 °C.
    cmd(&mut s, Command::AddTarget);
    type_text(&mut s, "frozen_at.14F=0.6..0.7");
    cmd(&mut s, Command::Confirm);
    assert!(s.overlay.is_none(), "{:?}", prompt_error(&s));
    assert!(
        names(&s).contains(&"frozen_at.-10".to_string()),
        "{:?}",
        names(&s)
    );
    // A freezing point of 28..30 °F and 60-70 % frozen at 14 °F cannot hold
    // together here, and the advice speaks °F too.
    assert_eq!(answer(&s).status, Status::Infeasible);
    let advice: Vec<String> = answer(&s)
        .conflicts
        .iter()
        .flat_map(|c| c.relax.clone())
        .collect();
    assert!(
        advice
            .iter()
            .any(|a| a.contains("the freezing point to") && a.contains("(asked at least 28 °F)")),
        "{advice:?}"
    );
    assert!(advice.iter().all(|a| !a.contains("°C")), "{advice:?}");
    // Editing the cabinet share keeps its temperature.
    to_target(&mut s, "frozen_at.-13");
    cmd(&mut s, Command::EditBalanceRow);
    cmd(&mut s, Command::ClearField);
    type_text(&mut s, "0.6..0.66");
    cmd(&mut s, Command::Confirm);
    assert!(
        names(&s).contains(&"frozen_at.-13".to_string()),
        "{:?}",
        names(&s)
    );
}

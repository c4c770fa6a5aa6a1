//! The balance panel's half of `update`: the question prefilled from the
//! recipe's own targets or its style, targets edited, lines let move or held,
//! prices kept in the batch log, the objective switched, the answer solved
//! again after every change, and accepted as one undoable step or cancelled.
//! Also the quick "reduce to strength" of the recipe screen. Balancing is
//! pure and takes milliseconds, so it runs right here in `update`.

use crate::analysis::targets_for;
use crate::balance::{
    Figure, Objective, Request, Status, Target, WATER_ID, balance, parse_target, reduce_to_strength,
};
use crate::catalog::{Catalog, suggest_text};
use crate::model::units::{TempUnit, parse_number, trim_number};
use crate::model::{Recipe, Style};

use super::super::action::{Command, Effect};
use super::super::keymap::key_label;
use super::super::state::{
    BalancePanel, Context, PromptPurpose, State, name_in_celsius, shown_name, shown_range,
    value_in_celsius,
};
use super::common::{move_cursor, prompt};
use super::recipe::change;

/// Share of the water frozen where a frozen dessert is served: 65-70 % is
/// scoopable (Mullan, "Controlling the hardness of ice cream, gelato and
/// similar frozen desserts").
pub const SCOOPABLE_FROZEN: (f64, f64) = (0.65, 0.70);

fn round(x: f64, places: i32) -> f64 {
    let scale = 10f64.powi(places);
    (x * scale).round() / scale
}

/// The question the panel opens with: the recipe's own targets when it has
/// some, else its style's usual ranges (and where it must stand), with the
/// recipe's own rules, `vary` and prices. Returns it and where it came from.
pub fn prefill(state: &State) -> (Request, String) {
    let recipe = &state.recipe.recipe;
    let mut request = recipe.balance.clone();
    if !request.targets.is_empty() {
        return (request, "this recipe's own targets".into());
    }
    let Ok(a) = &state.recipe.analysis else {
        return (request, "nothing yet: add a target".into());
    };
    let source = if recipe.style.is_drink() {
        request
            .targets
            .push(Target::value(Figure::VolumeMl, round(a.volume_ml, 0)));
        request
            .targets
            .push(Target::value(Figure::AbvPct, round(a.abv_pct, 2)));
        if recipe.style == Style::Liqueur {
            request
                .targets
                .push(Target::value(Figure::SugarGPerL, round(a.sugar_g_per_l, 1)));
        }
        "the recipe's volume, strength and sugar as they stand: change them (Enter)".to_string()
    } else {
        request
            .targets
            .push(Target::value(Figure::MassG, round(a.mass_g, 0)));
        let usual = targets_for(recipe.style);
        for (figure, range) in [
            (Figure::FatPct, usual.fat),
            (Figure::MsnfPct, usual.msnf),
            (Figure::TotalSolidsPct, usual.total_solids),
        ] {
            if let Some((low, high)) = range {
                request.targets.push(Target::range(figure, low, high));
            }
        }
        let cabinet_c = state.settings.cabinet_temp_c;
        if cabinet_c < 0.0 {
            let (low, high) = SCOOPABLE_FROZEN;
            request.targets.push(Target::range(
                Figure::FrozenAt {
                    temp_c: round(cabinet_c, 1),
                },
                low,
                high,
            ));
        }
        format!(
            "the usual ranges for {} and {:.0}-{:.0} % frozen in the cabinet",
            recipe.style.as_str(),
            100.0 * SCOOPABLE_FROZEN.0,
            100.0 * SCOOPABLE_FROZEN.1
        )
    };
    request.sort_targets();
    (request, source)
}

/// Opens the panel on the recipe in the editor and solves.
pub fn open(state: &mut State) {
    if state.recipe.recipe.lines.is_empty() {
        state.warn("There is nothing to balance yet: add lines first (a).");
        return;
    }
    let (request, source) = prefill(state);
    state.recipe.balance = Some(BalancePanel {
        request,
        source,
        cursor: 0,
        answer: Err(String::new()),
    });
    solve(state);
}

/// The recipe as balancing sees it in the workspace: with the settings'
/// serving share when the recipe sets none, as the analysis does.
fn recipe_for_balancing(state: &State) -> Recipe {
    let mut recipe = state.recipe.recipe.clone();
    if recipe.serving_frozen_fraction.is_none() {
        recipe.serving_frozen_fraction = Some(state.settings.serving_frozen_fraction);
    }
    recipe
}

/// Solves the panel's question again.
pub fn solve(state: &mut State) {
    let recipe = recipe_for_balancing(state);
    let prices = state.settings.prices_per_kg.clone();
    let unit = state.settings.temp_unit;
    let Some(panel) = state.recipe.balance.as_mut() else {
        return;
    };
    let mut request = panel.request.clone();
    request.advice_unit = unit;
    // The recipe's own prices come first; the batch log's fill the gaps.
    for (id, price) in prices {
        request.prices_per_kg.entry(id).or_insert(price);
    }
    panel.answer = if request.targets.is_empty() {
        Err(format!(
            "No targets: add one ({}).",
            key_label(Context::Balance, Command::AddTarget)
        ))
    } else {
        balance(&recipe, Catalog::builtin(), &request).map_err(|e| e.to_string())
    };
}

/// The distinct ingredient ids of the recipe's lines, in order.
fn line_ids(recipe: &Recipe) -> Vec<String> {
    let mut ids: Vec<String> = Vec::new();
    for l in &recipe.lines {
        if !ids.contains(&l.ingredient) {
            ids.push(l.ingredient.clone());
        }
    }
    ids
}

/// Lets the lines of `id` move, or holds them.
fn toggle_move(request: &mut Request, ids: &[String], id: &str) {
    if request.may_vary(id) {
        let movable: Vec<String> = ids
            .iter()
            .filter(|x| x.as_str() != id && request.may_vary(x))
            .cloned()
            .collect();
        request.vary = Some(movable);
        return;
    }
    if let Some(rule) = request.rules.get_mut(id) {
        rule.fixed = false;
        if rule.is_empty() {
            request.rules.remove(id);
        }
    }
    if let Some(vary) = &mut request.vary {
        if !vary.iter().any(|x| x == id) {
            vary.push(id.to_string());
        }
        if ids.iter().all(|x| vary.contains(x)) {
            request.vary = None;
        }
    }
}

/// The panel, for a short change.
fn panel(state: &mut State) -> Option<&mut BalancePanel> {
    state.recipe.balance.as_mut()
}

/// Handles a command while the panel is open.
pub fn command(state: &mut State, command: Command) -> Vec<Effect> {
    let lines = state.recipe.recipe.lines.len();
    let Some((cursor, targets, target)) = state
        .recipe
        .balance
        .as_ref()
        .map(|p| (p.cursor, p.request.targets.len(), p.target_at_cursor(lines)))
    else {
        return Vec::new();
    };
    let rows = lines + targets;
    match command {
        c if c.moves_cursor() => {
            if let Some(p) = panel(state) {
                p.cursor = move_cursor(cursor, rows, command);
            }
        }
        Command::EditBalanceRow => match target {
            Some(k) => {
                let Some(t) = state
                    .recipe
                    .balance
                    .as_ref()
                    .and_then(|p| p.request.targets.get(k))
                else {
                    return Vec::new();
                };
                let unit = state.settings.temp_unit;
                let title = format!(
                    "Range of {}: a value like 7, or LOW..HIGH like 6..9",
                    shown_name(&t.figure, unit)
                );
                let text = shown_range(t, unit);
                prompt(state, PromptPurpose::BalanceTarget(Some(k)), title, text);
            }
            None => {
                let ids = line_ids(&state.recipe.recipe);
                let Some(id) = state
                    .recipe
                    .recipe
                    .lines
                    .get(cursor)
                    .map(|l| l.ingredient.clone())
                else {
                    return Vec::new();
                };
                if let Some(p) = panel(state) {
                    toggle_move(&mut p.request, &ids, &id);
                }
                solve(state);
            }
        },
        Command::AddTarget => prompt(
            state,
            PromptPurpose::BalanceTarget(None),
            format!(
                "Add a target, like fat_pct=6..9 or frozen_at.{}=0.65..0.70 (temperatures in {})",
                match state.settings.temp_unit {
                    TempUnit::Celsius => "-12",
                    TempUnit::Fahrenheit => "10",
                },
                state.settings.temp_unit.symbol()
            ),
            String::new(),
        ),
        Command::DeleteTarget => match target {
            Some(k) => {
                if let Some(p) = panel(state) {
                    p.request.targets.remove(k);
                    p.cursor = cursor.min(rows.saturating_sub(2));
                }
                solve(state);
            }
            None => state.tell("Put the cursor on a target to remove it."),
        },
        Command::SwitchObjective => {
            if let Some(p) = panel(state) {
                p.request.objective = match p.request.objective {
                    Objective::Nearest => Objective::Cost,
                    Objective::Cost => Objective::Nearest,
                };
            }
            solve(state);
        }
        Command::SetPrice => open_price(state, cursor),
        Command::AcceptBalance => accept_answer(state),
        Command::Cancel => {
            state.recipe.balance = None;
            state.tell("Balancing closed; the recipe is as it was.");
        }
        _ => {}
    }
    Vec::new()
}

fn open_price(state: &mut State, cursor: usize) {
    let Some(line) = state.recipe.recipe.lines.get(cursor) else {
        state.tell("Put the cursor on a line to set the price of its ingredient.");
        return;
    };
    let id = line.ingredient.clone();
    if let Some(p) = state.recipe.recipe.balance.prices_per_kg.get(&id) {
        state.tell(format!(
            "This recipe's own price for {id} is used ({} per kg); change it in the recipe's file.",
            trim_number(*p)
        ));
        return;
    }
    let text = state
        .settings
        .prices_per_kg
        .get(&id)
        .map(|p| trim_number(*p))
        .unwrap_or_default();
    let title = format!("{}: price per kg (empty: none)", state.display_name(&id));
    prompt(state, PromptPurpose::Price(id), title, text);
}

fn accept_answer(state: &mut State) {
    let Some(panel) = &state.recipe.balance else {
        return;
    };
    let answer = match &panel.answer {
        Ok(b) if b.status == Status::Balanced => b.recipe.clone(),
        Ok(_) => {
            state.warn(format!(
                "The targets cannot all be met, so there is nothing to accept: change a target or let more lines move ({} leaves the recipe as it was).",
                key_label(Context::Balance, Command::Cancel)
            ));
            return;
        }
        Err(e) => {
            let e = e.clone();
            state.warn(format!("Nothing to accept: {e}"));
            return;
        }
    };
    let mut question = panel.request.clone();
    question.sort_targets();
    change(state, |r| {
        for (line, new) in r.lines.iter_mut().zip(&answer.lines) {
            line.amount = new.amount;
        }
        r.balance = question;
    });
    state.recipe.balance = None;
    state.tell(format!(
        "Balanced: the new amounts and the targets are in the recipe ({} undoes both).",
        key_label(Context::Recipe, Command::Undo)
    ));
}

/// Accepts a prompt of the panel or of "reduce to strength"; `Err` keeps the
/// prompt open with the reason.
pub fn accept(
    state: &mut State,
    purpose: &PromptPurpose,
    text: &str,
) -> Result<Vec<Effect>, String> {
    match purpose {
        PromptPurpose::BalanceTarget(at) => {
            let target = read_target(state, *at, text)?;
            let lines = state.recipe.recipe.lines.len();
            if let Some(panel) = state.recipe.balance.as_mut() {
                match at {
                    Some(k) if *k < panel.request.targets.len() => {
                        panel.request.targets[*k] = target;
                    }
                    _ => {
                        let figure = target.figure.clone();
                        panel.request.set_target(target);
                        panel.request.sort_targets();
                        if let Some(k) = panel
                            .request
                            .targets
                            .iter()
                            .position(|t| t.figure == figure)
                        {
                            panel.cursor = lines + k;
                        }
                    }
                }
            }
            solve(state);
            Ok(Vec::new())
        }
        PromptPurpose::Price(id) => {
            if text.trim().is_empty() {
                state.settings.prices_per_kg.remove(id);
            } else {
                let p = parse_number(text)?;
                if p < 0.0 {
                    return Err("a price is zero or more per kg".into());
                }
                state.settings.prices_per_kg.insert(id.clone(), p);
            }
            solve(state);
            Ok(vec![Effect::SaveSettings(state.settings.clone())])
        }
        PromptPurpose::ReduceToStrength => reduce(state, text),
        _ => Ok(Vec::new()),
    }
}

/// Reads a target typed into the panel: as on the command line, but with both
/// ends (or one value), the form a recipe file keeps.
fn read_target(state: &State, at: Option<usize>, text: &str) -> Result<Target, String> {
    // Temperatures are read in the settings' unit and kept in °C, as files keep them.
    let unit = state.settings.temp_unit;
    let full = match at {
        Some(k) => {
            let Some(figure) = state
                .recipe
                .balance
                .as_ref()
                .and_then(|p| p.request.targets.get(k))
                .map(|t| t.figure.clone())
            else {
                return Err("that target is gone".into());
            };
            format!(
                "{}={}",
                figure.name(),
                value_in_celsius(&figure, text, unit)?
            )
        }
        None => match text.split_once('=') {
            Some((name, value)) => {
                let name = name_in_celsius(name, unit)?;
                match Figure::parse(&name) {
                    Ok(figure) => format!("{name}={}", value_in_celsius(&figure, value, unit)?),
                    Err(_) => format!("{name}={value}"),
                }
            }
            None => text.to_string(),
        },
    };
    let target = parse_target(&full).map_err(|e| e.to_string())?;
    if target.low.is_none() || target.high.is_none() {
        return Err(
            "give one value (20) or both ends (18..22), the form a recipe file keeps".into(),
        );
    }
    if let Figure::SolutePct(id) = &target.figure
        && Catalog::builtin().solute(id).is_none()
        && !state.recipe.recipe.solutes.iter().any(|s| &s.id == id)
    {
        return Err(format!(
            "no solute has the id `{id}`{}",
            suggest_text(&Catalog::builtin().nearest_solutes(id))
        ));
    }
    Ok(target)
}

/// Opens the "reduce to strength" prompt (spirits and liqueurs).
pub fn ask_strength(state: &mut State) {
    let abv = match &state.recipe.analysis {
        Ok(a) if a.abv_pct > 0.0 => a.abv_pct,
        Ok(_) => {
            state.warn(
                "Reduce to strength is for spirits and liqueurs: this recipe holds no alcohol.",
            );
            return;
        }
        Err(_) => {
            state.warn("There is nothing to reduce yet: add lines first (a).");
            return;
        }
    };
    prompt(
        state,
        PromptPurpose::ReduceToStrength,
        "Reduce to strength: % vol at 20 °C (water is added or taken away)".into(),
        format!("{abv:.2}"),
    );
}

fn reduce(state: &mut State, text: &str) -> Result<Vec<Effect>, String> {
    let abv = parse_number(text.trim().trim_end_matches("% vol").trim_end_matches('%'))?;
    Target::value(Figure::AbvPct, abv)
        .validate()
        .map_err(|e| e.to_string())?;
    let recipe = recipe_for_balancing(state);
    let b = reduce_to_strength(&recipe, Catalog::builtin(), abv).map_err(|e| e.to_string())?;
    if b.status != Status::Balanced {
        let why = b
            .conflicts
            .iter()
            .flat_map(|c| c.relax.iter())
            .find(|r| r.contains("strength"))
            .cloned()
            .unwrap_or_else(|| "the other lines hold too much or too little alcohol".into());
        return Err(format!("water alone cannot reach {abv} % vol: {why}"));
    }
    let water = b.lines.iter().filter(|l| l.ingredient == WATER_ID);
    let before_g: f64 = water.clone().map(|l| l.before_g).sum();
    let after_g: f64 = water.map(|l| l.g).sum();
    let lines = b.recipe.lines;
    change(state, |r| r.lines = lines);
    state.tell(format!(
        "Reduced to {abv} % vol: water {after_g:.1} g (was {before_g:.1} g); {} undoes it. Add spirits off the heat, away from flames.",
        key_label(Context::Recipe, Command::Undo)
    ));
    Ok(Vec::new())
}

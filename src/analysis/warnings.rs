//! Warnings in plain words, and the cautions of safe practice. Each threshold
//! names its source beside it, or says that it is common practice or our own
//! limit; each message says what its threshold says.

use serde::Serialize;

use crate::catalog::Catalog;
use crate::model::{Category, Style, TempUnit};

use super::classic::{classic_frozen_fraction, classic_temp_for_frozen_fraction};
use super::{Analysis, FreezerBehaviour, Mix, targets_for};

/// How much a warning matters.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Severity {
    /// The product will likely fail (freeze solid, never set).
    Problem,
    /// Worth a look: a target missed, a texture risk.
    Advice,
    /// About the model itself: where its numbers are less sure.
    Note,
}

/// One warning.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Warning {
    /// Stable kebab-case code (a public contract).
    pub code: &'static str,
    /// How much it matters.
    pub severity: Severity,
    /// Plain-words message.
    pub message: String,
}

/// Lactose per 100 g of the mix's water above which it tends to crystallise
/// (sandy texture): about 9-10 g, the Hyde & Rothwell (1973) rule of thumb as
/// REFERENCES.md §6 gives it.
pub const LACTOSE_SANDY_G_PER_100G_WATER: f64 = 10.0;
/// Ethanol (mass %) above which an ice cream hardly sets unless the sugar is cut
/// (common practice, PRACTICE.md).
pub const ETHANOL_SET_LIMIT_PCT: f64 = 3.0;
/// Lower end of the share of water frozen that scoops best: about 65-70 % at
/// serving temperature (Mullan, "Controlling the hardness of ice cream, gelato
/// and similar frozen desserts", as PRACTICE.md gives it).
pub const SCOOPABLE_LOW_FROZEN_FRACTION: f64 = 0.65;
/// Upper end of the share that scoops best (Mullan, as above).
pub const SCOOPABLE_HIGH_FROZEN_FRACTION: f64 = 0.70;
/// Frozen share under which a dessert is too soft: about 60 % (PRACTICE.md).
pub const SOFT_FROZEN_FRACTION: f64 = 0.60;
/// Frozen share over which a dessert is too hard: about 78-80 % (PRACTICE.md);
/// the lower end is used, so "too hard" starts where the source allows it.
pub const HARD_FROZEN_FRACTION: f64 = 0.78;
/// Share of the sweeteners as glucose above which dextrose tends to granulate in
/// a syrup or liqueur kept at room temperature: about a quarter (common
/// practice, PRACTICE.md).
pub const DEXTROSE_GRANULATION_SHARE: f64 = 0.25;
/// Sucrose per 100 g of water at saturation at 0 °C: 179 g (sugar-analysis
/// handbooks, REFERENCES.md §6).
pub const SUCROSE_SOLUBILITY_0C_G_PER_100G_WATER: f64 = 179.0;
/// Slack (mass %) before a composition counts as outside a style's range: the
/// ranges are given to a tenth of a percent (rounding, not a rule).
const STYLE_TARGET_SLACK_PCT: f64 = 0.05;
/// EU minimum for a liqueur: 15 % vol and 100 g/L of sugar (Reg. (EU) 2019/787).
const LIQUEUR_MIN_ABV_PCT: f64 = 15.0;
/// EU minimum sugar of a liqueur (g/L, expressed as invert sugar; Reg. (EU) 2019/787).
const LIQUEUR_MIN_SUGAR_G_PER_L: f64 = 100.0;
/// Dairy fat (mass %) from which a liqueur is a cream liqueur for the
/// stability cautions (our limit: more than a trace of cream or milk).
const CREAM_LIQUEUR_MIN_FAT_PCT: f64 = 1.0;

/// The warnings for an analysis, most serious first.
pub fn warnings(a: &Analysis, mix: &Mix, catalog: &Catalog, unit: TempUnit) -> Vec<Warning> {
    let fmt_temp = |t: f64| unit.format(t);
    let mut w = Vec::new();
    let mut add = |code, severity, message: String| {
        w.push(Warning {
            code,
            severity,
            message,
        })
    };
    let water_g = mix.water_g;
    if water_g <= 0.0 {
        add(
            "no-water",
            Severity::Note,
            "The mix holds no water, so nothing in it can freeze.".into(),
        );
    }
    let frozen_dessert = !a.style.is_drink();
    // Ethanol in a frozen dessert.
    if frozen_dessert && a.composition.ethanol_pct > ETHANOL_SET_LIMIT_PCT {
        add(
            "too-much-ethanol",
            Severity::Problem,
            format!(
                "{:.1} % ethanol by mass: above about {ETHANOL_SET_LIMIT_PCT} % an ice cream hardly sets unless the sugar is cut; \
                 at the freezer ({}) only {:.0} % of its water is ice.",
                a.composition.ethanol_pct,
                fmt_temp(a.freezer.temp_c),
                100.0 * a.freezer.frozen_fraction
            ),
        );
    }
    // Drinks in the freezer, in the tiers of `FreezerBehaviour`.
    if a.style.is_drink() && water_g > 0.0 {
        let share = 100.0 * a.freezer.frozen_fraction;
        let t = fmt_temp(a.freezer.temp_c);
        match a.freezer_behaviour {
            FreezerBehaviour::NoIce => {}
            FreezerBehaviour::AFewCrystals => add(
                "crystals-in-freezer",
                Severity::Note,
                format!(
                    "At {t} a few ice crystals form: {share:.1} % of its water is ice; it still pours."
                ),
            ),
            FreezerBehaviour::Slush => add(
                "slush-in-freezer",
                Severity::Advice,
                format!("At {t} this turns to slush: {share:.0} % of its water is ice."),
            ),
            FreezerBehaviour::Frozen => add(
                "freezes-in-freezer",
                Severity::Problem,
                format!("At {t} this freezes nearly solid: {share:.0} % of its water is ice."),
            ),
        }
    }
    // Texture at the cabinet.
    if frozen_dessert
        && water_g > 0.0
        && let Some((code, message)) = texture(a, &fmt_temp)
    {
        add(code, Severity::Advice, message);
    }
    // Lactose crystallisation.
    if water_g > 0.0 {
        let lactose_per_water = 100.0 * mix.solute_g("lactose") / water_g;
        if lactose_per_water > LACTOSE_SANDY_G_PER_100G_WATER {
            add(
                "lactose-sandy",
                Severity::Advice,
                format!(
                    "{lactose_per_water:.1} g lactose per 100 g water: above about {LACTOSE_SANDY_G_PER_100G_WATER} g lactose is likely to crystallise in storage (sandy texture). Cut milk solids or add other solids."
                ),
            );
        }
        let glucose = mix.solute_g("glucose");
        let sweeteners = a.sweeteners_pct * a.mass_g / 100.0;
        let kept_at_room_temperature = a.style.is_drink() || a.style == Style::Other;
        if kept_at_room_temperature
            && sweeteners > 0.0
            && glucose / sweeteners > DEXTROSE_GRANULATION_SHARE
        {
            add(
                "dextrose-granulation",
                Severity::Advice,
                format!(
                    "Glucose is {:.0} % of the sweeteners: in a syrup or liqueur kept at room temperature, dextrose over about a quarter of the sugars tends to granulate in storage (common practice). Keep it cool, or move some of it to sucrose or fructose.",
                    100.0 * glucose / sweeteners
                ),
            );
        }
        let sucrose_per_water = 100.0 * mix.solute_g("sucrose") / water_g;
        if sucrose_per_water > SUCROSE_SOLUBILITY_0C_G_PER_100G_WATER {
            add(
                "sucrose-saturated",
                Severity::Advice,
                format!(
                    "{sucrose_per_water:.0} g sucrose per 100 g water is past its solubility at 0 °C ({SUCROSE_SOLUBILITY_0C_G_PER_100G_WATER} g): it may crystallise."
                ),
            );
        }
    }
    // Style targets.
    let targets = targets_for(a.style);
    let style = a.style.as_str();
    let checks = [
        ("fat", a.composition.fat_pct, targets.fat),
        ("MSNF", a.composition.msnf_pct, targets.msnf),
        ("sweeteners", a.sweeteners_pct, targets.sweeteners),
        (
            "total solids",
            a.composition.total_solids_pct,
            targets.total_solids,
        ),
    ];
    for (what, value, range) in checks {
        if let Some((lo, hi)) = range {
            let side = if value < lo - STYLE_TARGET_SLACK_PCT {
                "below"
            } else if value > hi + STYLE_TARGET_SLACK_PCT {
                "above"
            } else {
                continue;
            };
            add(
                "style-target",
                Severity::Advice,
                format!("{what} {value:.1} % is {side} the usual {lo}-{hi} % for {style}."),
            );
        }
    }
    if a.style == Style::Liqueur
        && (a.abv_pct < LIQUEUR_MIN_ABV_PCT || a.sugar_g_per_l < LIQUEUR_MIN_SUGAR_G_PER_L)
    {
        add(
            "liqueur-minimum",
            Severity::Advice,
            format!(
                "{:.1} % vol and {:.0} g/L sugar: the EU minimum for a liqueur is 15 % vol and 100 g/L (Reg. 2019/787); check the rules where you sell.",
                a.abv_pct, a.sugar_g_per_l
            ),
        );
    }
    // Limits of the model.
    if let Some(t) = a.glass_limit_temp_c.filter(|t| *t > -40.0) {
        add(
            "freeze-concentration-limit",
            Severity::Note,
            format!(
                "Below {} the unfrozen syrup reaches about 80 % solids and stops freezing; the curve is held flat there.",
                fmt_temp(t)
            ),
        );
    }
    // Where the figures rest on measured data, and where on the continuations.
    if let Some(message) = continuation_note(a, mix, catalog, &fmt_temp) {
        add("serum-beyond-data", Severity::Note, message);
    }
    if a.freezing_point_c.is_none() && water_g > 0.0 {
        add(
            "freezing-point-below-range",
            Severity::Note,
            "The freezing point lies below -60 °C, outside the model's range.".into(),
        );
    }
    w.sort_by_key(|w| w.severity);
    w
}

/// The texture warning at the cabinet, graded against the scoopable share:
/// too soft, a little soft, (scoopable: nothing), a little hard, too hard.
fn texture(a: &Analysis, fmt_temp: &dyn Fn(f64) -> String) -> Option<(&'static str, String)> {
    let f = a.cabinet.frozen_fraction;
    let t = fmt_temp(a.cabinet.temp_c);
    let serve = a
        .serving_temp_c
        .map_or_else(|| format!("below {}", fmt_temp(-60.0)), fmt_temp);
    let share = |x: f64| format!("{:.0} %", 100.0 * x);
    let reaches = format!("it reaches {} at {serve}", share(a.serving_frozen_fraction));
    let scoop = format!(
        "{:.0}-{}",
        100.0 * SCOOPABLE_LOW_FROZEN_FRACTION,
        share(SCOOPABLE_HIGH_FROZEN_FRACTION)
    );
    let (code, message) = if f < SOFT_FROZEN_FRACTION {
        (
            "soft-at-cabinet",
            format!(
                "Too soft in the cabinet: at {t} only {} of the water is frozen, under the about {} below which a dessert is too soft to hold a scoop (it scoops best at about {scoop}, Mullan); {reaches}.",
                share(f),
                share(SOFT_FROZEN_FRACTION)
            ),
        )
    } else if f < SCOOPABLE_LOW_FROZEN_FRACTION {
        (
            "a-little-soft-at-cabinet",
            format!(
                "A little soft in the cabinet: at {t} {} of the water is frozen, under the about {scoop} that scoops best (Mullan) but not yet under the about {} where it is too soft; {reaches}.",
                share(f),
                share(SOFT_FROZEN_FRACTION)
            ),
        )
    } else if f <= SCOOPABLE_HIGH_FROZEN_FRACTION {
        return None;
    } else if f <= HARD_FROZEN_FRACTION {
        (
            "a-little-hard-at-cabinet",
            format!(
                "A little hard in the cabinet: at {t} {} of the water is frozen, over the about {scoop} that scoops best (Mullan) but not yet over the about {} where it is too hard; {reaches}.",
                share(f),
                share(HARD_FROZEN_FRACTION)
            ),
        )
    } else {
        (
            "hard-at-cabinet",
            format!(
                "Too hard in the cabinet: at {t} {} of the water is frozen, over the about {} (78-80 %) above which a dessert is too hard to scoop (it scoops best at about {scoop}, Mullan); {reaches}.",
                share(f),
                share(HARD_FROZEN_FRACTION)
            ),
        )
    };
    Some((code, message))
}

/// The note, said once, that the figures the user sees lie where the curve rests
/// on the continuations beyond the measured data, with how far the classic
/// sucrose-equivalent method agrees there. `None` when no shown figure lies
/// beyond the data.
fn continuation_note(
    a: &Analysis,
    mix: &Mix,
    catalog: &Catalog,
    fmt_temp: &dyn Fn(f64) -> String,
) -> Option<String> {
    let limit = a.data_limit_temp_c?;
    let beyond = |t: f64| t < limit;
    let share = |x: f64| format!("{:.0} %", 100.0 * x);
    // (what the user sees, and the classic method's take on the same figure)
    let mut figures: Vec<(String, Option<String>)> = Vec::new();
    if !a.style.is_drink()
        && let Some(t) = a.serving_temp_c.filter(|t| beyond(*t))
    {
        let classic = classic_temp_for_frozen_fraction(mix, catalog, a.serving_frozen_fraction)
            .map(|c| {
                format!(
                    "puts the serving temperature at {} ({:.1} K apart)",
                    fmt_temp(c),
                    (c - t).abs()
                )
            });
        figures.push((
            format!("the serving temperature ({})", fmt_temp(t)),
            classic,
        ));
    }
    let mut point = |what: &str, p: &super::CurvePoint| {
        if beyond(p.temp_c) {
            let classic = classic_frozen_fraction(mix, catalog, p.temp_c).map(|c| {
                format!(
                    "puts the {what} share at {} ({:.0} points apart)",
                    share(c),
                    100.0 * (c - p.frozen_fraction).abs()
                )
            });
            figures.push((
                format!(
                    "the {what} share ({} at {})",
                    share(p.frozen_fraction),
                    fmt_temp(p.temp_c)
                ),
                classic,
            ));
        }
    };
    if !a.style.is_drink() {
        point("cabinet", &a.cabinet);
    }
    point("freezer", &a.freezer);
    let first_classic = figures.iter().find_map(|(_, c)| c.clone());
    let names: Vec<&str> = figures.iter().map(|(n, _)| n.as_str()).collect();
    let list = match names.as_slice() {
        [] => return None,
        [one] => (*one).to_string(),
        [rest @ .., last] => format!("{} and {last}", rest.join(", ")),
    };
    let mut chars = list.chars();
    let list: String = chars
        .next()
        .map(|c| c.to_uppercase().chain(chars).collect())
        .unwrap_or_default();
    let verb = if names.len() == 1 { "lies" } else { "lie" };
    let classic = match (a.classic_applies, first_classic) {
        (true, Some(c)) => format!(
            " The classic sucrose-equivalent method, which continues the same sucrose table, {c}."
        ),
        _ => format!(
            " The classic sucrose-equivalent method offers no check here ({}).",
            a.classic_note
                .as_deref()
                .and_then(|n| n.split_once(": ").map(|(_, why)| why))
                .unwrap_or("it has no figure for this mix")
        ),
    };
    Some(format!(
        "{list} {verb} below {}, where the unfrozen syrup is more concentrated than the measured freezing data of its solutes: there the curve rests on the Norrish and ideal-law continuations, so treat {} as an estimate.{classic}",
        fmt_temp(limit),
        if names.len() == 1 { "it" } else { "each" },
    ))
}

/// The cautions of safe practice that apply to this mix.
pub fn cautions(a: &Analysis, mix: &Mix) -> Vec<String> {
    let mut c = vec![
        "Predictions are estimates for planning: measure the real product, and follow your local food and alcohol codes and licensed practice.".to_string(),
    ];
    let has = |cat| mix.categories.contains(&cat);
    if has(Category::Dairy) || has(Category::Egg) {
        c.push("Pasteurise dairy and egg mixes: in the US 68.3 °C (155 °F) for 30 min or 79.4 °C (175 °F) for 25 s (21 CFR 135.3), custard bases to at least 71 °C (160 °F), or the equivalent your local code approves.".into());
    }
    if !a.allergens.is_empty() {
        c.push(format!(
            "Contains allergens: {}. Label them and guard against cross-contact.",
            a.allergens.join(", ")
        ));
    }
    if a.style.is_drink()
        && a.composition.ethanol_pct > 0.0
        && has(Category::Dairy)
        && a.composition.fat_pct >= CREAM_LIQUEUR_MIN_FAT_PCT
    {
        c.push("Cream liqueur: alcohol and acid curdle cream, so keep acidic ingredients out and blend the spirit into the sweetened cream slowly and cold; homogenise (or use a proven emulsifier) so the fat does not rise; store it cool and dark, and follow licensed practice and your local code for its shelf life.".into());
    }
    if a.composition.ethanol_pct > 0.0 {
        c.push("Spirits give off flammable vapour near room temperature (a 40 % vol spirit flashes at about 26 °C): add them off the heat, away from flames. Label the alcohol content and any age limit where the law requires it.".into());
        c.push("Ethanol makes a refractometer read high: do not read Brix as sugar in an alcoholic mix.".into());
    }
    c
}

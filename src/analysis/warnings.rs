//! Warnings in plain words, and the cautions of safe practice. Thresholds are
//! the trade's rules of thumb (PRACTICE.md), named beside each.

use serde::Serialize;

use crate::model::{Category, Style, TempUnit};

use super::{Analysis, Mix, targets_for};

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
/// (sandy texture): about 9-10 g (Hyde & Rothwell 1973 rule of thumb).
pub const LACTOSE_SANDY_G_PER_100G_WATER: f64 = 10.0;
/// Ethanol (mass %) above which an ice cream hardly sets (common practice).
pub const ETHANOL_SET_LIMIT_PCT: f64 = 3.0;
/// Frozen share at the cabinet under which a dessert is too soft (Mullan; PRACTICE.md).
pub const SOFT_FROZEN_FRACTION: f64 = 0.60;
/// Frozen share at the cabinet over which a dessert is too hard (PRACTICE.md).
pub const HARD_FROZEN_FRACTION: f64 = 0.80;
/// Share of sweeteners as glucose above which a mix tends to granulate (common practice).
pub const DEXTROSE_GRANULATION_SHARE: f64 = 0.25;

/// The warnings for an analysis, most serious first.
pub fn warnings(a: &Analysis, mix: &Mix, unit: TempUnit) -> Vec<Warning> {
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
    // Drinks in the freezer.
    if a.style.is_drink() && water_g > 0.0 {
        let f = a.freezer.frozen_fraction;
        let t = fmt_temp(a.freezer.temp_c);
        if f >= 0.5 {
            add(
                "freezes-in-freezer",
                Severity::Problem,
                format!(
                    "At {t} this freezes nearly solid: {:.0} % of its water is ice.",
                    100.0 * f
                ),
            );
        } else if f > 0.0 {
            add(
                "slush-in-freezer",
                Severity::Advice,
                format!(
                    "At {t} this turns to slush: {:.0} % of its water is ice.",
                    100.0 * f
                ),
            );
        }
    }
    // Texture at the cabinet.
    if frozen_dessert && water_g > 0.0 {
        let f = a.cabinet.frozen_fraction;
        let t = fmt_temp(a.cabinet.temp_c);
        let serve = a
            .serving_temp_c
            .map_or_else(|| format!("below {}", fmt_temp(-60.0)), fmt_temp);
        if f < SOFT_FROZEN_FRACTION {
            add(
                "soft-at-cabinet",
                Severity::Advice,
                format!(
                    "Soft in the cabinet: at {t} only {:.0} % of the water is frozen (scoopable is about 65-70 %); it reaches {:.0} % at {serve}.",
                    100.0 * f,
                    100.0 * a.serving_frozen_fraction
                ),
            );
        } else if f > HARD_FROZEN_FRACTION {
            add(
                "hard-at-cabinet",
                Severity::Advice,
                format!(
                    "Hard in the cabinet: at {t} {:.0} % of the water is frozen (scoopable is about 65-70 %); it reaches {:.0} % at {serve}.",
                    100.0 * f,
                    100.0 * a.serving_frozen_fraction
                ),
            );
        }
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
        if frozen_dessert && sweeteners > 0.0 && glucose / sweeteners > DEXTROSE_GRANULATION_SHARE {
            add(
                "dextrose-granulation",
                Severity::Advice,
                format!(
                    "Glucose is {:.0} % of the sweeteners: above about a quarter, dextrose tends to granulate.",
                    100.0 * glucose / sweeteners
                ),
            );
        }
        let sucrose_per_water = 100.0 * mix.solute_g("sucrose") / water_g;
        if sucrose_per_water > 179.0 {
            add(
                "sucrose-saturated",
                Severity::Advice,
                format!(
                    "{sucrose_per_water:.0} g sucrose per 100 g water is past its solubility at 0 °C (179 g): it may crystallise."
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
            let side = if value < lo - 0.05 {
                "below"
            } else if value > hi + 0.05 {
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
    if a.style == Style::Liqueur && (a.abv_pct < 15.0 || a.sugar_g_per_l < 100.0) {
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
    let coldest_of_interest = if a.style.is_drink() {
        Some(a.freezer.temp_c)
    } else {
        a.serving_temp_c
    };
    if let (Some(limit), Some(t)) = (a.data_limit_temp_c, coldest_of_interest)
        && t < limit
    {
        add(
            "serum-beyond-data",
            Severity::Note,
            format!(
                "Below {} the unfrozen syrup is more concentrated than the measured freezing data of its solutes; \
                 from there down (including {}) the curve rests on the Norrish and ideal-law continuations: treat it as an estimate.",
                fmt_temp(limit),
                fmt_temp(t)
            ),
        );
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
    if a.composition.ethanol_pct > 0.0 {
        c.push("Spirits give off flammable vapour near room temperature (a 40 % vol spirit flashes at about 26 °C): add them off the heat, away from flames. Label the alcohol content and any age limit where the law requires it.".into());
        c.push("Ethanol makes a refractometer read high: do not read Brix as sugar in an alcoholic mix.".into());
    }
    c
}

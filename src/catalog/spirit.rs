//! Neutral spirits at any strength, named in the trade's words:
//! `spirit-57-vol` (alcoholic strength by volume at 20 °C, decimals allowed,
//! like `spirit-37.5-vol`) and `spirit-114-proof` (US proof, twice the strength
//! by volume). Each resolves to ethanol and water with the ethanol mass
//! fraction and the density at 20 °C of OIML R 22.
//!
//! The strengths lie on a grid of 0.05 % vol (0.1 US proof), finer than any
//! label states them (the labelling tolerance is ±0.3 % vol). Every grid point
//! is built on first use and kept for the life of the process, so a lookup
//! hands out a plain reference, and browsing lists only the usual strengths
//! the catalog file names.

use std::collections::BTreeMap;
use std::sync::OnceLock;

use crate::model::{Category, Ingredient};
use crate::thermo::ethanol::{density_20c_kg_m3, mass_fraction_from_abv_pct};

/// Grid step of the strengths that resolve (% vol at 20 °C).
pub const STEP_ABV_PCT: f64 = 0.05;
/// Number of grid points from one step up to 100 % vol.
const STEPS: usize = 2000;

/// How a spirit's strength is written in its id.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StrengthUnit {
    /// % vol at 20 °C: `spirit-40-vol`.
    Vol,
    /// US proof, twice the % vol: `spirit-80-proof`.
    Proof,
}

impl StrengthUnit {
    fn suffix(self) -> &'static str {
        match self {
            StrengthUnit::Vol => "vol",
            StrengthUnit::Proof => "proof",
        }
    }

    /// The number written in the id for a strength of `abv_pct` % vol.
    fn number(self, abv_pct: f64) -> f64 {
        match self {
            StrengthUnit::Vol => abv_pct,
            StrengthUnit::Proof => 2.0 * abv_pct,
        }
    }
}

/// Why an id shaped like a spirit does not name one.
#[derive(Debug, Clone, PartialEq)]
pub struct SpiritIdError {
    /// What is wrong, in words.
    pub why: String,
    /// The nearest id that does resolve.
    pub suggestion: String,
}

/// The id of a grid strength (`index` steps of 0.05 % vol) in `unit`.
fn id_for(index: usize, unit: StrengthUnit) -> String {
    let number = unit.number(index as f64 * STEP_ABV_PCT);
    format!("spirit-{}-{}", plain_number(number), unit.suffix())
}

/// `number` with at most two decimals and no trailing zeros: 57, 37.5, 40.05.
fn plain_number(number: f64) -> String {
    let text = format!("{number:.2}");
    text.trim_end_matches('0').trim_end_matches('.').to_string()
}

/// Whether `text` is a plain decimal number as a person types one (digits and
/// at most one point; no sign, exponent or spaces).
fn is_plain_number(text: &str) -> bool {
    let mut points = 0;
    let ok = text.chars().all(|c| {
        if c == '.' {
            points += 1;
            true
        } else {
            c.is_ascii_digit()
        }
    });
    ok && points <= 1 && text.chars().any(|c| c.is_ascii_digit())
}

/// Splits `spirit-<number>-<unit>` into the number text and the unit text; the
/// unit is empty for `spirit-<number>`. `None` unless the id starts with `spirit-`.
fn split(id: &str) -> Option<(&str, &str)> {
    let rest = id.strip_prefix("spirit-")?;
    Some(match rest.rfind('-') {
        Some(k) if k > 0 && !rest[k + 1..].is_empty() && !is_plain_number(&rest[k + 1..]) => {
            (&rest[..k], &rest[k + 1..])
        }
        _ => (rest, ""),
    })
}

/// The grid index nearest to `abv_pct`, kept within the grid.
fn nearest_index(abv_pct: f64) -> usize {
    if !abv_pct.is_finite() {
        return STEPS;
    }
    (abv_pct / STEP_ABV_PCT).round().clamp(1.0, STEPS as f64) as usize
}

/// Reads a spirit id: `None` when `id` is not shaped like one at all,
/// `Some(Ok((index, unit)))` for a strength on the grid, and `Some(Err(..))`
/// with the reason and the nearest valid id otherwise.
pub fn parse(id: &str) -> Option<Result<(usize, StrengthUnit), SpiritIdError>> {
    let (number_text, unit_text) = split(id)?;
    let unit = match unit_text {
        "vol" => StrengthUnit::Vol,
        "proof" => StrengthUnit::Proof,
        "" | "abv" | "pct" | "percent" | "vol-pct" => {
            // A strength written without the trade's unit, or with another word.
            let number = number_text.trim_start_matches('-');
            if !is_plain_number(number) {
                return None;
            }
            let index = nearest_index(number.parse().unwrap_or(f64::NAN));
            return Some(Err(SpiritIdError {
                why: "a spirit's strength ends in `-vol` (% vol at 20 °C) or `-proof` (US proof)"
                    .into(),
                suggestion: id_for(index, StrengthUnit::Vol),
            }));
        }
        _ => return None,
    };
    let unsigned = number_text.trim_start_matches('-');
    if !is_plain_number(unsigned) {
        return Some(Err(SpiritIdError {
            why: format!(
                "`{number_text}` is not a strength: write a number like `spirit-40-vol` or `spirit-80-proof`"
            ),
            suggestion: id_for(nearest_index(40.0), unit),
        }));
    }
    let number: f64 = unsigned.parse().unwrap_or(f64::NAN);
    let abv_pct = match unit {
        StrengthUnit::Vol => number,
        StrengthUnit::Proof => number / 2.0,
    };
    let (limit, unit_words) = match unit {
        StrengthUnit::Vol => ("above 0 and at most 100 % vol", "% vol"),
        StrengthUnit::Proof => ("above 0 and at most 200 US proof (100 % vol)", "proof"),
    };
    if unsigned.len() != number_text.len() || !(abv_pct > 0.0 && abv_pct <= 100.0) {
        return Some(Err(SpiritIdError {
            why: format!("a spirit's strength is {limit}, not {number_text} {unit_words}"),
            suggestion: id_for(nearest_index(abv_pct), unit),
        }));
    }
    let index = nearest_index(abv_pct);
    if (index as f64 * STEP_ABV_PCT - abv_pct).abs() > 1e-9 {
        return Some(Err(SpiritIdError {
            why: "strengths go in steps of 0.05 % vol (0.1 US proof), finer than any label states them".into(),
            suggestion: id_for(index, unit),
        }));
    }
    Some(Ok((index, unit)))
}

/// The spirit of grid strength `index` (steps of 0.05 % vol), with its id in `unit`.
fn build(index: usize, unit: StrengthUnit) -> Ingredient {
    let abv_pct = index as f64 * STEP_ABV_PCT;
    let p = mass_fraction_from_abv_pct(abv_pct);
    let density_kg_m3 = density_20c_kg_m3(p);
    let abv_text = plain_number(abv_pct);
    let name = match unit {
        StrengthUnit::Vol => format!("Neutral spirit, {abv_text} % vol"),
        StrengthUnit::Proof => format!(
            "Neutral spirit, {} US proof ({abv_text} % vol)",
            plain_number(2.0 * abv_pct)
        ),
    };
    Ingredient {
        id: id_for(index, unit),
        name,
        category: Category::Alcohol,
        water_pct: 100.0 * (1.0 - p),
        fat_pct: 0.0,
        protein_pct: 0.0,
        other_solids_pct: 0.0,
        solutes_pct: BTreeMap::from([("ethanol".to_string(), 100.0 * p)]),
        density_g_ml: density_kg_m3 / 1000.0,
        allergens: Vec::new(),
        source: format!(
            "OIML R 22 (International Alcoholometric Tables): at 20 °C, {abv_text} % vol is {:.2} % ethanol by mass with a density of {density_kg_m3:.2} kg/m³ (from the R 22 density formula); a neutral spirit of ethanol and water, flavour congeners neglected",
            100.0 * p
        ),
    }
}

/// Every grid point in both units, each built on first use.
struct Grid {
    vol: Vec<OnceLock<Box<Ingredient>>>,
    proof: Vec<OnceLock<Box<Ingredient>>>,
}

static GRID: OnceLock<Grid> = OnceLock::new();

/// The spirit `id` names, if it is a valid spirit id.
pub fn resolve(id: &str) -> Option<&'static Ingredient> {
    let (index, unit) = parse(id)?.ok()?;
    let grid = GRID.get_or_init(|| Grid {
        vol: (0..=STEPS).map(|_| OnceLock::new()).collect(),
        proof: (0..=STEPS).map(|_| OnceLock::new()).collect(),
    });
    let cells = match unit {
        StrengthUnit::Vol => &grid.vol,
        StrengthUnit::Proof => &grid.proof,
    };
    let cell = cells.get(index)?;
    Some(cell.get_or_init(|| Box::new(build(index, unit))).as_ref())
}

/// The spirit of `abv_pct` % vol for listing in the catalog, if it lies on the grid.
pub fn listed(abv_pct: f64) -> Option<Ingredient> {
    let id = format!("spirit-{}-vol", plain_number(abv_pct));
    resolve(&id).cloned()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ids_are_written_plainly() {
        assert_eq!(id_for(1140, StrengthUnit::Vol), "spirit-57-vol");
        assert_eq!(id_for(750, StrengthUnit::Vol), "spirit-37.5-vol");
        assert_eq!(id_for(1140, StrengthUnit::Proof), "spirit-114-proof");
        assert_eq!(id_for(1, StrengthUnit::Vol), "spirit-0.05-vol");
    }

    #[test]
    fn shapes_that_are_not_spirits_are_left_alone() {
        for id in [
            "sucrose",
            "spirit-",
            "neutral-spirit-96",
            "spirit-rum-flavour",
        ] {
            assert!(parse(id).is_none(), "{id}");
        }
        assert_eq!(parse("spirit-57-vol"), Some(Ok((1140, StrengthUnit::Vol))));
        assert!(matches!(parse("spirit-1e2-vol"), Some(Err(_))));
        assert!(matches!(parse("spirit-nan-vol"), Some(Err(_))));
        assert!(resolve("spirit-100.05-vol").is_none());
    }
}

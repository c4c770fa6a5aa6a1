//! Showing and reading temperatures, masses and shares in the units the
//! settings choose. Values are kept in °C, g and fractions everywhere else.

use crate::model::Amount;

use super::state::{MassUnit, TempUnit};

/// Grams in one avoirdupois ounce.
pub const G_PER_OZ: f64 = 28.349_523_125;
/// Ounces in one pound.
pub const OZ_PER_LB: f64 = 16.0;

/// °C to the display unit.
pub fn temp_value(temp_c: f64, unit: TempUnit) -> f64 {
    unit.from_c(temp_c)
}

/// The display unit back to °C.
pub fn temp_to_c(value: f64, unit: TempUnit) -> f64 {
    unit.to_c(value)
}

/// The symbol of a temperature unit.
pub fn temp_symbol(unit: TempUnit) -> &'static str {
    unit.symbol()
}

/// A temperature (°C) as text in the display unit, e.g. "-13.0 °C".
pub fn fmt_temp(temp_c: f64, unit: TempUnit) -> String {
    unit.format(temp_c)
}

/// An optional temperature; "below -60 °C" style text when absent.
pub fn fmt_temp_opt(temp_c: Option<f64>, unit: TempUnit) -> String {
    match temp_c {
        Some(t) => fmt_temp(t, unit),
        None => "none above -60 °C".into(),
    }
}

/// A mass (g) as text in the display unit, e.g. "1250 g" or "2 lb 12.1 oz".
pub fn fmt_mass(mass_g: f64, unit: MassUnit) -> String {
    match unit {
        MassUnit::Grams if mass_g.abs() >= 10_000.0 => format!("{:.2} kg", mass_g / 1000.0),
        MassUnit::Grams if mass_g.abs() >= 100.0 => format!("{mass_g:.0} g"),
        MassUnit::Grams => format!("{mass_g:.1} g"),
        MassUnit::Imperial => {
            let oz = mass_g / G_PER_OZ;
            if oz.abs() < OZ_PER_LB {
                format!("{oz:.2} oz")
            } else {
                let lb = (oz / OZ_PER_LB).trunc();
                format!("{lb:.0} lb {:.1} oz", oz - lb * OZ_PER_LB)
            }
        }
    }
}

/// An amount as the user sees it: volumes stay in mL.
pub fn fmt_amount(amount: Amount, unit: MassUnit) -> String {
    match amount {
        Amount::Grams(g) => fmt_mass(g, unit),
        Amount::Millilitres(ml) => format!("{ml:.0} mL"),
    }
}

/// The bare number of an amount in the unit it is edited in (g, oz or mL).
pub fn amount_edit_text(amount: Amount, unit: MassUnit) -> String {
    match (amount, unit) {
        (Amount::Grams(g), MassUnit::Grams) => trim_number(g),
        (Amount::Grams(g), MassUnit::Imperial) => format!("{} oz", trim_number(g / G_PER_OZ)),
        (Amount::Millilitres(ml), _) => format!("{} ml", trim_number(ml)),
    }
}

/// A number without trailing zeros (up to 3 decimals).
pub fn trim_number(x: f64) -> String {
    let s = format!("{x:.3}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" { "0".into() } else { s.into() }
}

fn parse_number(text: &str) -> Result<f64, String> {
    let cleaned = text.trim().replace(',', ".");
    match cleaned.parse::<f64>() {
        Ok(x) if x.is_finite() => Ok(x),
        _ => Err(format!("`{}` is not a number", text.trim())),
    }
}

/// Reads an amount: a number in the display unit (g or oz), or with a unit
/// (g, kg, oz, lb, ml, l). It must be zero or more.
pub fn parse_amount(text: &str, unit: MassUnit) -> Result<Amount, String> {
    let t = text.trim().to_lowercase();
    if t.is_empty() {
        return Err("type an amount, like 250 or 1.2 kg".into());
    }
    let split = t.find(|c: char| c.is_ascii_alphabetic()).unwrap_or(t.len());
    let (number, suffix) = t.split_at(split);
    let value = parse_number(number)?;
    if value < 0.0 {
        return Err("an amount must be zero or more".into());
    }
    let amount = match suffix.trim() {
        "" => match unit {
            MassUnit::Grams => Amount::Grams(value),
            MassUnit::Imperial => Amount::Grams(value * G_PER_OZ),
        },
        "g" => Amount::Grams(value),
        "kg" => Amount::Grams(value * 1000.0),
        "oz" => Amount::Grams(value * G_PER_OZ),
        "lb" => Amount::Grams(value * G_PER_OZ * OZ_PER_LB),
        "ml" => Amount::Millilitres(value),
        "l" => Amount::Millilitres(value * 1000.0),
        other => {
            return Err(format!(
                "`{other}` is not a unit here: use g, kg, oz, lb, ml or l"
            ));
        }
    };
    Ok(amount)
}

/// Reads a mass (g): like [`parse_amount`] but volumes are refused.
pub fn parse_mass(text: &str, unit: MassUnit) -> Result<f64, String> {
    match parse_amount(text, unit)? {
        Amount::Grams(g) if g > 0.0 => Ok(g),
        Amount::Grams(_) => Err("the mass must be above zero".into()),
        Amount::Millilitres(_) => Err("give a mass (g, kg, oz, lb), not a volume".into()),
    }
}

/// Reads a temperature in the display unit (a trailing °C/°F/C/F is allowed) and returns °C.
pub fn parse_temp(text: &str, unit: TempUnit) -> Result<f64, String> {
    let t = text
        .trim()
        .trim_end_matches(['c', 'C', 'f', 'F'])
        .trim_end_matches('°');
    let value = parse_number(t)?;
    let c = temp_to_c(value, unit);
    if !(-60.0..=0.0).contains(&c) {
        return Err(format!(
            "give a temperature between {} and {}",
            fmt_temp(-60.0, unit),
            fmt_temp(0.0, unit)
        ));
    }
    Ok(c)
}

/// Reads a share in percent (above 0, below 100) and returns a fraction.
pub fn parse_share_pct(text: &str) -> Result<f64, String> {
    let value = parse_number(text.trim().trim_end_matches('%'))?;
    if !(value > 0.0 && value < 100.0) {
        return Err("give a percentage above 0 and below 100".into());
    }
    Ok(value / 100.0)
}

/// Reads a number that must lie in `range`; `what` names it in the reason.
pub fn parse_in_range(
    text: &str,
    range: std::ops::RangeInclusive<f64>,
    what: &str,
) -> Result<f64, String> {
    let value = parse_number(text)?;
    if !range.contains(&value) {
        return Err(format!(
            "{what} must be between {} and {}",
            trim_number(*range.start()),
            trim_number(*range.end())
        ));
    }
    Ok(value)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn amounts_read_in_the_display_unit_or_with_a_suffix() {
        assert_eq!(
            parse_amount("250", MassUnit::Grams),
            Ok(Amount::Grams(250.0))
        );
        assert_eq!(
            parse_amount("1,5 kg", MassUnit::Grams),
            Ok(Amount::Grams(1500.0))
        );
        assert_eq!(
            parse_amount("100 ml", MassUnit::Grams),
            Ok(Amount::Millilitres(100.0))
        );
        let Ok(Amount::Grams(g)) = parse_amount("1 lb", MassUnit::Grams) else {
            panic!("1 lb should read as grams");
        };
        assert!((g - 453.592).abs() < 0.001);
        let Ok(Amount::Grams(g)) = parse_amount("2", MassUnit::Imperial) else {
            panic!("2 should read as ounces");
        };
        assert!((g - 2.0 * G_PER_OZ).abs() < 1e-9);
        assert!(parse_amount("-3", MassUnit::Grams).is_err());
        assert!(parse_amount("ten", MassUnit::Grams).is_err());
        assert!(parse_amount("5 cups", MassUnit::Grams).is_err());
    }

    #[test]
    fn temperatures_convert_both_ways() {
        assert_eq!(fmt_temp(-18.0, TempUnit::Fahrenheit), "-0.4 °F");
        assert_eq!(fmt_temp(-13.0, TempUnit::Celsius), "-13.0 °C");
        let c = parse_temp("0 °F", TempUnit::Fahrenheit).unwrap_or(f64::NAN);
        assert!((c + 17.777_8).abs() < 1e-3);
        assert!(parse_temp("5", TempUnit::Celsius).is_err());
    }

    #[test]
    fn masses_show_in_pounds_and_ounces() {
        assert_eq!(fmt_mass(1000.0, MassUnit::Grams), "1000 g");
        assert_eq!(fmt_mass(28.349_523_125, MassUnit::Imperial), "1.00 oz");
        assert_eq!(fmt_mass(500.0, MassUnit::Imperial), "1 lb 1.6 oz");
    }
}

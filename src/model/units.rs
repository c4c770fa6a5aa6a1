//! Units: values are kept in °C, g, mL and fractions everywhere; only what a
//! person types or reads changes with the chosen unit. This is the one place that
//! reads temperatures, amounts and shares as people write them, and the one place
//! that writes them for people, so the command line and the workspace agree.
//!
//! US customary units are exact by definition (NIST Handbook 44, Appendix C:
//! 1 avoirdupois pound = 453.592 37 g; 1 US gallon = 231 in³ = 3.785 411 784 L).

use super::Amount;

/// Grams in one avoirdupois ounce (NIST Handbook 44, Appendix C; exact).
pub const G_PER_OZ: f64 = 28.349_523_125;
/// Ounces in one pound.
pub const OZ_PER_LB: f64 = 16.0;
/// Millilitres in one US fluid ounce (1/128 US gallon; exact).
pub const ML_PER_US_FL_OZ: f64 = 29.573_529_562_5;
/// Millilitres in one US cup (8 US fluid ounces; exact).
pub const ML_PER_US_CUP: f64 = 8.0 * ML_PER_US_FL_OZ;
/// Millilitres in one US liquid quart (32 US fluid ounces; exact).
pub const ML_PER_US_QUART: f64 = 32.0 * ML_PER_US_FL_OZ;
/// Millilitres in one US gallon (231 cubic inches; exact).
pub const ML_PER_US_GALLON: f64 = 3_785.411_784;

/// The largest amount gelu takes, in g or mL: a thousand tonnes, or a million
/// litres. Anything larger is a typing slip, and sums of such amounts stay far
/// from overflowing.
pub const MAX_AMOUNT: f64 = 1.0e9;

/// Refuses an amount beyond [`MAX_AMOUNT`] (the reason, for a message).
pub fn check_amount(amount: Amount) -> Result<(), String> {
    let (value, limit) = match amount {
        Amount::Grams(g) => (g, "1000 t"),
        Amount::Millilitres(ml) => (ml, "a million litres"),
    };
    if value <= MAX_AMOUNT {
        Ok(())
    } else {
        Err(format!("is more than gelu takes: amounts go up to {limit}"))
    }
}

/// How temperatures are shown and read (JSON is always °C).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum TempUnit {
    /// Degrees Celsius.
    #[default]
    Celsius,
    /// Degrees Fahrenheit.
    Fahrenheit,
}

impl TempUnit {
    /// `temp_c` (°C) in this unit.
    pub fn from_c(self, temp_c: f64) -> f64 {
        match self {
            TempUnit::Celsius => temp_c,
            TempUnit::Fahrenheit => temp_c * 9.0 / 5.0 + 32.0,
        }
    }

    /// A temperature in this unit back to °C.
    pub fn to_c(self, value: f64) -> f64 {
        match self {
            TempUnit::Celsius => value,
            TempUnit::Fahrenheit => (value - 32.0) * 5.0 / 9.0,
        }
    }

    /// The unit's symbol.
    pub fn symbol(self) -> &'static str {
        match self {
            TempUnit::Celsius => "°C",
            TempUnit::Fahrenheit => "°F",
        }
    }

    /// `temp_c` (°C) formatted in this unit with one decimal, e.g. "-13.0 °C".
    pub fn format(self, temp_c: f64) -> String {
        format!("{:.1} {}", self.from_c(temp_c), self.symbol())
    }

    /// An optional temperature (°C); "none above -60 °C" when absent.
    pub fn format_opt(self, temp_c: Option<f64>) -> String {
        match temp_c {
            Some(t) => self.format(t),
            None => format!("none above {:.0} {}", self.from_c(-60.0), self.symbol()),
        }
    }
}

/// How masses are shown, and what a bare number typed for a mass means.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum MassUnit {
    /// Grams and kilograms.
    #[default]
    Grams,
    /// Ounces and pounds (avoirdupois).
    Imperial,
}

/// Reads a number as people type it: a comma may be the decimal mark; it must be finite.
pub fn parse_number(text: &str) -> Result<f64, String> {
    let cleaned = text.trim().replace(',', ".");
    match cleaned.parse::<f64>() {
        Ok(x) if x.is_finite() => Ok(x),
        _ => Err(format!("`{}` is not a number", text.trim())),
    }
}

/// Reads a temperature: a number with an optional unit (`-18`, `-18C`, `-18 °C`,
/// `0F`, `0 °F`); a bare number is in `unit`. Returns °C; any finite value.
pub fn parse_temp(text: &str, unit: TempUnit) -> Result<f64, String> {
    let t = text.trim();
    let (number, unit) = match t.char_indices().last() {
        Some((i, c)) if c.eq_ignore_ascii_case(&'f') => (&t[..i], TempUnit::Fahrenheit),
        Some((i, c)) if c.eq_ignore_ascii_case(&'c') => (&t[..i], TempUnit::Celsius),
        _ => (t, unit),
    };
    let number = number.trim().trim_end_matches('°').trim();
    let value = parse_number(number).map_err(|_| {
        format!(
            "`{}` is not a temperature: give a number in {}, or add C or F (like -18, -18C or 0F)",
            text.trim(),
            unit.symbol()
        )
    })?;
    Ok(unit.to_c(value))
}

/// Coldest temperature a mix figure is asked for (°C): the model's range.
pub const COLDEST_TEMP_C: f64 = -60.0;

/// Reads a temperature at which a mix can freeze: as [`parse_temp`], between
/// 0 °C and -60 °C. Messages show temperatures in `unit`.
pub fn parse_freezing_temp(text: &str, unit: TempUnit) -> Result<f64, String> {
    let c = parse_temp(text, unit)?;
    if !(COLDEST_TEMP_C..=0.0).contains(&c) {
        return Err(format!(
            "{} is {}: give a temperature between {} and {}, where mixes freeze",
            text.trim(),
            unit.format(c),
            unit.format(0.0),
            unit.format(COLDEST_TEMP_C)
        ));
    }
    Ok(c)
}

/// One unit an amount may be written in, and how to turn a number of it into an amount.
struct AmountUnit {
    names: &'static [&'static str],
    make: fn(f64) -> Amount,
}

const AMOUNT_UNITS: &[AmountUnit] = &[
    AmountUnit {
        names: &["g", "gram", "grams"],
        make: Amount::Grams,
    },
    AmountUnit {
        names: &["kg", "kilogram", "kilograms"],
        make: |v| Amount::Grams(v * 1000.0),
    },
    AmountUnit {
        names: &["oz", "ounce", "ounces"],
        make: |v| Amount::Grams(v * G_PER_OZ),
    },
    AmountUnit {
        names: &["lb", "lbs", "pound", "pounds"],
        make: |v| Amount::Grams(v * G_PER_OZ * OZ_PER_LB),
    },
    AmountUnit {
        names: &[
            "ml",
            "millilitre",
            "millilitres",
            "milliliter",
            "milliliters",
        ],
        make: Amount::Millilitres,
    },
    AmountUnit {
        names: &["l", "litre", "litres", "liter", "liters"],
        make: |v| Amount::Millilitres(v * 1000.0),
    },
    AmountUnit {
        names: &["fl oz", "floz", "fl. oz", "fluid ounce", "fluid ounces"],
        make: |v| Amount::Millilitres(v * ML_PER_US_FL_OZ),
    },
    AmountUnit {
        names: &["cup", "cups"],
        make: |v| Amount::Millilitres(v * ML_PER_US_CUP),
    },
    AmountUnit {
        names: &["qt", "quart", "quarts"],
        make: |v| Amount::Millilitres(v * ML_PER_US_QUART),
    },
    AmountUnit {
        names: &["gal", "gallon", "gallons"],
        make: |v| Amount::Millilitres(v * ML_PER_US_GALLON),
    },
];

/// The units [`parse_amount`] knows, for messages.
pub const AMOUNT_UNIT_NAMES: &str = "g, kg, oz, lb, mL, L, fl oz, cup, quart or gallon";

/// Splits `text` into (number, unit) pieces: `1 lb 2.5 oz` -> [("1", "lb"), ("2.5", "oz")].
/// A unit runs to the next digit (unit names hold none); an `e` is part of a number
/// only between a digit and a digit or sign (`1e3`).
fn pieces(text: &str) -> Vec<(String, String)> {
    let chars: Vec<char> = text.chars().collect();
    let at = |i: usize| chars.get(i).copied();
    let mut out = Vec::new();
    let mut i = 0;
    while i < chars.len() {
        while at(i).is_some_and(char::is_whitespace) {
            i += 1;
        }
        let start = i;
        while let Some(c) = at(i) {
            let sign =
                matches!(c, '-' | '+') && (i == start || matches!(at(i - 1), Some('e' | 'E')));
            let exponent = matches!(c, 'e' | 'E')
                && i > start
                && at(i - 1).is_some_and(|d| d.is_ascii_digit())
                && at(i + 1).is_some_and(|d| d.is_ascii_digit() || d == '-' || d == '+');
            if c.is_ascii_digit() || matches!(c, '.' | ',') || sign || exponent {
                i += 1;
            } else {
                break;
            }
        }
        let number: String = chars[start..i].iter().collect();
        let unit_start = i;
        while at(i).is_some_and(|c| !c.is_ascii_digit()) {
            i += 1;
        }
        let unit: String = chars[unit_start..i].iter().collect();
        out.push((number, unit.trim().to_lowercase()));
    }
    out
}

/// Reads an amount as people write it: a number and a unit (`250 g`, `1.2 kg`,
/// `100 ml`, `1.5 L`, `8 oz`, `1 lb 2 oz`, `2 cups`, `1 gallon`), or a bare number
/// in `bare` (g or oz) when given; with `bare` = `None` a unit is required. Every
/// form gelu displays reads back. It must be zero or more.
pub fn parse_amount(text: &str, bare: Option<MassUnit>) -> Result<Amount, String> {
    let t = text.trim();
    if t.is_empty() {
        return Err("type an amount, like 250 g, 1.2 kg or 500 mL".into());
    }
    let mut total: Option<Amount> = None;
    for (number, unit) in pieces(t) {
        if number.is_empty() {
            return Err(format!(
                "`{t}` is not a number: write an amount like 250 g, 1.2 kg or 500 mL"
            ));
        }
        let value = parse_number(&number)
            .map_err(|_| format!("`{t}` is not an amount: `{number}` is not a number"))?;
        if value < 0.0 {
            return Err(format!("`{t}`: an amount must be zero or more"));
        }
        let amount = if unit.is_empty() {
            match bare {
                Some(MassUnit::Grams) => Amount::Grams(value),
                Some(MassUnit::Imperial) => Amount::Grams(value * G_PER_OZ),
                None => {
                    return Err(format!(
                        "`{t}` needs a unit: write a number and a unit ({AMOUNT_UNIT_NAMES}), like 5kg or 1.5L"
                    ));
                }
            }
        } else {
            let unit_text = unit.trim_end_matches('.');
            let Some(known) = AMOUNT_UNITS.iter().find(|u| u.names.contains(&unit_text)) else {
                return Err(format!(
                    "`{unit}` is not a unit here: use {AMOUNT_UNIT_NAMES}"
                ));
            };
            (known.make)(value)
        };
        total = Some(match (total, amount) {
            (None, a) => a,
            (Some(Amount::Grams(a)), Amount::Grams(b)) => Amount::Grams(a + b),
            (Some(Amount::Millilitres(a)), Amount::Millilitres(b)) => Amount::Millilitres(a + b),
            _ => {
                return Err(format!(
                    "`{t}` mixes a mass and a volume; give one or the other"
                ));
            }
        });
    }
    let amount = total.ok_or_else(|| format!("`{t}` is not an amount"))?;
    check_amount(amount).map_err(|why| format!("`{t}` {why}"))?;
    Ok(amount)
}

/// Reads a mass (g) above zero: as [`parse_amount`], but volumes are refused.
pub fn parse_mass(text: &str, bare: Option<MassUnit>) -> Result<f64, String> {
    match parse_amount(text, bare)? {
        Amount::Grams(g) if g > 0.0 => Ok(g),
        Amount::Grams(_) => Err("the mass must be above zero".into()),
        Amount::Millilitres(_) => Err("give a mass (g, kg, oz, lb), not a volume".into()),
    }
}

/// Reads a share (0..1) as people mean it: `70 %` or `70` is seventy percent,
/// `0.70` is the fraction 0.70. It must lie strictly between 0 and 1; `1` alone is
/// refused as ambiguous.
pub fn parse_share(text: &str) -> Result<f64, String> {
    let t = text.trim();
    let (number, percent) = match t.strip_suffix('%') {
        Some(n) => (n.trim(), true),
        None => (t, false),
    };
    let value = parse_number(number).map_err(|_| {
        format!("`{t}` is not a share: give a percentage like 70 % or a fraction like 0.70")
    })?;
    let fraction = if percent || value > 1.0 {
        value / 100.0
    } else if value == 1.0 {
        return Err(format!(
            "`{t}` is ambiguous: write 1 % or 100 %, or a fraction like 0.70"
        ));
    } else {
        value
    };
    if !(fraction > 0.0 && fraction < 1.0) {
        return Err(format!(
            "`{t}`: give a share above 0 and below 100 %, like 70 % or 0.70"
        ));
    }
    Ok(fraction)
}

/// A number without trailing zeros (up to 3 decimals).
pub fn trim_number(x: f64) -> String {
    let s = format!("{x:.3}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" { "0".into() } else { s.into() }
}

/// A mass (g) for people, e.g. "1250 g", "12.50 kg" or "2 lb 12.1 oz".
pub fn format_mass(mass_g: f64, unit: MassUnit) -> String {
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

/// A volume (mL) for people: "750 mL" below a litre, "10.42 L" from one.
pub fn format_volume(volume_ml: f64) -> String {
    if volume_ml.abs() >= 1000.0 {
        format!("{} L", trim_number((volume_ml / 10.0).round() / 100.0))
    } else {
        format!("{volume_ml:.0} mL")
    }
}

/// An amount as people see it: masses in the mass unit, volumes in mL or L.
pub fn format_amount(amount: Amount, unit: MassUnit) -> String {
    match amount {
        Amount::Grams(g) => format_mass(g, unit),
        Amount::Millilitres(ml) => format_volume(ml),
    }
}

/// An amount as it is offered for editing: the bare number in the mass unit
/// (g, or oz with its unit), a volume with its unit; [`parse_amount`] reads it back.
pub fn amount_edit_text(amount: Amount, unit: MassUnit) -> String {
    match (amount, unit) {
        (Amount::Grams(g), MassUnit::Grams) => trim_number(g),
        (Amount::Grams(g), MassUnit::Imperial) => format!("{} oz", trim_number(g / G_PER_OZ)),
        (Amount::Millilitres(ml), _) => format!("{} ml", trim_number(ml)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn grams(text: &str, bare: Option<MassUnit>) -> f64 {
        match parse_amount(text, bare) {
            Ok(Amount::Grams(g)) => g,
            other => panic!("{text}: {other:?}"),
        }
    }

    fn millilitres(text: &str) -> f64 {
        match parse_amount(text, None) {
            Ok(Amount::Millilitres(ml)) => ml,
            other => panic!("{text}: {other:?}"),
        }
    }

    #[test]
    fn amounts_read_with_units_or_in_the_display_unit() {
        let g = Some(MassUnit::Grams);
        assert_eq!(grams("250", g), 250.0);
        assert_eq!(grams("1,5 kg", g), 1500.0);
        assert_eq!(grams("5kg", None), 5000.0);
        assert_eq!(grams("800 g", None), 800.0);
        assert_eq!(millilitres("100 ml"), 100.0);
        assert_eq!(millilitres("1.5L"), 1500.0);
        assert_eq!(millilitres("750mL"), 750.0);
        // NIST Handbook 44, Appendix C: 1 lb = 453.592 37 g exactly.
        assert!((grams("1 lb", g) - 453.592_37).abs() < 1e-9);
        assert!((grams("2", Some(MassUnit::Imperial)) - 2.0 * G_PER_OZ).abs() < 1e-9);
        assert!(parse_amount("-3", g).is_err());
        assert!(parse_amount("ten", g).is_err());
        assert!(parse_amount("5 stone", g).is_err());
        assert!(parse_amount("kg", g).is_err());
        assert!(parse_amount("5", None).is_err(), "a unit is required");
        assert!(
            parse_amount("1e308 kg", g).is_err(),
            "overflows to infinity"
        );
        let absurd = parse_amount("2000000 kg", g).unwrap_err();
        assert!(absurd.contains("1000 t"), "{absurd}");
        assert!(
            parse_amount("1000000 kg", g).is_ok(),
            "a thousand tonnes is the limit"
        );
    }

    #[test]
    fn us_kitchen_volumes_are_exact() {
        // NIST Handbook 44, Appendix C: 1 US gallon = 3.785 411 784 L; 128 fl oz a gallon.
        assert!((millilitres("1 gallon") - 3_785.411_784).abs() < 1e-9);
        assert!((millilitres("128 fl oz") - 3_785.411_784).abs() < 1e-9);
        assert!((millilitres("4 quarts") - 3_785.411_784).abs() < 1e-9);
        assert!((millilitres("16 cups") - 3_785.411_784).abs() < 1e-9);
        assert!((millilitres("1 cup") - 236.588_236_5).abs() < 1e-9);
    }

    #[test]
    fn every_displayed_form_reads_back() {
        for g in [0.5, 12.3, 250.0, 999.0, 1250.0, 10_420.0, 123_456.0] {
            for unit in [MassUnit::Grams, MassUnit::Imperial] {
                let shown = format_mass(g, unit);
                let back = grams(&shown, Some(unit));
                // Display rounds to 0.1 g, 0.01 kg, 0.01 oz or 0.1 oz.
                let tolerance = if unit == MassUnit::Grams {
                    5.0
                } else {
                    0.05 * G_PER_OZ
                };
                assert!(
                    (back - g).abs() <= tolerance,
                    "{shown} read as {back}, was {g}"
                );
            }
        }
        assert!((grams("1 lb 2 oz", None) - 18.0 * G_PER_OZ).abs() < 1e-9);
        assert!((grams("2 lb 12.1 oz", None) - 44.1 * G_PER_OZ).abs() < 1e-9);
        for ml in [750.0, 1000.0, 10_420.0] {
            let shown = format_volume(ml);
            assert!((millilitres(&shown) - ml).abs() < 5.0, "{shown}");
        }
        assert_eq!(format_volume(10_420.0), "10.42 L");
        assert_eq!(format_volume(750.0), "750 mL");
        assert!(
            parse_amount("1 kg 200 ml", None).is_err(),
            "mass and volume mixed"
        );
    }

    #[test]
    fn temperatures_read_in_both_scales() {
        let c = TempUnit::Celsius;
        assert_eq!(parse_temp("-18", c), Ok(-18.0));
        assert_eq!(parse_temp("-18C", c), Ok(-18.0));
        assert_eq!(parse_temp(" -18 °C ", c), Ok(-18.0));
        assert!((parse_temp("0F", c).unwrap() + 160.0 / 9.0).abs() < 1e-12);
        assert!((parse_temp("-40f", c).unwrap() + 40.0).abs() < 1e-12);
        // A suffix wins over the display unit: -4F under °C settings is -20 °C.
        assert!((parse_temp("-4F", c).unwrap() + 20.0).abs() < 1e-12);
        assert!((parse_temp("-4", TempUnit::Fahrenheit).unwrap() + 20.0).abs() < 1e-12);
        assert_eq!(parse_temp("-4C", TempUnit::Fahrenheit), Ok(-4.0));
        assert!(parse_temp("cold", c).is_err());
        assert!(parse_temp("nan", c).is_err());
        assert!(
            parse_freezing_temp("20", c).is_err(),
            "above 0 °C nothing freezes"
        );
        assert!(
            parse_freezing_temp("-80", c).is_err(),
            "below the model's range"
        );
        assert_eq!(parse_freezing_temp("-13", c), Ok(-13.0));
    }

    #[test]
    fn shares_read_as_people_mean_them() {
        assert_eq!(parse_share("70"), Ok(0.70));
        assert_eq!(parse_share("70 %"), Ok(0.70));
        assert_eq!(parse_share("67.5%"), Ok(0.675));
        assert_eq!(parse_share("0.675"), Ok(0.675));
        assert_eq!(parse_share("0,7"), Ok(0.7));
        assert!(parse_share("1").is_err(), "ambiguous");
        assert_eq!(parse_share("1 %"), Ok(0.01));
        assert!(parse_share("100").is_err());
        assert!(parse_share("0").is_err());
        assert!(parse_share("-5").is_err());
        assert!(parse_share("lots").is_err());
    }

    #[test]
    fn formats() {
        assert_eq!(TempUnit::Fahrenheit.format(-18.0), "-0.4 °F");
        assert_eq!(TempUnit::Celsius.format(-13.0), "-13.0 °C");
        assert_eq!(format_mass(1000.0, MassUnit::Grams), "1000 g");
        assert_eq!(format_mass(28.349_523_125, MassUnit::Imperial), "1.00 oz");
        assert_eq!(format_mass(500.0, MassUnit::Imperial), "1 lb 1.6 oz");
        assert_eq!(trim_number(1.500), "1.5");
        assert_eq!(trim_number(-0.0001), "0");
    }
}

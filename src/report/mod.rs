//! Analysis -> words and numbers for people and programs: the plain-text
//! report with its character chart, and the JSON object whose keys are a
//! public contract.

pub mod chart;
pub mod json;
pub mod text;

pub use crate::model::TempUnit;

/// Parses a temperature as typed on the command line: a number in °C, or with
/// a `C` or `F` suffix (`-18`, `-18C`, `0F`, `0 °F`). Returns °C.
pub fn parse_temp_c(text: &str) -> Result<f64, String> {
    let t = text.trim();
    let (number, unit) = match t.char_indices().last() {
        Some((i, c)) if c.eq_ignore_ascii_case(&'f') => (&t[..i], TempUnit::Fahrenheit),
        Some((i, c)) if c.eq_ignore_ascii_case(&'c') => (&t[..i], TempUnit::Celsius),
        _ => (t, TempUnit::Celsius),
    };
    let number = number.trim().trim_end_matches('°').trim();
    let v: f64 = number
        .parse()
        .map_err(|_| format!("`{text}` is not a temperature: give a number in °C, or add C or F (like -18, -18C or 0F)"))?;
    if !v.is_finite() {
        return Err(format!("`{text}` is not a finite temperature"));
    }
    let c = unit.to_c(v);
    if !(-60.0..=0.0).contains(&c) {
        return Err(format!(
            "{text} is {c:.1} °C: give a temperature between 0 °C and -60 °C, where mixes freeze"
        ));
    }
    Ok(c)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn temperatures_parse_in_both_scales() {
        assert_eq!(parse_temp_c("-18"), Ok(-18.0));
        assert_eq!(parse_temp_c("-18C"), Ok(-18.0));
        assert_eq!(parse_temp_c(" -18 °C "), Ok(-18.0));
        assert!((parse_temp_c("0F").unwrap() + 160.0 / 9.0).abs() < 1e-12);
        assert!((parse_temp_c("-40f").unwrap() + 40.0).abs() < 1e-12);
        assert!(parse_temp_c("cold").is_err());
        assert!(parse_temp_c("nan").is_err());
        assert!(parse_temp_c("20").is_err(), "above 0 °C nothing freezes");
        assert!(parse_temp_c("-80").is_err(), "below the model's range");
    }

    #[test]
    fn fahrenheit_display() {
        assert_eq!(TempUnit::Fahrenheit.format(-18.0), "-0.4 °F");
        assert_eq!(TempUnit::Celsius.format(-13.0), "-13.0 °C");
    }
}

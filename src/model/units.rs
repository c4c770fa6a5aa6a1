//! Units for display: values are kept in °C, g and fractions everywhere; only
//! what is shown to a person changes with the chosen unit.

/// How temperatures are shown (JSON is always °C).
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
}

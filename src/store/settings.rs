//! The keys under which a log keeps the settings more than one part of gelu reads
//! (the workspace writes them; the command line reads them too). The keys are a
//! contract with every log already written: never rename one.

use super::Store;
use super::error::Result;

/// The display-cabinet temperature (°C).
pub const CABINET_TEMP_KEY: &str = "workspace.cabinet_temp_c";
/// The freezer temperature (°C).
pub const FREEZER_TEMP_KEY: &str = "workspace.freezer_temp_c";

impl Store {
    /// A setting read as a finite number, if it is set and reads as one.
    pub fn setting_number(&self, key: &str) -> Result<Option<f64>> {
        Ok(self
            .get_setting(key)?
            .and_then(|v| v.trim().parse::<f64>().ok())
            .filter(|x| x.is_finite()))
    }
}

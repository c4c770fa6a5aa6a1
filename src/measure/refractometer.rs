//! What a refractometer would read on a mix, in °Brix (the sucrose scale), so a
//! logged Brix can be set against a prediction.
//!
//! Method. A refractometer measures the refractive index n of the liquid and
//! shows the sucrose concentration that has the same n (ICUMSA 1974 table). The
//! liquid here is the water and everything dissolved in it; fat, protein and
//! insoluble solids are left out (an emulsion's droplets and a mix's fibres do
//! not set the critical angle; milk protein is not modelled, see `notes`).
//! Each dissolved solute adds the index increment its own binary solution has
//! at the *total* dissolved concentration W of the liquid, weighted by its share
//! of the dissolved mass:
//!
//! n(mix) = n(water) + Σ (w_i / W) · [n_i(W) − n(water)]
//!
//! with n_i from published tables (`refraction_data`). For a single solute this
//! is exact by construction; for mixtures it is an assumption (no mixed-solution
//! table was at hand to check it), which the report states.
//!
//! Ethanol is refused: it makes a refractometer read high, so a Brix reading of
//! a spirit or liqueur is not its sugar (PRACTICE.md, "Liqueurs and spirits").

use serde::Serialize;

use crate::analysis::Analysis;
use crate::catalog::Catalog;
use crate::model::SoluteKind;

use super::refraction_data::{
    CITRIC_ACID, FRUCTOSE, GLUCOSE, GLYCEROL, ICUMSA_1974, LACTIC_ACID, LACTOSE, MALTOSE,
    POTASSIUM_CHLORIDE, RefractionTable, SODIUM_CHLORIDE, WATER_CRC, WATER_ICUMSA,
};

/// Ethanol above this share of the mix (mass %) stops the prediction; below it
/// is trace (a vanilla extract), which shifts a reading by under 0.01 °Bx.
pub const ETHANOL_TRACE_PCT: f64 = 0.05;

/// The highest reading the ICUMSA scale defines (°Brix).
pub const BRIX_SCALE_MAX: f64 = 85.0;

/// Why no Brix is predicted.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum BrixError {
    /// The mix holds ethanol.
    #[error(
        "the mix holds {ethanol_pct:.2} % ethanol: ethanol makes a refractometer read high, so a Brix reading is not its sugar; measure sugar another way (density with the alcohol known, or after distilling the alcohol off)"
    )]
    EthanolPresent {
        /// Ethanol in the mix (mass %).
        ethanol_pct: f64,
    },
    /// The mix has no liquid to read.
    #[error("the mix has no water, so a refractometer has nothing to read")]
    NoWater,
    /// The liquid is beyond the sucrose scale.
    #[error(
        "the liquid of this mix is {dissolved_pct:.1} % dissolved solids, beyond the refractometer scale (0-{BRIX_SCALE_MAX} °Brix)"
    )]
    BeyondScale {
        /// Dissolved solids in the liquid (mass %).
        dissolved_pct: f64,
    },
}

/// How a solute's refraction was counted.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SoluteRefraction {
    /// Solute id.
    pub id: String,
    /// Share of the dissolved solids (0..1).
    pub share_fraction: f64,
    /// The published table used, e.g. "ICUMSA sucrose" or "CRC D-Glucose".
    pub table: String,
    /// True when the table is that of a related substance, not of the solute itself.
    pub assumed: bool,
    /// True when the liquid is more concentrated than the table reaches (extrapolated).
    pub beyond_data: bool,
}

/// A predicted refractometer reading.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BrixPrediction {
    /// Predicted reading (°Brix, sucrose scale, 20 °C).
    pub brix: f64,
    /// Predicted refractive index of the liquid at 20 °C (589 nm).
    pub refractive_index: f64,
    /// Dissolved solids in the liquid (mass %), what a sucrose syrup reading this would hold.
    pub dissolved_solids_pct: f64,
    /// How each solute was counted.
    pub solutes: Vec<SoluteRefraction>,
    /// Plain-language notes on what the prediction leaves out.
    pub notes: Vec<String>,
}

/// Refractive index at 20 °C of a sucrose solution of `brix` °Bx (ICUMSA 1974,
/// linear between whole degrees; extrapolated linearly past 85 °Bx).
pub fn refractive_index_from_brix(brix: f64) -> f64 {
    let last = ICUMSA_1974.len() - 1;
    let b = brix.max(0.0);
    let k = (b.floor() as usize).min(last - 1);
    let t = b - k as f64;
    ICUMSA_1974[k] + t * (ICUMSA_1974[k + 1] - ICUMSA_1974[k])
}

/// °Brix that a refractometer shows for refractive index `n` at 20 °C (ICUMSA
/// 1974, linear between whole degrees); 0 for `n` at or below water.
pub fn brix_from_refractive_index(n: f64) -> f64 {
    if !(n > WATER_ICUMSA) {
        return 0.0;
    }
    let last = ICUMSA_1974.len() - 1;
    let k = ICUMSA_1974[..last]
        .partition_point(|v| *v <= n)
        .clamp(1, last)
        - 1;
    let (lo, hi) = (ICUMSA_1974[k], ICUMSA_1974[k + 1]);
    k as f64 + (n - lo) / (hi - lo)
}

/// Index increment over water of a binary table at `pct` mass %, linear between
/// rows; beyond the last row, continued with the last slope. Returns the
/// increment and whether it was extrapolated.
fn table_increment(table: &RefractionTable, pct: f64) -> (f64, bool) {
    let rows = table.rows;
    let n = rows.len();
    let j = rows.partition_point(|r| r.0 <= pct).clamp(1, n - 1) - 1;
    let (x0, y0) = rows[j];
    let (x1, y1) = rows[j + 1];
    let y = y0 + (pct - x0) * (y1 - y0) / (x1 - x0);
    (y - WATER_CRC, pct > rows[n - 1].0)
}

/// Which refraction a solute gets: its own table, a relative's, or the sucrose scale.
enum Refraction {
    Sucrose,
    Table(&'static RefractionTable),
}

/// The table for a solute id (and kind, for solutes without a table of their
/// own), and whether it is assumed from a relative.
fn refraction_for(id: &str, kind: Option<SoluteKind>) -> (Refraction, bool) {
    use Refraction::{Sucrose, Table};
    match id {
        "sucrose" => (Sucrose, false),
        "glucose" => (Table(&GLUCOSE), false),
        "fructose" => (Table(&FRUCTOSE), false),
        "lactose" => (Table(&LACTOSE), false),
        "maltose" => (Table(&MALTOSE), false),
        "glycerol" => (Table(&GLYCEROL), false),
        "citric-acid" => (Table(&CITRIC_ACID), false),
        "lactic-acid" => (Table(&LACTIC_ACID), false),
        "sodium-chloride" => (Table(&SODIUM_CHLORIDE), false),
        "potassium-chloride" => (Table(&POTASSIUM_CHLORIDE), false),
        // Hexoses and hexitols refract within a few 0.1 % of glucose per gram.
        "galactose" | "sorbitol" => (Table(&GLUCOSE), true),
        "milk-minerals" => (Table(&POTASSIUM_CHLORIDE), true),
        _ => match kind {
            Some(SoluteKind::Oligosaccharide) => (Table(&MALTOSE), true),
            Some(SoluteKind::Polyol) => (Table(&GLYCEROL), true),
            Some(SoluteKind::Salt) | Some(SoluteKind::MilkMinerals) => {
                (Table(&SODIUM_CHLORIDE), true)
            }
            Some(SoluteKind::Acid) => (Table(&CITRIC_ACID), true),
            _ => (Sucrose, true),
        },
    }
}

/// Predicts the refractometer reading of an analysed, alcohol-free mix.
/// `catalog` must be the one the analysis was made with (it names each
/// solute's kind, for solutes without a refraction table of their own).
pub fn predict_brix(analysis: &Analysis, catalog: &Catalog) -> Result<BrixPrediction, BrixError> {
    let c = &analysis.composition;
    if c.ethanol_pct > ETHANOL_TRACE_PCT {
        return Err(BrixError::EthanolPresent {
            ethanol_pct: c.ethanol_pct,
        });
    }
    let dissolved: Vec<(&String, f64)> = analysis
        .solutes_pct
        .iter()
        .filter(|(id, pct)| id.as_str() != "ethanol" && **pct > 0.0)
        .map(|(id, pct)| (id, *pct))
        .collect();
    let dissolved_pct_of_mix: f64 = dissolved.iter().map(|(_, p)| p).sum();
    if !(c.water_pct > 0.0) {
        return Err(BrixError::NoWater);
    }
    let w_pct = 100.0 * dissolved_pct_of_mix / (c.water_pct + dissolved_pct_of_mix);
    if w_pct > BRIX_SCALE_MAX {
        return Err(BrixError::BeyondScale {
            dissolved_pct: w_pct,
        });
    }
    let mut n = WATER_ICUMSA;
    let mut solutes = Vec::new();
    for (id, pct) in &dissolved {
        let share = pct / dissolved_pct_of_mix;
        let kind = catalog.solute(id).map(|e| e.solute.kind);
        let (refraction, assumed) = refraction_for(id, kind);
        let (increment, beyond, table) = match refraction {
            Refraction::Sucrose => (
                refractive_index_from_brix(w_pct) - WATER_ICUMSA,
                false,
                "ICUMSA sucrose".to_string(),
            ),
            Refraction::Table(t) => {
                let (inc, beyond) = table_increment(t, w_pct);
                (inc, beyond, format!("CRC {}", t.source_name))
            }
        };
        n += share * increment;
        solutes.push(SoluteRefraction {
            id: (*id).clone(),
            share_fraction: share,
            table,
            assumed,
            beyond_data: beyond,
        });
    }
    let mut notes = Vec::new();
    let left_out = [
        ("fat", c.fat_pct),
        ("protein", c.protein_pct),
        ("insoluble solids", c.other_solids_pct),
    ];
    for (what, pct) in left_out {
        if pct > 0.05 {
            notes.push(format!(
                "{pct:.1} % {what} is not counted; on a mix with {what} a refractometer reads the liquid around it, and reads less sharply"
            ));
        }
    }
    if solutes.iter().any(|s| s.assumed) {
        notes.push("some solutes have no refraction table of their own and are counted like a related substance (marked assumed)".into());
    }
    if solutes.len() > 1 {
        notes.push("solutes are combined at equal total concentration, an assumption not checked against a mixed-solution table".into());
    }
    Ok(BrixPrediction {
        brix: brix_from_refractive_index(n),
        refractive_index: n,
        dissolved_solids_pct: w_pct,
        solutes,
        notes,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn icumsa_round_trips_and_hits_table_values() {
        // ICUMSA 1974: 10 °Bx -> 1.34782, 45 °Bx -> 1.40978 (table values, exact).
        assert!((refractive_index_from_brix(10.0) - 1.34782).abs() < 1e-12);
        assert!((refractive_index_from_brix(45.0) - 1.40978).abs() < 1e-12);
        for b in [0.3, 7.5, 31.2, 64.9, 84.5] {
            let back = brix_from_refractive_index(refractive_index_from_brix(b));
            assert!((back - b).abs() < 1e-9, "{b} -> {back}");
        }
        assert_eq!(brix_from_refractive_index(1.3), 0.0);
    }

    #[test]
    fn table_increment_interpolates_and_flags_extrapolation() {
        let (inc, beyond) = table_increment(&SODIUM_CHLORIDE, 11.0);
        assert!((inc - (0.5 * (1.3505 + 1.3541) - WATER_CRC)).abs() < 1e-12);
        assert!(!beyond);
        let (_, beyond) = table_increment(&LACTOSE, 25.0);
        assert!(beyond);
    }
}

//! How balancing treats each figure ([`Figure`], plain data in
//! [`crate::model::balancing`]): how close the full model must come
//! ([`Tolerance`]), the step that weighs a violation, the loosest bounds a
//! relaxation may reach, and the figure's value in a full analysis.

use crate::analysis::Analysis;
use crate::model::balancing::{COLDEST_C, Figure};

/// How close the full model must come to a target for it to count as met.
/// Linear figures are solved exactly, so their tolerance only absorbs rounding;
/// the others are the engine's promise: 0.05 K, 0.005 of a frozen share,
/// 0.05 % vol, 0.5 g/L, 0.1 % of a volume.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Tolerance {
    /// In the figure's own unit.
    Absolute(f64),
    /// As a share of the bound (0..1).
    Relative(f64),
}

impl Figure {
    /// Decimals shown in plain-text advice.
    pub(crate) fn decimals(&self) -> usize {
        match self {
            Figure::MassG | Figure::VolumeMl | Figure::SugarGPerL => 0,
            Figure::FrozenAt { .. } => 3,
            Figure::FreezingPointC | Figure::ServingTempC => 2,
            _ => 1,
        }
    }

    /// How close the full model must come for the target to count as met.
    pub fn tolerance(&self) -> Tolerance {
        match self {
            Figure::FreezingPointC | Figure::ServingTempC => Tolerance::Absolute(0.05),
            Figure::FrozenAt { .. } => Tolerance::Absolute(0.005),
            Figure::AbvPct => Tolerance::Absolute(0.05),
            Figure::SugarGPerL => Tolerance::Absolute(0.5),
            Figure::VolumeMl | Figure::MassG => Tolerance::Relative(0.001),
            // Linear figures: solved exactly; this only absorbs the solver's rounding.
            _ => Tolerance::Absolute(0.001),
        }
    }

    /// The tolerance in the figure's unit near `bound`.
    pub fn tolerance_at(&self, bound: f64) -> f64 {
        match self.tolerance() {
            Tolerance::Absolute(t) => t,
            Tolerance::Relative(r) => r * bound.abs(),
        }
    }

    /// A small step of this figure near `bound`, in its unit, that weighs a
    /// violation when targets cannot all hold (one step of each figure counts
    /// alike): 0.1 percentage point, 0.1 K, 0.01 of a frozen share, 0.1 % vol,
    /// 2 g/L, 0.2 % of a mass or volume.
    pub(crate) fn step(&self, bound: f64) -> f64 {
        match self {
            Figure::FrozenAt { .. } => 0.01,
            Figure::SugarGPerL => 2.0,
            Figure::MassG | Figure::VolumeMl => 0.002 * bound.abs().max(1.0),
            _ => 0.1,
        }
    }

    /// Whether the full model needs the volume (so balancing iterates).
    pub(crate) fn uses_volume(&self) -> bool {
        matches!(self, Figure::VolumeMl | Figure::AbvPct | Figure::SugarGPerL)
    }

    /// The loosest values a bound on this figure can take (low, high): relaxing
    /// a bound never goes past them.
    pub(crate) fn extremes(&self, mass_ref_g: f64) -> (f64, f64) {
        match self {
            Figure::MassG | Figure::VolumeMl => (0.0, 1e4 * mass_ref_g),
            Figure::Sweetness => (0.0, 300.0),
            Figure::SugarGPerL => (0.0, 2000.0),
            // Warmest: the least a bound below 0 °C can be written as (two
            // decimals); a bound at 0 °C is refused when the request is read.
            Figure::FreezingPointC | Figure::ServingTempC => (COLDEST_C, -0.01),
            Figure::FrozenAt { .. } => (0.0, 1.0),
            _ => (0.0, 100.0),
        }
    }

    /// The figure's value in a full analysis; `None` when the model has none
    /// (no freezing point above -60 °C, a frozen share not asked for).
    pub fn value_in(&self, a: &Analysis) -> Option<f64> {
        let c = &a.composition;
        Some(match self {
            Figure::MassG => a.mass_g,
            Figure::VolumeMl => a.volume_ml,
            Figure::FatPct => c.fat_pct,
            Figure::MsnfPct => c.msnf_pct,
            Figure::ProteinPct => c.protein_pct,
            Figure::LactosePct => c.lactose_pct,
            Figure::SugarsPct => c.sugars_pct,
            Figure::TotalSolidsPct => c.total_solids_pct,
            Figure::WaterPct => c.water_pct,
            Figure::EthanolPct => c.ethanol_pct,
            Figure::OtherSolidsPct => c.other_solids_pct,
            Figure::Sweetness => a.sweetness,
            Figure::AbvPct => a.abv_pct,
            Figure::SugarGPerL => a.sugar_g_per_l,
            Figure::FreezingPointC => a.freezing_point_c?,
            Figure::ServingTempC => a.serving_temp_c?,
            Figure::SolutePct(id) => a.solutes_pct.get(id).copied().unwrap_or(0.0),
            Figure::FrozenAt { temp_c } => {
                a.at.iter()
                    .find(|p| p.temp_c == *temp_c)
                    .map(|p| p.frozen_fraction)?
            }
        })
    }
}

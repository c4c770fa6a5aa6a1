//! Composition targets by style (mass % of mix), from the trade's tables:
//! Goff, University of Guelph Dairy Science notes; Goff & Hartel, Ice Cream,
//! 7th ed. (2013); entries marked (memory) in PRACTICE.md are wide on purpose.

use crate::model::Style;

/// An inclusive range (mass %).
pub type Range = (f64, f64);

/// What a style usually aims for; `None` where the trade sets no number.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StyleTargets {
    /// Fat (mass %).
    pub fat: Option<Range>,
    /// MSNF (mass %).
    pub msnf: Option<Range>,
    /// Sweeteners other than lactose (mass %).
    pub sweeteners: Option<Range>,
    /// Total solids (mass %).
    pub total_solids: Option<Range>,
}

/// The usual composition targets of a style.
pub fn targets_for(style: Style) -> StyleTargets {
    let t = |fat, msnf, sweeteners, total_solids| StyleTargets {
        fat: Some(fat),
        msnf: Some(msnf),
        sweeteners: Some(sweeteners),
        total_solids: Some(total_solids),
    };
    match style {
        // Standard to super-premium: fat 10-18, MSNF 9.5-11, sugars about 15-17, TS 36-42.
        Style::IceCream => t((10.0, 18.0), (9.5, 11.0), (14.0, 18.0), (36.0, 42.0)),
        Style::Gelato => t((4.0, 10.0), (8.0, 11.0), (16.0, 22.0), (32.0, 40.0)),
        Style::Sorbet => t((0.0, 1.0), (0.0, 0.5), (20.0, 30.0), (25.0, 35.0)),
        Style::Sherbet => t((1.0, 2.0), (1.0, 4.0), (25.0, 35.0), (28.0, 36.0)),
        Style::FrozenYogurt => t((0.0, 6.0), (8.0, 14.0), (15.0, 17.0), (30.0, 36.0)),
        Style::SoftServe => StyleTargets {
            fat: Some((3.0, 6.0)),
            msnf: Some((10.0, 16.0)),
            sweeteners: None,
            total_solids: Some((30.0, 35.0)),
        },
        Style::Liqueur | Style::Spirit | Style::Other => StyleTargets {
            fat: None,
            msnf: None,
            sweeteners: None,
            total_solids: None,
        },
    }
}

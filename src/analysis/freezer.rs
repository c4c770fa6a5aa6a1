//! What a freezer does to a drink, in the words a distiller uses: no ice, a few
//! crystals, slush, or frozen, from the share of its water that is ice at the
//! freezer's temperature.
//!
//! The tiers are our limits, stated in the README (common practice, no
//! published rule): any ice at all is visible as crystals; up to about 5 % of the
//! water as ice a bottle still pours clear with a few crystals; from there to
//! half the water as ice it is a slush that pours thick or spoons; from half it
//! has set solid.

use serde::Serialize;

/// Share of the water as ice from which a drink is slush rather than a few crystals.
pub const SLUSH_FROZEN_FRACTION: f64 = 0.05;
/// Share of the water as ice from which a drink has set solid rather than slush.
pub const FROZEN_FROZEN_FRACTION: f64 = 0.5;

/// How a drink comes out of the freezer.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum FreezerBehaviour {
    /// Its freezing point is below the freezer: no ice forms.
    NoIce,
    /// A few ice crystals: under about 5 % of the water is ice.
    AFewCrystals,
    /// Slush: about 5 % to half of the water is ice.
    Slush,
    /// Frozen: half or more of the water is ice.
    Frozen,
}

impl FreezerBehaviour {
    /// The tier for a share of water frozen (0..1).
    pub fn from_frozen_fraction(frozen_fraction: f64) -> FreezerBehaviour {
        if !(frozen_fraction > 0.0) {
            FreezerBehaviour::NoIce
        } else if frozen_fraction < SLUSH_FROZEN_FRACTION {
            FreezerBehaviour::AFewCrystals
        } else if frozen_fraction < FROZEN_FROZEN_FRACTION {
            FreezerBehaviour::Slush
        } else {
            FreezerBehaviour::Frozen
        }
    }

    /// The words people read: "no ice", "a few crystals", "slush", "frozen".
    pub fn words(self) -> &'static str {
        match self {
            FreezerBehaviour::NoIce => "no ice",
            FreezerBehaviour::AFewCrystals => "a few crystals",
            FreezerBehaviour::Slush => "slush",
            FreezerBehaviour::Frozen => "frozen",
        }
    }

    /// The kebab-case name used in JSON.
    pub fn as_str(self) -> &'static str {
        match self {
            FreezerBehaviour::NoIce => "no-ice",
            FreezerBehaviour::AFewCrystals => "a-few-crystals",
            FreezerBehaviour::Slush => "slush",
            FreezerBehaviour::Frozen => "frozen",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::FreezerBehaviour as F;

    #[test]
    fn tiers_follow_the_share_of_ice() {
        assert_eq!(F::from_frozen_fraction(0.0), F::NoIce);
        assert_eq!(F::from_frozen_fraction(f64::NAN), F::NoIce);
        // A 2 % ice share is a few crystals, not slush.
        assert_eq!(F::from_frozen_fraction(0.02), F::AFewCrystals);
        assert_eq!(F::from_frozen_fraction(0.05), F::Slush);
        assert_eq!(F::from_frozen_fraction(0.49), F::Slush);
        assert_eq!(F::from_frozen_fraction(0.5), F::Frozen);
        assert_eq!(F::Slush.words(), "slush");
    }
}

//! Pure physics of freezing aqueous mixes: the ice side (Murphy & Koop), binary
//! water-activity models per solute, the ZSR mixing rule that turns them into a
//! freezing curve, and the ethanol-water density tables of OIML R 22.
//!
//! Nothing here touches files, clocks or terminals; everything is deterministic.

pub mod binary;
pub mod ethanol;
pub mod fit;
pub mod ice;
pub mod zsr;

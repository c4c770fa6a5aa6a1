//! The ice side of the equilibrium: the activity of ice relative to supercooled
//! liquid water, a_ice(T), from the vapour-pressure formulations of
//! Murphy & Koop (2005), Q. J. R. Meteorol. Soc. 131:1539, eqs. 7 and 10.
//!
//! At equilibrium the unfrozen solution of a freezing mix has exactly this water
//! activity, so `ln_ice_activity(T)` is the target every solution model aims at.

/// Kelvin offset of the Celsius scale (K).
pub const KELVIN_OFFSET: f64 = 273.15;

/// Natural log of the vapour pressure of hexagonal ice (Pa), Murphy & Koop eq. 7.
pub fn ln_p_ice_pa(temp_k: f64) -> f64 {
    9.550426 - 5723.265 / temp_k + 3.53068 * temp_k.ln() - 0.00728332 * temp_k
}

/// Natural log of the vapour pressure of (supercooled) liquid water (Pa), Murphy & Koop eq. 10.
pub fn ln_p_liquid_pa(temp_k: f64) -> f64 {
    let ln_t = temp_k.ln();
    54.842763 - 6763.22 / temp_k - 4.210 * ln_t
        + 0.000367 * temp_k
        + (0.0415 * (temp_k - 218.8)).tanh()
            * (53.878 - 1331.22 / temp_k - 9.44523 * ln_t + 0.014025 * temp_k)
}

/// Natural log of p_ice / p_liquid at `temp_c` (°C), straight from Murphy & Koop's
/// formulas (valid 123 K < T < 332 K). The two curves meet at the triple point,
/// 0.01 °C, so this is -9.7e-5 rather than 0 at 0 °C.
pub fn ln_vapour_pressure_ratio(temp_c: f64) -> f64 {
    let temp_k = temp_c + KELVIN_OFFSET;
    ln_p_ice_pa(temp_k) - ln_p_liquid_pa(temp_k)
}

/// p_ice / p_liquid at `temp_c` (°C), the published quantity (0..1 below 0 °C).
pub fn ice_activity(temp_c: f64) -> f64 {
    ln_vapour_pressure_ratio(temp_c).exp()
}

/// Natural log of the activity of ice relative to supercooled water at
/// `temp_c` (°C) for a mix at atmospheric pressure: the vapour-pressure ratio
/// referred to the normal melting point, so pure water freezes at exactly 0 °C.
/// (The 0.01 K between the triple point and the normal melting point is the
/// effect of pressure and dissolved air; shifting ln a by a constant removes it.)
pub fn ln_ice_activity(temp_c: f64) -> f64 {
    ln_vapour_pressure_ratio(temp_c) - ln_vapour_pressure_ratio(0.0)
}

/// Derivative d ln a_ice / dT (1/K) at `temp_c` (°C), by a central difference.
pub fn d_ln_ice_activity_dt(temp_c: f64) -> f64 {
    let h = 1e-4;
    (ln_ice_activity(temp_c + h) - ln_ice_activity(temp_c - h)) / (2.0 * h)
}

/// The temperature (°C) at which [`ln_ice_activity`] equals `ln_aw`, i.e. the
/// freezing point of a solution of that water activity. Newton iterations; valid
/// for water activities from 1 down to about 0.5 (-70 °C).
pub fn temp_c_for_ln_activity(ln_aw: f64) -> f64 {
    if ln_aw >= 0.0 {
        return 0.0;
    }
    // Constant-enthalpy first guess, ln a = -ΔH/R (1/T - 1/T0): ≈ 0.00969 per K near 0 °C.
    let mut temp_c = ln_aw / 0.00969;
    for _ in 0..30 {
        let f = ln_ice_activity(temp_c) - ln_aw;
        let step = f / d_ln_ice_activity_dt(temp_c);
        temp_c -= step;
        if step.abs() < 1e-10 {
            break;
        }
    }
    temp_c
}

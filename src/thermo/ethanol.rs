//! Ethanol-water density and strength at 20 °C, from OIML R 22 (International
//! Alcoholometric Tables, 1975): ρ(p) = Σ A_k p^(k−1) kg/m³ with p the mass
//! fraction of ethanol, and the conversions between % by mass and % by volume.

/// Density of pure ethanol at 20 °C (kg/m³), OIML R 22.
pub const ETHANOL_DENSITY_20C_KG_M3: f64 = 789.24;

/// The twelve coefficients A_1..A_12 of OIML R 22 for 20 °C (kg/m³).
const OIML_A: [f64; 12] = [
    998.20123,
    -192.9769495,
    389.1238958,
    -1668.103923,
    13522.15441,
    -88292.78388,
    306287.4042,
    -613838.1234,
    747017.2998,
    -547846.1354,
    223446.0334,
    -39032.85426,
];

/// Density (kg/m³) at 20 °C of an ethanol-water mixture with ethanol mass
/// fraction `mass_fraction` (0..1, clamped).
pub fn density_20c_kg_m3(mass_fraction: f64) -> f64 {
    let p = mass_fraction.clamp(0.0, 1.0);
    OIML_A.iter().rev().fold(0.0, |acc, a| acc * p + a)
}

/// Alcoholic strength by volume at 20 °C (% vol) of an ethanol-water mixture
/// with ethanol mass fraction `mass_fraction` (0..1).
pub fn abv_pct_from_mass_fraction(mass_fraction: f64) -> f64 {
    let p = mass_fraction.clamp(0.0, 1.0);
    100.0 * p * density_20c_kg_m3(p) / ETHANOL_DENSITY_20C_KG_M3
}

/// Ethanol mass fraction (0..1) of an ethanol-water mixture of `abv_pct`
/// (% vol at 20 °C, clamped to 0..100). Bisection: the strength rises
/// monotonically with the mass fraction.
pub fn mass_fraction_from_abv_pct(abv_pct: f64) -> f64 {
    let target = abv_pct.clamp(0.0, 100.0);
    let (mut lo, mut hi) = (0.0_f64, 1.0_f64);
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if abv_pct_from_mass_fraction(mid) < target {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

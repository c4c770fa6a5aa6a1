//! Characterising an unknown ingredient from measured freezing points (the
//! cryoscopic method).
//!
//! Each point is "SAMPLE_G of the sample in WATER_G of water froze at TEMP_C".
//! The sample's own water (when its dry matter is under 100 %) is added to the
//! water of the point. At the freezing point the solution's water activity is
//! the activity of ice, a_ice(T) of Murphy & Koop (`thermo::ice`), which for
//! small depressions reduces to the dilute law ΔT = Kf · i · m but stays right
//! at larger ones, where Kf alone runs several percent off.
//!
//! The solids are described the way a user's own solute is: molar mass M,
//! dissociation factor i and the Norrish (1966) form
//! ln a_w = ln x_w − K x_s², x_s the mole fraction of dissolved particles.
//! With one point K cannot be told apart from M, so K = 0 (ideal) and `norrish_k`
//! is `None`. With two or more, M and K are fitted together by least squares on
//! the freezing points (K held within 0..[`NORRISH_K_MAX`]). The Norrish term
//! vanishes as x_s → 0, so the fitted M *is* the molar mass extrapolated to
//! infinite dilution; each point's own apparent M (ideal law) is reported so the
//! trend behind the extrapolation can be seen.
//!
//! For electrolytes, M is an *effective* molar mass: with i given as the ion
//! count, ion interactions (osmotic coefficient below 1) make M come out a few
//! percent above the formula weight, which is what predicts freezing best.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use crate::catalog::{Catalog, CatalogError, validate_id};
use crate::model::{Category, Ingredient, Solute, SoluteKind};
use crate::thermo::binary::{Binary, WATER_MOLAR_MASS_KG, WaterModel};
use crate::thermo::ice::{ln_ice_activity, temp_c_for_ln_activity};

/// Largest Norrish K a fit may use (dimensionless). Published values run from
/// about 0.9 (mannitol) to 10.2 (lactose); 25 leaves room without admitting
/// nonsense.
pub const NORRISH_K_MAX: f64 = 25.0;

/// Concentration at which the sucrose equivalent is stated: 5 g of solids per
/// 100 g of water, the range of a single sugar in a mix's serum.
pub const SUCROSE_EQUIVALENT_REFERENCE_G_PER_100G_WATER: f64 = 5.0;

/// Default precision of a freezing-point reading (K): the ±0.005 K rounding of
/// the CRC tables, and a cryoscope's repeatability.
pub const DEFAULT_PRECISION_K: f64 = 0.005;

/// Coldest freezing point accepted (°C); the ice model is used down to about −60 °C.
pub const COLDEST_C: f64 = -50.0;

/// Cryoscopic constant of water for the dilute-law comparison (K kg/mol).
pub const KF_WATER: f64 = 1.8597;

/// Estimated apparent specific volume of dissolved solids (mL/g), for the saved
/// ingredient's density: typical of sugars in solution (memory).
const SOLIDS_SPECIFIC_VOLUME_ML_G: f64 = 0.62;

/// One measurement: `sample_g` of the sample in `water_g` of water froze at `freezing_point_c`.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct DilutionPoint {
    /// Sample weighed in (g).
    pub sample_g: f64,
    /// Water added (g); 0 for the sample on its own.
    pub water_g: f64,
    /// Measured freezing point (°C).
    pub freezing_point_c: f64,
}

/// What is known of the sample's dry matter.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum DryMatter {
    /// Dissolved solids as mass % of the sample (100 for a pure solid).
    SolidsPct(f64),
    /// A refractometer reading (°Brix), taken as mass % of dissolved solids.
    Brix(f64),
}

impl DryMatter {
    /// The dissolved solids as mass % of the sample.
    pub fn solids_pct(self) -> f64 {
        match self {
            DryMatter::SolidsPct(p) | DryMatter::Brix(p) => p,
        }
    }
}

/// The sample to characterise and what is known of it.
#[derive(Debug, Clone, PartialEq)]
pub struct SampleSpec {
    /// Kebab-case id for the saved ingredient; the solute gets `ID-solids`.
    pub id: String,
    /// Display name.
    pub name: String,
    /// Dry matter (default: a pure solid, 100 %).
    pub dry_matter: DryMatter,
    /// Van 't Hoff factor i of the solids (default 1; 2 for table salt).
    pub dissociation: f64,
    /// Kind of the dissolved solids (default other).
    pub kind: SoluteKind,
    /// Category of the saved ingredient (default other).
    pub category: Category,
    /// Precision of the freezing-point readings (K), for judging whether points agree.
    pub precision_k: f64,
}

impl SampleSpec {
    /// A pure solid (100 % solids, i = 1) with the default precision.
    pub fn new(id: &str, name: &str) -> SampleSpec {
        SampleSpec {
            id: id.to_string(),
            name: name.to_string(),
            dry_matter: DryMatter::SolidsPct(100.0),
            dissociation: 1.0,
            kind: SoluteKind::Other,
            category: Category::Other,
            precision_k: DEFAULT_PRECISION_K,
        }
    }
}

/// One point with the model's answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PointFit {
    /// Sample weighed in (g).
    pub sample_g: f64,
    /// Water added (g).
    pub water_g: f64,
    /// Measured freezing point (°C).
    pub freezing_point_c: f64,
    /// The fitted model's freezing point (°C).
    pub model_c: f64,
    /// Measured minus model (K).
    pub residual_k: f64,
    /// Dissolved solids in the point (g).
    pub solids_g: f64,
    /// All water in the point, the sample's own included (g).
    pub total_water_g: f64,
    /// Molar mass this point alone gives by the ideal law with the ice activity (g/mol).
    pub apparent_molar_mass_g_mol: f64,
    /// Molar mass this point alone gives by the dilute law ΔT = Kf · i · m (g/mol).
    pub dilute_law_molar_mass_g_mol: f64,
}

/// The result: the solids' effective molar mass and what to save.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Characterisation {
    /// Id of the saved ingredient.
    pub id: String,
    /// Name.
    pub name: String,
    /// Effective molar mass of the dissolved solids at infinite dilution (g/mol).
    pub molar_mass_g_mol: f64,
    /// Fitted Norrish K; `None` with a single point.
    pub norrish_k: Option<f64>,
    /// Grams of sucrose giving the same freezing point as 1 g of these solids, both at
    /// [`SUCROSE_EQUIVALENT_REFERENCE_G_PER_100G_WATER`] g of solids per 100 g water.
    pub sucrose_equivalent: f64,
    /// The reference concentration of the sucrose equivalent (g solids per 100 g water).
    pub sucrose_equivalent_reference_g_per_100g_water: f64,
    /// Dissociation factor used.
    pub dissociation: f64,
    /// Dissolved solids of the sample (mass %).
    pub solids_pct: f64,
    /// Root-mean-square of the residuals (K).
    pub rms_residual_k: f64,
    /// Each point with the model's freezing point.
    pub points: Vec<PointFit>,
    /// The solute to save (model = ideal with the fitted K), validated.
    #[serde(skip)]
    pub solute: Solute,
    /// The ingredient to save (the sample as measured), validated.
    #[serde(skip)]
    pub ingredient: Ingredient,
}

/// Why a set of points cannot be characterised.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CharacteriseError {
    /// No points.
    #[error("no measurements: give at least one point (sample g, water g, freezing point °C)")]
    NoPoints,
    /// A number is NaN or infinite.
    #[error("point {point}: {field} must be a finite number, not {value}")]
    NotFinite {
        /// 1-based point number.
        point: usize,
        /// Which field.
        field: &'static str,
        /// The value given.
        value: f64,
    },
    /// The sample mass is not above zero.
    #[error("point {point}: the sample must weigh more than 0 g, not {value} g")]
    SampleNotPositive {
        /// 1-based point number.
        point: usize,
        /// The value given (g).
        value: f64,
    },
    /// The added water is negative.
    #[error("point {point}: the water added must be 0 g or more, not {value} g")]
    WaterNegative {
        /// 1-based point number.
        point: usize,
        /// The value given (g).
        value: f64,
    },
    /// Nothing to freeze.
    #[error("point {point}: the sample brings no water and none was added, so nothing can freeze")]
    NoWater {
        /// 1-based point number.
        point: usize,
    },
    /// The freezing point is not below 0 °C.
    #[error(
        "point {point}: a freezing point of {temp_c} °C is not below 0 °C; dissolved solids always freeze below pure water, so check the reading and the instrument's zero"
    )]
    NotBelowZero {
        /// 1-based point number.
        point: usize,
        /// The reading (°C).
        temp_c: f64,
    },
    /// The freezing point is too cold for the ice model.
    #[error(
        "point {point}: {temp_c} °C is colder than {COLDEST_C} °C, beyond the ice model gelu uses"
    )]
    TooCold {
        /// 1-based point number.
        point: usize,
        /// The reading (°C).
        temp_c: f64,
    },
    /// The dry matter is out of range.
    #[error("the dry matter must be above 0 % and at most 100 %, not {value} %")]
    BadSolids {
        /// The value given (mass % or °Brix).
        value: f64,
    },
    /// The dissociation factor is out of range.
    #[error(
        "the dissociation factor must be above 0 and at most 10 (1 for sugars, 2 for table salt), not {value}"
    )]
    BadDissociation {
        /// The value given.
        value: f64,
    },
    /// The precision is not a positive number.
    #[error("the reading precision must be a positive number of kelvin, not {value}")]
    BadPrecision {
        /// The value given (K).
        value: f64,
    },
    /// More solute froze warmer.
    #[error(
        "point {warmer} has more sample per gram of water than point {colder} but froze warmer ({warmer_c} °C against {colder_c} °C); more solute can only freeze colder, so one of the two is wrong"
    )]
    Contradiction {
        /// The more concentrated point that froze warmer (1-based).
        warmer: usize,
        /// The less concentrated point (1-based).
        colder: usize,
        /// Reading of the first (°C).
        warmer_c: f64,
        /// Reading of the second (°C).
        colder_c: f64,
    },
    /// No Norrish K in range fits.
    #[error(
        "no Norrish K from 0 to {NORRISH_K_MAX} makes the points agree: point {point} is {residual_k:+.3} K off the best fit (K = {norrish_k:.2}), more than the {tolerance_k:.3} K its precision allows; check the weighings and the readings"
    )]
    NoSaneFit {
        /// The worst point (1-based).
        point: usize,
        /// Its residual (K).
        residual_k: f64,
        /// The tolerance it broke (K).
        tolerance_k: f64,
        /// The best K found.
        norrish_k: f64,
    },
    /// The catalog has no sucrose to compare with.
    #[error("the catalog has no `sucrose` to state the sucrose equivalent against")]
    NoSucrose,
    /// The solute or ingredient to save is invalid.
    #[error(transparent)]
    Catalog(#[from] CatalogError),
}

/// A point reduced to what the fit needs.
#[derive(Debug, Clone, Copy)]
struct Prepared {
    solids_g: f64,
    water_g: f64,
    ln_aw: f64,
    temp_c: f64,
}

impl Prepared {
    /// Solids per gram of water (g/g).
    fn concentration(&self) -> f64 {
        self.solids_g / self.water_g
    }

    /// Depression below 0 °C (K).
    fn depression_k(&self) -> f64 {
        -self.temp_c
    }
}

/// Characterises the sample from its points; the solute and ingredient are
/// validated against `catalog` (which also supplies sucrose for the equivalent).
pub fn characterise(
    spec: &SampleSpec,
    points: &[DilutionPoint],
    catalog: &Catalog,
) -> Result<Characterisation, CharacteriseError> {
    let solids_pct = spec.dry_matter.solids_pct();
    if !(solids_pct > 0.0 && solids_pct <= 100.0) {
        return Err(CharacteriseError::BadSolids { value: solids_pct });
    }
    let i = spec.dissociation;
    if !(i > 0.0 && i <= 10.0) {
        return Err(CharacteriseError::BadDissociation { value: i });
    }
    if !(spec.precision_k > 0.0 && spec.precision_k.is_finite()) {
        return Err(CharacteriseError::BadPrecision {
            value: spec.precision_k,
        });
    }
    validate_id(&spec.id)?;
    let prepared = prepare(points, solids_pct / 100.0)?;
    check_order(&prepared, spec.precision_k)?;

    let (molar_mass, norrish_k) = if prepared.len() == 1 {
        (apparent_molar_mass(&prepared[0], i, 0.0), None)
    } else {
        let (m, k) = fit(&prepared, i);
        (m, Some(k))
    };
    let k = norrish_k.unwrap_or(0.0);
    let binary = Binary {
        dissociation: i,
        model: WaterModel::Ideal { norrish_k: k },
    };
    let fits: Vec<PointFit> = points
        .iter()
        .zip(&prepared)
        .map(|(raw, p)| {
            let model_c = model_temp_c(&binary, molar_mass, p);
            PointFit {
                sample_g: raw.sample_g,
                water_g: raw.water_g,
                freezing_point_c: raw.freezing_point_c,
                model_c,
                residual_k: raw.freezing_point_c - model_c,
                solids_g: p.solids_g,
                total_water_g: p.water_g,
                apparent_molar_mass_g_mol: apparent_molar_mass(p, i, 0.0),
                dilute_law_molar_mass_g_mol: KF_WATER * i * p.solids_g
                    / (p.depression_k() * p.water_g / 1000.0),
            }
        })
        .collect();
    if norrish_k.is_some() {
        check_residuals(&prepared, &fits, spec.precision_k, k)?;
    }
    let rms_residual_k =
        (fits.iter().map(|f| f.residual_k.powi(2)).sum::<f64>() / fits.len() as f64).sqrt();
    let sucrose_equivalent = sucrose_equivalent(&binary, molar_mass, catalog)?;

    let solute = Solute {
        id: format!("{}-solids", spec.id),
        name: format!("{} (dissolved solids)", spec.name),
        kind: spec.kind,
        molar_mass_g_mol: molar_mass,
        dissociation: i,
        model: WaterModel::Ideal { norrish_k: k },
        sweetness: None,
        solubility_g_per_100g_water_0c: None,
        source: source_text(spec, points, norrish_k),
    };
    let ingredient = sample_ingredient(spec, &solute, solids_pct);
    catalog.with_additions(
        std::slice::from_ref(&solute),
        std::slice::from_ref(&ingredient),
    )?;

    Ok(Characterisation {
        id: spec.id.clone(),
        name: spec.name.clone(),
        molar_mass_g_mol: molar_mass,
        norrish_k,
        sucrose_equivalent,
        sucrose_equivalent_reference_g_per_100g_water:
            SUCROSE_EQUIVALENT_REFERENCE_G_PER_100G_WATER,
        dissociation: i,
        solids_pct,
        rms_residual_k,
        points: fits,
        solute,
        ingredient,
    })
}

/// Checks each point and reduces it to solids, water and ice activity.
fn prepare(
    points: &[DilutionPoint],
    solids_fraction: f64,
) -> Result<Vec<Prepared>, CharacteriseError> {
    if points.is_empty() {
        return Err(CharacteriseError::NoPoints);
    }
    points
        .iter()
        .enumerate()
        .map(|(k, p)| {
            let point = k + 1;
            let fields = [
                ("sample_g", p.sample_g),
                ("water_g", p.water_g),
                ("freezing_point_c", p.freezing_point_c),
            ];
            for (field, value) in fields {
                if !value.is_finite() {
                    return Err(CharacteriseError::NotFinite {
                        point,
                        field,
                        value,
                    });
                }
            }
            if !(p.sample_g > 0.0) {
                return Err(CharacteriseError::SampleNotPositive {
                    point,
                    value: p.sample_g,
                });
            }
            if p.water_g < 0.0 {
                return Err(CharacteriseError::WaterNegative {
                    point,
                    value: p.water_g,
                });
            }
            if !(p.freezing_point_c < 0.0) {
                return Err(CharacteriseError::NotBelowZero {
                    point,
                    temp_c: p.freezing_point_c,
                });
            }
            if p.freezing_point_c < COLDEST_C {
                return Err(CharacteriseError::TooCold {
                    point,
                    temp_c: p.freezing_point_c,
                });
            }
            let water_g = p.water_g + p.sample_g * (1.0 - solids_fraction);
            if !(water_g > 0.0) {
                return Err(CharacteriseError::NoWater { point });
            }
            Ok(Prepared {
                solids_g: p.sample_g * solids_fraction,
                water_g,
                ln_aw: ln_ice_activity(p.freezing_point_c),
                temp_c: p.freezing_point_c,
            })
        })
        .collect()
}

/// Refuses a more concentrated point that froze warmer by more than twice the precision.
fn check_order(points: &[Prepared], precision_k: f64) -> Result<(), CharacteriseError> {
    for (a, pa) in points.iter().enumerate() {
        for (b, pb) in points.iter().enumerate() {
            let more_concentrated = pb.concentration() > pa.concentration() * (1.0 + 1e-9);
            if more_concentrated && pb.temp_c > pa.temp_c + 2.0 * precision_k {
                return Err(CharacteriseError::Contradiction {
                    warmer: b + 1,
                    colder: a + 1,
                    warmer_c: pb.temp_c,
                    colder_c: pa.temp_c,
                });
            }
        }
    }
    Ok(())
}

/// Refuses a fit whose worst point lies beyond 3 precisions plus 3 % of its depression
/// (the Norrish form's own error at high concentration is about 3 %).
fn check_residuals(
    points: &[Prepared],
    fits: &[PointFit],
    precision_k: f64,
    norrish_k: f64,
) -> Result<(), CharacteriseError> {
    let worst = points
        .iter()
        .zip(fits)
        .enumerate()
        .map(|(k, (p, f))| {
            let tolerance = 3.0 * precision_k + 0.03 * p.depression_k();
            (k, f.residual_k, tolerance, f.residual_k.abs() / tolerance)
        })
        .max_by(|a, b| a.3.total_cmp(&b.3));
    match worst {
        Some((k, residual_k, tolerance_k, ratio)) if ratio > 1.0 => {
            Err(CharacteriseError::NoSaneFit {
                point: k + 1,
                residual_k,
                tolerance_k,
                norrish_k,
            })
        }
        _ => Ok(()),
    }
}

/// Particle mole fraction x_s at which ln(1 − x) − K x² equals `ln_aw` (bisection; K ≥ 0).
fn particle_fraction(ln_aw: f64, norrish_k: f64) -> f64 {
    let f = |x: f64| (1.0 - x).ln() - norrish_k * x * x - ln_aw;
    let (mut lo, mut hi) = (0.0_f64, 1.0 - 1e-12);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f(mid) > 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < 1e-15 {
            break;
        }
    }
    0.5 * (lo + hi)
}

/// The molar mass (g/mol) one point gives for Norrish constant `norrish_k`.
fn apparent_molar_mass(p: &Prepared, i: f64, norrish_k: f64) -> f64 {
    let x = particle_fraction(p.ln_aw, norrish_k);
    let water_mol = p.water_g / 1000.0 / WATER_MOLAR_MASS_KG;
    let particles = water_mol * x / (1.0 - x);
    i * p.solids_g / particles
}

/// The model's freezing point (°C) for a point.
fn model_temp_c(binary: &Binary, molar_mass: f64, p: &Prepared) -> f64 {
    let molality = p.solids_g / molar_mass / (p.water_g / 1000.0);
    temp_c_for_ln_activity(binary.ln_aw(molality))
}

/// Sum of squared temperature residuals (K²).
fn sse(points: &[Prepared], i: f64, molar_mass: f64, norrish_k: f64) -> f64 {
    let binary = Binary {
        dissociation: i,
        model: WaterModel::Ideal { norrish_k },
    };
    points
        .iter()
        .map(|p| (model_temp_c(&binary, molar_mass, p) - p.temp_c).powi(2))
        .sum()
}

/// Golden-section minimum of `f` on [lo, hi].
fn golden_min(mut lo: f64, mut hi: f64, f: impl Fn(f64) -> f64) -> f64 {
    const R: f64 = 0.618_033_988_749_895;
    let mut c = hi - R * (hi - lo);
    let mut d = lo + R * (hi - lo);
    let (mut fc, mut fd) = (f(c), f(d));
    for _ in 0..80 {
        if fc < fd {
            hi = d;
            d = c;
            fd = fc;
            c = hi - R * (hi - lo);
            fc = f(c);
        } else {
            lo = c;
            c = d;
            fc = fd;
            d = lo + R * (hi - lo);
            fd = f(d);
        }
        if (hi - lo).abs() < 1e-12 * (1.0 + lo.abs()) {
            break;
        }
    }
    0.5 * (lo + hi)
}

/// Best molar mass for a given K: between the smallest and largest single-point value.
fn best_molar_mass(points: &[Prepared], i: f64, norrish_k: f64) -> f64 {
    let apparent: Vec<f64> = points
        .iter()
        .map(|p| apparent_molar_mass(p, i, norrish_k).ln())
        .collect();
    let lo = apparent.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = apparent.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if hi - lo < 1e-12 {
        return lo.exp();
    }
    golden_min(lo, hi, |ln_m| sse(points, i, ln_m.exp(), norrish_k)).exp()
}

/// Least-squares (M, K): a grid over K, refined by golden section around the best.
fn fit(points: &[Prepared], i: f64) -> (f64, f64) {
    let profile = |k: f64| sse(points, i, best_molar_mass(points, i, k), k);
    let steps = 100;
    let step = NORRISH_K_MAX / steps as f64;
    let best = (0..=steps)
        .map(|s| s as f64 * step)
        .map(|k| (k, profile(k)))
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map_or(0.0, |(k, _)| k);
    let k = golden_min(
        (best - step).max(0.0),
        (best + step).min(NORRISH_K_MAX),
        profile,
    );
    (best_molar_mass(points, i, k), k)
}

/// Grams of sucrose per gram of these solids giving the same freezing point, at the
/// reference concentration (equal water activity means equal freezing point).
fn sucrose_equivalent(
    binary: &Binary,
    molar_mass: f64,
    catalog: &Catalog,
) -> Result<f64, CharacteriseError> {
    let sucrose = catalog
        .solute("sucrose")
        .ok_or(CharacteriseError::NoSucrose)?;
    let reference = SUCROSE_EQUIVALENT_REFERENCE_G_PER_100G_WATER;
    let molality = reference / molar_mass / 0.1;
    let ln_aw = binary.ln_aw(molality);
    let sucrose_molality = sucrose.binary.molality_at(ln_aw, None);
    let sucrose_g_per_100g_water = sucrose_molality * sucrose.solute.molar_mass_g_mol * 0.1;
    Ok(sucrose_g_per_100g_water / reference)
}

/// The `source` text that records the measurements.
fn source_text(spec: &SampleSpec, points: &[DilutionPoint], norrish_k: Option<f64>) -> String {
    let readings: Vec<String> = points
        .iter()
        .map(|p| {
            format!(
                "{} g in {} g water froze at {} °C",
                p.sample_g, p.water_g, p.freezing_point_c
            )
        })
        .collect();
    let basis = match spec.dry_matter {
        DryMatter::SolidsPct(p) => format!("{p} % dissolved solids"),
        DryMatter::Brix(b) => format!("{b} °Brix taken as % dissolved solids"),
    };
    let k = match norrish_k {
        Some(k) => format!("Norrish K {k:.2} fitted"),
        None => "one point, so ideal law (K = 0)".to_string(),
    };
    format!(
        "measured freezing points (cryoscopic method): {}; sample {basis}, i = {}; Murphy & Koop ice activity, {k}",
        readings.join("; "),
        spec.dissociation
    )
}

/// The sample as measured: its water and its dissolved solids as the new solute.
fn sample_ingredient(spec: &SampleSpec, solute: &Solute, solids_pct: f64) -> Ingredient {
    let solids = solids_pct / 100.0;
    let specific_volume = (1.0 - solids) + solids * SOLIDS_SPECIFIC_VOLUME_ML_G;
    Ingredient {
        id: spec.id.clone(),
        name: spec.name.clone(),
        category: spec.category,
        water_pct: 100.0 - solids_pct,
        fat_pct: 0.0,
        protein_pct: 0.0,
        other_solids_pct: 0.0,
        solutes_pct: BTreeMap::from([(solute.id.clone(), solids_pct)]),
        density_g_ml: 1.0 / specific_volume,
        allergens: Vec::new(),
        source: format!(
            "{}; density estimated from typical specific volumes, measure it for amounts by volume",
            solute.source
        ),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_single_ideal_point_gives_back_its_molar_mass() {
        // Build a point from the ideal law itself: 10 g of M = 200 g/mol in 1000 g water.
        let binary = Binary {
            dissociation: 1.0,
            model: WaterModel::Ideal { norrish_k: 0.0 },
        };
        let t = temp_c_for_ln_activity(binary.ln_aw(10.0 / 200.0));
        let p = Prepared {
            solids_g: 10.0,
            water_g: 1000.0,
            ln_aw: ln_ice_activity(t),
            temp_c: t,
        };
        assert!((apparent_molar_mass(&p, 1.0, 0.0) - 200.0).abs() < 1e-6);
    }

    #[test]
    fn the_fit_recovers_a_known_norrish_k() {
        // Points made from M = 150 g/mol, K = 4 must give both back.
        let binary = Binary {
            dissociation: 1.0,
            model: WaterModel::Ideal { norrish_k: 4.0 },
        };
        let points: Vec<Prepared> = [20.0, 150.0, 400.0, 800.0]
            .iter()
            .map(|g| {
                let t = temp_c_for_ln_activity(binary.ln_aw(g / 150.0));
                Prepared {
                    solids_g: *g,
                    water_g: 1000.0,
                    ln_aw: ln_ice_activity(t),
                    temp_c: t,
                }
            })
            .collect();
        let (m, k) = fit(&points, 1.0);
        assert!((m - 150.0).abs() < 0.01, "{m}");
        assert!((k - 4.0).abs() < 0.01, "{k}");
    }
}

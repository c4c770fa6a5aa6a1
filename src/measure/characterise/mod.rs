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

mod error;
mod fit;
mod record;

use serde::{Deserialize, Serialize};

use crate::catalog::{Catalog, validate_id};
use crate::model::units::{parse_number, parse_temp};
use crate::model::{Category, Ingredient, Solute, SoluteKind, TempUnit};
use crate::thermo::binary::{Binary, WaterModel};
use crate::thermo::ice::ln_ice_activity;

pub use error::CharacteriseError;
use fit::{Prepared, apparent_molar_mass, fit, model_temp_c};
use record::{sample_ingredient, source_text, sucrose_equivalent};

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

impl DilutionPoint {
    /// Reads a point as typed, `SAMPLE_G:WATER_G:TEMP`: masses in grams (a comma
    /// may be the decimal mark), the temperature as `model::units` reads one (a
    /// bare number in `unit`, or with a C or F suffix). Whether the point can be
    /// right is [`characterise()`]'s to judge.
    pub fn parse(text: &str, unit: TempUnit) -> Result<DilutionPoint, String> {
        let parts: Vec<&str> = text.split(':').collect();
        let [sample, water, temp] = parts.as_slice() else {
            return Err(format!(
                "`{}` should be SAMPLE_G:WATER_G:TEMP, like 10:90:-1.17 (10 g of the sample in 90 g of water froze at -1.17 °C)",
                text.trim()
            ));
        };
        let grams = |what: &str, t: &str| {
            parse_number(t).map_err(|_| {
                format!(
                    "`{}`: the {what} `{}` is not a number of grams",
                    text.trim(),
                    t.trim()
                )
            })
        };
        Ok(DilutionPoint {
            sample_g: grams("sample", sample)?,
            water_g: grams("water", water)?,
            freezing_point_c: parse_temp(temp, unit)
                .map_err(|e| format!("`{}`: {e}", text.trim()))?,
        })
    }
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
    /// What to be wary of in a result that was not refused (for example a Norrish
    /// K held at [`NORRISH_K_MAX`]), in plain words; empty when nothing is.
    pub cautions: Vec<String>,
    /// The solute to save (model = ideal with the fitted K), validated.
    #[serde(skip)]
    pub solute: Solute,
    /// The ingredient to save (the sample as measured), validated.
    #[serde(skip)]
    pub ingredient: Ingredient,
}

/// Whether a fitted K is held at [`NORRISH_K_MAX`]: the search ends within about
/// 1e-9 of a bound, and 0.001 is far inside what any fit means.
fn k_at_limit(k: f64) -> bool {
    k > NORRISH_K_MAX - 1e-3
}

impl Characterisation {
    /// Whether the fitted Norrish K is held at its limit (then a caution says so).
    pub fn norrish_k_at_limit(&self) -> bool {
        self.norrish_k.is_some_and(k_at_limit)
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
    let mut cautions = Vec::new();
    if norrish_k.is_some_and(k_at_limit) {
        cautions.push(format!(
            "Norrish K is held at its limit of {NORRISH_K_MAX} (published sugars and polyols run \
             from about 0.9 to 10.2): the molar mass falls with concentration faster than a \
             sugar's would. Check the weighings and the dry matter, or add a more dilute point; \
             the molar mass at infinite dilution rests on this limit."
        ));
    }
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
        cautions,
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

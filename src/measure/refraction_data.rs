//! Published refractive indices at 20 °C (sodium D line, 589 nm) that the
//! refractometer prediction rests on. Data only: the arithmetic lives in
//! `refractometer.rs`.
//!
//! - The sucrose scale: ICUMSA (1974), refractive index against °Brix (mass %
//!   of sucrose), every 1 °Bx from 0 to 85, five decimals. This is the scale a
//!   refractometer reading in °Brix is defined by.
//! - Other solutes: CRC Handbook of Chemistry and Physics, 102nd ed. (2021),
//!   "Concentrative Properties of Aqueous Solutions", column n (four decimals;
//!   pure water 1.3330 in that table). To leave rows for an independent check,
//!   only some rows are copied here (see `tests/measure.rs`, which checks the
//!   rows left out).

/// Refractive index of pure water at 20 °C on the ICUMSA scale (0 °Bx).
pub const WATER_ICUMSA: f64 = 1.33299;

/// Refractive index of pure water at 20 °C as the CRC table gives it.
pub const WATER_CRC: f64 = 1.3330;

/// ICUMSA (1974) refractive index at 20 °C for 0, 1, …, 85 °Brix.
pub const ICUMSA_1974: [f64; 86] = [
    1.33299, 1.33442, 1.33586, 1.33732, 1.33879, 1.34026, 1.34175, 1.34325, 1.34477, 1.34629,
    1.34782, 1.34937, 1.35093, 1.35250, 1.35408, 1.35568, 1.35729, 1.35891, 1.36054, 1.36218,
    1.36384, 1.36551, 1.36720, 1.36889, 1.37060, 1.37233, 1.37406, 1.37582, 1.37758, 1.37936,
    1.38115, 1.38296, 1.38478, 1.38661, 1.38846, 1.39032, 1.39220, 1.39409, 1.39600, 1.39792,
    1.39986, 1.40181, 1.40378, 1.40576, 1.40776, 1.40978, 1.41181, 1.41385, 1.41592, 1.41799,
    1.42009, 1.42220, 1.42432, 1.42647, 1.42863, 1.43080, 1.43299, 1.43520, 1.43743, 1.43967,
    1.44193, 1.44420, 1.44650, 1.44881, 1.45113, 1.45348, 1.45584, 1.45822, 1.46061, 1.46303,
    1.46546, 1.46790, 1.47037, 1.47285, 1.47535, 1.47787, 1.48040, 1.48295, 1.48552, 1.48811,
    1.49071, 1.49333, 1.49597, 1.49862, 1.50129, 1.50398,
];

/// A binary solution's refractive index against its concentration.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RefractionTable {
    /// Name of the solute as the source lists it.
    pub source_name: &'static str,
    /// (mass % of solute in the solution, n at 20 °C), ascending.
    pub rows: &'static [(f64, f64)],
}

/// D-glucose (CRC, every second row up to 20 %, then every 4 %).
pub const GLUCOSE: RefractionTable = RefractionTable {
    source_name: "D-Glucose",
    rows: &[
        (0.0, WATER_CRC),
        (2.0, 1.3358),
        (4.0, 1.3387),
        (6.0, 1.3417),
        (8.0, 1.3447),
        (10.0, 1.3477),
        (12.0, 1.3508),
        (14.0, 1.3539),
        (16.0, 1.3571),
        (18.0, 1.3603),
        (20.0, 1.3635),
        (24.0, 1.3702),
        (28.0, 1.3770),
        (32.0, 1.3840),
        (36.0, 1.3912),
        (40.0, 1.3986),
        (44.0, 1.4062),
        (48.0, 1.4141),
        (52.0, 1.4222),
        (56.0, 1.4306),
        (60.0, 1.4394),
    ],
};

/// D-fructose (CRC).
pub const FRUCTOSE: RefractionTable = RefractionTable {
    source_name: "D-Fructose",
    rows: &[
        (0.0, WATER_CRC),
        (2.0, 1.3358),
        (4.0, 1.3387),
        (6.0, 1.3417),
        (8.0, 1.3446),
        (10.0, 1.3476),
        (12.0, 1.3507),
        (14.0, 1.3538),
        (16.0, 1.3569),
        (18.0, 1.3601),
        (20.0, 1.3634),
        (24.0, 1.3700),
        (28.0, 1.3768),
        (32.0, 1.3839),
        (36.0, 1.3911),
        (40.0, 1.3985),
        (44.0, 1.4062),
        (48.0, 1.4141),
    ],
};

/// Lactose (CRC; the table ends at 18 %, near its solubility).
pub const LACTOSE: RefractionTable = RefractionTable {
    source_name: "Lactose",
    rows: &[
        (0.0, WATER_CRC),
        (2.0, 1.3359),
        (4.0, 1.3390),
        (6.0, 1.3421),
        (8.0, 1.3453),
        (10.0, 1.3484),
        (12.0, 1.3515),
        (14.0, 1.3548),
        (16.0, 1.3582),
        (18.0, 1.3619),
    ],
};

/// Maltose (CRC).
pub const MALTOSE: RefractionTable = RefractionTable {
    source_name: "Maltose",
    rows: &[
        (0.0, WATER_CRC),
        (2.0, 1.3359),
        (4.0, 1.3389),
        (6.0, 1.3420),
        (8.0, 1.3450),
        (10.0, 1.3482),
        (12.0, 1.3513),
        (14.0, 1.3546),
        (16.0, 1.3578),
        (18.0, 1.3612),
        (20.0, 1.3644),
        (24.0, 1.3714),
        (28.0, 1.3785),
        (32.0, 1.3858),
        (36.0, 1.3935),
        (40.0, 1.4013),
        (44.0, 1.4094),
        (48.0, 1.4177),
        (52.0, 1.4260),
        (56.0, 1.4350),
        (60.0, 1.4440),
    ],
};

/// Glycerol (CRC).
pub const GLYCEROL: RefractionTable = RefractionTable {
    source_name: "Glycerol",
    rows: &[
        (0.0, WATER_CRC),
        (2.0, 1.3353),
        (4.0, 1.3376),
        (6.0, 1.3400),
        (8.0, 1.3424),
        (10.0, 1.3448),
        (12.0, 1.3472),
        (16.0, 1.3521),
        (20.0, 1.3572),
        (24.0, 1.3624),
        (28.0, 1.3676),
        (32.0, 1.3730),
        (40.0, 1.3841),
        (48.0, 1.3954),
        (56.0, 1.4069),
        (64.0, 1.4189),
        (72.0, 1.4310),
        (80.0, 1.4431),
    ],
};

/// Citric acid (CRC; the table ends at 30 %).
pub const CITRIC_ACID: RefractionTable = RefractionTable {
    source_name: "Citric acid",
    rows: &[
        (0.0, WATER_CRC),
        (2.0, 1.3356),
        (4.0, 1.3381),
        (6.0, 1.3407),
        (8.0, 1.3433),
        (10.0, 1.3459),
        (12.0, 1.3486),
        (16.0, 1.3541),
        (20.0, 1.3598),
        (24.0, 1.3655),
        (28.0, 1.3714),
        (30.0, 1.3744),
    ],
};

/// D-lactic acid (CRC).
pub const LACTIC_ACID: RefractionTable = RefractionTable {
    source_name: "D-Lactic acid",
    rows: &[
        (0.0, WATER_CRC),
        (2.0, 1.3350),
        (4.0, 1.3370),
        (6.0, 1.3390),
        (8.0, 1.3410),
        (10.0, 1.3430),
        (12.0, 1.3450),
        (16.0, 1.3491),
        (20.0, 1.3532),
        (24.0, 1.3573),
        (32.0, 1.3657),
        (40.0, 1.3743),
        (48.0, 1.3828),
        (60.0, 1.3958),
        (80.0, 1.4173),
    ],
};

/// Sodium chloride (CRC; the table ends at 26 %, near saturation).
pub const SODIUM_CHLORIDE: RefractionTable = RefractionTable {
    source_name: "Sodium chloride",
    rows: &[
        (0.0, WATER_CRC),
        (2.0, 1.3365),
        (4.0, 1.3400),
        (6.0, 1.3435),
        (8.0, 1.3470),
        (10.0, 1.3505),
        (12.0, 1.3541),
        (14.0, 1.3576),
        (16.0, 1.3612),
        (18.0, 1.3648),
        (20.0, 1.3684),
        (22.0, 1.3721),
        (24.0, 1.3757),
        (26.0, 1.3795),
    ],
};

/// Potassium chloride (CRC; the table ends at 24 %).
pub const POTASSIUM_CHLORIDE: RefractionTable = RefractionTable {
    source_name: "Potassium chloride",
    rows: &[
        (0.0, WATER_CRC),
        (2.0, 1.3357),
        (4.0, 1.3384),
        (6.0, 1.3411),
        (8.0, 1.3438),
        (10.0, 1.3466),
        (12.0, 1.3493),
        (14.0, 1.3521),
        (16.0, 1.3549),
        (18.0, 1.3577),
        (20.0, 1.3606),
        (24.0, 1.3665),
    ],
};

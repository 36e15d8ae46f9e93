//! Properties of liquid water that the activity models need: density, relative permittivity,
//! the Debye–Hückel A and B parameters at a temperature (Kw(T) is re-exported from [`crate::kw`]).

use crate::constants::{AVOGADRO_PER_MOL, BOLTZMANN_JOULES_PER_KELVIN, ELEMENTARY_CHARGE_COULOMBS};

/// Vacuum electric permittivity ε0 in F/m: CODATA 2018 recommended value 8.8541878128(13)e-12
/// (measured, no longer exact in the 2019 SI).
pub const VACUUM_PERMITTIVITY_FARADS_PER_METRE: f64 = 8.8541878128e-12;

/// Molar mass of water in kg/mol (18.015268 g/mol, the IAPWS-95 value).
pub const WATER_MOLAR_MASS_KG_PER_MOL: f64 = 0.018015268;

/// Lowest temperature the water property fits below cover (0 °C).
pub const WATER_FIT_MIN_KELVIN: f64 = 273.15;
/// Highest temperature the water property fits below cover (100 °C).
pub const WATER_FIT_MAX_KELVIN: f64 = 373.15;

/// Density of air-free water at 1 atm in kg/m³: Kell 1975, J. Chem. Eng. Data 20, 97, eq. 16
/// (coefficients from memory; the check value 997.047 kg/m³ at 25 °C is reproduced in the
/// tests), 0–150 °C.
pub fn water_density_kg_per_m3(temperature_kelvin: f64) -> f64 {
    let t = temperature_kelvin - 273.15;
    let c = KELL_DENSITY_NUMERATOR;
    (c[0] + c[1] * t + c[2] * t * t + c[3] * t.powi(3) + c[4] * t.powi(4) + c[5] * t.powi(5))
        / (1.0 + KELL_DENSITY_DENOMINATOR * t)
}

/// Kell's numerator coefficients, t in °C (kept public so the exporters write the very numbers
/// the library uses).
pub const KELL_DENSITY_NUMERATOR: [f64; 6] = [
    999.83952,
    16.945176,
    -7.9870401e-3,
    -46.170461e-6,
    105.56302e-9,
    -280.54253e-12,
];
/// Kell's denominator coefficient: `1 + b·t`, t in °C.
pub const KELL_DENSITY_DENOMINATOR: f64 = 16.879850e-3;

/// Malmberg & Maryott's coefficients, t in °C (public for the exporters, as above).
pub const PERMITTIVITY_COEFFICIENTS: [f64; 4] = [87.740, -0.40008, 9.398e-4, -1.410e-6];

/// Relative permittivity of water: Malmberg & Maryott 1956, J. Res. NBS 56, 1, eq. (2)
/// (coefficients from memory; gives 78.30 at 25 °C and 87.74 at 0 °C as that paper's table does),
/// 0–100 °C.
pub fn water_relative_permittivity(temperature_kelvin: f64) -> f64 {
    let t = temperature_kelvin - 273.15;
    let c = PERMITTIVITY_COEFFICIENTS;
    c[0] + c[1] * t + c[2] * t * t + c[3] * t.powi(3)
}

/// The Debye screening factor κ/√I in m⁻¹ (kg/mol)^½ from the permittivity and density of water.
fn screening_per_metre(temperature_kelvin: f64) -> f64 {
    let e = ELEMENTARY_CHARGE_COULOMBS;
    let permittivity =
        VACUUM_PERMITTIVITY_FARADS_PER_METRE * water_relative_permittivity(temperature_kelvin);
    // Number density of ionic strength: I mol/kg × ρ kg/m³ × N_A.
    (2.0 * AVOGADRO_PER_MOL * e * e * water_density_kg_per_m3(temperature_kelvin)
        / (permittivity * BOLTZMANN_JOULES_PER_KELVIN * temperature_kelvin))
        .sqrt()
}

/// Debye–Hückel A for `log10 γ = −A z² √I` in (kg/mol)^½, computed from Debye–Hückel theory
/// with the exact SI constants, ε0 (CODATA 2018), the permittivity of Malmberg & Maryott and the
/// density of Kell: 0.5108 at 25 °C (tables built on older permittivities give 0.509–0.510).
pub fn debye_huckel_a(temperature_kelvin: f64) -> f64 {
    let e = ELEMENTARY_CHARGE_COULOMBS;
    let permittivity =
        VACUUM_PERMITTIVITY_FARADS_PER_METRE * water_relative_permittivity(temperature_kelvin);
    let bjerrum_half = e * e
        / (8.0
            * std::f64::consts::PI
            * permittivity
            * BOLTZMANN_JOULES_PER_KELVIN
            * temperature_kelvin);
    bjerrum_half * screening_per_metre(temperature_kelvin) / std::f64::consts::LN_10
}

/// Debye–Hückel B of the extended law in Å⁻¹ (kg/mol)^½ (0.3287 at 25 °C), so that `B·å` is
/// dimensionless with the ion size å in Å.
pub fn debye_huckel_b_per_angstrom(temperature_kelvin: f64) -> f64 {
    screening_per_metre(temperature_kelvin) * 1e-10
}

/// Kw(T) lives in [`crate::kw`], the one place the project takes it from; re-exported here
/// beside the other properties of water.
pub use crate::kw::{KW_FIT_MAX_KELVIN, KW_FIT_MIN_KELVIN, log10_kw};

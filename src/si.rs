//! Exact SI constants for the Nernst layer, derived in code (private until the shared
//! constants module lands on this branch; the values and names follow it).

/// Elementary charge e in coulombs (exact since the 2019 SI; CODATA 2018).
pub(crate) const ELEMENTARY_CHARGE_COULOMBS: f64 = 1.602176634e-19;
/// Avogadro constant N_A in mol⁻¹ (exact since the 2019 SI; CODATA 2018).
pub(crate) const AVOGADRO_PER_MOL: f64 = 6.02214076e23;
/// Boltzmann constant k in J/K (exact since the 2019 SI; CODATA 2018).
pub(crate) const BOLTZMANN_JOULES_PER_KELVIN: f64 = 1.380649e-23;
/// Faraday constant F = e·N_A (an exact product).
pub(crate) const FARADAY_COULOMBS_PER_MOL: f64 = ELEMENTARY_CHARGE_COULOMBS * AVOGADRO_PER_MOL;
/// Molar gas constant R = k·N_A (an exact product).
pub(crate) const GAS_CONSTANT_JOULES_PER_MOL_KELVIN: f64 =
    BOLTZMANN_JOULES_PER_KELVIN * AVOGADRO_PER_MOL;
/// Vacuum electric permittivity ε0 in F/m: CODATA 2018 recommended value 8.8541878128(13)e-12
/// (measured, no longer exact in the 2019 SI).
pub(crate) const VACUUM_PERMITTIVITY_FARADS_PER_METRE: f64 = 8.8541878128e-12;
/// T° = 298.15 K.
pub(crate) const STANDARD_TEMPERATURE_KELVIN: f64 = 298.15;
/// Molar mass of water, 18.015268 g/mol (IAPWS-95 value), in kg/mol.
pub(crate) const WATER_MOLAR_MASS_KG_PER_MOL: f64 = 0.018015268;

/// RT/F in volts.
pub(crate) fn thermal_voltage_volts(temperature_kelvin: f64) -> f64 {
    GAS_CONSTANT_JOULES_PER_MOL_KELVIN * temperature_kelvin / FARADAY_COULOMBS_PER_MOL
}

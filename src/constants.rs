//! Physical constants: the exact SI 2019 defining constants and the molar constants derived
//! from them in code, so no rounded Faraday or Nernst-slope literal appears anywhere.

/// Elementary charge e in coulombs (exact since the 2019 SI; CODATA 2018).
pub const ELEMENTARY_CHARGE_COULOMBS: f64 = 1.602176634e-19;

/// Avogadro constant N_A in mol⁻¹ (exact since the 2019 SI; CODATA 2018).
pub const AVOGADRO_PER_MOL: f64 = 6.02214076e23;

/// Boltzmann constant k in J/K (exact since the 2019 SI; CODATA 2018).
pub const BOLTZMANN_JOULES_PER_KELVIN: f64 = 1.380649e-23;

/// Faraday constant F = e·N_A in C/mol (an exact product; 96485.33212… C/mol).
pub const FARADAY_COULOMBS_PER_MOL: f64 = ELEMENTARY_CHARGE_COULOMBS * AVOGADRO_PER_MOL;

/// Molar gas constant R = k·N_A in J/(mol·K) (an exact product; 8.314462618… J/(mol·K)).
pub const GAS_CONSTANT_JOULES_PER_MOL_KELVIN: f64 = BOLTZMANN_JOULES_PER_KELVIN * AVOGADRO_PER_MOL;

/// The standard temperature T° = 298.15 K at which tables are given.
pub const STANDARD_TEMPERATURE_KELVIN: f64 = 298.15;

/// RT/F in volts at `temperature_kelvin`.
pub fn thermal_voltage_volts(temperature_kelvin: f64) -> f64 {
    GAS_CONSTANT_JOULES_PER_MOL_KELVIN * temperature_kelvin / FARADAY_COULOMBS_PER_MOL
}

/// (RT/F)·ln 10 in volts at `temperature_kelvin`: the Nernst slope per decade for one electron.
pub fn nernst_slope_volts_per_decade(temperature_kelvin: f64) -> f64 {
    thermal_voltage_volts(temperature_kelvin) * std::f64::consts::LN_10
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn derived_constants_match_codata_2018() {
        // CODATA 2018 (exact values): F = 96485.33212... C/mol, R = 8.314462618... J/(mol K).
        assert!((FARADAY_COULOMBS_PER_MOL - 96_485.332_12).abs() < 1e-5);
        assert!((GAS_CONSTANT_JOULES_PER_MOL_KELVIN - 8.314_462_618).abs() < 1e-9);
        // DOMAIN.md: RT/F = 0.0256926 V and (RT/F) ln 10 = 0.0591593 V at 298.15 K.
        assert!((thermal_voltage_volts(STANDARD_TEMPERATURE_KELVIN) - 0.025_692_6).abs() < 1e-7);
        assert!(
            (nernst_slope_volts_per_decade(STANDARD_TEMPERATURE_KELVIN) - 0.059_159_3).abs() < 1e-7
        );
    }
}

//! The ion product of water Kw(T): the one function every acid↔base conversion and every
//! pH → a(OH⁻) step in couplet uses.
//!
//! Source: Harned & Robinson 1940, Trans. Faraday Soc. 36, 973,
//! `log10 Kw = −4470.99/T + 6.0875 − 0.01706·T` (molality basis, zero ionic strength), fitted to
//! their cell measurements over 0–60 °C (coefficients from memory). It gives pKw = 13.9947 at
//! 298.15 K; Bandura & Lvov 2006 (J. Phys. Chem. Ref. Data 35, 15) tabulate 13.995, which the
//! tests check. Chosen over a single 25 °C value (Harris, *Quantitative Chemical Analysis*,
//! App. G: 13.997) because the pH path needs Kw at other temperatures and one project should
//! not carry two values; the 0.0023 difference moves a converted E° by about 0.14 mV per H+
//! per electron (ν/n · (RT/F)·ln 10 · ΔpKw).

/// Name of the source, for notes and assumptions printed to the user.
pub const KW_SOURCE: &str = "Harned & Robinson 1940";

/// Lowest temperature of the Kw(T) fit (0 °C).
pub const KW_FIT_MIN_KELVIN: f64 = 273.15;
/// Highest temperature of the Kw(T) fit (60 °C).
pub const KW_FIT_MAX_KELVIN: f64 = 333.15;

/// log10 Kw of pure water (molality basis) at `temperature_kelvin` (see the module notes).
pub fn log10_kw(temperature_kelvin: f64) -> f64 {
    -4470.99 / temperature_kelvin + 6.0875 - 0.01706 * temperature_kelvin
}

/// pKw = −log10 Kw at `temperature_kelvin`.
pub fn pkw(temperature_kelvin: f64) -> f64 {
    -log10_kw(temperature_kelvin)
}

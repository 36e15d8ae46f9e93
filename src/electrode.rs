//! The potential of one electrode at a composition, restated on a reference scale: E of a
//! couple's reduction half-reaction by the Nernst equation, then against SHE, RHE at a pH, or
//! a reference electrode at the same temperature.

use crate::constants::{STANDARD_TEMPERATURE_KELVIN, nernst_slope_volts_per_decade};
use crate::nernst::{Conditions, Nernst, NernstError, Standard, evaluate};
use crate::scale::Scale;
use crate::table::Couple;

/// One electrode's potential, on the SHE scale and on the scale asked for.
#[derive(Clone, Debug)]
pub struct ElectrodePotential {
    /// The couple, as a reduction.
    pub couple: Couple,
    /// Q and E of the half-reaction (E vs SHE), with every factor's activity.
    pub nernst: Nernst,
    /// The scale E is restated on.
    pub scale: Scale,
    /// The potential of the scale's zero vs SHE at the temperature, V.
    pub reference_vs_she_volts: f64,
    /// Remarks the user should read (reference data used at 298.15 K, …).
    pub notes: Vec<String>,
}

impl ElectrodePotential {
    /// E° at the temperature, vs SHE.
    pub fn e0_vs_she_volts(&self) -> f64 {
        self.nernst.e0_at_temperature_volts
    }

    /// E vs SHE, when every species of Q has a value.
    pub fn e_vs_she_volts(&self) -> Option<f64> {
        self.nernst.e_volts
    }

    /// E° on the scale.
    pub fn e0_on_scale_volts(&self) -> f64 {
        self.e0_vs_she_volts() - self.reference_vs_she_volts
    }

    /// E on the scale, when every species of Q has a value.
    pub fn e_on_scale_volts(&self) -> Option<f64> {
        self.e_vs_she_volts()
            .map(|e| e - self.reference_vs_she_volts)
    }
}

/// The potential of the scale's zero vs SHE at `temperature_kelvin`, with a note when the
/// reference electrode's value is only known at 298.15 K. The RHE moves with the Nernst slope
/// at that temperature; a reference electrode with a published dE/dT follows it to first order.
pub fn reference_vs_she_volts(scale: &Scale, temperature_kelvin: f64) -> (f64, Option<String>) {
    let away = temperature_kelvin - STANDARD_TEMPERATURE_KELVIN;
    match scale {
        Scale::She => (0.0, None),
        Scale::Rhe { ph } => (
            -nernst_slope_volts_per_decade(temperature_kelvin) * ph,
            None,
        ),
        Scale::Electrode(e) => match e.dedt_millivolts_per_kelvin {
            Some(dedt) => (e.e_vs_she_volts + dedt / 1000.0 * away, None),
            None if away.abs() > 1e-9 => (
                e.e_vs_she_volts,
                Some(format!(
                    "{} has no published dE/dT: its 298.15 K potential ({:.4} V vs SHE) is used at {temperature_kelvin} K",
                    e.id, e.e_vs_she_volts
                )),
            ),
            None => (e.e_vs_she_volts, None),
        },
    }
}

/// E of `couple` (a reduction) at `conditions`, restated on `scale` at the same temperature:
/// E = E°(T) − (RT/nF)·ln Q with Q of the reduction as written, then E − E(reference).
pub fn electrode_potential(
    couple: &Couple,
    conditions: &Conditions,
    scale: &Scale,
) -> Result<ElectrodePotential, NernstError> {
    let standard = Standard {
        reaction: &couple.reaction,
        e0_volts: couple.e0_volts,
        electrons: couple.electrons_f64(),
        de0_dt_volts_per_kelvin: couple.dedt_millivolts_per_kelvin.map(|d| d / 1000.0),
    };
    let nernst = evaluate(&standard, conditions)?;
    let t = conditions.temperature_kelvin;
    let mut notes = Vec::new();
    if couple.dedt_millivolts_per_kelvin.is_none() && (t - STANDARD_TEMPERATURE_KELVIN).abs() > 1e-9
    {
        notes.push(format!(
            "{} has no published dE°/dT: E° at 298.15 K is used at {t} K",
            couple.label()
        ));
    }
    let (reference, note) = reference_vs_she_volts(scale, t);
    notes.extend(note);
    Ok(ElectrodePotential {
        couple: couple.clone(),
        nernst,
        scale: scale.clone(),
        reference_vs_she_volts: reference,
        notes,
    })
}

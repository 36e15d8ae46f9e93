//! Species thermodynamics: ΔrG°, ΔrH°, ΔrS° and ΔrCp° of a reaction from the formation data of
//! its species, and from them E°, dE°/dT and E°(T) of any half-reaction or cell reaction whose
//! species have data.
//!
//! Conventions (DOMAIN notes; CRC Handbook, the ion table's own): ΔfG°, ΔfH°, S° and Cp° of
//! H⁺(aq) are zero, and elements in their reference state have ΔfG° = ΔfH° = 0. A reduction
//! half-reaction `Ox + n e- -> Red` is read against the standard hydrogen electrode, i.e. as
//! `Ox + (n/2) H2(g) -> Red + n H+`: the electron carries ΔfG° = ΔfH° = 0 and, so that the
//! temperature coefficient is the one measured against SHE (the "isothermal" coefficient of
//! potential tables), S°(e⁻) = ½ S°(H2, g) and Cp°(e⁻) = ½ Cp°(H2, g), taken from the same
//! data. Then E° = −ΔrG°/(nF) and dE°/dT = ΔrS°/(nF), both versus SHE.

mod couple;
mod data;

pub use couple::{
    DataCouple, FromDataError, TextReaction, couple_from_data, e0_from_data, reaction_from_text,
};

pub use data::{
    BUILTIN_FORMATION_CSV, DataError, DataOrigin, DataPhase, FormationData, FormationRow,
    MissingData, Resolved, composition_key, same_composition,
};

use crate::constants::{FARADAY_COULOMBS_PER_MOL, STANDARD_TEMPERATURE_KELVIN};
use crate::notation::Species;
use crate::reaction::Reaction;
use num_traits::{ToPrimitive, Zero};

/// How E°(T) away from 298.15 K was computed.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Approximation {
    /// ΔrH° + ΔrCp°(T − T°) − T[ΔrS° + ΔrCp° ln(T/T°)]: ΔrCp° taken constant (every species
    /// has Cp°).
    ConstantHeatCapacity,
    /// ΔrH° − T·ΔrS°: ΔrH° and ΔrS° taken constant (some Cp° is missing).
    ConstantEnthalpyEntropy,
}

impl Approximation {
    /// A sentence for reports.
    pub fn describe(self) -> &'static str {
        match self {
            Approximation::ConstantHeatCapacity => {
                "ΔrCp° taken constant from 298.15 K (every species has Cp°)"
            }
            Approximation::ConstantEnthalpyEntropy => {
                "ΔrH° and ΔrS° taken constant from 298.15 K (not every species has Cp°)"
            }
        }
    }

    /// `constant-cp` or `constant-h-s`, for JSON.
    pub fn name(self) -> &'static str {
        match self {
            Approximation::ConstantHeatCapacity => "constant-cp",
            Approximation::ConstantEnthalpyEntropy => "constant-h-s",
        }
    }
}

/// Where ΔrS° came from.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum EntropySource {
    /// Σν·S° of the species.
    Entropies,
    /// (ΔrH° − ΔrG°)/T°, because some S° is missing but every ΔfH° is there.
    EnthalpyAndGibbs,
}

/// One species of the reaction and the row of data it took.
#[derive(Clone, Debug)]
pub struct Term<'a> {
    /// The species as written in the reaction.
    pub species: Species,
    /// Its signed stoichiometric number (products > 0).
    pub nu: f64,
    /// The row used; `None` for the electron, which follows the SHE convention.
    pub row: Option<&'a FormationRow>,
    /// True when no state label chose its phase ([`DataPhase::assumption`] says what was
    /// assumed).
    pub phase_by_default: bool,
    /// Rows of the same species and phase that were not chosen.
    pub alternatives: Vec<&'a FormationRow>,
}

/// The standard reaction figures of one reaction at 298.15 K from formation data.
#[derive(Clone, Debug)]
pub struct ReactionThermo<'a> {
    /// The species with the rows they took, in reaction order.
    pub terms: Vec<Term<'a>>,
    /// ΔrG° in J/mol.
    pub delta_g_joules: f64,
    /// ΔrH° in J/mol, when every species has ΔfH°.
    pub delta_h_joules: Option<f64>,
    /// ΔrS° in J/(mol·K), when it can be had.
    pub delta_s_joules_per_kelvin: Option<f64>,
    /// How ΔrS° was had.
    pub entropy_source: Option<EntropySource>,
    /// ΔrCp° in J/(mol·K), when every species has Cp°.
    pub delta_cp_joules_per_kelvin: Option<f64>,
    /// n: electrons taken up (half-reaction) or transferred (whole reaction), when known.
    pub electrons: Option<f64>,
}

/// Why a reaction's figures cannot be computed from formation data.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum ThermoError {
    /// Some species has no data (in its phase).
    #[error("{0}")]
    Missing(#[from] MissingData),
    /// Several species lack data: all are named.
    #[error("{}", .0.iter().map(|m| m.to_string()).collect::<Vec<_>>().join("; "))]
    MissingSeveral(Vec<MissingData>),
    /// Atoms or charge are not conserved.
    #[error("the reaction does not balance ({0}); balance it first")]
    Unbalanced(String),
    /// The reaction is empty.
    #[error("the reaction is empty")]
    Empty,
}

impl<'a> ReactionThermo<'a> {
    /// E° in volts: −ΔrG°/(nF). For a half-reaction, versus SHE.
    pub fn e0_volts(&self) -> Option<f64> {
        let n = self.electrons?;
        Some(-self.delta_g_joules / (n * FARADAY_COULOMBS_PER_MOL))
    }

    /// dE°/dT in mV/K: ΔrS°/(nF).
    pub fn dedt_millivolts_per_kelvin(&self) -> Option<f64> {
        let n = self.electrons?;
        Some(1000.0 * self.delta_s_joules_per_kelvin? / (n * FARADAY_COULOMBS_PER_MOL))
    }

    /// ΔrG°(T) in J/mol and the approximation used; `None` without ΔrS°. Anchored at the
    /// tabulated ΔrG°: ΔrG°(T) = ΔrG° − (T − T°)ΔrS° + ΔrCp°[(T − T°) − T ln(T/T°)], the
    /// last term only when every species has Cp° (ΔrH°(T°) = ΔrG° + T°ΔrS°).
    pub fn delta_g_at(&self, temperature_kelvin: f64) -> Option<(f64, Approximation)> {
        let t0 = STANDARD_TEMPERATURE_KELVIN;
        let t = temperature_kelvin;
        let ds = self.delta_s_joules_per_kelvin?;
        let linear = self.delta_g_joules - (t - t0) * ds;
        Some(match self.delta_cp_joules_per_kelvin {
            Some(dcp) => (
                linear + dcp * ((t - t0) - t * (t / t0).ln()),
                Approximation::ConstantHeatCapacity,
            ),
            None => (linear, Approximation::ConstantEnthalpyEntropy),
        })
    }

    /// E°(T) in volts and the approximation used.
    pub fn e0_at(&self, temperature_kelvin: f64) -> Option<(f64, Approximation)> {
        let n = self.electrons?;
        let (dg, how) = self.delta_g_at(temperature_kelvin)?;
        Some((-dg / (n * FARADAY_COULOMBS_PER_MOL), how))
    }

    /// One line per species: the species as written, the phase taken (with "by default" when
    /// no state label chose it), and the row: `PbSO4 (s by default): Lead(II) sulfate, CAS …,
    /// built-in formation data line 977 [crc-substances]`.
    pub fn rows_used(&self) -> Vec<String> {
        self.terms
            .iter()
            .map(|t| match t.row {
                Some(row) => {
                    let how = if t.phase_by_default {
                        " by default"
                    } else {
                        ""
                    };
                    let cas = row
                        .cas
                        .as_deref()
                        .map(|c| format!(", CAS {c}"))
                        .unwrap_or_default();
                    format!(
                        "{} ({}{how}): {}{cas}, {} line {} [{}]",
                        t.species.ascii(),
                        row.phase,
                        row.name,
                        row.origin,
                        row.line,
                        row.table
                    )
                }
                None => "e- : SHE convention (ΔfG° = 0, S° = ½S°(H2, g))".to_owned(),
            })
            .collect()
    }

    /// The table keys the rows came from, once each.
    pub fn table_keys(&self) -> Vec<&str> {
        let mut keys: Vec<&str> = Vec::new();
        for term in &self.terms {
            if let Some(row) = term.row
                && !keys.contains(&row.table.as_str())
            {
                keys.push(&row.table);
            }
        }
        keys
    }
}

fn sum<'b>(terms: impl Iterator<Item = (f64, Option<f64>)> + 'b) -> Option<f64> {
    let mut total = 0.0;
    for (nu, value) in terms {
        total += nu * value?;
    }
    Some(total)
}

/// The figures of a balanced reaction from formation data. `electrons` is n for a whole
/// reaction (from the redox analysis); a half-reaction's n is read from its `e-`.
pub fn reaction_thermo<'a>(
    reaction: &Reaction,
    data: &'a FormationData,
    electrons: Option<f64>,
) -> Result<ReactionThermo<'a>, ThermoError> {
    if reaction.is_empty() {
        return Err(ThermoError::Empty);
    }
    if let Some(detail) = crate::table::imbalance_text(reaction) {
        return Err(ThermoError::Unbalanced(detail));
    }
    let mut terms = Vec::new();
    let mut missing = Vec::new();
    for entry in reaction.entries() {
        let nu = entry.nu.to_f64().unwrap_or(f64::NAN);
        if entry.species.is_electron() {
            terms.push(Term {
                species: entry.species.clone(),
                nu,
                row: None,
                phase_by_default: false,
                alternatives: Vec::new(),
            });
            continue;
        }
        match data.resolve(&entry.species) {
            Ok(resolved) => terms.push(Term {
                species: entry.species.clone(),
                nu,
                row: Some(resolved.row),
                phase_by_default: resolved.phase_by_default,
                alternatives: resolved.alternatives,
            }),
            Err(m) => missing.push(m),
        }
    }
    match missing.len() {
        0 => {}
        1 => return Err(ThermoError::Missing(missing.remove(0))),
        _ => return Err(ThermoError::MissingSeveral(missing)),
    }
    let electron_nu = reaction.electron_nu();
    let electrons = if electron_nu.is_zero() {
        electrons
    } else {
        (-electron_nu).to_f64()
    };
    // The electron's share under the SHE convention: half an H2 molecule.
    let hydrogen = data.hydrogen_gas();
    let electron_entropy = hydrogen.and_then(|h| h.entropy_joules_per_mol_kelvin.map(|s| s / 2.0));
    let electron_cp = hydrogen.and_then(|h| h.cp_joules_per_mol_kelvin.map(|c| c / 2.0));
    let pick = |term: &Term<'_>, f: fn(&FormationRow) -> Option<f64>, electron: Option<f64>| {
        (term.nu, term.row.map_or(electron, f))
    };
    let delta_g = sum(terms
        .iter()
        .map(|t| pick(t, |r| Some(r.dfg_joules_per_mol), Some(0.0))))
    .unwrap_or(f64::NAN);
    let delta_h = sum(terms
        .iter()
        .map(|t| pick(t, |r| r.dfh_joules_per_mol, Some(0.0))));
    let from_entropies = sum(terms
        .iter()
        .map(|t| pick(t, |r| r.entropy_joules_per_mol_kelvin, electron_entropy)));
    let (delta_s, entropy_source) = match (from_entropies, delta_h) {
        (Some(s), _) => (Some(s), Some(EntropySource::Entropies)),
        (None, Some(h)) => (
            Some((h - delta_g) / STANDARD_TEMPERATURE_KELVIN),
            Some(EntropySource::EnthalpyAndGibbs),
        ),
        (None, None) => (None, None),
    };
    let delta_cp = sum(terms
        .iter()
        .map(|t| pick(t, |r| r.cp_joules_per_mol_kelvin, electron_cp)));
    Ok(ReactionThermo {
        terms,
        delta_g_joules: delta_g,
        delta_h_joules: delta_h,
        delta_s_joules_per_kelvin: delta_s,
        entropy_source,
        delta_cp_joules_per_kelvin: delta_cp,
        electrons,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::notation::parse_equation;

    fn thermo(text: &str) -> ReactionThermo<'static> {
        let reaction = Reaction::from_equation(&parse_equation(text).unwrap());
        reaction_thermo(&reaction, FormationData::builtin(), None).unwrap()
    }

    #[test]
    fn electron_entropy_follows_hydrogen() {
        // Cu2+ + 2 e- -> Cu: ΔrS° = S°(Cu) − S°(Cu2+) − S°(H2) with the CRC rows.
        let t = thermo("Cu2+ + 2 e- -> Cu(s)");
        let expected = 33.2 - (-99.6) - 130.7;
        assert!((t.delta_s_joules_per_kelvin.unwrap() - expected).abs() < 1e-9);
    }
}

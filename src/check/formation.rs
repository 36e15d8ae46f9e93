//! Rule CPL306: a couple's `e0` against the E° its half-reaction has from formation data
//! (E° = −ΔrG°/(nF), [`crate::thermo`]), where every species of it has data.
//!
//! Compilations differ honestly by tens of millivolts (different key values, phases,
//! hydrates), so the finding is a warning, and its default threshold, 20 mV, sits above the
//! spread of careful compilations for most couples.

use super::{Finding, Rule};
use crate::notation::Span;
use crate::reaction::Reaction;
use crate::thermo::{FormationData, reaction_thermo};

/// Default threshold of rule CPL306, in volts.
pub const DEFAULT_FORMATION_THRESHOLD_VOLTS: f64 = 0.020;

/// The formation data to compare with and how far a value may differ.
#[derive(Clone, Copy, Debug)]
pub struct FormationCheck {
    /// The data (built-in, or built-in plus the user's rows).
    pub data: &'static FormationData,
    /// Largest difference that passes, in volts.
    pub threshold_volts: f64,
}

impl Default for FormationCheck {
    fn default() -> FormationCheck {
        FormationCheck {
            data: FormationData::builtin(),
            threshold_volts: DEFAULT_FORMATION_THRESHOLD_VOLTS,
        }
    }
}

/// The E° formation data give a balanced reduction (a half-reaction vs SHE), with the rows
/// used, when every species has data.
pub fn formation_e0(reaction: &Reaction, check: &FormationCheck) -> Option<(f64, String)> {
    let thermo = reaction_thermo(reaction, check.data, None).ok()?;
    Some((thermo.e0_volts()?, compact_rows(&thermo)))
}

/// The finding of rule CPL306 for an entry with `e0` (at `span`) when formation data give
/// `computed` (from `rows`).
pub fn finding(
    file: usize,
    e0: f64,
    span: Span,
    computed: f64,
    rows: &str,
    check: &FormationCheck,
) -> Option<Finding> {
    let difference = e0 - computed;
    if difference.abs() <= check.threshold_volts {
        return None;
    }
    Some(Finding {
        rule: Rule::E0VsFormationData,
        file,
        span,
        message: format!(
            "e0 = {e0} V differs by {:+.1} mV from {computed:.4} V computed from formation data ({rows}), beyond the {:.0} mV threshold; the compilations may differ, or the couple's value or species may be wrong",
            difference * 1000.0,
            check.threshold_volts * 1000.0
        ),
        suggestion: None,
        fix: None,
    })
}

/// `Fe2+(aq) [crc-ions line 120], Fe(s) [crc-substances line 700]`: enough to find the rows.
fn compact_rows(thermo: &crate::thermo::ReactionThermo<'_>) -> String {
    thermo
        .terms
        .iter()
        .filter_map(|t| t.row.map(|row| (t, row)))
        .map(|(t, row)| {
            let written = t.species.without_state().ascii();
            format!("{written}({}) [{} line {}]", row.phase, row.table, row.line)
        })
        .collect::<Vec<_>>()
        .join(", ")
}

//! Rule CPL306: a couple's `e0` against the E° its half-reaction has from formation data
//! (E° = −ΔrG°/(nF), [`crate::thermo`]), where every species of it has data.
//!
//! Compilations differ honestly by tens of millivolts (different key values, phases,
//! hydrates), so the finding is a warning, and its default threshold, 20 mV, sits above the
//! spread of careful compilations for most couples.

use super::entry::JudgedEntry;
use super::{Finding, Rule};
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

/// Findings of rule CPL306 over the judged entries of every file.
pub fn check_entries(judged: &[JudgedEntry], check: &FormationCheck) -> Vec<Finding> {
    let mut findings = Vec::new();
    for entry in judged {
        let (Some(reaction), Some((e0, span))) = (&entry.reduction, entry.e0_volts) else {
            continue;
        };
        // `reduction` is set only for balanced reductions, so this is a half-reaction vs SHE.
        let Ok(thermo) = reaction_thermo(reaction, check.data, None) else {
            continue;
        };
        let Some(computed) = thermo.e0_volts() else {
            continue;
        };
        let difference = e0 - computed;
        if difference.abs() <= check.threshold_volts {
            continue;
        }
        findings.push(Finding {
            rule: Rule::E0VsFormationData,
            file: entry.file,
            span,
            message: format!(
                "e0 = {e0} V differs by {:+.1} mV from {computed:.4} V computed from formation data ({}), beyond the {:.0} mV threshold; the compilations may differ, or the couple's value or species may be wrong",
                difference * 1000.0,
                compact_rows(&thermo),
                check.threshold_volts * 1000.0
            ),
            suggestion: None,
            fix: None,
        });
    }
    findings
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

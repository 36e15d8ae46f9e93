//! `couplet thermo`: ΔrG°, ΔrH°, ΔrS°, E°, dE°/dT and E°(T) of a reaction or half-reaction from
//! formation data, with the row used for every species.

use super::common::{load_formation, medium_arg};
use super::failure::Failure;
use super::{EXIT_FINDINGS, EXIT_OK, EXIT_USAGE, print_json};
use couplet::constants::{GAS_CONSTANT_JOULES_PER_MOL_KELVIN, STANDARD_TEMPERATURE_KELVIN};
use couplet::notation::{Arrow, Style};
use couplet::table::Medium;
use couplet::thermo::{FromDataError, ReactionThermo, TextReaction, reaction_from_text};
use serde_json::{Value, json};
use std::fmt::Write as _;
use std::io::{self, Write};
use std::path::PathBuf;

#[derive(clap::Args)]
pub struct ThermoArgs {
    /// A half-reaction (PbO2 + 4 H+ + SO4^2- + 2 e- -> PbSO4 + 2 H2O), a couple Ox/Red
    /// (SnO2/Sn), or a whole reaction; balanced first when it does not balance as written
    reaction: String,
    /// Balance in this solution when couplet balances: acid or base add H2O and H+ or OH-
    /// (half-reactions and Ox/Red are balanced in acid unless told), neutral adds nothing
    #[arg(long, value_parser = medium_arg)]
    medium: Option<Medium>,
    /// Temperature for ΔrG°(T) and E°(T), with its unit: 25C, 298.15K
    #[arg(long, default_value = "298.15K", value_parser = super::units::temperature)]
    temperature: f64,
    /// Also read formation data (the CSV layout of data/formation.csv); repeatable
    #[arg(long = "formation", value_name = "FILE")]
    formation: Vec<PathBuf>,
    /// Print JSON
    #[arg(long)]
    json: bool,
}

pub fn run(args: &ThermoArgs, out: &mut dyn Write) -> io::Result<u8> {
    let data = match load_formation(&args.formation) {
        Ok(data) => data,
        Err(failure) => return failure.report(out, args.json),
    };
    let found = match reaction_from_text(&args.reaction, args.medium, data) {
        Ok(found) => found,
        Err(error) => {
            let mut failure = failure(&error);
            if matches!(error, FromDataError::Balance(_)) && args.medium.is_none() {
                failure = failure.with_detail(
                    "  hint: give --medium acid or --medium base to let couplet add H2O and H+ or OH-",
                );
            }
            return failure.report(out, args.json);
        }
    };
    if args.json {
        print_json(out, &as_json(&found, args.temperature, data))?;
    } else {
        out.write_all(human(&found, args.temperature, data).as_bytes())?;
    }
    Ok(EXIT_OK)
}

/// The one mapping of this command's errors to a kind and an exit status.
fn failure(error: &FromDataError) -> Failure {
    match error {
        FromDataError::Notation(e) => e.into(),
        FromDataError::NotACouple(_) => Failure::new("syntax", EXIT_USAGE, error.to_string()),
        FromDataError::Balance(e) => Failure::new(e.kind(), EXIT_FINDINGS, error.to_string()),
        FromDataError::Couple(e) => e.into(),
        _ => Failure::new("no_data", EXIT_FINDINGS, error.to_string()),
    }
}

fn kilo(joules: f64) -> f64 {
    joules / 1000.0
}

/// E°(T), the approximation, and a warning when T is far from 298.15 K.
fn at_temperature(thermo: &ReactionThermo<'_>, temperature: f64) -> Option<(f64, f64, String)> {
    let (dg, how) = thermo.delta_g_at(temperature)?;
    let e = thermo
        .e0_at(temperature)
        .map(|(e, _)| e)
        .unwrap_or(f64::NAN);
    let mut note = how.describe().to_owned();
    if (temperature - STANDARD_TEMPERATURE_KELVIN).abs() > 25.0 {
        note.push_str("; more than 25 K from 298.15 K, so treat it as an estimate");
    }
    Some((dg, e, note))
}

fn human(
    found: &TextReaction<'_>,
    temperature: f64,
    data: &couplet::thermo::FormationData,
) -> String {
    let t = &found.thermo;
    let mut out = String::new();
    let _ = writeln!(
        out,
        "reaction  {}",
        found.reaction.to_text(Style::Unicode, Arrow::Forward)
    );
    if let Some(medium) = found.balanced_in {
        let added = match medium {
            Medium::Acid => "; H2O and H+ could be added",
            Medium::Base => "; H2O and OH- could be added",
            Medium::Neutral => "",
        };
        let _ = writeln!(out, "          (balanced by couplet{added})");
    }
    match t.electrons {
        Some(n) if found.half => {
            let _ = writeln!(out, "n         {n} (half-reaction: E° versus SHE)");
        }
        Some(n) => {
            let _ = writeln!(out, "n         {n} (from oxidation numbers)");
        }
        None => {
            let _ = writeln!(out, "n         not determined: no E° (ΔrG° stands)");
        }
    }
    let _ = writeln!(out, "ΔrG°      {:+.2} kJ/mol", kilo(t.delta_g_joules));
    match t.delta_h_joules {
        Some(h) => {
            let _ = writeln!(out, "ΔrH°      {:+.2} kJ/mol", kilo(h));
        }
        None => {
            let _ = writeln!(out, "ΔrH°      not known (a species has no ΔfH°)");
        }
    }
    match (t.delta_s_joules_per_kelvin, t.entropy_source) {
        (Some(s), Some(couplet::thermo::EntropySource::EnthalpyAndGibbs)) => {
            let _ = writeln!(
                out,
                "ΔrS°      {s:+.2} J/(mol·K)  (from (ΔrH° − ΔrG°)/T°: a species has no S°)"
            );
        }
        (Some(s), _) => {
            let _ = writeln!(out, "ΔrS°      {s:+.2} J/(mol·K)");
        }
        (None, _) => {
            let _ = writeln!(
                out,
                "ΔrS°      not known (a species has neither S° nor ΔfH°)"
            );
        }
    }
    if let Some(cp) = t.delta_cp_joules_per_kelvin {
        let _ = writeln!(out, "ΔrCp°     {cp:+.2} J/(mol·K)");
    }
    let log10_k = -t.delta_g_joules
        / (GAS_CONSTANT_JOULES_PER_MOL_KELVIN
            * STANDARD_TEMPERATURE_KELVIN
            * std::f64::consts::LN_10);
    let _ = writeln!(out, "log10 K   {log10_k:.2}  (at 298.15 K)");
    if let Some(e0) = t.e0_volts() {
        let _ = writeln!(out, "E°        {e0:+.4} V  (at 298.15 K, from −ΔrG°/(nF))");
    }
    if let Some(dedt) = t.dedt_millivolts_per_kelvin() {
        let _ = writeln!(out, "dE°/dT    {dedt:+.3} mV/K  (ΔrS°/(nF))");
    }
    if (temperature - STANDARD_TEMPERATURE_KELVIN).abs() > 1e-9 {
        match at_temperature(t, temperature) {
            Some((dg, e, note)) => {
                let _ = write!(out, "at {temperature} K  ΔrG° {:+.2} kJ/mol", kilo(dg));
                if e.is_finite() {
                    let _ = write!(out, ", E° {e:+.4} V");
                }
                let _ = writeln!(out, "  ({note})");
            }
            None => {
                let _ = writeln!(out, "at {temperature} K  not computed: ΔrS° is not known");
            }
        }
    }
    let _ = writeln!(
        out,
        "rows used (\"by default\": no state label, phase from couplet's defaults; see docs-thermo.md):"
    );
    for (term, line) in t.terms.iter().zip(t.rows_used()) {
        let _ = writeln!(out, "  {line}");
        for other in &term.alternatives {
            let _ = writeln!(
                out,
                "    also in the data, not used (higher ΔfG°): {} ({:+.1} kJ/mol)",
                other.name,
                kilo(other.dfg_joules_per_mol)
            );
        }
    }
    for key in t.table_keys() {
        if let Some(citation) = data.table_citation(key) {
            let _ = writeln!(out, "source [{key}]: {citation}");
        }
    }
    if let Some(caution) = couplet::cell::caution(&found.reaction) {
        let _ = writeln!(out, "{caution}");
    }
    out
}

fn as_json(
    found: &TextReaction<'_>,
    temperature: f64,
    data: &couplet::thermo::FormationData,
) -> Value {
    let t = &found.thermo;
    let rows: Vec<Value> = t
        .terms
        .iter()
        .map(|term| {
            json!({
                "species": term.species.ascii(),
                "nu": term.nu,
                "row": term.row.map(|r| json!({
                    "formula": r.species.ascii(),
                    "phase": r.phase.label(),
                    "name": r.name,
                    "cas": r.cas,
                    "table": r.table,
                    "origin": r.origin.to_string(),
                    "line": r.line,
                    "dfh_kJ_per_mol": r.dfh_joules_per_mol.map(kilo),
                    "dfg_kJ_per_mol": kilo(r.dfg_joules_per_mol),
                    "s_J_per_mol_K": r.entropy_joules_per_mol_kelvin,
                    "cp_J_per_mol_K": r.cp_joules_per_mol_kelvin,
                })),
                "phase_assumed": term.phase_by_default.then(|| couplet::thermo::DataPhase::assumption(&term.species)).flatten(),
                "alternatives": term.alternatives.iter().map(|r| r.name.clone()).collect::<Vec<_>>(),
            })
        })
        .collect();
    let at_t = at_temperature(t, temperature);
    let tables: serde_json::Map<String, Value> = t
        .table_keys()
        .into_iter()
        .filter_map(|k| data.table_citation(k).map(|c| (k.to_owned(), json!(c))))
        .collect();
    json!({
        "reaction": found.reaction.to_string(),
        "half_reaction": found.half,
        "balanced_in": found.balanced_in.map(|m| m.name()),
        "n": t.electrons,
        "delta_g0_kJ_per_mol": kilo(t.delta_g_joules),
        "delta_h0_kJ_per_mol": t.delta_h_joules.map(kilo),
        "delta_s0_J_per_mol_K": t.delta_s_joules_per_kelvin,
        "delta_cp0_J_per_mol_K": t.delta_cp_joules_per_kelvin,
        "e0_V": t.e0_volts(),
        "dedt_mV_per_K": t.dedt_millivolts_per_kelvin(),
        "e0_source": "formation data",
        "temperature_K": temperature,
        "at_temperature": at_t.map(|(dg, e, note)| json!({
            "delta_g_kJ_per_mol": kilo(dg),
            "e_V": e.is_finite().then_some(e),
            "approximation": note,
        })),
        "rows": rows,
        "tables": tables,
        "caution": couplet::cell::caution(&found.reaction),
    })
}

//! `couplet formation`: the formation data of species, every phase the data hold, with the row
//! a species as written would take and its source.

use super::common::load_formation;
use super::failure::Failure;
use super::{EXIT_FINDINGS, EXIT_OK, print_json};
use couplet::notation::Species;
use couplet::notation::parse_species;
use couplet::thermo::{DataPhase, FormationData, FormationRow};
use serde_json::{Value, json};
use std::fmt::Write as _;
use std::io::{self, Write};
use std::path::PathBuf;

#[derive(clap::Args)]
pub struct FormationArgs {
    /// Species to show (PbSO4, H2S(g), Fe3+); a state label picks the phase used
    #[arg(required = true)]
    species: Vec<String>,
    /// Also read formation data (the CSV layout of data/formation.csv); repeatable
    #[arg(long = "formation", value_name = "FILE")]
    formation: Vec<PathBuf>,
    /// Print JSON
    #[arg(long)]
    json: bool,
}

fn optional(value: Option<f64>, scale: f64, digits: usize) -> String {
    value.map_or_else(|| "—".to_owned(), |v| format!("{:.digits$}", v * scale))
}

fn row_json(row: &FormationRow, used: bool) -> Value {
    json!({
        "formula": row.species.ascii(),
        "phase": row.phase.label(),
        "name": row.name,
        "cas": row.cas,
        "table": row.table,
        "origin": row.origin.to_string(),
        "line": row.line,
        "dfh_kJ_per_mol": row.dfh_joules_per_mol.map(|v| v / 1000.0),
        "dfg_kJ_per_mol": row.dfg_joules_per_mol / 1000.0,
        "s_J_per_mol_K": row.entropy_joules_per_mol_kelvin,
        "cp_J_per_mol_K": row.cp_joules_per_mol_kelvin,
        "note": row.note,
        "used_as_written": used,
    })
}

pub fn run(args: &FormationArgs, out_stream: &mut dyn Write) -> io::Result<u8> {
    let data = match load_formation(&args.formation) {
        Ok(data) => data,
        Err(failure) => return failure.report(out_stream, args.json),
    };
    let mut status = EXIT_OK;
    let mut out = String::new();
    let mut results = Vec::new();
    for text in &args.species {
        let species = match parse_species(text) {
            Ok(species) => species,
            Err(error) => return Failure::from(&error).report(out_stream, args.json),
        };
        let rows = data.rows_for(&species);
        let resolved = data.resolve(&species);
        let used = resolved.as_ref().ok().map(|r| r.row);
        if rows.is_empty() || used.is_none() {
            status = EXIT_FINDINGS;
        }
        if args.json {
            results.push(json!({
                "species": text,
                "rows": rows.iter().map(|r| row_json(r, used.is_some_and(|u| std::ptr::eq(u, *r)))).collect::<Vec<_>>(),
                "phase_assumed": couplet::thermo::DataPhase::assumption(&species),
                "error": resolved.as_ref().err().map(|e| e.to_string()),
            }));
            continue;
        }
        human(&mut out, text, &species, &rows, &resolved, data);
    }
    if args.json {
        print_json(out_stream, &json!({"species": results}))?;
    } else {
        out_stream.write_all(out.as_bytes())?;
    }
    Ok(status)
}

fn human(
    out: &mut String,
    text: &str,
    species: &Species,
    rows: &[&FormationRow],
    resolved: &Result<couplet::thermo::Resolved<'_>, couplet::thermo::MissingData>,
    data: &FormationData,
) {
    let _ = writeln!(out, "{text}");
    if rows.is_empty() {
        if let Err(error) = resolved {
            let _ = writeln!(out, "  {error}");
        }
        return;
    }
    let _ = writeln!(
        out,
        "  {:<5} {:>12} {:>12} {:>11} {:>11}  name, source",
        "phase", "ΔfH° kJ/mol", "ΔfG° kJ/mol", "S° J/mol/K", "Cp° J/mol/K"
    );
    let used = resolved.as_ref().ok().map(|r| r.row);
    for row in rows {
        let mark = if used.is_some_and(|u| std::ptr::eq(u, *row)) {
            "◀ used"
        } else {
            ""
        };
        let _ = writeln!(
            out,
            "  {:<5} {:>12} {:>12.1} {:>11} {:>11}  {}, {} line {} [{}] {mark}",
            row.phase.label(),
            optional(row.dfh_joules_per_mol, 1e-3, 1),
            row.dfg_joules_per_mol / 1000.0,
            optional(row.entropy_joules_per_mol_kelvin, 1.0, 1),
            optional(row.cp_joules_per_mol_kelvin, 1.0, 1),
            row.name,
            row.origin,
            row.line,
            row.table
        );
        if let Some(note) = &row.note {
            let _ = writeln!(out, "        note: {note}");
        }
    }
    match resolved {
        Ok(_) => {
            if let Some(assumed) = DataPhase::assumption(species) {
                let _ = writeln!(out, "  as written: {assumed}");
            }
        }
        Err(error) => {
            let _ = writeln!(out, "  as written: {error}");
        }
    }
    let mut keys: Vec<&str> = rows.iter().map(|r| r.table.as_str()).collect();
    keys.sort();
    keys.dedup();
    for key in keys {
        if let Some(citation) = data.table_citation(key) {
            let _ = writeln!(out, "  [{key}] {citation}");
        }
    }
}

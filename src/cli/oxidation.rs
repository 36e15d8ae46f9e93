//! `couplet oxidation`: the oxidation number of every element of a species.

use super::parse::report_error;
use super::{EXIT_FINDINGS, EXIT_OK, EXIT_USAGE, argument_or_stdin, print_json};
use couplet::notation::parse_species;
use couplet::oxidation::{
    IonTable, Options, OxidationError, Pin, SpeciesOxidation, Status, signed_text,
};
use serde_json::{Value, json};

#[derive(clap::Args)]
pub struct OxidationArgs {
    /// A formula or ion (Fe3O4, S4O6^2-, K4[Fe(CN)6]); - reads standard input
    formula: String,
    /// Print JSON instead of a table
    #[arg(long)]
    json: bool,
    /// Fix an element's oxidation number, such as S=+6 or Fe=+8/3 (repeatable)
    #[arg(long, value_name = "EL=VALUE")]
    assume: Vec<String>,
}

pub fn run(args: &OxidationArgs) -> u8 {
    let text = match argument_or_stdin(&args.formula) {
        Ok(text) => text,
        Err(message) => return usage(&message, args.json),
    };
    let text = text.trim_end_matches(['\n', '\r']);
    let mut pins = Vec::new();
    for given in &args.assume {
        match given.parse::<Pin>() {
            Ok(pin) => pins.push(pin),
            Err(error) => return usage(&error.to_string(), args.json),
        }
    }
    let species = match parse_species(text) {
        Ok(species) => species,
        Err(error) => return report_error(&error, args.json),
    };
    let table = match IonTable::builtin() {
        Ok(table) => table,
        Err(error) => return failure(&OxidationError::IonTable(error), args.json),
    };
    match table.oxidation_numbers(&species, &Options { pins }) {
        Ok(result) => {
            if args.json {
                print_json(&result_json(&result));
            } else {
                print!("{}", result_table(&result));
            }
            EXIT_OK
        }
        Err(error) => failure(&error, args.json),
    }
}

fn usage(message: &str, json: bool) -> u8 {
    if json {
        print_json(
            &json!({"error": {"kind": "usage", "message": message, "line": 1, "column": 1}}),
        );
    } else {
        eprintln!("error: {message}");
    }
    EXIT_USAGE
}

/// The formula was read but cannot be given oxidation numbers: exit 1 with the reason.
fn failure(error: &OxidationError, json: bool) -> u8 {
    if json {
        print_json(&json!({"error": {
            "kind": error.kind_name(),
            "message": error.to_string(),
            "line": 1,
            "column": 1,
        }}));
    } else {
        eprintln!("error ({}): {error}", error.kind_name());
    }
    EXIT_FINDINGS
}

/// The JSON schema of issue 4 (documented in the README).
pub fn result_json(result: &SpeciesOxidation) -> Value {
    let elements: Vec<Value> = result
        .elements
        .iter()
        .map(|e| {
            let mut object = json!({
                "element": e.element.symbol(),
                "count": e.count,
                "oxidation_number": signed_text(&e.oxidation_number),
                "status": e.status.name(),
                "rule": e.rule.text(),
            });
            if e.has_sites() {
                object["sites"] = Value::Array(
                    e.sites
                        .iter()
                        .map(|s| {
                            json!({
                                "oxidation_number": signed_text(&s.oxidation_number),
                                "count": s.count,
                            })
                        })
                        .collect(),
                );
            }
            object
        })
        .collect();
    json!({"formula": result.formula, "charge": result.charge, "elements": elements})
}

fn result_table(result: &SpeciesOxidation) -> String {
    let mut out = format!("{}  charge {}\n", result.formula, result.charge);
    out.push_str(&format!(
        "  {:<7} {:>9} {:>6}  {:<10}  {}\n",
        "element", "ox. no.", "count", "status", "rule"
    ));
    for e in &result.elements {
        out.push_str(&format!(
            "  {:<7} {:>9} {:>6}  {:<10}  {}\n",
            e.element.symbol(),
            signed_text(&e.oxidation_number),
            e.count,
            e.status.name(),
            e.rule.text()
        ));
        if e.has_sites() {
            for s in &e.sites {
                out.push_str(&format!(
                    "  {:<7} {:>9} {:>6}  {:<10}  {}\n",
                    "  site",
                    signed_text(&s.oxidation_number),
                    s.count,
                    s.status.name(),
                    s.rule.text()
                ));
            }
        }
    }
    if result.elements.iter().any(|e| e.status == Status::Assumed) {
        out.push_str("assumed values are choices, not facts: fix one with --assume EL=VALUE\n");
    }
    out
}

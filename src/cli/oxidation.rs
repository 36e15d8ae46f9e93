//! `couplet oxidation`: the oxidation number of every element of a species, or the redox
//! analysis of a balanced reaction or half-reaction.

use super::failure::Failure;
use super::{EXIT_FINDINGS, EXIT_OK, EXIT_USAGE, argument_or_stdin, print_json};
use couplet::composition::decimal_text;
use couplet::notation::{Equation, Input, parse_input, parse_species};
use couplet::oxidation::{
    ElementChange, IonTable, Options, OxidationError, Pin, RedoxAnalysis, RedoxError,
    SpeciesOxidation, SpeciesPin, Status, analyse_with, signed_text,
};
use couplet::reaction::Reaction;
use num_rational::BigRational;
use num_traits::{One, Zero};
use serde_json::{Value, json};
use std::io::{self, Write};

#[derive(clap::Args)]
pub struct OxidationArgs {
    /// A formula or ion (Fe3O4, S4O6^2-, K4[Fe(CN)6]), or a balanced reaction or
    /// half-reaction to analyse; - reads standard input
    formula: String,
    /// Print JSON instead of a table
    #[arg(long)]
    json: bool,
    /// Fix an element's oxidation number: S=+6 or Fe=+8/3 for a formula, FeS2:Fe=+2 for one
    /// species of a reaction (repeatable)
    #[arg(long, value_name = "EL=VALUE")]
    assume: Vec<String>,
}

pub fn run(args: &OxidationArgs, out: &mut dyn Write) -> io::Result<u8> {
    let text = match argument_or_stdin(&args.formula) {
        Ok(text) => text,
        Err(message) => return usage(out, &message, args.json),
    };
    let text = text.trim_end_matches(['\n', '\r']);
    if let Ok(Input::Equation(equation)) = parse_input(text) {
        return run_reaction(out, &equation, args);
    }
    let mut pins = Vec::new();
    for given in &args.assume {
        match given.parse::<Pin>() {
            Ok(pin) => pins.push(pin),
            Err(error) => return usage(out, &error.to_string(), args.json),
        }
    }
    let species = match parse_species(text) {
        Ok(species) => species,
        Err(error) => return Failure::from(&error).report(out, args.json),
    };
    let table = match IonTable::builtin() {
        Ok(table) => table,
        Err(error) => return failure(out, &OxidationError::IonTable(error), args.json),
    };
    match table.oxidation_numbers(&species, &Options { pins }) {
        Ok(result) => {
            if args.json {
                print_json(out, &result_json(&result))?;
            } else {
                write!(out, "{}", result_table(&result))?;
            }
            Ok(EXIT_OK)
        }
        Err(error) => failure(out, &error, args.json),
    }
}

fn run_reaction(out: &mut dyn Write, equation: &Equation, args: &OxidationArgs) -> io::Result<u8> {
    let mut pins = Vec::new();
    for given in &args.assume {
        let Some((formula, pin)) = given.split_once(':') else {
            return usage(
                out,
                &format!(
                    "cannot read pin '{given}': in a reaction, name the species, such as FeS2:Fe=+2"
                ),
                args.json,
            );
        };
        let species = match parse_species(formula.trim()) {
            Ok(species) => species,
            Err(error) => {
                return usage(
                    out,
                    &format!("cannot read pin '{given}': {error}"),
                    args.json,
                );
            }
        };
        match pin.parse::<Pin>() {
            Ok(pin) => pins.push(SpeciesPin { species, pin }),
            Err(error) => return usage(out, &error.to_string(), args.json),
        }
    }
    let reaction = Reaction::from_equation(equation);
    match analyse_with(&reaction, &pins) {
        Ok(analysis) => {
            if args.json {
                print_json(
                    out,
                    &json!({
                        "reaction": equation.ascii(),
                        "redox": redox_json(&analysis),
                    }),
                )?;
            } else {
                write!(out, "{}", redox_table(equation, &analysis))?;
            }
            Ok(EXIT_OK)
        }
        Err(error) => {
            let status = match error {
                RedoxError::Oxidation { .. }
                | RedoxError::NotBalanced { .. }
                | RedoxError::ElectronMismatch { .. } => EXIT_FINDINGS,
                _ => EXIT_USAGE,
            };
            Failure::new(error.kind_name(), status, error.to_string()).report(out, args.json)
        }
    }
}

/// A count as every JSON output writes exact numbers.
fn count_json(value: &BigRational) -> Value {
    super::exact_json(value)
}

fn changes_json(changes: &[ElementChange]) -> Value {
    Value::Array(
        changes
            .iter()
            .map(|c| {
                json!({
                    "element": c.element.symbol(),
                    "from": signed_text(&c.from),
                    "to": signed_text(&c.to),
                    "atoms": count_json(&c.atoms),
                    "electrons": count_json(&c.electrons),
                })
            })
            .collect(),
    )
}

/// The `"redox"` object of issue 4: `{"oxidized": [{"element", "from", "to", …}], "reduced":
/// […], "n", "kind"}`, plus `electrons_written` for a half-reaction. For `couplet balance` too.
pub fn redox_json(analysis: &RedoxAnalysis) -> Value {
    let mut object = json!({
        "oxidized": changes_json(&analysis.oxidized),
        "reduced": changes_json(&analysis.reduced),
        "n": count_json(&analysis.n),
        "kind": analysis.kind.name(),
    });
    if !analysis.electrons_written.is_zero() {
        object["electrons_written"] = count_json(&analysis.electrons_written);
    }
    object
}

fn redox_table(equation: &Equation, analysis: &RedoxAnalysis) -> String {
    let mut out = format!(
        "{}
",
        equation.unicode()
    );
    for species in analysis.species.iter().flatten() {
        let states: Vec<String> = species
            .elements
            .iter()
            .map(|e| {
                let mark = if e.status == Status::Assumed { "*" } else { "" };
                format!("{} {}{mark}", e.element, signed_text(&e.oxidation_number))
            })
            .collect();
        out.push_str(&format!(
            "  {:<16} {}\n",
            species.formula,
            states.join(", ")
        ));
    }
    for (title, list) in [
        ("oxidised", &analysis.oxidized),
        ("reduced", &analysis.reduced),
    ] {
        for c in list.iter() {
            out.push_str(&format!(
                "{title:<9} {} {} → {} ({} {}, {} e-)\n",
                c.element,
                signed_text(&c.from),
                signed_text(&c.to),
                c.atoms,
                if c.atoms.is_one() { "atom" } else { "atoms" },
                c.electrons
            ));
        }
    }
    out.push_str(&format!("kind      {}\n", analysis.kind.name()));
    out.push_str(&format!("n         {}", analysis.n));
    if !analysis.electrons_written.is_zero() {
        out.push_str(" (equals the electrons written)");
    }
    out.push('\n');
    if analysis
        .species
        .iter()
        .flatten()
        .any(|s| s.has_assumptions())
    {
        out.push_str("* assumed, not determined: fix with --assume SPECIES:EL=VALUE\n");
    }
    out
}

fn usage(out: &mut dyn Write, message: &str, json: bool) -> io::Result<u8> {
    Failure::usage(message).report(out, json)
}

/// The formula was read but cannot be given oxidation numbers: exit 1 with the reason.
fn failure(out: &mut dyn Write, error: &OxidationError, json: bool) -> io::Result<u8> {
    Failure::new(error.kind_name(), EXIT_FINDINGS, error.to_string()).report(out, json)
}

/// Atoms per formula unit: a JSON integer, the decimal of a non-integer subscript, or a string
/// for a fraction that is no decimal (`"1/3"`).
fn atoms_json(result: &SpeciesOxidation, count: u64) -> Value {
    let atoms = result.per_formula_unit(count);
    if atoms.is_integer() {
        json!(atoms.numer())
    } else {
        let text = decimal_text(&atoms);
        text.parse::<serde_json::Number>()
            .map_or(json!(text), Value::Number)
    }
}

/// The JSON schema of issue 4 (documented in the README).
pub fn result_json(result: &SpeciesOxidation) -> Value {
    let elements: Vec<Value> = result
        .elements
        .iter()
        .map(|e| {
            let mut object = json!({
                "element": e.element.symbol(),
                "count": atoms_json(result, e.count),
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
                                "count": atoms_json(result, s.count),
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
            decimal_text(&result.per_formula_unit(e.count)),
            e.status.name(),
            e.rule.text()
        ));
        if e.has_sites() {
            for s in &e.sites {
                out.push_str(&format!(
                    "  {:<7} {:>9} {:>6}  {:<10}  {}\n",
                    "  site",
                    signed_text(&s.oxidation_number),
                    decimal_text(&result.per_formula_unit(s.count)),
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

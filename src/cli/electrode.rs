//! `couplet electrode`: one electrode's potential at a composition, on a reference scale.

use super::common::{TableArgs, medium_arg, resolve, table_and_scale};
use super::failure::Failure;
use super::nernst::{NernstArgs, json_fields, text};
use super::{EXIT_OK, exact_json, print_json};
use couplet::cell::caution;
use couplet::electrode::electrode_potential;
use couplet::notation::{Arrow, Style, parse_species};
use couplet::scale::Scale;
use couplet::table::Medium;
use num_traits::Zero;
use serde_json::json;
use std::io::{self, Write};

#[derive(clap::Args)]
pub struct ElectrodeCommandArgs {
    /// The couple: an id, Ox/Red (Ag+/Ag) or a reduction half-reaction (with --e0)
    couple: String,
    /// E° in V of a typed half-reaction that is not in the table, on the --scale (vs SHE
    /// unless --scale says otherwise)
    #[arg(long, allow_hyphen_values = true, value_parser = super::units::volts)]
    e0: Option<f64>,
    /// Pick the acid or base form when the table has both
    #[arg(long, value_parser = medium_arg)]
    medium: Option<Medium>,
    /// Temperature with its unit: 25C, 298.15K (E° follows dE°/dT where published)
    #[arg(long, default_value = "298.15K", value_parser = super::units::temperature)]
    temperature: f64,
    /// Composition: activities, molalities, pressures, γ model
    #[command(flatten)]
    nernst: NernstArgs,
    #[command(flatten)]
    table: TableArgs,
    /// Print JSON (schema in the docs)
    #[arg(long)]
    json: bool,
}

pub fn run(args: &ElectrodeCommandArgs, out: &mut dyn Write) -> io::Result<u8> {
    let (table, scale) = match table_and_scale(&args.table) {
        Ok(found) => found,
        Err(failure) => return failure.report(out, args.json),
    };
    let couple = match resolve(
        &table,
        &args.couple,
        args.e0.map(|e0| (e0, &scale)),
        args.medium,
    ) {
        Ok(couple) => couple,
        Err(failure) => return failure.report(out, args.json),
    };
    // --ph sets a(H+) only where the couple has H+ or OH-; otherwise it is for --scale rhe.
    let uses_ph = ["H+", "OH-"]
        .iter()
        .any(|f| parse_species(f).is_ok_and(|s| !couple.reaction.nu(&s).is_zero()));
    let ph = args.table.ph.filter(|_| uses_ph);
    let conditions = match args.nernst.conditions(ph, args.temperature) {
        Ok(conditions) => conditions,
        Err(message) => return Failure::usage(message).report(out, args.json),
    };
    let found = match electrode_potential(&couple, &conditions, &scale) {
        Ok(found) => found,
        Err(error) => return Failure::usage(error.to_string()).report(out, args.json),
    };
    if !conditions.is_empty()
        && let Err(error) = found.nernst.e_volts()
    {
        return Failure::usage(error.to_string()).report(out, args.json);
    }
    let reference = match &scale {
        Scale::Electrode(e) => Some(json!({"id": e.id, "name": e.name, "source": e.source})),
        _ => None,
    };
    if args.json {
        let mut value = json!({
            "couple": {
                "id": couple.id,
                "reaction": couple.reaction.to_string(),
                "e0_V": couple.e0_volts,
                "n": exact_json(&couple.electrons()),
                "source": couple.source,
            },
            "temperature_K": args.temperature,
            "scale": scale.label(),
            "reference": reference,
            "reference_vs_she_V": found.reference_vs_she_volts,
            "e0_V": found.e0_on_scale_volts(),
            "e0_vs_she_V": found.e0_vs_she_volts(),
            "notes": found.notes,
        });
        let object = value.as_object_mut().expect("built as an object");
        object.extend(json_fields(&found.nernst, conditions.model.model));
        object.insert("e_V".into(), json!(found.e_on_scale_volts()));
        object.insert("e_vs_she_V".into(), json!(found.e_vs_she_volts()));
        print_json(out, &value)?;
        return Ok(EXIT_OK);
    }
    let label = scale.label();
    writeln!(
        out,
        "electrode  {}  ({})",
        couple.reaction.to_text(Style::Unicode, Arrow::Forward),
        couple.label()
    )?;
    writeln!(
        out,
        "E°         {:+.4} V vs {label}  ({:+.4} V vs SHE at {} K)",
        found.e0_on_scale_volts(),
        found.e0_vs_she_volts(),
        args.temperature
    )?;
    write!(out, "{}", text(&found.nernst, args.temperature))?;
    if let (Some(e), Some(she)) = (found.e_on_scale_volts(), found.e_vs_she_volts()) {
        writeln!(out, "E vs {label}  {e:+.4} V  ({she:+.4} V vs SHE)")?;
    }
    if let Scale::Electrode(e) = &scale {
        writeln!(
            out,
            "reference  {}: {}, {}, {:+.4} V vs SHE at {} K ({})",
            e.id, e.name, e.electrolyte, found.reference_vs_she_volts, args.temperature, e.source
        )?;
    }
    for note in &found.notes {
        writeln!(out, "note: {note}")?;
    }
    writeln!(
        out,
        "source: {}",
        couple.source.as_deref().unwrap_or("given")
    )?;
    if let Some(line) = caution(&couple.reaction) {
        writeln!(out, "{line}")?;
    }
    Ok(EXIT_OK)
}

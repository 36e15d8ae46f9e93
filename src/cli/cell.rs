//! `couplet cell`: a cathode and an anode couple combined into the net reaction and its figures.

use super::common::{ElectrodeArgs, TableArgs, build_cell, formation_data, load_table, scale};
use super::failure::Failure;
use super::nernst::{NernstArgs, emit, json_fields, run_nernst, text};
use super::{EXIT_OK, exact_integer_json, exact_json, print_json};
use couplet::cell::caution;
use couplet::constants::STANDARD_TEMPERATURE_KELVIN;
use couplet::figures::significant;
use couplet::nernst::Standard;
use couplet::notation::{Arrow, Style};
use couplet::scale::Scale;
use couplet::table::{Couple, Origin};
use num_traits::ToPrimitive;
use serde_json::{Value, json};
use std::io::{self, Write};

#[derive(clap::Args)]
pub struct CellArgs {
    /// Cathode couple: an id, Ox/Red (PbO2/PbSO4) or a reduction half-reaction
    #[arg(long)]
    cathode: String,
    /// Anode couple, written as a reduction like the cathode (it runs in reverse)
    #[arg(long)]
    anode: String,
    #[command(flatten)]
    electrodes: ElectrodeArgs,
    /// Temperature for E°(T), ΔG°(T), K(T) (first order from dE°/dT), with its unit: 25C,
    /// 25°C, 298.15K; a bare number is kelvin and must be at least 200; a warning outside 0–100 °C
    #[arg(long, default_value = "298.15K", value_parser = super::units::temperature)]
    temperature: f64,
    #[command(flatten)]
    table: TableArgs,
    /// Composition for the Nernst potential, γ model, export
    #[command(flatten)]
    nernst: NernstArgs,
    /// Print JSON (schema in the docs)
    #[arg(long)]
    json: bool,
}

fn half_json(couple: &Couple, scale: &Scale) -> Value {
    let mut value = json!({
        "id": couple.id,
        "reaction": couple.reaction.to_string(),
        "e0_V": scale.couple_potential(&couple.reaction, couple.e0_volts),
        "n": exact_json(&couple.electrons()),
        "source": couple.source,
        "e0_source": e0_source(couple),
        "confirmed_by": couple.confirmed_by,
        "verified": couple.verified,
        "also_published": couple.also_published.iter().map(|p| json!({
            "e0_V": scale.couple_potential(&couple.reaction, p.e0_volts),
            "source": p.source,
        })).collect::<Vec<_>>(),
    });
    // Beside a tabulated value, what formation data give for the same half-reaction.
    if couple.origin != Origin::FormationData
        && let Some(from_data) = formation_e0(couple)
    {
        let object = value.as_object_mut().expect("built as an object");
        object.insert(
            "e0_formation_data_V".into(),
            json!(scale.couple_potential(&couple.reaction, from_data)),
        );
        object.insert(
            "formation_data_minus_e0_mV".into(),
            json!((from_data - couple.e0_volts) * 1000.0),
        );
    }
    value
}

/// `table`, `file`, `given` or `formation data`: where a couple's E° came from.
fn e0_source(couple: &Couple) -> &'static str {
    match couple.origin {
        Origin::BuiltIn => "table",
        Origin::File(_) => "file",
        Origin::FormationData => "formation data",
        _ => "given",
    }
}

/// E° (V vs SHE) of a couple's half-reaction from formation data, when every species has data.
fn formation_e0(couple: &Couple) -> Option<f64> {
    couplet::thermo::e0_from_data(couple, formation_data())?.e0_volts()
}

/// One line comparing each tabulated electrode with formation data, when they have data.
fn formation_line(cell: &couplet::cell::Cell) -> Option<String> {
    let side = |word: &str, couple: &Couple| {
        if couple.origin == Origin::FormationData {
            return None;
        }
        formation_e0(couple).map(|e| {
            format!(
                "{word} {} V ({:+.1} mV from the value used)",
                significant(e, 4),
                (e - couple.e0_volts) * 1000.0
            )
        })
    };
    let parts: Vec<String> = [side("cathode", &cell.cathode), side("anode", &cell.anode)]
        .into_iter()
        .flatten()
        .collect();
    (!parts.is_empty()).then(|| {
        format!(
            "formation data (CRC, E° = −ΔrG°/nF vs SHE): {}",
            parts.join("; ")
        )
    })
}

pub fn run(args: &CellArgs, out: &mut dyn Write) -> io::Result<u8> {
    let table = match load_table(&args.table) {
        Ok(table) => table,
        Err(failure) => return failure.report(out, args.json),
    };
    let scale = match scale(&args.table) {
        Ok(scale) => scale,
        Err(failure) => return failure.report(out, args.json),
    };
    let cell = match build_cell(
        &table,
        &args
            .electrodes
            .cell_request(&args.cathode, &args.anode, args.temperature, &scale),
    ) {
        Ok(cell) => cell,
        Err(failure) => return failure.report(out, args.json),
    };
    let at_t = cell.at_temperature.as_ref();
    let dedt = match (
        cell.cathode.dedt_millivolts_per_kelvin,
        cell.anode.dedt_millivolts_per_kelvin,
    ) {
        (Some(c), Some(a)) => Some((c - a) / 1000.0),
        _ => None,
    };
    let standard = Standard {
        reaction: &cell.net,
        e0_volts: cell.e0_volts,
        electrons: cell.electrons.to_f64().unwrap_or(f64::NAN),
        de0_dt_volts_per_kelvin: dedt,
    };
    let format = match args.nernst.emit_format() {
        Ok(format) => format,
        Err(message) => {
            return Failure::usage(message).report(out, args.json);
        }
    };
    // A pH whose H+ and OH- cancel in the net reaction cannot move E: say so, do not refuse it
    // (it still sets the RHE scale).
    let mut ph = args.table.ph;
    if let Some(value) = ph
        && !has_h_or_oh(&cell.net)
    {
        say!(
            "note: pH {value} does not enter Q: the net reaction has no H+ or OH- (they cancel), so E does not depend on pH"
        );
        ph = None;
    }
    let (nernst, conditions) = match run_nernst(&args.nernst, &standard, ph, args.temperature) {
        Ok(found) => found,
        Err(message) => {
            return Failure::usage(message).report(out, args.json);
        }
    };
    if let Some(format) = format {
        let source = format!(
            "cathode {}; anode {}",
            cell.cathode.source.as_deref().unwrap_or("given"),
            cell.anode.source.as_deref().unwrap_or("given")
        );
        match emit(&standard, &nernst, &conditions, format, &source) {
            Ok(code) => {
                write!(out, "{code}")?;
                return Ok(EXIT_OK);
            }
            Err(message) => {
                return Failure::usage(message).report(out, args.json);
            }
        }
    }
    if args.json {
        let side = |terms: Vec<(String, Value)>| -> Value {
            Value::Array(
                terms
                    .into_iter()
                    .map(|(species, coefficient)| json!({"species": species, "coefficient": coefficient}))
                    .collect(),
            )
        };
        let reactants = cell
            .net
            .reactants()
            .map(|(s, c)| (s.ascii(), exact_json(&c)))
            .collect();
        let products = cell
            .net
            .products()
            .map(|(s, c)| (s.ascii(), exact_json(&c)))
            .collect();
        let mut value = json!({
            "cathode": half_json(&cell.cathode, &scale),
            "anode": half_json(&cell.anode, &scale),
            "net": {
                "balanced": cell.net.to_string(),
                "reactants": side(reactants),
                "products": side(products),
            },
            "n": exact_integer_json(&cell.electrons),
            "e0_V": at_t.map_or(cell.e0_volts, |t| t.e0_volts),
            "delta_g0_kJ_per_mol": at_t.map_or(cell.delta_g0_kilojoules_per_mol, |t| t.delta_g0_kilojoules_per_mol),
            "log10_k": at_t.map_or(cell.log10_k, |t| t.log10_k),
            "temperature_K": at_t.map_or(STANDARD_TEMPERATURE_KELVIN, |t| t.temperature_kelvin),
            "scale": scale.label(),
        });
        // Extra fields; the ones above are the stable schema.
        let object = value.as_object_mut().expect("built as an object");
        object.insert("runs_as_written".into(), json!(cell.runs_as_written));
        if let Some((low, high)) = cell.e0_range_volts() {
            object.insert("e0_published_range_V".into(), json!([low, high]));
        }
        if let Some(t) = at_t {
            object.insert(
                "delta_s0_J_per_mol_K".into(),
                json!(t.delta_s0_joules_per_mol_kelvin),
            );
            object.insert(
                "delta_h0_kJ_per_mol".into(),
                json!(t.delta_h0_kilojoules_per_mol),
            );
        }
        object.insert("notes".into(), json!(cell.notes));
        object.insert("caution".into(), json!(caution(&cell.net)));
        object.extend(json_fields(&nernst, conditions.model.model));
        print_json(out, &value)?;
        return Ok(EXIT_OK);
    }
    let on = |c: &Couple| format!("{:+.4} V", scale.couple_potential(&c.reaction, c.e0_volts));
    for (word, couple) in [("cathode", &cell.cathode), ("anode", &cell.anode)] {
        writeln!(
            out,
            "{word:<8} {:<44} E° {}  ({}{})",
            couple.reaction.to_text(Style::Unicode, Arrow::Forward),
            on(couple),
            couple.label(),
            if couple.verified {
                ""
            } else {
                "; UNVERIFIED value: no read source confirms it"
            }
        )?;
    }
    writeln!(
        out,
        "net      {}",
        cell.net.to_text(Style::Unicode, Arrow::Forward)
    )?;
    writeln!(out, "n        {}", cell.electrons)?;
    writeln!(out, "E°cell   {:+.4} V  (at 298.15 K)", cell.e0_volts)?;
    if let Some((low, high)) = cell.e0_range_volts() {
        writeln!(
            out,
            "         published values of the couples give {low:+.4} to {high:+.4} V (spread {:.0} mV): compilations disagree, see couplet table",
            (high - low) * 1000.0
        )?;
    }
    writeln!(
        out,
        "ΔG°      {:+.2} kJ/mol",
        cell.delta_g0_kilojoules_per_mol
    )?;
    match cell.k() {
        Some(k) => writeln!(out, "K        {k:.3e}  (log10 K = {:.2})", cell.log10_k)?,
        None => writeln!(
            out,
            "K        beyond floating point  (log10 K = {:.2})",
            cell.log10_k
        )?,
    }
    writeln!(
        out,
        "         {}",
        if cell.runs_as_written {
            "runs as written (galvanic)"
        } else if cell.e0_volts == 0.0 {
            "at equilibrium in the standard state (E° = 0): the direction follows from E"
        } else {
            "does not run as written: the reverse is spontaneous (an electrolytic cell as written)"
        }
    )?;
    if let Some(t) = at_t {
        writeln!(
            out,
            "at {} K  E° {:+.4} V, ΔG° {:+.2} kJ/mol, log10 K {:.2}  (dE°/dT {:+.3} mV/K, ΔS° {:+.1} J/(mol·K), ΔH° {:+.2} kJ/mol)",
            couplet::figures::significant(t.temperature_kelvin, 6),
            t.e0_volts,
            t.delta_g0_kilojoules_per_mol,
            t.log10_k,
            t.dedt_millivolts_per_kelvin,
            t.delta_s0_joules_per_mol_kelvin,
            t.delta_h0_kilojoules_per_mol
        )?;
    }
    if scale != Scale::She {
        writeln!(
            out,
            "electrode potentials vs {}{}; E°cell does not depend on the scale",
            scale.label(),
            super::common::rhe_meaning(&scale)
        )?;
    }
    write!(out, "{}", text(&nernst, args.temperature))?;
    for note in &cell.notes {
        writeln!(out, "note: {note}")?;
    }
    writeln!(
        out,
        "sources: cathode {}; anode {}",
        cell.cathode.source.as_deref().unwrap_or("given"),
        cell.anode.source.as_deref().unwrap_or("given")
    )?;
    if let Some(line) = formation_line(&cell) {
        writeln!(out, "{line}")?;
    }
    if let Some(line) = caution(&cell.net) {
        writeln!(out, "{line}")?;
    }
    Ok(EXIT_OK)
}

/// Whether H+ or OH- takes part in a reaction.
fn has_h_or_oh(reaction: &couplet::reaction::Reaction) -> bool {
    // A compartment label (concentration cells) does not make H+ another species here.
    reaction.entries().iter().any(|e| {
        let mut bare = e.species.without_state();
        bare.compartment = None;
        matches!(bare.ascii().as_str(), "H+" | "OH-")
    })
}

//! `couplet cell`: a cathode and an anode couple combined into the net reaction and its figures.

use super::common::{ElectrodeArgs, TableArgs, build_cell, load_table, scale};
use super::nernst::{NernstArgs, emit, json_fields, run_nernst, text};
use super::{EXIT_OK, EXIT_USAGE, print_json};
use couplet::cell::caution;
use couplet::constants::STANDARD_TEMPERATURE_KELVIN;
use couplet::nernst::Standard;
use couplet::notation::{Arrow, Style};
use couplet::scale::Scale;
use couplet::table::Couple;
use num_traits::ToPrimitive;
use serde_json::{Value, json};

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
    /// Temperature in K for E°(T), ΔG°(T), K(T) (first order from dE°/dT)
    #[arg(long, default_value_t = STANDARD_TEMPERATURE_KELVIN)]
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
    json!({
        "id": couple.id,
        "reaction": couple.reaction.to_string(),
        "e0_V": scale.from_she(couple.e0_volts),
        "n": couple.electrons().to_integer().to_string().parse::<i64>().unwrap_or(0),
        "source": couple.source,
    })
}

pub fn run(args: &CellArgs) -> u8 {
    let table = match load_table(&args.table) {
        Ok(table) => table,
        Err(status) => return status,
    };
    let scale = match scale(&args.table) {
        Ok(scale) => scale,
        Err(status) => return status,
    };
    let cell = match build_cell(
        &table,
        &args
            .electrodes
            .cell_request(&args.cathode, &args.anode, args.temperature),
    ) {
        Ok(cell) => cell,
        Err(status) => return status,
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
            eprintln!("error: {message}");
            return EXIT_USAGE;
        }
    };
    let (nernst, conditions) =
        match run_nernst(&args.nernst, &standard, args.table.ph, args.temperature) {
            Ok(found) => found,
            Err(message) => {
                eprintln!("error: {message}");
                return EXIT_USAGE;
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
                print!("{code}");
                return EXIT_OK;
            }
            Err(message) => {
                eprintln!("error: {message}");
                return EXIT_USAGE;
            }
        }
    }
    if args.json {
        let side = |terms: Vec<(String, String)>| -> Value {
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
            .map(|(s, c)| (s.ascii(), c.to_string()))
            .collect();
        let products = cell
            .net
            .products()
            .map(|(s, c)| (s.ascii(), c.to_string()))
            .collect();
        let mut value = json!({
            "cathode": half_json(&cell.cathode, &scale),
            "anode": half_json(&cell.anode, &scale),
            "net": {
                "balanced": cell.net.to_string(),
                "reactants": side(reactants),
                "products": side(products),
            },
            "n": cell.electrons.to_string().parse::<i64>().unwrap_or(0),
            "e0_V": at_t.map_or(cell.e0_volts, |t| t.e0_volts),
            "delta_g0_kJ_per_mol": at_t.map_or(cell.delta_g0_kilojoules_per_mol, |t| t.delta_g0_kilojoules_per_mol),
            "log10_k": at_t.map_or(cell.log10_k, |t| t.log10_k),
            "temperature_K": at_t.map_or(STANDARD_TEMPERATURE_KELVIN, |t| t.temperature_kelvin),
            "scale": scale.label(),
        });
        // Extra fields; the ones above are the stable schema.
        let object = value.as_object_mut().expect("built as an object");
        object.insert("runs_as_written".into(), json!(cell.runs_as_written));
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
        print_json(&value);
        return EXIT_OK;
    }
    let on = |e: f64| format!("{:+.4} V", scale.from_she(e));
    println!(
        "cathode  {:<44} E° {}  ({})",
        cell.cathode
            .reaction
            .to_text(Style::Unicode, Arrow::Forward),
        on(cell.cathode.e0_volts),
        cell.cathode.label()
    );
    println!(
        "anode    {:<44} E° {}  ({})",
        cell.anode.reaction.to_text(Style::Unicode, Arrow::Forward),
        on(cell.anode.e0_volts),
        cell.anode.label()
    );
    println!(
        "net      {}",
        cell.net.to_text(Style::Unicode, Arrow::Forward)
    );
    println!("n        {}", cell.electrons);
    println!("E°cell   {:+.4} V  (at 298.15 K)", cell.e0_volts);
    println!("ΔG°      {:+.2} kJ/mol", cell.delta_g0_kilojoules_per_mol);
    match cell.k() {
        Some(k) => println!("K        {k:.3e}  (log10 K = {:.2})", cell.log10_k),
        None => println!(
            "K        beyond floating point  (log10 K = {:.2})",
            cell.log10_k
        ),
    }
    println!(
        "         {}",
        if cell.runs_as_written {
            "runs as written (galvanic)"
        } else if cell.e0_volts == 0.0 {
            "at equilibrium in the standard state (E° = 0): the direction follows from E"
        } else {
            "does not run as written: the reverse is spontaneous (an electrolytic cell as written)"
        }
    );
    if let Some(t) = at_t {
        println!(
            "at {} K  E° {:+.4} V, ΔG° {:+.2} kJ/mol, log10 K {:.2}  (dE°/dT {:+.3} mV/K, ΔS° {:+.1} J/(mol·K), ΔH° {:+.2} kJ/mol)",
            t.temperature_kelvin,
            t.e0_volts,
            t.delta_g0_kilojoules_per_mol,
            t.log10_k,
            t.dedt_millivolts_per_kelvin,
            t.delta_s0_joules_per_mol_kelvin,
            t.delta_h0_kilojoules_per_mol
        );
    }
    if scale != Scale::She {
        println!(
            "electrode potentials vs {}; E°cell does not depend on the scale",
            scale.label()
        );
    }
    print!("{}", text(&nernst, args.temperature));
    for note in &cell.notes {
        println!("note: {note}");
    }
    println!(
        "sources: cathode {}; anode {}",
        cell.cathode.source.as_deref().unwrap_or("given"),
        cell.anode.source.as_deref().unwrap_or("given")
    );
    if let Some(line) = caution(&cell.net) {
        println!("{line}");
    }
    EXIT_OK
}

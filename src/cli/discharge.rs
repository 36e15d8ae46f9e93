//! `couplet discharge`: open-circuit voltage of a cell along its discharge, from initial
//! amounts, with CSV and SVG output written atomically.

use super::common::{ElectrodeArgs, TableArgs, build_cell, load_table, scale_without_quotient};
use super::failure::Failure;
use super::units::{refuse_repeats, species_numbers, species_value};
use super::{EXIT_OK, print_json};
use couplet::activity::{ActivityModel, GammaModel};
use couplet::cell::caution;
use couplet::discharge::{Amount, Discharge, DischargeSpec, discharge};
use couplet::figures::significant;
use couplet::notation::{Arrow, Species, Style};
use couplet::output::csv::discharge_csv;
use couplet::output::svg::{DischargeAxis, discharge_plot, render};
use serde_json::json;
use std::io::{self, Write};
use std::path::PathBuf;

#[derive(clap::Args)]
pub struct DischargeArgs {
    /// Cathode couple: an id, Ox/Red or a reduction half-reaction
    #[arg(long)]
    cathode: String,
    /// Anode couple, written as a reduction (it runs in reverse)
    #[arg(long)]
    anode: String,
    #[command(flatten)]
    electrodes: ElectrodeArgs,
    /// Initial amount SPECIES=VALUE in mol, or VALUEg in grams (Zn=10g); repeatable. A neutral
    /// electrolyte (H2SO4=4, KOH=7) supplies its ions; reactants with no amount are in excess
    #[arg(long = "amount", value_name = "SPECIES=VALUE", required = true)]
    amounts: Vec<String>,
    /// Mass of solvent water at the start, kg (needed when a dissolved species enters Q)
    #[arg(long = "solvent-kg")]
    solvent_kg: Option<f64>,
    /// Activity model: ideal, debye-huckel, extended, davies or table
    #[arg(long, default_value = "ideal")]
    gamma: String,
    /// Use the γ model beyond its documented range
    #[arg(long)]
    force: bool,
    /// Pressure of a gas in bar, GAS=BAR (air: O2=0.21); gases not given are at 1 bar
    #[arg(long = "pressure", value_name = "GAS=BAR")]
    pressures: Vec<String>,
    /// Temperature with its unit: 25C, 25°C, 298.15K; a bare number is kelvin and must be at
    /// least 200; a warning outside 0–100 °C
    #[arg(long, default_value = "298.15K", value_parser = super::units::temperature)]
    temperature: f64,
    /// Steps from charged to the end (points = steps + 1), 1 to 10000
    #[arg(long, default_value_t = 100, value_parser = super::units::steps)]
    steps: usize,
    /// Write the curve as CSV (columns soc, charge_Ah, e_V, …)
    #[arg(long)]
    csv: Option<PathBuf>,
    /// Write an SVG plot of E against state of charge
    #[arg(long)]
    svg: Option<PathBuf>,
    /// Plot against charge passed (Ah) instead of state of charge
    #[arg(long = "plot-charge")]
    plot_charge: bool,
    #[command(flatten)]
    table: TableArgs,
    /// Print JSON (schema in docs-design.md)
    #[arg(long)]
    json: bool,
}

fn amounts(items: &[String]) -> Result<Vec<(Species, Amount)>, String> {
    let mut out = Vec::new();
    for item in items {
        let (species, value) = species_value("--amount", item)?;
        let (digits, grams) = match value.strip_suffix('g') {
            Some(digits) => (digits, true),
            None => (value.strip_suffix("mol").unwrap_or(value), false),
        };
        let number: f64 = digits
            .trim()
            .parse()
            .map_err(|_| format!("--amount {item}: '{value}' is not a number of mol or grams"))?;
        out.push((
            species,
            if grams {
                Amount::Grams(number)
            } else {
                Amount::Moles(number)
            },
        ));
    }
    refuse_repeats(out.iter().map(|(s, _)| ("--amount", s)))?;
    Ok(out)
}

/// The charge the energy integral covers: the last point computed.
fn energy_charge_amp_hours(curve: &Discharge) -> f64 {
    curve.points.last().map_or(0.0, |p| p.charge_amp_hours)
}

fn json_of(curve: &Discharge, caution: Option<String>) -> serde_json::Value {
    json!({
        "reaction": curve.reaction,
        "n": curve.electrons,
        "e0_V": curve.e0_volts,
        "temperature_K": curve.temperature_kelvin,
        "gamma_model": curve.gamma_model.name(),
        "limiting": curve.limiting.ascii(),
        "excess": curve.excess.iter().map(|s| s.ascii()).collect::<Vec<_>>(),
        "capacity_Ah": curve.capacity_amp_hours,
        "energy_Wh": curve.energy_watt_hours,
        "stopped": curve.stopped,
        // The charge the energy covers: capacity_Ah unless the curve stopped early.
        "energy_charge_Ah": energy_charge_amp_hours(curve),
        "assumptions": curve.assumptions,
        "caution": caution,
        "solutes": curve.solutes.iter().map(|s| s.ascii()).collect::<Vec<_>>(),
        "points": curve.points.iter().map(|p| json!({
            "soc": p.state_of_charge,
            "charge_Ah": p.charge_amp_hours,
            "e_V": p.e_volts,
            "extent_mol": p.extent_mol,
            "ln_q": p.ln_q,
            "solvent_kg": p.solvent_kg,
            "a_H2O": p.water_activity,
            "molalities": p.molalities,
        })).collect::<Vec<_>>(),
    })
}

fn print_text(out: &mut dyn Write, curve: &Discharge) -> io::Result<()> {
    writeln!(out, "net       {}", curve.reaction)?;
    writeln!(
        out,
        "n         {}    E° {:+.4} V at {} K    γ model {}",
        curve.electrons,
        curve.e0_volts,
        significant(curve.temperature_kelvin, 6),
        curve.gamma_model
    )?;
    writeln!(
        out,
        "limiting  {} (runs out after {:.4} mol of reaction)",
        curve.limiting.ascii(),
        curve.extent_end_mol
    )?;
    if !curve.excess.is_empty() {
        writeln!(
            out,
            "excess    {}",
            curve
                .excess
                .iter()
                .map(|s| s.ascii())
                .collect::<Vec<_>>()
                .join(", ")
        )?;
    }
    writeln!(out, "{:>6} {:>12} {:>10}", "soc", "charge Ah", "E V")?;
    let every = (curve.points.len() / 10).max(1);
    for (i, p) in curve.points.iter().enumerate() {
        if i % every == 0 || i + 1 == curve.points.len() {
            writeln!(
                out,
                "{:>6.3} {:>12.4} {:>10.4}",
                p.state_of_charge, p.charge_amp_hours, p.e_volts
            )?;
        }
    }
    let covered = energy_charge_amp_hours(curve);
    let mean = if covered > 0.0 {
        curve.energy_watt_hours / covered
    } else {
        f64::NAN
    };
    let figure = |x: f64| significant(x, 5);
    writeln!(
        out,
        "capacity  {} Ah    energy {} Wh    mean E {} V",
        figure(curve.capacity_amp_hours),
        figure(curve.energy_watt_hours),
        figure(mean)
    )?;
    if curve.stopped.is_some() {
        writeln!(
            out,
            "note: energy and mean E cover the computed curve only, the first {} Ah of {} Ah: the rest has no voltage (below)",
            figure(covered),
            figure(curve.capacity_amp_hours)
        )?;
    }
    if let Some(reason) = &curve.stopped {
        writeln!(out, "note: {reason}")?;
    }
    for a in &curve.assumptions {
        writeln!(out, "assumed: {a}")?;
    }
    writeln!(
        out,
        "open-circuit (equilibrium) voltages: no overpotential, resistance or self-discharge"
    )
}

pub fn run(args: &DischargeArgs, out: &mut dyn Write) -> io::Result<u8> {
    let Some(model) = GammaModel::from_name(&args.gamma) else {
        return Failure::usage(format!(
            "--gamma must be ideal, debye-huckel, extended, davies or table, not '{}'",
            args.gamma
        ))
        .report(out, args.json);
    };
    let given = amounts(&args.amounts)
        .and_then(|amounts| Ok((amounts, species_numbers("--pressure", &args.pressures)?)));
    let (amounts, pressures) = match given {
        Ok(given) => given,
        Err(message) => {
            return Failure::usage(message).report(out, args.json);
        }
    };
    let table = match load_table(&args.table) {
        Ok(table) => table,
        Err(failure) => return failure.report(out, args.json),
    };
    let scale = match scale_without_quotient(&args.table) {
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
    let spec = DischargeSpec {
        amounts,
        solvent_kg: args.solvent_kg,
        activity: ActivityModel {
            model,
            force: args.force,
        },
        pressures_bar: pressures,
        steps: args.steps,
    };
    let curve = match discharge(&cell, &spec) {
        Ok(curve) => curve,
        Err(error) => {
            return Failure::from(&error).report(out, args.json);
        }
    };
    // Render everything before writing anything, so a rendering fault writes no file.
    let svg = match &args.svg {
        Some(_) => {
            let axis = if args.plot_charge {
                DischargeAxis::Charge
            } else {
                DischargeAxis::StateOfCharge
            };
            let label = format!(
                "{}  (E° {:.3} V)",
                cell.net.to_text(Style::Unicode, Arrow::Forward),
                curve.e0_volts
            );
            match render(&discharge_plot(
                "Open-circuit voltage along discharge",
                &[(label, &curve)],
                axis,
            )) {
                Ok(text) => Some(text),
                Err(error) => {
                    return Failure::chemistry(error.to_string()).report(out, args.json);
                }
            }
        }
        None => None,
    };
    let outputs = [
        (
            args.csv.as_ref(),
            args.csv.as_ref().map(|_| discharge_csv(&curve)),
        ),
        (args.svg.as_ref(), svg),
    ];
    if let Err(failure) = super::common::write_outputs(&outputs) {
        return failure.report(out, args.json);
    }
    if args.json {
        print_json(out, &json_of(&curve, caution(&cell.net)))?;
    } else {
        print_text(out, &curve)?;
        if let Some(line) = caution(&cell.net) {
            writeln!(out, "{line}")?;
        }
    }
    Ok(EXIT_OK)
}

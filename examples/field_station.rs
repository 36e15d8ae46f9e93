//! Worked example: choosing a power cell for a fictional coastal field station.
//!
//! Balances the electrode reactions from skeletons, builds each candidate cell from the
//! built-in potential table, prints theoretical capacity and energy on two mass bases, steps
//! each discharge from the amounts in `examples/field_station/cells.toml` (invented data, see
//! that file) and writes one CSV per cell and two overlay SVG plots.
//!
//! Run: `cargo run --example field_station [OUTPUT_DIR]` (default `target/field_station`).

use couplet::activity::{ActivityModel, GammaModel};
use couplet::balance::{BalanceOptions, Medium as BalanceMedium, balance};
use couplet::capacity::{Basis, Densities, cell_capacity};
use couplet::cell::{CellOptions, combine};
use couplet::discharge::{Amount, Discharge, DischargeSpec, discharge};
use couplet::output::csv::discharge_csv;
use couplet::output::svg::{DischargeAxis, discharge_plot, render};
use couplet::output::write_atomically;
use couplet::table::Table;
use std::path::PathBuf;

const CELLS_TOML: &str = include_str!("field_station/cells.toml");

#[derive(serde::Deserialize)]
struct File {
    cell: Vec<CellEntry>,
}

#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct CellEntry {
    name: String,
    cathode: String,
    anode: String,
    amounts: toml::Table,
    #[serde(default)]
    pressures: toml::Table,
    solvent_kg: Option<f64>,
    gamma: String,
    note: String,
}

fn amount(value: &toml::Value) -> Result<Amount, String> {
    match value {
        toml::Value::Float(mol) => Ok(Amount::Moles(*mol)),
        toml::Value::Integer(mol) => Ok(Amount::Moles(*mol as f64)),
        toml::Value::String(text) => text
            .strip_suffix('g')
            .and_then(|g| g.trim().parse().ok())
            .map(Amount::Grams)
            .ok_or_else(|| format!("amount '{text}' is not NNg")),
        other => Err(format!("amount {other} is not a number or NNg")),
    }
}

fn run() -> Result<(), String> {
    let out: PathBuf = std::env::args()
        .nth(1)
        .map(PathBuf::from)
        .unwrap_or_else(|| PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target/field_station"));
    std::fs::create_dir_all(&out).map_err(|e| format!("cannot create {}: {e}", out.display()))?;

    println!("Skerry Point field station (fictional): which cell for a winter of sensors?\n");
    // 1. Balance the skeletons the designer starts from (exact integer arithmetic).
    for (skeleton, medium) in [
        ("Zn + O2 -> ZnO", BalanceMedium::None),
        ("Mg + AgCl -> Mg2+ + Ag + Cl-", BalanceMedium::None),
        ("VO2+ + e- -> VO^2+", BalanceMedium::Acid),
        ("NiOOH + Cd -> Ni(OH)2 + Cd(OH)2", BalanceMedium::Base),
    ] {
        let equation = skeleton.parse().map_err(|e| format!("{skeleton}: {e}"))?;
        let options = BalanceOptions {
            medium,
            ..BalanceOptions::default()
        };
        let balanced = balance(&equation, &options).map_err(|e| format!("{skeleton}: {e}"))?;
        println!("balanced   {:<34} => {}", skeleton, balanced.ascii());
    }
    println!();

    let file: File = toml::from_str(CELLS_TOML).map_err(|e| format!("cells.toml: {e}"))?;
    let table = Table::builtin();
    let densities = Densities::builtin();
    let mut curves: Vec<(String, Discharge)> = Vec::new();
    for (index, entry) in file.cell.iter().enumerate() {
        let find = |q: &str| {
            table
                .find(q, None)
                .map_err(|e| format!("{}: {e}", entry.name))
        };
        let cell = combine(
            find(&entry.cathode)?,
            find(&entry.anode)?,
            CellOptions::default(),
        )
        .map_err(|e| format!("{}: {e}", entry.name))?;
        println!("== {} ==", entry.name);
        println!(
            "   {}   n = {}   E° = {:.3} V",
            cell.net, cell.electrons, cell.e0_volts
        );
        // 2. Theoretical figures on the electrode-material basis and with electrolyte.
        for basis in [Basis::Active, Basis::WithElectrolyte] {
            match cell_capacity(&cell.net, &cell.electrons, cell.e0_volts, basis, &densities) {
                Ok(c) => println!(
                    "   {:<17} {:>7.1} Ah/kg  {:>7.0} Wh/kg{}",
                    basis.name(),
                    c.amp_hours_per_kg,
                    c.watt_hours_per_kg,
                    c.watt_hours_per_litre
                        .map_or_else(String::new, |wh| format!("  {wh:>6.0} Wh/L"))
                ),
                Err(e) => println!("   {:<17} {e}", basis.name()),
            }
        }
        // 3. The discharge from the invented amounts.
        let mut amounts = Vec::new();
        for (species, value) in &entry.amounts {
            amounts.push((
                species.parse().map_err(|e| format!("{species}: {e}"))?,
                amount(value)?,
            ));
        }
        let mut pressures = Vec::new();
        for (gas, value) in &entry.pressures {
            let bar = value
                .as_float()
                .ok_or_else(|| format!("pressure of {gas}"))?;
            pressures.push((gas.parse().map_err(|e| format!("{gas}: {e}"))?, bar));
        }
        let model =
            GammaModel::from_name(&entry.gamma).ok_or_else(|| format!("gamma {}", entry.gamma))?;
        let spec = DischargeSpec {
            amounts,
            solvent_kg: entry.solvent_kg,
            activity: ActivityModel::new(model),
            pressures_bar: pressures,
            steps: 60,
        };
        let curve = discharge(&cell, &spec).map_err(|e| format!("{}: {e}", entry.name))?;
        let (first, last) = (&curve.points[0], curve.points.last().expect("points"));
        println!(
            "   discharge: {:.1} Ah, {:.1} Wh, E {:.3} V -> {:.3} V, limited by {}",
            curve.capacity_amp_hours,
            curve.energy_watt_hours,
            first.e_volts,
            last.e_volts,
            curve.limiting.ascii()
        );
        if let Some(reason) = &curve.stopped {
            println!("   {reason}");
        }
        println!("   note: {}\n", entry.note);
        let csv_path = out.join(format!("cell{}.csv", index + 1));
        write_atomically(&csv_path, discharge_csv(&curve).as_bytes())
            .map_err(|e| format!("{}: {e}", csv_path.display()))?;
        curves.push((entry.name.clone(), curve));
    }
    // 4. Overlay plots: shape against state of charge, and size against charge passed.
    let refs: Vec<(String, &Discharge)> = curves.iter().map(|(n, c)| (n.clone(), c)).collect();
    for (name, axis) in [
        ("by_state_of_charge.svg", DischargeAxis::StateOfCharge),
        ("by_charge.svg", DischargeAxis::Charge),
    ] {
        let plot = discharge_plot("Skerry Point candidates: open-circuit voltage", &refs, axis);
        let svg = render(&plot).map_err(|e| e.to_string())?;
        let path = out.join(name);
        write_atomically(&path, svg.as_bytes()).map_err(|e| format!("{}: {e}", path.display()))?;
    }
    println!(
        "wrote cell1.csv … cell{}.csv, by_state_of_charge.svg, by_charge.svg to {}",
        curves.len(),
        out.display()
    );
    println!(
        "caution: cadmium and vanadium compounds are toxic, KOH and sulfuric acid are corrosive; figures are ideal, follow local codes and the makers' data"
    );
    Ok(())
}

fn main() -> std::process::ExitCode {
    match run() {
        Ok(()) => std::process::ExitCode::SUCCESS,
        Err(message) => {
            eprintln!("error: {message}");
            std::process::ExitCode::from(1)
        }
    }
}

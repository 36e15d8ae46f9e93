//! `couplet capacity`: theoretical capacity of electrode materials and of a cell, with its
//! specific energy on a stated mass basis and volumetric figures where densities are known.

use super::common::{ElectrodeArgs, TableArgs, build_cell, load_table, scale_without_quotient};
use super::failure::Failure;
use super::{EXIT_OK, exact_integer_json, print_json};
use couplet::capacity::{
    Basis, CellCapacity, Densities, MaterialCapacity, cell_capacity, cell_materials,
    half_reaction_materials,
};
use couplet::cell::caution;
use couplet::notation::{Arrow, Style, parse_equation};
use couplet::reaction::Reaction;
use couplet::table::{imbalance_text, is_reaction_text};
use serde_json::{Value, json};
use std::io::{self, Write};

#[derive(clap::Args)]
pub struct CapacityArgs {
    /// A half-reaction, a couple (Ox/Red) or a table id; leave out and give --cathode and
    /// --anode for a cell
    #[arg(conflicts_with_all = ["cathode", "anode"], required_unless_present_all = ["cathode", "anode"])]
    couple: Option<String>,
    /// Cathode couple of a cell: an id, Ox/Red or a reduction half-reaction
    #[arg(long, requires = "anode")]
    cathode: Option<String>,
    /// Anode couple of a cell, written as a reduction (it runs in reverse)
    #[arg(long, requires = "cathode")]
    anode: Option<String>,
    #[command(flatten)]
    electrodes: ElectrodeArgs,
    /// Temperature for the cell voltage used in the energy (first order from dE°/dT), with its
    /// unit: 25C, 25°C, 298.15K; a bare number is kelvin and must be at least 200
    #[arg(long, default_value = "298.15K", value_parser = super::units::temperature)]
    temperature: f64,
    /// Mass basis of the cell figures: active (electrode materials), with-electrolyte
    /// (also consumed dissolved species and water) or all-reactants (gases too)
    #[arg(long, default_value = "active", value_parser = basis_arg)]
    basis: Basis,
    /// Density of a species in g/cm3 (SPECIES=G_PER_CM3), repeatable; replaces the built-in
    /// value from data/densities.toml
    #[arg(long = "density", value_name = "SPECIES=G_PER_CM3")]
    densities: Vec<String>,
    #[command(flatten)]
    table: TableArgs,
    /// Print JSON: {"materials": [...], "cell": {...} | null}
    #[arg(long)]
    json: bool,
}

fn basis_arg(text: &str) -> Result<Basis, String> {
    Basis::from_name(text).ok_or_else(|| {
        format!("basis must be active, with-electrolyte or all-reactants, not '{text}'")
    })
}

/// Reads `SPECIES=VALUE` into the built-in densities.
fn densities(given: &[String]) -> Result<Densities, Failure> {
    let mut densities = Densities::builtin();
    let given = super::units::species_numbers("--density", given).map_err(Failure::usage)?;
    for (species, value) in given {
        let name = species.ascii();
        if let Err(e) = densities.insert(species, value, "given".to_owned()) {
            return Err(Failure::usage(format!("--density {name}: {e}")));
        }
    }
    Ok(densities)
}

fn material_json(m: &MaterialCapacity) -> Value {
    json!({
        "species": m.species.ascii(),
        "molar_mass_g_per_mol": m.molar_mass_g_per_mol,
        "n": exact_integer_json(&m.electrons),
        "mAh_per_g": m.milliamp_hours_per_gram,
        // Extra fields; the four above are the stable schema.
        "formula_units": exact_integer_json(&m.formula_units),
        "side": m.side.name(),
        "g_per_Ah": m.grams_per_amp_hour,
        "density_g_per_cm3": m.density.as_ref().map(|d| d.grams_per_cm3),
        "density_source": m.density.as_ref().map(|d| d.source.clone()),
        "mAh_per_cm3": m.milliamp_hours_per_cm3,
    })
}

fn cell_json(c: &CellCapacity) -> Value {
    json!({
        "basis": c.basis.name(),
        "reaction": c.reaction.to_string(),
        "mass_g_per_mol": c.mass_g_per_mol,
        "n": exact_integer_json(&c.electrons),
        "Ah_per_kg": c.amp_hours_per_kg,
        "Wh_per_kg": c.watt_hours_per_kg,
        // Extra fields; the six above are the stable schema.
        "e_V": c.e_volts,
        "g_per_Ah": c.grams_per_amp_hour,
        "counted": c.shares.iter().filter(|s| s.counted).map(|s| s.species.ascii()).collect::<Vec<_>>(),
        "not_counted": c.shares.iter().filter(|s| !s.counted).map(|s| s.species.ascii()).collect::<Vec<_>>(),
        "Ah_per_L": c.amp_hours_per_litre,
        "Wh_per_L": c.watt_hours_per_litre,
        "missing_densities": c.missing_densities.iter().map(|s| s.ascii()).collect::<Vec<_>>(),
        "notes": c.notes,
    })
}

fn print_materials(out: &mut dyn Write, materials: &[MaterialCapacity]) -> io::Result<()> {
    writeln!(
        out,
        "{:<14} {:<15} {:>4} {:>11} {:>10} {:>9} {:>11}",
        "material", "", "n", "M g/mol", "mAh/g", "g/Ah", "mAh/cm3"
    )?;
    for m in materials {
        let n = if m.formula_units == 1.into() {
            m.electrons.to_string()
        } else {
            format!("{}/{}", m.electrons, m.formula_units)
        };
        writeln!(
            out,
            "{:<14} {:<15} {:>4} {:>11.3} {:>10.1} {:>9.3} {:>11}",
            m.species.unicode(),
            m.side.name(),
            n,
            m.molar_mass_g_per_mol,
            m.milliamp_hours_per_gram,
            m.grams_per_amp_hour,
            m.milliamp_hours_per_cm3
                .map_or_else(|| "-".to_owned(), |v| format!("{v:.0}"))
        )?;
        if m.assumed_solid {
            writeln!(
                out,
                "  note: {} has no state label: taken as a solid",
                m.species.ascii()
            )?;
        }
        if m.approximate_mass {
            writeln!(
                out,
                "  note: {} uses a mass number: its molar mass is approximate",
                m.species.ascii()
            )?;
        }
    }
    writeln!(
        out,
        "(mAh/g equals Ah/kg; n is electrons per formula unit; q = n·F/(3.6·M))"
    )
}

fn print_cell(out: &mut dyn Write, c: &CellCapacity) -> io::Result<()> {
    writeln!(
        out,
        "basis    {}: {}",
        c.basis.name(),
        c.basis.description()
    )?;
    for s in &c.shares {
        writeln!(
            out,
            "  {} {:<12} {:<18} {:>10.3} g  {}",
            if s.counted { "+" } else { " " },
            format!("{} {}", s.coefficient, s.species.unicode()),
            s.role.name(),
            s.grams,
            if s.counted { "counted" } else { "not counted" }
        )?;
    }
    writeln!(
        out,
        "mass     {:.3} g per mole of reaction (n = {})",
        c.mass_g_per_mol, c.electrons
    )?;
    writeln!(
        out,
        "capacity {:.1} Ah/kg  ({:.3} g/Ah)",
        c.amp_hours_per_kg, c.grams_per_amp_hour
    )?;
    writeln!(
        out,
        "energy   {:.0} Wh/kg  (at E = {:.4} V)",
        c.watt_hours_per_kg, c.e_volts
    )?;
    match (c.amp_hours_per_litre, c.watt_hours_per_litre) {
        (Some(ah), Some(wh)) => writeln!(out, "volume   {ah:.0} Ah/L, {wh:.0} Wh/L")?,
        _ => writeln!(
            out,
            "volume   no density for {} (give --density SPECIES=G_PER_CM3)",
            c.missing_densities
                .iter()
                .map(|s| s.ascii())
                .collect::<Vec<_>>()
                .join(", ")
        )?,
    }
    for note in &c.notes {
        writeln!(out, "note: {note}")?;
    }
    writeln!(
        out,
        "theoretical figures: no separator, case, current collector or unused electrolyte"
    )
}

pub fn run(args: &CapacityArgs, out: &mut dyn Write) -> io::Result<u8> {
    let densities = match densities(&args.densities) {
        Ok(d) => d,
        Err(failure) => return failure.report(out, args.json),
    };
    let table = match load_table(&args.table) {
        Ok(table) => table,
        Err(failure) => return failure.report(out, args.json),
    };
    if let Some(query) = &args.couple {
        // A typed half-reaction needs no potential for its capacity, so it need not be in the
        // table.
        let half = if is_reaction_text(query) {
            match parse_equation(query) {
                Ok(eq) => Reaction::from_equation(&eq),
                Err(e) => return Failure::from(&e).report(out, args.json),
            }
        } else {
            // Through the one lookup every command uses, so a couple no table lists is made
            // from formation data.
            match super::common::resolve(&table, query, None, args.electrodes.medium) {
                Ok(c) => c.reaction,
                Err(failure) => return failure.report(out, args.json),
            }
        };
        // An unbalanced half-reaction would give a wrong n, so a wrong capacity.
        if let Some(detail) = imbalance_text(&half) {
            return Failure::chemistry(format!(
                "'{query}' does not balance ({detail}); see couplet balance"
            ))
            .report(out, args.json);
        }
        let materials = match half_reaction_materials(&half, &densities) {
            Ok(m) => m,
            Err(e) => return Failure::from(&e).report(out, args.json),
        };
        if args.json {
            print_json(
                out,
                &json!({
                    "materials": materials.iter().map(material_json).collect::<Vec<_>>(),
                    "cell": Value::Null,
                }),
            )?;
        } else {
            writeln!(
                out,
                "half     {}",
                half.to_text(Style::Unicode, Arrow::Forward)
            )?;
            print_materials(out, &materials)?;
        }
        return Ok(EXIT_OK);
    }
    let scale = match scale_without_quotient(&args.table) {
        Ok(scale) => scale,
        Err(failure) => return failure.report(out, args.json),
    };
    let (Some(cathode), Some(anode)) = (&args.cathode, &args.anode) else {
        return Failure::usage("give a couple, or --cathode and --anode").report(out, args.json);
    };
    let cell = match build_cell(
        &table,
        &args
            .electrodes
            .cell_request(cathode, anode, args.temperature, &scale),
    ) {
        Ok(cell) => cell,
        Err(failure) => return failure.report(out, args.json),
    };
    if !cell.runs_as_written {
        return Failure::chemistry(format!(
            "E°cell = {:+.4} V: the reaction does not run as written and stores no energy; swap --cathode and --anode",
            cell.e0_volts
        ))
        .report(out, args.json);
    }
    let e_volts = cell
        .at_temperature
        .as_ref()
        .map_or(cell.e0_volts, |t| t.e0_volts);
    let figures = match cell_capacity(&cell.net, &cell.electrons, e_volts, args.basis, &densities) {
        Ok(f) => f,
        Err(e) => return Failure::from(&e).report(out, args.json),
    };
    let materials = cell_materials(&cell.net, &cell.electrons, &densities);
    if args.json {
        print_json(
            out,
            &json!({
                "materials": materials.iter().map(material_json).collect::<Vec<_>>(),
                "cell": cell_json(&figures),
                "caution": caution(&cell.net),
            }),
        )?;
        return Ok(EXIT_OK);
    }
    writeln!(
        out,
        "net      {}",
        cell.net.to_text(Style::Unicode, Arrow::Forward)
    )?;
    writeln!(out, "E°cell   {:+.4} V", cell.e0_volts)?;
    for note in &cell.notes {
        writeln!(out, "note: {note}")?;
    }
    if !materials.is_empty() {
        print_materials(out, &materials)?;
    }
    print_cell(out, &figures)?;
    if let Some(line) = caution(&cell.net) {
        writeln!(out, "{line}")?;
    }
    Ok(EXIT_OK)
}

//! `couplet capacity`: theoretical capacity of electrode materials and of a cell, with its
//! specific energy on a stated mass basis and volumetric figures where densities are known.

use super::common::{ElectrodeArgs, TableArgs, build_cell, load_table, scale_without_quotient};
use super::failure::Failure;
use super::{EXIT_OK, exact_integer_json, print_json};
use couplet::capacity::{
    Basis, CapacityError, CellCapacity, Densities, ElectrolyteCapacity, MaterialCapacity,
    cell_capacity, cell_materials, electrolyte_capacity, half_reaction_materials,
};
use couplet::cell::caution;
use couplet::figures::significant;
use couplet::notation::{Arrow, Style, parse_equation, parse_species};
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
    /// Flow cells: concentration of a side's active species in its electrolyte
    /// (SPECIES=MOL_PER_L, e.g. VO2+=1.6), repeatable, one per side; gives Ah/L and Wh/L
    #[arg(long = "electrolyte", value_name = "SPECIES=MOL_PER_L")]
    electrolytes: Vec<String>,
    #[command(flatten)]
    table: TableArgs,
    /// Print JSON: {"materials": [...], "cell": {...} | null, "electrolyte": {...} | null}
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

/// Reads `SPECIES=MOL_PER_L` pairs.
fn electrolytes(given: &[String]) -> Result<Vec<(couplet::notation::Species, f64)>, Failure> {
    given
        .iter()
        .map(|item| {
            let parsed = item.rsplit_once('=').and_then(|(name, value)| {
                let value: f64 = value.trim().parse().ok()?;
                (value.is_finite() && value > 0.0)
                    .then_some(())
                    .and_then(|_| Some((parse_species(name.trim()).ok()?, value)))
            });
            parsed.ok_or_else(|| {
                Failure::usage(format!(
                    "--electrolyte '{item}': expected SPECIES=MOL_PER_L with a positive concentration, e.g. VO2+=1.6"
                ))
            })
        })
        .collect()
}

fn electrolyte_json(e: &ElectrolyteCapacity) -> Value {
    json!({
        "sides": e.sides.iter().map(|s| json!({
            "species": s.species.ascii(),
            "half_reaction": s.half.to_string(),
            "mol_per_L": s.concentration_mol_per_litre,
            "electrons_per_mol": s.electrons_per_mol.to_string(),
            "Ah_per_L": s.amp_hours_per_litre,
            "Wh_per_L": s.watt_hours_per_litre,
        })).collect::<Vec<_>>(),
        "e_V": e.e_volts,
        "Ah_per_L_both_tanks": e.amp_hours_per_litre_both,
        "Wh_per_L_both_tanks": e.watt_hours_per_litre_both,
    })
}

fn print_electrolyte(out: &mut dyn Write, e: &ElectrolyteCapacity) -> io::Result<()> {
    for s in &e.sides {
        let energy = s
            .watt_hours_per_litre
            .map_or(String::new(), |wh| format!(", {wh:.1} Wh/L"));
        writeln!(
            out,
            "electrolyte {} at {} mol/L: {:.1} Ah/L{energy} of this side's electrolyte ({} e- per {}; q = c·n·F/3600)",
            s.species.unicode(),
            significant(s.concentration_mol_per_litre, 6),
            s.amp_hours_per_litre,
            s.electrons_per_mol,
            s.species.ascii()
        )?;
    }
    writeln!(
        out,
        "theoretical: every active species converted between its charged and discharged form; no crossover, side reactions or unused electrolyte"
    )?;
    if let Some(ah) = e.amp_hours_per_litre_both {
        let energy = e
            .watt_hours_per_litre_both
            .map_or(String::new(), |wh| format!(", {wh:.1} Wh/L"));
        writeln!(
            out,
            "both tanks  {ah:.1} Ah/L{energy} of the two electrolytes together (tanks sized to equal charge{})",
            e.e_volts
                .map_or(String::new(), |v| format!("; at E = {v:.4} V"))
        )?;
    }
    Ok(())
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
    // As wide as the longest name (`Li(Ni₀.₈Co₀.₁Mn₀.₁)O₂`), so the columns stay in line.
    let width = materials
        .iter()
        .map(|m| m.species.unicode().chars().count())
        .max()
        .unwrap_or(0)
        .max(14);
    writeln!(
        out,
        "{:<width$} {:<15} {:>4} {:>11} {:>10} {:>9} {:>11}",
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
            "{:<width$} {:<15} {:>4} {:>11.3} {:>10.1} {:>9.3} {:>11}",
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

/// The electrolyte figures when concentrations were given.
fn electrolyte_figures(
    given: &[(couplet::notation::Species, f64)],
    halves: &[&Reaction],
    e_volts: Option<f64>,
) -> Result<Option<ElectrolyteCapacity>, Failure> {
    if given.is_empty() {
        return Ok(None);
    }
    electrolyte_capacity(halves, given, e_volts)
        .map(Some)
        .map_err(|e| Failure::from(&e))
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
    let given = match electrolytes(&args.electrolytes) {
        Ok(given) => given,
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
        let flow = match electrolyte_figures(&given, &[&half], None) {
            Ok(flow) => flow,
            Err(failure) => return failure.report(out, args.json),
        };
        // A flow electrode has no solid material: with a concentration, that is no error.
        let materials = match (half_reaction_materials(&half, &densities), &flow) {
            (Ok(m), _) => m,
            (Err(CapacityError::NoMaterials(_)), Some(_)) => Vec::new(),
            (Err(e), _) => return Failure::from(&e).report(out, args.json),
        };
        if args.json {
            print_json(
                out,
                &json!({
                    "materials": materials.iter().map(material_json).collect::<Vec<_>>(),
                    "cell": Value::Null,
                    "electrolyte": flow.as_ref().map(electrolyte_json),
                }),
            )?;
        } else {
            writeln!(
                out,
                "half     {}",
                half.to_text(Style::Unicode, Arrow::Forward)
            )?;
            if !materials.is_empty() {
                print_materials(out, &materials)?;
            }
            if let Some(flow) = &flow {
                print_electrolyte(out, flow)?;
            }
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
    let flow = match electrolyte_figures(
        &given,
        &[&cell.cathode.reaction, &cell.anode.reaction],
        Some(e_volts),
    ) {
        Ok(flow) => flow,
        Err(failure) => return failure.report(out, args.json),
    };
    // A flow cell has nothing to weigh on the active basis: with concentrations given, the
    // volumetric figures stand on their own.
    let figures = match cell_capacity(&cell.net, &cell.electrons, e_volts, args.basis, &densities) {
        Ok(f) => Some(f),
        Err(CapacityError::NothingOnBasis { .. }) if flow.is_some() => None,
        Err(e) => return Failure::from(&e).report(out, args.json),
    };
    let materials = cell_materials(&cell.net, &cell.electrons, &densities);
    if args.json {
        print_json(
            out,
            &json!({
                "materials": materials.iter().map(material_json).collect::<Vec<_>>(),
                "cell": figures.as_ref().map(cell_json),
                "electrolyte": flow.as_ref().map(electrolyte_json),
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
    if let Some(figures) = &figures {
        print_cell(out, figures)?;
    }
    if let Some(flow) = &flow {
        print_electrolyte(out, flow)?;
    }
    if let Some(line) = caution(&cell.net) {
        writeln!(out, "{line}")?;
    }
    Ok(EXIT_OK)
}

//! `couplet stability`: the potential–pH predominance diagram of an element from formation data,
//! as text (regions, boundary equations and lines, triple points), JSON, CSV and SVG.

use super::common::{load_formation, write_outputs};
use super::failure::Failure;
use super::{EXIT_FINDINGS, EXIT_OK, EXIT_USAGE, exact_json, print_json};
use couplet::constants::{STANDARD_TEMPERATURE_KELVIN, nernst_slope_volts_per_decade};
use couplet::elements::Element;
use couplet::figures::significant;
use couplet::notation::{Species, parse_species};
use couplet::output::diagram::diagram_svg;
use couplet::predominance::{
    Axis, Conditions, Diagram, DiagramError, Line, Request, TemperatureRoute, Window, diagram,
    reaction_text,
};
use couplet::scale::Scale;
use serde_json::{Value, json};
use std::fmt::Write as _;
use std::io::{self, Write};
use std::path::PathBuf;

#[derive(clap::Args)]
pub struct StabilityArgs {
    /// The element (Fe, Zn, Cu, Pb, Mn, Ni, Cr, V, …)
    element: String,
    /// Activity of every dissolved species of the element (1e-6 is the usual corrosion
    /// convention)
    #[arg(long, default_value = "1e-6")]
    activity: f64,
    /// Temperature with its unit: 25C, 353.15K
    #[arg(long, default_value = "298.15K", value_parser = super::units::temperature)]
    temperature: f64,
    /// Lowest pH of the window
    #[arg(long = "ph-min", default_value_t = -2.0, allow_hyphen_values = true, value_parser = super::units::ph)]
    ph_min: f64,
    /// Highest pH of the window
    #[arg(long = "ph-max", default_value_t = 16.0, allow_hyphen_values = true, value_parser = super::units::ph)]
    ph_max: f64,
    /// Lowest potential of the window in V (on --scale rhe, vs RHE; else vs SHE)
    #[arg(long = "e-min", default_value_t = -2.0, allow_hyphen_values = true, value_parser = super::units::volts)]
    e_min: f64,
    /// Highest potential of the window in V
    #[arg(long = "e-max", default_value_t = 2.4, allow_hyphen_values = true, value_parser = super::units::volts)]
    e_max: f64,
    /// A second potential axis on a reference electrode (sce, ag-agcl-sat-kcl, …), or rhe to
    /// draw the whole diagram against the reversible hydrogen electrode
    #[arg(long, value_name = "SCALE")]
    scale: Option<String>,
    /// Away from 25 °C, keep species whose data have neither ΔfH° nor S° at their 25 °C ΔfG°
    /// (by default they are left out: their ΔfG° at T is unknown)
    #[arg(long = "hold-unknown")]
    hold_unknown: bool,
    /// Include gaseous species of the element
    #[arg(long)]
    gases: bool,
    /// Pressure of those gases in bar
    #[arg(long = "gas-pressure", default_value_t = 1.0, requires = "gases")]
    gas_pressure: f64,
    /// Leave a species out (e.g. a metastable hydroxide: 'Fe(OH)2^+'); a state label limits it
    /// to that phase; repeatable
    #[arg(long = "exclude", value_name = "SPECIES")]
    exclude: Vec<String>,
    /// Also read formation data (the CSV layout of data/formation.csv), e.g. species of your own
    /// with their ΔfG°; repeatable
    #[arg(long = "formation", value_name = "FILE")]
    formation: Vec<PathBuf>,
    /// Write the diagram as SVG
    #[arg(long, value_name = "FILE")]
    svg: Option<PathBuf>,
    /// Write region vertices, boundaries and triple points as CSV
    #[arg(long, value_name = "FILE")]
    csv: Option<PathBuf>,
    /// Print JSON
    #[arg(long)]
    json: bool,
}

fn failure(error: &DiagramError) -> Failure {
    match error {
        DiagramError::EmptyWindow(_)
        | DiagramError::Conditions(_)
        | DiagramError::UnknownExclusion { .. } => Failure::usage(error.to_string()),
        _ => Failure::new("chemistry", EXIT_FINDINGS, error.to_string()),
    }
}

/// The diagram's own axis and the second axis, from `--scale`.
fn axes(name: Option<&str>, temperature: f64) -> Result<(Axis, Option<Axis>), Failure> {
    let Some(name) = name else {
        return Ok((Axis::she(), None));
    };
    if name.eq_ignore_ascii_case("rhe") {
        let axis = Axis {
            label: "RHE".to_owned(),
            offset_volts: 0.0,
            volts_per_ph: nernst_slope_volts_per_decade(temperature),
        };
        return Ok((axis, None));
    }
    match Scale::from_name(name, None).map_err(|e| Failure::usage(e.to_string()))? {
        Scale::She => Ok((Axis::she(), None)),
        scale @ Scale::Electrode(_) => Ok((
            Axis::she(),
            Some(Axis {
                label: scale.label(),
                offset_volts: scale.from_she_at(0.0, temperature),
                volts_per_ph: 0.0,
            }),
        )),
        Scale::Rhe { .. } => unreachable!("rhe is handled above"),
    }
}

pub fn run(args: &StabilityArgs, out: &mut dyn Write) -> io::Result<u8> {
    match build(args) {
        Ok((diagram, second)) => report(args, &diagram, second.as_ref(), out),
        Err(failure) => failure.report(out, args.json),
    }
}

fn build(args: &StabilityArgs) -> Result<(Diagram, Option<Axis>), Failure> {
    let element = Element::from_symbol(args.element.trim()).ok_or_else(|| {
        Failure::new(
            "unknown_element",
            EXIT_USAGE,
            format!(
                "'{}' is no element symbol (write Fe, Zn, Cu, …)",
                args.element
            ),
        )
    })?;
    let data = load_formation(&args.formation)?;
    let exclude = args
        .exclude
        .iter()
        .map(|text| {
            parse_species(text)
                .map_err(|e| Failure::usage(format!("--exclude '{text}': {}", e.message)))
        })
        .collect::<Result<Vec<Species>, Failure>>()?;
    let (axis, second) = axes(args.scale.as_deref(), args.temperature)?;
    let request = Request {
        element,
        conditions: Conditions {
            activity: args.activity,
            gas_pressure_bar: args.gases.then_some(args.gas_pressure),
            temperature_kelvin: args.temperature,
            hold_without_entropy: args.hold_unknown,
        },
        window: Window {
            ph: (args.ph_min, args.ph_max),
            e_volts: (args.e_min, args.e_max),
            axis,
        },
        exclude,
        data,
    };
    let diagram = diagram(&request).map_err(|e| failure(&e))?;
    Ok((diagram, second))
}

fn report(
    args: &StabilityArgs,
    diagram: &Diagram,
    second: Option<&Axis>,
    out: &mut dyn Write,
) -> io::Result<u8> {
    // Render everything before writing anything.
    let svg = args
        .svg
        .as_ref()
        .map(|_| diagram_svg(diagram, second, &caption(diagram)));
    let csv = args.csv.as_ref().map(|_| csv_of(diagram, second));
    if let Err(failure) = write_outputs(&[(args.svg.as_ref(), svg), (args.csv.as_ref(), csv)]) {
        return failure.report(out, args.json);
    }
    if args.json {
        print_json(out, &json_of(diagram, second))?;
    } else {
        out.write_all(text_of(diagram, second).as_bytes())?;
    }
    Ok(EXIT_OK)
}

fn celsius(kelvin: f64) -> String {
    significant(kelvin - 273.15, 5)
}

fn conditions_line(d: &Diagram) -> String {
    let c = &d.conditions;
    let gases = match c.gas_pressure_bar {
        Some(p) => format!("gases at {} bar", significant(p, 4)),
        None => "gases left out".to_owned(),
    };
    format!(
        "{el} species dissolved at activity {} each (1e-6 is the usual corrosion convention, common practice); solids pure; a(H2O) = 1; {gases}; {} K ({} °C)",
        significant(c.activity, 4),
        significant(c.temperature_kelvin, 6),
        celsius(c.temperature_kelvin),
        el = d.element.symbol(),
    )
}

fn caption(d: &Diagram) -> Vec<String> {
    let mut lines = vec![
        format!("Conditions: {}.", conditions_line(d)),
        "Dashed: the water lines 2 H⁺ + 2 e⁻ ⇌ H₂ and O₂ + 4 H⁺ + 4 e⁻ ⇌ 2 H₂O at 1 bar; water is stable between them. Blue: dissolved species; sand: solids; green: the element.".to_owned(),
    ];
    let keys: Vec<&str> = d.sources.iter().map(|(k, _)| k.as_str()).collect();
    let citation = d
        .sources
        .iter()
        .find(|(k, _)| k != "by-definition")
        .map(|(_, c)| c.split(", '").next().unwrap_or(c).to_owned())
        .unwrap_or_default();
    lines.push(format!("Data: {citation} [{}].", keys.join(", ")));
    lines.extend(d.notes.iter().map(|n| format!("Note: {n}.")));
    let absent: Vec<String> = d.absent().iter().map(|&i| d.species[i].label()).collect();
    if !absent.is_empty() {
        lines.push(format!(
            "Also considered, never predominant here: {}.",
            absent.join(", ")
        ));
    }
    if let Some(caution) = &d.caution {
        lines.push(capitalise(caution));
    }
    lines
}

fn capitalise(text: &str) -> String {
    let mut chars = text.chars();
    match chars.next() {
        Some(first) => first.to_uppercase().collect::<String>() + chars.as_str(),
        None => String::new(),
    }
}

fn line_text(line: &Line) -> String {
    match *line {
        Line::Sloped {
            intercept_volts,
            volts_per_ph,
        } => {
            if volts_per_ph == 0.0 {
                format!("E = {:.4} V", intercept_volts)
            } else {
                let sign = if volts_per_ph < 0.0 { '−' } else { '+' };
                format!(
                    "E = {:.4} {sign} {:.4}·pH V",
                    intercept_volts,
                    volts_per_ph.abs()
                )
            }
        }
        Line::Vertical { ph } => format!("pH = {ph:.3}"),
    }
}

/// A line vs SHE restated on another axis (constant offset or RHE).
fn on_axis(line: &Line, axis: &Axis) -> Line {
    match *line {
        Line::Sloped {
            intercept_volts,
            volts_per_ph,
        } => Line::Sloped {
            intercept_volts: intercept_volts + axis.offset_volts,
            volts_per_ph: volts_per_ph + axis.volts_per_ph,
        },
        vertical => vertical,
    }
}

fn text_of(d: &Diagram, second: Option<&Axis>) -> String {
    let mut out = String::new();
    let axis = &d.window.axis;
    let _ = writeln!(
        out,
        "potential–pH predominance diagram of {}",
        d.element.symbol()
    );
    let _ = writeln!(out, "conditions  {}", conditions_line(d));
    let _ = writeln!(
        out,
        "window      pH {} to {}, E {} to {} V vs {}",
        d.window.ph.0, d.window.ph.1, d.window.e_volts.0, d.window.e_volts.1, axis.label
    );
    let _ = writeln!(
        out,
        "\nspecies (free energy per {} atom, ΔfG° at T)",
        d.element.symbol()
    );
    for c in &d.species {
        let route = match c.route {
            TemperatureRoute::Tabulated => "",
            TemperatureRoute::FromEnthalpy => " (via ΔfH°)",
            TemperatureRoute::FromEntropies => " (via S°)",
            TemperatureRoute::Held => " (held at 298.15 K)",
        };
        let _ = writeln!(
            out,
            "  {:<22} {:>5}  ΔfG° {:>9.2} kJ/mol{route}  [{}] {} line {}",
            c.label(),
            couplet::oxidation::signed_text(&c.oxidation_number),
            c.dfg_joules_per_mol / 1000.0,
            c.row.table,
            c.row.origin,
            c.row.line
        );
    }
    let _ = writeln!(out, "\nregions (vertices pH, E vs SHE)");
    for r in &d.regions {
        let vertices: Vec<String> = r
            .polygon
            .vertices
            .iter()
            .map(|(ph, e)| format!("({:.2}, {:.3})", ph, e))
            .collect();
        let _ = writeln!(
            out,
            "  {:<22} {}",
            d.species[r.species].label(),
            vertices.join(" ")
        );
    }
    let absent = d.absent();
    if !absent.is_empty() {
        let names: Vec<String> = absent.iter().map(|&i| d.species[i].label()).collect();
        let _ = writeln!(
            out,
            "  never predominant in the window: {}",
            names.join(", ")
        );
    }
    let _ = writeln!(
        out,
        "\nboundaries (low | high; the reaction balanced by couplet)"
    );
    for b in &d.boundaries {
        let (low, high) = b.species;
        let reaction = b
            .reaction
            .as_ref()
            .map(reaction_text)
            .unwrap_or_else(|| "(could not be balanced)".to_owned());
        let mut line = line_text(&b.line);
        if axis.label != "SHE" {
            let _ = write!(
                line,
                " vs SHE; {} vs {}",
                line_text(&on_axis(&b.line, axis)),
                axis.label
            );
        }
        if let Some(s) = second {
            let _ = write!(line, "; {} vs {}", line_text(&on_axis(&b.line, s)), s.label);
        }
        let (from, to) = (b.ends[0].0.min(b.ends[1].0), b.ends[0].0.max(b.ends[1].0));
        let span = if (to - from).abs() < 1e-9 {
            format!(
                "E {:.3} to {:.3} V",
                b.ends[0].1.min(b.ends[1].1),
                b.ends[0].1.max(b.ends[1].1)
            )
        } else {
            format!("pH {from:.2} to {to:.2}")
        };
        let _ = writeln!(
            out,
            "  {} | {}\n      {reaction}\n      {line}   ({span})",
            d.species[low].label(),
            d.species[high].label()
        );
    }
    let _ = writeln!(out, "\ntriple points (pH, E vs SHE)");
    if d.triple_points.is_empty() {
        let _ = writeln!(out, "  none inside the window");
    }
    for t in &d.triple_points {
        let names: Vec<String> = t.species.iter().map(|&i| d.species[i].label()).collect();
        let _ = writeln!(
            out,
            "  pH {:>6.3}  E {:>7.4} V   {}",
            t.ph,
            t.e_volts,
            names.join(" / ")
        );
    }
    let _ = writeln!(out, "\nwater (1 bar)");
    for (name, line) in [("H2O/H2", &d.water.hydrogen), ("O2/H2O", &d.water.oxygen)] {
        let mut text = line_text(line);
        if axis.label != "SHE" {
            let _ = write!(
                text,
                " vs SHE; {} vs {}",
                line_text(&on_axis(line, axis)),
                axis.label
            );
        }
        if let Some(s) = second {
            let _ = write!(text, "; {} vs {}", line_text(&on_axis(line, s)), s.label);
        }
        let _ = writeln!(out, "  {name}  {text}");
    }
    if !d.left_out.is_empty() {
        let _ = writeln!(out, "\nleft out");
        // Rows left out for the same reason share one line.
        let mut reasons: Vec<(&str, Vec<&str>)> = Vec::new();
        for l in &d.left_out {
            match reasons.iter_mut().find(|(r, _)| *r == l.reason) {
                Some((_, labels)) => labels.push(&l.label),
                None => reasons.push((&l.reason, vec![&l.label])),
            }
        }
        for (reason, labels) in reasons {
            let _ = writeln!(out, "  {}: {reason}", labels.join(", "));
        }
    }
    for note in &d.notes {
        let _ = writeln!(out, "note: {note}");
    }
    let _ = writeln!(out, "\nsources");
    for (key, citation) in &d.sources {
        let _ = writeln!(out, "  [{key}] {citation}");
    }
    if d.conditions.temperature_kelvin != STANDARD_TEMPERATURE_KELVIN {
        let _ = writeln!(out, "(figures at {} K)", d.conditions.temperature_kelvin);
    }
    if let Some(caution) = &d.caution {
        let _ = writeln!(out, "{caution}");
    }
    out
}

fn line_json(line: &Line) -> Value {
    match *line {
        Line::Sloped {
            intercept_volts,
            volts_per_ph,
        } => {
            json!({"kind": "sloped", "intercept_V": intercept_volts, "slope_V_per_pH": volts_per_ph})
        }
        Line::Vertical { ph } => json!({"kind": "vertical", "pH": ph}),
    }
}

fn json_of(d: &Diagram, second: Option<&Axis>) -> Value {
    let name = |i: usize| d.species[i].species.ascii();
    let axis_json = |a: &Axis| json!({"label": a.label, "offset_V": a.offset_volts, "V_per_pH": a.volts_per_ph});
    json!({
        "element": d.element.symbol(),
        "conditions": {
            "activity": d.conditions.activity,
            "gas_pressure_bar": d.conditions.gas_pressure_bar,
            "temperature_K": d.conditions.temperature_kelvin,
        },
        "window": {
            "pH": [d.window.ph.0, d.window.ph.1],
            "E_V": [d.window.e_volts.0, d.window.e_volts.1],
            "axis": axis_json(&d.window.axis),
            "second_axis": second.map(axis_json),
        },
        "species": d.species.iter().map(|c| json!({
            "species": c.species.ascii(),
            "label": c.label(),
            "phase": c.row.phase.label(),
            "atoms": c.atoms,
            "oxidation_number": exact_json(&c.oxidation_number),
            "dfg_kJ_per_mol": c.dfg_joules_per_mol / 1000.0,
            "energy_per_atom": {"constant_V": c.energy.constant, "per_pH_V": c.energy.per_ph, "per_V": c.energy.per_volt},
            "source": c.row.citation(),
        })).collect::<Vec<_>>(),
        "regions": d.regions.iter().map(|r| json!({
            "species": name(r.species),
            "vertices": r.polygon.vertices.iter().map(|(ph, e)| json!([ph, e])).collect::<Vec<_>>(),
        })).collect::<Vec<_>>(),
        "never_predominant": d.absent().into_iter().map(name).collect::<Vec<_>>(),
        "boundaries": d.boundaries.iter().map(|b| json!({
            "species": [name(b.species.0), name(b.species.1)],
            "reaction": b.reaction.as_ref().map(|r| r.to_string()),
            "line": line_json(&b.line),
            "ends": b.ends.iter().map(|(ph, e)| json!([ph, e])).collect::<Vec<_>>(),
        })).collect::<Vec<_>>(),
        "triple_points": d.triple_points.iter().map(|t| json!({
            "species": t.species.iter().map(|&i| name(i)).collect::<Vec<_>>(),
            "pH": t.ph,
            "E_V": t.e_volts,
        })).collect::<Vec<_>>(),
        "water": {"hydrogen": line_json(&d.water.hydrogen), "oxygen": line_json(&d.water.oxygen)},
        "left_out": d.left_out.iter().map(|l| json!({"species": l.label, "reason": l.reason})).collect::<Vec<_>>(),
        "notes": d.notes,
        "sources": d.sources.iter().map(|(k, c)| json!({"key": k, "citation": c})).collect::<Vec<_>>(),
        "caution": d.caution,
    })
}

fn csv_field(text: &str) -> String {
    if text.contains([',', '"', '\n']) {
        format!("\"{}\"", text.replace('"', "\"\""))
    } else {
        text.to_owned()
    }
}

fn csv_of(d: &Diagram, second: Option<&Axis>) -> String {
    let axis = second.unwrap_or(&d.window.axis);
    let mut out = format!(
        "record,species,index,pH,E_V_vs_SHE,E_V_vs_{},intercept_V_vs_SHE,slope_V_per_pH,reaction\n",
        axis.label.to_lowercase()
    );
    let point = |ph: f64, e: f64| format!("{ph},{e},{}", axis.from_she(ph, e));
    for r in &d.regions {
        for (k, &(ph, e)) in r.polygon.vertices.iter().enumerate() {
            let _ = writeln!(
                out,
                "vertex,{},{k},{},,,",
                csv_field(&d.species[r.species].species.ascii()),
                point(ph, e)
            );
        }
    }
    for b in &d.boundaries {
        let pair = format!(
            "{} | {}",
            d.species[b.species.0].species.ascii(),
            d.species[b.species.1].species.ascii()
        );
        let (intercept, slope) = match b.line {
            Line::Sloped {
                intercept_volts,
                volts_per_ph,
            } => (intercept_volts.to_string(), volts_per_ph.to_string()),
            Line::Vertical { .. } => (String::new(), String::new()),
        };
        let reaction = b
            .reaction
            .as_ref()
            .map(|r| r.to_string())
            .unwrap_or_default();
        for (k, &(ph, e)) in b.ends.iter().enumerate() {
            let _ = writeln!(
                out,
                "boundary_end,{},{k},{},{intercept},{slope},{}",
                csv_field(&pair),
                point(ph, e),
                csv_field(&reaction)
            );
        }
    }
    for (k, t) in d.triple_points.iter().enumerate() {
        let names: Vec<String> = t
            .species
            .iter()
            .map(|&i| d.species[i].species.ascii())
            .collect();
        let _ = writeln!(
            out,
            "triple_point,{},{k},{},,,",
            csv_field(&names.join(" | ")),
            point(t.ph, t.e_volts)
        );
    }
    out
}

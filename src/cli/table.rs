//! `couplet table`: list, search and show couples of the potential table.

use super::common::{TableArgs, load_table, scale_without_quotient};
use super::failure::Failure;
use super::{EXIT_FINDINGS, EXIT_OK, print_json};
use couplet::scale::Scale;
use couplet::table::{Couple, element_named};
use serde_json::json;
use std::fmt::Write as _;
use std::io::{self, Write};

#[derive(clap::Args)]
pub struct TableCommandArgs {
    /// An id, a couple (MnO4-/Mn2+), a half-reaction, an element (Mn, zinc) or words; all
    /// couples when left out
    query: Option<String>,
    /// Only couples with a species holding this element (symbol or name)
    #[arg(long)]
    element: Option<String>,
    #[command(flatten)]
    table: TableArgs,
    /// Print JSON: [{"id", "reaction", "e0_V", "dedt_mV_per_K", "source", "confirmed_by",
    /// "verified", "also_published": [{"e0_V", "dedt_mV_per_K", "source", "note"}],
    /// "e0_spread_V"}] (e0_V always vs SHE; the spread is highest minus lowest published E°,
    /// null with one value)
    #[arg(long)]
    json: bool,
}

pub fn run(args: &TableCommandArgs, out: &mut dyn Write) -> io::Result<u8> {
    let table = match load_table(&args.table) {
        Ok(table) => table,
        Err(failure) => return failure.report(out, args.json),
    };
    let scale = match scale_without_quotient(&args.table) {
        Ok(scale) => scale,
        Err(failure) => return failure.report(out, args.json),
    };
    let mut found: Vec<&Couple> = match &args.query {
        Some(query) => table.matching(query),
        None => table.couples().iter().collect(),
    };
    if let Some(name) = &args.element {
        let Some(element) = element_named(name) else {
            return Failure::usage(format!("no element is called '{name}'")).report(out, args.json);
        };
        found.retain(|c| c.contains_element(element));
    }
    if args.json {
        let rows: Vec<_> = found
            .iter()
            .map(|c| {
                json!({
                    "id": c.id,
                    "reaction": c.reaction.to_string(),
                    "e0_V": c.e0_volts,
                    "dedt_mV_per_K": c.dedt_millivolts_per_kelvin,
                    "source": c.source,
                    "confirmed_by": c.confirmed_by,
                    "verified": c.verified,
                    "also_published": c.also_published.iter().map(|p| json!({
                        "e0_V": p.e0_volts,
                        "dedt_mV_per_K": p.dedt_millivolts_per_kelvin,
                        "source": p.source,
                        "note": p.note,
                    })).collect::<Vec<_>>(),
                    "e0_spread_V": c.e0_spread().map(|s| s.width_volts()),
                })
            })
            .collect();
        print_json(out, &serde_json::Value::Array(rows))?;
        return Ok(if found.is_empty() {
            EXIT_FINDINGS
        } else {
            EXIT_OK
        });
    }
    if found.is_empty() {
        let hints = args
            .query
            .as_deref()
            .map(|q| table.suggestions(q))
            .unwrap_or_default();
        if hints.is_empty() {
            say!("no couple fits; try an element name or symbol, or `couplet table` for all");
        } else {
            say!("no couple fits; did you mean: {}?", hints.join(", "));
        }
        if let Some(query) = args.query.as_deref()
            && let Ok(found) =
                couplet::thermo::couple_from_data(query, None, super::common::formation_data())
        {
            say!(
                "formation data give {}: E° {} V vs SHE (couplet thermo '{query}' shows how)",
                found.couple.reaction,
                couplet::figures::significant(found.couple.e0_volts, 4)
            );
        }
        return Ok(EXIT_FINDINGS);
    }
    let mut text = String::new();
    let _ = writeln!(
        text,
        "{:<26} {:>9}  {:>8}  {:>6}  {:<7}  {:<10}  reaction",
        "id",
        // On RHE the column is each couple's potential at the scale's pH, not a standard one.
        if matches!(scale, Scale::Rhe { .. }) {
            "E(pH)/V"
        } else {
            "E°/V"
        },
        "dE/dT",
        "spread",
        "medium",
        "value"
    );
    for c in &found {
        let _ = writeln!(
            text,
            "{:<26} {:>9.4}  {:>8}  {:>6}  {:<7}  {:<10}  {}",
            c.id.as_deref().unwrap_or("(no id)"),
            scale.couple_potential(&c.reaction, c.e0_volts),
            c.dedt_millivolts_per_kelvin
                .map_or("—".to_owned(), |d| format!(
                    "{:.3}",
                    scale.dedt_millivolts_per_kelvin(d).unwrap_or(d)
                )),
            c.e0_spread().map_or("—".to_owned(), |s| format!(
                "{:.0}",
                s.width_volts() * 1000.0
            )),
            c.medium.name(),
            value_status(c),
            c.reaction
        );
    }
    if found.len() <= 3 {
        for c in &found {
            let _ = writeln!(text, "\n{}", c.label());
            let source = c.source.as_deref().unwrap_or("none given");
            let _ = writeln!(text, "  source: {source}");
            if let Some(note) = &c.note {
                let _ = writeln!(text, "  note:   {note}");
            }
            if let Some(confirmation) = &c.confirmed_by {
                let _ = writeln!(text, "  confirmed by: {confirmation}");
            }
            if let Some(spread) = c.e0_spread() {
                let _ = writeln!(
                    text,
                    "  published values: {} from {:.4} to {:.4} V vs SHE (spread {:.0} mV); the one above is the default",
                    spread.values,
                    spread.lowest_volts,
                    spread.highest_volts,
                    spread.width_volts() * 1000.0
                );
                for p in &c.also_published {
                    let dedt = p
                        .dedt_millivolts_per_kelvin
                        .map_or(String::new(), |d| format!(", dE/dT {d:.3} mV/K"));
                    let _ = writeln!(text, "    {:.4} V{dedt}: {}", p.e0_volts, p.source);
                    if let Some(note) = &p.note {
                        let _ = writeln!(text, "      {note}");
                    }
                }
            }
            if !c.verified {
                let _ = writeln!(
                    text,
                    "  UNVERIFIED: no read source confirms this value; do not rely on it"
                );
            }
            let _ = writeln!(text, "  from:   {}", c.origin);
        }
    }
    let _ = writeln!(
        text,
        "\n{} couple(s); {} in V vs {} at 298.15 K{}, dE/dT in mV/K {}",
        found.len(),
        if matches!(scale, Scale::Rhe { .. }) {
            "E(pH)"
        } else {
            "E°"
        },
        scale.label(),
        super::common::rhe_meaning(&scale),
        dedt_basis(&scale)
    );
    if found.iter().any(|c| c.e0_spread().is_some()) {
        let _ = writeln!(
            text,
            "spread: highest minus lowest E° among the values compilations publish for the couple, mV (the default is chosen by the rule in data/potentials.toml)"
        );
    }
    let unverified = found.iter().filter(|c| !c.verified).count();
    if found.iter().any(|c| c.confirmed_by.is_some()) {
        let _ = writeln!(
            text,
            "value \"confirmed\": a second source, read, gives the same value (confirmed_by)"
        );
    }
    if unverified > 0 {
        let _ = writeln!(
            text,
            "value \"unverified\": no read source confirms it ({unverified} of {}); do not rely on it (couplet check --refuse-unverified refuses such entries)",
            found.len()
        );
    }
    out.write_all(text.as_bytes())?;
    Ok(EXIT_OK)
}

/// The `value` column: `unverified` for a couple marked `verified = false`, `confirmed` for
/// one a second source confirms, blank otherwise.
fn value_status(couple: &Couple) -> &'static str {
    match (couple.verified, &couple.confirmed_by) {
        (false, _) => "unverified",
        (true, Some(_)) => "confirmed",
        (true, None) => "",
    }
}

/// Which scale the dE/dT column is on.
fn dedt_basis(scale: &Scale) -> String {
    match (scale, scale.dedt_millivolts_per_kelvin(0.0)) {
        (Scale::She, _) => "vs SHE".to_owned(),
        (_, Some(_)) => format!("vs {} (its own published dE/dT subtracted)", scale.label()),
        (Scale::Rhe { .. }, None) => {
            "still vs SHE (the RHE's coefficient depends on the solution)".to_owned()
        }
        (_, None) => format!(
            "still vs SHE (data/reference_electrodes.toml gives no dE/dT for {})",
            scale.label()
        ),
    }
}

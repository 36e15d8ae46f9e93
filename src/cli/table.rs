//! `couplet table`: list, search and show couples of the potential table.

use super::common::{TableArgs, load_table, scale};
use super::{EXIT_FINDINGS, EXIT_OK, EXIT_USAGE, print_json};
use couplet::table::{Couple, element_named};
use serde_json::json;
use std::fmt::Write as _;

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
    /// Print JSON: [{"id", "reaction", "e0_V", "dedt_mV_per_K", "source"}] (e0_V always vs SHE)
    #[arg(long)]
    json: bool,
}

pub fn run(args: &TableCommandArgs) -> u8 {
    let table = match load_table(&args.table) {
        Ok(table) => table,
        Err(status) => return status,
    };
    let scale = match scale(&args.table) {
        Ok(scale) => scale,
        Err(status) => return status,
    };
    let mut found: Vec<&Couple> = match &args.query {
        Some(query) => table.matching(query),
        None => table.couples().iter().collect(),
    };
    if let Some(name) = &args.element {
        let Some(element) = element_named(name) else {
            eprintln!("error: no element is called '{name}'");
            return EXIT_USAGE;
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
                })
            })
            .collect();
        print_json(&serde_json::Value::Array(rows));
        return if found.is_empty() {
            EXIT_FINDINGS
        } else {
            EXIT_OK
        };
    }
    if found.is_empty() {
        let hints = args
            .query
            .as_deref()
            .map(|q| table.suggestions(q))
            .unwrap_or_default();
        if !hints.is_empty() {
            eprintln!("no couple fits; did you mean: {}?", hints.join(", "));
        } else {
            eprintln!("no couple fits; try an element name or symbol, or `couplet table` for all");
        }
        return EXIT_FINDINGS;
    }
    let mut out = String::new();
    let _ = writeln!(
        out,
        "{:<26} {:>9}  {:>8}  {:<7}  reaction",
        "id", "E°/V", "dE/dT", "medium"
    );
    for c in &found {
        let _ = writeln!(
            out,
            "{:<26} {:>9.4}  {:>8}  {:<7}  {}",
            c.id.as_deref().unwrap_or("(no id)"),
            scale.from_she(c.e0_volts),
            c.dedt_millivolts_per_kelvin
                .map_or("—".to_owned(), |d| format!("{d:.3}")),
            c.medium.name(),
            c.reaction
        );
    }
    if found.len() <= 3 {
        for c in &found {
            let _ = writeln!(out, "\n{}", c.label());
            let source = c.source.as_deref().unwrap_or("none given");
            let _ = writeln!(out, "  source: {source}");
            if let Some(note) = &c.note {
                let _ = writeln!(out, "  note:   {note}");
            }
            let _ = writeln!(out, "  from:   {}", c.origin);
        }
    }
    let _ = writeln!(
        out,
        "\n{} couple(s); E° in V vs {} at 298.15 K, dE/dT in mV/K",
        found.len(),
        scale.label()
    );
    print_quietly(&out);
    EXIT_OK
}

/// Writes to standard output; a closed pipe (`| head`) ends the output quietly.
fn print_quietly(text: &str) {
    use std::io::Write;
    let _ = std::io::stdout().lock().write_all(text.as_bytes());
}

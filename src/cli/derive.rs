//! `couplet derive`: a new couple from couples that share species, by adding free energies.

use super::common::{TableArgs, load_table, resolve, scale_without_quotient};
use super::failure::Failure;
use super::{EXIT_OK, print_json};
use couplet::cell::derive;
use couplet::table::Couple;
use serde_json::json;
use std::io::{self, Write};

#[derive(clap::Args)]
pub struct DeriveArgs {
    /// Two or more couples (ids, Ox/Red or half-reactions in the table), in the order to combine
    #[arg(required = true, num_args = 2..)]
    couples: Vec<String>,
    #[command(flatten)]
    table: TableArgs,
    /// Print JSON: {"reaction", "n", "e0_V", "from": [{"reaction", "n", "e0_V"}]}
    #[arg(long)]
    json: bool,
}

/// Electrons of a couple, exact (a derived couple may have a fractional count).
fn n_of(couple: &Couple) -> serde_json::Value {
    super::exact_json(&couple.electrons())
}

pub fn run(args: &DeriveArgs, out: &mut dyn Write) -> io::Result<u8> {
    let table = match load_table(&args.table) {
        Ok(table) => table,
        Err(failure) => return failure.report(out, args.json),
    };
    let scale = match scale_without_quotient(&args.table) {
        Ok(scale) => scale,
        Err(failure) => return failure.report(out, args.json),
    };
    let mut couples = Vec::new();
    for query in &args.couples {
        match resolve(&table, query, None, None) {
            Ok(c) => couples.push(c),
            Err(failure) => return failure.report(out, args.json),
        }
    }
    let derived = match derive(&couples) {
        Ok(d) => d,
        Err(error) => {
            return Failure::from(&error).report(out, args.json);
        }
    };
    let couple = &derived.couple;
    if args.json {
        print_json(
            out,
            &json!({
                "reaction": couple.reaction.to_string(),
                "n": n_of(couple),
                "e0_V": scale.couple_potential(&couple.reaction, couple.e0_volts),
                "from": derived.from.iter().map(|(c, _)| json!({
                    "reaction": c.reaction.to_string(),
                    "n": n_of(c),
                    "e0_V": scale.couple_potential(&c.reaction, c.e0_volts),
                })).collect::<Vec<_>>(),
            }),
        )?;
        return Ok(EXIT_OK);
    }
    writeln!(
        out,
        "{}   E° = {:+.4} V vs {} (n = {})",
        couple.reaction,
        scale.couple_potential(&couple.reaction, couple.e0_volts),
        scale.label(),
        couple.electrons()
    )?;
    writeln!(out, "from free energies, E° = Σ(k·n·E°)/n:")?;
    for (c, multiple) in &derived.from {
        writeln!(
            out,
            "  {:>5} × ({})   n = {}, E° = {:+.4} V  [{}]",
            multiple.to_string(),
            c.reaction,
            c.electrons(),
            scale.couple_potential(&c.reaction, c.e0_volts),
            c.label()
        )?;
    }
    Ok(EXIT_OK)
}

//! `couplet derive`: a new couple from couples that share species, by adding free energies.

use super::common::{TableArgs, load_table, resolve, scale};
use super::{EXIT_FINDINGS, EXIT_OK, print_json};
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

fn n_of(couple: &Couple) -> i64 {
    couple
        .electrons()
        .to_integer()
        .to_string()
        .parse()
        .unwrap_or(0)
}

pub fn run(args: &DeriveArgs, out: &mut dyn Write) -> io::Result<u8> {
    let table = match load_table(&args.table) {
        Ok(table) => table,
        Err(status) => return Ok(status),
    };
    let scale = match scale(&args.table) {
        Ok(scale) => scale,
        Err(status) => return Ok(status),
    };
    let mut couples = Vec::new();
    for query in &args.couples {
        match resolve(&table, query, None, None) {
            Ok(c) => couples.push(c),
            Err(status) => return Ok(status),
        }
    }
    let derived = match derive(&couples) {
        Ok(d) => d,
        Err(error) => {
            eprintln!("error: {error}");
            return Ok(EXIT_FINDINGS);
        }
    };
    let couple = &derived.couple;
    if args.json {
        print_json(
            out,
            &json!({
                "reaction": couple.reaction.to_string(),
                "n": n_of(couple),
                "e0_V": scale.from_she(couple.e0_volts),
                "from": derived.from.iter().map(|(c, _)| json!({
                    "reaction": c.reaction.to_string(),
                    "n": n_of(c),
                    "e0_V": scale.from_she(c.e0_volts),
                })).collect::<Vec<_>>(),
            }),
        )?;
        return Ok(EXIT_OK);
    }
    writeln!(
        out,
        "{}   E° = {:+.4} V vs {} (n = {})",
        couple.reaction,
        scale.from_she(couple.e0_volts),
        scale.label(),
        n_of(couple)
    )?;
    writeln!(out, "from free energies, E° = Σ(k·n·E°)/n:")?;
    for (c, multiple) in &derived.from {
        writeln!(
            out,
            "  {:>5} × ({})   n = {}, E° = {:+.4} V  [{}]",
            multiple.to_string(),
            c.reaction,
            n_of(c),
            c.e0_volts,
            c.label()
        )?;
    }
    Ok(EXIT_OK)
}

//! Pieces the table, cell and derive commands share: loading tables, naming couples, scales.

use super::{EXIT_FINDINGS, EXIT_USAGE};
use couplet::scale::Scale;
use couplet::table::{Couple, CoupleFile, LookupError, Medium, Origin, Table};
use std::path::PathBuf;

/// Options every potential command takes.
#[derive(clap::Args)]
pub struct TableArgs {
    /// Also read couples from this file (TOML [[couple]] tables, or .csv); repeatable; an id
    /// already present replaces the earlier couple
    #[arg(long = "table", value_name = "FILE")]
    pub tables: Vec<PathBuf>,
    /// Print potentials against this reference: she, rhe (with --ph), sce, ag-agcl-sat-kcl,
    /// ag-agcl-3m-kcl, hg-hgo-1m-koh, hg-hg2so4-sat-k2so4, li-li+, … (see docs)
    #[arg(long, value_name = "SCALE", default_value = "she")]
    pub scale: String,
    /// pH of the solution, for --scale rhe
    #[arg(long)]
    pub ph: Option<f64>,
}

/// Built-in table plus the user's files; notes about replaced ids go to standard error.
pub fn load_table(args: &TableArgs) -> Result<Table, u8> {
    let mut table = Table::builtin();
    for path in &args.tables {
        let file = match CoupleFile::read(path) {
            Ok(file) => file,
            Err(error) => {
                eprintln!("error: cannot read {}: {error}", path.display());
                return Err(EXIT_USAGE);
            }
        };
        if let Err(error) = table.add_file(&file, Origin::File(path.clone())) {
            eprintln!("{}", error.render());
            return Err(EXIT_FINDINGS);
        }
    }
    for replaced in table.overrides() {
        eprintln!(
            "note: couple '{}' from {} replaces the one from {}",
            replaced.id, replaced.by, replaced.replaced
        );
    }
    Ok(table)
}

/// The loaded table and the scale asked for, or the error printed and the exit status.
pub fn table_and_scale(args: &TableArgs) -> Result<(Table, Scale), u8> {
    Ok((load_table(args)?, scale(args)?))
}

/// The scale asked for, or an error printed.
pub fn scale(args: &TableArgs) -> Result<Scale, u8> {
    Scale::from_name(&args.scale, args.ph).map_err(|error| {
        eprintln!("error: {error}");
        EXIT_USAGE
    })
}

/// Prints why a lookup failed and returns the exit status.
pub fn report_lookup(error: &LookupError) -> u8 {
    match error {
        LookupError::Notation(e) => {
            eprintln!("{}", e.render());
            super::parse::error_status(e)
        }
        LookupError::Ambiguous { candidates, .. } => {
            eprintln!("error: {error}");
            for c in candidates {
                eprintln!(
                    "  {:<24} {:>8.4} V  {:<7}  {}",
                    c.id.as_deref().unwrap_or("(no id)"),
                    c.e0_volts,
                    c.medium.name(),
                    c.reaction
                );
            }
            EXIT_FINDINGS
        }
        _ => {
            eprintln!("error: {error}");
            EXIT_FINDINGS
        }
    }
}

/// A couple named by id, `Ox/Red` or half-reaction; a typed half-reaction with its own E°
/// (`e0`) need not be in the table.
pub fn resolve(
    table: &Table,
    query: &str,
    e0_volts: Option<f64>,
    medium: Option<Medium>,
) -> Result<Couple, u8> {
    if let Some(e0) = e0_volts {
        if !couplet::table::is_reaction_text(query) {
            eprintln!(
                "error: a potential given on the command line needs a typed half-reaction, not '{query}'"
            );
            return Err(EXIT_USAGE);
        }
        return Couple::new(query, e0).map_err(|error| {
            match &error {
                couplet::table::CoupleError::Notation(e) => eprintln!("{}", e.render()),
                _ => eprintln!("error: {error}"),
            }
            match error {
                couplet::table::CoupleError::Notation(e) => super::parse::error_status(&e),
                _ => EXIT_FINDINGS,
            }
        });
    }
    table
        .find(query, medium)
        .cloned()
        .map_err(|e| report_lookup(&e))
}

/// Reads `acid`/`base`/`neutral`.
pub fn medium_arg(text: &str) -> Result<Medium, String> {
    Medium::from_name(text)
        .ok_or_else(|| format!("medium must be acid, base or neutral, not '{text}'"))
}

/// Options shared by every command that builds a cell: potentials of typed half-reactions and
/// the medium both halves are written for.
#[derive(clap::Args)]
pub struct ElectrodeArgs {
    /// E° (V vs SHE) of a typed cathode half-reaction that is not in the table
    #[arg(long = "cathode-e0", allow_hyphen_values = true)]
    pub cathode_e0: Option<f64>,
    /// E° (V vs SHE) of a typed anode half-reaction that is not in the table
    #[arg(long = "anode-e0", allow_hyphen_values = true)]
    pub anode_e0: Option<f64>,
    /// Write both halves for this solution: acid or base (converts with Kw)
    #[arg(long, value_parser = medium_arg)]
    pub medium: Option<Medium>,
}

impl ElectrodeArgs {
    /// The request for a cell from these options and the two couples named.
    pub fn cell_request<'a>(
        &self,
        cathode: &'a str,
        anode: &'a str,
        temperature_kelvin: f64,
    ) -> CellRequest<'a> {
        CellRequest {
            cathode,
            anode,
            cathode_e0: self.cathode_e0,
            anode_e0: self.anode_e0,
            medium: self.medium,
            temperature_kelvin,
        }
    }
}

/// The two electrodes of a cell as the user named them.
pub struct CellRequest<'a> {
    pub cathode: &'a str,
    pub anode: &'a str,
    pub cathode_e0: Option<f64>,
    pub anode_e0: Option<f64>,
    pub medium: Option<Medium>,
    pub temperature_kelvin: f64,
}

/// Looks both electrodes up and combines them into a cell; on failure the error has been
/// reported and the exit status is returned.
pub fn build_cell(table: &Table, request: &CellRequest<'_>) -> Result<couplet::cell::Cell, u8> {
    let cathode = resolve(table, request.cathode, request.cathode_e0, request.medium)?;
    let anode = resolve(table, request.anode, request.anode_e0, request.medium)?;
    let options = couplet::cell::CellOptions {
        temperature_kelvin: request.temperature_kelvin,
        medium: request.medium,
    };
    couplet::cell::combine(&cathode, &anode, options).map_err(|error| {
        eprintln!("error: {error}");
        EXIT_FINDINGS
    })
}

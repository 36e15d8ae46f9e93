//! Pieces the table, cell and derive commands share: loading tables, naming couples, scales.

use super::failure::Failure;
use super::{EXIT_FINDINGS, EXIT_USAGE};
use couplet::scale::Scale;
use couplet::table::{Couple, CoupleFile, LookupError, Medium, Origin, Table};
use couplet::thermo::{FormationData, couple_from_data};
use std::path::PathBuf;
use std::sync::OnceLock;

/// Options every potential command takes.
#[derive(clap::Args)]
pub struct TableArgs {
    /// Also read couples from this file (TOML [[couple]] tables, or .csv); repeatable; an id
    /// already present replaces the earlier couple
    #[arg(long = "table", value_name = "FILE")]
    pub tables: Vec<PathBuf>,
    /// Reference scale of the electrode potentials printed, and of any E° typed on the command
    /// line: she, rhe (with --ph), sce, ag-agcl-sat-kcl, ag-agcl-3m-kcl, hg-hgo-1m-koh,
    /// hg-hg2so4-sat-k2so4, li-li+, … (see docs); a cell voltage does not depend on it
    #[arg(long, value_name = "SCALE", default_value = "she")]
    pub scale: String,
    /// pH of the solution (−2 to 16), for --scale rhe, and for a(H+) where the command computes
    /// Q
    #[arg(long, value_parser = super::units::ph, allow_hyphen_values = true)]
    pub ph: Option<f64>,
    /// Also read formation data (the CSV layout of data/formation.csv); repeatable; a row for
    /// a species and phase already present replaces it. Used for couples no table lists
    #[arg(long = "formation", value_name = "FILE")]
    pub formation: Vec<PathBuf>,
}

/// The formation data this run uses: built-in rows plus the user's `--formation` files, read
/// by [`load_table`]. A process-wide value because the binary runs one command.
static FORMATION: OnceLock<FormationData> = OnceLock::new();

/// The formation data of this run (built-in only until [`load_table`] has read the user's).
pub fn formation_data() -> &'static FormationData {
    FORMATION.get().unwrap_or_else(|| FormationData::builtin())
}

/// Built-in formation data plus the user's files; notes about replaced rows to standard error.
pub fn load_formation(paths: &[PathBuf]) -> Result<&'static FormationData, Failure> {
    if paths.is_empty() {
        return Ok(formation_data());
    }
    let mut data = FormationData::builtin().clone();
    for path in paths {
        data.add_file(path)
            .map_err(|error| Failure::new("file", EXIT_USAGE, format!("formation data {error}")))?;
    }
    for note in data.replaced() {
        say!("note: {note}");
    }
    Ok(FORMATION.get_or_init(|| data))
}

/// Built-in table plus the user's files; notes about replaced ids go to standard error.
pub fn load_table(args: &TableArgs) -> Result<Table, Failure> {
    load_formation(&args.formation)?;
    let mut table = Table::builtin();
    for path in &args.tables {
        let file = CoupleFile::read(path).map_err(|error| {
            Failure::new(
                "file",
                EXIT_USAGE,
                format!("cannot read {}: {error}", path.display()),
            )
        })?;
        if let Err(error) = table.add_file(&file, Origin::File(path.clone())) {
            return Err(
                Failure::new("table", EXIT_FINDINGS, error.to_string()).shown_as(error.render())
            );
        }
    }
    for replaced in table.overrides() {
        say!(
            "note: couple '{}' from {} replaces the one from {}",
            replaced.id,
            replaced.by,
            replaced.replaced
        );
    }
    Ok(table)
}

/// The loaded table and the scale asked for.
pub fn table_and_scale(args: &TableArgs) -> Result<(Table, Scale), Failure> {
    Ok((load_table(args)?, scale(args)?))
}

/// The scale asked for.
pub fn scale(args: &TableArgs) -> Result<Scale, Failure> {
    Scale::from_name(&args.scale, args.ph).map_err(|error| Failure::usage(error.to_string()))
}

/// The scale of a command whose only use of `--ph` is the RHE: a pH given with another scale
/// would be ignored, so it is refused.
pub fn scale_without_quotient(args: &TableArgs) -> Result<Scale, Failure> {
    let scale = scale(args)?;
    if args.ph.is_some() && !matches!(scale, Scale::Rhe { .. }) {
        return Err(Failure::usage(
            "--ph is used here only by --scale rhe: give --scale rhe or leave out --ph",
        ));
    }
    Ok(scale)
}

/// What a potential on RHE means, for the line that names the scale (empty on other scales).
pub fn rhe_meaning(scale: &Scale) -> &'static str {
    match scale {
        Scale::Rhe { .. } => {
            ": each couple in the solution of that pH (other species at unit activity) against the RHE in the same solution"
        }
        _ => "",
    }
}

/// A couple named by id, `Ox/Red` or half-reaction; a typed half-reaction with its own E°
/// (`e0`, read on `scale`) need not be in the table.
pub fn resolve(
    table: &Table,
    query: &str,
    e0: Option<(f64, &Scale)>,
    medium: Option<Medium>,
) -> Result<Couple, Failure> {
    if let Some((e0, scale)) = e0 {
        if !couplet::table::is_reaction_text(query) {
            return Err(Failure::usage(format!(
                "a potential given on the command line needs a typed half-reaction, not '{query}'"
            )));
        }
        let typed = Couple::new(query, e0).map(|mut couple| {
            if *scale != Scale::She {
                couple.e0_volts = scale.couple_e0_vs_she(&couple.reaction, e0);
                say!(
                    "note: the E° typed for '{query}' is read vs {}: {e0} V there is {} V vs SHE",
                    scale.label(),
                    couplet::figures::significant(couple.e0_volts, 5)
                );
            }
            couple
        });
        return typed.map_err(|error| Failure::from(&error));
    }
    match table.find(query, medium) {
        Ok(couple) => Ok(couple.clone()),
        // A couple no table lists may still follow from formation data.
        Err(not_found @ LookupError::NotFound { .. }) => {
            match couple_from_data(query, medium, formation_data()) {
                Ok(found) => {
                    say!(
                        "note: no table lists '{query}'; its E° ({} V vs SHE) is computed from formation data: {}",
                        couplet::figures::significant(found.couple.e0_volts, 5),
                        found.thermo.rows_used().join("; ")
                    );
                    Ok(found.couple)
                }
                Err(why) => Err(Failure::from(&not_found)
                    .with_detail(&format!("  nor from formation data: {why}"))),
            }
        }
        Err(error) => Err(Failure::from(&error)),
    }
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
    /// E° in V of a typed cathode half-reaction that is not in the table, on the --scale
    /// (vs SHE unless --scale says otherwise)
    #[arg(long = "cathode-e0", allow_hyphen_values = true, value_parser = super::units::volts)]
    pub cathode_e0: Option<f64>,
    /// E° in V of a typed anode half-reaction that is not in the table, on the --scale
    #[arg(long = "anode-e0", allow_hyphen_values = true, value_parser = super::units::volts)]
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
        scale: &'a Scale,
    ) -> CellRequest<'a> {
        CellRequest {
            cathode,
            anode,
            cathode_e0: self.cathode_e0,
            anode_e0: self.anode_e0,
            medium: self.medium,
            temperature_kelvin,
            scale,
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
    /// The scale typed potentials are on.
    pub scale: &'a Scale,
}

/// Looks both electrodes up and combines them into a cell.
pub fn build_cell(
    table: &Table,
    request: &CellRequest<'_>,
) -> Result<couplet::cell::Cell, Failure> {
    let typed = |e0: Option<f64>| e0.map(|e0| (e0, request.scale));
    let cathode = resolve(
        table,
        request.cathode,
        typed(request.cathode_e0),
        request.medium,
    )?;
    let anode = resolve(
        table,
        request.anode,
        typed(request.anode_e0),
        request.medium,
    )?;
    let options = couplet::cell::CellOptions {
        temperature_kelvin: request.temperature_kelvin,
        medium: request.medium,
    };
    couplet::cell::combine(&cathode, &anode, options).map_err(|error| Failure::from(&error))
}

/// Writes each rendered output to its path atomically (a temporary file renamed into place), in
/// order; the first file that cannot be written is the failure.
pub fn write_outputs(outputs: &[(Option<&PathBuf>, Option<String>)]) -> Result<(), Failure> {
    for (path, text) in outputs {
        if let (Some(path), Some(text)) = (path, text) {
            couplet::output::write_atomically(path, text.as_bytes()).map_err(|error| {
                Failure::new(
                    "file",
                    EXIT_USAGE,
                    format!("cannot write {}: {error}", path.display()),
                )
            })?;
        }
    }
    Ok(())
}

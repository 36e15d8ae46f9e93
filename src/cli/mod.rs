//! Command-line front end: argument definitions and dispatch. Each command lives in its own
//! file and only calls the library and renders what it returns.

mod balance;
mod capacity;
mod cell;
mod check;
mod common;
mod derive;
mod discharge;
mod electrode;
mod nernst;
mod oxidation;
mod parse;
mod table;

use clap::{Parser, Subcommand};
use std::io::Read;
use std::process::ExitCode;

/// Exit status: everything went as asked.
pub const EXIT_OK: u8 = 0;
/// Exit status: the input was read, but it is chemically invalid or has findings.
pub const EXIT_FINDINGS: u8 = 1;
/// Exit status: usage error, unreadable input, or a syntax error.
pub const EXIT_USAGE: u8 = 2;

#[derive(Parser)]
#[command(
    name = "couplet",
    version,
    about = "Electrode reactions, oxidation numbers and cell figures from ordinary chemical notation",
    long_about = "couplet reads half-reactions and formulas as chemists type them (MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O), \
balances them exactly, and computes the figures a cell designer checks. Exit status: 0 success, \
1 the input was read but is chemically invalid, 2 usage or syntax error.",
    after_help = "Examples:\n  couplet cell --cathode PbO2/PbSO4 --anode PbSO4/Pb\n  couplet balance --medium acid 'MnO4- + Fe2+ -> Mn2+ + Fe3+'\n  couplet oxidation 'K4[Fe(CN)6]'\n  couplet table --element Mn\n  couplet check data/ --format sarif\n  couplet parse 'PbO2 + SO4^2- + 4 H+ + 2 e- -> PbSO4(s) + 2 H2O(l)'"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Show how a formula, species list or equation is read: composition, charge, state, molar mass
    #[command(
        after_help = "Examples:\n  couplet parse 'CuSO4·5H2O'\n  couplet parse --json 'Fe(CN)6^3-'\n  couplet parse 'PbO2 + SO4^2- + 4 H+ + 2 e- -> PbSO4(s) + 2 H2O(l)'"
    )]
    Parse(parse::ParseArgs),
    /// Balance an equation or half-reaction exactly, as written or in acid or base
    #[command(
        after_help = "Examples:\n  couplet balance --medium acid 'MnO4- + Fe2+ -> Mn2+ + Fe3+'\n  couplet balance --medium base 'NiOOH -> Ni(OH)2'\n  couplet balance --json --medium acid - < equations.txt"
    )]
    Balance(balance::BalanceArgs),
    /// Oxidation number of every element of a formula or ion, with the rule that gave it
    #[command(
        after_help = "Examples:\n  couplet oxidation Fe3O4\n  couplet oxidation --json 'K4[Fe(CN)6]'\n  couplet oxidation --assume Fe=+2 FeS2"
    )]
    Oxidation(oxidation::OxidationArgs),
    /// List, search and show couples of the standard-potential table
    #[command(
        after_help = "Examples:\n  couplet table zinc\n  couplet table --element V\n  couplet table MnO4-/Mn2+ --json\n  couplet table --table ours.toml"
    )]
    Table(table::TableCommandArgs),
    /// Combine a cathode and an anode couple: net reaction, n, E°cell, ΔG°, K, temperature
    #[command(
        after_help = "Examples:\n  couplet cell --cathode PbO2/PbSO4 --anode PbSO4/Pb\n  couplet cell --cathode Cu2+/Cu --anode Zn2+/Zn --activity Cu2+=0.1 --activity Zn2+=0.001\n  couplet cell --cathode O2/OH- --anode ZnO/Zn --medium base --temperature 310 --json\n  couplet cell --cathode Cu2+/Cu --anode Cu2+/Cu --activity 'Cu2+(cathode)=1' --activity 'Cu2+(anode)=0.1'\n  couplet cell --cathode Cu2+/Cu --anode Zn2+/Zn --emit python"
    )]
    Cell(cell::CellArgs),
    /// A new couple from couples that share species, by adding free energies
    #[command(
        after_help = "Examples:\n  couplet derive Fe3+/Fe2+ Fe2+/Fe\n  couplet derive --json Cu2+/Cu+ Cu+/Cu"
    )]
    Derive(derive::DeriveArgs),
    /// Potential of one electrode at a composition, on the SHE, RHE or a reference-electrode scale
    #[command(
        after_help = "Examples:\n  couplet electrode Ag+/Ag --activity Ag+=0.01 --scale sce\n  couplet electrode O2/H2O --ph 7 --pressure O2=0.21 --scale rhe\n  couplet electrode Fe3+/Fe2+ --activity Fe3+=0.1 --activity Fe2+=0.01 --json"
    )]
    Electrode(electrode::ElectrodeCommandArgs),
    /// E against pH for a half-reaction (CSV: pH,E_V), other species at unit activity unless given
    #[command(name = "ph-line")]
    #[command(after_help = "Examples:\n  couplet ph-line MnO4-/Mn2+ --from 0 --to 14 --step 0.5")]
    PhLine(nernst::PhLineArgs),
    /// Theoretical capacity (mAh/g, Ah/kg) and specific energy (Wh/kg, Wh/L) of materials and cells
    #[command(
        after_help = "Examples:\n  couplet capacity Zn2+/Zn\n  couplet capacity --cathode PbO2/PbSO4 --anode PbSO4/Pb --basis with-electrolyte\n  couplet capacity --cathode VO2+/VO^2+ --anode V3+/V2+ --electrolyte VO2+=1.6 --electrolyte V2+=1.6"
    )]
    Capacity(capacity::CapacityArgs),
    /// Open-circuit voltage along a discharge from initial amounts, with CSV and SVG output
    #[command(
        after_help = "Examples:\n  couplet discharge --cathode PbO2/PbSO4 --anode PbSO4/Pb --amount PbO2=1 --amount Pb=1 --amount H2SO4=4 --solvent-kg 0.8 --gamma table --csv lead.csv --svg lead.svg"
    )]
    Discharge(discharge::DischargeArgs),
    /// Validate couple files (TOML or CSV) for CI: syntax, chemistry, numbers, table consistency
    #[command(
        after_help = "Examples:\n  couplet check data/\n  couplet check --format sarif tables/ > couplet.sarif\n  couplet check --fix --dry-run ours.toml"
    )]
    Check(check::CheckArgs),
}

/// Runs the command line and returns the exit status.
pub fn run() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(error) => {
            let _ = error.print();
            return ExitCode::from(if error.use_stderr() {
                EXIT_USAGE
            } else {
                EXIT_OK
            });
        }
    };
    let status = match cli.command {
        Command::Parse(args) => parse::run(&args),
        Command::Balance(args) => balance::run(&args),
        Command::Table(args) => table::run(&args),
        Command::Cell(args) => cell::run(&args),
        Command::Derive(args) => derive::run(&args),
        Command::Oxidation(args) => oxidation::run(&args),
        Command::Capacity(args) => capacity::run(&args),
        Command::Discharge(args) => discharge::run(&args),
        Command::Electrode(args) => electrode::run(&args),
        Command::PhLine(args) => nernst::run_ph_line(&args),
        Command::Check(args) => check::run(&args),
    };
    ExitCode::from(status)
}

/// The text of an argument, or all of standard input when the argument is `-`.
pub fn argument_or_stdin(argument: &str) -> Result<String, String> {
    if argument != "-" {
        return Ok(argument.to_owned());
    }
    let mut text = String::new();
    std::io::stdin()
        .read_to_string(&mut text)
        .map_err(|e| format!("cannot read standard input: {e}"))?;
    Ok(text)
}

/// Prints a JSON value on one line.
pub fn print_json(value: &serde_json::Value) {
    println!(
        "{}",
        serde_json::to_string(value).expect("JSON values always serialise")
    );
}

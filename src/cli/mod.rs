//! Command-line front end: argument definitions and dispatch. Each command lives in its own
//! file and only calls the library and renders what it returns.

mod balance;
mod check;
mod parse;

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
    after_help = "Examples:\n  couplet parse 'CuSO4·5H2O'\n  couplet parse 'PbO2 + SO4^2- + 4 H+ + 2 e- -> PbSO4(s) + 2 H2O(l)'\n  couplet parse --json 'Fe3+'\n  couplet balance --medium acid 'MnO4- + Fe2+ -> Mn2+ + Fe3+'\n  couplet check data/ --format sarif"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Show how a formula, species list or equation is read: composition, charge, state, molar mass
    Parse(parse::ParseArgs),
    /// Balance an equation or half-reaction exactly, as written or in acid or base
    Balance(balance::BalanceArgs),
    /// Validate couple files (TOML or CSV) for CI: syntax, chemistry, numbers, table consistency
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

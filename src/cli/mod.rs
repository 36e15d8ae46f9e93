//! Command-line front end: argument definitions and dispatch. Each command lives in its own
//! file and only calls the library and renders what it returns.

/// Writes a line to standard error. Unlike `eprintln!`, a failed write (`2> /dev/full`) is
/// ignored instead of a panic: there is nowhere left to report it.
macro_rules! say {
    ($($arg:tt)*) => {{
        use std::io::Write as _;
        let _ = writeln!(std::io::stderr(), $($arg)*);
    }};
}

mod balance;
mod capacity;
mod cell;
mod check;
mod common;
mod derive;
mod discharge;
mod electrode;
mod failure;
mod formation;
mod nernst;
mod oxidation;
mod parse;
mod stability;
mod table;
mod thermo;
mod units;

use clap::{Parser, Subcommand};
use std::io::{self, Read, Write};
use std::process::ExitCode;

/// Exit status: everything went as asked.
pub const EXIT_OK: u8 = 0;
/// Exit status: the input was read, but it is chemically invalid or has findings.
pub const EXIT_FINDINGS: u8 = 1;
/// Exit status: usage error, unreadable input, or a syntax error.
pub const EXIT_USAGE: u8 = 2;

/// `--scale` of the commands that print no electrode potential: there it only says what the
/// typed ones are on.
const TYPED_SCALE_HELP: &str = "Reference scale of the potentials typed with --cathode-e0 and --anode-e0 (she, rhe with --ph, sce, li-li+, …; see docs); the cell voltage does not depend on it";

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
        after_help = "Examples:\n  couplet cell --cathode PbO2/PbSO4 --anode PbSO4/Pb\n  couplet cell --cathode Cu2+/Cu --anode Zn2+/Zn --activity Cu2+=0.1 --activity Zn2+=0.001\n  couplet cell --cathode O2/OH- --anode ZnO/Zn --medium base --temperature 37C --json\n  couplet cell --cathode Cu2+/Cu --anode Cu2+/Cu --activity 'Cu2+(cathode)=1' --activity 'Cu2+(anode)=0.1'\n  couplet cell --cathode Cu2+/Cu --anode Zn2+/Zn --emit python"
    )]
    Cell(cell::CellArgs),
    /// Potential of one electrode at a composition, on the SHE, RHE or a reference-electrode scale
    #[command(
        after_help = "Examples:\n  couplet electrode Ag+/Ag --activity Ag+=0.01 --scale sce\n  couplet electrode O2/H2O --ph 7 --pressure O2=0.21 --scale rhe\n  couplet electrode Fe3+/Fe2+ --activity Fe3+=0.1 --activity Fe2+=0.01 --json"
    )]
    Electrode(electrode::ElectrodeCommandArgs),
    /// A new couple from couples that share species, by adding free energies
    #[command(
        after_help = "Examples:\n  couplet derive Fe3+/Fe2+ Fe2+/Fe\n  couplet derive --json Cu2+/Cu+ Cu+/Cu"
    )]
    Derive(derive::DeriveArgs),
    /// E against pH for a half-reaction (CSV: pH,E_V), other species at unit activity unless given
    #[command(name = "ph-line")]
    #[command(after_help = "Examples:\n  couplet ph-line MnO4-/Mn2+ --from 0 --to 14 --step 0.5")]
    PhLine(nernst::PhLineArgs),
    /// Theoretical capacity (mAh/g, Ah/kg) and specific energy (Wh/kg, Wh/L) of materials and cells
    #[command(
        after_help = "Examples:\n  couplet capacity Zn2+/Zn\n  couplet capacity --cathode PbO2/PbSO4 --anode PbSO4/Pb --basis with-electrolyte"
    )]
    #[command(mut_arg("scale", |arg| arg.help(TYPED_SCALE_HELP)))]
    #[command(mut_arg("ph", |arg| arg.help("pH of the solution (−2 to 16), for --scale rhe")))]
    Capacity(capacity::CapacityArgs),
    /// Open-circuit voltage along a discharge from initial amounts, with CSV and SVG output
    #[command(
        after_help = "Examples:\n  couplet discharge --cathode PbO2/PbSO4 --anode PbSO4/Pb --amount PbO2=1 --amount Pb=1 --amount H2SO4=4 --solvent-kg 0.8 --gamma table --csv lead.csv --svg lead.svg"
    )]
    #[command(mut_arg("scale", |arg| arg.help(TYPED_SCALE_HELP)))]
    #[command(mut_arg("ph", |arg| arg.help("pH of the solution (−2 to 16), for --scale rhe")))]
    Discharge(discharge::DischargeArgs),
    /// Validate couple files (TOML or CSV) for CI: syntax, chemistry, numbers, table consistency
    #[command(
        after_help = "Examples:\n  couplet check data/\n  couplet check --format sarif tables/ > couplet.sarif\n  couplet check --fix --dry-run ours.toml"
    )]
    Check(check::CheckArgs),
    /// Formation data (ΔfH°, ΔfG°, S°, Cp°) of species in every phase the data hold, with sources
    #[command(
        after_help = "Examples:\n  couplet formation PbSO4 'SO4^2-' H2O\n  couplet formation 'H2S(g)' 'H2S(aq)'\n  couplet formation --json Zn2+"
    )]
    Formation(formation::FormationArgs),
    /// ΔrG°, ΔrH°, ΔrS°, E°, dE°/dT and E°(T) of any reaction or half-reaction from formation data
    #[command(
        after_help = "Examples:\n  couplet thermo 'PbO2 + Pb + 4 H+ + 2 SO4^2- -> 2 PbSO4 + 2 H2O'\n  couplet thermo SnO2/Sn\n  couplet thermo --medium base 'Ag2O + Zn -> Ag + ZnO' --temperature 45C\n  couplet thermo --json 'S + 2 H+ + 2 e- -> H2S(g)'"
    )]
    Thermo(thermo::ThermoArgs),
    /// Potential–pH predominance diagram of an element from formation data: regions, boundaries, triple points, SVG
    #[command(
        after_help = "Examples:\n  couplet stability Fe --svg fe.svg\n  couplet stability Cu --activity 1e-4 --temperature 80C --scale sce\n  couplet stability Zn --formation my-zinc.csv --json"
    )]
    Stability(stability::StabilityArgs),
}

/// Runs the command line and returns the exit status.
pub fn run() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(error) => {
            // Help and version go to standard output: a failed write of them is an error too,
            // a closed pipe is not.
            let printed = error.print();
            let failed = match printed {
                Err(e) if e.kind() != io::ErrorKind::BrokenPipe => {
                    let _ = writeln!(io::stderr(), "error: cannot write the help: {e}");
                    true
                }
                _ => false,
            };
            return ExitCode::from(if error.use_stderr() || failed {
                EXIT_USAGE
            } else {
                EXIT_OK
            });
        }
    };
    let mut out = io::BufWriter::new(Stdout::default());
    let result = dispatch(cli.command, &mut out).and_then(|status| {
        out.flush()?;
        Ok(status)
    });
    match result {
        Ok(status) => ExitCode::from(status),
        Err(error) => {
            // Whatever was buffered cannot be written either; drop it without a second error.
            let _ = out.into_parts();
            let _ = writeln!(
                io::stderr(),
                "error: cannot write to standard output: {error}"
            );
            ExitCode::from(EXIT_USAGE)
        }
    }
}

/// Runs one command, writing its output to `out`.
fn dispatch(command: Command, out: &mut dyn Write) -> io::Result<u8> {
    match command {
        Command::Parse(args) => parse::run(&args, out),
        Command::Balance(args) => balance::run(&args, out),
        Command::Table(args) => table::run(&args, out),
        Command::Cell(args) => cell::run(&args, out),
        Command::Electrode(args) => electrode::run(&args, out),
        Command::Derive(args) => derive::run(&args, out),
        Command::Oxidation(args) => oxidation::run(&args, out),
        Command::Capacity(args) => capacity::run(&args, out),
        Command::Discharge(args) => discharge::run(&args, out),
        Command::PhLine(args) => nernst::run_ph_line(&args, out),
        Command::Check(args) => check::run(&args, out),
        Command::Formation(args) => formation::run(&args, out),
        Command::Thermo(args) => thermo::run(&args, out),
        Command::Stability(args) => stability::run(&args, out),
    }
}

/// Standard output as every command writes it. When the reader has gone (`| head`), the rest of
/// the output is dropped quietly and the command still ends with its own exit status; every other
/// write error (a full disk, `> /dev/full`) is returned, reported once and gives exit status 2.
#[derive(Default)]
struct Stdout {
    closed: bool,
}

impl Stdout {
    fn absorb<T>(&mut self, result: io::Result<T>, done: T) -> io::Result<T> {
        match result {
            Err(error) if error.kind() == io::ErrorKind::BrokenPipe => {
                self.closed = true;
                Ok(done)
            }
            other => other,
        }
    }
}

impl Write for Stdout {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        if self.closed {
            return Ok(buf.len());
        }
        let result = io::stdout().lock().write(buf);
        self.absorb(result, buf.len())
    }

    fn flush(&mut self) -> io::Result<()> {
        if self.closed {
            return Ok(());
        }
        let result = io::stdout().lock().flush();
        self.absorb(result, ())
    }
}

/// The text of an argument, or all of standard input when the argument is `-`.
pub fn argument_or_stdin(argument: &str) -> Result<String, String> {
    if argument != "-" {
        return Ok(argument.to_owned());
    }
    // Bounded like a couple file: an endless or huge stream is refused, not held whole.
    let limit = couplet::check::MAX_FILE_BYTES;
    let mut bytes = Vec::new();
    std::io::stdin()
        .take(limit + 1)
        .read_to_end(&mut bytes)
        .map_err(|e| format!("cannot read standard input: {e}"))?;
    if bytes.len() as u64 > limit {
        return Err(format!(
            "standard input is larger than {} MiB, the most couplet reads",
            limit / (1024 * 1024)
        ));
    }
    String::from_utf8(bytes).map_err(|e| {
        format!(
            "standard input is not UTF-8 text (byte {} is invalid)",
            e.utf8_error().valid_up_to()
        )
    })
}

/// Writes a JSON value on one line.
pub fn print_json(out: &mut dyn Write, value: &serde_json::Value) -> io::Result<()> {
    serde_json::to_writer(&mut *out, value)?;
    writeln!(out)
}

/// An exact number as every JSON output writes it: a JSON integer when whole, a string `"a/b"`
/// otherwise (integers beyond 64 bits, which ordinary input never reaches, as a string of digits;
/// `couplet balance` writes those as bare JSON integers).
pub fn exact_json(value: &num_rational::BigRational) -> serde_json::Value {
    if !value.is_integer() {
        return serde_json::Value::String(value.to_string());
    }
    i64::try_from(value.numer()).map_or_else(
        |_| serde_json::Value::String(value.numer().to_string()),
        serde_json::Value::from,
    )
}

/// [`exact_json`] of an integer.
pub fn exact_integer_json(value: &num_bigint::BigInt) -> serde_json::Value {
    exact_json(&num_rational::BigRational::from_integer(value.clone()))
}

//! `couplet balance`: one equation from the argument, or one per line from standard input.

use super::failure::{self, Failure};
use super::{EXIT_FINDINGS, EXIT_OK, argument_or_stdin};
use couplet::balance::{
    BalanceError, BalanceOptions, BalancedReaction, Conserved, ElectronRule, Impossible, Medium,
    balance_text,
};
use couplet::balance::{HalfReactions, split};
use couplet::export::balance_json::{BalanceJson, balance_lines_json};
use couplet::export::batch::{batch_lines, default_threads, write_in_order};
use couplet::oxidation::{RedoxAnalysis, analyse, signed_text};
use num_bigint::BigInt;
use num_traits::Signed;
use std::fmt::Write as _;
use std::io::{self, Write};

#[derive(clap::Args)]
pub struct BalanceArgs {
    /// The equation or half-reaction (MnO4- + Fe2+ -> Mn2+ + Fe3+); - reads one per line from
    /// standard input
    input: String,
    /// Species the solvent may add: acid (H2O, H+), base (H2O, OH-), none
    #[arg(long, value_parser = ["none", "acid", "base"], default_value = "none")]
    medium: String,
    /// Treat the input as a half-reaction: add electrons even when no e- is written
    #[arg(long)]
    half: bool,
    /// Print one JSON object per equation
    #[arg(long)]
    json: bool,
}

pub fn run(args: &BalanceArgs, out: &mut dyn Write) -> io::Result<u8> {
    let options = BalanceOptions {
        medium: args.medium.parse().unwrap_or(Medium::None),
        electrons: if args.half {
            ElectronRule::Always
        } else {
            ElectronRule::HalfReactions
        },
        ..BalanceOptions::default()
    };
    let text = match argument_or_stdin(&args.input) {
        Ok(text) => text,
        Err(message) => return Failure::usage(message).report(out, args.json),
    };
    if args.input != "-" {
        let line = text.trim_end_matches(['\n', '\r']);
        let result = balance_text(line, &options);
        if args.json {
            let mut buffer = Vec::new();
            BalanceJson::new().write(&mut buffer, line, None, options.medium, &result);
            out.write_all(&buffer)?;
        } else {
            match &result {
                Ok(balanced) => write!(out, "{}", human(balanced))?,
                Err(error) => say!("{}", human_error(error, line, args.half).trim_end()),
            }
        }
        return Ok(match &result {
            Ok(_) => EXIT_OK,
            Err(error) => failure::balance(error, line).status,
        });
    }
    if args.json {
        let all_balanced = balance_lines_json(&text, &options, out)?;
        return Ok(if all_balanced { EXIT_OK } else { EXIT_FINDINGS });
    }
    let lines = batch_lines(&text);
    let all_balanced = write_in_order(
        &lines,
        default_threads(),
        out,
        || (),
        |(), number, line, buffer| {
            let result = balance_text(line, &options);
            match &result {
                Ok(balanced) => buffer.extend_from_slice(balanced.ascii().as_bytes()),
                Err(error) => {
                    let kind = failure::balance(error, line).kind;
                    let _ = write!(buffer, "line {number}: error ({kind}): {error}");
                    if let BalanceError::NotUnique { basis } = error {
                        let listed: Vec<String> = basis.iter().map(|r| r.to_string()).collect();
                        let _ = write!(buffer, ": {}", listed.join(" ; "));
                    }
                }
            }
            buffer.push(b'\n');
            result.is_ok()
        },
    )?;
    Ok(if all_balanced { EXIT_OK } else { EXIT_FINDINGS })
}

/// Electrons of a half-reaction, or n of a whole reaction from its redox analysis (computed
/// once per result and shared with the redox fields).
fn electrons(balanced: &BalancedReaction, redox: Option<&RedoxAnalysis>) -> Option<BigInt> {
    if balanced.is_half_reaction() {
        return balanced.electrons();
    }
    redox
        .filter(|analysis| analysis.n.is_integer())
        .map(|analysis| analysis.n.to_integer())
}

fn human(balanced: &BalancedReaction) -> String {
    let mut out = format!("{}\n{}\n", balanced.ascii(), balanced.unicode());
    let redox = redox_of(balanced);
    match electrons(balanced, redox.as_ref().map(|(analysis, _)| analysis)) {
        Some(n) if balanced.is_half_reaction() => {
            let direction = if balanced.reaction().electron_nu().is_negative() {
                "reduction"
            } else {
                "oxidation"
            };
            let _ = writeln!(out, "electrons: {n} ({direction} half-reaction)");
        }
        Some(n) => {
            let _ = writeln!(out, "electrons transferred: {n}");
        }
        None => {
            let _ = writeln!(
                out,
                "electrons transferred: not determined (a species has no oxidation numbers)"
            );
        }
    }
    let caution = couplet::cell::caution(balanced.reaction());
    let Some((analysis, halves)) = redox else {
        if let Some(caution) = caution {
            let _ = writeln!(out, "{caution}");
        }
        return out;
    };
    for (word, changes) in [
        ("oxidised", &analysis.oxidized),
        ("reduced", &analysis.reduced),
    ] {
        for change in changes {
            let _ = writeln!(
                out,
                "{word:<9} {} {} → {}",
                change.element,
                signed_text(&change.from),
                signed_text(&change.to)
            );
        }
    }
    let _ = writeln!(out, "kind      {}", analysis.kind.name().replace('_', " "));
    if let Some(halves) = halves {
        let _ = writeln!(out, "oxidation half  {}", halves.oxidation.ascii());
        let _ = writeln!(out, "reduction half  {}", halves.reduction.ascii());
    }
    if let Some(caution) = caution {
        let _ = writeln!(out, "{caution}");
    }
    out
}

/// The redox analysis of a balanced result and, for a whole redox reaction, its two halves.
fn redox_of(balanced: &BalancedReaction) -> Option<(RedoxAnalysis, Option<HalfReactions>)> {
    let analysis = analyse(balanced.reaction()).ok()?;
    let halves = split(balanced, &analysis);
    Some((analysis, halves))
}

fn human_error(error: &BalanceError, line: &str, half: bool) -> String {
    let mut out = failure::balance(error, line).rendered().to_owned();
    out.push('\n');
    match error {
        BalanceError::NotUnique { basis } => {
            for reaction in basis {
                let _ = writeln!(out, "  {reaction}");
            }
        }
        BalanceError::Impossible(Impossible::CannotClose(Conserved::Charge)) if !half => {
            out.push_str(
                "hint: if this is a half-reaction, --half adds electrons (e-) to balance the charge\n",
            );
        }
        _ => {}
    }
    out
}

//! `couplet balance`: one equation from the argument, or one per line from standard input.

use super::failure::{self, Failure};
use super::{EXIT_FINDINGS, EXIT_OK, argument_or_stdin};
use couplet::balance::{
    BalanceError, BalanceOptions, BalancedReaction, Conserved, ElectronRule, Impossible, Medium,
    balance_text,
};
use couplet::balance::{HalfReactions, split};
use couplet::notation::Species;
use couplet::oxidation::{ElementChange, RedoxAnalysis, analyse, signed_text};
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
            writeln!(out, "{}", result_json(line, None, options.medium, &result))?;
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
    let mut status = EXIT_OK;
    for (index, line) in text.lines().enumerate() {
        let line = line.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        let number = index + 1;
        let result = balance_text(line, &options);
        if result.is_err() {
            status = EXIT_FINDINGS;
        }
        if args.json {
            out.write_all(result_json(line, Some(number), options.medium, &result).as_bytes())?;
        } else {
            match &result {
                Ok(balanced) => out.write_all(balanced.ascii().as_bytes())?,
                Err(error) => {
                    let kind = failure::balance(error, line).kind;
                    write!(out, "line {number}: error ({kind}): {error}")?;
                    if let BalanceError::NotUnique { basis } = error {
                        let listed: Vec<String> = basis.iter().map(|r| r.to_string()).collect();
                        write!(out, ": {}", listed.join(" ; "))?;
                    }
                }
            }
        }
        writeln!(out)?;
    }
    Ok(status)
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

fn changes_json(changes: &[ElementChange]) -> String {
    let items: Vec<String> = changes
        .iter()
        .map(|c| {
            format!(
                "{{\"element\":{},\"from\":{},\"to\":{}}}",
                json_string(c.element.symbol()),
                json_string(&signed_text(&c.from)),
                json_string(&signed_text(&c.to))
            )
        })
        .collect();
    format!("[{}]", items.join(","))
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

fn json_string(text: &str) -> String {
    serde_json::to_string(text).expect("strings always serialise")
}

fn side_json(out: &mut String, terms: &[(&Species, BigInt)]) {
    out.push('[');
    for (i, (species, coefficient)) in terms.iter().enumerate() {
        if i > 0 {
            out.push(',');
        }
        // Coefficients are written as JSON integers of any size, straight from their digits.
        let _ = write!(
            out,
            "{{\"species\":{},\"coefficient\":{coefficient}}}",
            json_string(&species.ascii())
        );
    }
    out.push(']');
}

/// One result object on one line (schema in the README).
fn result_json(
    input: &str,
    line: Option<usize>,
    medium: Medium,
    result: &Result<BalancedReaction, BalanceError>,
) -> String {
    let mut out = format!("{{\"input\":{}", json_string(input));
    match result {
        Ok(balanced) => {
            let _ = write!(
                out,
                ",\"medium\":\"{}\",\"balanced\":{},\"reactants\":",
                medium.name(),
                json_string(&balanced.ascii())
            );
            side_json(&mut out, &balanced.reactants());
            out.push_str(",\"products\":");
            side_json(&mut out, &balanced.products());
            let redox = redox_of(balanced);
            match electrons(balanced, redox.as_ref().map(|(analysis, _)| analysis)) {
                Some(n) => {
                    let _ = write!(out, ",\"electrons\":{n}");
                }
                None => out.push_str(",\"electrons\":null"),
            }
            match couplet::cell::caution(balanced.reaction()) {
                Some(caution) => {
                    let _ = write!(out, ",\"caution\":{}", json_string(&caution));
                }
                None => out.push_str(",\"caution\":null"),
            }
            if let Some((analysis, halves)) = redox {
                let n = if analysis.n.is_integer() {
                    analysis.n.to_integer().to_string()
                } else {
                    json_string(&signed_text(&analysis.n))
                };
                let _ = write!(
                    out,
                    ",\"redox\":{{\"oxidized\":{},\"reduced\":{},\"n\":{n},\"kind\":\"{}\"}}",
                    changes_json(&analysis.oxidized),
                    changes_json(&analysis.reduced),
                    analysis.kind.name()
                );
                if let Some(halves) = halves {
                    let _ = write!(
                        out,
                        ",\"half_reactions\":{{\"oxidation\":{},\"reduction\":{}}}",
                        json_string(&halves.oxidation.ascii()),
                        json_string(&halves.reduction.ascii())
                    );
                }
            }
        }
        Err(error) => {
            if let Some(line) = line {
                let _ = write!(out, ",\"line\":{line}");
            }
            let _ = write!(
                out,
                ",\"error\":{{\"kind\":\"{}\",\"message\":{}",
                failure::balance(error, input).kind,
                json_string(&error.to_string())
            );
            if let BalanceError::NotUnique { basis } = error {
                let listed: Vec<String> =
                    basis.iter().map(|r| json_string(&r.to_string())).collect();
                let _ = write!(out, ",\"basis\":[{}]", listed.join(","));
            }
            out.push('}');
        }
    }
    out.push('}');
    out
}

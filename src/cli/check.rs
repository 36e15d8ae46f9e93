//! `couplet check`: validates couple files (and directories of them) for CI, optionally
//! rewriting reactions the balancer balances unambiguously.

use super::{EXIT_FINDINGS, EXIT_OK, EXIT_USAGE};
use couplet::check::load::{expand_paths, load_file, looks_like_couple_file};
use couplet::check::output::{self, Colour};
use couplet::check::{CheckOptions, DEFAULT_TOLERANCE_VOLTS, Severity, check, fix};
use couplet::table::ProblemKind;
use std::io::{IsTerminal, Write};
use std::path::PathBuf;

#[derive(clap::Args)]
pub struct CheckArgs {
    /// Couple files (TOML or CSV) and directories to search for *.toml and *.csv
    #[arg(required = true)]
    paths: Vec<PathBuf>,
    /// Output: human (diagnostics with source lines), json, sarif (SARIF 2.1.0)
    #[arg(long, value_parser = ["human", "json", "sarif"], default_value = "human")]
    format: String,
    /// How far potentials that should agree may differ, in volts
    #[arg(long, default_value_t = DEFAULT_TOLERANCE_VOLTS, value_parser = parse_tolerance)]
    tolerance: f64,
    /// Count warnings as errors for the exit status
    #[arg(long)]
    deny_warnings: bool,
    /// Rewrite reactions the balancer balances unambiguously (nothing else in the file changes)
    #[arg(long)]
    fix: bool,
    /// With --fix: print the changes as a unified diff and write nothing
    #[arg(long, requires = "fix")]
    dry_run: bool,
    /// Fail (exit status 1) when the paths hold no couples at all, instead of passing with a
    /// note: catches a CI job pointed at the wrong directory
    #[arg(long)]
    expect_couples: bool,
}

fn parse_tolerance(text: &str) -> Result<f64, String> {
    match text.parse::<f64>() {
        Ok(v) if v.is_finite() && v >= 0.0 => Ok(v),
        _ => Err(format!(
            "'{text}' is not a tolerance: give a non-negative number of volts"
        )),
    }
}

pub fn run(args: &CheckArgs) -> u8 {
    let found = match expand_paths(&args.paths) {
        Ok(found) => found,
        Err(error) => {
            eprintln!("error: {error}");
            return EXIT_USAGE;
        }
    };
    let mut sources = Vec::new();
    let mut paths = Vec::new();
    for (path, under_directory) in found {
        match load_file(&path) {
            Ok(source) => {
                if under_directory && !looks_like_couple_file(&source) {
                    continue;
                }
                sources.push(source);
                paths.push(path);
            }
            Err(error) => {
                eprintln!("error: {error}");
                return EXIT_USAGE;
            }
        }
    }
    let options = CheckOptions {
        tolerance_volts: args.tolerance,
        ..CheckOptions::default()
    };
    let mut report = check(sources, &options);

    if args.fix {
        let mut rewritten = Vec::new();
        let mut diff = String::new();
        for (index, source) in report.files.iter().enumerate() {
            let fixes = report.fixes_for(index);
            if fixes.is_empty() {
                continue;
            }
            // What a broken file holds is a guess of the recovering parser: edit none of it.
            if source
                .file
                .problems
                .iter()
                .any(|p| p.kind == ProblemKind::Syntax)
            {
                eprintln!("{}: not fixed: the file has syntax errors", source.name);
                continue;
            }
            match fix::apply(&source.file, &fixes) {
                Ok(text) => {
                    diff.push_str(&fix::unified_diff(&source.name, &source.file.text, &text));
                    rewritten.push(fix::Rewrite {
                        path: paths[index].clone(),
                        original: source.file.text.clone(),
                        text,
                    });
                }
                Err(error) => {
                    eprintln!("error: {}: {error}", source.name);
                    return EXIT_USAGE;
                }
            }
        }
        if args.dry_run {
            let _ = std::io::stdout().lock().write_all(diff.as_bytes());
            return EXIT_OK;
        }
        if let Err(error) = fix::write_all(&rewritten) {
            eprintln!("error: {error}; no file was changed");
            return EXIT_USAGE;
        }
        if !rewritten.is_empty() {
            eprintln!(
                "fixed {} file{}; checking again",
                rewritten.len(),
                if rewritten.len() == 1 { "" } else { "s" }
            );
            let mut sources = Vec::new();
            for path in &paths {
                match load_file(path) {
                    Ok(source) => sources.push(source),
                    Err(error) => {
                        eprintln!("error: {error}");
                        return EXIT_USAGE;
                    }
                }
            }
            report = check(sources, &options);
        }
    }

    // Written piece by piece: a report of a million findings is never held whole. A closed
    // pipe (`| head`) is not an error of the check: stop writing quietly.
    let stdout = std::io::stdout();
    // NO_COLOR set to anything but the empty string turns colour off.
    let colour_allowed = std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty());
    let colour = if stdout.is_terminal() && colour_allowed {
        Colour::Always
    } else {
        Colour::Never
    };
    let mut out = std::io::BufWriter::new(stdout.lock());
    let _ = match args.format.as_str() {
        "json" => output::write_json(&report, &mut out),
        "sarif" => output::write_sarif(&report, &mut out),
        _ => output::write_human(&report, colour, &mut out),
    }
    .and_then(|()| out.flush());
    // An empty run passes silently otherwise: say so on standard error (standard output
    // stays the report a program reads).
    let summary = report.summary();
    let empty = summary.entries == 0 && summary.errors == 0;
    if empty {
        let what = if summary.files == 0 {
            "no couple files were found under the paths given"
        } else {
            "the files given hold no couples"
        };
        let outcome = if args.expect_couples {
            "failing because of --expect-couples"
        } else {
            "passing; --expect-couples makes this fail"
        };
        eprintln!("note: nothing to check: {what} ({outcome})");
        if args.expect_couples {
            return EXIT_FINDINGS;
        }
    }
    let failing = report.findings.iter().any(|f| {
        f.severity() == Severity::Error || (args.deny_warnings && f.severity() == Severity::Warning)
    });
    if failing { EXIT_FINDINGS } else { EXIT_OK }
}

//! `couplet check`: validates couple files (and directories of them) for CI, optionally
//! rewriting reactions the balancer balances unambiguously.

use super::{EXIT_FINDINGS, EXIT_OK, EXIT_USAGE};
use couplet::check::consistency::DEFAULT_ADDITIVITY_THRESHOLD_VOLTS;
use couplet::check::load::{
    LoadOptions, expand_paths, load_file_with, looks_like_couple_file, source_from_bytes,
};
use couplet::check::output::{self, Colour};
use couplet::check::{
    CheckOptions, DEFAULT_CHECK_FILE_BYTES, DEFAULT_TOLERANCE_VOLTS, Rule, Severity, check, fix,
};
use couplet::table::FileFormat;
use std::io::{self, IsTerminal, Write};
use std::path::PathBuf;

#[derive(clap::Args)]
pub struct CheckArgs {
    /// Couple files (TOML or CSV) and directories to search for *.toml and *.csv
    #[arg(required = true)]
    paths: Vec<PathBuf>,
    /// Output: human (diagnostics with source lines), json, sarif (SARIF 2.1.0)
    #[arg(long, value_parser = ["human", "json", "sarif"], default_value = "human")]
    format: String,
    /// Rule CPL402: how far two potentials of the same couple may differ, in volts
    #[arg(long, default_value_t = DEFAULT_TOLERANCE_VOLTS, value_parser = parse_tolerance)]
    tolerance: f64,
    /// Rule CPL403: how far a couple's e0 may be from what free-energy addition (a cycle of
    /// three couples, or its acid or base form through pKw) gives, in volts
    #[arg(long, value_name = "VOLTS", default_value_t = DEFAULT_ADDITIVITY_THRESHOLD_VOLTS, value_parser = parse_tolerance)]
    additivity_threshold: f64,
    /// Largest file read, in MiB (default 2048); larger files are reported (CPL106) unread
    #[arg(long, value_name = "MIB", default_value_t = DEFAULT_CHECK_FILE_BYTES >> 20, value_parser = clap::value_parser!(u64).range(1..=1 << 24))]
    max_file_mib: u64,
    /// Rule CPL306: largest difference in volts between e0 and the E° from formation data
    /// (default 0.020); 0 turns the rule off
    #[arg(long, value_name = "VOLTS", value_parser = parse_tolerance)]
    formation_threshold: Option<f64>,
    /// Count warnings as errors for the exit status
    #[arg(long)]
    deny_warnings: bool,
    /// Rule CPL307: refuse couples marked verified = false (values no read source confirms)
    #[arg(long)]
    refuse_unverified: bool,
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

pub fn run(args: &CheckArgs, out: &mut dyn Write) -> io::Result<u8> {
    let found = match expand_paths(&args.paths) {
        Ok(found) => found,
        Err(error) => {
            say!("error: {error}");
            return Ok(EXIT_USAGE);
        }
    };
    let load = LoadOptions {
        max_file_bytes: args.max_file_mib << 20,
    };
    let mut sources = Vec::new();
    let mut paths = Vec::new();
    for (path, under_directory) in found {
        match load_file_with(&path, &load) {
            Ok(source) => {
                if under_directory && !looks_like_couple_file(&source) {
                    continue;
                }
                sources.push(source);
                paths.push(path);
            }
            Err(error) => {
                say!("error: {error}");
                return Ok(EXIT_USAGE);
            }
        }
    }
    let options = CheckOptions {
        tolerance_volts: args.tolerance,
        additivity_threshold_volts: args.additivity_threshold,
        formation: match args.formation_threshold {
            Some(threshold) if threshold <= 0.0 => None,
            Some(threshold) => Some(couplet::check::formation::FormationCheck {
                threshold_volts: threshold,
                ..Default::default()
            }),
            None => Some(Default::default()),
        },
        refuse_unverified: args.refuse_unverified,
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
            // (A file read in pieces keeps no problems: its syntax findings tell.)
            if report
                .findings
                .iter()
                .any(|f| f.file == index && f.rule == Rule::FileSyntax)
            {
                say!("{}: not fixed: the file has syntax errors", source.name);
                continue;
            }
            match fix::apply_source(source, &fixes) {
                Ok(text) => {
                    diff.push_str(&fix::unified_diff(&source.name, &source.file.text, &text));
                    rewritten.push(fix::Rewrite {
                        path: paths[index].clone(),
                        original: source.file.text.clone(),
                        text,
                    });
                }
                Err(error) => {
                    say!("error: {}: {error}", source.name);
                    return Ok(EXIT_USAGE);
                }
            }
        }
        if args.dry_run {
            out.write_all(diff.as_bytes())?;
            // The status is that of the files as --fix would leave them.
            let mut sources: Vec<_> = report.files.clone();
            for rewrite in &rewritten {
                let Some(index) = paths.iter().position(|p| *p == rewrite.path) else {
                    continue;
                };
                let name = sources[index].name.clone();
                sources[index] = source_from_bytes(
                    &name,
                    rewrite.text.as_bytes(),
                    FileFormat::from_path(&rewrite.path),
                );
            }
            let after = check(sources, &options);
            return Ok(status(&after, args.deny_warnings));
        }
        if let Err(error) = fix::write_all(&rewritten) {
            say!("error: {error}; no file was changed");
            return Ok(EXIT_USAGE);
        }
        if !rewritten.is_empty() {
            say!(
                "fixed {} file{}; checking again",
                rewritten.len(),
                if rewritten.len() == 1 { "" } else { "s" }
            );
            let mut sources = Vec::new();
            for path in &paths {
                match load_file_with(path, &load) {
                    Ok(source) => sources.push(source),
                    Err(error) => {
                        say!("error: {error}");
                        return Ok(EXIT_USAGE);
                    }
                }
            }
            report = check(sources, &options);
        }
    }

    // Written piece by piece: a report of a million findings is never held whole. A closed
    // pipe (`| head`) ends the output quietly (the shared writer absorbs it); a failed write
    // is an error (exit 2).
    let stdout = std::io::stdout();
    // NO_COLOR set to anything but the empty string turns colour off.
    let colour_allowed = std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty());
    let colour = if stdout.is_terminal() && colour_allowed {
        Colour::Always
    } else {
        Colour::Never
    };
    let written = match args.format.as_str() {
        "json" => output::write_json(&report, &mut *out),
        "sarif" => output::write_sarif(&report, &mut *out),
        _ => output::write_human(&report, colour, &mut *out),
    };
    written?;
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
        say!("note: nothing to check: {what} ({outcome})");
        if args.expect_couples {
            return Ok(EXIT_FINDINGS);
        }
    }
    Ok(status(&report, args.deny_warnings))
}

/// 1 when the report has errors (or warnings, with `--deny-warnings`), else 0.
fn status(report: &couplet::check::Report, deny_warnings: bool) -> u8 {
    let failing = report.findings.iter().any(|f| {
        f.severity() == Severity::Error || (deny_warnings && f.severity() == Severity::Warning)
    });
    if failing { EXIT_FINDINGS } else { EXIT_OK }
}

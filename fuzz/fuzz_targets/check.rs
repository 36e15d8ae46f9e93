//! Fuzz target: a couple file (TOML or CSV) through the checker, every report format and the
//! rewriter, as `couplet check` and `couplet check --fix` run them. Any text must give findings,
//! never a panic; every finding must point inside the file; a rewrite must read again.
#![no_main]

use couplet::check::output::{Colour, human, json, sarif};
use couplet::check::{CheckOptions, SourceFile, check, fix};
use couplet::table::{CoupleFile, FileFormat};
use libfuzzer_sys::fuzz_target;

#[path = "common.rs"]
mod common;

fuzz_target!(|data: &[u8]| {
    // The first byte picks the format; the rest is the file.
    let Some((mode, text)) = common::mode_and_text(data) else {
        return;
    };
    let (name, format) = if mode % 2 == 0 {
        ("f.toml", FileFormat::Toml)
    } else {
        ("f.csv", FileFormat::Csv)
    };
    let file = SourceFile::new(name, CoupleFile::from_text(text, format));
    let report = check(vec![file.clone()], &CheckOptions::default());
    for finding in &report.findings {
        let (line, column) = report.line_column(finding);
        assert!(line >= 1 && column >= 1, "{line}:{column}");
    }
    let _ = human(&report, Colour::Never);
    let _ = json(&report).to_string();
    let _ = sarif(&report).to_string();
    let fixes = report.fixes_for(0);
    if !fixes.is_empty()
        && let Ok(rewritten) = fix::apply_source(&file, &fixes)
    {
        // The rewritten file is read again without a panic.
        let again = SourceFile::new(name, CoupleFile::from_text(&rewritten, format));
        let _ = check(vec![again], &CheckOptions::default());
    }
});

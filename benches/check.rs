//! `couplet check` on a generated table of 100,000 couples (built-in entries, varied), beside
//! the time to only parse the same text with the toml crate.
//!
//! `COUPLET_BENCH_TABLES=DIR cargo bench --bench check` writes the generated tables of 10,000,
//! 100,000 and 1,000,000 couples to `DIR/gen-10k.toml`, `gen-100k.toml`, `gen-1m.toml` and
//! stops: those are the files the `/usr/bin/time -v couplet check` figures in DEVELOPERS.md
//! were measured on (keep them out of git).

use couplet::check::{CheckOptions, SourceFile, check};
use couplet::notation::parse_equation;
use couplet::reaction::Reaction;
use couplet::table::{CoupleFile, FileFormat};
use criterion::{Criterion, criterion_group, criterion_main};
use num_rational::BigRational;
use std::fmt::Write;
use std::hint::black_box;
use std::time::Duration;

const COUPLES: usize = 100_000;

/// `couples` entries cycling through the built-in table: unique ids, every third reaction
/// written with doubled coefficients (the same couple), e0 moved by up to ±3 mV (inside the
/// default tolerance), every tenth reaction in a literal string.
pub fn generated_table(couples: usize) -> String {
    let builtin = std::fs::read_to_string("data/potentials.toml").expect("data/potentials.toml");
    let table = CoupleFile::from_text(&builtin, FileFormat::Toml);
    let mut text = String::with_capacity(couples * 160);
    text.push_str("# generated for the benchmark from data/potentials.toml\n");
    for k in 0..couples {
        let record = &table.records[k % table.records.len()];
        let reaction = &record.reaction.as_ref().unwrap().value;
        let reaction = if k % 3 == 1 {
            let doubled = Reaction::from_equation(&parse_equation(reaction).unwrap())
                .scaled(&BigRational::from_integer(2.into()));
            doubled.to_string()
        } else {
            reaction.clone()
        };
        let quoted = if k % 10 == 0 {
            format!("'{reaction}'")
        } else {
            format!("\"{reaction}\"")
        };
        let id = &record.id.as_ref().unwrap().value;
        let e0 = record.e0_volts.as_ref().unwrap().value + ((k % 7) as f64 - 3.0) * 0.001;
        let _ = write!(
            text,
            "\n[[couple]]\nid = \"{id}-{k}\"\nreaction = {quoted}\ne0 = {e0:.4}\n"
        );
        if let Some(dedt) = &record.dedt_millivolts_per_kelvin {
            let _ = writeln!(text, "dedt = {}", dedt.value);
        }
        if let Some(medium) = &record.medium {
            let _ = writeln!(text, "medium = \"{}\"", medium.value);
        }
        let _ = writeln!(
            text,
            "source = \"generated from entry {}\"",
            record.index + 1
        );
    }
    text
}

fn bench(c: &mut Criterion) {
    if let Some(dir) = std::env::var_os("COUPLET_BENCH_TABLES") {
        let dir = std::path::PathBuf::from(dir);
        for (name, couples) in [("10k", 10_000), ("100k", 100_000), ("1m", 1_000_000)] {
            let path = dir.join(format!("gen-{name}.toml"));
            std::fs::write(&path, generated_table(couples)).expect("the table is written");
            eprintln!("wrote {}", path.display());
        }
        return;
    }
    let text = generated_table(COUPLES);
    eprintln!(
        "generated {COUPLES} couples, {:.1} MB",
        text.len() as f64 / 1e6
    );
    let mut group = c.benchmark_group("check_100k");
    group.sample_size(10);
    group.measurement_time(Duration::from_secs(20));
    group.bench_function("toml_parse_only", |b| {
        b.iter(|| black_box(toml::from_str::<toml::Table>(black_box(&text)).unwrap()))
    });
    group.bench_function("read_records", |b| {
        b.iter(|| black_box(CoupleFile::from_text(black_box(&text), FileFormat::Toml)))
    });
    group.bench_function("read_in_pieces_and_check", |b| {
        b.iter(|| {
            let file = SourceFile::in_pieces("gen.toml", text.clone(), FileFormat::Toml)
                .expect("the generated table can be cut");
            let report = check(vec![file], &CheckOptions::default());
            black_box(report.findings.len())
        })
    });
    group.bench_function("read_and_check", |b| {
        b.iter(|| {
            let file = SourceFile::new("gen.toml", CoupleFile::from_text(&text, FileFormat::Toml));
            let report = check(vec![file], &CheckOptions::default());
            black_box(report.findings.len())
        })
    });
    // Three entries of 64 species with six-digit subscripts (under 6 KB): each suggestion is
    // stopped at the balancer's work limit.
    let reaction = include_str!("../tests/data/hostile_64_species.txt").trim_end();
    let hostile: String = (0..3)
        .map(|i| {
            format!("[[couple]]\nid = \"h{i}\"\nreaction = \"{reaction}\"\ne0 = 0.1\nsource = \"invented\"\n")
        })
        .collect();
    group.bench_function("three hostile entries, default work limits", |b| {
        b.iter(|| {
            let file = SourceFile::new("h.toml", CoupleFile::from_text(&hostile, FileFormat::Toml));
            black_box(check(vec![file], &CheckOptions::default()).findings.len())
        })
    });
    group.finish();
    let file = SourceFile::new("gen.toml", CoupleFile::from_text(&text, FileFormat::Toml));
    let report = check(vec![file], &CheckOptions::default());
    eprintln!("findings on the generated table: {:?}", report.summary());
}

criterion_group!(benches, bench);
criterion_main!(benches);

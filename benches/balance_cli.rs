//! `couplet balance --json -` at library level: the batch function the command calls
//! (`balance_lines_json`), per equation, and the part after balancing alone (redox analysis,
//! half-reaction split, caution, JSON) over results balanced beforehand. Input: the
//! acid-medium and molecular skeletons of `tests/data/balance_corpus.json`, cycled to 40,000
//! lines; building it stays outside the timed part.

use couplet::balance::{BalanceOptions, Medium, balance_text};
use couplet::export::balance_json::{BalanceJson, balance_lines_json};
use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use std::hint::black_box;

const LINES: usize = 40_000;

/// The corpus inputs the command is usually given in acid: half-reactions, ionic redox and
/// molecular equations written in acid or with no medium.
fn skeletons() -> Vec<String> {
    let corpus: serde_json::Value =
        serde_json::from_str(include_str!("../tests/data/balance_corpus.json")).unwrap();
    corpus
        .as_array()
        .unwrap()
        .iter()
        .filter(|entry| {
            matches!(entry["medium"].as_str(), Some("acid" | "none"))
                && matches!(
                    entry["kind"].as_str(),
                    Some("half" | "redox-ionic" | "molecular")
                )
        })
        .map(|entry| entry["input"].as_str().unwrap().to_owned())
        .collect()
}

fn batch(c: &mut Criterion) {
    let skeletons = skeletons();
    let lines: Vec<&str> = (0..LINES)
        .map(|i| skeletons[i % skeletons.len()].as_str())
        .collect();
    let text = lines.join("\n");
    let options = BalanceOptions {
        medium: Medium::Acid,
        ..BalanceOptions::default()
    };
    let mut group = c.benchmark_group("balance --json batch");
    group.sample_size(10);
    group.throughput(Throughput::Elements(LINES as u64));
    let mut out = Vec::with_capacity(64 << 20);
    group.bench_function("text to JSON lines (balance_lines_json)", |b| {
        b.iter(|| {
            out.clear();
            black_box(balance_lines_json(black_box(&text), &options, &mut out).unwrap())
        })
    });
    // One result per distinct skeleton, written in the order of the lines: the command writes
    // each result right after balancing it, so 40,000 results held at once (over 100 MB of
    // heap) would time memory traffic the command never has.
    let results: Vec<_> = skeletons
        .iter()
        .map(|line| balance_text(line, &options))
        .collect();
    group.bench_function(
        "after balancing: redox, halves, caution, JSON (BalanceJson::write)",
        |b| {
            b.iter(|| {
                out.clear();
                let mut writer = BalanceJson::new();
                for i in 0..LINES {
                    let k = i % results.len();
                    writer.write(&mut out, &skeletons[k], None, options.medium, &results[k]);
                }
                black_box(out.len())
            })
        },
    );
    group.finish();
}

criterion_group!(benches, batch);
criterion_main!(benches);

//! E° and dE°/dT of 100,000 half-reactions from formation data: the built-in table's couples
//! whose species all have data, repeated; reactions are read before the timed part.

use couplet::reaction::Reaction;
use couplet::table::Table;
use couplet::thermo::{FormationData, reaction_thermo};
use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::time::Duration;

const HALF_REACTIONS: usize = 100_000;

fn half_reactions(data: &FormationData) -> Vec<Reaction> {
    let with_data: Vec<Reaction> = Table::builtin()
        .couples()
        .iter()
        .filter(|c| reaction_thermo(&c.reaction, data, None).is_ok())
        .map(|c| c.reaction.clone())
        .collect();
    with_data
        .iter()
        .cycle()
        .take(HALF_REACTIONS)
        .cloned()
        .collect()
}

fn bench(c: &mut Criterion) {
    let data = FormationData::builtin();
    let reactions = half_reactions(data);
    let mut group = c.benchmark_group("thermo");
    group.sample_size(10);
    group.measurement_time(Duration::from_secs(20));
    group.bench_function("e0_and_dedt_100k_half_reactions", |b| {
        b.iter(|| {
            let mut sum = 0.0;
            for reaction in &reactions {
                let thermo = reaction_thermo(black_box(reaction), data, None).unwrap();
                sum +=
                    thermo.e0_volts().unwrap() + thermo.dedt_millivolts_per_kelvin().unwrap_or(0.0);
            }
            black_box(sum)
        })
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);

//! Parsing throughput on a realistic mix of formulas and equations.

use couplet::notation::{parse_equation, parse_species};
use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use std::hint::black_box;

const SPECIES: &[&str] = &[
    "H2O",
    "H+",
    "OH-",
    "e-",
    "MnO4-",
    "Mn2+",
    "Fe3+",
    "Fe2+",
    "SO4^2-",
    "PbSO4(s)",
    "PbO2(s)",
    "Zn(OH)4^2-",
    "Cr2O7^2-",
    "[Fe(CN)6]4-",
    "CuSO4·5H2O",
    "NiOOH",
    "Ni(OH)2(s)",
    "O2(g)",
    "LiCoO2",
    "VO^2+",
    "Hg2Cl2(s)",
    "Ca3(PO4)2",
    "K4[Fe(CN)6]",
    "C6H12O6",
    "NH4NO3",
];

const EQUATIONS: &[&str] = &[
    "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)",
    "PbO2(s) + SO4^2- + 4 H+ + 2 e- -> PbSO4(s) + 2 H2O(l)",
    "Zn(OH)4^2- + 2 e- -> Zn(s) + 4 OH-",
    "Cr2O7^2- + 14 H+ + 6 e- -> 2 Cr3+ + 7 H2O",
    "2 NiOOH + Cd + 2 H2O -> 2 Ni(OH)2 + Cd(OH)2",
];

fn parsing(c: &mut Criterion) {
    let species_count = SPECIES.len() as u64;
    let mut group = c.benchmark_group("parse");
    group.throughput(Throughput::Elements(species_count));
    group.bench_function("species mix", |b| {
        b.iter(|| {
            for text in SPECIES {
                black_box(parse_species(black_box(text)).unwrap());
            }
        })
    });
    let equation_species: u64 = EQUATIONS
        .iter()
        .map(|e| parse_equation(e).unwrap())
        .map(|e| (e.reactants.len() + e.products.len()) as u64)
        .sum();
    group.throughput(Throughput::Elements(equation_species));
    group.bench_function("equation mix (per species)", |b| {
        b.iter(|| {
            for text in EQUATIONS {
                black_box(parse_equation(black_box(text)).unwrap());
            }
        })
    });
    group.finish();
}

criterion_group!(benches, parsing);
criterion_main!(benches);

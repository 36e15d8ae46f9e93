//! Balancing speed: a typical ionic redox equation, the hardest equation of the published
//! corpus, and batch throughput over the corpus skeletons (parsing included, as the command
//! does it). Set-up (reading the texts) stays outside the timed part.

use couplet::balance::{BalanceOptions, ElectronRule, Medium, balance, balance_text};
use couplet::notation::parse_equation;
use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use std::hint::black_box;

/// Corpus redox-45 (permanganate and iron(II) in acid).
const TYPICAL: &str = "MnO4- + Fe2+ -> Mn2+ + Fe3+";
/// Corpus mol-02: nine species, coefficients into the thousands.
const HARDEST: &str = "Fe36Si5 + H3PO4 + K2Cr2O7 -> FePO4 + SiO2 + K3PO4 + CrPO4 + H2O";

/// A mix of corpus skeletons with their media (all with unique answers).
const BATCH: &[(&str, Medium, bool)] = &[
    ("MnO4- + Fe2+ -> Mn2+ + Fe3+", Medium::Acid, false),
    ("Cr2O7^2- + Fe2+ -> Cr3+ + Fe3+", Medium::Acid, false),
    ("MnO4- + Br- -> MnO2 + BrO3-", Medium::Base, false),
    ("Cl2 -> Cl- + ClO3-", Medium::Base, false),
    ("Cu(s) + HNO3(aq) -> Cu2+(aq) + NO(g)", Medium::Acid, false),
    ("MnO4- -> Mn2+", Medium::Acid, true),
    ("CrO4^2- -> Cr(OH)3", Medium::Base, true),
    ("C6H12O6 -> CO2", Medium::Acid, true),
    (
        "K2Cr2O7 + KBr + H2SO4 -> Cr2(SO4)3 + Br2 + K2SO4 + H2O",
        Medium::None,
        false,
    ),
    ("Zn + HNO3 -> NH4NO3 + Zn(NO3)2 + H2O", Medium::None, false),
];

fn options(medium: Medium, half: bool) -> BalanceOptions {
    BalanceOptions {
        medium,
        electrons: if half {
            ElectronRule::Always
        } else {
            ElectronRule::HalfReactions
        },
        ..BalanceOptions::default()
    }
}

fn balancing(c: &mut Criterion) {
    let mut group = c.benchmark_group("balance");
    let typical = parse_equation(TYPICAL).unwrap();
    let acid = options(Medium::Acid, false);
    group.bench_function("typical ionic redox (parsed)", |b| {
        b.iter(|| black_box(balance(black_box(&typical), &acid).unwrap()))
    });
    let hardest = parse_equation(HARDEST).unwrap();
    let none = options(Medium::None, false);
    group.bench_function("hardest corpus equation (parsed)", |b| {
        b.iter(|| black_box(balance(black_box(&hardest), &none).unwrap()))
    });
    // A half-reaction written without e-: the electron-free attempt fails, then e- is added;
    // the reason for the failure is never worked out (it is not reported).
    let half_skeleton = parse_equation("MnO4- -> Mn2+").unwrap();
    group.bench_function("half-reaction without e- (MnO4- -> Mn2+, acid)", |b| {
        b.iter(|| black_box(balance(black_box(&half_skeleton), &acid).unwrap()))
    });
    let told_half = options(Medium::Acid, true);
    group.bench_function("the same with --half", |b| {
        b.iter(|| black_box(balance(black_box(&half_skeleton), &told_half).unwrap()))
    });
    // 64 species with six-digit subscripts (tests/data/hostile_64_species.txt): the default
    // work limit must end it quickly with a limit error.
    let hostile =
        parse_equation(include_str!("../tests/data/hostile_64_species.txt").trim_end()).unwrap();
    group.sample_size(10);
    group.bench_function(
        "hostile 64 species, stopped at the default work limit",
        |b| {
            b.iter(|| {
                let error = balance(black_box(&hostile), &none).unwrap_err();
                assert_eq!(error.kind(), "limit");
            })
        },
    );
    group.sample_size(100);
    group.throughput(Throughput::Elements(BATCH.len() as u64));
    group.bench_function("batch mix, text to balanced", |b| {
        b.iter(|| {
            for (text, medium, half) in BATCH {
                black_box(balance_text(black_box(text), &options(*medium, *half)).unwrap());
            }
        })
    });
    group.finish();
}

criterion_group!(benches, balancing);
criterion_main!(benches);

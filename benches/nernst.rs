//! `CellModel::evaluate_batch` over 10^6 states against a hand-written function of the same
//! formula (the lead–acid cell: E = E° − (RT/2F)·ln(a_w² / (a_H⁴·a_SO4²))), side by side.

use couplet::constants::{FARADAY_COULOMBS_PER_MOL, GAS_CONSTANT_JOULES_PER_MOL_KELVIN};
use couplet::nernst::CellModel;
use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::time::Duration;

const STATES: usize = 1_000_000;

/// The formula written out by hand, with the same input checks the model makes.
fn by_hand(activities: &[f64], temperatures: &[f64], out: &mut [f64]) -> Result<(), usize> {
    let r_over_2f = GAS_CONSTANT_JOULES_PER_MOL_KELVIN / (2.0 * FARADAY_COULOMBS_PER_MOL);
    for (i, ((row, &t), e)) in activities
        .chunks_exact(3)
        .zip(temperatures)
        .zip(out.iter_mut())
        .enumerate()
    {
        let (h, so4, w) = (row[0], row[1], row[2]);
        if !(t > 0.0 && t < f64::INFINITY) || row.iter().any(|a| !(*a > 0.0 && *a < f64::INFINITY))
        {
            return Err(i);
        }
        let h2 = h * h;
        let q = (w * w) / (h2 * h2 * so4 * so4);
        *e = 2.040 - r_over_2f * t * q.ln();
    }
    Ok(())
}

fn nernst(c: &mut Criterion) {
    let model = CellModel::new(
        vec!["H+".into(), "SO4^2-".into(), "H2O".into()],
        vec![-4.0, -2.0, 2.0],
        2.040,
        2.0,
        0.0,
    )
    .unwrap();
    // Set-up outside the timed part: states spread over a discharge-like range.
    let mut activities = Vec::with_capacity(STATES * 3);
    let mut temperatures = Vec::with_capacity(STATES);
    for i in 0..STATES {
        let x = i as f64 / STATES as f64;
        activities.extend_from_slice(&[0.5 + 8.0 * x, 0.2 + 3.0 * x, 0.95 - 0.35 * x]);
        temperatures.push(273.15 + 40.0 * x);
    }
    let mut out = vec![0.0; STATES];
    let mut group = c.benchmark_group("nernst_1e6_states");
    group
        .sample_size(10)
        .measurement_time(Duration::from_secs(3))
        .warm_up_time(Duration::from_secs(1));
    group.bench_function("cell_model_evaluate_batch", |b| {
        b.iter(|| {
            model
                .evaluate_batch(black_box(&activities), black_box(&temperatures), &mut out)
                .unwrap()
        })
    });
    group.bench_function("hand_written", |b| {
        b.iter(|| by_hand(black_box(&activities), black_box(&temperatures), &mut out).unwrap())
    });
    group.finish();
}

criterion_group!(benches, nernst);
criterion_main!(benches);

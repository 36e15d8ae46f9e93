//! A potential–pH predominance diagram from formation data: the whole computation (selecting
//! the species from the built-in rows, free energies at T, one clipped polygon per species,
//! boundaries balanced by the exact balancer, triple points). Boron with its gases has 20
//! species in the built-in CRC data, iron 7; the data are loaded outside the timed part.

use couplet::elements::Element;
use couplet::predominance::{Conditions, Request, Window, diagram};
use couplet::thermo::FormationData;
use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;

fn request(symbol: &str, gases: bool, temperature: f64) -> Request<'static> {
    Request {
        element: Element::from_symbol(symbol).expect("an element"),
        conditions: Conditions {
            gas_pressure_bar: gases.then_some(1.0),
            temperature_kelvin: temperature,
            ..Conditions::default()
        },
        window: Window::default(),
        exclude: Vec::new(),
        data: FormationData::builtin(),
    }
}

fn bench(c: &mut Criterion) {
    let cases = [
        (
            "boron, 20 species with gases, 25 C",
            request("B", true, 298.15),
        ),
        ("iron, 7 species, 25 C", request("Fe", false, 298.15)),
        (
            "iron, 6 species (Fe(OH)2+ has no ΔfH° for 80 C), 80 C",
            request("Fe", false, 353.15),
        ),
    ];
    for (name, case) in &cases {
        let species = diagram(case).expect("a diagram").species.len();
        assert!(species >= 6, "{name}: {species} species");
        c.bench_function(&format!("stability diagram, {name}"), |b| {
            b.iter(|| diagram(black_box(case)).expect("a diagram"))
        });
    }
}

criterion_group!(benches, bench);
criterion_main!(benches);

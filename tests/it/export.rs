//! Exported Q and E code: Python (standard library), C99 and Rust are run at several states and
//! must agree with the built-in evaluation to 1e-12 relative.

use couplet::export::{Emit, Export, argument_name};
use couplet::nernst::CellModel;
use couplet::notation::parse_species;
use couplet::quotient::{Quotient, QuotientOptions};
use couplet::reaction::Reaction;
use std::path::{Path, PathBuf};
use std::process::Command;

const REACTION: &str = "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)";
const STATES: [([f64; 3], f64); 4] = [
    ([0.1, 1e-3, 0.02], 298.15),
    ([1.0, 1.0, 1.0], 310.0),
    ([1e-5, 0.5, 3.0], 280.0),
    ([0.37, 2.5e-7, 1e-4], 350.0),
];

fn setup() -> (Quotient, CellModel) {
    let r = Reaction::from_equation(&REACTION.parse().unwrap());
    let q = Quotient::new(&r, &QuotientOptions::default());
    // E° = 1.507 V (Harris, Quantitative Chemical Analysis, App. H); dE°/dT here is invented
    // for the test (−0.66 mV/K) so the temperature term is exercised.
    let model = CellModel::from_quotient(&q, 1.507, 5.0, -0.00066).unwrap();
    (q, model)
}

fn render(format: Emit) -> String {
    let (q, model) = setup();
    Export {
        reaction: REACTION.into(),
        quotient: &q,
        model: &model,
        source: "Harris App. H (test)".into(),
    }
    .render(format)
}

fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("couplet-export-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir.join(name)
}

fn compare(output: &str) {
    let (_, model) = setup();
    let values: Vec<f64> = output
        .split_whitespace()
        .map(|v| v.parse().unwrap())
        .collect();
    assert_eq!(values.len(), STATES.len());
    for ((a, t), got) in STATES.iter().zip(values) {
        let want = model.evaluate(a, *t).unwrap();
        assert!(((got - want) / want).abs() <= 1e-12, "{got} vs {want}");
    }
}

fn run(command: &mut Command) -> String {
    let output = command.output().expect("tool runs");
    assert!(
        output.status.success(),
        "{}",
        String::from_utf8_lossy(&output.stderr)
    );
    String::from_utf8(output.stdout).unwrap()
}

#[test]
fn argument_names_are_identifiers_derived_from_species() {
    for (species, name) in [
        ("MnO4-", "a_MnO4_minus"),
        ("Fe3+", "a_Fe_3plus"),
        ("H+", "a_H_plus"),
        ("SO4^2-", "a_SO4_2minus"),
        ("Zn(OH)4^2-", "a_Zn_OH_4_2minus"),
        ("[Fe(CN)6]4-", "a_Fe_CN_6_4minus"),
        ("H2O(l)", "a_H2O"),
        ("O2(g)", "a_O2"),
    ] {
        assert_eq!(argument_name(&parse_species(species).unwrap()), name);
    }
}

#[test]
fn python_export_runs_with_the_standard_library() {
    let path = scratch("cell.py");
    let mut code = render(Emit::Python);
    code.push_str("\nfor args, t in [\n");
    for (a, t) in STATES {
        code.push_str(&format!(
            "    (({:?}, {:?}, {:?}), {:?}),\n",
            a[0], a[1], a[2], t
        ));
    }
    code.push_str("]:\n    print(repr(potential_volts(*args, temperature_K=t)))\n");
    std::fs::write(&path, code).unwrap();
    compare(&run(Command::new("python3").arg("-I").arg(&path)));
}

#[test]
fn c_export_compiles_strictly_and_agrees() {
    let source = scratch("cell.c");
    let mut code = render(Emit::C);
    code.push_str("\n#include <stdio.h>\nint main(void)\n{\n");
    for (a, t) in STATES {
        code.push_str(&format!(
            "    printf(\"%.17g\\n\", couplet_potential_volts({:e}, {:e}, {:e}, {:e}));\n",
            a[0], a[1], a[2], t
        ));
    }
    code.push_str("    return 0;\n}\n");
    std::fs::write(&source, code).unwrap();
    let binary = scratch("cell-c");
    run(Command::new("cc")
        .args(["-std=c99", "-Wall", "-Werror", "-o"])
        .arg(&binary)
        .arg(&source)
        .arg("-lm"));
    compare(&run(&mut Command::new(&binary)));
}

#[test]
fn rust_export_compiles_and_agrees() {
    let source = scratch("cell.rs");
    let mut code = render(Emit::Rust);
    code.push_str("\nfn main() {\n");
    for (a, t) in STATES {
        code.push_str(&format!(
            "    println!(\"{{:e}}\", potential_volts({:e}, {:e}, {:e}, {:e}));\n",
            a[0], a[1], a[2], t
        ));
    }
    code.push_str("}\n");
    std::fs::write(&source, code).unwrap();
    let binary = scratch("cell-rs");
    let rustc = std::env::var("RUSTC").unwrap_or_else(|_| "rustc".into());
    run(Command::new(rustc)
        .args(["--edition", "2021", "-O", "-o"])
        .arg(&binary)
        .arg(&source));
    compare(&run(&mut Command::new(&binary)));
}

#[test]
fn json_and_text_give_the_structure() {
    let json: serde_json::Value = serde_json::from_str(&render(Emit::Json)).unwrap();
    assert_eq!(json["species"][1]["argument"], "a_H_plus");
    assert_eq!(json["species"][1]["exponent"], -8.0);
    assert_eq!(json["species"][1]["activity"], "molality");
    assert_eq!(json["n"], 5.0);
    let text = render(Emit::Text);
    assert!(text.contains("Q = a(Mn2+) / (a(MnO4-)·a(H+)^8)"));
    let latex = render(Emit::Latex);
    assert!(latex.contains("\\frac{a_{\\ce{Mn^2+}}}"), "{latex}");
    assert!(Path::new(&scratch("x")).parent().is_some());
}

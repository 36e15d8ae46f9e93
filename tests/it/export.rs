//! Exported Q and E code: Python (standard library), C99 and Rust are run at several states and
//! must agree with the built-in evaluation to 1e-12 relative.

use couplet::activity::{ActivityModel, GammaModel, Solution};
use couplet::export::{Emit, Export, ExportError, InputKind, MolalityForm, argument_name};
use couplet::nernst::CellModel;
use couplet::nernst::{Conditions, Standard, evaluate};
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
        molality: None,
        caution: None,
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
    // E = E° + (dE°/dT)(T − T°) with dE°/dT = −0.66 mV/K: written as a minus, never "- -".
    assert!(
        latex.contains("E &= 1.507 - 0.00066\\,(T - 298.15)"),
        "{latex}"
    );
    assert!(Path::new(&scratch("x")).parent().is_some());
}

/// One E(molalities, T) export: the reaction, its E° (V), n, dE°/dT (V/K), the γ model and the
/// composition given to couplet (which decides the ions that count for I besides those of Q).
struct MolalityCase {
    reaction: &'static str,
    e0_volts: f64,
    electrons: f64,
    dedt_volts_per_kelvin: f64,
    model: GammaModel,
    composition: &'static [(&'static str, f64)],
}

impl MolalityCase {
    fn parts(&self) -> (Reaction, Quotient, CellModel, MolalityForm) {
        let r = Reaction::from_equation(&self.reaction.parse().unwrap());
        let q = Quotient::new(&r, &QuotientOptions::default());
        let model = CellModel::from_quotient(
            &q,
            self.e0_volts,
            self.electrons,
            self.dedt_volts_per_kelvin,
        )
        .unwrap();
        let amounts: Vec<_> = self
            .composition
            .iter()
            .map(|(s, m)| (parse_species(s).unwrap(), *m))
            .collect();
        let solution = Solution::from_amounts(&amounts).unwrap();
        let form = MolalityForm::new(&q, ActivityModel::new(self.model), Some(&solution)).unwrap();
        (r, q, model, form)
    }

    fn render(&self, format: Emit) -> String {
        let (_, q, model, form) = self.parts();
        Export {
            reaction: self.reaction.into(),
            quotient: &q,
            model: &model,
            source: "test".into(),
            molality: Some(form),
            caution: None,
        }
        .render(format)
    }

    /// The built-in evaluation of one state: values in the order of the generated arguments.
    fn expected(&self, values: &[f64], temperature_kelvin: f64) -> f64 {
        let (r, _, _, form) = self.parts();
        let mut conditions = Conditions::standard();
        conditions.temperature_kelvin = temperature_kelvin;
        conditions.model = ActivityModel::new(self.model);
        for (input, value) in form.inputs.iter().zip(values) {
            let entry = (input.species.clone(), *value);
            match input.kind {
                InputKind::Solute { .. } | InputKind::Spectator { .. } => {
                    conditions.amounts.push(entry)
                }
                InputKind::Gas => conditions.pressures_bar.push(entry),
                InputKind::Water => conditions.activities.push(entry),
            }
        }
        let standard = Standard {
            reaction: &r,
            e0_volts: self.e0_volts,
            electrons: self.electrons,
            de0_dt_volts_per_kelvin: Some(self.dedt_volts_per_kelvin),
        };
        evaluate(&standard, &conditions).unwrap().e_volts().unwrap()
    }

    /// Runs the generated code of every language at `states` and compares each E with the
    /// built-in evaluation to 1e-12 relative.
    fn check(&self, tag: &str, states: &[(&[f64], f64)]) {
        let args = |values: &[f64], t: f64| {
            values
                .iter()
                .chain([t].iter())
                .map(|v| format!("{v:e}"))
                .collect::<Vec<_>>()
                .join(", ")
        };
        let mut py = self.render(Emit::Python);
        let mut c = self.render(Emit::C);
        c.push_str("\n#include <stdio.h>\nint main(void)\n{\n");
        let mut rs = self.render(Emit::Rust);
        rs.push_str("\nfn main() {\n");
        for (values, t) in states {
            let a = args(values, *t);
            py.push_str(&format!(
                "print(repr(potential_from_molalities_volts({a})))\n"
            ));
            c.push_str(&format!(
                "    printf(\"%.17g\\n\", couplet_potential_from_molalities_volts({a}));\n"
            ));
            rs.push_str(&format!(
                "    println!(\"{{:e}}\", potential_from_molalities_volts({a}));\n"
            ));
        }
        c.push_str("    return 0;\n}\n");
        rs.push_str("}\n");
        let py_path = scratch(&format!("{tag}.py"));
        std::fs::write(&py_path, py).unwrap();
        let c_path = scratch(&format!("{tag}.c"));
        std::fs::write(&c_path, c).unwrap();
        let c_bin = scratch(&format!("{tag}-c"));
        run(Command::new("cc")
            .args(["-std=c99", "-Wall", "-Werror", "-o"])
            .arg(&c_bin)
            .arg(&c_path)
            .arg("-lm"));
        let rs_path = scratch(&format!("{tag}.rs"));
        std::fs::write(&rs_path, rs).unwrap();
        let rs_bin = scratch(&format!("{tag}-rs"));
        let rustc = std::env::var("RUSTC").unwrap_or_else(|_| "rustc".into());
        run(Command::new(rustc)
            .args(["--edition", "2021", "-o"])
            .arg(&rs_bin)
            .arg(&rs_path));
        for output in [
            run(Command::new("python3").arg("-I").arg(&py_path)),
            run(&mut Command::new(&c_bin)),
            run(&mut Command::new(&rs_bin)),
        ] {
            let got: Vec<f64> = output
                .split_whitespace()
                .map(|v| v.parse().unwrap())
                .collect();
            assert_eq!(got.len(), states.len());
            for ((values, t), got) in states.iter().zip(got) {
                let want = self.expected(values, *t);
                assert!(
                    ((got - want) / want).abs() <= 1e-12,
                    "{tag} {values:?} {t}: {got} vs {want}"
                );
            }
        }
    }

    fn names(&self) -> Vec<String> {
        self.parts()
            .3
            .inputs
            .iter()
            .map(|i| i.name.clone())
            .collect()
    }
}

// E° values: Harris, Quantitative Chemical Analysis, App. H (Cu2+/Cu 0.339, Zn2+/Zn −0.762,
// MnO4-/Mn2+ 1.507, O2/H2O 1.229). The dE°/dT values are invented for the tests so that the
// temperature term is exercised.
const DANIELL_DAVIES: MolalityCase = MolalityCase {
    reaction: "Cu2+ + Zn(s) -> Cu(s) + Zn2+",
    e0_volts: 1.101,
    electrons: 2.0,
    dedt_volts_per_kelvin: -0.000108,
    model: GammaModel::Davies,
    composition: &[("ZnSO4", 0.01), ("CuSO4", 0.02)],
};

#[test]
fn davies_export_counts_spectator_ions_and_agrees_with_the_library() {
    assert_eq!(
        DANIELL_DAVIES.names(),
        ["m_Cu_2plus", "m_Zn_2plus", "m_SO4_2minus"]
    );
    let header = DANIELL_DAVIES.render(Emit::Python);
    assert!(header.contains("over Cu2+, Zn2+, SO4^2-"), "{header}");
    assert!(!header.contains("was inferred there"));
    DANIELL_DAVIES.check(
        "daniell-davies",
        &[
            (&[0.02, 0.01, 0.03], 298.15),
            (&[0.1, 1e-3, 0.101], 310.0),
            // Charges unbalanced: the counter-ion term counts in both.
            (&[0.05, 0.05, 0.01], 280.0),
            (&[1e-4, 0.12, 0.05], 350.0),
        ],
    );
}

#[test]
fn extended_export_with_water_and_an_inferred_counter_ion_agrees() {
    let case = MolalityCase {
        reaction: "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)",
        e0_volts: 1.507,
        electrons: 5.0,
        dedt_volts_per_kelvin: -0.00066,
        model: GammaModel::Extended,
        composition: &[("MnO4-", 0.001), ("H+", 0.01), ("Mn2+", 0.002)],
    };
    assert_eq!(
        case.names(),
        ["m_MnO4_minus", "m_H_plus", "m_Mn_2plus", "a_H2O"]
    );
    let header = case.render(Emit::C);
    assert!(header.contains("was inferred there"), "{header}");
    assert!(header.contains("MnO4- 3.5, H+ 9, Mn2+ 6"), "{header}");
    case.check(
        "mno4-extended",
        &[
            (&[0.001, 0.01, 0.002, 1.0], 298.15),
            (&[0.02, 0.05, 1e-3, 0.98], 320.0),
            (&[1e-5, 1e-3, 0.01, 0.999], 275.0),
        ],
    );
}

#[test]
fn debye_huckel_export_with_a_gas_and_ideal_export_agree() {
    let mut case = MolalityCase {
        reaction: "O2(g) + 4 H+ + 4 e- -> 2 H2O(l)",
        e0_volts: 1.229,
        electrons: 4.0,
        dedt_volts_per_kelvin: -0.00085,
        model: GammaModel::DebyeHuckel,
        composition: &[("HCl", 0.001)],
    };
    assert_eq!(case.names(), ["p_O2", "m_H_plus", "m_Cl_minus", "a_H2O"]);
    case.check(
        "o2-limiting",
        &[
            (&[0.21, 0.001, 0.001, 1.0], 298.15),
            (&[1.0, 0.005, 0.004, 0.99], 330.0),
            (&[2.5, 1e-4, 2e-3, 1.0], 290.0),
        ],
    );
    // Ideal: γ = 1, so only the species of Q are arguments.
    case.model = GammaModel::Ideal;
    assert_eq!(case.names(), ["p_O2", "m_H_plus", "a_H2O"]);
    case.check(
        "o2-ideal",
        &[(&[0.21, 0.1, 1.0], 298.15), (&[3.0, 2.0, 0.8], 360.0)],
    );
}

#[test]
fn molality_export_is_refused_where_there_is_no_closed_form() {
    let r = Reaction::from_equation(&"Cu2+ + Zn(s) -> Cu(s) + Zn2+".parse().unwrap());
    let q = Quotient::new(&r, &QuotientOptions::default());
    assert_eq!(
        MolalityForm::new(&q, ActivityModel::new(GammaModel::Table), None),
        Err(ExportError::NoClosedForm)
    );
    // The extended law needs an ion size; Kielland 1937 lists none for VO2+.
    let r = Reaction::from_equation(&"VO2+ + 2 H+ + e- -> VO^2+ + H2O(l)".parse().unwrap());
    let q = Quotient::new(&r, &QuotientOptions::default());
    let error = MolalityForm::new(&q, ActivityModel::new(GammaModel::Extended), None).unwrap_err();
    assert!(
        error.to_string().contains("no ion size known for VO2+"),
        "{error}"
    );
}

#[test]
fn python_molality_export_refuses_ionic_strength_beyond_the_model() {
    let mut py = DANIELL_DAVIES.render(Emit::Python);
    // Davies is documented to I <= 0.5 mol/kg; 0.3 mol/kg CuSO4 + 0.3 ZnSO4 gives I = 2.4.
    py.push_str(
        "try:\n    potential_from_molalities_volts(0.3, 0.3, 0.6)\nexcept ValueError as e:\n    print(e)\n",
    );
    let path = scratch("range.py");
    std::fs::write(&path, py).unwrap();
    let out = run(Command::new("python3").arg("-I").arg(&path));
    assert!(out.contains("ionic strength beyond"), "{out}");
}

/// Standard output of the binary.
fn stdout_of(args: &[&str]) -> String {
    let output = Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
        .args(args)
        .output()
        .unwrap();
    assert!(
        output.status.success(),
        "{}",
        String::from_utf8_lossy(&output.stderr)
    );
    String::from_utf8(output.stdout).unwrap()
}

const DANIELL: [&str; 11] = [
    "cell",
    "--cathode",
    "Cu2+/Cu",
    "--anode",
    "Zn2+/Zn",
    "--gamma",
    "davies",
    "--molality",
    "ZnSO4=0.01",
    "--molality",
    "CuSO4=0.02",
];

/// The text people read and the code they paste. The numbers in them are checked against
/// sources and against the library elsewhere in this file and in nernst.rs; these pin the layout.
#[test]
fn snapshots_of_the_report_the_ph_line_and_every_export() {
    insta::assert_snapshot!("cell_report_with_composition", stdout_of(&DANIELL));
    let csv = stdout_of(&["ph-line", "MnO4-/Mn2+", "--from", "0", "--to", "14"]);
    let head: Vec<&str> = csv.lines().take(6).collect();
    insta::assert_snapshot!("ph_line_csv_head", head.join("\n"));
    for format in ["text", "latex", "json", "python", "c", "rust"] {
        let mut args = DANIELL.to_vec();
        args.extend(["--emit", format]);
        insta::assert_snapshot!(format!("daniell_emit_{format}"), stdout_of(&args));
    }
}

#[test]
fn every_export_of_a_hazardous_cell_carries_the_caution() {
    // The lead–acid cell involves lead (toxic: common practice of the trade); code pasted into a
    // simulation keeps the caution as a comment in that language.
    let lead_acid = ["cell", "--cathode", "PbO2/PbSO4", "--anode", "PbSO4/Pb"];
    for (format, comment) in [
        ("python", "# "),
        ("c", "// "),
        ("rust", "// "),
        ("latex", "% "),
        ("text", ""),
    ] {
        let mut args = lead_acid.to_vec();
        args.extend(["--emit", format]);
        let out = stdout_of(&args);
        assert!(
            out.lines()
                .any(|line| line.starts_with(&format!("{comment}caution: involves lead"))),
            "{format}:\n{out}"
        );
    }
    let mut args = lead_acid.to_vec();
    args.extend(["--emit", "json"]);
    let json: serde_json::Value = serde_json::from_str(&stdout_of(&args)).unwrap();
    assert!(json["caution"].as_str().unwrap().contains("lead"), "{json}");
    let mut args = DANIELL.to_vec();
    args.extend(["--emit", "json"]);
    let json: serde_json::Value = serde_json::from_str(&stdout_of(&args)).unwrap();
    assert!(json["caution"].is_null(), "{json}");
}

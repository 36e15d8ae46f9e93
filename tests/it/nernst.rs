//! Reaction quotient and Nernst potential, checked against published values and textbook
//! relations; every outside number names its source beside it.

use couplet::activity::{ActivityModel, GammaModel};
use couplet::nernst::{
    CellModel, Conditions, NernstError, Standard, evaluate, ph_line, slope_volts_per_decade,
};
use couplet::notation::{Species, parse_species};
use couplet::quotient::{ActivityKind, Phase, Quotient, QuotientOptions, phase_of};
use couplet::reaction::Reaction;

fn reaction(text: &str) -> Reaction {
    Reaction::from_equation(&text.parse().unwrap())
}

fn species(text: &str) -> Species {
    parse_species(text).unwrap()
}

/// E of `text` (E° in V, n) at 298.15 K with the given activities and molalities.
fn e_at(text: &str, e0: f64, n: f64, conditions: Conditions) -> Result<f64, NernstError> {
    let r = reaction(text);
    let couple = Standard {
        reaction: &r,
        e0_volts: e0,
        electrons: n,
        de0_dt_volts_per_kelvin: None,
    };
    evaluate(&couple, &conditions)?.e_volts()
}

fn with_activities(pairs: &[(&str, f64)]) -> Conditions {
    let mut c = Conditions::standard();
    c.activities = pairs.iter().map(|(s, a)| (species(s), *a)).collect();
    c
}

fn check_expression(text: &str, expected: &str) {
    let q = Quotient::new(&reaction(text), &QuotientOptions::default());
    assert_eq!(q.expression(), expected, "{text}");
}

#[test]
fn quotient_text_leaves_out_electrons_solids_and_solvent() {
    // The form the issue asks for, from DOMAIN.md: Q = Π a_i^ν_i, products over reactants.
    check_expression(
        "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)",
        "Q = a(Mn2+) / (a(MnO4-)·a(H+)^8)",
    );
    check_expression("AgCl(s) + e- -> Ag(s) + Cl-", "Q = a(Cl-)");
    check_expression("Zn2+ + 2 e- -> Zn", "Q = 1 / a(Zn2+)");
    check_expression("O2(g) + 4 H+ + 4 e- -> 2 H2O", "Q = 1 / (a(O2)·a(H+)^4)");
    check_expression(
        "PbO2(s) + Pb(s) + 4 H+ + 2 SO4^2- -> 2 PbSO4(s) + 2 H2O(l)",
        "Q = 1 / (a(H+)^4·a(SO4^2-)^2)",
    );
}

#[test]
fn unlabelled_species_get_documented_defaults_and_say_so() {
    for (text, phase) in [
        ("Zn", Phase::Solid),
        ("I2", Phase::Solid),
        ("Hg", Phase::PureLiquid),
        ("Br2", Phase::PureLiquid),
        ("Cl2", Phase::Gas),
        ("H2", Phase::Gas),
        ("Fe3+", Phase::Solute),
        ("H2O", Phase::Solvent),
        ("H2O2", Phase::Solute),
        ("PbSO4", Phase::Solid),
    ] {
        let (found, note) = phase_of(&species(text));
        assert_eq!(found, phase, "{text}");
        assert!(
            note.is_some_and(|n| n.contains(text)),
            "{text} must report its assumption"
        );
    }
    // A label wins over any default, with nothing to report.
    assert_eq!(phase_of(&species("Br2(aq)")), (Phase::Solute, None));
}

#[test]
fn nernst_slope_is_59_16_mv_per_decade_per_electron() {
    // (RT/F)·ln 10 = 59.16 mV at 298.15 K from exact SI constants (DOMAIN.md; CODATA 2018).
    assert!((slope_volts_per_decade(298.15) * 1e3 - 59.16).abs() < 0.005);
    // One decade of Q moves E by 59.16/n mV.
    for (text, n, ox) in [
        ("Fe3+ + e- -> Fe2+", 1.0, "Fe3+"),
        ("Cu2+ + 2 e- -> Cu(s)", 2.0, "Cu2+"),
    ] {
        let mut pairs = vec![(ox, 0.01)];
        if n == 1.0 {
            pairs.push(("Fe2+", 0.01));
        }
        let e1 = e_at(text, 0.0, n, with_activities(&pairs)).unwrap();
        pairs[0].1 = 0.1;
        let e2 = e_at(text, 0.0, n, with_activities(&pairs)).unwrap();
        assert!(((e2 - e1) * 1e3 - 59.16 / n).abs() < 0.005, "{text}");
    }
}

#[test]
fn a_concentration_cell_gives_the_log_ratio() {
    // Cu | Cu2+ (0.001) || Cu2+ (0.1) | Cu: E = (RT/2F)·ln(0.1/0.001) = 59.16 mV (textbook
    // concentration cell, e.g. Bard & Faulkner, Electrochemical Methods 2nd ed. §2.1; ideal
    // activities as in that example).
    let half = "Cu2+ + 2 e- -> Cu(s)";
    let cathode = e_at(half, 0.339, 2.0, with_activities(&[("Cu2+", 0.1)])).unwrap();
    let anode = e_at(half, 0.339, 2.0, with_activities(&[("Cu2+", 0.001)])).unwrap();
    assert!(((cathode - anode) * 1e3 - 59.16).abs() < 0.01);
}

#[test]
fn silver_chloride_electrode_in_decimolar_kcl() {
    // E°(AgCl/Ag) = 0.22233 V (CRC Handbook electrochemical series, Vanýsek; Bates & Bower 1954,
    // J. Res. NBS 53, 283 give 0.22234). Ag/AgCl in 0.1 M KCl = 0.2881 V vs SHE (Meites,
    // Handbook of Analytical Chemistry 1963, via the project's reference-electrode table).
    // γ±(KCl, 0.1 mol/kg) = 0.770 from the table model (CRC). 0.1 mol/L KCl is 0.1003 mol/kg
    // (from memory); the difference moves E by 0.08 mV and is ignored.
    let mut conditions = Conditions::standard();
    conditions.amounts = vec![(species("KCl"), 0.1)];
    conditions.model = ActivityModel::new(GammaModel::Table);
    let e = e_at("AgCl(s) + e- -> Ag(s) + Cl-", 0.22233, 1.0, conditions).unwrap();
    assert!((e - 0.2881).abs() < 0.001, "E = {e}");
    // At unit chloride activity the electrode sits at E° itself.
    let e = e_at(
        "AgCl(s) + e- -> Ag(s) + Cl-",
        0.22233,
        1.0,
        with_activities(&[("Cl-", 1.0)]),
    )
    .unwrap();
    assert_eq!(e, 0.22233);
}

#[test]
fn bad_values_are_errors_naming_the_species() {
    let text = "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)";
    for bad in [0.0, -1.0, f64::NAN, f64::INFINITY] {
        let c = with_activities(&[("MnO4-", 0.1), ("H+", bad), ("Mn2+", 0.1)]);
        let error = e_at(text, 1.507, 5.0, c).unwrap_err().to_string();
        assert!(
            error.contains("H+") && error.contains("finite positive"),
            "{error}"
        );
    }
    let error = e_at(
        text,
        1.507,
        5.0,
        with_activities(&[("MnO4-", 0.1), ("H+", 1.0)]),
    )
    .unwrap_err();
    assert!(
        matches!(&error, NernstError::Missing { species, .. } if species == "Mn2+"),
        "{error}"
    );
    let error = e_at(text, 1.507, 5.0, with_activities(&[("Fe3+", 0.1)])).unwrap_err();
    assert!(error.to_string().contains("Fe3+"));
    let mut c = with_activities(&[("MnO4-", 0.1), ("H+", 1.0), ("Mn2+", 0.1)]);
    c.temperature_kelvin = -3.0;
    assert!(e_at(text, 1.507, 5.0, c).is_err());
}

#[test]
fn ph_line_slope_is_m_over_n_times_59_16_mv() {
    // dE/dpH = −(m/n)·(RT/F)·ln 10 (DOMAIN.md §Nernst): permanganate m = 8, n = 5.
    let r = reaction("MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)");
    let couple = Standard {
        reaction: &r,
        e0_volts: 1.507,
        electrons: 5.0,
        de0_dt_volts_per_kelvin: None,
    };
    let (points, assumptions) = ph_line(&couple, &Conditions::standard(), 0.0, 14.0, 1.0).unwrap();
    assert_eq!(points.len(), 15);
    assert_eq!(points[0].e_volts, 1.507);
    let slope = (points[14].e_volts - points[0].e_volts) / 14.0;
    assert!((slope * 1e3 + 8.0 / 5.0 * 59.1593).abs() < 1e-3);
    assert!(assumptions.iter().any(|a| a.contains("MnO4-")));
    // In base, OH- from Kw: O2 + 2 H2O + 4 e- -> 4 OH- falls 59.16 mV per pH as well.
    let r = reaction("O2(g) + 2 H2O(l) + 4 e- -> 4 OH-");
    let couple = Standard {
        reaction: &r,
        e0_volts: 0.401,
        electrons: 4.0,
        de0_dt_volts_per_kelvin: None,
    };
    let (points, _) = ph_line(&couple, &Conditions::standard(), 7.0, 14.0, 7.0).unwrap();
    assert!(((points[1].e_volts - points[0].e_volts) / 7.0 * 1e3 + 59.1593).abs() < 1e-3);
    // At pH 14 the base couple is near its E° (a(OH-) = Kw·10^14 ≈ 1.01, pKw 13.995).
    assert!((points[1].e_volts - 0.401).abs() < 0.001);
}

#[test]
fn ph_sets_hydroxide_through_kw() {
    let text = "O2(g) + 2 H2O(l) + 4 e- -> 4 OH-";
    let r = reaction(text);
    let couple = Standard {
        reaction: &r,
        e0_volts: 0.401,
        electrons: 4.0,
        de0_dt_volts_per_kelvin: None,
    };
    let mut c = Conditions::standard();
    c.ph = Some(12.0);
    c.pressures_bar = vec![(species("O2"), 0.21)];
    let result = evaluate(&couple, &c).unwrap();
    let oh = result.factors.iter().find(|f| f.species == "OH-").unwrap();
    assert_eq!(oh.kind, ActivityKind::Given);
    // pKw = 13.995 at 25 °C (Bandura & Lvov 2006, J. Phys. Chem. Ref. Data 35, 15, Table; from memory).
    assert!((oh.value.unwrap().log10() - (12.0 - 13.995)).abs() < 0.002);
    let o2 = result
        .factors
        .iter()
        .find(|f| f.species == "O2(g)")
        .unwrap();
    assert_eq!((o2.kind, o2.value), (ActivityKind::Pressure, Some(0.21)));
}

#[test]
fn compiled_model_matches_the_evaluation_and_checks_each_state() {
    let r = reaction("MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)");
    let q = Quotient::new(&r, &QuotientOptions::default());
    let model = CellModel::from_quotient(&q, 1.507, 5.0, 0.0).unwrap();
    assert_eq!(model.species(), ["MnO4-", "H+", "Mn2+"]);
    assert_eq!(model.exponents(), [-1.0, -8.0, 1.0]);
    let states = [[0.1, 1e-3, 0.02], [1.0, 1.0, 1.0], [1e-5, 0.5, 3.0]];
    let mut flat = Vec::new();
    let mut expected = Vec::new();
    for s in states {
        flat.extend_from_slice(&s);
        let couple = Standard {
            reaction: &r,
            e0_volts: 1.507,
            electrons: 5.0,
            de0_dt_volts_per_kelvin: None,
        };
        let c = with_activities(&[("MnO4-", s[0]), ("H+", s[1]), ("Mn2+", s[2])]);
        expected.push(evaluate(&couple, &c).unwrap().e_volts().unwrap());
    }
    let mut out = [0.0; 3];
    model.evaluate_batch(&flat, &[298.15; 3], &mut out).unwrap();
    for (got, want) in out.iter().zip(&expected) {
        assert!((got - want).abs() <= 1e-12 * want.abs(), "{got} vs {want}");
    }
    flat[4] = -2.0;
    let error = model
        .evaluate_batch(&flat, &[298.15; 3], &mut out)
        .unwrap_err()
        .to_string();
    assert!(error.contains("state 1") && error.contains("H+"), "{error}");
    // Extreme Q does not overflow: ln Q is summed when the product leaves the f64 range.
    let e = model.evaluate(&[1e-300, 1e-300, 1e300], 298.15).unwrap();
    assert!(e.is_finite());
}

mod cli {
    //! `couplet cell` with a composition, and `couplet ph-line`, through the binary.
    use std::process::Command;

    fn couplet(args: &[&str]) -> (i32, String, String) {
        let output = Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
            .args(args)
            .output()
            .unwrap();
        (
            output.status.code().unwrap_or(-1),
            String::from_utf8(output.stdout).unwrap(),
            String::from_utf8(output.stderr).unwrap(),
        )
    }

    #[test]
    fn cell_json_gains_quotient_potential_model_and_assumptions() {
        // Daniell cell at a(Cu2+) = 0.1, a(Zn2+) = 0.001: E = E° + (RT/2F)·ln 100 = E° + 59.16 mV.
        let (code, out, err) = couplet(&[
            "cell",
            "--cathode",
            "Cu2+/Cu",
            "--anode",
            "Zn2+/Zn",
            "--activity",
            "Cu2+=0.1",
            "--activity",
            "Zn2+=0.001",
            "--json",
        ]);
        assert_eq!(code, 0, "{err}");
        let json: serde_json::Value = serde_json::from_str(&out).unwrap();
        assert_eq!(json["quotient"]["expression"], "Q = a(Zn2+) / a(Cu2+)");
        let e0 = json["e0_V"].as_f64().unwrap();
        assert!((json["e_V"].as_f64().unwrap() - e0 - 0.05916).abs() < 1e-5);
        assert_eq!(json["gamma_model"], "ideal");
        assert!(json["assumptions"].is_array());
        let factors = json["quotient"]["factors"].as_array().unwrap();
        assert!(
            factors
                .iter()
                .any(|f| f["species"] == "Cu2+" && f["activity"] == "given" && f["exponent"] == -1)
        );
        // Without a composition Q stays symbolic.
        let (_, out, _) = couplet(&[
            "cell",
            "--cathode",
            "Cu2+/Cu",
            "--anode",
            "Zn2+/Zn",
            "--json",
        ]);
        let json: serde_json::Value = serde_json::from_str(&out).unwrap();
        assert!(json["e_V"].is_null() && json["quotient"]["value"].is_null());
    }

    #[test]
    fn incomplete_or_bad_composition_is_a_usage_error_naming_the_species() {
        let (code, _, err) = couplet(&[
            "cell",
            "--cathode",
            "Cu2+/Cu",
            "--anode",
            "Zn2+/Zn",
            "--activity",
            "Cu2+=0.1",
        ]);
        assert_eq!(code, 2);
        assert!(err.contains("Zn2+"), "{err}");
        let (code, _, err) = couplet(&[
            "cell",
            "--cathode",
            "Cu2+/Cu",
            "--anode",
            "Zn2+/Zn",
            "--molality",
            "Cu2+=-1",
            "--molality",
            "Zn2+=1",
        ]);
        assert_eq!(code, 2);
        assert!(err.contains("Cu2+"), "{err}");
    }

    #[test]
    fn ph_line_writes_csv() {
        let (code, out, err) = couplet(&["ph-line", "MnO4-/Mn2+", "--from", "0", "--to", "2"]);
        assert_eq!(code, 0, "{err}");
        let rows: Vec<&str> = out.lines().collect();
        assert_eq!(rows[0], "pH,E_V");
        assert_eq!(rows.len(), 4);
        assert!(err.contains("assumed"));
    }
}

#[test]
fn species_inside_a_carry_no_state_label_unless_two_would_clash() {
    // The form the issue asks for: `a(H2O)`, not `a(H2O(l))`, in every output that writes a(…).
    let r = reaction("O2(g) + 4 H+ + 4 e- -> 2 H2O(l)");
    let couple = Standard {
        reaction: &r,
        e0_volts: 1.229,
        electrons: 4.0,
        de0_dt_volts_per_kelvin: None,
    };
    let mut c = with_activities(&[("H2O(l)", 0.9), ("H+", 0.1)]);
    c.pressures_bar = vec![(species("O2(g)"), 0.21)];
    let result = evaluate(&couple, &c).unwrap();
    assert_eq!(
        result.quotient.expression(),
        "Q = a(H2O)^2 / (a(O2)·a(H+)^4)"
    );
    let water = result.factors.iter().find(|f| f.label == "H2O").unwrap();
    assert_eq!(water.species, "H2O(l)");
    // Two forms of one substance keep their labels so the reader can tell them apart.
    check_expression("O2(g) -> O2(aq)", "Q = a(O2(aq)) / a(O2(g))");
}

#[test]
fn human_report_and_exports_write_a_of_water_without_state() {
    let run = |extra: &[&str]| {
        let mut args = vec![
            "cell",
            "--cathode",
            "O2/H2O",
            "--anode",
            "H+/H2",
            "--pressure",
            "O2=0.21",
            "--pressure",
            "H2=1",
            "--activity",
            "H2O=0.9",
        ];
        args.extend_from_slice(extra);
        let output = std::process::Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
            .args(&args)
            .output()
            .unwrap();
        assert!(
            output.status.success(),
            "{}",
            String::from_utf8_lossy(&output.stderr)
        );
        String::from_utf8(output.stdout).unwrap()
    };
    let report = run(&[]);
    assert!(report.contains("a(H2O) = 9.000000e-1"), "{report}");
    let json: serde_json::Value = serde_json::from_str(&run(&["--json"])).unwrap();
    let expression = json["quotient"]["expression"].as_str().unwrap();
    assert!(expression.contains("a(H2O)"), "{expression}");
    let text = run(&["--emit", "text"]);
    assert!(text.contains("a_H2O = a(H2O)"), "{text}");
    let latex = run(&["--emit", "latex"]);
    assert!(latex.contains("a_{\\ce{H2O}}"), "{latex}");
    for out in [&report, &text, &latex, &expression.to_owned()] {
        assert!(
            !out.contains("a(H2O(l))") && !out.contains("H2O(l)}}"),
            "{out}"
        );
    }
}

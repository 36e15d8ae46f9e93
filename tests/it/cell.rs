//! The cell engine and the potential commands, against published values and facts of the
//! trade (source beside each check).

use assert_cmd::Command;
use couplet::cell::{CellOptions, caution, combine, derive};
use couplet::constants::FARADAY_COULOMBS_PER_MOL;
use couplet::table::{Medium, Table};
use num_bigint::BigInt;

/// The cell of two built-in couples (by id or Ox/Red) with the default options.
fn builtin_cell(cathode: &str, anode: &str) -> couplet::cell::Cell {
    let table = Table::builtin();
    combine(
        table.find(cathode, None).unwrap(),
        table.find(anode, None).unwrap(),
        CellOptions::default(),
    )
    .unwrap()
}

/// Combines two built-in couples (by id or Ox/Red) and checks the net reaction and E°cell (V)
/// within `tolerance_volts`.
fn check(cathode: &str, anode: &str, net: &str, e0_volts: f64, tolerance_volts: f64) {
    let cell = builtin_cell(cathode, anode);
    assert_eq!(cell.net.to_string(), net);
    assert!(
        (cell.e0_volts - e0_volts).abs() <= tolerance_volts,
        "{cathode} | {anode}: {} V",
        cell.e0_volts
    );
    assert!(cell.net.imbalance().is_balanced());
}

#[test]
fn daniell_cell_is_one_point_one_volt() {
    // Zn/Cu (Daniell) E° = 1.10 V: issue 5 and every general-chemistry text (common practice).
    check(
        "Cu2+/Cu",
        "Zn2+/Zn",
        "Cu2+ + Zn(s) -> Cu(s) + Zn2+",
        1.10,
        0.005,
    );
}

#[test]
fn lead_acid_cell_is_about_two_volts_and_six_make_twelve() {
    // About 2 V per cell, six in series about 12 V (DOMAIN.md, common practice).
    let cell = builtin_cell("PbO2/PbSO4", "PbSO4/Pb");
    assert_eq!(
        cell.net.to_string(),
        "PbO2(s) + 2 SO4^2- + 4 H+ + Pb(s) -> 2 PbSO4(s) + 2 H2O(l)"
    );
    assert_eq!(cell.electrons, BigInt::from(2));
    assert!((cell.e0_volts - 2.0).abs() < 0.1, "{}", cell.e0_volts);
    assert!((6.0 * cell.e0_volts - 12.0).abs() < 0.6);
    assert!(caution(&cell.net).unwrap().contains("lead"));
}

#[test]
fn alkaline_zinc_manganese_dioxide_cell_is_about_one_and_a_half_volts() {
    // Zn/MnO2 alkaline about 1.5 V nominal (common practice); the thermodynamic E° to Mn2O3
    // comes out a little lower, so the band is ±0.15 V.
    check(
        "MnO2/Mn2O3",
        "ZnO/Zn",
        "2 MnO2(s) + Zn(s) -> Mn2O3(s) + ZnO(s)",
        1.5,
        0.15,
    );
}

#[test]
fn free_energy_and_equilibrium_constant_follow_from_exact_constants() {
    let cell = builtin_cell("cu2+/cu", "zn2+/zn");
    // F = 96485.33212 C/mol (CODATA 2018, exact product e·N_A).
    assert!((FARADAY_COULOMBS_PER_MOL - 96_485.332_12).abs() < 1e-5);
    let expected_dg = -2.0 * 96_485.332_12 * cell.e0_volts / 1000.0;
    assert!((cell.delta_g0_kilojoules_per_mol - expected_dg).abs() < 1e-6);
    // (RT/F) ln 10 = 0.0591593 V at 298.15 K (DOMAIN.md, from exact constants).
    let expected_log10_k = 2.0 * cell.e0_volts / 0.059_159_3;
    assert!((cell.log10_k - expected_log10_k).abs() < 1e-4);
    assert!(cell.runs_as_written);
}

#[test]
fn hydrogen_oxygen_cell_entropy_and_enthalpy_match_calorimetric_values() {
    // 2 H2 + O2 -> 2 H2O(l): ΔS° = -326.6 J/(mol K) and ΔH° = -571.66 kJ/mol from the CODATA
    // Key Values for Thermodynamics (Cox, Wagman & Medvedev 1989: S° H2O(l) 69.95, H2 130.680,
    // O2 205.152 J/(mol K); ΔfH° H2O(l) -285.83 kJ/mol), values from memory. The engine gets
    // them from E° and the tabulated dE°/dT of O2/H2O (Harris App. H, Bratsch 1989 lineage).
    let table = Table::builtin();
    let cell = combine(
        table.find("o2/h2o", None).unwrap(),
        table.find("h+/h2", None).unwrap(),
        CellOptions {
            temperature_kelvin: 308.15,
            medium: None,
        },
    )
    .unwrap();
    let at = cell.at_temperature.as_ref().unwrap();
    assert!((at.delta_s0_joules_per_mol_kelvin - (-326.6)).abs() < 1.0);
    assert!((at.delta_h0_kilojoules_per_mol - (-571.66)).abs() < 0.5);
    // E°(T) moves by dE°/dT·ΔT: -0.8456 mV/K × 10 K.
    assert!((at.e0_volts - (1.2291 - 0.008_456)).abs() < 1e-9);
    assert!(cell.notes.is_empty());
}

#[test]
fn temperature_coefficients_agree_with_a_second_compilation() {
    // Table dE°/dT (Harris App. H, main source Bratsch 1989) against the NBS-derived table
    // (values listed in the second_check column of the project's reference potentials.csv):
    // O2/H2O -0.846, Fe3+/Fe2+ 1.170, Cu+/Cu -0.754, Cu2+/Cu+ 0.776 mV/K.
    let table = Table::builtin();
    for (id, second) in [
        ("o2/h2o", -0.846),
        ("fe3+/fe2+", 1.170),
        ("cu+/cu", -0.754),
        ("cu2+/cu+", 0.776),
    ] {
        let dedt = table.by_id(id).unwrap().dedt_millivolts_per_kelvin.unwrap();
        assert!((dedt - second).abs() <= 0.01, "{id}: {dedt} vs {second}");
    }
}

#[test]
fn far_temperatures_and_missing_coefficients_are_said() {
    let table = Table::builtin();
    let cell = combine(
        table.find("PbO2/PbSO4", None).unwrap(),
        table.find("PbSO4/Pb", None).unwrap(),
        CellOptions {
            temperature_kelvin: 330.0,
            medium: None,
        },
    )
    .unwrap();
    assert!(cell.at_temperature.is_none());
    assert!(cell.notes[0].contains("no dE°/dT"));
    let cell = combine(
        table.find("o2/h2o", None).unwrap(),
        table.find("h+/h2", None).unwrap(),
        CellOptions {
            temperature_kelvin: 350.0,
            medium: None,
        },
    )
    .unwrap();
    assert!(cell.notes[0].contains("rough guide"));
}

#[test]
fn iron_three_to_metal_by_free_energy_addition() {
    // Fe3+/Fe about -0.04 V (issue 5; PhysicsClassroom table -0.04 as listed in the reference
    // potentials.csv); potentials do not simply add: (0.771 + 2(-0.44))/3.
    let table = Table::builtin();
    let derived = derive(&[
        table.find("Fe3+/Fe2+", None).unwrap().clone(),
        table.find("Fe2+/Fe", None).unwrap().clone(),
    ])
    .unwrap();
    assert_eq!(derived.couple.reaction.to_string(), "Fe3+ + 3 e- -> Fe(s)");
    assert!((derived.couple.e0_volts - (-0.04)).abs() < 0.005);
}

#[test]
fn copper_two_to_metal_by_free_energy_addition() {
    // Cu2+/Cu 0.339 V (Harris App. H) from Cu2+/Cu+ 0.161 and Cu+/Cu 0.518 (same source):
    // Harris notes 0.518 + 0.161 = 2 × 0.339 + 0.001.
    let table = Table::builtin();
    let derived = derive(&[
        table.find("Cu2+/Cu+", None).unwrap().clone(),
        table.find("Cu+/Cu", None).unwrap().clone(),
    ])
    .unwrap();
    assert_eq!(derived.couple.reaction.to_string(), "Cu2+ + 2 e- -> Cu(s)");
    assert!((derived.couple.e0_volts - 0.339).abs() < 0.001);
    // Derived the other way round: Fe3+/Fe2+ from Fe3+/Fe minus Fe2+/Fe is the reverse sum.
    let back = derive(&[
        table.find("Fe3+/Fe", None).unwrap().clone(),
        table.find("Fe2+/Fe", None).unwrap().clone(),
    ])
    .unwrap();
    assert_eq!(back.couple.reaction.to_string(), "Fe3+ + e- -> Fe2+");
}

#[test]
fn base_forms_follow_from_acid_forms_through_kw() {
    // O2/H2O 1.2291 V (Harris) written in base must give O2/OH- 0.401 V (OpenStax App. L).
    let table = Table::builtin();
    let cell = combine(
        table.find("o2/h2o", None).unwrap(),
        table.find("zno/zn", None).unwrap(),
        CellOptions {
            temperature_kelvin: 298.15,
            medium: Some(Medium::Base),
        },
    )
    .unwrap();
    assert!((cell.cathode.e0_volts - 0.401).abs() < 0.001);
    assert_eq!(cell.net.to_string(), "O2(g) + 2 Zn(s) -> 2 ZnO(s)");
}

fn couplet() -> Command {
    Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
}

#[test]
fn cell_json_has_the_documented_fields() {
    let output = couplet()
        .args([
            "cell",
            "--cathode",
            "Cu2+/Cu",
            "--anode",
            "zn2+/zn",
            "--json",
        ])
        .output()
        .unwrap();
    assert!(output.status.success());
    let value: serde_json::Value = serde_json::from_slice(&output.stdout).unwrap();
    for key in [
        "cathode",
        "anode",
        "net",
        "n",
        "e0_V",
        "delta_g0_kJ_per_mol",
        "log10_k",
        "temperature_K",
        "scale",
    ] {
        assert!(value.get(key).is_some(), "{key}");
    }
    for key in ["id", "reaction", "e0_V", "n", "source"] {
        assert!(value["cathode"].get(key).is_some(), "{key}");
    }
    assert_eq!(value["net"]["balanced"], "Cu2+ + Zn(s) -> Cu(s) + Zn2+");
    assert_eq!(value["n"], 2);
}

#[test]
fn ambiguous_couples_are_listed_with_exit_one() {
    let output = couplet()
        .args(["cell", "--cathode", "MnO4-/MnO2", "--anode", "Zn2+/Zn"])
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(1));
    let stderr = String::from_utf8(output.stderr).unwrap();
    assert!(stderr.contains("mno4-/mno2-acid") && stderr.contains("mno4-/mno2-base"));
}

#[test]
fn typed_half_reactions_take_a_given_potential() {
    // Invented couple and potential for the test.
    let output = couplet()
        .args([
            "cell",
            "--cathode",
            "Ag+ + e- -> Ag(s)",
            "--cathode-e0",
            "0.80",
            "--anode",
            "Zn2+/Zn",
            "--json",
        ])
        .output()
        .unwrap();
    assert!(output.status.success());
    let value: serde_json::Value = serde_json::from_slice(&output.stdout).unwrap();
    assert_eq!(value["net"]["balanced"], "2 Ag+ + Zn(s) -> 2 Ag(s) + Zn2+");
    assert!((value["e0_V"].as_f64().unwrap() - 1.562).abs() < 1e-9);
}

#[test]
fn user_table_overrides_are_announced() {
    let dir = std::env::temp_dir().join(format!("couplet-table-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("mine.toml");
    // Invented value for the test.
    std::fs::write(
        &path,
        "[[couple]]\nid = \"zn2+/zn\"\nreaction = \"Zn2+ + 2 e- -> Zn(s)\"\ne0 = -0.70\n",
    )
    .unwrap();
    let output = couplet()
        .args(["table", "zn2+/zn", "--json", "--table"])
        .arg(&path)
        .output()
        .unwrap();
    assert!(output.status.success());
    assert!(
        String::from_utf8(output.stderr)
            .unwrap()
            .contains("replaces")
    );
    let value: serde_json::Value = serde_json::from_slice(&output.stdout).unwrap();
    assert_eq!(value[0]["e0_V"], -0.70);
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn derive_json_lists_its_parts() {
    let output = couplet()
        .args(["derive", "Cu2+/Cu+", "Cu+/Cu", "--json"])
        .output()
        .unwrap();
    assert!(output.status.success());
    let value: serde_json::Value = serde_json::from_slice(&output.stdout).unwrap();
    assert_eq!(value["reaction"], "Cu2+ + 2 e- -> Cu(s)");
    assert_eq!(value["n"], 2);
    assert_eq!(value["from"].as_array().unwrap().len(), 2);
}

#[test]
fn acid_to_base_conversion_and_the_ph_path_share_one_kw() {
    // Thermodynamic consistency (DOMAIN.md §pH): the acid form at pH p and the base form
    // converted by the cell engine, evaluated at the same pH through a(OH-) = Kw/a(H+), are one
    // electrode and must give one potential. That holds only if both steps use the same Kw.
    use couplet::cell::in_medium;
    use couplet::nernst::{Conditions, Standard, evaluate};
    use couplet::notation::parse_species;
    let table = Table::builtin();
    let acid = table.find("o2/h2o", None).unwrap();
    let base = in_medium(acid, Medium::Base).unwrap();
    assert!(
        base.note
            .as_deref()
            .unwrap()
            .contains(couplet::kw::KW_SOURCE)
    );
    let e_at = |couple: &couplet::table::Couple, ph: f64| {
        let mut conditions = Conditions::standard();
        conditions.ph = Some(ph);
        conditions.pressures_bar = vec![(parse_species("O2").unwrap(), 0.21)];
        let standard = Standard {
            reaction: &couple.reaction,
            e0_volts: couple.e0_volts,
            electrons: couple.electrons_f64(),
            de0_dt_volts_per_kelvin: None,
        };
        evaluate(&standard, &conditions).unwrap().e_volts().unwrap()
    };
    for ph in [0.0, 3.5, 7.0, 12.0, 14.0] {
        let (e_acid, e_base) = (e_at(acid, ph), e_at(&base, ph));
        assert!(
            (e_acid - e_base).abs() < 1e-12,
            "pH {ph}: {e_acid} vs {e_base}"
        );
    }
}

/// `couplet cell --json` with these arguments.
fn cell_json(args: &[&str]) -> serde_json::Value {
    let output = couplet()
        .arg("cell")
        .args(args)
        .arg("--json")
        .output()
        .unwrap();
    assert!(output.status.success(), "{args:?}: {output:?}");
    serde_json::from_slice(&output.stdout).unwrap()
}

#[test]
fn a_concentration_cell_labels_its_compartments() {
    // The same couple on both sides: E° = 0, and the net reaction moves Cu2+ from the
    // cathode compartment to the anode compartment (Harris, Quantitative Chemical Analysis,
    // concentration cells, from memory).
    let table = Table::builtin();
    let cu = table.find("Cu2+/Cu", None).unwrap();
    let cell = combine(cu, cu, CellOptions::default()).unwrap();
    assert_eq!(cell.net.to_string(), "Cu2+(cathode) -> Cu2+(anode)");
    assert_eq!(cell.electrons, BigInt::from(2));
    assert_eq!(cell.e0_volts, 0.0);
    assert!(cell.net.imbalance().is_balanced());
    // A couple of pure phases and solvent only would make no cell at all; AgCl/Ag has Cl- and
    // makes a chloride concentration cell.
    let agcl = table.find("AgCl/Ag", None).unwrap();
    let cell = combine(agcl, agcl, CellOptions::default()).unwrap();
    assert_eq!(cell.net.to_string(), "Cl-(anode) -> Cl-(cathode)");
}

/// E (V) of the Cu2+/Cu concentration cell with these Cu2+ activities, and its net reaction.
fn copper_concentration_cell(cathode: f64, anode: f64) -> (f64, String) {
    let (cathode, anode) = (
        format!("Cu2+(cathode)={cathode}"),
        format!("Cu2+(anode)={anode}"),
    );
    let value = cell_json(&[
        "--cathode",
        "Cu2+/Cu",
        "--anode",
        "Cu2+/Cu",
        "--activity",
        &cathode,
        "--activity",
        &anode,
    ]);
    assert_eq!(value["e0_V"], 0.0);
    (
        value["e_V"].as_f64().unwrap(),
        value["net"]["balanced"].as_str().unwrap().to_owned(),
    )
}

#[test]
fn ten_to_one_copper_concentration_cell_is_29_6_millivolts() {
    // E = (RT/2F)·ln 10 = 29.58 mV at 25 °C for a 10:1 Cu2+ concentration cell (Nernst with
    // n = 2; Harris, Quantitative Chemical Analysis, concentration cells, from memory; the
    // figure is common practice).
    let (e, net) = copper_concentration_cell(1.0, 0.1);
    assert_eq!(net, "Cu2+(cathode) -> Cu2+(anode)");
    assert!((e * 1e3 - 29.58).abs() < 0.01, "{e}");
    // Swapping the activities flips the sign: the dilute side must be the anode.
    let (e, _) = copper_concentration_cell(0.1, 1.0);
    assert!((e * 1e3 + 29.58).abs() < 0.01, "{e}");
}

#[test]
fn a_hydrogen_concentration_cell_follows_the_ph_difference() {
    // H2 | H+ (pH 7) || H+ (pH 0) | H2 at 1 bar each: E = 7 × 59.16 mV = 0.4141 V at 25 °C
    // ((RT/F)·ln 10 per pH unit, DOMAIN.md, common practice).
    let value = cell_json(&[
        "--cathode",
        "H+/H2",
        "--anode",
        "H+/H2",
        "--activity",
        "H+(cathode)=1",
        "--activity",
        "H+(anode)=1e-7",
        "--pressure",
        "H2(cathode)=1",
        "--pressure",
        "H2(anode)=1",
    ]);
    let e = value["e_V"].as_f64().unwrap();
    assert!((e - 7.0 * 0.05916).abs() < 0.0001, "{e}");
}

#[test]
fn a_concentration_cell_asks_for_each_compartment() {
    let args = "cell --cathode Cu2+/Cu --anode Cu2+/Cu --activity Cu2+=0.1";
    let output = couplet().args(args.split(' ')).output().unwrap();
    assert_eq!(output.status.code(), Some(2));
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert!(
        stderr.contains("give Cu2+(cathode) and Cu2+(anode)"),
        "{stderr}"
    );
}

#[test]
fn a_concentration_cell_refuses_one_ph_for_two_compartments() {
    let args = "cell --cathode H+/H2 --anode H+/H2 --ph 3";
    let output = couplet().args(args.split(' ')).output().unwrap();
    assert_eq!(output.status.code(), Some(2));
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert!(stderr.contains("a pH in each compartment"), "{stderr}");
}

/// The caution line of the net reaction of a built-in cell, or `None`.
fn cell_caution(cathode: &str, anode: &str) -> Option<String> {
    caution(&builtin_cell(cathode, anode).net)
}

#[test]
fn cells_that_store_or_consume_hazardous_substances_carry_a_caution() {
    // The hazards are common practice of the trade (the usual safety data sheets): hydrogen
    // consumed by a fuel cell is as flammable as hydrogen evolved on charge; a zinc–bromine
    // flow cell stores bromine, a zinc–chlorine cell chlorine; sodium metal reacts violently
    // with water.
    for (cathode, anode, hazard) in [
        ("O2/H2O", "H+/H2", "hydrogen (flammable"),
        ("Br2(l)/Br-", "Zn2+/Zn", "bromine"),
        ("Cl2/Cl-", "Zn2+/Zn", "chlorine"),
        ("F2/F-", "Zn2+/Zn", "fluorine"),
        ("S/H2S(g)", "Zn2+/Zn", "hydrogen sulfide"),
        ("Cu2+/Cu", "Na+/Na", "sodium metal"),
    ] {
        let line = cell_caution(cathode, anode)
            .unwrap_or_else(|| panic!("{cathode} | {anode}: no caution"));
        assert!(line.contains(hazard), "{cathode} | {anode}: {line}");
        assert!(line.contains("follow local codes"), "{line}");
    }
    // Oxygen taken from the air (zinc–air) is named only where it is evolved; the Daniell
    // cell involves none of the named hazards.
    assert_eq!(cell_caution("O2/H2O", "Zn2+/Zn"), None);
    assert_eq!(cell_caution("Cu2+/Cu", "Zn2+/Zn"), None);
}

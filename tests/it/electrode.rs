//! One electrode's potential at a composition on a reference scale (`couplet::electrode` and
//! `couplet electrode`), against published values (source beside each check).

use assert_cmd::Command;
use couplet::electrode::electrode_potential;
use couplet::nernst::Conditions;
use couplet::notation::parse_species;
use couplet::scale::Scale;
use couplet::table::Table;

/// E (V) of a built-in couple at these activities, on `scale`, at 298.15 K.
fn check(couple: &str, activities: &[(&str, f64)], scale: &str, expected_volts: f64) {
    let table = Table::builtin();
    let mut conditions = Conditions::standard();
    conditions.activities = activities
        .iter()
        .map(|(s, a)| (parse_species(s).unwrap(), *a))
        .collect();
    let scale = Scale::from_name(scale, None).unwrap();
    let found = electrode_potential(table.find(couple, None).unwrap(), &conditions, &scale)
        .unwrap_or_else(|e| panic!("{couple}: {e}"));
    let e = found.e_on_scale_volts().unwrap();
    assert!(
        (e - expected_volts).abs() < 1e-4,
        "{couple} vs {scale:?}: {e} V, expected {expected_volts} V"
    );
}

/// (RT/F)·ln 10 at 298.15 K, 59.16 mV (DOMAIN.md; exact SI constants, CODATA 2018).
const SLOPE_VOLTS: f64 = 0.0591593;

#[test]
fn silver_in_centimolar_silver_ion_against_sce() {
    // Ag+/Ag E° = 0.7993 V as in the built-in table (Harris, Quantitative Chemical Analysis,
    // App. H); a(Ag+) = 0.01 lowers E by 2 decades × 59.16 mV; SCE is +0.2412 V vs SHE
    // (Bard & Faulkner, Electrochemical Methods 2000, inside back cover).
    let vs_she = 0.7993 - 2.0 * SLOPE_VOLTS;
    check("Ag+/Ag", &[("Ag+", 0.01)], "she", vs_she);
    check("Ag+/Ag", &[("Ag+", 0.01)], "sce", vs_she - 0.2412);
    // Ag/AgCl in saturated KCl is +0.197 V vs SHE (Bard & Faulkner, as the data file cites).
    check(
        "Ag+/Ag",
        &[("Ag+", 0.01)],
        "ag-agcl-sat-kcl",
        vs_she - 0.197,
    );
}

#[test]
fn oxygen_on_the_rhe_scale_does_not_move_with_ph() {
    // O2 + 4 H+ + 4 e- -> 2 H2O: E vs RHE = E° + (RT/4F)·ln p(O2) at every pH, since
    // E(RHE) = −(RT/F)·ln10·pH on the SHE scale (DOMAIN.md); E° 1.2291 V (Harris App. H).
    let expected = 1.2291 + SLOPE_VOLTS / 4.0 * 0.21f64.log10();
    for ph in ["0", "7", "13"] {
        let output = Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
            .args(["electrode", "O2/H2O", "--pressure", "O2=0.21", "--ph", ph])
            .args(["--scale", "rhe", "--json"])
            .output()
            .unwrap();
        assert!(output.status.success(), "{output:?}");
        let value: serde_json::Value = serde_json::from_slice(&output.stdout).unwrap();
        let e = value["e_V"].as_f64().unwrap();
        assert!((e - expected).abs() < 1e-4, "pH {ph}: {e}");
        assert_eq!(value["scale"], format!("RHE (pH {ph})"));
    }
}

#[test]
fn reference_electrodes_follow_their_published_coefficient() {
    // SCE: dE/dT = −0.661 mV/K (as data/reference_electrodes.toml cites it): at 310 K the
    // SCE sits 11.85 K × 0.661 mV/K lower than at 298.15 K.
    let sce = Scale::from_name("sce", None).unwrap();
    let (at_310, note) = couplet::electrode::reference_vs_she_volts(&sce, 310.0);
    assert!(
        (at_310 - (0.2412 - 0.000661 * 11.85)).abs() < 1e-9,
        "{at_310}"
    );
    assert!(note.is_none());
    // An electrode with no published coefficient keeps its value and says so.
    let ssce = Scale::from_name("ssce", None).unwrap();
    let (_, note) = couplet::electrode::reference_vs_she_volts(&ssce, 310.0);
    assert!(note.unwrap().contains("no published dE/dT"));
}

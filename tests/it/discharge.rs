//! Open-circuit voltage along a discharge: shape checks (facts of the trade, DOMAIN.md),
//! stoichiometric bookkeeping, CSV and SVG output read back.

use assert_cmd::Command;
use couplet::activity::{ActivityModel, GammaModel};
use couplet::capacity::AMP_HOURS_PER_MOL_ELECTRONS;
use couplet::cell::{Cell, CellOptions, combine};
use couplet::discharge::{Amount, Discharge, DischargeError, DischargeSpec, discharge};
use couplet::output::svg::{DischargeAxis, discharge_plot, render};
use couplet::table::Table;

fn cell(cathode: &str, anode: &str) -> Cell {
    let table = Table::builtin();
    combine(
        table.find(cathode, None).unwrap(),
        table.find(anode, None).unwrap(),
        CellOptions::default(),
    )
    .unwrap()
}

fn spec(amounts: &[(&str, Amount)], solvent_kg: Option<f64>, model: GammaModel) -> DischargeSpec {
    DischargeSpec {
        amounts: amounts
            .iter()
            .map(|(s, a)| (s.parse().unwrap(), *a))
            .collect(),
        solvent_kg,
        activity: ActivityModel::new(model),
        steps: 50,
        ..DischargeSpec::default()
    }
}

fn lead_acid(model: GammaModel) -> Discharge {
    discharge(
        &cell("PbO2/PbSO4", "PbSO4/Pb"),
        &spec(
            &[
                ("Pb", Amount::Moles(2.0)),
                ("PbO2", Amount::Moles(2.0)),
                ("H2SO4", Amount::Moles(5.0)),
            ],
            Some(1.0),
            model,
        ),
    )
    .unwrap()
}

#[test]
fn a_cell_of_condensed_phases_only_stays_flat_at_its_standard_potential() {
    // DOMAIN.md, facts of the trade (common practice): only solid phases, Q = 1, flat until a
    // reactant is used up. Zn/HgO: HgO(s) + Zn(s) -> Hg(l) + ZnO(s).
    let c = cell("HgO/Hg", "ZnO/Zn");
    let curve = discharge(
        &c,
        &spec(
            &[
                ("Zn(s)", Amount::Grams(10.0)),
                ("HgO(s)", Amount::Grams(5.0)),
            ],
            None,
            GammaModel::Ideal,
        ),
    )
    .unwrap();
    assert!(curve.points.iter().all(|p| p.e_volts == c.e0_volts));
    assert_eq!(curve.limiting.ascii(), "HgO(s)");
    // 5 g HgO at 216.59 g/mol (CIAAW weights) with 2 e- each: 2·(5/216.59)·26.8015 Ah.
    let expected = 2.0 * 5.0 / 216.59 * 26.8015;
    assert!(
        (curve.capacity_amp_hours - expected).abs() < 1e-3,
        "{}",
        curve.capacity_amp_hours
    );
    // Zn/Ag2O, the same shape.
    let c = cell("Ag2O/Ag", "ZnO/Zn");
    let curve = discharge(
        &c,
        &spec(&[("Ag2O", Amount::Moles(1.0))], None, GammaModel::Ideal),
    )
    .unwrap();
    assert!(curve.points.iter().all(|p| p.e_volts == c.e0_volts));
    assert_eq!(curve.excess[0].ascii(), "Zn(s)");
}

#[test]
fn lead_acid_falls_monotonically_as_acid_is_used_and_water_made() {
    // Fact of the trade (issue 8, DOMAIN.md): sulfuric acid consumed, water made, voltage falls.
    for model in [GammaModel::Ideal, GammaModel::Table] {
        let curve = lead_acid(model);
        assert!(curve.stopped.is_none(), "{:?}", curve.stopped);
        assert_eq!(curve.points.first().unwrap().state_of_charge, 1.0);
        assert_eq!(curve.points.last().unwrap().state_of_charge, 0.0);
        for w in curve.points.windows(2) {
            assert!(
                w[1].e_volts < w[0].e_volts,
                "{model}: {} then {}",
                w[0].e_volts,
                w[1].e_volts
            );
        }
    }
}

#[test]
fn lead_acid_bookkeeping_follows_the_stoichiometry() {
    let curve = lead_acid(GammaModel::Table);
    // 2 mol PbO2 at 1 per reaction: ξ_end = 2 mol, charge = 2·2·F/3600 Ah.
    assert_eq!(curve.limiting.ascii(), "PbO2(s)");
    let end = curve.points.last().unwrap();
    assert!((end.charge_amp_hours - 4.0 * AMP_HOURS_PER_MOL_ELECTRONS).abs() < 1e-9);
    // 2 H2O made per reaction: 4 mol = 0.0720612 kg of water (M = 18.0153 g/mol, CIAAW).
    assert!((end.solvent_kg.unwrap() - 1.072_061).abs() < 1e-5);
    // SO4^2- from 5 mol to 1 mol in that water.
    let so4 = curve
        .solutes
        .iter()
        .position(|s| s.ascii() == "SO4^2-")
        .unwrap();
    assert!((end.molalities[so4] - 1.0 / 1.072_061).abs() < 1e-5);
    // At the start, ideal Nernst by hand: Q = 1/(a_H^4 a_SO4^2) with m = 10 and 5 mol/kg.
    let ideal = lead_acid(GammaModel::Ideal);
    let slope = couplet::constants::thermal_voltage_volts(298.15) / 2.0;
    let by_hand = ideal.e0_volts + slope * (10f64.powi(4) * 5f64.powi(2)).ln();
    assert!((ideal.points[0].e_volts - by_hand).abs() < 1e-12);
}

#[test]
fn lead_acid_with_published_activities_sits_near_the_rule_of_thumb() {
    // OCV ≈ SG + 0.84 V per cell (battery_facts.md §3: electrapk.com; common practice, rule
    // of thumb). 5 mol H2SO4 in 1 kg water is 490 g in 1490 g, 32.9 % w/w, SG ≈ 1.24 at 25 °C
    // (from memory of sulfuric acid density tables), so about 2.08 V; the check allows the
    // rule's ±0.05 V (issue 6).
    let curve = lead_acid(GammaModel::Table);
    assert!(
        (curve.points[0].e_volts - 2.08).abs() < 0.05,
        "{}",
        curve.points[0].e_volts
    );
}

#[test]
fn bad_specifications_are_errors() {
    let c = cell("PbO2/PbSO4", "PbSO4/Pb");
    let err = |amounts: &[(&str, Amount)], kg: Option<f64>| {
        discharge(&c, &spec(amounts, kg, GammaModel::Ideal)).unwrap_err()
    };
    assert!(matches!(
        err(&[("Pb", Amount::Moles(1.0))], None),
        DischargeError::NeedsSolvent(_)
    ));
    assert!(matches!(
        err(&[("Pb", Amount::Moles(1.0))], Some(1.0)),
        DischargeError::NeedsAmount(_)
    ));
    assert!(matches!(
        err(&[("Pb", Amount::Moles(-1.0))], Some(1.0)),
        DischargeError::BadAmount { .. }
    ));
    assert!(matches!(
        err(
            &[("NaCl", Amount::Moles(1.0)), ("Cu", Amount::Moles(1.0))],
            Some(1.0)
        ),
        DischargeError::NotInReaction(_)
    ));
    let reversed = cell("PbSO4/Pb", "PbO2/PbSO4");
    assert!(matches!(
        discharge(&reversed, &spec(&[], None, GammaModel::Ideal)),
        Err(DischargeError::NotGalvanic(_))
    ));
    // A concentration cell has two solutions; the one-electrolyte model refuses it.
    let concentration = cell("Cu2+/Cu", "Cu2+/Cu");
    assert!(matches!(
        discharge(&concentration, &spec(&[], Some(1.0), GammaModel::Ideal)),
        Err(DischargeError::TwoCompartments)
    ));
}

fn couplet(args: &[&str]) -> assert_cmd::assert::Assert {
    Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
        .args(args)
        .assert()
}

#[test]
fn command_writes_csv_and_svg_that_read_back() {
    let dir = std::env::temp_dir().join(format!("couplet-discharge-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let (csv, svg) = (dir.join("la.csv"), dir.join("la.svg"));
    couplet(&[
        "discharge",
        "--cathode",
        "PbO2/PbSO4",
        "--anode",
        "PbSO4/Pb",
        "--amount",
        "Pb=2",
        "--amount",
        "PbO2=478.3g",
        "--amount",
        "H2SO4=5",
        "--solvent-kg",
        "1",
        "--gamma",
        "table",
        "--steps",
        "20",
        "--csv",
        csv.to_str().unwrap(),
        "--svg",
        svg.to_str().unwrap(),
    ])
    .success()
    .stdout(predicates::str::contains("limiting"))
    .stdout(predicates::str::contains("fully dissociated"));
    let mut reader = csv::Reader::from_path(&csv).unwrap();
    let header = reader.headers().unwrap().clone();
    for column in ["soc", "charge_Ah", "e_V"] {
        assert!(header.iter().any(|h| h == column), "{header:?}");
    }
    let rows: Vec<csv::StringRecord> = reader.records().map(|r| r.unwrap()).collect();
    assert_eq!(rows.len(), 21);
    assert_eq!(&rows[0][0], "1");
    assert_eq!(&rows[20][0], "0");
    let text = std::fs::read_to_string(&svg).unwrap();
    let doc = roxmltree::Document::parse(&text).expect("well-formed XML");
    let text_of = |id: &str| {
        doc.descendants()
            .find(|n| n.attribute("id") == Some(id))
            .and_then(|n| n.text())
            .unwrap_or_default()
            .to_owned()
    };
    assert!(text_of("x-label").contains("state of charge"));
    assert!(text_of("y-label").contains("(V)"));
    let series: Vec<_> = doc
        .descendants()
        .filter(|n| n.attribute("class") == Some("series"))
        .collect();
    assert_eq!(series.len(), 1);
    assert!(series[0].descendants().any(|n| n.has_tag_name("polyline")));
    assert!(text.contains("limiting: PbO2(s) runs out"));
    let left: Vec<_> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(left.len(), 2, "{left:?}");
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn several_cells_overlay_with_a_legend() {
    let flat = discharge(
        &cell("HgO/Hg", "ZnO/Zn"),
        &spec(&[("HgO", Amount::Moles(2.0))], None, GammaModel::Ideal),
    )
    .unwrap();
    let falling = lead_acid(GammaModel::Ideal);
    let svg = render(&discharge_plot(
        "two cells",
        &[
            ("Zn/HgO".to_owned(), &flat),
            ("lead–acid".to_owned(), &falling),
        ],
        DischargeAxis::Charge,
    ))
    .unwrap();
    let doc = roxmltree::Document::parse(&svg).unwrap();
    let legend: Vec<String> = doc
        .descendants()
        .filter(|n| n.attribute("class") == Some("legend-entry"))
        .filter_map(|n| n.text().map(str::to_owned))
        .collect();
    assert_eq!(legend, ["Zn/HgO", "lead–acid"]);
    assert_eq!(
        doc.descendants()
            .filter(|n| n.attribute("class") == Some("marker"))
            .count(),
        2
    );
    assert!(svg.contains("charge passed (Ah)"));
}

#[test]
fn command_errors_name_the_input() {
    couplet(&[
        "discharge",
        "--cathode",
        "HgO/Hg",
        "--anode",
        "ZnO/Zn",
        "--amount",
        "Zn=abc",
    ])
    .code(2)
    .stderr(predicates::str::contains("'abc' is not a number"));
    couplet(&[
        "discharge",
        "--cathode",
        "HgO/Hg",
        "--anode",
        "ZnO/Zn",
        "--amount",
        "Zn=1",
        "--gamma",
        "magic",
    ])
    .code(2)
    .stderr(predicates::str::contains("--gamma"));
    // A CSV into a missing directory fails and leaves nothing.
    couplet(&[
        "discharge",
        "--cathode",
        "HgO/Hg",
        "--anode",
        "ZnO/Zn",
        "--amount",
        "Zn=1",
        "--csv",
        "/nonexistent-couplet-dir/x.csv",
    ])
    .code(2)
    .stderr(predicates::str::contains("cannot write"));
}

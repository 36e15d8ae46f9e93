//! The element table and molar masses against IUPAC/CIAAW standard atomic weights.

use couplet::elements::{Element, WeightKind};
use couplet::notation::parse_species;

/// CIAAW 2021 abridged standard atomic weights (Prohaska et al., Pure Appl. Chem. 94 (2022)
/// 573), copied into tests/data with the source in its header.
const CIAAW_2021: &str = include_str!("../data/ciaaw_2021_abridged.csv");

#[test]
fn table_has_every_element_and_the_hydrogen_isotope_labels() {
    let all: Vec<Element> = Element::all().collect();
    assert_eq!(all.len(), 120);
    let numbers: Vec<u8> = all
        .iter()
        .filter(|e| !e.is_isotope_label())
        .map(|e| e.atomic_number())
        .collect();
    assert_eq!(numbers, (1..=118).collect::<Vec<u8>>());
    assert_eq!(
        Element::from_symbol("D")
            .unwrap()
            .chemical_element()
            .symbol(),
        "H"
    );
}

#[test]
fn atomic_weights_are_the_ciaaw_2021_abridged_values() {
    let mut checked = 0;
    for line in CIAAW_2021.lines().filter(|l| !l.starts_with('#')).skip(1) {
        let fields: Vec<&str> = line.split(',').collect();
        let element = Element::from_symbol(fields[1]).expect(fields[1]);
        let expected: f64 = fields[2].parse().unwrap();
        assert_eq!(
            element.data().weight_kind,
            WeightKind::Abridged,
            "{}",
            fields[1]
        );
        assert_eq!(element.data().atomic_weight, expected, "{}", fields[1]);
        checked += 1;
    }
    assert_eq!(checked, 84);
    // Technetium has no standard atomic weight (CIAAW): the table gives a mass number instead.
    let tc = Element::from_symbol("Tc").unwrap();
    assert_eq!(tc.data().weight_kind, WeightKind::MassNumber);
}

/// Expected molar masses: sums of the CIAAW 2021 abridged weights above, with the arithmetic
/// written out, to the 0.001 g/mol those weights carry.
#[test]
fn molar_masses_follow_from_ciaaw_weights() {
    let cases = [
        ("H2O", 18.0150, "2×1.008 + 15.999"),
        ("H2SO4", 98.0720, "2×1.008 + 32.06 + 4×15.999"),
        ("KMnO4", 158.0320, "39.098 + 54.938 + 4×15.999"),
        ("PbSO4", 303.2560, "207.2 + 32.06 + 4×15.999"),
        ("PbO2", 239.1980, "207.2 + 2×15.999"),
        ("MnO2", 86.9360, "54.938 + 2×15.999"),
        ("Zn", 65.3800, "65.38"),
        ("LiCoO2", 97.8710, "6.94 + 58.933 + 2×15.999"),
        ("NaCl", 58.4400, "22.99 + 35.45"),
        (
            "CuSO4·5H2O",
            249.6770,
            "63.546 + 32.06 + 9×15.999 + 10×1.008",
        ),
        ("K2Cr2O7", 294.1810, "2×39.098 + 2×51.996 + 7×15.999"),
        ("NiOOH", 91.6990, "58.693 + 2×15.999 + 1.008"),
        ("Ag2O", 231.7390, "2×107.87 + 15.999"),
        ("HgO", 216.5890, "200.59 + 15.999"),
        ("LiFePO4", 157.7550, "6.94 + 55.845 + 30.974 + 4×15.999"),
        ("Cd(OH)2", 146.4240, "112.41 + 2×15.999 + 2×1.008"),
        ("KOH", 56.1050, "39.098 + 15.999 + 1.008"),
        (
            "K4[Fe(CN)6]",
            368.3450,
            "4×39.098 + 55.845 + 6×12.011 + 6×14.007",
        ),
    ];
    for (formula, expected, arithmetic) in cases {
        let mass = parse_species(formula)
            .unwrap()
            .composition
            .molar_mass()
            .unwrap();
        assert!(
            (mass.grams_per_mol - expected).abs() < 5e-4,
            "{formula}: {} vs {expected} ({arithmetic})",
            mass.grams_per_mol
        );
        assert!(!mass.uses_mass_numbers);
    }
    // Water is 18.015 g/mol in every general chemistry table (common practice).
    assert!(
        parse_species("e-")
            .unwrap()
            .composition
            .molar_mass()
            .is_none()
    );
}

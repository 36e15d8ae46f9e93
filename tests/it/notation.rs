//! Notation: reading formulas, species and equations, and writing them back.

use couplet::notation::{NotationErrorKind, parse_equation, parse_species};

/// Reads `text` as one species and checks its element counts and charge.
fn check(text: &str, atoms: &[(&str, u64)], charge: i64) {
    let species = parse_species(text).unwrap_or_else(|e| panic!("{text}: {}", e.render()));
    let counts: Vec<(&str, u64)> = species
        .composition
        .counts()
        .iter()
        .map(|(e, n)| (e.symbol(), *n))
        .collect();
    assert_eq!(counts, atoms, "{text}");
    assert_eq!(species.charge(), charge, "{text}");
}

#[test]
fn charge_forms_all_read_the_same() {
    for text in [
        "Fe3+", "Fe+3", "Fe^3+", "Fe^{3+}", "Fe+++", "Fe³⁺", "Fe{3+}",
    ] {
        check(text, &[("Fe", 1)], 3);
    }
    for text in ["SO4^2-", "SO4--", "SO4{2-}", "SO₄²⁻", "SO4^{2-}", "SO4-2"] {
        check(text, &[("S", 1), ("O", 4)], -2);
    }
}

#[test]
fn digits_before_a_sign_are_a_subscript_unless_one_symbol_or_a_square_bracket() {
    check("NO3-", &[("N", 1), ("O", 3)], -1);
    check("NH4+", &[("N", 1), ("H", 4)], 1);
    check("Hg2^2+", &[("Hg", 2)], 2);
    check("Hg2+", &[("Hg", 1)], 2);
    check("[Fe(CN)6]4-", &[("Fe", 1), ("C", 6), ("N", 6)], -4);
    check("Fe(CN)6^3-", &[("Fe", 1), ("C", 6), ("N", 6)], -3);
}

#[test]
fn hydrates_isotopes_and_states() {
    for text in ["CuSO4·5H2O", "CuSO4*5H2O", "CuSO4.5H2O"] {
        check(text, &[("Cu", 1), ("S", 1), ("O", 9), ("H", 10)], 0);
    }
    check("D2O", &[("D", 2), ("O", 1)], 0);
    let zinc = parse_species("Zn(s)").unwrap();
    assert_eq!(zinc.state.map(|s| s.label()), Some("s"));
}

#[test]
fn plus_between_formulas_separates_and_plus_digits_at_the_end_is_a_charge() {
    let eq = parse_equation("2Fe+3Cl2 -> 2FeCl3").unwrap();
    assert_eq!(eq.reactants.len(), 2);
    assert_eq!(eq.reactants[1].species.ascii(), "Cl2");
    let eq = parse_equation("H2O+CO2->H2CO3").unwrap();
    assert_eq!(eq.reactants.len(), 2);
    let err = parse_equation("Na++Cl- -> NaCl").unwrap_err();
    assert_eq!(err.kind, NotationErrorKind::Syntax);
    assert_eq!(err.column(), 3);
}

#[test]
fn errors_point_at_the_fault() {
    let cases = [
        ("MnXx4", NotationErrorKind::UnknownElement, 3),
        ("Zn(OH", NotationErrorKind::Syntax, 3),
        ("-> Zn", NotationErrorKind::Syntax, 1),
        ("Zn ->", NotationErrorKind::Syntax, 6),
        ("H2O(x)", NotationErrorKind::Syntax, 4),
        ("((((((((((H))))))))))", NotationErrorKind::Limit, 9),
        ("H99999999999", NotationErrorKind::Limit, 2),
    ];
    for (text, kind, column) in cases {
        let err = couplet::notation::parse_input(text).unwrap_err();
        assert_eq!(
            (err.kind, err.column()),
            (kind, column),
            "{text}: {}",
            err.render()
        );
    }
}

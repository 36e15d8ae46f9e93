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
fn ligand_abbreviations_read_as_their_formulas_and_write_back_as_written() {
    // [Co(en)3]^3+ holds C6H24N6 (en = ethane-1,2-diamine, C2H8N2); [Fe(ox)3]^3- C6O12.
    for (text, atoms) in [
        (
            "[Co(en)3]3+",
            [("Co", 1), ("C", 6), ("H", 24), ("N", 6)].as_slice(),
        ),
        ("[Fe(ox)3]3-", [("Fe", 1), ("C", 6), ("O", 12)].as_slice()),
        (
            "Cu(gly)2",
            [("Cu", 1), ("C", 4), ("H", 8), ("N", 2), ("O", 4)].as_slice(),
        ),
    ] {
        let species = parse_species(text).unwrap();
        for &(symbol, n) in atoms {
            let count = species
                .composition
                .counts()
                .iter()
                .find(|(e, _)| e.symbol() == symbol)
                .map_or(0, |&(_, n)| n);
            assert_eq!(count, n, "{text}: {symbol}");
        }
        assert_eq!(species.ascii(), text);
    }
    // An abbreviation is not the same species as its formula written out (the text differs),
    // but has the same composition.
    let short = parse_species("[Co(en)3]^3+").unwrap();
    let long = parse_species("[Co(C2H8N2)3]^3+").unwrap();
    assert_eq!(short.composition, long.composition);
    assert_eq!(short.unicode(), "[Co(en)₃]³⁺");
    // A word that is no abbreviation is refused with the abbreviations listed.
    let error = parse_species("Fe(xyz)3").unwrap_err();
    assert!(error.message.contains("en, py, bpy"), "{}", error.render());
    assert_eq!(error.column(), 3);
}

#[test]
fn long_decimal_subscripts_are_written_as_fractions_that_read_back() {
    // 2/512 = 1/256 = 0.00390625 has eight decimal places, more than a subscript may have:
    // canonical text writes the fraction (a case the parse fuzz target found).
    for (text, canonical) in [
        ("FC2/512", "FC1/256"),
        ("Li1/64CoO2", "Li0.015625CoO2"),
        ("Li1/128CoO2", "Li1/128CoO2"),
        ("Li0.125CoO2", "Li0.125CoO2"),
    ] {
        let species = parse_species(text).unwrap();
        assert_eq!(species.ascii(), canonical, "{text}");
        assert_eq!(parse_species(&species.ascii()).unwrap(), species, "{text}");
    }
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

mod properties {
    //! parse(display(x)) == x for generated species and equations, and no input panics.
    use couplet::elements::Element;
    use couplet::notation::{
        Arrow, Bracket, Compartment, Component, Equation, Formula, LIGAND_ABBREVIATIONS, Species,
        SpeciesKind, State, Style, Term, Unit, equation_to_string, parse_equation, parse_input,
        parse_species, species_to_string,
    };
    use num_rational::Ratio;
    use proptest::prelude::*;

    fn element() -> impl Strategy<Value = Element> {
        let all: Vec<Element> = Element::all().collect();
        proptest::sample::select(all)
    }

    /// Whole subscripts mostly, exact decimals (non-integer stoichiometry, up to three places,
    /// below and above 2, which are written differently) and fractions (`1/3`).
    fn subscript(whole: std::ops::Range<u64>) -> impl Strategy<Value = Ratio<u64>> {
        prop_oneof![
            4 => whole.prop_map(Ratio::from_integer),
            1 => (1u64..5000).prop_map(|n| Ratio::new(n, 1000)),
            1 => (1u64..50, 1u64..12).prop_map(|(n, d)| Ratio::new(n, d)),
        ]
    }

    fn unit() -> impl Strategy<Value = Unit> {
        let atom = (element(), subscript(1..30)).prop_map(|(element, count)| Unit::Atom {
            element,
            count,
            span: Default::default(),
        });
        // A ligand written by its abbreviation (`(en)3`): the group of its formula's atoms.
        let abbreviated =
            (0..LIGAND_ABBREVIATIONS.len(), subscript(1..4)).prop_map(|(i, count)| {
                let (abbreviation, formula) = LIGAND_ABBREVIATIONS[i];
                let SpeciesKind::Formula(f) = parse_species(formula).unwrap().kind else {
                    unreachable!("a formula")
                };
                Unit::Group {
                    bracket: Bracket::Round,
                    body: f.components[0].body.clone(),
                    count,
                    abbreviation: Some(abbreviation),
                    span: Default::default(),
                }
            });
        prop_oneof![9 => atom, 1 => abbreviated].prop_recursive(3, 12, 3, |inner| {
            (
                prop_oneof![Just(Bracket::Round), Just(Bracket::Square)],
                proptest::collection::vec(inner, 1..3),
                subscript(1..6),
            )
                .prop_map(|(bracket, body, count)| Unit::Group {
                    bracket,
                    body,
                    count,
                    abbreviation: None,
                    span: Default::default(),
                })
        })
    }

    fn formula() -> impl Strategy<Value = Formula> {
        (
            proptest::collection::vec(unit(), 1..4),
            proptest::collection::vec((1u32..8, proptest::collection::vec(unit(), 1..3)), 0..2),
            -5i32..6,
        )
            .prop_map(|(main, adducts, charge)| {
                let mut components = vec![Component {
                    multiplier: 1,
                    body: main,
                }];
                components.extend(
                    adducts
                        .into_iter()
                        .map(|(multiplier, body)| Component { multiplier, body }),
                );
                Formula {
                    components: components.into(),
                    charge,
                }
            })
    }

    fn compartment() -> impl Strategy<Value = Option<Compartment>> {
        prop_oneof![
            8 => Just(None),
            1 => Just(Some(Compartment::Cathode)),
            1 => Just(Some(Compartment::Anode)),
        ]
    }

    fn state() -> impl Strategy<Value = Option<State>> {
        prop_oneof![
            Just(None),
            Just(Some(State::Solid)),
            Just(Some(State::Liquid)),
            Just(Some(State::Gas)),
            Just(Some(State::Aqueous)),
            Just(Some(State::Crystal)),
        ]
    }

    /// A species built from a generated formula by reading its own display, so that its
    /// composition is computed the one way the library computes it.
    fn species() -> impl Strategy<Value = Species> {
        prop_oneof![
            1 => state().prop_map(|state| {
                let mut e = parse_species("e-").unwrap();
                e.state = state;
                e
            }),
            9 => (formula(), state(), compartment()).prop_filter_map("charge beyond the protons", |(f, state, compartment)| {
                let shell = Species {
                    kind: SpeciesKind::Formula(std::sync::Arc::new(f)),
                    state,
                    compartment,
                    composition: Default::default(),
                    span: Default::default(),
                };
                parse_species(&species_to_string(&shell, Style::Ascii)).ok()
            }),
        ]
    }

    fn term() -> impl Strategy<Value = Term> {
        (1u64..20, 1u64..5, species()).prop_map(|(n, d, species)| Term {
            coefficient: Ratio::new(n, d),
            species,
            span: Default::default(),
        })
    }

    fn equation() -> impl Strategy<Value = Equation> {
        (
            proptest::collection::vec(term(), 1..5),
            proptest::collection::vec(term(), 1..5),
            prop_oneof![
                Just(Arrow::Forward),
                Just(Arrow::Equals),
                Just(Arrow::Equilibrium)
            ],
        )
            .prop_map(|(reactants, products, arrow)| Equation {
                reactants,
                products,
                arrow,
            })
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(2000))]

        #[test]
        fn generated_formulas_read_back_as_generated(f in formula(), state in state(), compartment in compartment()) {
            let shell = Species {
                kind: SpeciesKind::Formula(std::sync::Arc::new(f)),
                state,
                compartment,
                composition: Default::default(),
                span: Default::default(),
            };
            for style in [Style::Ascii, Style::Unicode, Style::Mhchem] {
                let text = species_to_string(&shell, style);
                match parse_species(&text) {
                    Ok(back) => prop_assert_eq!(&back, &shell, "{}", text),
                    // A charge larger than the protons present is refused by design.
                    Err(e) => prop_assert_eq!(e.kind, couplet::notation::NotationErrorKind::Chemistry, "{}", e.render()),
                }
            }
        }

        #[test]
        fn species_round_trip(s in species()) {
            for style in [Style::Ascii, Style::Unicode, Style::Mhchem] {
                let text = species_to_string(&s, style);
                let back = parse_species(&text).map_err(|e| TestCaseError::fail(e.render()))?;
                prop_assert_eq!(&back, &s, "{}", text);
                prop_assert_eq!(&back.composition, &s.composition, "{}", text);
            }
        }

        #[test]
        fn equation_round_trip(eq in equation()) {
            for style in [Style::Ascii, Style::Unicode] {
                let text = equation_to_string(&eq, style);
                let back = parse_equation(&text).map_err(|e| TestCaseError::fail(e.render()))?;
                prop_assert_eq!(&back, &eq, "{}", text);
            }
        }

        #[test]
        fn mangled_input_never_panics(text in "[A-Za-z0-9()\\[\\]{}^+\\-*.·=<>→⇌ ₀-₉⁰-⁹⁺⁻/]{0,40}") {
            if let Err(e) = parse_input(&text) {
                // The rendering must work for every error, and the span must lie in the input.
                prop_assert!(e.span.start <= text.len());
                let _ = e.render();
            }
        }

        #[test]
        fn huge_counts_are_limit_errors_not_overflows(a in 1u64..u64::MAX, b in 1u64..u64::MAX, depth in 1usize..8) {
            let text = format!("{}H{a}{}{b}", "(".repeat(depth), ")".repeat(depth));
            let _ = parse_input(&text);
            let text = format!("{a} H{b} -> {b}/{a} O2");
            let _ = parse_input(&text);
        }
    }
}

mod command {
    //! `couplet parse`: the JSON schema of the README, LaTeX output and exit codes.
    use assert_cmd::Command;
    use serde_json::Value;

    fn parse_json(input: &str) -> (Value, i32) {
        let output = Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
            .args(["parse", "--json", input])
            .output()
            .unwrap();
        let value = serde_json::from_slice(&output.stdout).unwrap();
        (value, output.status.code().unwrap())
    }

    #[test]
    fn species_and_equations_follow_the_documented_schema() {
        let (v, status) = parse_json("SO₄²⁻");
        assert_eq!(status, 0);
        let s = &v["species"][0];
        assert_eq!(s["input"], "SO₄²⁻");
        assert_eq!(s["canonical"], "SO4^2-");
        // Exact numbers: an integer when whole, "a/b" otherwise (README, JSON conventions).
        assert_eq!(s["coefficient"], 1);
        assert_eq!(s["elements"]["S"], 1);
        assert_eq!(s["elements"]["O"], 4);
        assert_eq!(s["charge"], -2);
        assert!(s["state"].is_null());
        // CIAAW 2021 abridged weights: 32.06 + 4 × 15.999 = 96.056 g/mol.
        assert!((s["molar_mass_g_per_mol"].as_f64().unwrap() - 96.056).abs() < 1e-9);

        let (v, status) = parse_json("1/2 O2(g) + 2 H+ + 2 e- = H2O(l)");
        assert_eq!(status, 0);
        assert_eq!(v["arrow"], "=");
        assert_eq!(v["reactants"][0]["coefficient"], "1/2");
        assert_eq!(v["reactants"][0]["state"], "g");
        let electron = &v["reactants"][2];
        assert_eq!(electron["canonical"], "e-");
        assert_eq!(electron["charge"], -1);
        assert!(electron["molar_mass_g_per_mol"].is_null());
        assert_eq!(electron["elements"], serde_json::json!({}));
    }

    #[test]
    fn errors_are_json_on_stdout_with_line_and_column_and_exit_codes() {
        let (v, status) = parse_json("H2 + Xx -> H2O");
        assert_eq!(status, 2);
        assert_eq!(v["error"]["kind"], "unknown_element");
        assert_eq!(
            (v["error"]["line"].as_u64(), v["error"]["column"].as_u64()),
            (Some(1), Some(6))
        );
        // Read, but no species can be it: more positive charge than protons.
        let (v, status) = parse_json("He3+");
        assert_eq!(status, 1);
        assert_eq!(v["error"]["kind"], "chemistry");
    }

    #[test]
    fn human_output_shows_unicode_canonical_latex_and_balance_as_written() {
        let output = Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
            .args(["parse", "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O"])
            .output()
            .unwrap();
        let text = String::from_utf8(output.stdout).unwrap();
        assert!(
            text.contains("read as   MnO₄⁻ + 8 H⁺ + 5 e⁻ → Mn²⁺ + 4 H₂O"),
            "{text}"
        );
        assert!(
            text.contains(r"LaTeX     \ce{MnO4^- + 8 H^+ + 5 e- -> Mn^2+ + 4 H2O}"),
            "{text}"
        );
        assert!(
            text.contains("as written: atoms and charge balance"),
            "{text}"
        );
        let output = Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
            .args(["parse", "MnO4- + H+ + e- -> Mn2+ + H2O"])
            .output()
            .unwrap();
        let text = String::from_utf8(output.stdout).unwrap();
        assert!(text.contains("as written: not balanced"), "{text}");
    }
}

#[test]
fn compartment_labels_follow_the_state_label() {
    let s = parse_species("Cu2+(aq)(anode)").unwrap();
    assert_eq!(s.ascii(), "Cu2+(aq)(anode)");
    assert_eq!(
        parse_species("Cu2+(cathode)").unwrap().ascii(),
        "Cu2+(cathode)"
    );
    assert_ne!(
        parse_species("Cu2+(cathode)").unwrap(),
        parse_species("Cu2+(anode)").unwrap()
    );
    for bad in ["e-(anode)", "Cu2+(aq)(s)", "Cu2+(left)"] {
        let err = parse_species(bad).unwrap_err();
        assert_eq!(err.kind, NotationErrorKind::Syntax, "{bad}");
    }
}

//! Non-integer stoichiometry (intercalation compounds, mixed-metal oxides): decimal subscripts
//! read exactly, through composition, molar mass, oxidation numbers, balancing and capacity.
//! Sources beside each check; CIAAW 2021 abridged weights as in tests/data/ciaaw_2021_abridged.csv.

use couplet::balance::{BalanceOptions, balance};
use couplet::capacity::{Densities, half_reaction_materials};
use couplet::notation::{Style, parse_equation, parse_species, species_to_string};
use couplet::oxidation::{Status, analyse, oxidation_numbers, signed_text};
use couplet::reaction::Reaction;
use num_rational::Ratio;

/// Checks the exact counts (as `numerator/denominator` or whole) of a formula.
fn check(text: &str, counts: &[(&str, u64, u64)]) {
    let species = parse_species(text).unwrap_or_else(|e| panic!("{text}: {}", e.render()));
    let read: Vec<(&str, Ratio<u64>)> = species
        .composition
        .exact_counts()
        .map(|(e, n)| (e.symbol(), n))
        .collect();
    let expected: Vec<(&str, Ratio<u64>)> = counts
        .iter()
        .map(|&(e, n, d)| (e, Ratio::new(n, d)))
        .collect();
    assert_eq!(read, expected, "{text}");
    // The canonical form reads back to the same species in every style.
    for style in [Style::Ascii, Style::Unicode, Style::Mhchem] {
        let written = species_to_string(&species, style);
        assert_eq!(parse_species(&written).unwrap(), species, "{written}");
    }
}

#[test]
fn decimal_subscripts_are_exact_rationals() {
    // NMC811 is LiNi0.8Mn0.1Co0.1O2 and half-delithiated LCO Li0.5CoO2 (common practice in
    // battery chemistry); Li-rich Li1.2Ni0.2Mn0.6O2 (common practice); wüstite Fe0.95O
    // (from memory, Greenwood & Earnshaw).
    check(
        "LiNi0.8Mn0.1Co0.1O2",
        &[
            ("Li", 1, 1),
            ("Ni", 4, 5),
            ("Mn", 1, 10),
            ("Co", 1, 10),
            ("O", 2, 1),
        ],
    );
    check("Li0.5CoO2", &[("Li", 1, 2), ("Co", 1, 1), ("O", 2, 1)]);
    check(
        "Li1.2Ni0.2Mn0.6O2",
        &[("Li", 6, 5), ("Ni", 1, 5), ("Mn", 3, 5), ("O", 2, 1)],
    );
    check("Fe0.95O", &[("Fe", 19, 20), ("O", 1, 1)]);
    check("Li₀.₅CoO₂", &[("Li", 1, 2), ("Co", 1, 1), ("O", 2, 1)]);
    // NMC111 written with fractions (common practice): LiNi1/3Mn1/3Co1/3O2.
    check(
        "LiNi1/3Mn1/3Co1/3O2",
        &[
            ("Li", 1, 1),
            ("Ni", 1, 3),
            ("Mn", 1, 3),
            ("Co", 1, 3),
            ("O", 2, 1),
        ],
    );
    check("Li_{1/3}O", &[("Li", 1, 3), ("O", 1, 1)]);
    check("Na_{2.5}O", &[("Na", 5, 2), ("O", 1, 1)]);
    // After digits above 1 the dot stays the adduct dot of hydrates.
    check(
        "CuSO4.5H2O",
        &[("Cu", 1, 1), ("S", 1, 1), ("O", 9, 1), ("H", 10, 1)],
    );
    for bad in [
        "Li0CoO2",
        "Li0.0CoO2",
        "Li0.1234567CoO2",
        "Li_{2.}O",
        "Li_{0.5O",
        "Ni1/0O",
        "Ni0/3O",
        // Denominators whose least common multiple passes 64 bits: a limit error.
        "Li1/999983Na1/999979K1/999961Rb1/999959",
        "Cu2+(anode)(aq)",
    ] {
        assert!(parse_species(bad).is_err(), "{bad}");
    }
}

#[test]
fn molar_mass_of_nmc811() {
    // 6.94 + 0.8×58.693 + 0.1×54.938 + 0.1×58.933 + 2×15.999 = 97.2795 g/mol (CIAAW 2021
    // abridged weights); NMC811 is quoted at about 97.28 g/mol (common practice, from memory).
    let nmc = parse_species("LiNi0.8Mn0.1Co0.1O2").unwrap();
    let mass = nmc.composition.molar_mass().unwrap().grams_per_mol;
    assert!((mass - 97.2795).abs() < 1e-9, "{mass}");
}

#[test]
fn oxidation_numbers_of_non_integer_formulas() {
    // NMC811: Li +1, O −2, so Ni, Mn and Co average +3 together (common practice); the split
    // among them (Ni mostly +3 with some +2, Mn +4, Co +3) does not follow from the formula,
    // so each is the site average and assumed.
    let nmc = oxidation_numbers(&parse_species("LiNi0.8Mn0.1Co0.1O2").unwrap()).unwrap();
    for metal in ["Ni", "Mn", "Co"] {
        let e = nmc.element(metal).unwrap();
        assert_eq!(signed_text(&e.oxidation_number), "+3", "{metal}");
        assert_eq!(e.status, Status::Assumed);
    }
    // NMC111 likewise: the three metals average +3 (common practice).
    let nmc111 = oxidation_numbers(&parse_species("LiNi1/3Mn1/3Co1/3O2").unwrap()).unwrap();
    assert_eq!(
        signed_text(&nmc111.element("Mn").unwrap().oxidation_number),
        "+3"
    );
    // Li0.5CoO2: Co +3.5 by charge balance (common practice for half-delithiated LiCoO2).
    let lco = oxidation_numbers(&parse_species("Li0.5CoO2").unwrap()).unwrap();
    let co = lco.element("Co").unwrap();
    assert_eq!(signed_text(&co.oxidation_number), "+7/2");
    assert_eq!(co.status, Status::Determined);
    assert_eq!(
        lco.per_formula_unit(lco.element("Li").unwrap().count),
        Ratio::new(1, 2)
    );
    // Wüstite Fe0.95O: Fe 2/0.95 = +40/19 on average (charge balance, IUPAC 2016 averaging).
    let fe = oxidation_numbers(&parse_species("Fe0.95O").unwrap()).unwrap();
    assert_eq!(
        signed_text(&fe.element("Fe").unwrap().oxidation_number),
        "+40/19"
    );
}

#[test]
fn delithiation_balances_and_counts_its_electrons() {
    // LiCoO2 → Li0.5CoO2 + 0.5 Li+ + 0.5 e− (common practice), in lowest whole numbers
    // 2 LiCoO2 → 2 Li0.5CoO2 + Li+ + e−: Co +3 → +7/2 in two formula units is one electron.
    let equation = parse_equation("LiCoO2 -> Li0.5CoO2 + Li+ + e-").unwrap();
    let balanced = balance(&equation, &BalanceOptions::default()).unwrap();
    assert_eq!(balanced.ascii(), "2 LiCoO2 -> 2 Li0.5CoO2 + Li+ + e-");
    assert!(balanced.reaction().imbalance().is_balanced());
    let analysis = analyse(balanced.reaction()).unwrap();
    assert_eq!(analysis.n, Ratio::from_integer(1.into()));
    // The half written with decimal coefficients is the same reaction, and balances as written.
    let halved =
        Reaction::from_equation(&parse_equation("LiCoO2 -> Li0.5CoO2 + 0.5 Li+ + 0.5 e-").unwrap());
    assert!(halved.imbalance().is_balanced());
}

#[test]
fn lithium_cobalt_oxide_capacities() {
    // LiCoO2 (97.871 g/mol): one electron per formula unit gives 274 mAh/g theoretical, half
    // delithiation (to Li0.5CoO2) the 137 mAh/g practical figure (both widely quoted, common
    // practice; q = n·F/(3.6·M), DOMAIN.md).
    let capacity = |half: &str| {
        let reaction = Reaction::from_equation(&parse_equation(half).unwrap());
        half_reaction_materials(&reaction, &Densities::new())
            .unwrap()
            .into_iter()
            .find(|m| m.species.ascii() == "LiCoO2")
            .unwrap()
            .milliamp_hours_per_gram
    };
    let full = capacity("CoO2 + Li+ + e- -> LiCoO2");
    assert!((full - 274.0).abs() < 0.5, "{full}");
    let half = capacity("Li0.5CoO2 + 0.5 Li+ + 0.5 e- -> LiCoO2");
    assert!((half - 137.0).abs() < 0.5, "{half}");
}

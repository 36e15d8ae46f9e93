//! Balancing: the published corpus (tests/data/balance_corpus.json, each entry with its
//! source), conservation and invariance properties, and the `couplet balance` command.

use assert_cmd::Command;
use couplet::balance::{
    BalanceError, BalanceOptions, BalancedReaction, ElectronRule, Impossible, Medium, balance,
    balance_counting,
};
use couplet::notation::{Equation, parse_equation};
use couplet::reaction::Reaction;
use num_bigint::BigInt;
use proptest::prelude::*;
use serde_json::Value;

const CORPUS: &str = include_str!("../data/balance_corpus.json");

fn options(medium: &str, electrons_allowed: bool) -> BalanceOptions {
    BalanceOptions {
        medium: medium.parse().unwrap(),
        electrons: if electrons_allowed {
            ElectronRule::Always
        } else {
            ElectronRule::Never
        },
        ..BalanceOptions::default()
    }
}

/// One side as (species without state label, coefficient), sorted: states and the order of
/// added species are not part of what a balance says.
fn side(terms: Vec<(String, BigInt)>) -> Vec<(String, BigInt)> {
    let mut terms = terms;
    terms.sort();
    terms
}

/// What a species is for comparing balances: element counts (sorted) and charge, so that
/// `Cu(OH)` and `CuOH` are the same species.
fn identity(species: &couplet::notation::Species) -> String {
    let mut counts: Vec<String> = species
        .composition
        .counts()
        .iter()
        .map(|(e, n)| format!("{e}{n}"))
        .collect();
    counts.sort();
    format!("{} z{}", counts.join(" "), species.charge())
}

/// One side of a reaction: species identity and whole-number coefficient.
type Side = Vec<(String, BigInt)>;

fn sides_of_reaction(reaction: &Reaction) -> (Side, Side) {
    let r = reaction
        .reactants()
        .map(|(s, c)| (identity(s), c.to_integer()))
        .collect();
    let p = reaction
        .products()
        .map(|(s, c)| (identity(s), c.to_integer()))
        .collect();
    (side(r), side(p))
}

/// Balances `input` and checks the result against `expected` (a balanced equation from a
/// source), species by species.
fn check(input: &str, medium: &str, electrons_allowed: bool, expected: &str) -> BalancedReaction {
    let equation = parse_equation(input).unwrap_or_else(|e| panic!("{}", e.render()));
    let balanced = balance(&equation, &options(medium, electrons_allowed))
        .unwrap_or_else(|e| panic!("{input}: {}", e.render(input)));
    let expected = Reaction::from_equation(&parse_equation(expected).unwrap());
    assert_eq!(
        sides_of_reaction(balanced.reaction()),
        sides_of_reaction(&expected),
        "{input} gave {}",
        balanced.ascii()
    );
    assert_user_species_keep_order_and_side(&equation, &balanced);
    balanced
}

fn assert_user_species_keep_order_and_side(equation: &Equation, balanced: &BalancedReaction) {
    for (written, result) in [
        (&equation.reactants, balanced.reactants()),
        (&equation.products, balanced.products()),
    ] {
        let written: Vec<String> = written
            .iter()
            .map(|t| t.species.without_state().ascii())
            .collect();
        let result: Vec<String> = result
            .iter()
            .map(|(s, _)| s.without_state().ascii())
            .take(written.len())
            .collect();
        assert_eq!(written, result, "user species keep order and side");
    }
}

fn assert_conserves(reaction: &Reaction) {
    assert!(
        reaction.imbalance().is_balanced(),
        "{reaction} does not conserve"
    );
}

#[test]
fn every_corpus_entry() {
    let corpus: Vec<Value> = serde_json::from_str(CORPUS).unwrap();
    assert_eq!(corpus.len(), 98);
    for entry in &corpus {
        let id = entry["id"].as_str().unwrap();
        let input = entry["input"].as_str().unwrap();
        let medium = entry["medium"].as_str().unwrap();
        let electrons_allowed = entry["electrons_allowed"].as_bool().unwrap();
        let result = balance(
            &parse_equation(input).unwrap(),
            &options(medium, electrons_allowed),
        );
        match entry["kind"].as_str().unwrap() {
            "nonunique" => match result {
                Err(BalanceError::NotUnique { basis }) => {
                    if let Some(nullity) = entry["nullity"].as_u64() {
                        assert_eq!(basis.len() as u64, nullity, "{id}");
                    }
                    basis.iter().for_each(assert_conserves);
                }
                other => panic!("{id}: expected not_unique, got {other:?}"),
            },
            "impossible" => match result {
                Err(error @ BalanceError::Impossible(_)) => {
                    assert_eq!(error.kind(), "impossible");
                }
                other => panic!("{id}: expected impossible, got {other:?}"),
            },
            _ => {
                let expected = entry["balanced"].as_str().unwrap();
                let balanced = check(input, medium, electrons_allowed, expected);
                // Electrons of a half-reaction, or n of a whole reaction from oxidation
                // numbers, as the corpus states them (null where it states none).
                if let Some(n) = entry["electrons_transferred"].as_u64() {
                    assert_eq!(balanced.electrons(), Some(BigInt::from(n)), "{id}");
                }
            }
        }
    }
}

#[test]
fn normal_form_text_of_published_examples() {
    // OpenStax Chemistry 2e (2019), Appendix L: permanganate to manganese(II) in acid.
    let b = check(
        "MnO4- -> Mn2+",
        "acid",
        true,
        "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O",
    );
    assert_eq!(b.ascii(), "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O");
    assert_eq!(b.unicode(), "MnO₄⁻ + 8 H⁺ + 5 e⁻ → Mn²⁺ + 4 H₂O");
    // Same source: permanganate to MnO2 in base; e- on the left (reduction).
    let b = check(
        "MnO4- -> MnO2",
        "base",
        true,
        "MnO4- + 2 H2O + 3 e- -> MnO2 + 4 OH-",
    );
    assert_eq!(b.ascii(), "MnO4- + 2 H2O + 3 e- -> MnO2 + 4 OH-");
}

#[test]
fn written_coefficients_are_ignored_and_states_kept() {
    // Corpus half-07 (OpenStax 2e, Appendix L): O2 + 4 H+ + 4 e- -> 2 H2O.
    let b = check(
        "0.5 O2(g) -> 7/3 H2O(l)",
        "acid",
        true,
        "O2 + 4 H+ + 4 e- -> 2 H2O",
    );
    assert_eq!(b.ascii(), "O2(g) + 4 H+ + 4 e- -> 2 H2O(l)");
}

#[test]
fn no_h_plus_in_base_and_no_oh_minus_in_acid() {
    let corpus: Vec<Value> = serde_json::from_str(CORPUS).unwrap();
    for entry in corpus.iter().filter(|e| !e["balanced"].is_null()) {
        let medium: Medium = entry["medium"].as_str().unwrap().parse().unwrap();
        let b = balance(
            &parse_equation(entry["input"].as_str().unwrap()).unwrap(),
            &options(medium.name(), entry["electrons_allowed"].as_bool().unwrap()),
        )
        .unwrap();
        let text = format!(" {} ", b.ascii());
        match medium {
            Medium::Base => assert!(!text.contains(" H+ "), "{text}"),
            Medium::Acid => assert!(!text.contains(" OH- "), "{text}"),
            _ => {}
        }
    }
}

#[test]
fn impossible_says_which_species_must_move_or_what_cannot_close() {
    let none = options("none", false);
    // Corpus impossible-07: Pb would have to be a reactant.
    let e = balance(&"PbO2 -> PbO + Pb".parse().unwrap(), &none).unwrap_err();
    match &e {
        BalanceError::Impossible(Impossible::WrongSide { species, moved }) => {
            assert_eq!(species.len(), 1);
            assert_eq!(species[0].ascii(), "Pb");
            assert_conserves(moved);
        }
        other => panic!("{other:?}"),
    }
    assert!(
        e.render("PbO2 -> PbO + Pb")
            .ends_with("\n                  ^^ column 15")
    );
    // Corpus impossible-04: copper cannot lose charge without electrons.
    let e = balance(&"Cu -> Cu2+".parse().unwrap(), &options("acid", false)).unwrap_err();
    assert_eq!(
        e.to_string(),
        "the charge cannot close: no coefficients conserve it together with the rest"
    );
    // Corpus impossible-06: O2 can only come out with coefficient zero.
    let e = balance(&"NaCl -> Na + Cl2 + O2".parse().unwrap(), &none).unwrap_err();
    assert_eq!(
        e.to_string(),
        "O2 cannot take part: its coefficient comes out zero (O cannot close otherwise)"
    );
}

#[test]
fn a_species_written_twice_is_refused_with_its_place() {
    let input = "H2O + Na -> NaOH + H2 + H2O(l)";
    let e = balance(&input.parse().unwrap(), &options("none", false)).unwrap_err();
    assert_eq!(e.kind(), "syntax");
    // The second H2O(l) starts at column 25 and is six characters long.
    assert!(
        e.render(input).ends_with("^^^^^^ column 25"),
        "{}",
        e.render(input)
    );
}

#[test]
fn the_half_reaction_test_adds_electrons_only_when_needed() {
    fn says_half(_: &Equation) -> bool {
        true
    }
    let with_test = BalanceOptions {
        medium: Medium::Acid,
        half_reaction_test: Some(says_half),
        ..BalanceOptions::default()
    };
    // Corpus half-01 (OpenStax 2e, Appendix L).
    let b = balance(&"MnO4- -> Mn2+".parse().unwrap(), &with_test).unwrap();
    assert_eq!(b.ascii(), "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O");
    // Corpus redox-45: balances without electrons, so the test is not consulted; n = 5 comes
    // from oxidation numbers.
    let b = balance(&"MnO4- + Fe2+ -> Mn2+ + Fe3+".parse().unwrap(), &with_test).unwrap();
    assert!(!b.is_half_reaction());
    assert_eq!(b.electrons(), Some(BigInt::from(5)));
    // With the built-in test (one element changes oxidation state), a skeleton without e-
    // becomes a half-reaction only when it cannot balance otherwise.
    let acid = BalanceOptions {
        medium: Medium::Acid,
        ..BalanceOptions::default()
    };
    let b = balance(&"Cu -> Cu2+".parse().unwrap(), &acid).unwrap();
    assert_eq!(b.ascii(), "Cu -> Cu2+ + 2 e-");
    // Two elements oxidised and none reduced: not a half-reaction, and no balance.
    let e = balance(&"Cu + Fe2+ -> Cu2+ + Fe3+".parse().unwrap(), &acid).unwrap_err();
    assert_eq!(e.kind(), "impossible");
}

#[test]
fn a_whole_reaction_written_across_the_arrow_is_impossible_not_a_family_of_halves() {
    // Iron(III) and iron metal comproportionate to iron(II): 2 Fe3+ + Fe -> 3 Fe2+ (common
    // practice, the reason iron powder keeps iron(II) solutions reduced). Written with Fe on
    // the right, the one balance has Fe across the arrow; adding e- would only make a
    // two-dimensional family of half-reactions.
    let input = "Fe3+ -> Fe2+ + Fe";
    let e = balance(&input.parse().unwrap(), &BalanceOptions::default()).unwrap_err();
    match &e {
        BalanceError::Impossible(Impossible::WrongSide { species, moved }) => {
            let moved_names: Vec<String> = species.iter().map(|s| s.ascii()).collect();
            assert_eq!(moved_names, ["Fe"]);
            assert_conserves(moved);
            assert_eq!(
                sides_of_reaction(moved),
                (
                    side(vec![
                        ("Fe1 z3".into(), 2.into()),
                        ("Fe1 z0".into(), 1.into())
                    ]),
                    side(vec![("Fe1 z2".into(), 3.into())])
                )
            );
        }
        other => panic!("{other:?}"),
    }
    // Asked for a half-reaction, the user still gets the family.
    let half = BalanceOptions {
        electrons: ElectronRule::Always,
        ..BalanceOptions::default()
    };
    let e = balance(&input.parse().unwrap(), &half).unwrap_err();
    assert_eq!(e.kind(), "not_unique");
}

/// A hostile equation of our own: `species` species (half on each side), each of three
/// elements drawn from the first `elements` element symbols, with six-digit subscripts, from a
/// fixed linear congruential sequence (so every run builds the same text).
pub fn hostile_equation(species: usize, elements: usize) -> String {
    const SYMBOLS: &str = "H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu Zn Ga Ge As Se Br Kr Rb Sr Y Zr Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe Cs Ba La Ce Pr Nd Pm Sm Eu Gd Tb Dy Ho Er Tm Yb Lu Hf Ta W Re Os Ir Pt Au Hg Tl Pb Bi";
    let symbols: Vec<&str> = SYMBOLS.split(' ').take(elements).collect();
    let mut state: u64 = 0x2545_f491_4f6c_dd1d;
    let mut next = |bound: u64| {
        state = state
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (state >> 33) % bound
    };
    let mut formulas = Vec::new();
    for _ in 0..species {
        let mut chosen: Vec<&str> = Vec::new();
        while chosen.len() < 3 {
            let symbol = symbols[next(symbols.len() as u64) as usize];
            if !chosen.contains(&symbol) {
                chosen.push(symbol);
            }
        }
        let formula: String = chosen
            .iter()
            .map(|s| format!("{s}{}", 100_000 + next(900_000)))
            .collect();
        formulas.push(formula);
    }
    let (left, right) = formulas.split_at(species / 2);
    format!("{} -> {}", left.join(" + "), right.join(" + "))
}

#[test]
fn a_hostile_equation_stops_at_the_work_limit_quickly() {
    // 64 species (the parser's most) over 70 elements with six-digit subscripts: the exact
    // arithmetic grows to hundreds of digits. A small limit keeps the test fast; the default
    // limit's timing is in benches/balance.rs.
    let text = hostile_equation(64, 70);
    assert!(text.len() <= 4096, "within the parser's input limit");
    // The benchmarks time the same text (benches/balance.rs, benches/check.rs).
    assert_eq!(
        text,
        include_str!("../data/hostile_64_species.txt").trim_end()
    );
    let equation = parse_equation(&text).unwrap();
    let limited = BalanceOptions {
        work_limit: 300_000,
        ..BalanceOptions::default()
    };
    let (result, used) = balance_counting(&equation, &limited);
    let error = result.unwrap_err();
    assert_eq!(error.kind(), "limit");
    assert!(matches!(error, BalanceError::Limit { limit: 300_000 }));
    assert!(error.to_string().starts_with("work limit: "), "{error}");
    // The meter stops at the first charge past the limit: one row update at most.
    assert!(used > 300_000 && used < 600_000, "{used}");
}

#[test]
fn the_reason_for_an_impossible_balance_is_worked_out_only_when_reported() {
    // Corpus half-01 skeleton: balancing without e- fails, then e- is added. The failed first
    // attempt's reason is never reported, so its cost must not be paid: the work is exactly
    // that of the two solves.
    let equation: Equation = "MnO4- -> Mn2+".parse().unwrap();
    let acid = |electrons, explain_impossible| BalanceOptions {
        medium: Medium::Acid,
        electrons,
        explain_impossible,
        ..BalanceOptions::default()
    };
    let (found, both) = balance_counting(&equation, &acid(ElectronRule::HalfReactions, true));
    assert_eq!(
        found.unwrap().ascii(),
        "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O"
    );
    let (plain, plain_work) = balance_counting(&equation, &acid(ElectronRule::Never, false));
    assert!(matches!(
        plain,
        Err(BalanceError::Impossible(Impossible::NotExplained))
    ));
    let (_, explained_work) = balance_counting(&equation, &acid(ElectronRule::Never, true));
    let (_, half_work) = balance_counting(&equation, &acid(ElectronRule::Always, true));
    assert!(explained_work > plain_work, "the reason costs work");
    assert_eq!(both, plain_work + half_work);
}

// ---- properties ----

/// Skeletons from the corpus with a unique answer, with their medium and electron rule.
fn unique_entries() -> Vec<(String, String, bool)> {
    let corpus: Vec<Value> = serde_json::from_str(CORPUS).unwrap();
    corpus
        .iter()
        .filter(|e| !e["balanced"].is_null())
        .map(|e| {
            (
                e["input"].as_str().unwrap().to_owned(),
                e["medium"].as_str().unwrap().to_owned(),
                e["electrons_allowed"].as_bool().unwrap(),
            )
        })
        .collect()
}

const POOL: &[&str] = &[
    "H2", "O2", "H2O", "H2O2", "Fe", "Fe2+", "Fe3+", "Fe2O3", "Cu", "Cu2+", "NO", "NO2", "HNO3",
    "NO3-", "Cl2", "Cl-", "ClO3-", "MnO4-", "Mn2+", "MnO2", "C", "CO", "CO2", "CH4", "SO4^2-",
    "SO2", "S", "H2S", "Zn", "Zn2+", "Na", "NaCl", "NaOH", "e-", "H+", "OH-",
];

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    /// Any output, from any skeleton of pool species in any medium, conserves every element
    /// and the charge, has positive integer coefficients and keeps the user's sides.
    #[test]
    fn every_output_conserves(
        left in proptest::sample::subsequence(POOL, 1..4),
        right in proptest::sample::subsequence(POOL, 1..4),
        medium in prop_oneof![Just("none"), Just("acid"), Just("base")],
        electrons in any::<bool>(),
    ) {
        let text = format!("{} -> {}", left.join(" + "), right.join(" + "));
        let equation = parse_equation(&text).unwrap();
        match balance(&equation, &options(medium, electrons)) {
            Ok(b) => {
                assert_conserves(b.reaction());
                for entry in b.reaction().entries() {
                    prop_assert!(entry.nu.is_integer());
                }
                assert_user_species_keep_order_and_side(&equation, &b);
            }
            Err(BalanceError::NotUnique { basis }) => {
                prop_assert!(basis.len() >= 2);
                basis.iter().for_each(assert_conserves);
            }
            Err(e) => prop_assert!(matches!(e.kind(), "impossible" | "syntax"), "{e:?}"),
        }
    }

    /// Coefficients written in the input, whole or fractional, do not change the answer.
    #[test]
    fn written_coefficients_do_not_matter(
        index in 0usize..80,
        numerators in proptest::collection::vec(1u64..50, 12),
        denominators in proptest::collection::vec(1u64..9, 12),
    ) {
        let entries = unique_entries();
        let (input, medium, electrons) = &entries[index % entries.len()];
        let plain = balance(&parse_equation(input).unwrap(), &options(medium, *electrons)).unwrap();
        let equation = parse_equation(input).unwrap();
        let scale = |terms: &[couplet::notation::Term], offset: usize| -> Vec<String> {
            terms.iter().enumerate().map(|(i, t)| {
                format!("{}/{} {}", numerators[(i + offset) % 12], denominators[(i + offset) % 12], t.species.ascii())
            }).collect()
        };
        let scaled_text = format!(
            "{} -> {}",
            scale(&equation.reactants, 0).join(" + "),
            scale(&equation.products, 5).join(" + ")
        );
        let scaled = balance(&parse_equation(&scaled_text).unwrap(), &options(medium, *electrons)).unwrap();
        prop_assert_eq!(scaled.ascii(), plain.ascii());
    }

    /// Reordering the species within a side, or swapping the sides, gives the same balance
    /// up to that reordering.
    #[test]
    fn reordering_does_not_change_the_balance(
        index in 0usize..80,
        seed in any::<u64>(),
        swap_sides in any::<bool>(),
    ) {
        let entries = unique_entries();
        let (input, medium, electrons) = &entries[index % entries.len()];
        let equation = parse_equation(input).unwrap();
        let plain = balance(&equation, &options(medium, *electrons)).unwrap();
        let shuffle = |terms: &[couplet::notation::Term]| -> Vec<String> {
            let mut names: Vec<String> = terms.iter().map(|t| t.species.ascii()).collect();
            let n = names.len();
            for i in (1..n).rev() {
                let j = (seed.rotate_left(i as u32) % (i as u64 + 1)) as usize;
                names.swap(i, j);
            }
            names
        };
        let (mut left, mut right) = (shuffle(&equation.reactants), shuffle(&equation.products));
        if swap_sides {
            std::mem::swap(&mut left, &mut right);
        }
        let text = format!("{} -> {}", left.join(" + "), right.join(" + "));
        let reordered_equation = parse_equation(&text).unwrap();
        let reordered = balance(&reordered_equation, &options(medium, *electrons)).unwrap();
        let expected = if swap_sides { plain.reaction().reversed() } else { plain.reaction().clone() };
        prop_assert_eq!(sides_of_reaction(reordered.reaction()), sides_of_reaction(&expected));
        assert_user_species_keep_order_and_side(&reordered_equation, &reordered);
    }
}

// ---- the command ----

fn couplet() -> Command {
    Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
}

#[test]
fn command_prints_ascii_unicode_and_electrons() {
    // Corpus half-40 (OpenStax 2e, Appendix L).
    couplet()
        .args(["balance", "--medium", "base", "--half", "MnO4- -> MnO2"])
        .assert()
        .success()
        .stdout(
            "MnO4- + 2 H2O + 3 e- -> MnO2 + 4 OH-\nMnO₄⁻ + 2 H₂O + 3 e⁻ → MnO₂ + 4 OH⁻\nelectrons: 3 (reduction half-reaction)\nreduced   Mn +7 → +4\nkind      reduction\n",
        );
}

#[test]
fn command_json_schema() {
    // Corpus mol-02: coefficients into the thousands, written as JSON integers.
    let output = couplet()
        .args([
            "balance",
            "--json",
            "Fe36Si5 + H3PO4 + K2Cr2O7 -> FePO4 + SiO2 + K3PO4 + CrPO4 + H2O",
        ])
        .output()
        .unwrap();
    assert!(output.status.success());
    let v: Value = serde_json::from_slice(&output.stdout).unwrap();
    assert_eq!(v["medium"], "none");
    assert_eq!(
        v["balanced"],
        "9 Fe36Si5 + 836 H3PO4 + 192 K2Cr2O7 -> 324 FePO4 + 45 SiO2 + 128 K3PO4 + 384 CrPO4 + 1254 H2O"
    );
    assert_eq!(v["products"][4]["species"], "H2O");
    assert_eq!(v["products"][4]["coefficient"], 1254);
    // Corpus mol-02 states n = 1152.
    assert_eq!(v["electrons"], 1152);
    assert_eq!(v["redox"]["n"], 1152);
    assert_eq!(v["redox"]["kind"], "redox");
    // Corpus half-41 (OpenStax 2e, Appendix L): electrons appear as a species and as a count.
    let output = couplet()
        .args(["balance", "--json", "--medium", "base", "O2 + e- -> OH-"])
        .output()
        .unwrap();
    let v: Value = serde_json::from_slice(&output.stdout).unwrap();
    assert_eq!(v["reactants"][1]["species"], "e-");
    assert_eq!(v["reactants"][1]["coefficient"], 4);
    assert_eq!(v["electrons"], 4);
}

#[test]
fn command_batch_goes_on_after_a_bad_line() {
    let input = "# acid batch\nMnO4- + Fe2+ -> Mn2+ + Fe3+\n\nCu + Fe2+ -> Cu2+ + Fe3+\nMnO4- + H2O2 -> Mn2+ + O2\nFe +\nH2 + Xx -> H2O\n";
    let output = couplet()
        .args(["balance", "--json", "--medium", "acid", "-"])
        .write_stdin(input)
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(1));
    let lines: Vec<Value> = String::from_utf8(output.stdout)
        .unwrap()
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(lines.len(), 5);
    assert_eq!(lines[0]["reactants"][2]["coefficient"], 8);
    let kinds: Vec<(&str, u64)> = lines[1..]
        .iter()
        .map(|v| {
            (
                v["error"]["kind"].as_str().unwrap(),
                v["line"].as_u64().unwrap(),
            )
        })
        .collect();
    assert_eq!(
        kinds,
        [
            ("impossible", 4),
            ("not_unique", 5),
            ("syntax", 6),
            ("unknown_element", 7)
        ]
    );
    assert_eq!(lines[2]["error"]["basis"].as_array().unwrap().len(), 2);
}

#[test]
fn command_exit_codes() {
    couplet()
        .args(["balance", "PbO2 -> PbO + Pb"])
        .assert()
        .code(1)
        .stderr(predicates::str::contains(
            "Pb would have to move across the arrow",
        ));
    couplet()
        .args(["balance", "--medium", "acid", "Cu + Fe2+ -> Cu2+ + Fe3+"])
        .assert()
        .code(1)
        .stderr(predicates::str::contains(
            "Fe2+ and Fe3+ would have to move across the arrow",
        ));
    couplet()
        .args(["balance", "Fe + -> Fe2+"])
        .assert()
        .code(2)
        .stderr(predicates::str::contains("error (syntax)"));
    couplet()
        .args(["balance", "--medium", "lye", "Fe -> Fe2+"])
        .assert()
        .code(2);
}

#[test]
fn hazardous_reactions_carry_a_caution() {
    // Dichromate is Cr(VI) (carcinogenic: common practice of the trade); electrolysis of water
    // evolves hydrogen and oxygen.
    for (input, hazard) in [
        ("K2Cr2O7 + HCl -> KCl + CrCl3 + Cl2 + H2O", "chromium(VI)"),
        ("H2O -> H2 + O2", "hydrogen"),
        // Chlorate disproportionates to perchlorate and chloride on heating: both oxy-salts are
        // strong oxidisers (common practice).
        ("KClO3 -> KClO4 + KCl", "chlorate or perchlorate"),
        // Copper in nitric acid gives nitrogen monoxide, a toxic gas; deuterium burns as
        // hydrogen does (common practice).
        ("Cu + HNO3 -> Cu(NO3)2 + NO + H2O", "nitrogen oxides"),
        ("D2 + O2 -> D2O", "hydrogen"),
    ] {
        couplet()
            .args(["balance", input])
            .assert()
            .success()
            .stdout(predicates::str::contains(format!(
                "caution: involves {hazard}"
            )))
            .stdout(predicates::str::contains("follow local codes"));
    }
    couplet()
        .args(["balance", "--medium", "acid", "MnO4- + Fe2+ -> Mn2+ + Fe3+"])
        .assert()
        .success()
        .stdout(predicates::prelude::PredicateBooleanExt::not(
            predicates::str::contains("caution"),
        ));
}

#[test]
fn every_corpus_entry_stays_far_below_the_default_work_limit() {
    // The module documentation promises that the published equations with one answer use
    // under two thousand units of the default four million; the non-unique ones also pay for
    // rewriting their basis (68 candidates per pair of reactions).
    let corpus: Vec<Value> = serde_json::from_str(CORPUS).unwrap();
    let (mut unique, mut any) = ((0, ""), (0, ""));
    for entry in &corpus {
        let options = options(
            entry["medium"].as_str().unwrap(),
            entry["electrons_allowed"].as_bool().unwrap(),
        );
        let equation = parse_equation(entry["input"].as_str().unwrap()).unwrap();
        let (_, used) = balance_counting(&equation, &options);
        let id = entry["id"].as_str().unwrap();
        if !entry["balanced"].is_null() {
            unique = unique.max((used, id));
        }
        any = any.max((used, id));
    }
    assert!(unique.0 < 2_000, "{unique:?}");
    assert!(any.0 < 10_000, "{any:?}");
}

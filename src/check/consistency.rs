//! Checks across every entry of every file given together: ids used twice, the same couple with
//! two potentials, and free-energy additivity of couples linked through shared species.
//!
//! Additivity (DOMAIN.md §Nernst, free energy): potentials do not add, free energies do. For
//! two reductions R1 (n1 e-, E1) and R2 (n2 e-, E2) and a factor b, the combination
//! R = R1 + b·R2 transfers n = n1 + b·n2 electrons and has E = (n1·E1 + b·n2·E2)/n. The
//! checker takes, for every pair of couples sharing a species other than e-, H+, OH- and
//! H2O, the b that cancels the shared species; when R is (a multiple of) a third couple of the
//! table, that couple's e0 must equal E within the tolerance.

use super::entry::JudgedEntry;
use super::{CheckOptions, Finding, Rule, SourceFile};
use crate::notation::{Span, Species, Style, species_to_string};
use crate::quotient::{Phase, phase};
use crate::reaction::Reaction;
use num_rational::BigRational;
use num_traits::{Signed, ToPrimitive, Zero};
use std::collections::{HashMap, HashSet};

/// The most couples sharing one species that the additivity check pairs up; past that the
/// species is not used as a link (pairs grow with the square of the count).
pub const MAX_COUPLES_PER_LINK: usize = 500;

/// A couple in a form that does not depend on how it was written: lowest integers, electrons on
/// the left, species in a fixed order, and each species with the phase it has in Q and in the
/// cell engine ([`crate::quotient::phase`], the one rule of state defaults): `Fe` and `Fe(s)`
/// are one species, `Cu2+` and `Cu2+(aq)` one, `H2O` and `H2O(l)` one, `Br2(l)` and
/// `Br2(aq)` two.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct CoupleKey(String);

fn species_key(species: &Species) -> String {
    let plain = species_to_string(&species.without_state(), Style::Ascii);
    match phase(species) {
        // Solutes and the solvent are how unlabelled ions and water are read: no tag.
        Phase::Solute | Phase::Solvent => plain,
        Phase::Solid => format!("{plain}(s)"),
        Phase::PureLiquid => format!("{plain}(l)"),
        Phase::Gas => format!("{plain}(g)"),
    }
}

/// The key of a couple, or `None` when the reaction has no electrons.
pub fn couple_key(reaction: &Reaction) -> Option<CoupleKey> {
    let electrons = reaction.electron_nu();
    if electrons.is_zero() {
        return None;
    }
    // Electrons on the left: reactants negative, so a reduction's e- has ν < 0.
    let direction: i128 = if electrons.is_positive() { -1 } else { 1 };
    let mut terms: Vec<String> = match lowest_integers_i128(reaction) {
        Some(numbers) => reaction
            .entries()
            .iter()
            .zip(numbers)
            .map(|(e, nu)| format!("{} {}", nu * direction, species_key(&e.species)))
            .collect(),
        None => {
            let mut lowest = reaction.in_lowest_integers();
            if direction < 0 {
                lowest = lowest.reversed();
            }
            lowest
                .entries()
                .iter()
                .map(|e| format!("{} {}", e.nu, species_key(&e.species)))
                .collect()
        }
    };
    terms.sort();
    Some(CoupleKey(terms.join(" ")))
}

/// The stoichiometric numbers scaled to the smallest whole numbers, in i128 (the common case,
/// without big-number arithmetic); `None` when a number does not fit.
fn lowest_integers_i128(reaction: &Reaction) -> Option<Vec<i128>> {
    let mut fractions = Vec::with_capacity(reaction.entries().len());
    let mut denominators_lcm: i128 = 1;
    for e in reaction.entries() {
        let (numerator, denominator) = (e.nu.numer().to_i128()?, e.nu.denom().to_i128()?);
        denominators_lcm =
            denominators_lcm.checked_mul(denominator / gcd(denominators_lcm, denominator))?;
        fractions.push((numerator, denominator));
    }
    let mut whole = Vec::with_capacity(fractions.len());
    let mut common = 0;
    for (numerator, denominator) in fractions {
        let value = numerator.checked_mul(denominators_lcm / denominator)?;
        common = gcd(common, value);
        whole.push(value);
    }
    Some(whole.into_iter().map(|v| v / common.max(1)).collect())
}

fn gcd(mut a: i128, mut b: i128) -> i128 {
    while b != 0 {
        (a, b) = (b, a % b);
    }
    a.abs()
}

fn is_solvent_or_electron(species: &Species) -> bool {
    species.is_electron() || matches!(species_key(species).as_str(), "H+" | "OH-" | "H2O")
}

struct Couple<'a> {
    entry: &'a JudgedEntry,
    reaction: &'a Reaction,
    electrons: BigRational,
    e0_volts: f64,
}

/// All table-wide findings.
pub fn check_table(
    files: &[SourceFile],
    entries: &[JudgedEntry],
    options: &CheckOptions,
) -> Vec<Finding> {
    let mut findings = Vec::new();
    let place = |entry: &JudgedEntry, span: Span| {
        let source = &files[entry.file];
        let (line, column) = source.line_column(span.start);
        format!("{}:{line}:{column}", source.name)
    };

    // Ids.
    let mut first_id: HashMap<&str, &JudgedEntry> = HashMap::new();
    for entry in entries {
        let Some((id, span)) = &entry.id else {
            continue;
        };
        match first_id.get(id.as_str()) {
            Some(first) => findings.push(Finding {
                rule: Rule::DuplicateId,
                file: entry.file,
                span: *span,
                message: format!(
                    "id '{id}' is already used at {}",
                    place(first, first.id.as_ref().map_or(first.span, |(_, s)| *s))
                ),
                suggestion: None,
                fix: None,
            }),
            None => {
                first_id.insert(id, entry);
            }
        }
    }

    // The same couple twice; one representative per couple for additivity.
    let mut couples: Vec<Couple> = Vec::new();
    let mut by_key: HashMap<CoupleKey, usize> = HashMap::new();
    for entry in entries {
        let (Some(reaction), Some((e0, e0_span))) = (&entry.reduction, entry.e0_volts) else {
            continue;
        };
        // The electrons of the reaction as written: the combinations below scale it as written.
        let electrons = -reaction.electron_nu();
        let Some(key) = couple_key(reaction) else {
            continue;
        };
        match by_key.get(&key) {
            Some(&index) => {
                let first = &couples[index];
                let difference = (e0 - first.e0_volts).abs();
                if difference > options.tolerance_volts {
                    findings.push(Finding {
                        rule: Rule::ConflictingPotentials,
                        file: entry.file,
                        span: e0_span,
                        message: format!(
                            "the same couple is at {} with e0 = {} V; they differ by {:.4} V, beyond the tolerance {} V",
                            place(first.entry, first.entry.span),
                            first.e0_volts,
                            difference,
                            options.tolerance_volts
                        ),
                        suggestion: None,
                        fix: None,
                    });
                }
            }
            None => {
                by_key.insert(key, couples.len());
                couples.push(Couple {
                    entry,
                    reaction,
                    electrons,
                    e0_volts: e0,
                });
            }
        }
    }

    // Links: species (other than e-, H+, OH-, H2O) to the couples they appear in.
    // Each couple's species keys, made once: the pair loop below looks them up millions of
    // times.
    let species_keys: Vec<Vec<String>> = couples
        .iter()
        .map(|c| {
            c.reaction
                .entries()
                .iter()
                .map(|e| species_key(&e.species))
                .collect()
        })
        .collect();
    let mut links: HashMap<String, Vec<usize>> = HashMap::new();
    for (index, couple) in couples.iter().enumerate() {
        for (e, key) in couple.reaction.entries().iter().zip(&species_keys[index]) {
            if !is_solvent_or_electron(&e.species) {
                let list = links.entry(key.clone()).or_default();
                if list.last() != Some(&index) {
                    list.push(index);
                }
            }
        }
    }
    let mut link_names: Vec<&String> = links.keys().collect();
    link_names.sort();
    let mut seen: HashSet<[usize; 3]> = HashSet::new();
    let mut pairs = 0usize;
    'links: for name in link_names {
        let members = &links[name];
        if members.len() > MAX_COUPLES_PER_LINK {
            continue;
        }
        for (a, &i) in members.iter().enumerate() {
            for &j in &members[a + 1..] {
                if pairs == options.additivity_pair_limit {
                    let entry = couples[i].entry;
                    findings.push(Finding {
                        rule: Rule::AdditivityCutShort,
                        file: entry.file,
                        span: Span::new(entry.span.start, entry.span.start + 1),
                        message: format!(
                            "the additivity check stopped after {pairs} pairs of couples (its limit); couples linked through {name} and later links were not all compared"
                        ),
                        suggestion: None,
                        fix: None,
                    });
                    break 'links;
                }
                pairs += 1;
                let (first, second) = (&couples[i], &couples[j]);
                let find = |couple: usize| {
                    couples[couple]
                        .reaction
                        .entries()
                        .iter()
                        .zip(&species_keys[couple])
                        .find(|(_, key)| *key == name)
                        .map(|(e, _)| e)
                };
                let (Some(shared), Some(other)) = (find(i), find(j)) else {
                    continue;
                };
                let factor = -(&shared.nu / &other.nu);
                // A combination without electrons is no couple: known before building it.
                let electrons = &first.electrons + &factor * &second.electrons;
                if electrons.is_zero() {
                    continue;
                }
                let combined = first.reaction.plus(&second.reaction.scaled(&factor));
                if !combined.imbalance().is_balanced() {
                    continue;
                }
                let Some(key) = couple_key(&combined) else {
                    continue;
                };
                let Some(&k) = by_key.get(&key) else { continue };
                if k == i || k == j {
                    continue;
                }
                let mut triple = [i, j, k];
                triple.sort_unstable();
                if !seen.insert(triple) {
                    continue;
                }
                // The relation found: R_i + b·R_j − (n/n_k)·R_k = 0 (electrons as written). The
                // couple whose coefficient differs in sign from the other two is the sum of the
                // other two with positive weights: it is the derived one, and the one judged.
                let third = &couples[k];
                let weights = [
                    (i, BigRational::from_integer(1.into())),
                    (j, factor.clone()),
                    (k, -(&electrons / &third.electrons)),
                ];
                let positive = weights.iter().filter(|(_, w)| w.is_positive()).count();
                let target = if positive == 1 {
                    weights.iter().position(|(_, w)| w.is_positive())
                } else {
                    weights.iter().position(|(_, w)| w.is_negative())
                };
                let Some(target) = target else { continue };
                let (t, t_weight) = &weights[target];
                let derived = &couples[*t];
                // Σ w·n·E = 0 (free energies add), solved for E of the derived couple.
                let mut weighted_sum = 0.0;
                let mut parts = Vec::new();
                for (index, (c, w)) in weights.iter().enumerate() {
                    if index == target {
                        continue;
                    }
                    let couple = &couples[*c];
                    let (Some(w), Some(n)) = (w.to_f64(), couple.electrons.to_f64()) else {
                        continue;
                    };
                    weighted_sum += w * n * couple.e0_volts;
                    parts.push(format!(
                        "{} (e0 = {} V)",
                        place(couple.entry, couple.entry.span),
                        couple.e0_volts
                    ));
                }
                let (Some(tw), Some(tn)) = (t_weight.to_f64(), derived.electrons.to_f64()) else {
                    continue;
                };
                let predicted = -weighted_sum / (tw * tn);
                let difference = (derived.e0_volts - predicted).abs();
                if difference > options.tolerance_volts {
                    findings.push(Finding {
                        rule: Rule::AdditivityViolated,
                        file: derived.entry.file,
                        span: derived.entry.e0_volts.map_or(derived.entry.span, |(_, s)| s),
                        message: format!(
                            "free energies do not add up: the couples at {} combine into this one with e0 = {:.4} V, not {} V (off by {:.4} V, tolerance {} V)",
                            parts.join(" and "),
                            predicted,
                            derived.e0_volts,
                            difference,
                            options.tolerance_volts
                        ),
                        suggestion: None,
                        fix: None,
                    });
                }
            }
        }
    }
    findings
}

#[cfg(test)]
mod tests {
    use super::*;

    fn key(text: &str) -> Option<CoupleKey> {
        couple_key(&Reaction::from_equation(&text.parse().unwrap()))
    }

    #[test]
    fn a_couple_has_one_key_however_it_is_written() {
        let silver = key("Ag+ + e- -> Ag(s)");
        assert!(silver.is_some());
        assert_eq!(key("2 Ag+ + 2 e- -> 2 Ag(s)"), silver);
        assert_eq!(key("Ag(s) -> Ag+ + e-"), silver);
        assert_eq!(key("1/2 Ag+ + 1/2 e- -> 1/2 Ag(s)"), silver);
        // Water's (l) and an ion's (aq) are left out; other states tell couples apart.
        assert_eq!(
            key("1/2 O2(g) + 2 H+ + 2 e- -> H2O"),
            key("O2(g) + 4 H+(aq) + 4 e- -> 2 H2O(l)")
        );
        assert_ne!(
            key("Br2(l) + 2 e- -> 2 Br-"),
            key("Br2(aq) + 2 e- -> 2 Br-")
        );
        // Unlabelled species take the phase Q gives them: a metal is its solid, a gaseous
        // element its gas, liquid bromine its liquid, a neutral molecule of the solute list
        // its solution.
        assert_eq!(key("Cu2+ + 2 e- -> Cu"), key("Cu2+(aq) + 2 e- -> Cu(s)"));
        assert_eq!(key("Cl2 + 2 e- -> 2 Cl-"), key("Cl2(g) + 2 e- -> 2 Cl-"));
        assert_eq!(key("Br2 + 2 e- -> 2 Br-"), key("Br2(l) + 2 e- -> 2 Br-"));
        assert_ne!(key("Cl2 + 2 e- -> 2 Cl-"), key("Cl2(aq) + 2 e- -> 2 Cl-"));
        assert_eq!(key("Ag+ -> Ag(s)"), None);
    }

    #[test]
    fn the_integer_and_exact_paths_give_the_same_key() {
        for text in [
            "3/2 O2 + 6 H+ + 6 e- -> 3 H2O",
            "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O",
        ] {
            let reaction = Reaction::from_equation(&text.parse().unwrap());
            let fast = couple_key(&reaction).unwrap();
            let mut terms: Vec<String> = reaction
                .in_lowest_integers()
                .entries()
                .iter()
                .map(|e| format!("{} {}", e.nu, species_key(&e.species)))
                .collect();
            terms.sort();
            assert_eq!(fast, CoupleKey(terms.join(" ")), "{text}");
        }
    }
}

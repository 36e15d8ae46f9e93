//! Redox analysis of a balanced reaction or half-reaction: which elements are oxidised and
//! reduced (from → to), the electrons transferred n, the kind of reaction, and for a
//! half-reaction the cross-check of n against the electrons written.
//!
//! Atoms are followed per site, not per element total: in NH4NO3 → N2O + 2 H2O the N atoms go
//! −3 → +1 and +5 → +1 although the N total does not change. On each side the atoms of an
//! element are sorted by oxidation number and paired in that order, which moves every atom as
//! little as possible (the smallest n that explains the change).
//!
//! Splitting a whole reaction into its two half-reactions is done by the balancer
//! (`crate::balance::split`), from this analysis.

use super::Pin;
use super::{Options, OxidationError, SpeciesOxidation, oxidation_numbers_with, signed_text};
use crate::elements::Element;
use crate::notation::{Equation, Species};
use crate::reaction::{Reaction, same_species};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{Signed, Zero};

/// Atoms of one element going from one oxidation number to another.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ElementChange {
    /// The element (as written; D and T keep their labels).
    pub element: Element,
    /// Oxidation number before.
    pub from: BigRational,
    /// Oxidation number after.
    pub to: BigRational,
    /// How many atoms (times the stoichiometric numbers of the reaction as given).
    pub atoms: BigRational,
    /// Electrons moved: atoms × |to − from|.
    pub electrons: BigRational,
}

/// What kind of reaction this is, as far as electrons are concerned.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum RedoxKind {
    /// Different elements are oxidised and reduced.
    Redox,
    /// One element in one state goes both up and down (Cl2 → Cl− + ClO−).
    Disproportionation,
    /// One element in two states meets in one (NH4+ + NO2− → N2).
    Comproportionation,
    /// No oxidation number changes (acid–base, precipitation, complexation).
    NoRedox,
    /// A reduction half-reaction (electrons consumed).
    Reduction,
    /// An oxidation half-reaction (electrons released).
    Oxidation,
}

impl RedoxKind {
    /// Stable name: `redox`, `disproportionation`, `comproportionation`, `no_redox`,
    /// `reduction`, `oxidation`.
    pub fn name(self) -> &'static str {
        match self {
            RedoxKind::Redox => "redox",
            RedoxKind::Disproportionation => "disproportionation",
            RedoxKind::Comproportionation => "comproportionation",
            RedoxKind::NoRedox => "no_redox",
            RedoxKind::Reduction => "reduction",
            RedoxKind::Oxidation => "oxidation",
        }
    }
}

/// The redox analysis of a reaction or half-reaction.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct RedoxAnalysis {
    /// Elements whose oxidation number goes up.
    pub oxidized: Vec<ElementChange>,
    /// Elements whose oxidation number goes down.
    pub reduced: Vec<ElementChange>,
    /// Electrons transferred, from the oxidation-number changes (for a half-reaction: in its
    /// direction; for a whole reaction: lost = gained).
    pub n: BigRational,
    /// Electrons written (|ν| of e−); zero for a whole reaction.
    pub electrons_written: BigRational,
    /// The kind.
    pub kind: RedoxKind,
    /// The oxidation numbers of each species, in the order of the reaction's entries
    /// (`None` for the electron).
    pub species: Vec<Option<SpeciesOxidation>>,
}

/// Why a reaction could not be analysed.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum RedoxError {
    /// A species has no oxidation numbers.
    #[error("{species}: {source}")]
    Oxidation {
        /// The species, canonical ASCII.
        species: String,
        /// Why.
        source: OxidationError,
    },
    /// Atoms of an element (or, for a whole reaction, the charge) are not conserved.
    #[error("the reaction is not balanced: {what}")]
    NotBalanced {
        /// What is not conserved, such as `O changes by -4` or `charge changes by +2`.
        what: String,
    },
    /// A half-reaction whose electrons disagree with its oxidation-number changes.
    #[error(
        "oxidation numbers say {} electrons but the half-reaction has {}",
        signed_text(.from_oxidation_numbers).trim_start_matches('+'),
        signed_text(.electrons_written).trim_start_matches('+')
    )]
    ElectronMismatch {
        /// n from the changes of oxidation numbers, in the half-reaction's direction.
        from_oxidation_numbers: BigRational,
        /// Electrons written (equal to what charge balance needs when the charge balances).
        electrons_written: BigRational,
    },
    /// Nothing to analyse.
    #[error("the reaction is empty")]
    Empty,
}

/// An element with its atoms on each side: (oxidation number, atoms) before and after.
type ElementSides = (
    Element,
    Vec<(BigRational, BigRational)>,
    Vec<(BigRational, BigRational)>,
);

impl RedoxError {
    /// Stable name for JSON output: `oxidation`, `not_balanced`, `electron_mismatch`, `empty`.
    pub fn kind_name(&self) -> &'static str {
        match self {
            RedoxError::Oxidation { .. } => "oxidation",
            RedoxError::NotBalanced { .. } => "not_balanced",
            RedoxError::ElectronMismatch { .. } => "electron_mismatch",
            RedoxError::Empty => "empty",
        }
    }
}

/// A user pin for one species of a reaction (Fe=+2 in FeS2, not in Fe2O3).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SpeciesPin {
    /// The species it applies to (state labels compare as in [`same_species`]).
    pub species: Species,
    /// The pinned value.
    pub pin: Pin,
}

/// Analyses a balanced reaction or half-reaction with the built-in rules and ion table.
pub fn analyse(reaction: &Reaction) -> Result<RedoxAnalysis, RedoxError> {
    analyse_with(reaction, &[])
}

fn species_oxidation(
    species: &Species,
    pins: &[SpeciesPin],
) -> Result<SpeciesOxidation, RedoxError> {
    let options = Options {
        pins: pins
            .iter()
            .filter(|p| same_species(&p.species, species))
            .map(|p| p.pin.clone())
            .collect(),
    };
    oxidation_numbers_with(species, &options).map_err(|source| RedoxError::Oxidation {
        species: species.ascii(),
        source,
    })
}

/// Analyses a balanced reaction or half-reaction, with pins for some of its species.
pub fn analyse_with(reaction: &Reaction, pins: &[SpeciesPin]) -> Result<RedoxAnalysis, RedoxError> {
    if reaction.is_empty() {
        return Err(RedoxError::Empty);
    }
    let imbalance = reaction.imbalance();
    if let Some((element, change)) = imbalance.elements.first() {
        return Err(RedoxError::NotBalanced {
            what: format!("{element} changes by {}", signed_text(change)),
        });
    }
    let electron_nu = reaction.electron_nu();
    if electron_nu.is_zero() && !imbalance.charge.is_zero() {
        return Err(RedoxError::NotBalanced {
            what: format!("charge changes by {}", signed_text(&imbalance.charge)),
        });
    }

    let mut species = Vec::with_capacity(reaction.entries().len());
    // Per element: (oxidation number, atoms) on each side.
    let mut sides: Vec<ElementSides> = Vec::new();
    for entry in reaction.entries() {
        if entry.species.is_electron() {
            species.push(None);
            continue;
        }
        let oxidation = species_oxidation(&entry.species, pins)?;
        for element in &oxidation.elements {
            let index = match sides.iter().position(|(e, _, _)| *e == element.element) {
                Some(i) => i,
                None => {
                    sides.push((element.element, Vec::new(), Vec::new()));
                    sides.len() - 1
                }
            };
            for site in &element.sites {
                let atoms = entry.nu.abs() * BigRational::from_integer(BigInt::from(site.count));
                let side = if entry.nu.is_negative() {
                    &mut sides[index].1
                } else {
                    &mut sides[index].2
                };
                side.push((site.oxidation_number.clone(), atoms));
            }
        }
        species.push(Some(oxidation));
    }

    let mut oxidized = Vec::new();
    let mut reduced = Vec::new();
    for (element, before, after) in &mut sides {
        for (from, to, atoms) in pair_atoms(before, after) {
            if from == to {
                continue;
            }
            let electrons = &atoms * (&to - &from).abs();
            let change = ElementChange {
                element: *element,
                from: from.clone(),
                to: to.clone(),
                atoms,
                electrons,
            };
            let list = if to > from {
                &mut oxidized
            } else {
                &mut reduced
            };
            match list.iter_mut().find(|c: &&mut ElementChange| {
                c.element == change.element && c.from == change.from && c.to == change.to
            }) {
                Some(existing) => {
                    existing.atoms += change.atoms;
                    existing.electrons += change.electrons;
                }
                None => list.push(change),
            }
        }
    }
    let lost: BigRational = oxidized.iter().map(|c| c.electrons.clone()).sum();
    let gained: BigRational = reduced.iter().map(|c| c.electrons.clone()).sum();

    let (n, electrons_written, kind) = if electron_nu.is_zero() {
        (
            lost.clone(),
            BigRational::zero(),
            whole_kind(&oxidized, &reduced),
        )
    } else {
        let written = electron_nu.abs();
        let (n, kind) = if electron_nu.is_negative() {
            (gained.clone(), RedoxKind::Reduction)
        } else {
            (lost.clone(), RedoxKind::Oxidation)
        };
        let opposite = if kind == RedoxKind::Reduction {
            &lost
        } else {
            &gained
        };
        if n != written || !opposite.is_zero() {
            return Err(RedoxError::ElectronMismatch {
                from_oxidation_numbers: n,
                electrons_written: written,
            });
        }
        (n, written, kind)
    };
    Ok(RedoxAnalysis {
        oxidized,
        reduced,
        n,
        electrons_written,
        kind,
        species,
    })
}

fn whole_kind(oxidized: &[ElementChange], reduced: &[ElementChange]) -> RedoxKind {
    if oxidized.is_empty() && reduced.is_empty() {
        return RedoxKind::NoRedox;
    }
    for up in oxidized {
        let downs: Vec<&ElementChange> =
            reduced.iter().filter(|c| c.element == up.element).collect();
        if downs.is_empty() {
            continue;
        }
        if downs.iter().all(|d| d.from == up.from) {
            return RedoxKind::Disproportionation;
        }
        if downs.iter().all(|d| d.to == up.to) {
            return RedoxKind::Comproportionation;
        }
    }
    RedoxKind::Redox
}

/// Pairs atoms of one element across the sides in order of oxidation number:
/// `(from, to, atoms)` chunks. Both sides hold the same number of atoms (checked before).
fn pair_atoms(
    before: &mut [(BigRational, BigRational)],
    after: &mut [(BigRational, BigRational)],
) -> Vec<(BigRational, BigRational, BigRational)> {
    before.sort_by(|a, b| a.0.cmp(&b.0));
    after.sort_by(|a, b| a.0.cmp(&b.0));
    let mut chunks = Vec::new();
    let (mut i, mut j) = (0, 0);
    let mut left_i = before.first().map(|b| b.1.clone()).unwrap_or_default();
    let mut left_j = after.first().map(|a| a.1.clone()).unwrap_or_default();
    while i < before.len() && j < after.len() {
        let take = if left_i < left_j {
            left_i.clone()
        } else {
            left_j.clone()
        };
        if take.is_positive() {
            chunks.push((before[i].0.clone(), after[j].0.clone(), take.clone()));
        }
        left_i -= &take;
        left_j -= &take;
        if left_i.is_zero() {
            i += 1;
            if let Some(b) = before.get(i) {
                left_i = b.1.clone();
            }
        }
        if left_j.is_zero() {
            j += 1;
            if let Some(a) = after.get(j) {
                left_j = a.1.clone();
            }
        }
    }
    chunks
}

/// The elements whose oxidation numbers differ between the two sides of an equation, compared
/// as sets of states (coefficients do not matter, so the equation need not be balanced).
/// Elements on one side only (O and H that the medium will supply) do not count.
pub fn changed_elements(equation: &Equation) -> Result<Vec<Element>, RedoxError> {
    let mut states: Vec<(Element, Vec<BigRational>, Vec<BigRational>)> = Vec::new();
    for (terms, left) in [(&equation.reactants, true), (&equation.products, false)] {
        for term in terms {
            if term.species.is_electron() {
                continue;
            }
            let oxidation = species_oxidation(&term.species, &[])?;
            for element in &oxidation.elements {
                let index = match states.iter().position(|(e, _, _)| *e == element.element) {
                    Some(i) => i,
                    None => {
                        states.push((element.element, Vec::new(), Vec::new()));
                        states.len() - 1
                    }
                };
                let list = if left {
                    &mut states[index].1
                } else {
                    &mut states[index].2
                };
                for site in &element.sites {
                    if !list.contains(&site.oxidation_number) {
                        list.push(site.oxidation_number.clone());
                    }
                }
            }
        }
    }
    Ok(states
        .into_iter()
        .filter(|(_, left, right)| {
            !left.is_empty()
                && !right.is_empty()
                && (left.iter().any(|v| !right.contains(v))
                    || right.iter().any(|v| !left.contains(v)))
        })
        .map(|(e, _, _)| e)
        .collect())
}

/// True when exactly one element changes oxidation state between the sides: the test the
/// balancer uses to decide that an equation is a half-reaction and may take electrons.
/// False when oxidation numbers cannot be assigned to some species.
///
/// Note: a disproportionation written with one element (`Cl2 -> Cl- + ClO3-`) also returns
/// true; with electrons added such an equation has more than one balanced form.
pub fn changes_one_element(equation: &Equation) -> bool {
    matches!(changed_elements(equation), Ok(elements) if elements.len() == 1)
}

/// The electrons that the oxidation-number changes of a reaction account for, whether or not
/// they agree with the electrons written; `None` when some species has no oxidation numbers.
/// The balancer reports it as n of a whole reaction and the data-file checker compares it with
/// the electrons of each half-reaction.
pub fn oxidation_number_electrons(reaction: &Reaction) -> Option<BigRational> {
    match analyse(reaction) {
        Ok(analysis) => Some(analysis.n),
        Err(RedoxError::ElectronMismatch {
            from_oxidation_numbers,
            ..
        }) => Some(from_oxidation_numbers),
        Err(_) => None,
    }
}

//! Splitting a balanced whole redox reaction into its oxidation and reduction half-reactions,
//! each balanced in the same medium.
//!
//! A species belongs to the oxidation half when it holds atoms of an oxidised element in the
//! state they start from (reactants) or end in (products); likewise for the reduction half.
//! A species in both roles (comproportionation, disproportionation, a salt of both partners)
//! leaves the reaction unsplit, and so does a half that will not balance alone (a spectator ion
//! bound into a salt): the answer is then "no split", never a guess.
//!
//! The same halves come back across many whole reactions (MnO4- -> Mn2+ with every reducing
//! partner), far more often than whole reactions repeat, so each thread keeps the balanced
//! form of recent half skeletons (its species in order, per side, and the medium). A kept
//! answer is the one balancing gives: the skeleton decides it, and the kept coefficients are
//! put back on the species of the reaction being split, spans and all.

use super::{BalanceOptions, BalancedReaction, ElectronRule, Medium, balance};
use crate::notation::{Arrow, Equation, Species, Term};
use crate::oxidation::RedoxAnalysis;
use crate::reaction::{Entry, Reaction};
use num_rational::Ratio;
use num_traits::Signed;
use smallvec::SmallVec;
use std::cell::RefCell;
use std::collections::HashMap;
use std::hash::{BuildHasher, Hash, Hasher};
use std::sync::Arc;

/// The two halves of a whole redox reaction.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct HalfReactions {
    /// The half that releases electrons.
    pub oxidation: BalancedReaction,
    /// The half that takes them up.
    pub reduction: BalancedReaction,
}

/// A half skeleton's entries: indices into the whole reaction's entries, reactants first.
type Skeleton = SmallVec<[usize; 8]>;

/// One balanced half skeleton as kept.
struct KeptHalf {
    balanced: BalancedReaction,
    /// Canonical ASCII of `balanced`.
    ascii: Arc<str>,
    /// For each entry of `balanced`: which species of the skeleton it is (in skeleton order),
    /// or `None` for one the medium or the electron rule added.
    origin: SmallVec<[Option<usize>; 8]>,
}

/// A half skeleton and what balancing it gave (`None`: it does not balance alone).
struct Kept {
    medium: Medium,
    reactants: usize,
    species: SmallVec<[Species; 6]>,
    half: Option<Arc<KeptHalf>>,
}

/// How many half skeletons a thread keeps before it starts afresh (memory stays bounded on a
/// batch of ever-new species; the answers do not change).
const KEPT_CAPACITY: usize = 4096;

#[derive(Default)]
struct Memo {
    // A fast fixed-seed hash (foldhash): the keys are parsed formulas, not adversarial.
    by_hash: HashMap<u64, SmallVec<[Kept; 1]>, foldhash::fast::FixedState>,
    len: usize,
}

thread_local! {
    static MEMO: RefCell<Memo> = RefCell::new(Memo::default());
}

fn skeleton_hash(medium: Medium, entries: &[Entry], skeleton: &[usize], reactants: usize) -> u64 {
    let mut hasher = foldhash::fast::FixedState::default().build_hasher();
    medium.hash(&mut hasher);
    reactants.hash(&mut hasher);
    for &i in skeleton {
        // Equal species have equal compositions, so hashing the composition (a few machine
        // words) instead of the formula tree keeps the map right; an isomer shares the hash
        // and is told apart by the comparison of species.
        let species = &entries[i].species;
        (&species.composition, species.state, species.compartment).hash(&mut hasher);
    }
    hasher.finish()
}

impl Kept {
    fn is(&self, medium: Medium, entries: &[Entry], skeleton: &[usize], reactants: usize) -> bool {
        self.medium == medium
            && self.reactants == reactants
            && self.species.len() == skeleton.len()
            && self
                .species
                .iter()
                .zip(skeleton)
                .all(|(kept, &i)| *kept == entries[i].species)
    }
}

/// The balanced half for the skeleton `skeleton` (indices into `entries`, the first
/// `reactants` of them reactants), from the memo or balanced now.
fn balanced_half(
    medium: Medium,
    entries: &[Entry],
    skeleton: &[usize],
    reactants: usize,
) -> Option<Arc<KeptHalf>> {
    let hash = skeleton_hash(medium, entries, skeleton, reactants);
    let known = MEMO.with(|memo| {
        memo.borrow().by_hash.get(&hash).and_then(|bucket| {
            bucket
                .iter()
                .find(|kept| kept.is(medium, entries, skeleton, reactants))
                .map(|kept| kept.half.clone())
        })
    });
    if let Some(half) = known {
        return half;
    }
    let half = balance_skeleton(medium, entries, skeleton, reactants).map(Arc::new);
    MEMO.with(|memo| {
        let mut memo = memo.borrow_mut();
        if memo.len >= KEPT_CAPACITY {
            memo.by_hash.clear();
            memo.len = 0;
        }
        memo.len += 1;
        memo.by_hash.entry(hash).or_default().push(Kept {
            medium,
            reactants,
            species: skeleton
                .iter()
                .map(|&i| entries[i].species.clone())
                .collect(),
            half: half.clone(),
        });
    });
    half
}

/// Balances a half skeleton the way every half is balanced: in the whole reaction's medium,
/// with electrons added.
fn balance_skeleton(
    medium: Medium,
    entries: &[Entry],
    skeleton: &[usize],
    reactants: usize,
) -> Option<KeptHalf> {
    let term = |&i: &usize| Term {
        coefficient: Ratio::from_integer(1),
        species: entries[i].species.clone(),
        span: Default::default(),
    };
    let equation = Equation {
        reactants: skeleton[..reactants].iter().map(term).collect(),
        products: skeleton[reactants..].iter().map(term).collect(),
        arrow: Arrow::Forward,
    };
    let options = BalanceOptions {
        medium,
        electrons: ElectronRule::Always,
        ..BalanceOptions::default()
    };
    let balanced = balance(&equation, &options).ok()?;
    let origin = balanced
        .reaction()
        .entries()
        .iter()
        .map(|entry| {
            skeleton
                .iter()
                .position(|&i| entries[i].species == entry.species)
        })
        .collect();
    let ascii = balanced.ascii().into();
    Some(KeptHalf {
        balanced,
        ascii,
        origin,
    })
}

impl KeptHalf {
    /// The kept half on the species of `entries` (the reaction being split) where they came
    /// from it: what balancing this reaction's skeleton gives, spans included.
    fn on(&self, entries: &[Entry], skeleton: &[usize]) -> BalancedReaction {
        let reaction = Reaction::from_distinct_species(
            self.balanced
                .reaction()
                .entries()
                .iter()
                .zip(&self.origin)
                .map(|(entry, origin)| {
                    let species = match origin {
                        Some(p) => &entries[skeleton[*p]].species,
                        None => &entry.species,
                    };
                    (species.clone(), entry.nu.clone())
                }),
        );
        BalancedReaction {
            reaction,
            medium: self.balanced.medium,
            electrons_transferred: self.balanced.electrons_transferred,
        }
    }
}

/// The two half skeletons of `balanced`, given for each entry whether it plays in the
/// oxidation and in the reduction; `None` when some entry plays in both or a side is empty.
fn skeletons(
    balanced: &BalancedReaction,
    plays: impl Fn(usize, &Entry) -> (bool, bool),
) -> Option<[(Skeleton, usize); 2]> {
    if balanced.is_half_reaction() {
        return None;
    }
    let entries = balanced.reaction().entries();
    let mut halves: [(Skeleton, usize); 2] = Default::default();
    // Reactants first in each half, in entry order: the skeleton as written.
    for reactants in [true, false] {
        for (i, entry) in entries.iter().enumerate() {
            if entry.nu.is_negative() != reactants {
                continue;
            }
            let half = match plays(i, entry) {
                (true, true) => return None,
                (true, false) => &mut halves[0],
                (false, true) => &mut halves[1],
                (false, false) => continue,
            };
            half.0.push(i);
            if reactants {
                half.1 += 1;
            }
        }
    }
    halves
        .iter()
        .all(|(skeleton, _)| !skeleton.is_empty())
        .then_some(halves)
}

/// Each half must move electrons the way its name says: the oxidation releases them.
fn moves_electrons_as_named(oxidation: &BalancedReaction, reduction: &BalancedReaction) -> bool {
    oxidation.reaction().electron_nu().is_positive()
        && reduction.reaction().electron_nu().is_negative()
}

/// Both halves balanced (from the memo where kept), oxidation first, when each moves
/// electrons the way its name says.
fn kept_halves(
    balanced: &BalancedReaction,
    plays: impl Fn(usize, &Entry) -> (bool, bool),
) -> Option<(Skeleton, Arc<KeptHalf>, Skeleton, Arc<KeptHalf>)> {
    let [(oxidation, ox_reactants), (reduction, red_reactants)] = skeletons(balanced, plays)?;
    let entries = balanced.reaction().entries();
    let medium = balanced.medium();
    let oxidising = balanced_half(medium, entries, &oxidation, ox_reactants)?;
    let reducing = balanced_half(medium, entries, &reduction, red_reactants)?;
    moves_electrons_as_named(&oxidising.balanced, &reducing.balanced)
        .then_some((oxidation, oxidising, reduction, reducing))
}

/// Splits `balanced` (a whole reaction) into its two half-reactions, or `None` when the
/// reaction is not a plain redox reaction that splits by species (see the module docs).
pub fn split(balanced: &BalancedReaction, analysis: &RedoxAnalysis) -> Option<HalfReactions> {
    if analysis.oxidized.is_empty() || analysis.reduced.is_empty() {
        return None;
    }
    let (oxidation, oxidising, reduction, reducing) = kept_halves(balanced, |i, entry| {
        analysis.plays(i, entry.nu.is_negative())
    })?;
    let entries = balanced.reaction().entries();
    Some(HalfReactions {
        oxidation: oxidising.on(entries, &oxidation),
        reduction: reducing.on(entries, &reduction),
    })
}

impl HalfReactions {
    /// The canonical ASCII of the two halves [`split`] gives (oxidation first), from the
    /// per-thread memo without building either reaction; `plays(i, entry)` says whether entry
    /// `i` of `balanced` takes part in the oxidation and in the reduction, as
    /// [`RedoxAnalysis::plays`] does.
    pub fn ascii_of(
        balanced: &BalancedReaction,
        plays: impl Fn(usize, &Entry) -> (bool, bool),
    ) -> Option<[Arc<str>; 2]> {
        let (_, oxidising, _, reducing) = kept_halves(balanced, plays)?;
        Some([oxidising.ascii.clone(), reducing.ascii.clone()])
    }

    /// [`split`] without the memo: both halves balanced afresh (the reference the memo is
    /// checked against).
    pub fn split_afresh(
        balanced: &BalancedReaction,
        analysis: &RedoxAnalysis,
    ) -> Option<HalfReactions> {
        if analysis.oxidized.is_empty() || analysis.reduced.is_empty() {
            return None;
        }
        let [(oxidation, ox_reactants), (reduction, red_reactants)] =
            skeletons(balanced, |i, entry| {
                analysis.plays(i, entry.nu.is_negative())
            })?;
        let entries = balanced.reaction().entries();
        let medium = balanced.medium();
        let oxidation = balance_skeleton(medium, entries, &oxidation, ox_reactants)?.balanced;
        let reduction = balance_skeleton(medium, entries, &reduction, red_reactants)?.balanced;
        moves_electrons_as_named(&oxidation, &reduction).then_some(HalfReactions {
            oxidation,
            reduction,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::balance::balance_text;
    use crate::oxidation::analyse;

    /// The corpus inputs in their media, then every pair of couples in acid and in base.
    fn lines() -> Vec<(String, Medium)> {
        let mut lines = crate::oxidation::corpus::lines();
        lines.extend(crate::oxidation::corpus::pairs_of_couples());
        lines
    }

    #[test]
    fn kept_halves_are_what_balancing_the_skeletons_gives() {
        let mut split_lines = 0;
        // The second round finds every half in the memo.
        for _ in 0..2 {
            for (line, medium) in lines() {
                let options = BalanceOptions {
                    medium,
                    ..BalanceOptions::default()
                };
                let Ok(balanced) = balance_text(&line, &options) else {
                    continue;
                };
                let Ok(analysis) = analyse(balanced.reaction()) else {
                    continue;
                };
                let afresh = HalfReactions::split_afresh(&balanced, &analysis);
                // Debug shows every field, spans of the species included.
                assert_eq!(
                    format!("{:?}", split(&balanced, &analysis)),
                    format!("{afresh:?}"),
                    "{line}"
                );
                let ascii = HalfReactions::ascii_of(&balanced, |i, entry| {
                    analysis.plays(i, entry.nu.is_negative())
                });
                assert_eq!(
                    ascii.map(|texts| texts.map(|text| text.to_string())),
                    afresh
                        .as_ref()
                        .map(|h| [h.oxidation.ascii(), h.reduction.ascii()]),
                    "{line}"
                );
                split_lines += usize::from(afresh.is_some());
            }
        }
        // Most pairs of couples split (some, such as two couples of one element, do not).
        assert!(split_lines > 300, "{split_lines}");
    }
}

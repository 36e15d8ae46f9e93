//! Splitting a balanced whole redox reaction into its oxidation and reduction half-reactions,
//! each balanced in the same medium.
//!
//! A species belongs to the oxidation half when it holds atoms of an oxidised element in the
//! state they start from (reactants) or end in (products); likewise for the reduction half.
//! A species in both roles (comproportionation, disproportionation, a salt of both partners)
//! leaves the reaction unsplit, and so does a half that will not balance alone (a spectator ion
//! bound into a salt): the answer is then "no split", never a guess.

use super::{BalanceOptions, BalancedReaction, ElectronRule, balance};
use crate::notation::{Arrow, Equation, Term};
use crate::oxidation::{ElementChange, RedoxAnalysis, SpeciesOxidation};
use crate::reaction::Entry;
use num_rational::Ratio;
use num_traits::Signed;

/// The two halves of a whole redox reaction.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct HalfReactions {
    /// The half that releases electrons.
    pub oxidation: BalancedReaction,
    /// The half that takes them up.
    pub reduction: BalancedReaction,
}

fn plays(oxidation: &SpeciesOxidation, changes: &[ElementChange], is_reactant: bool) -> bool {
    oxidation.elements.iter().any(|element| {
        changes.iter().any(|change| {
            let state = if is_reactant {
                &change.from
            } else {
                &change.to
            };
            change.element == element.element
                && element.sites.iter().any(|s| &s.oxidation_number == state)
        })
    })
}

fn skeleton(entries: &[&Entry]) -> Equation {
    let term = |entry: &&Entry| Term {
        coefficient: Ratio::from_integer(1),
        species: entry.species.clone(),
        span: Default::default(),
    };
    Equation {
        reactants: entries
            .iter()
            .filter(|e| e.nu.is_negative())
            .map(term)
            .collect(),
        products: entries
            .iter()
            .filter(|e| e.nu.is_positive())
            .map(term)
            .collect(),
        arrow: Arrow::Forward,
    }
}

/// Splits `balanced` (a whole reaction) into its two half-reactions, or `None` when the
/// reaction is not a plain redox reaction that splits by species (see the module docs).
pub fn split(balanced: &BalancedReaction, analysis: &RedoxAnalysis) -> Option<HalfReactions> {
    if balanced.is_half_reaction() || analysis.oxidized.is_empty() || analysis.reduced.is_empty() {
        return None;
    }
    let entries = balanced.reaction().entries();
    let mut oxidation_side = Vec::new();
    let mut reduction_side = Vec::new();
    for (entry, oxidation) in entries.iter().zip(&analysis.species) {
        let Some(oxidation) = oxidation else { continue };
        let is_reactant = entry.nu.is_negative();
        let oxidised = plays(oxidation, &analysis.oxidized, is_reactant);
        let reduced = plays(oxidation, &analysis.reduced, is_reactant);
        match (oxidised, reduced) {
            (true, true) => return None,
            (true, false) => oxidation_side.push(entry),
            (false, true) => reduction_side.push(entry),
            (false, false) => {}
        }
    }
    let options = BalanceOptions {
        medium: balanced.medium(),
        electrons: ElectronRule::Always,
        ..BalanceOptions::default()
    };
    let oxidation = balance(&skeleton(&oxidation_side), &options).ok()?;
    let reduction = balance(&skeleton(&reduction_side), &options).ok()?;
    // Each half must move electrons the way its name says.
    let released = oxidation.reaction().electron_nu().is_positive();
    let taken_up = reduction.reaction().electron_nu().is_negative();
    (released && taken_up).then_some(HalfReactions {
        oxidation,
        reduction,
    })
}

//! Element counts, charge and molar mass of a species.
//!
//! A composition is computed once, when a species is read, with checked arithmetic; the
//! balancer, the oxidation-number rules and the capacity figures all start from it.

use crate::elements::{Element, WeightKind};
use std::fmt;

/// How many atoms of each element a species holds, in order of first appearance, and its charge.
#[derive(Clone, Debug, Default, PartialEq, Eq, Hash)]
pub struct Composition {
    counts: Vec<(Element, u64)>,
    charge: i64,
}

/// A molar mass and whether any element in it lacks a standard atomic weight.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MolarMass {
    /// g/mol, from the element table.
    pub grams_per_mol: f64,
    /// True when an element with no standard atomic weight contributed the mass number of its
    /// longest-lived isotope: the figure is then only approximate.
    pub uses_mass_numbers: bool,
}

impl Composition {
    /// An empty composition with the given charge (the electron is `Composition::charged(-1)`).
    pub fn charged(charge: i64) -> Composition {
        Composition {
            counts: Vec::new(),
            charge,
        }
    }

    /// Adds `count` atoms of `element`; `None` if a count overflows.
    pub fn add(&mut self, element: Element, count: u64) -> Option<()> {
        match self.counts.iter_mut().find(|(e, _)| *e == element) {
            Some((_, existing)) => *existing = existing.checked_add(count)?,
            None => self.counts.push((element, count)),
        }
        Some(())
    }

    /// Adds every count of `other` times `multiplier`; `None` on overflow.
    pub fn add_scaled(&mut self, other: &Composition, multiplier: u64) -> Option<()> {
        for &(element, count) in &other.counts {
            self.add(element, count.checked_mul(multiplier)?)?;
        }
        Some(())
    }

    /// Sets the charge.
    pub fn set_charge(&mut self, charge: i64) {
        self.charge = charge;
    }

    /// Net charge.
    pub fn charge(&self) -> i64 {
        self.charge
    }

    /// Atoms of `element` (0 when absent).
    pub fn count(&self, element: Element) -> u64 {
        self.counts
            .iter()
            .find(|(e, _)| *e == element)
            .map_or(0, |&(_, n)| n)
    }

    /// Elements and counts in order of first appearance.
    pub fn counts(&self) -> &[(Element, u64)] {
        &self.counts
    }

    /// True when there are no atoms (the electron).
    pub fn is_empty(&self) -> bool {
        self.counts.is_empty()
    }

    /// Total number of atoms.
    pub fn atom_count(&self) -> u64 {
        self.counts.iter().map(|&(_, n)| n).sum()
    }

    /// Molar mass from the element table; `None` for the electron (no atoms).
    pub fn molar_mass(&self) -> Option<MolarMass> {
        if self.counts.is_empty() {
            return None;
        }
        let mut mass = MolarMass {
            grams_per_mol: 0.0,
            uses_mass_numbers: false,
        };
        for &(element, count) in &self.counts {
            let data = element.data();
            mass.grams_per_mol += data.atomic_weight * count as f64;
            mass.uses_mass_numbers |= data.weight_kind == WeightKind::MassNumber;
        }
        Some(mass)
    }
}

impl fmt::Display for Composition {
    /// `Mn 1, O 4; charge -1`
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (i, (element, count)) in self.counts.iter().enumerate() {
            if i > 0 {
                f.write_str(", ")?;
            }
            write!(f, "{element} {count}")?;
        }
        write!(f, "; charge {}", self.charge)
    }
}

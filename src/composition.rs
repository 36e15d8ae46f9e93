//! Element counts, charge and molar mass of a species.
//!
//! A composition is computed once, when a species is read, with checked arithmetic; the
//! balancer, the oxidation-number rules and the capacity figures all start from it.
//!
//! Counts are exact rationals kept over one common denominator: whole numbers for ordinary
//! formulas (the denominator is 1 and every figure is the integer count), and numerators over
//! the least common denominator for non-integer stoichiometry (`Li0.5CoO2`: Li 1, Co 2, O 4
//! over 2). Code that needs whole atoms works on [`Composition::counts`] with
//! [`Composition::denominator`] formula units; [`Composition::count`] gives the exact count.

use crate::elements::{Element, WeightKind};
use num_integer::Integer;
use num_rational::Ratio;
use smallvec::SmallVec;
use std::fmt;

/// How many atoms of each element a species holds, in order of first appearance, and its charge.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct Composition {
    /// Atoms per `denominator` formula units. Most species hold at most four elements, which
    /// then live inline: a species is cloned into every reaction it takes part in.
    counts: SmallVec<[(Element, u64); 4]>,
    /// The least common denominator of the counts (1 for whole-number formulas).
    denominator: u64,
    charge: i64,
}

impl Default for Composition {
    fn default() -> Composition {
        Composition::charged(0)
    }
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
            counts: SmallVec::new(),
            denominator: 1,
            charge,
        }
    }

    /// Adds `count` atoms of `element`; `None` if a count overflows.
    pub fn add(&mut self, element: Element, count: u64) -> Option<()> {
        let scaled = count.checked_mul(self.denominator)?;
        self.add_scaled_atoms(element, scaled)
    }

    /// Adds an exact, possibly non-integer count (`0.8` of Ni in `LiNi0.8Mn0.1Co0.1O2`);
    /// `None` if a count overflows.
    pub fn add_exact(&mut self, element: Element, count: Ratio<u64>) -> Option<()> {
        if count.is_integer() {
            return self.add(element, *count.numer());
        }
        let common =
            (self.denominator / self.denominator.gcd(count.denom())).checked_mul(*count.denom())?;
        let factor = common / self.denominator;
        if factor != 1 {
            for (_, n) in &mut self.counts {
                *n = n.checked_mul(factor)?;
            }
            self.denominator = common;
        }
        let scaled = count.numer().checked_mul(common / count.denom())?;
        self.add_scaled_atoms(element, scaled)?;
        self.reduce();
        Some(())
    }

    fn add_scaled_atoms(&mut self, element: Element, scaled: u64) -> Option<()> {
        match self.counts.iter_mut().find(|(e, _)| *e == element) {
            Some((_, existing)) => *existing = existing.checked_add(scaled)?,
            None => self.counts.push((element, scaled)),
        }
        Some(())
    }

    /// Keeps the denominator least, so that equal compositions compare equal.
    fn reduce(&mut self) {
        let common = self
            .counts
            .iter()
            .fold(self.denominator, |g, &(_, n)| g.gcd(&n));
        if common > 1 {
            for (_, n) in &mut self.counts {
                *n /= common;
            }
            self.denominator /= common;
        }
    }

    /// Adds every count of `other` times `multiplier`; `None` on overflow.
    pub fn add_scaled(&mut self, other: &Composition, multiplier: u64) -> Option<()> {
        for &(element, count) in &other.counts {
            let exact = Ratio::new(count.checked_mul(multiplier)?, other.denominator);
            self.add_exact(element, exact)?;
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

    /// Atoms of `element` per formula unit, exact (0 when absent).
    pub fn count(&self, element: Element) -> Ratio<u64> {
        Ratio::new(self.scaled_count(element), self.denominator)
    }

    /// Atoms of `element` per [`Composition::denominator`] formula units (0 when absent): the
    /// count itself for whole-number formulas.
    pub fn scaled_count(&self, element: Element) -> u64 {
        self.counts
            .iter()
            .find(|(e, _)| *e == element)
            .map_or(0, |&(_, n)| n)
    }

    /// Elements with their atoms per [`Composition::denominator`] formula units, in order of
    /// first appearance: the counts themselves when the denominator is 1.
    pub fn counts(&self) -> &[(Element, u64)] {
        &self.counts
    }

    /// Elements with their exact counts per formula unit, in order of first appearance.
    pub fn exact_counts(&self) -> impl Iterator<Item = (Element, Ratio<u64>)> + '_ {
        self.counts
            .iter()
            .map(|&(e, n)| (e, Ratio::new(n, self.denominator)))
    }

    /// The least common denominator of the counts: 1 for whole-number formulas.
    pub fn denominator(&self) -> u64 {
        self.denominator
    }

    /// True when every count is a whole number.
    pub fn is_integral(&self) -> bool {
        self.denominator == 1
    }

    /// True when there are no atoms (the electron).
    pub fn is_empty(&self) -> bool {
        self.counts.is_empty()
    }

    /// Total number of atoms per formula unit, exact.
    pub fn atom_count(&self) -> Ratio<u64> {
        Ratio::new(self.counts.iter().map(|&(_, n)| n).sum(), self.denominator)
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
        mass.grams_per_mol /= self.denominator as f64;
        Some(mass)
    }
}

impl fmt::Display for Composition {
    /// `Mn 1, O 4; charge -1`
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (i, (element, count)) in self.exact_counts().enumerate() {
            if i > 0 {
                f.write_str(", ")?;
            }
            write!(f, "{element} {}", decimal_text(&count))?;
        }
        write!(f, "; charge {}", self.charge)
    }
}

/// An exact count as written in formulas: `4`, `0.8`, `0.125`; a count whose denominator has
/// a factor other than 2 and 5 (never read from a decimal) as a fraction, `1/3`.
pub fn decimal_text(count: &Ratio<u64>) -> String {
    decimal_text_within(count, 19)
}

/// [`decimal_text`] with at most `max_places` decimal places: a longer decimal is written as
/// its fraction (`1/256` rather than `0.00390625` with six places at most).
pub fn decimal_text_within(count: &Ratio<u64>, max_places: u32) -> String {
    let (numer, denom) = (*count.numer(), *count.denom());
    if denom == 1 {
        return numer.to_string();
    }
    let mut places = 0u32;
    let mut scale = 1u64;
    while !scale.is_multiple_of(denom) {
        match scale.checked_mul(10) {
            Some(next) if places < max_places => scale = next,
            _ => return format!("{numer}/{denom}"),
        }
        places += 1;
    }
    let whole = numer / denom;
    let fraction = (numer % denom) as u128 * (scale / denom) as u128;
    format!("{whole}.{fraction:0width$}", width = places as usize)
}

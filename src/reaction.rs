//! A reaction as signed stoichiometric numbers ν (products > 0, reactants < 0), in exact
//! rationals.
//!
//! This is the one representation that balancing, combining half-reactions into a cell,
//! adding free energies of couples and stepping a discharge all work in: scaling, adding and
//! reversing reactions are plain linear algebra on it, and species that end up on both sides
//! cancel by construction. [`Reaction::imbalance`] recounts atoms and charge independently of
//! how the reaction was made.

use crate::elements::Element;
use crate::notation::{Arrow, Equation, Species, Style, write_species};
use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::fmt;

/// One species and its signed stoichiometric number.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Entry {
    /// The species.
    pub species: Species,
    /// ν: positive for products, negative for reactants, never zero.
    pub nu: BigRational,
}

/// A reaction: species with signed stoichiometric numbers, in the order they were first added.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Reaction {
    entries: Vec<Entry>,
}

/// What a reaction fails to conserve: net change (products − reactants) per element, and of charge.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Imbalance {
    /// Elements whose atoms are not conserved, with the net change.
    pub elements: Vec<(Element, BigRational)>,
    /// Net change of charge (zero when conserved).
    pub charge: BigRational,
}

impl Imbalance {
    /// True when every element and the charge are conserved.
    pub fn is_balanced(&self) -> bool {
        self.elements.is_empty() && self.charge.is_zero()
    }
}

/// Whether two species are the same for cancelling: the same formula and charge, the same
/// compartment, and the same state label when both carry one (`H2O` and `H2O(l)` are the same
/// species; `Cu2+(cathode)` and `Cu2+(anode)` are not).
pub fn same_species(a: &Species, b: &Species) -> bool {
    a.kind == b.kind
        && a.compartment == b.compartment
        && match (a.state, b.state) {
            (Some(x), Some(y)) => x == y,
            _ => true,
        }
}

fn ratio_u64(c: &num_rational::Ratio<u64>) -> BigRational {
    BigRational::new(BigInt::from(*c.numer()), BigInt::from(*c.denom()))
}

impl Reaction {
    /// An empty reaction.
    pub fn new() -> Reaction {
        Reaction::default()
    }

    /// The reaction as written, with the written coefficients (omitted ones are 1).
    pub fn from_equation(equation: &Equation) -> Reaction {
        let mut reaction = Reaction::new();
        for term in &equation.reactants {
            reaction.add(&term.species, -ratio_u64(&term.coefficient));
        }
        for term in &equation.products {
            reaction.add(&term.species, ratio_u64(&term.coefficient));
        }
        reaction
    }

    /// A reaction from species known to be distinct (no two the same by [`same_species`]) with
    /// nonzero ν, in the order given: what [`Reaction::add`] would build from them, without
    /// looking each one up.
    pub(crate) fn from_distinct_species(
        entries: impl Iterator<Item = (Species, BigRational)>,
    ) -> Reaction {
        // A filtered iterator gives no lower bound: reserve its upper one, so that the entries
        // are never moved while they are collected.
        let mut collected = Vec::with_capacity(entries.size_hint().1.unwrap_or(0));
        collected.extend(entries.map(|(species, nu)| Entry { species, nu }));
        let entries = collected;
        debug_assert!(entries.iter().enumerate().all(|(i, e)| {
            !e.nu.is_zero()
                && !entries[..i]
                    .iter()
                    .any(|f| same_species(&f.species, &e.species))
        }));
        Reaction { entries }
    }

    /// Adds `nu` to the stoichiometric number of `species`, dropping it when it reaches zero.
    /// A state label fills in where the existing entry had none.
    pub fn add(&mut self, species: &Species, nu: BigRational) {
        if nu.is_zero() {
            return;
        }
        match self
            .entries
            .iter()
            .position(|e| same_species(&e.species, species))
        {
            Some(i) => {
                let entry = &mut self.entries[i];
                entry.nu += nu;
                if entry.species.state.is_none() {
                    entry.species.state = species.state;
                }
                if entry.nu.is_zero() {
                    self.entries.remove(i);
                }
            }
            None => self.entries.push(Entry {
                species: species.clone(),
                nu,
            }),
        }
    }

    /// Entries in order of first appearance.
    pub fn entries(&self) -> &[Entry] {
        &self.entries
    }

    /// True when no species remain.
    pub fn is_empty(&self) -> bool {
        self.entries.is_empty()
    }

    /// ν of `species` (zero when absent).
    pub fn nu(&self, species: &Species) -> BigRational {
        self.entries
            .iter()
            .find(|e| same_species(&e.species, species))
            .map_or_else(BigRational::zero, |e| e.nu.clone())
    }

    /// ν of the electron: negative when electrons are consumed (a reduction), positive when
    /// released (an oxidation), zero for a whole reaction.
    pub fn electron_nu(&self) -> BigRational {
        self.entries
            .iter()
            .find(|e| e.species.is_electron())
            .map_or_else(BigRational::zero, |e| e.nu.clone())
    }

    /// Every ν multiplied by `factor` (a zero factor gives the empty reaction).
    pub fn scaled(&self, factor: &BigRational) -> Reaction {
        if factor.is_zero() {
            return Reaction::new();
        }
        Reaction {
            entries: self
                .entries
                .iter()
                .map(|e| Entry {
                    species: e.species.clone(),
                    nu: &e.nu * factor,
                })
                .collect(),
        }
    }

    /// The reverse reaction (every ν negated).
    pub fn reversed(&self) -> Reaction {
        self.scaled(&-BigRational::one())
    }

    /// The sum of two reactions; species on both sides cancel.
    pub fn plus(&self, other: &Reaction) -> Reaction {
        let mut sum = self.clone();
        for e in &other.entries {
            sum.add(&e.species, e.nu.clone());
        }
        sum
    }

    /// Recounts atoms of every element and the charge: products minus reactants.
    pub fn imbalance(&self) -> Imbalance {
        if let Some(imbalance) = self.imbalance_in_machine_integers() {
            return imbalance;
        }
        self.imbalance_in_rationals()
    }

    /// The recount when every ν is an integer that fits `i128` and no sum overflows (the usual
    /// case for balanced reactions): the same sums, without normalising a rational at each
    /// step. `None` sends the caller to the exact rational recount.
    fn imbalance_in_machine_integers(&self) -> Option<Imbalance> {
        let mut elements: Vec<(Element, i128)> = Vec::new();
        let mut charge: i128 = 0;
        for e in &self.entries {
            // Non-integer stoichiometry takes the rational recount.
            if !e.nu.is_integer() || !e.species.composition.is_integral() {
                return None;
            }
            let nu = i128::try_from(e.nu.numer()).ok()?;
            charge = charge.checked_add(nu.checked_mul(i128::from(e.species.charge()))?)?;
            for &(element, count) in e.species.composition.counts() {
                let change = nu.checked_mul(i128::from(count))?;
                match elements.iter_mut().find(|(el, _)| *el == element) {
                    Some((_, total)) => *total = total.checked_add(change)?,
                    None => elements.push((element, change)),
                }
            }
        }
        let whole = |n: i128| BigRational::from_integer(BigInt::from(n));
        Some(Imbalance {
            elements: elements
                .into_iter()
                .filter(|&(_, n)| n != 0)
                .map(|(e, n)| (e, whole(n)))
                .collect(),
            charge: whole(charge),
        })
    }

    fn imbalance_in_rationals(&self) -> Imbalance {
        let mut elements: Vec<(Element, BigRational)> = Vec::new();
        let mut charge = BigRational::zero();
        for e in &self.entries {
            charge += &e.nu * BigRational::from_integer(BigInt::from(e.species.charge()));
            for (element, count) in e.species.composition.exact_counts() {
                let change = &e.nu * ratio_u64(&count);
                match elements.iter_mut().find(|(el, _)| *el == element) {
                    Some((_, total)) => *total += change,
                    None => elements.push((element, change)),
                }
            }
        }
        elements.retain(|(_, n)| !n.is_zero());
        Imbalance { elements, charge }
    }

    /// The same reaction scaled to the smallest whole numbers with no common factor, keeping
    /// its direction. The empty reaction stays empty.
    pub fn in_lowest_integers(&self) -> Reaction {
        if self.entries.is_empty() {
            return self.clone();
        }
        let mut denominators_lcm = BigInt::one();
        for e in &self.entries {
            denominators_lcm = denominators_lcm.lcm(e.nu.denom());
        }
        let mut numerators_gcd = BigInt::zero();
        for e in &self.entries {
            let whole = (&e.nu * BigRational::from_integer(denominators_lcm.clone())).to_integer();
            numerators_gcd = numerators_gcd.gcd(&whole);
        }
        let factor = BigRational::new(denominators_lcm, numerators_gcd.abs());
        self.scaled(&factor)
    }

    /// Reactants with positive coefficients, in order.
    pub fn reactants(&self) -> impl Iterator<Item = (&Species, BigRational)> {
        self.entries
            .iter()
            .filter(|e| e.nu.is_negative())
            .map(|e| (&e.species, -e.nu.clone()))
    }

    /// Products with positive coefficients, in order.
    pub fn products(&self) -> impl Iterator<Item = (&Species, BigRational)> {
        self.entries
            .iter()
            .filter(|e| e.nu.is_positive())
            .map(|e| (&e.species, e.nu.clone()))
    }

    /// Writes the reaction in a given style with an arrow, reactants first.
    pub fn to_text(&self, style: Style, arrow: Arrow) -> String {
        let arrow_text = match (style, arrow) {
            (Style::Unicode, Arrow::Forward) => "→",
            (Style::Unicode, Arrow::Equilibrium) => "⇌",
            (Style::Mhchem, _) => "->",
            (_, a) => a.ascii(),
        };
        // One string, written in place: no string per species or per coefficient.
        let mut out = String::with_capacity(12 * self.entries.len() + 8);
        self.write_side(&mut out, style, true);
        out.push(' ');
        out.push_str(arrow_text);
        out.push(' ');
        self.write_side(&mut out, style, false);
        out
    }

    /// The reactants (or the products) as `2 H2O + O2`: |ν| before each species unless it is 1.
    fn write_side(&self, out: &mut String, style: Style, reactants: bool) {
        let side = self.entries.iter().filter(|e| {
            if reactants {
                e.nu.is_negative()
            } else {
                e.nu.is_positive()
            }
        });
        for (i, entry) in side.enumerate() {
            if i > 0 {
                out.push_str(" + ");
            }
            if !(entry.nu.is_integer() && entry.nu.numer().magnitude().is_one()) {
                write_magnitude(out, &entry.nu);
                out.push(' ');
            }
            write_species(out, &entry.species, style);
        }
    }
}

/// |value| as `Display` writes a rational (`3`, `1/2`), into `out`.
fn write_magnitude(out: &mut String, value: &BigRational) {
    use std::fmt::Write as _;
    let numer = value.numer();
    // Writing to a String cannot fail.
    let _ = match numer.to_i64() {
        Some(small) => write!(out, "{}", small.unsigned_abs()),
        None => write!(out, "{}", numer.magnitude()),
    };
    if !value.is_integer() {
        let _ = write!(out, "/{}", value.denom());
    }
}

impl fmt::Display for Reaction {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.to_text(Style::Ascii, Arrow::Forward))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn reaction(text: &str) -> Reaction {
        Reaction::from_equation(&text.parse().unwrap())
    }

    #[test]
    fn text_writes_magnitudes_fractions_and_huge_coefficients() {
        let mut r = reaction("H2 + 1/2 O2 -> H2O");
        assert_eq!(r.to_string(), "H2 + 1/2 O2 -> H2O");
        assert_eq!(
            r.to_text(Style::Unicode, Arrow::Forward),
            "H₂ + 1/2 O₂ → H₂O"
        );
        // A coefficient beyond 64 bits is written in full, as Display writes it.
        let huge: BigInt = "123456789012345678901234567890".parse().unwrap();
        r = r.scaled(&BigRational::from_integer(huge.clone() * 2));
        assert_eq!(
            r.to_string(),
            format!("{} H2 + {huge} O2 -> {} H2O", &huge * 2, &huge * 2)
        );
        assert_eq!(Reaction::new().to_string(), " -> ");
    }

    #[test]
    fn combining_a_cell_cancels_electrons_and_shared_species() {
        // Zn/Cu: the classic textbook cell (common practice).
        let cathode = reaction("Cu2+ + 2 e- -> Cu(s)");
        let anode = reaction("Zn2+ + 2 e- -> Zn(s)");
        let net = cathode.plus(&anode.reversed());
        assert!(net.electron_nu().is_zero());
        assert_eq!(net.to_string(), "Cu2+ + Zn(s) -> Cu(s) + Zn2+");
        assert!(net.imbalance().is_balanced());
    }

    #[test]
    fn lowest_integers_clears_fractions_and_common_factors() {
        let r = reaction("1/2 O2 + 2 H+ + 2 e- -> H2O");
        assert_eq!(
            r.in_lowest_integers().to_string(),
            "O2 + 4 H+ + 4 e- -> 2 H2O"
        );
        let r = reaction("4 H2 + 2 O2 -> 4 H2O");
        assert_eq!(r.in_lowest_integers().to_string(), "2 H2 + O2 -> 2 H2O");
    }

    #[test]
    fn machine_integer_recount_agrees_with_the_rational_one() {
        for text in [
            "MnO4- + e- -> Mn2+",
            "2 MnO4- + 5 H2C2O4 + 6 H+ -> 2 Mn2+ + 10 CO2 + 8 H2O",
            "1/2 O2 + 2 H+ + 2 e- -> H2O",
        ] {
            let r = reaction(text);
            assert_eq!(r.imbalance(), r.imbalance_in_rationals(), "{text}");
        }
    }

    #[test]
    fn imbalance_names_the_element_and_the_charge() {
        let r = reaction("MnO4- + e- -> Mn2+");
        let imbalance = r.imbalance();
        let o = Element::from_symbol("O").unwrap();
        assert!(
            imbalance
                .elements
                .iter()
                .any(|(e, n)| *e == o && *n == BigRational::from_integer((-4).into()))
        );
        // Charge: products +2, reactants -1 -1 = -2, so the net change is +4.
        assert_eq!(imbalance.charge, BigRational::from_integer(4.into()));
    }
}

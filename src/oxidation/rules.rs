//! The ordered rules for one fragment of a species (a whole formula, or what is left of a salt
//! once its known ions are taken out): pins, F, groups 1 and 2, H, then O and halogens by
//! default, charge balance for the one element left, electronegativity order beyond that.

use super::{Assignment, OxidationError, Pin, Rule, Status};
use crate::elements::Element;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Zero};

/// Elements with which H is conventionally +1: the non-metals and the heavier metalloids that
/// textbooks treat as more electronegative than H (common practice; PH3, AsH3, SbH3 and H2Te
/// are written with H +1 although Pauling values put P, As, Sb and Te near or below H).
/// With any other partner (metals, B, Si, Ge) H is a hydride, −1: LiAlH4, NaBH4, SiH4.
const H_POSITIVE_PARTNERS: &[&str] = &[
    "He", "C", "N", "O", "F", "Ne", "P", "S", "Cl", "Ar", "As", "Se", "Br", "Kr", "Sb", "Te", "I",
    "Xe", "At", "Rn",
];

/// Metals with a single oxidation state in their compounds with non-metals (common practice;
/// Greenwood & Earnshaw, the chapters of each group, from memory): aluminium +3, zinc and
/// cadmium +2, scandium, yttrium and lanthanum +3. Not applied without a non-metal present: an
/// alloy such as LaNi5 or CuZn has no ionic reading.
const SINGLE_STATE_METALS: &[(&str, i64)] = &[
    ("Al", 3),
    ("Zn", 2),
    ("Cd", 2),
    ("Sc", 3),
    ("Y", 3),
    ("La", 3),
];

/// Elements that, besides [`H_POSITIVE_PARTNERS`], make a compound of a metal ionic enough
/// for [`SINGLE_STATE_METALS`]: hydrogen, boron and silicon.
const OTHER_NON_METALS: &[&str] = &["H", "B", "Si"];

/// Halogens that are −1 unless bound to O or a lighter halogen, lightest first (F is always −1).
const HEAVY_HALOGENS: &[&str] = &["Cl", "Br", "I", "At"];

fn integer(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

fn atoms(n: u64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

/// The usual negative state of a p-block element (group 14: −4 … group 17: −1).
fn usual_negative_state(element: Element) -> Option<i64> {
    match element.data().group {
        Some(g @ 14..=17) => Some(g as i64 - 18),
        _ => None,
    }
}

/// Bounds no oxidation number of the element can pass, from its group (common practice: the
/// highest state is the group number for groups 1–9, +9 for 10–12 (the highest known state is
/// +9, IrO4+, from memory), group − 10 for 13–18; the lowest for groups 14–17 is group − 18).
/// `None` where the table has no group (f-block).
fn state_bounds(element: Element) -> Option<(i64, Option<i64>)> {
    let group = element.data().group? as i64;
    let highest = match element.symbol() {
        "O" => 2,
        "F" => 0,
        _ => match group {
            1..=9 => group,
            10..=12 => 9,
            _ => group - 10,
        },
    };
    let lowest = (14..=17).contains(&group).then_some(group - 18);
    Some((highest, lowest))
}

struct Slot {
    element: Element,
    count: u64,
    fixed: Option<(BigRational, Status, Rule)>,
}

/// Where a fragment comes from.
#[derive(Clone, Copy)]
pub(crate) enum Fragment<'a> {
    /// A whole species (or adduct): one element alone is elemental or a homonuclear ion.
    Whole,
    /// A whole species written with non-integer subscripts (`LiNi0.8Mn0.1Co0.1O2`), counts
    /// scaled to whole atoms: metals left open share their sites, so they take one average.
    SharedSites,
    /// What is left of a salt once its known ions are out; `species` lists every element of
    /// the whole species, which decides whether H is bound to non-metals.
    Rest { species: &'a [Element] },
}

/// Assigns every atom of a fragment, given as counts per element label, with a net charge.
pub(crate) fn assign_fragment(
    counts: &[(Element, u64)],
    charge: &BigRational,
    pins: &[Pin],
    fragment: Fragment<'_>,
) -> Result<Vec<Assignment>, OxidationError> {
    // Rules are about chemical elements: D and T count as H.
    let mut slots: Vec<Slot> = Vec::new();
    for &(label, count) in counts {
        if count == 0 {
            continue;
        }
        let element = label.chemical_element();
        match slots.iter_mut().find(|s| s.element == element) {
            Some(slot) => {
                slot.count = slot
                    .count
                    .checked_add(count)
                    .ok_or(OxidationError::Overflow)?
            }
            None => slots.push(Slot {
                element,
                count,
                fixed: None,
            }),
        }
    }
    if slots.is_empty() {
        if charge.is_zero() {
            return Ok(Vec::new());
        }
        return Err(OxidationError::RulesDisagree {
            total: BigRational::zero(),
            charge: charge.to_integer().try_into().unwrap_or(i64::MAX),
        });
    }
    let pin_of = |element: Element| {
        pins.iter()
            .find(|p| p.element.chemical_element() == element)
            .map(|p| p.value.clone())
    };

    if slots.len() == 1 && matches!(fragment, Fragment::Whole | Fragment::SharedSites) {
        let slot = &mut slots[0];
        let value = charge / atoms(slot.count);
        if let Some(pinned) = pin_of(slot.element)
            && pinned != value
        {
            return Err(OxidationError::PinContradicts {
                element: slot.element,
                pinned,
                required: value,
            });
        }
        let rule = if charge.is_zero() {
            Rule::Elemental
        } else {
            Rule::SingleElementIon
        };
        slot.fixed = Some((value, Status::Determined, rule));
        return Ok(expand(counts, &slots));
    }

    let symbols: Vec<&'static str> = slots.iter().map(|s| s.element.symbol()).collect();
    let present = |symbol: &str| symbols.contains(&symbol);
    let has_fluorine = present("F");
    let has_oxygen = present("O");
    // Whether the fragment's species (the whole species for a rest) holds one of `list`.
    let holds_any = |list: &[&str]| match fragment {
        Fragment::Whole | Fragment::SharedSites => symbols.iter().any(|s| list.contains(s)),
        Fragment::Rest { species } => species
            .iter()
            .any(|e| list.contains(&e.chemical_element().symbol())),
    };
    let h_positive = holds_any(H_POSITIVE_PARTNERS);
    let with_non_metal = h_positive || holds_any(OTHER_NON_METALS);

    // Strong rules: pins, F, groups 1 and 2, H.
    for slot in &mut slots {
        let symbol = slot.element.symbol();
        slot.fixed = if let Some(value) = pin_of(slot.element) {
            Some((value, Status::Assumed, Rule::Pinned))
        } else if symbol == "F" {
            Some((integer(-1), Status::Determined, Rule::Fluorine))
        } else if symbol == "H" {
            Some(if h_positive {
                (integer(1), Status::Determined, Rule::HydrogenWithNonMetals)
            } else {
                (integer(-1), Status::Determined, Rule::Hydride)
            })
        } else {
            match slot.element.data().group {
                Some(1) => Some((integer(1), Status::Determined, Rule::Group1)),
                Some(2) => Some((integer(2), Status::Determined, Rule::Group2)),
                _ => SINGLE_STATE_METALS
                    .iter()
                    .find(|(metal, _)| with_non_metal && *metal == symbol)
                    .map(|&(_, state)| {
                        (integer(state), Status::Determined, Rule::SingleStateMetal)
                    }),
            }
        };
    }

    // Defaults (O −2, halogens −1) only apply while they leave another element to take the
    // rest: an element alone takes what the charge requires (H2O2, KO2, KI3). What is left of
    // a salt is held to them always, so a split that would leave Cl3 at −2 in total
    // ([Co(NH3)6]Cl3 read with a 2+ complex) fails the charge and is dropped.
    if open(&slots).len() >= 2 || matches!(fragment, Fragment::Rest { .. }) {
        let lighter_halogen_present = |symbol: &str| {
            let rank = HEAVY_HALOGENS.iter().position(|h| *h == symbol);
            has_fluorine || rank.is_some_and(|r| HEAVY_HALOGENS[..r].iter().any(|h| present(h)))
        };
        for slot in &mut slots {
            if slot.fixed.is_some() {
                continue;
            }
            let symbol = slot.element.symbol();
            if symbol == "O" && !has_fluorine {
                slot.fixed = Some((integer(-2), Status::Determined, Rule::Oxygen));
            } else if HEAVY_HALOGENS.contains(&symbol)
                && !has_oxygen
                && !lighter_halogen_present(symbol)
            {
                slot.fixed = Some((integer(-1), Status::Determined, Rule::Halide));
            }
        }
    }

    let mut open_slots = open(&slots);
    let fixed_total = |slots: &[Slot]| -> BigRational {
        slots
            .iter()
            .filter_map(|s| s.fixed.as_ref().map(|(v, _, _)| v * atoms(s.count)))
            .sum()
    };
    if open_slots.len() >= 2
        && matches!(fragment, Fragment::SharedSites)
        && open_slots
            .iter()
            .all(|&i| usual_negative_state(slots[i].element).is_none())
    {
        // Decimal subscripts mean the open metals share sites (Ni, Mn, Co of NMC811 fill one
        // site together): the formula gives only their common average. An assumption.
        let open_atoms = open_slots
            .iter()
            .try_fold(0u64, |sum, &i| sum.checked_add(slots[i].count))
            .ok_or(OxidationError::Overflow)?;
        let average = (charge - fixed_total(&slots)) / atoms(open_atoms);
        let elements: Vec<Element> = open_slots.iter().map(|&i| slots[i].element).collect();
        for &i in &open_slots {
            slots[i].fixed = Some((
                average.clone(),
                Status::Assumed,
                Rule::SiteAverage {
                    elements: elements.clone(),
                },
            ));
        }
        open_slots = open(&slots);
    }
    if open_slots.len() >= 2 {
        // Electronegativity order: the more electronegative take their usual negative states,
        // the least electronegative takes the rest. A choice, so every value is assumed.
        let mut ranked = Vec::new();
        for &i in &open_slots {
            let element = slots[i].element;
            let en = element
                .data()
                .electronegativity
                .ok_or(OxidationError::MissingElectronegativity { element })?;
            ranked.push((i, en));
        }
        ranked.sort_by(|a, b| b.1.total_cmp(&a.1));
        let negatives = &ranked[..ranked.len() - 1];
        for &(i, _) in negatives {
            let state = usual_negative_state(slots[i].element).ok_or_else(|| {
                // Name the elements that no usual negative state can settle (Cu and Fe in
                // CuFeS2, not S).
                OxidationError::Underdetermined {
                    elements: open_slots
                        .iter()
                        .map(|&j| slots[j].element)
                        .filter(|&e| usual_negative_state(e).is_none())
                        .collect(),
                }
            })?;
            slots[i].fixed = Some((
                integer(state),
                Status::Assumed,
                Rule::ElectronegativityChoice,
            ));
        }
        open_slots = open(&slots);
    }

    match open_slots.as_slice() {
        [] => {
            let total = fixed_total(&slots);
            if &total != charge {
                if let Some(slot) = slots.iter().find(|s| pin_of(s.element).is_some()) {
                    let others: BigRational = slots
                        .iter()
                        .filter(|s| s.element != slot.element)
                        .filter_map(|s| s.fixed.as_ref().map(|(v, _, _)| v * atoms(s.count)))
                        .sum();
                    return Err(OxidationError::PinContradicts {
                        element: slot.element,
                        pinned: pin_of(slot.element).unwrap_or_else(BigRational::zero),
                        required: (charge - others) / atoms(slot.count),
                    });
                }
                return Err(OxidationError::RulesDisagree {
                    total,
                    charge: charge.to_integer().try_into().unwrap_or(i64::MAX),
                });
            }
        }
        &[i] => {
            let value = (charge - fixed_total(&slots)) / atoms(slots[i].count);
            let element = slots[i].element;
            if let Some((highest, lowest)) = state_bounds(element) {
                let limit = if value > integer(highest) {
                    Some(integer(highest))
                } else {
                    lowest.map(integer).filter(|low| &value < low)
                };
                if let Some(limit) = limit {
                    return Err(OxidationError::OutOfRange {
                        element,
                        value,
                        limit,
                    });
                }
            }
            let chosen = slots
                .iter()
                .any(|s| matches!(&s.fixed, Some((_, Status::Assumed, r)) if *r != Rule::ElectronegativityChoice));
            let by_choice = slots
                .iter()
                .any(|s| matches!(&s.fixed, Some((_, _, Rule::ElectronegativityChoice))));
            let (status, rule) = if by_choice {
                (Status::Assumed, Rule::ElectronegativityRest)
            } else if chosen {
                (Status::Assumed, Rule::ChargeBalanceAfterAssumption)
            } else {
                (
                    Status::Determined,
                    balance_rule(element, &value, has_fluorine),
                )
            };
            slots[i].fixed = Some((value, status, rule));
        }
        // The electronegativity choice leaves exactly one element open; kept total anyway.
        several => {
            return Err(OxidationError::Underdetermined {
                elements: several.iter().map(|&i| slots[i].element).collect(),
            });
        }
    }
    Ok(expand(counts, &slots))
}

fn open(slots: &[Slot]) -> Vec<usize> {
    (0..slots.len())
        .filter(|&i| slots[i].fixed.is_none())
        .collect()
}

/// Names the rule that a charge-balance result coincides with (O −1 is a peroxide, …).
fn balance_rule(element: Element, value: &BigRational, has_fluorine: bool) -> Rule {
    let is = |n: i64, d: i64| *value == BigRational::new(BigInt::from(n), BigInt::from(d));
    match element.symbol() {
        "O" if has_fluorine => Rule::OxygenWithFluorine,
        "O" if is(-2, 1) => Rule::Oxygen,
        "O" if is(-1, 1) => Rule::Peroxide,
        "O" if is(-1, 2) => Rule::Superoxide,
        "O" if is(-1, 3) => Rule::Ozonide,
        s if HEAVY_HALOGENS.contains(&s) && *value == -BigRational::one() => Rule::Halide,
        _ => Rule::ChargeBalance,
    }
}

/// One assignment per element label, with the value of its chemical element.
fn expand(counts: &[(Element, u64)], slots: &[Slot]) -> Vec<Assignment> {
    counts
        .iter()
        .filter(|(_, n)| *n > 0)
        .filter_map(|&(label, count)| {
            let slot = slots
                .iter()
                .find(|s| s.element == label.chemical_element())?;
            let (value, status, rule) = slot.fixed.clone()?;
            Some(Assignment {
                element: label,
                count,
                value,
                status,
                rule,
            })
        })
        .collect()
}

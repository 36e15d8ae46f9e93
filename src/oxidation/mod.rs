//! Oxidation numbers of a species, and the redox analysis of reactions built on them.
//!
//! From a formula alone the structure is unknown, so oxidation numbers come from the ordered
//! rules of DOMAIN.md §Oxidation numbers (IUPAC 2016 definition, Karen, McArdle & Takats,
//! Pure Appl. Chem. 88, 831–839) and charge balance, as exact rationals: the **average** per
//! element where sites differ (Fe3O4: Fe +8/3). Salts made of known polyatomic ions
//! (`data/polyatomic_ions.toml`) are split so that each ion keeps its own states (NH4NO3: N −3
//! and +5, average +1, both kept as [`Site`]s). When the rules leave two or more elements
//! open, the electronegativity order picks, and the result is marked [`Status::Assumed`];
//! a user [`Pin`] fixes a value instead. Nothing here panics: every failure is an
//! [`OxidationError`].
//!
//! ```
//! use couplet::notation::parse_species;
//! use couplet::oxidation::{oxidation_numbers, signed_text};
//!
//! let magnetite = oxidation_numbers(&parse_species("Fe3O4").unwrap()).unwrap();
//! let iron = magnetite.element("Fe").unwrap();
//! assert_eq!(signed_text(&iron.oxidation_number), "+8/3");
//! ```

// The errors carry exact values (both numbers of a contradiction) so a caller can show them;
// they are returned once per species, so their size costs nothing that matters.
#![allow(clippy::result_large_err)]

#[cfg(test)]
pub(crate) mod corpus;
mod ions;
mod redox;
mod rules;

pub use ions::{IonTable, IonTableError, KnownIon, LIGANDS_TOML, POLYATOMIC_IONS_TOML};
pub use redox::{
    ElementChange, MachineAnalysis, MachineChange, MachineSites, RedoxAnalysis, RedoxError,
    RedoxKind, SpeciesPin, analyse, analyse_conserved, analyse_prepared, analyse_with,
    changed_elements, changes_one_element, oxidation_number_electrons,
};

use crate::elements::Element;
use crate::notation::{Species, SpeciesKind};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{Signed, Zero};
use std::fmt;
use std::hash::BuildHasher;
use std::str::FromStr;
use std::sync::Arc;

/// Whether an oxidation number follows from the rules and the charge, or is a choice.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Status {
    /// Follows from the ordered rules, a known ion, or charge balance.
    Determined,
    /// A choice: by electronegativity order, a user pin, or derived from one of those.
    Assumed,
}

impl Status {
    /// Stable name: `determined` or `assumed`.
    pub fn name(self) -> &'static str {
        match self {
            Status::Determined => "determined",
            Status::Assumed => "assumed",
        }
    }
}

/// The rule that gave an oxidation number. [`Rule::text`] is short and stable (used in JSON).
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum Rule {
    /// A neutral species of one element: 0.
    Elemental,
    /// An ion of one element: its charge shared equally (Hg2^2+: +1).
    SingleElementIon,
    /// Fixed by the user.
    Pinned,
    /// F is −1.
    Fluorine,
    /// Group 1 metals are +1.
    Group1,
    /// Group 2 metals are +2.
    Group2,
    /// Al, Zn, Cd, Sc, Y and La have one state in their compounds with non-metals (+3, +2,
    /// +2, +3, +3, +3).
    SingleStateMetal,
    /// H is +1 with non-metals.
    HydrogenWithNonMetals,
    /// H is −1 when every partner is less electronegative (metal hydrides, LiAlH4, NaBH4).
    Hydride,
    /// O is −2.
    Oxygen,
    /// O is −1 (by charge balance).
    Peroxide,
    /// O is −1/2 (by charge balance).
    Superoxide,
    /// O is −1/3 (by charge balance).
    Ozonide,
    /// O bound to F: by charge balance (OF2: +2).
    OxygenWithFluorine,
    /// Cl, Br, I are −1 when there is no O and no lighter halogen.
    Halide,
    /// The one element left open takes what the charge requires.
    ChargeBalance,
    /// Charge balance, but with a pinned or assumed value among the others.
    ChargeBalanceAfterAssumption,
    /// The value stated for a known polyatomic ion.
    KnownIon {
        /// The ion's name from the table.
        name: String,
    },
    /// A bracketed group read as a ligand of the ligand table, with that ligand's charge and
    /// internal states (the ionic convention; `data/ligands.toml`).
    Ligand {
        /// The ligand's name from the table.
        name: String,
        /// Its charge as a unit.
        charge: i64,
    },
    /// The element sits in several parts of the species (known ions, the rest, adducts) with
    /// different states; each part's ion name or rule.
    KnownIons {
        /// Ion names or rule texts, in order of first appearance.
        names: Vec<String>,
    },
    /// Rules left several elements open; this, the more electronegative, took its usual
    /// negative state (group 15: −3, group 16: −2, …).
    ElectronegativityChoice,
    /// Rules left several elements open; this, the least electronegative, took the rest.
    ElectronegativityRest,
    /// Metals left open in a formula with non-integer subscripts share their sites and take
    /// one average by charge balance (Ni, Mn, Co in LiNi0.8Mn0.1Co0.1O2: +3 together).
    SiteAverage {
        /// The metals that share.
        elements: Vec<Element>,
    },
    /// A binary compound read as a salt of a one-element ion by the usual assumption of the
    /// ion table (`usual_with`): FeS2 as Fe(II) disulfide. The metal follows by charge.
    UsualIon {
        /// The ion's name from the table.
        name: String,
    },
}

impl Rule {
    /// Short stable text.
    pub fn text(&self) -> String {
        match self {
            Rule::Elemental => "element in elemental form is 0".into(),
            Rule::SingleElementIon => "ion of one element: charge shared equally".into(),
            Rule::Pinned => "pinned by the user".into(),
            Rule::Fluorine => "F is -1".into(),
            Rule::Group1 => "group 1 metal is +1".into(),
            Rule::Group2 => "group 2 metal is +2".into(),
            Rule::SingleStateMetal => "the metal's only state in compounds".into(),
            Rule::HydrogenWithNonMetals => "H is +1 with non-metals".into(),
            Rule::Hydride => "H is -1 in hydrides".into(),
            Rule::Oxygen => "O is -2".into(),
            Rule::Peroxide => "peroxide O is -1".into(),
            Rule::Superoxide => "superoxide O is -1/2".into(),
            Rule::Ozonide => "ozonide O is -1/3".into(),
            Rule::OxygenWithFluorine => "O with F: charge balance".into(),
            Rule::Halide => "halogen is -1 (no O, no lighter halogen)".into(),
            Rule::ChargeBalance => "charge balance".into(),
            Rule::ChargeBalanceAfterAssumption => "charge balance after an assumed value".into(),
            Rule::KnownIon { name } => format!("known ion: {name}"),
            Rule::Ligand { name, charge } => format!(
                "ligand {name} taken as {} unit",
                match charge.signum() {
                    0 => "a neutral".to_owned(),
                    1 => format!("a cationic ({charge}+)"),
                    _ => format!("an anionic ({}-)", -charge),
                }
            ),
            Rule::KnownIons { names } => format!("sites: {}", names.join("; ")),
            Rule::ElectronegativityChoice => {
                "electronegativity choice: usual negative state".into()
            }
            Rule::ElectronegativityRest => "electronegativity choice: rest by charge".into(),
            Rule::UsualIon { name } => format!("usual assumption: {name}"),
            Rule::SiteAverage { elements } => format!(
                "site average of {} (charge balance)",
                elements
                    .iter()
                    .map(|e| e.symbol())
                    .collect::<Vec<_>>()
                    .join(", ")
            ),
        }
    }
}

impl fmt::Display for Rule {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.text())
    }
}

/// Atoms of one element that share one oxidation number.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Site {
    /// Their oxidation number.
    pub oxidation_number: BigRational,
    /// How many atoms.
    pub count: u64,
    /// Determined or assumed.
    pub status: Status,
    /// The rule that gave it.
    pub rule: Rule,
}

/// The oxidation number of one element of a species.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ElementOxidation {
    /// The element as written (D and T keep their labels; rules treat them as H).
    pub element: Element,
    /// Atoms of it in the species.
    pub count: u64,
    /// The average over all its atoms.
    pub oxidation_number: BigRational,
    /// Assumed when any of its sites is.
    pub status: Status,
    /// The rule that gave it (for several sites: the ions they came from).
    pub rule: Rule,
    /// Atoms grouped by oxidation number; more than one entry only when a split into known
    /// ions gave the element more than one state.
    pub sites: Vec<Site>,
}

impl ElementOxidation {
    /// True when the element has more than one state in the species.
    pub fn has_sites(&self) -> bool {
        self.sites.len() > 1
    }
}

/// The oxidation numbers of every element of a species.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SpeciesOxidation {
    /// Canonical ASCII formula.
    pub formula: String,
    /// Net charge.
    pub charge: i64,
    /// One entry per element, in the order of the species' composition. Counts (of elements
    /// and sites) are atoms per `denominator` formula units.
    pub elements: Vec<ElementOxidation>,
    /// Formula units the counts refer to: 1, or the least common denominator of non-integer
    /// subscripts (2 for Li0.5CoO2).
    pub denominator: u64,
}

impl SpeciesOxidation {
    /// Atoms per formula unit for a count of this result (`count` / `denominator`).
    pub fn per_formula_unit(&self, count: u64) -> num_rational::Ratio<u64> {
        num_rational::Ratio::new(count, self.denominator)
    }

    /// The entry of an element by symbol.
    pub fn element(&self, symbol: &str) -> Option<&ElementOxidation> {
        self.elements.iter().find(|e| e.element.symbol() == symbol)
    }

    /// True when any value is assumed rather than determined.
    pub fn has_assumptions(&self) -> bool {
        self.elements.iter().any(|e| e.status == Status::Assumed)
    }
}

/// A value the user fixes for an element (`S=+6`), overriding rules and known ions.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Pin {
    /// The element (D and T pin hydrogen).
    pub element: Element,
    /// Its oxidation number.
    pub value: BigRational,
}

/// Why a pin could not be read.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("cannot read pin '{text}': {reason}")]
pub struct PinError {
    /// What was given.
    pub text: String,
    /// Lower-case reason.
    pub reason: String,
}

impl FromStr for Pin {
    type Err = PinError;
    /// `S=+6`, `Fe=+8/3`, `O=-1`, `Cl=0`.
    fn from_str(text: &str) -> Result<Pin, PinError> {
        let fail = |reason: &str| PinError {
            text: text.to_owned(),
            reason: reason.to_owned(),
        };
        let (symbol, value) = text
            .split_once('=')
            .ok_or_else(|| fail("expected ELEMENT=VALUE, such as S=+6"))?;
        let element = Element::from_symbol(symbol.trim())
            .ok_or_else(|| fail(&format!("no element has the symbol '{}'", symbol.trim())))?;
        let value = parse_signed_rational(value.trim())
            .ok_or_else(|| fail("the value must be an integer or a fraction such as +6 or +8/3"))?;
        Ok(Pin { element, value })
    }
}

/// How to assign oxidation numbers beyond the rules.
#[derive(Clone, Debug, Default)]
pub struct Options {
    /// User-fixed values; a pinned element is never taken from a known ion.
    pub pins: Vec<Pin>,
}

/// What went wrong assigning oxidation numbers.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum OxidationError {
    /// The electron has no atoms.
    #[error("the electron has no atoms to assign oxidation numbers to")]
    Electron,
    /// Every element was fixed by a rule, but the values do not add up to the charge.
    #[error("the rules give a total of {} but the charge is {charge}", signed_text(.total))]
    RulesDisagree {
        /// Sum of oxidation numbers times counts.
        total: BigRational,
        /// The species' charge.
        charge: i64,
    },
    /// Several elements are open and electronegativity cannot pick (two metals, say).
    #[error("the rules leave {} open: pin all but one of them", element_list(.elements))]
    Underdetermined {
        /// The open elements.
        elements: Vec<Element>,
    },
    /// An electronegativity choice needs a value the element table does not have.
    #[error(
        "no electronegativity for {element} in the element table, so the choice is open: pin a value"
    )]
    MissingElectronegativity {
        /// The element.
        element: Element,
    },
    /// Charge balance gives a value past what the element can have.
    #[error(
        "charge balance gives {element} {}, beyond its {} possible state {}: the formula may hide O–O or metal–metal bonds; pin a value",
        signed_text(.value), if .value > .limit { "highest" } else { "lowest" }, signed_text(.limit)
    )]
    OutOfRange {
        /// The element.
        element: Element,
        /// What charge balance asked for.
        value: BigRational,
        /// The bound it crossed.
        limit: BigRational,
    },
    /// A pin names an element the species does not contain.
    #[error("{element} is pinned but the formula has no {element}")]
    PinNotInFormula {
        /// The element.
        element: Element,
    },
    /// A pin cannot hold together with the charge.
    #[error("{element} is pinned at {} but the charge requires {}", signed_text(.pinned), signed_text(.required))]
    PinContradicts {
        /// The element.
        element: Element,
        /// The pinned value.
        pinned: BigRational,
        /// What the charge requires.
        required: BigRational,
    },
    /// The ion table is malformed.
    #[error(transparent)]
    IonTable(#[from] IonTableError),
    /// A count overflowed.
    #[error("atom counts too large")]
    Overflow,
}

impl OxidationError {
    /// Stable name for JSON output.
    pub fn kind_name(&self) -> &'static str {
        match self {
            OxidationError::Electron => "electron",
            OxidationError::RulesDisagree { .. } => "rules_disagree",
            OxidationError::Underdetermined { .. } => "underdetermined",
            OxidationError::MissingElectronegativity { .. } => "missing_electronegativity",
            OxidationError::OutOfRange { .. } => "out_of_range",
            OxidationError::PinNotInFormula { .. } => "pin_not_in_formula",
            OxidationError::PinContradicts { .. } => "pin_contradicts",
            OxidationError::IonTable(_) => "ion_table",
            OxidationError::Overflow => "limit",
        }
    }
}

fn element_list(elements: &[Element]) -> String {
    let symbols: Vec<&str> = elements.iter().map(|e| e.symbol()).collect();
    match symbols.as_slice() {
        [] => String::new(),
        [one] => (*one).to_owned(),
        [rest @ .., last] => format!("{} and {last}", rest.join(", ")),
    }
}

/// An oxidation number as text with an explicit sign: `+7`, `-2`, `0`, `+8/3`.
pub fn signed_text(value: &BigRational) -> String {
    let sign = if value.is_positive() { "+" } else { "" };
    if value.is_integer() {
        format!("{sign}{}", value.numer())
    } else {
        format!("{sign}{}/{}", value.numer(), value.denom())
    }
}

/// Reads `+6`, `-2`, `0`, `+5/2`, `6`; `None` for anything else.
pub fn parse_signed_rational(text: &str) -> Option<BigRational> {
    let (negative, digits) = match text.as_bytes().first()? {
        b'+' => (false, &text[1..]),
        b'-' => (true, &text[1..]),
        _ => (false, text),
    };
    let whole = |s: &str| -> Option<BigInt> {
        if s.is_empty() || s.len() > 30 || !s.bytes().all(|b| b.is_ascii_digit()) {
            return None;
        }
        s.parse().ok()
    };
    let value = match digits.split_once('/') {
        Some((n, d)) => {
            let d = whole(d)?;
            if d.is_zero() {
                return None;
            }
            BigRational::new(whole(n)?, d)
        }
        None => BigRational::from_integer(whole(digits)?),
    };
    Some(if negative { -value } else { value })
}

/// Oxidation numbers of a species by the rules and the built-in ion table.
pub fn oxidation_numbers(species: &Species) -> Result<SpeciesOxidation, OxidationError> {
    oxidation_numbers_with(species, &Options::default())
}

/// Oxidation numbers of a species with user pins, using the built-in ion table.
pub fn oxidation_numbers_with(
    species: &Species,
    options: &Options,
) -> Result<SpeciesOxidation, OxidationError> {
    if !options.pins.is_empty() {
        return IonTable::builtin()?.oxidation_numbers(species, options);
    }
    oxidation_numbers_shared(species, options).map(|shared| (*shared).clone())
}

/// [`oxidation_numbers_with`] without copying the answer out of the per-thread memo: the
/// redox analysis reads oxidation numbers of every species of every reaction, and a deep copy
/// of each (rules with names, sites) cost more than the analysis itself. The answer is shared
/// ([`Arc`]), so a batch can keep it per species and hand it to [`analyse_prepared`].
pub fn oxidation_numbers_shared(
    species: &Species,
    options: &Options,
) -> Result<Arc<SpeciesOxidation>, OxidationError> {
    if !options.pins.is_empty() {
        return IonTable::builtin()?
            .oxidation_numbers(species, options)
            .map(Arc::new);
    }
    // The answer depends on the formula alone, and batches and tables name the same few
    // species (H2O, H+, OH-, common ions) over and over: remember recent answers per thread.
    // Keyed by a hash of the composition (a few machine words; the composition is derived
    // from the formula, so equal formulas hash alike) and told apart by comparing formulas:
    // hashing the formula tree's rational counts cost more than the lookup saved.
    let hash = foldhash::fast::FixedState::default().hash_one(&species.composition);
    MEMO.with(|memo| {
        let known = memo.borrow().get(&hash).and_then(|bucket| {
            bucket
                .iter()
                .find(|(kind, _)| *kind == species.kind)
                .map(|(_, answer)| answer.clone())
        });
        if let Some(known) = known {
            return known;
        }
        let answer = IonTable::builtin()?
            .oxidation_numbers(species, options)
            .map(Arc::new);
        let mut memo = memo.borrow_mut();
        if memo.len() >= MEMO_CAPACITY {
            memo.clear();
        }
        memo.entry(hash)
            .or_default()
            .push((species.kind.clone(), answer.clone()));
        answer
    })
}

/// How many compositions' answers [`oxidation_numbers_with`] keeps per thread.
const MEMO_CAPACITY: usize = 4096;

// A fast fixed-seed hash (foldhash): the keys are parsed formulas, not adversarial.
type Memo = std::collections::HashMap<
    u64,
    smallvec::SmallVec<[(SpeciesKind, Result<Arc<SpeciesOxidation>, OxidationError>); 1]>,
    foldhash::fast::FixedState,
>;

thread_local! {
    static MEMO: std::cell::RefCell<Memo> = std::cell::RefCell::new(Memo::default());
}

impl IonTable {
    /// Oxidation numbers of a species with user pins and this ion table.
    pub fn oxidation_numbers(
        &self,
        species: &Species,
        options: &Options,
    ) -> Result<SpeciesOxidation, OxidationError> {
        let formula = match &species.kind {
            SpeciesKind::Electron => return Err(OxidationError::Electron),
            SpeciesKind::Formula(formula) => formula,
        };
        for pin in &options.pins {
            let wanted = pin.element.chemical_element();
            if !species
                .composition
                .counts()
                .iter()
                .any(|(e, _)| e.chemical_element() == wanted)
            {
                return Err(OxidationError::PinNotInFormula {
                    element: pin.element,
                });
            }
        }
        let assignments = ions::assign(self, formula, &species.composition, &options.pins)?;
        Ok(SpeciesOxidation {
            formula: species.ascii(),
            charge: species.charge(),
            elements: gather(&species.composition, assignments),
            denominator: species.composition.denominator(),
        })
    }
}

/// Atoms of one element (as written) with one value, from one fragment of a species.
#[derive(Clone, Debug)]
pub(crate) struct Assignment {
    pub element: Element,
    pub count: u64,
    pub value: BigRational,
    pub status: Status,
    pub rule: Rule,
}

/// Merges fragment assignments into one entry per element, in composition order.
fn gather(
    composition: &crate::composition::Composition,
    assignments: Vec<Assignment>,
) -> Vec<ElementOxidation> {
    let mut out = Vec::new();
    for &(element, count) in composition.counts() {
        let mut sites: Vec<Site> = Vec::new();
        for a in assignments.iter().filter(|a| a.element == element) {
            match sites
                .iter_mut()
                .find(|s| s.oxidation_number == a.value && s.status == a.status)
            {
                Some(site) => {
                    site.count += a.count;
                    if site.rule != a.rule {
                        site.rule = merge_rules(&site.rule, &a.rule);
                    }
                }
                None => sites.push(Site {
                    oxidation_number: a.value.clone(),
                    count: a.count,
                    status: a.status,
                    rule: a.rule.clone(),
                }),
            }
        }
        let total: BigRational = sites
            .iter()
            .map(|s| &s.oxidation_number * BigRational::from_integer(BigInt::from(s.count)))
            .sum();
        let average = total / BigRational::from_integer(BigInt::from(count.max(1)));
        let status = if sites.iter().any(|s| s.status == Status::Assumed) {
            Status::Assumed
        } else {
            Status::Determined
        };
        let rule = match sites.as_slice() {
            [one] => one.rule.clone(),
            _ => sites
                .iter()
                .skip(1)
                .fold(sites[0].rule.clone(), |acc, s| merge_rules(&acc, &s.rule)),
        };
        out.push(ElementOxidation {
            element,
            count,
            oxidation_number: average,
            status,
            rule,
            sites,
        });
    }
    out
}

/// One rule describing two: the ion names joined when ions are involved.
fn merge_rules(a: &Rule, b: &Rule) -> Rule {
    if a == b {
        return a.clone();
    }
    let names = |r: &Rule| -> Vec<String> {
        match r {
            Rule::KnownIon { name } | Rule::Ligand { name, .. } => vec![name.clone()],
            Rule::KnownIons { names } => names.clone(),
            other => vec![other.text()],
        }
    };
    let mut all = names(a);
    for n in names(b) {
        if !all.contains(&n) {
            all.push(n);
        }
    }
    Rule::KnownIons { names: all }
}

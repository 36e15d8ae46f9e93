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
use super::{Options, OxidationError, SpeciesOxidation, oxidation_numbers_shared, signed_text};
use crate::elements::Element;
use crate::notation::{Equation, Species};
use crate::reaction::{Reaction, same_species};
use num_bigint::BigInt;
use num_rational::{BigRational, Ratio, Rational64};
use num_traits::{Signed, Zero};
use smallvec::SmallVec;
use std::sync::Arc;

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
    /// (`None` for the electron), shared with the per-thread memo: a deep copy of each
    /// (rules with names, sites) cost more than the analysis itself.
    pub species: Vec<Option<Arc<SpeciesOxidation>>>,
}

impl RedoxAnalysis {
    /// Whether entry `index` of the reaction (a reactant or not) takes part in the oxidation
    /// and in the reduction: it holds atoms of an oxidised (reduced) element in the state the
    /// change starts from, as a reactant, or ends in, as a product. The electron plays in
    /// neither.
    pub fn plays(&self, index: usize, is_reactant: bool) -> (bool, bool) {
        let Some(Some(oxidation)) = self.species.get(index) else {
            return (false, false);
        };
        let holds = |changes: &[ElementChange]| {
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
        };
        (holds(&self.oxidized), holds(&self.reduced))
    }
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
) -> Result<Arc<SpeciesOxidation>, RedoxError> {
    let options = Options {
        pins: pins
            .iter()
            .filter(|p| same_species(&p.species, species))
            .map(|p| p.pin.clone())
            .collect(),
    };
    oxidation_numbers_shared(species, &options).map_err(|source| RedoxError::Oxidation {
        species: species.ascii(),
        source,
    })
}

/// Analyses a balanced reaction or half-reaction, with pins for some of its species.
pub fn analyse_with(reaction: &Reaction, pins: &[SpeciesPin]) -> Result<RedoxAnalysis, RedoxError> {
    analyse_prepared(reaction, |species| species_oxidation(species, pins))
}

/// Analyses a balanced reaction or half-reaction with the oxidation numbers `lookup` gives for
/// each species (the electron is never asked for). A batch that keeps the answers per species
/// (from [`oxidation_numbers_shared`](super::oxidation_numbers_shared)) asks no memo twice.
pub fn analyse_prepared(
    reaction: &Reaction,
    mut lookup: impl FnMut(&Species) -> Result<Arc<SpeciesOxidation>, RedoxError>,
) -> Result<RedoxAnalysis, RedoxError> {
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
    for entry in reaction.entries() {
        if entry.species.is_electron() {
            species.push(None);
        } else {
            species.push(Some(lookup(&entry.species)?));
        }
    }

    // The same exact sums either way: in machine integers when every value and every
    // intermediate result fits (the usual case), else in big rationals.
    let verdict = match analysed::<SmallRatio>(reaction, &species) {
        Some(verdict) => verdict,
        // Big rationals never give up.
        None => analysed::<BigRational>(reaction, &species).ok_or(RedoxError::Empty)?,
    };
    let (oxidized, reduced, verdict) = verdict?;
    let (n, electrons_written, kind) = (verdict.n, verdict.written, verdict.kind);
    Ok(RedoxAnalysis {
        oxidized,
        reduced,
        n,
        electrons_written,
        kind,
        species,
    })
}

/// One species' oxidation numbers in machine rationals, made once per species for
/// [`analyse_conserved`]: a batch keeps it beside the species' [`SpeciesOxidation`] instead
/// of converting every oxidation number of every species of every reaction again.
#[derive(Clone, Debug)]
pub struct MachineSites {
    ratio: SiteList<SmallRatio>,
    /// The same in whole numbers, when every oxidation number is one.
    whole: Option<SiteList<Whole>>,
}

impl MachineSites {
    /// `None` when an oxidation number or a count does not fit a machine word: the analysis in
    /// big rationals ([`analyse_prepared`]) is then the one to use.
    pub fn of(oxidation: &SpeciesOxidation) -> Option<MachineSites> {
        Some(MachineSites {
            ratio: SiteList::of(oxidation)?,
            whole: SiteList::of(oxidation),
        })
    }
}

/// [`ElementChange`] in machine rationals.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct MachineChange {
    /// The element (as written; D and T keep their labels).
    pub element: Element,
    /// Oxidation number before.
    pub from: Rational64,
    /// Oxidation number after.
    pub to: Rational64,
    /// How many atoms.
    pub atoms: Rational64,
    /// Electrons moved: atoms × |to − from|.
    pub electrons: Rational64,
}

/// [`RedoxAnalysis`] in machine rationals: the same changes, n and kind, without a big
/// integer (and without a heap allocation for up to two changes each way).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct MachineAnalysis {
    /// Elements whose oxidation number goes up.
    pub oxidized: SmallVec<[MachineChange; 2]>,
    /// Elements whose oxidation number goes down.
    pub reduced: SmallVec<[MachineChange; 2]>,
    /// Electrons transferred (see [`RedoxAnalysis::n`]).
    pub n: Rational64,
    /// Electrons written (|ν| of e−); zero for a whole reaction.
    pub electrons_written: Rational64,
    /// The kind.
    pub kind: RedoxKind,
}

impl MachineAnalysis {
    /// [`RedoxAnalysis::plays`] for an entry whose species has the oxidation numbers `sites`
    /// (`None`: the electron, which plays in neither).
    pub fn plays(&self, sites: Option<&MachineSites>, is_reactant: bool) -> (bool, bool) {
        let Some(MachineSites { ratio: list, .. }) = sites else {
            return (false, false);
        };
        let holds = |changes: &[MachineChange]| {
            list.sites.iter().any(|(element, state, _)| {
                changes.iter().any(|change| {
                    let changed = if is_reactant { change.from } else { change.to };
                    change.element == *element && state.0 == widen(changed)
                })
            })
        };
        (holds(&self.oxidized), holds(&self.reduced))
    }
}

fn widen(value: Rational64) -> Ratio<i128> {
    Ratio::new_raw(i128::from(*value.numer()), i128::from(*value.denom()))
}

/// The result of [`analyse_prepared`] in machine rationals for a reaction that conserves
/// atoms and charge (a balancer's result): the recount is not repeated, only checked from the
/// oxidation numbers' own atoms and charges. `sites[i]` belongs to entry `i`, `None` for the
/// electron. `None` whenever the general analysis could say something else: a species
/// without sites, a value or sum beyond a machine word, atoms or charge not conserved, or
/// electrons that disagree with the changes (each of which [`analyse_prepared`] handles).
pub fn analyse_conserved(
    reaction: &Reaction,
    sites: &[Option<&MachineSites>],
) -> Option<MachineAnalysis> {
    let entries = reaction.entries();
    if entries.is_empty()
        || entries.len() != sites.len()
        || entries
            .iter()
            .zip(sites)
            .any(|(entry, sites)| sites.is_none() != entry.species.is_electron())
    {
        return None;
    }
    // Whole numbers throughout (the usual case) in i64, else reduced fractions in i128.
    let whole: Option<SmallVec<[Option<&SiteList<Whole>>; 8]>> = sites
        .iter()
        .map(|s| match s {
            Some(sites) => sites.whole.as_ref().map(Some),
            None => Some(None),
        })
        .collect();
    if let Some(analysis) = whole.and_then(|lists| conserved(reaction, &lists)) {
        return Some(analysis);
    }
    let lists: SmallVec<[Option<&SiteList<SmallRatio>>; 8]> =
        sites.iter().map(|s| s.map(|sites| &sites.ratio)).collect();
    conserved(reaction, &lists)
}

/// [`analyse_conserved`] in `T`.
fn conserved<T: Machine>(
    reaction: &Reaction,
    lists: &[Option<&SiteList<T>>],
) -> Option<MachineAnalysis> {
    let (oxidized, reduced, conserved) = tally::<T>(reaction, lists.iter().copied())?;
    let electron_nu = reaction.electron_nu();
    let mut charge = T::nil();
    for (entry, list) in reaction.entries().iter().zip(lists) {
        if let Some(list) = list {
            let units = T::from_big(&entry.nu)?;
            charge = charge.plus(&units.times(&T::from_signed(list.charge)?)?)?;
        }
    }
    if !conserved || (electron_nu.is_zero() && !charge.is_nil()) {
        return None;
    }
    let verdict = verdict(&oxidized, &reduced, &electron_nu)?.ok()?;
    let narrow = |changes: Changes<T>| {
        changes
            .into_iter()
            .map(|c| MachineChange {
                element: c.element,
                from: c.from.narrow(),
                to: c.to.narrow(),
                atoms: c.atoms.narrow(),
                electrons: c.electrons.narrow(),
            })
            .collect()
    };
    Some(MachineAnalysis {
        oxidized: narrow(oxidized),
        reduced: narrow(reduced),
        n: verdict.n.narrow(),
        electrons_written: verdict.written.narrow(),
        kind: verdict.kind,
    })
}

/// The arithmetic of [`analyse_conserved`]: every value fits a [`Rational64`].
trait Machine: Exact {
    fn narrow(self) -> Rational64;
}

impl Machine for SmallRatio {
    fn narrow(self) -> Rational64 {
        // Within the range both parts fit.
        let (numer, denom) = self.0.into_raw();
        Ratio::new_raw(numer as i64, denom as i64)
    }
}

impl Machine for Whole {
    fn narrow(self) -> Rational64 {
        Ratio::from_integer(self.0)
    }
}

/// A whole number in `i64` within ±(2^63 − 1) (so its magnitude never overflows); a sum,
/// difference or product outside the range, or a fraction, is refused.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
struct Whole(i64);

impl Whole {
    fn checked(value: Option<i64>) -> Option<Whole> {
        value.filter(|&v| v != i64::MIN).map(Whole)
    }
}

impl Exact for Whole {
    fn nil() -> Self {
        Whole(0)
    }
    fn from_big(value: &BigRational) -> Option<Self> {
        if !value.is_integer() {
            return None;
        }
        Whole::checked(i64::try_from(value.numer()).ok())
    }
    fn from_count(count: u64) -> Option<Self> {
        Whole::checked(i64::try_from(count).ok())
    }
    fn from_signed(value: i64) -> Option<Self> {
        Whole::checked(Some(value))
    }
    fn plus(&self, other: &Self) -> Option<Self> {
        Whole::checked(self.0.checked_add(other.0))
    }
    fn minus(&self, other: &Self) -> Option<Self> {
        Whole::checked(self.0.checked_sub(other.0))
    }
    fn times(&self, other: &Self) -> Option<Self> {
        Whole::checked(self.0.checked_mul(other.0))
    }
    fn magnitude(&self) -> Self {
        Whole(self.0.abs())
    }
    fn is_nil(&self) -> bool {
        self.0 == 0
    }
    fn is_above_zero(&self) -> bool {
        self.0 > 0
    }
    fn into_big(self) -> BigRational {
        BigRational::from_integer(BigInt::from(self.0))
    }
}

/// Exact rational arithmetic that may give up: `None` means "too large for this type", never
/// a different answer. [`BigRational`] never gives up; [`SmallRatio`] does when a value leaves
/// the range where its arithmetic cannot overflow.
trait Exact: Clone + Ord + Sized {
    fn nil() -> Self;
    fn from_big(value: &BigRational) -> Option<Self>;
    fn from_count(count: u64) -> Option<Self>;
    fn from_signed(value: i64) -> Option<Self>;
    fn plus(&self, other: &Self) -> Option<Self>;
    fn minus(&self, other: &Self) -> Option<Self>;
    fn times(&self, other: &Self) -> Option<Self>;
    fn magnitude(&self) -> Self;
    fn is_nil(&self) -> bool;
    fn is_above_zero(&self) -> bool;
    fn into_big(self) -> BigRational;
}

impl Exact for BigRational {
    fn nil() -> Self {
        Zero::zero()
    }
    fn from_big(value: &BigRational) -> Option<Self> {
        Some(value.clone())
    }
    fn from_count(count: u64) -> Option<Self> {
        Some(BigRational::from_integer(BigInt::from(count)))
    }
    fn from_signed(value: i64) -> Option<Self> {
        Some(BigRational::from_integer(BigInt::from(value)))
    }
    fn plus(&self, other: &Self) -> Option<Self> {
        Some(self + other)
    }
    fn minus(&self, other: &Self) -> Option<Self> {
        Some(self - other)
    }
    fn times(&self, other: &Self) -> Option<Self> {
        Some(self * other)
    }
    fn magnitude(&self) -> Self {
        Signed::abs(self)
    }
    fn is_nil(&self) -> bool {
        Zero::is_zero(self)
    }
    fn is_above_zero(&self) -> bool {
        Signed::is_positive(self)
    }
    fn into_big(self) -> BigRational {
        self
    }
}

/// A reduced rational in `i128` whose numerator and denominator stay within ±(2^63 − 1):
/// then every sum, difference and product of two of them (at most about 2^127 before
/// reduction) fits `i128`, so the arithmetic itself cannot overflow; a result outside the
/// range is refused.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
struct SmallRatio(Ratio<i128>);

const SMALL_LIMIT: i128 = i64::MAX as i128;

impl SmallRatio {
    /// Both numerators when both values are whole numbers.
    fn whole_pair(&self, other: &SmallRatio) -> Option<(i128, i128)> {
        (*self.0.denom() == 1 && *other.0.denom() == 1).then(|| (*self.0.numer(), *other.0.numer()))
    }

    fn checked(value: Ratio<i128>) -> Option<SmallRatio> {
        (value.numer().unsigned_abs() <= SMALL_LIMIT as u128 && *value.denom() <= SMALL_LIMIT)
            .then_some(SmallRatio(value))
    }
}

impl Exact for SmallRatio {
    fn nil() -> Self {
        SmallRatio(Ratio::from_integer(0))
    }
    fn from_big(value: &BigRational) -> Option<Self> {
        // A BigRational is kept reduced with a positive denominator, as Ratio is.
        let numer = i128::try_from(value.numer()).ok()?;
        let denom = i128::try_from(value.denom()).ok()?;
        SmallRatio::checked(Ratio::new_raw(numer, denom))
    }
    fn from_count(count: u64) -> Option<Self> {
        SmallRatio::checked(Ratio::from_integer(i128::from(count)))
    }
    fn from_signed(value: i64) -> Option<Self> {
        SmallRatio::checked(Ratio::from_integer(i128::from(value)))
    }
    // Whole numbers (almost every oxidation number and atom count) skip the i128 gcd of the
    // general case, which cost more than the rest of the tally: same results, no reduction
    // needed when both denominators are 1.
    fn plus(&self, other: &Self) -> Option<Self> {
        match self.whole_pair(other) {
            Some((a, b)) => SmallRatio::checked(Ratio::from_integer(a + b)),
            None => SmallRatio::checked(self.0 + other.0),
        }
    }
    fn minus(&self, other: &Self) -> Option<Self> {
        match self.whole_pair(other) {
            Some((a, b)) => SmallRatio::checked(Ratio::from_integer(a - b)),
            None => SmallRatio::checked(self.0 - other.0),
        }
    }
    fn times(&self, other: &Self) -> Option<Self> {
        match self.whole_pair(other) {
            Some((a, b)) => SmallRatio::checked(Ratio::from_integer(a * b)),
            None => SmallRatio::checked(self.0 * other.0),
        }
    }
    fn magnitude(&self) -> Self {
        // In range, so the negation cannot overflow.
        SmallRatio(Signed::abs(&self.0))
    }
    fn is_nil(&self) -> bool {
        Zero::is_zero(&self.0)
    }
    fn is_above_zero(&self) -> bool {
        Signed::is_positive(&self.0)
    }
    fn into_big(self) -> BigRational {
        let (numer, denom) = self.0.into_raw();
        BigRational::new_raw(BigInt::from(numer), BigInt::from(denom))
    }
}

/// [`ElementChange`] in the arithmetic of the tally.
#[derive(Clone, Debug, PartialEq, Eq)]
struct Change<T> {
    element: Element,
    from: T,
    to: T,
    atoms: T,
    electrons: T,
}

type Changes<T> = SmallVec<[Change<T>; 2]>;

fn into_big<T: Exact>(changes: Changes<T>) -> Vec<ElementChange> {
    changes
        .into_iter()
        .map(|c| ElementChange {
            element: c.element,
            from: c.from.into_big(),
            to: c.to.into_big(),
            atoms: c.atoms.into_big(),
            electrons: c.electrons.into_big(),
        })
        .collect()
}

/// The atoms of one species by element and oxidation number, in the arithmetic of the tally.
#[derive(Clone, Debug)]
struct SiteList<T> {
    /// Net charge of the species.
    charge: i64,
    /// Formula units the counts refer to (see [`SpeciesOxidation::denominator`]).
    denominator: u64,
    /// (element, oxidation number, atoms), elements in the order of the species' composition.
    sites: SmallVec<[(Element, T, T); 4]>,
}

impl<T: Exact> SiteList<T> {
    /// `None` when a value does not fit `T`.
    fn of(oxidation: &SpeciesOxidation) -> Option<SiteList<T>> {
        let mut sites = SmallVec::new();
        for element in &oxidation.elements {
            for site in &element.sites {
                sites.push((
                    element.element,
                    T::from_big(&site.oxidation_number)?,
                    T::from_count(site.count)?,
                ));
            }
        }
        Some(SiteList {
            charge: oxidation.charge,
            denominator: oxidation.denominator,
            sites,
        })
    }
}

/// What the tally and the electrons written say, in `T`.
struct Verdict<T> {
    n: T,
    written: T,
    kind: RedoxKind,
}

/// The oxidation-number part of [`analyse_prepared`] (after the recount), in `T`, with the
/// results in big rationals. `None` when `T` gives up.
#[allow(clippy::type_complexity, clippy::result_large_err)]
fn analysed<T: Exact>(
    reaction: &Reaction,
    species: &[Option<Arc<SpeciesOxidation>>],
) -> Option<Result<(Vec<ElementChange>, Vec<ElementChange>, Verdict<BigRational>), RedoxError>> {
    let mut lists: SmallVec<[Option<SiteList<T>>; 8]> = SmallVec::new();
    for oxidation in species {
        lists.push(match oxidation {
            Some(oxidation) => Some(SiteList::of(oxidation)?),
            None => None,
        });
    }
    let (oxidized, reduced, _) = tally(reaction, lists.iter().map(Option::as_ref))?;
    Some(
        match verdict(&oxidized, &reduced, &reaction.electron_nu())? {
            Ok(verdict) => Ok((
                into_big(oxidized),
                into_big(reduced),
                Verdict {
                    n: verdict.n.into_big(),
                    written: verdict.written.into_big(),
                    kind: verdict.kind,
                },
            )),
            Err((n, written)) => Err(RedoxError::ElectronMismatch {
                from_oxidation_numbers: n.into_big(),
                electrons_written: written.into_big(),
            }),
        },
    )
}

/// n, the electrons written and the kind from the changes, or `Err((n, written))` when the
/// electrons of a half-reaction disagree with its changes. `None` when `T` gives up.
#[allow(clippy::type_complexity)]
fn verdict<T: Exact>(
    oxidized: &[Change<T>],
    reduced: &[Change<T>],
    electron_nu: &BigRational,
) -> Option<Result<Verdict<T>, (T, T)>> {
    let sum = |changes: &[Change<T>]| {
        changes
            .iter()
            .try_fold(T::nil(), |sum, c| sum.plus(&c.electrons))
    };
    let (lost, gained) = (sum(oxidized)?, sum(reduced)?);
    if electron_nu.is_zero() {
        let kind = whole_kind(oxidized, reduced);
        return Some(Ok(Verdict {
            n: lost,
            written: T::nil(),
            kind,
        }));
    }
    let written = T::from_big(electron_nu)?.magnitude();
    let (n, opposite, kind) = if electron_nu.is_negative() {
        (gained, lost, RedoxKind::Reduction)
    } else {
        (lost, gained, RedoxKind::Oxidation)
    };
    Some(if n != written || !opposite.is_nil() {
        Err((n, written))
    } else {
        Ok(Verdict { n, written, kind })
    })
}

/// Atoms of one element in one state on one side: (element's place in order of first
/// appearance, on the reactant side, oxidation number, atoms).
type Atoms<T> = (usize, bool, T, T);

/// The oxidised and reduced elements of a reaction, from the site lists of its species
/// (`None` for the electron, in the order of the entries), and whether every element has as
/// many atoms on each side. `None` when `T` gives up.
fn tally<'a, T: Exact + 'a>(
    reaction: &Reaction,
    species: impl Iterator<Item = Option<&'a SiteList<T>>>,
) -> Option<(Changes<T>, Changes<T>, bool)> {
    // One flat list for all elements and both sides, on the stack for usual reactions.
    let mut elements: SmallVec<[Element; 8]> = SmallVec::new();
    let mut atoms: SmallVec<[Atoms<T>; 16]> = SmallVec::new();
    for (entry, sites) in reaction.entries().iter().zip(species) {
        let Some(sites) = sites else {
            continue;
        };
        // Counts are atoms per `denominator` formula units (non-integer subscripts).
        let nu = if sites.denominator == 1 {
            T::from_big(&entry.nu)?
        } else {
            T::from_big(&(&entry.nu / BigRational::from_integer(sites.denominator.into())))?
        };
        let reactant = entry.nu.is_negative();
        let nu_abs = nu.magnitude();
        for (element, state, count) in &sites.sites {
            let place = match elements.iter().position(|e| e == element) {
                Some(i) => i,
                None => {
                    elements.push(*element);
                    elements.len() - 1
                }
            };
            atoms.push((place, reactant, state.clone(), nu_abs.times(count)?));
        }
    }
    // Per element, reactants before products, each in order of oxidation number; the sort is
    // stable, so equal states keep the order of the entries.
    atoms.sort_by(|a, b| (a.0, !a.1, &a.2).cmp(&(b.0, !b.1, &b.2)));

    let mut oxidized: Changes<T> = SmallVec::new();
    let mut reduced: Changes<T> = SmallVec::new();
    let mut conserved = true;
    for run in atoms.chunk_by(|a, b| a.0 == b.0) {
        let element = elements[run[0].0];
        let products = run.iter().position(|a| !a.1).unwrap_or(run.len());
        let (before, after) = run.split_at(products);
        let total = |side: &[Atoms<T>]| side.iter().try_fold(T::nil(), |sum, a| sum.plus(&a.3));
        conserved &= total(before)? == total(after)?;
        pair_atoms(before, after, |from, to, atoms| {
            if from == to {
                return Some(());
            }
            let electrons = atoms.times(&to.minus(from)?.magnitude())?;
            let list = if to > from {
                &mut oxidized
            } else {
                &mut reduced
            };
            match list
                .iter_mut()
                .find(|c| c.element == element && &c.from == from && &c.to == to)
            {
                Some(existing) => {
                    existing.atoms = existing.atoms.plus(&atoms)?;
                    existing.electrons = existing.electrons.plus(&electrons)?;
                }
                None => list.push(Change {
                    element,
                    from: from.clone(),
                    to: to.clone(),
                    atoms,
                    electrons,
                }),
            }
            Some(())
        })?;
    }
    Some((oxidized, reduced, conserved))
}

fn whole_kind<T: PartialEq>(oxidized: &[Change<T>], reduced: &[Change<T>]) -> RedoxKind {
    if oxidized.is_empty() && reduced.is_empty() {
        return RedoxKind::NoRedox;
    }
    for up in oxidized {
        let mut downs = reduced
            .iter()
            .filter(|c| c.element == up.element)
            .peekable();
        if downs.peek().is_none() {
            continue;
        }
        if downs.clone().all(|d| d.from == up.from) {
            return RedoxKind::Disproportionation;
        }
        if downs.all(|d| d.to == up.to) {
            return RedoxKind::Comproportionation;
        }
    }
    RedoxKind::Redox
}

/// Pairs atoms of one element across the sides in order of oxidation number (both sorted by
/// it), giving each `(from, to, atoms)` chunk to `chunk`. Both sides hold the same number of
/// atoms (checked before). `None` when `T` or `chunk` gives up.
fn pair_atoms<T: Exact>(
    before: &[Atoms<T>],
    after: &[Atoms<T>],
    mut chunk: impl FnMut(&T, &T, T) -> Option<()>,
) -> Option<()> {
    let (mut i, mut j) = (0, 0);
    let mut left_i = before.first().map(|b| b.3.clone()).unwrap_or_else(T::nil);
    let mut left_j = after.first().map(|a| a.3.clone()).unwrap_or_else(T::nil);
    while i < before.len() && j < after.len() {
        let take = if left_i < left_j {
            left_i.clone()
        } else {
            left_j.clone()
        };
        left_i = left_i.minus(&take)?;
        left_j = left_j.minus(&take)?;
        if take.is_above_zero() {
            chunk(&before[i].2, &after[j].2, take)?;
        }
        if left_i.is_nil() {
            i += 1;
            if let Some(b) = before.get(i) {
                left_i = b.3.clone();
            }
        }
        if left_j.is_nil() {
            j += 1;
            if let Some(a) = after.get(j) {
                left_j = a.3.clone();
            }
        }
    }
    Some(())
}

/// The elements whose oxidation numbers differ between the two sides of an equation, compared
/// as sets of states (coefficients do not matter, so the equation need not be balanced).
/// Elements on one side only (O and H that the medium will supply) do not count.
pub fn changed_elements(equation: &Equation) -> Result<Vec<Element>, RedoxError> {
    // The balancer asks this of every equation that might be a half-reaction: the states are
    // compared where the shared answers keep them, not copied out.
    let mut oxidations: SmallVec<[(bool, Arc<SpeciesOxidation>); 8]> = SmallVec::new();
    for (terms, left) in [(&equation.reactants, true), (&equation.products, false)] {
        for term in terms {
            if !term.species.is_electron() {
                oxidations.push((left, species_oxidation(&term.species, &[])?));
            }
        }
    }
    type States<'a> = SmallVec<[&'a BigRational; 2]>;
    let mut states: SmallVec<[(Element, States, States); 8]> = SmallVec::new();
    for (left, oxidation) in &oxidations {
        for element in &oxidation.elements {
            let index = match states.iter().position(|(e, _, _)| *e == element.element) {
                Some(i) => i,
                None => {
                    states.push((element.element, SmallVec::new(), SmallVec::new()));
                    states.len() - 1
                }
            };
            let list = if *left {
                &mut states[index].1
            } else {
                &mut states[index].2
            };
            for site in &element.sites {
                if !list.contains(&&site.oxidation_number) {
                    list.push(&site.oxidation_number);
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::balance::{BalanceOptions, Medium, balance_text};

    /// Every corpus input balanced in its medium, every pair of couples, then lines whose
    /// oxidation numbers are averages (Fe3O4 +8/3, S4O6^2- +5/2, KO2 −1/2) and a whole reaction without redox.
    fn reactions() -> Vec<Reaction> {
        let mut lines = crate::oxidation::corpus::lines();
        lines.extend(crate::oxidation::corpus::pairs_of_couples());
        for line in [
            "Fe3O4 + H2 -> Fe + H2O",
            "S2O3^2- + I2 -> S4O6^2- + I-",
            "KO2 + H2O -> KOH + O2 + H2O2",
            "Fe3O4 + MnO4- -> Fe3+ + Mn2+",
            "AgNO3 + NaCl -> AgCl + NaNO3",
        ] {
            lines.push((line.to_owned(), Medium::Acid));
        }
        lines
            .iter()
            .filter_map(|(line, medium)| {
                let options = BalanceOptions {
                    medium: *medium,
                    ..BalanceOptions::default()
                };
                balance_text(line, &options)
                    .ok()
                    .map(|b| b.reaction().clone())
            })
            .collect()
    }

    fn widened(change: &MachineChange) -> ElementChange {
        let big = |r: Rational64| BigRational::new((*r.numer()).into(), (*r.denom()).into());
        ElementChange {
            element: change.element,
            from: big(change.from),
            to: big(change.to),
            atoms: big(change.atoms),
            electrons: big(change.electrons),
        }
    }

    /// The machine analysis of `reaction`, checked against the general one: `None` when the
    /// machine analysis gives up.
    fn compared(reaction: &Reaction) -> Option<MachineAnalysis> {
        let shared: Vec<Option<Arc<SpeciesOxidation>>> = reaction
            .entries()
            .iter()
            .map(|e| (!e.species.is_electron()).then(|| species_oxidation(&e.species, &[])))
            .map(|o| o.transpose().ok().flatten())
            .collect();
        let sites: Vec<Option<MachineSites>> = shared
            .iter()
            .map(|o| o.as_deref().and_then(MachineSites::of))
            .collect();
        let sites: Vec<Option<&MachineSites>> = sites.iter().map(Option::as_ref).collect();
        let machine = analyse_conserved(reaction, &sites);
        // The fraction arithmetic gives what the whole-number one gives, where both answer.
        let ratio: Vec<Option<&SiteList<SmallRatio>>> =
            sites.iter().map(|s| s.map(|s| &s.ratio)).collect();
        if let (Some(machine), Some(in_fractions)) = (&machine, conserved(reaction, &ratio)) {
            assert_eq!(*machine, in_fractions, "{reaction}");
        }
        let general = analyse(reaction);
        if let Some(machine) = &machine {
            let general = general.as_ref().expect("the machine analysis answered");
            let changes = |list: &[MachineChange]| list.iter().map(widened).collect::<Vec<_>>();
            assert_eq!(changes(&machine.oxidized), general.oxidized, "{reaction}");
            assert_eq!(changes(&machine.reduced), general.reduced, "{reaction}");
            let big = |r: Rational64| BigRational::new((*r.numer()).into(), (*r.denom()).into());
            assert_eq!(big(machine.n), general.n, "{reaction}");
            assert_eq!(
                big(machine.electrons_written),
                general.electrons_written,
                "{reaction}"
            );
            assert_eq!(machine.kind, general.kind, "{reaction}");
            for (i, entry) in reaction.entries().iter().enumerate() {
                let is_reactant = entry.nu.is_negative();
                assert_eq!(
                    machine.plays(sites[i], is_reactant),
                    general.plays(i, is_reactant),
                    "{reaction}"
                );
            }
        }
        machine
    }

    #[test]
    fn machine_analysis_is_the_general_analysis() {
        let reactions = reactions();
        let mut answered = 0;
        for reaction in &reactions {
            // Scaled by fractions and large factors: rational ν, big sums.
            for (numer, denom) in [(1i64, 1i64), (1, 2), (3, 7), (1 << 40, 1)] {
                let factor = BigRational::new(BigInt::from(numer), BigInt::from(denom));
                let scaled = reaction.scaled(&factor);
                if compared(&scaled).is_some() {
                    answered += 1;
                } else if numer < 1 << 40 {
                    // With small values it leaves only what the general analysis refuses.
                    assert!(analyse(&scaled).is_err(), "{scaled}");
                }
            }
        }
        assert!(
            answered > 3 * reactions.len(),
            "{answered} of {}",
            reactions.len()
        );
    }

    #[test]
    fn machine_analysis_gives_up_beyond_machine_words_and_on_unbalanced_reactions() {
        let reaction = &reactions()[0];
        // ν of 2^62 times atom counts leaves the range; the general analysis still answers.
        let huge = reaction.scaled(&BigRational::from_integer(BigInt::from(1u64 << 62)));
        assert!(analyse(&huge).is_ok());
        assert_eq!(compared(&huge), None);
        // Not conserved: the general analysis says so, the machine one leaves it to it.
        let mut broken = reaction.clone();
        let first = broken.entries()[0].species.clone();
        broken.add(&first, BigRational::from_integer((-1).into()));
        assert!(matches!(
            analyse(&broken),
            Err(RedoxError::NotBalanced { .. })
        ));
        assert_eq!(compared(&broken), None);
    }
}

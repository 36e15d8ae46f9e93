//! Exact balancing of equations and half-reactions, as written or in acid or base, into the
//! normal form of DOMAIN.md §Balancing, with an independent recount before any result leaves.
//!
//! One coefficient per species, one conservation row per element plus one for the charge; the
//! balanced reactions are the integer null space of that matrix ([`matrix`]). Balancing never
//! touches floating point.
//!
//! ## When electrons are added
//! Electrons belong to half-reactions only. With the default [`ElectronRule::HalfReactions`]:
//! - an equation that contains `e-` is a half-reaction, and its `e-` is one of the user's
//!   species (it keeps its side; none is added);
//! - an equation without `e-` is first balanced without electrons; only when no electron-free
//!   balance lets every written species take part (some element or the charge cannot close),
//!   and [`BalanceOptions::half_reaction_test`] says the equation is a half-reaction, is `e-`
//!   added and the balance repeated. The rule is "exactly one element changes oxidation state"
//!   ([`crate::oxidation::changes_one_element`], installed by [`BalanceOptions::default`]).
//!   With no test installed, only a written `e-` makes a half-reaction. When an electron-free
//!   balance exists but puts a species across the arrow (`Fe3+ -> Fe2+ + Fe`), the equation is
//!   a whole reaction written wrongly, and that is reported: adding `e-` would only turn it
//!   into a family of half-reactions.
//!
//! [`ElectronRule::Always`] (a user saying "this is a half-reaction") adds `e-` whenever none
//! is written; [`ElectronRule::Never`] never adds one.
//!
//! ## Work limit
//! Exact arithmetic on hostile input (dozens of species with six-digit subscripts) can take
//! minutes. Every balance is metered ([`matrix::WorkMeter`]; one unit is about one 64-bit
//! multiply) and stops with [`BalanceError::Limit`] (kind `limit`) past
//! [`BalanceOptions::work_limit`], by default [`DEFAULT_WORK_LIMIT`]. The published equations
//! of the test corpus with one answer use under two thousand units (the non-unique ones under
//! ten thousand); the default bound is reached in well under a second.
//!
//! ```
//! use couplet::balance::{BalanceOptions, Medium, balance};
//!
//! let skeleton = "MnO4- + Fe2+ -> Mn2+ + Fe3+".parse().unwrap();
//! let options = BalanceOptions { medium: Medium::Acid, ..BalanceOptions::default() };
//! let balanced = balance(&skeleton, &options).unwrap();
//! assert_eq!(balanced.ascii(), "MnO4- + 5 Fe2+ + 8 H+ -> Mn2+ + 5 Fe3+ + 4 H2O");
//! ```

mod halves;
pub mod matrix;
mod modular;
mod small;

pub use halves::{HalfReactions, split};

use crate::elements::Element;
use crate::notation::{
    Arrow, Equation, NotationError, NotationErrorKind, Span, Species, Style, parse_equation,
    parse_species, render_caret,
};
use crate::reaction::{Reaction, same_species};
use matrix::{IntegerMatrix, WorkLimitReached, WorkMeter};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{Signed, Zero};
use smallvec::SmallVec;
use std::fmt;
use std::str::FromStr;
use std::sync::LazyLock;

/// What the solvent may contribute.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
pub enum Medium {
    /// As written: no species are added (electrons follow [`ElectronRule`]).
    #[default]
    None,
    /// Acidic water: H2O and H+ may be added.
    Acid,
    /// Basic water: H2O and OH- may be added.
    Base,
}

impl Medium {
    /// Stable name: `none`, `acid`, `base`.
    pub fn name(self) -> &'static str {
        match self {
            Medium::None => "none",
            Medium::Acid => "acid",
            Medium::Base => "base",
        }
    }
}

impl FromStr for Medium {
    type Err = String;
    fn from_str(text: &str) -> Result<Medium, String> {
        match text {
            "none" => Ok(Medium::None),
            "acid" => Ok(Medium::Acid),
            "base" => Ok(Medium::Base),
            other => Err(format!(
                "unknown medium '{other}': expected none, acid or base"
            )),
        }
    }
}

impl fmt::Display for Medium {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// When `e-` may be added (see the module documentation for the rule).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
pub enum ElectronRule {
    /// Only to half-reactions: a written `e-`, or the half-reaction test.
    #[default]
    HalfReactions,
    /// Always, when none is written: the caller says the input is a half-reaction.
    Always,
    /// Never.
    Never,
}

/// Says whether an equation written without `e-` is a half-reaction (the rule: exactly one
/// element changes oxidation state). Consulted only after an electron-free balance failed.
pub type HalfReactionTest = fn(&Equation) -> bool;

/// The number of electrons a balanced whole reaction transfers (from oxidation numbers), or
/// `None` when it cannot be told (one element both oxidised and reduced).
pub type ElectronsTransferred = fn(&Reaction) -> Option<BigInt>;

/// How to balance. The default balances as written, adds electrons to half-reactions, and
/// takes the half-reaction test and the electron count of whole reactions from the
/// oxidation-number module.
#[derive(Clone, Copy, Debug)]
pub struct BalanceOptions {
    /// Which solvent species may be added.
    pub medium: Medium,
    /// When electrons may be added.
    pub electrons: ElectronRule,
    /// Decides half-reactions written without `e-`; supplied by the oxidation-number module.
    pub half_reaction_test: Option<HalfReactionTest>,
    /// n of a whole reaction; supplied by the oxidation-number module. Without it a whole
    /// reaction reports no electron count.
    pub electrons_transferred: Option<ElectronsTransferred>,
    /// Most units of exact-arithmetic work one balance may use (see the module documentation);
    /// past it the balance stops with [`BalanceError::Limit`].
    pub work_limit: u64,
    /// Whether an impossible balance says why (which species, which element or the charge).
    /// Finding that out costs about one more elimination; a caller that only wants the
    /// balance when there is one (a checker's suggestion) turns it off and gets
    /// [`Impossible::NotExplained`].
    pub explain_impossible: bool,
}

/// The default [`BalanceOptions::work_limit`]: 4 million units, about 0.04 s on one core of
/// the project's build machine with the fraction-free elimination (DEVELOPERS.md has the
/// measurement). The published test corpus needs under two thousand per equation with one
/// answer.
pub const DEFAULT_WORK_LIMIT: u64 = 4_000_000;

impl Default for BalanceOptions {
    fn default() -> BalanceOptions {
        BalanceOptions {
            medium: Medium::None,
            electrons: ElectronRule::HalfReactions,
            half_reaction_test: Some(crate::oxidation::changes_one_element),
            electrons_transferred: Some(electrons_from_oxidation_numbers),
            work_limit: DEFAULT_WORK_LIMIT,
            explain_impossible: true,
        }
    }
}

/// n of a whole reaction from oxidation-number changes; `None` when some species has no
/// oxidation numbers or n is not whole.
fn electrons_from_oxidation_numbers(reaction: &Reaction) -> Option<BigInt> {
    let n = crate::oxidation::oxidation_number_electrons(reaction)?;
    n.is_integer().then(|| n.to_integer())
}

/// A reaction the balancer made and checked: atoms of every element and the charge are
/// conserved, coefficients are the smallest positive integers, the user's species keep their
/// order and side. Only [`balance`] constructs it.
#[derive(Clone, Debug)]
pub struct BalancedReaction {
    reaction: Reaction,
    medium: Medium,
    /// Computes n of a whole reaction when asked (balancing itself never needs it).
    electrons_transferred: Option<ElectronsTransferred>,
}

impl PartialEq for BalancedReaction {
    fn eq(&self, other: &BalancedReaction) -> bool {
        // How n is computed is not part of what the reaction is.
        self.reaction == other.reaction && self.medium == other.medium
    }
}
impl Eq for BalancedReaction {}

impl BalancedReaction {
    /// The reaction (signed stoichiometric numbers, all integers).
    pub fn reaction(&self) -> &Reaction {
        &self.reaction
    }

    /// The medium it was balanced in.
    pub fn medium(&self) -> Medium {
        self.medium
    }

    /// True when `e-` takes part.
    pub fn is_half_reaction(&self) -> bool {
        !self.reaction.electron_nu().is_zero()
    }

    /// Electrons: the `e-` coefficient of a half-reaction, or n of a whole reaction when the
    /// oxidation-number module supplied it.
    pub fn electrons(&self) -> Option<BigInt> {
        if self.is_half_reaction() {
            Some(self.reaction.electron_nu().to_integer().abs())
        } else {
            self.electrons_transferred.and_then(|n| n(&self.reaction))
        }
    }

    /// Reactants with their (positive integer) coefficients, in order.
    pub fn reactants(&self) -> Vec<(&Species, BigInt)> {
        self.reaction
            .reactants()
            .map(|(s, c)| (s, c.to_integer()))
            .collect()
    }

    /// Products with their (positive integer) coefficients, in order.
    pub fn products(&self) -> Vec<(&Species, BigInt)> {
        self.reaction
            .products()
            .map(|(s, c)| (s, c.to_integer()))
            .collect()
    }

    /// Canonical ASCII with `->`.
    pub fn ascii(&self) -> String {
        self.reaction.to_text(Style::Ascii, Arrow::Forward)
    }

    /// Unicode with sub- and superscripts and `→`.
    pub fn unicode(&self) -> String {
        self.reaction.to_text(Style::Unicode, Arrow::Forward)
    }
}

/// A quantity that must be conserved: one element's atoms, or the charge.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Conserved {
    /// Atoms of one element.
    Element(Element),
    /// Net charge.
    Charge,
}

impl fmt::Display for Conserved {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Conserved::Element(e) => write!(f, "{e}"),
            Conserved::Charge => f.write_str("the charge"),
        }
    }
}

/// Why no balance keeps every species on the side it was written.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum Impossible {
    /// Only the zero solution conserves everything; dropping this one quantity would allow a
    /// balance.
    CannotClose(Conserved),
    /// Conservation forces these species to coefficient zero.
    CannotTakePart {
        /// The species that would get coefficient zero.
        species: Vec<Species>,
        /// The quantity that forces it, when one alone does.
        because_of: Option<Conserved>,
    },
    /// The only balance puts these species on the other side of the arrow.
    WrongSide {
        /// The species that would have to move across the arrow.
        species: Vec<Species>,
        /// The balance they would give if moved.
        moved: Reaction,
    },
    /// Only the zero solution conserves everything, and no single quantity is to blame.
    NoBalance,
    /// No balance lets every species take part; why was not asked for
    /// ([`BalanceOptions::explain_impossible`] off).
    NotExplained,
}

fn species_list(species: &[Species]) -> String {
    let names: Vec<String> = species.iter().map(Species::ascii).collect();
    match names.len() {
        0 => String::new(),
        1 => names[0].clone(),
        n => format!("{} and {}", names[..n - 1].join(", "), names[n - 1]),
    }
}

impl fmt::Display for Impossible {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Impossible::CannotClose(what) => write!(
                f,
                "{what} cannot close: no coefficients conserve it together with the rest"
            ),
            Impossible::CannotTakePart {
                species,
                because_of,
            } => {
                write!(
                    f,
                    "{} cannot take part: {} coefficient comes out zero",
                    species_list(species),
                    if species.len() == 1 { "its" } else { "their" }
                )?;
                if let Some(what) = because_of {
                    write!(f, " ({what} cannot close otherwise)")?;
                }
                Ok(())
            }
            Impossible::WrongSide { species, moved } => write!(
                f,
                "no balance keeps every species on its written side: {} would have to move across the arrow ({moved})",
                species_list(species)
            ),
            Impossible::NoBalance => {
                f.write_str("no nonzero coefficients conserve every element and the charge")
            }
            Impossible::NotExplained => f.write_str(
                "no balance lets every written species take part (the reason was not worked out)",
            ),
        }
    }
}

/// Why balancing gave no single answer.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum BalanceError {
    /// The text could not be read.
    #[error("{0}")]
    Notation(#[from] NotationError),
    /// The balances form a family of dimension `basis.len()` ≥ 2.
    #[error(
        "not unique: the balances form a {}-dimensional family; every balance is a combination of the {} reactions listed",
        basis.len(),
        basis.len()
    )]
    NotUnique {
        /// Independent balanced reactions spanning every answer, in lowest integers.
        basis: Vec<Reaction>,
    },
    /// No balance keeps every species on the side it was written.
    #[error("{0}")]
    Impossible(Impossible),
    /// A species is written twice.
    #[error("{species} is written twice: write each species once")]
    Repeated {
        /// The species (boxed: errors stay small, so that results stay small).
        species: Box<Species>,
        /// Where the second one was written.
        span: Span,
    },
    /// The exact arithmetic needed more work than [`BalanceOptions::work_limit`] allows.
    #[error(
        "work limit: balancing this equation needs more than {limit} units of exact arithmetic (its numbers grow too large); the limit keeps every run short: check the formulas, or split the equation"
    )]
    Limit {
        /// The limit that was reached.
        limit: u64,
    },
    /// The result failed the independent recount: a bug, never an answer.
    #[error("internal error: the result {0} failed the recount of atoms and charge")]
    Internal(String),
}

impl BalanceError {
    /// Stable kind for JSON: `syntax`, `unknown_element`, `limit`, `not_unique`, `impossible`,
    /// `internal`.
    pub fn kind(&self) -> &'static str {
        match self {
            BalanceError::Notation(e) => match e.kind {
                NotationErrorKind::UnknownElement => "unknown_element",
                NotationErrorKind::Limit => "limit",
                // A well-formed formula that no species can be is still a fault in what was
                // typed, so it is reported with the typing faults.
                _ => "syntax",
            },
            BalanceError::NotUnique { .. } => "not_unique",
            BalanceError::Impossible(_) => "impossible",
            BalanceError::Repeated { .. } => "syntax",
            BalanceError::Limit { .. } => "limit",
            BalanceError::Internal(_) => "internal",
        }
    }

    /// The error with the faulty part of `input` underlined where there is one.
    pub fn render(&self, input: &str) -> String {
        let headline = format!("error ({}): {self}", self.kind());
        let span = match self {
            BalanceError::Notation(e) => {
                return render_caret(&e.input, e.span, &headline);
            }
            BalanceError::Repeated { span, .. } => Some(*span),
            BalanceError::Impossible(Impossible::WrongSide { species, .. })
            | BalanceError::Impossible(Impossible::CannotTakePart { species, .. }) => {
                species.first().map(|s| s.span)
            }
            _ => None,
        };
        match span {
            Some(span) if span.end <= input.len() && span.start < span.end => {
                render_caret(input, span, &headline)
            }
            _ => headline,
        }
    }
}

fn fixed_species(text: &str) -> Species {
    parse_species(text).expect("built-in species parse")
}

static WATER: LazyLock<Species> = LazyLock::new(|| fixed_species("H2O"));
static PROTON: LazyLock<Species> = LazyLock::new(|| fixed_species("H+"));
static HYDROXIDE: LazyLock<Species> = LazyLock::new(|| fixed_species("OH-"));
static ELECTRON: LazyLock<Species> = LazyLock::new(|| fixed_species("e-"));

/// Reads and balances an equation.
pub fn balance_text(
    text: &str,
    options: &BalanceOptions,
) -> Result<BalancedReaction, BalanceError> {
    balance(&parse_equation(text)?, options)
}

/// Balances an equation or half-reaction into the normal form (see the module documentation).
/// Coefficients written in the input are ignored.
pub fn balance(
    equation: &Equation,
    options: &BalanceOptions,
) -> Result<BalancedReaction, BalanceError> {
    balance_counting(equation, options).0
}

/// As [`balance`], also returning the units of work used (for callers that share one budget
/// across many balances, such as the data-file checker).
pub fn balance_counting(
    equation: &Equation,
    options: &BalanceOptions,
) -> (Result<BalancedReaction, BalanceError>, u64) {
    let mut meter = WorkMeter::new(options.work_limit);
    let result = balance_metered(equation, options, &mut meter);
    (result, meter.used())
}

/// The user's species with their sides (−1 reactants, +1 products), in order.
fn written_species(equation: &Equation) -> Written<'_> {
    equation
        .reactants
        .iter()
        .map(|t| (&t.species, -1))
        .chain(equation.products.iter().map(|t| (&t.species, 1)))
        .collect()
}

fn balance_metered(
    equation: &Equation,
    options: &BalanceOptions,
    meter: &mut WorkMeter,
) -> Result<BalancedReaction, BalanceError> {
    let written = written_species(equation);
    for (i, (species, _)) in written.iter().enumerate() {
        if written[..i].iter().any(|(s, _)| same_species(s, species)) {
            return Err(BalanceError::Repeated {
                species: Box::new((*species).clone()),
                span: species.span,
            });
        }
    }
    let electrons_written = equation.has_electrons();
    let solved = match options.electrons {
        ElectronRule::Never => solve(&written, options.medium, false, meter),
        ElectronRule::Always => solve(&written, options.medium, !electrons_written, meter),
        ElectronRule::HalfReactions => {
            let plain = solve(&written, options.medium, false, meter);
            // Electrons are added only when no electron-free balance lets every species take
            // part: a balance that exists but crosses the arrow is a whole reaction.
            match (&plain, options.half_reaction_test) {
                (Err(Failure::Unexplained(_)), Some(is_half))
                    if !electrons_written && is_half(equation) =>
                {
                    solve(&written, options.medium, true, meter)
                }
                _ => plain,
            }
        }
    };
    let reaction = solved.map_err(|failure| failure.explain(options.explain_impossible, meter))?;
    let electrons_transferred = options.electrons_transferred;
    Ok(BalancedReaction {
        reaction,
        medium: options.medium,
        electrons_transferred,
    })
}

impl From<WorkLimitReached> for BalanceError {
    fn from(reached: WorkLimitReached) -> BalanceError {
        BalanceError::Limit {
            limit: reached.limit,
        }
    }
}

/// Why a solve failed, with the explanation of an impossible balance left for when it is
/// reported: finding the conservation row to blame costs more than the solve itself, and a
/// failed electron-free attempt is often followed by a successful one with electrons.
enum Failure {
    /// Reported as it is.
    Final(BalanceError),
    /// No balance lets every species take part; which row is to blame is not yet known.
    Unexplained(Unexplained),
}

struct Unexplained {
    /// User species forced to coefficient zero (empty when only the zero balance exists).
    never_taking_part: Vec<Species>,
    matrix: IntegerMatrix,
    rows: Vec<Conserved>,
    /// The side of each column (see [`Column`]).
    sides: Vec<i8>,
}

impl Failure {
    fn explain(self, wanted: bool, meter: &mut WorkMeter) -> BalanceError {
        match self {
            Failure::Final(error) => error,
            Failure::Unexplained(_) if !wanted => {
                BalanceError::Impossible(Impossible::NotExplained)
            }
            Failure::Unexplained(unexplained) => {
                let blamed = match blame(
                    &unexplained.matrix,
                    &unexplained.rows,
                    &unexplained.sides,
                    meter,
                ) {
                    Ok(blamed) => blamed,
                    Err(reached) => return reached.into(),
                };
                BalanceError::Impossible(if unexplained.never_taking_part.is_empty() {
                    match blamed {
                        Some(what) => Impossible::CannotClose(what),
                        None => Impossible::NoBalance,
                    }
                } else {
                    Impossible::CannotTakePart {
                        species: unexplained.never_taking_part,
                        because_of: blamed,
                    }
                })
            }
        }
    }
}

impl From<BalanceError> for Failure {
    fn from(error: BalanceError) -> Failure {
        Failure::Final(error)
    }
}

impl From<WorkLimitReached> for Failure {
    fn from(reached: WorkLimitReached) -> Failure {
        Failure::Final(reached.into())
    }
}

/// The user's species with their sides (see [`written_species`]); on the stack for the usual
/// equation, as are [`Columns`] and [`Sides`]: a balance should not allocate for its
/// bookkeeping.
type Written<'a> = SmallVec<[(&'a Species, i8); small::MAX_COLUMNS]>;
/// The unknowns of a system (see [`Column`]).
type Columns<'a> = SmallVec<[Column<'a>; small::MAX_COLUMNS]>;
/// The side of each column.
type Sides = SmallVec<[i8; small::MAX_COLUMNS]>;

/// One unknown of the system: a species and the side it must end on (−1 left, +1 right, 0 for
/// added species, which go where their sign puts them).
struct Column<'a> {
    species: &'a Species,
    side: i8,
}

fn columns<'a>(written: &[(&'a Species, i8)], medium: Medium, add_electrons: bool) -> Columns<'a> {
    let mut columns: Columns = written
        .iter()
        .map(|&(species, side)| Column { species, side })
        .collect();
    let mut added: Vec<&'static Species> = Vec::new();
    match medium {
        Medium::None => {}
        Medium::Acid => added.extend([&*WATER, &*PROTON]),
        Medium::Base => added.extend([&*WATER, &*HYDROXIDE]),
    }
    if add_electrons {
        added.push(&ELECTRON);
    }
    for species in added {
        // A medium species the user wrote is the user's: it keeps its written side.
        if !written.iter().any(|(s, _)| same_species(s, species)) {
            columns.push(Column { species, side: 0 });
        }
    }
    columns
}

/// The conservation matrix: one row per element (in order of first appearance), then the
/// charge when any species is charged.
fn conservation_matrix(columns: &[Column]) -> (IntegerMatrix, Vec<Conserved>) {
    let mut rows: Vec<Conserved> = Vec::new();
    for column in columns {
        for &(element, _) in column.species.composition.counts() {
            if !rows.contains(&Conserved::Element(element)) {
                rows.push(Conserved::Element(element));
            }
        }
    }
    if columns.iter().any(|c| c.species.charge() != 0) {
        rows.push(Conserved::Charge);
    }
    let mut matrix = IntegerMatrix::zeros(rows.len(), columns.len());
    for (c, column) in columns.iter().enumerate() {
        let composition = &column.species.composition;
        for (r, row) in rows.iter().enumerate() {
            // A column stands for `denominator` formula units, so that non-integer
            // stoichiometry (Li0.5CoO2) still gives whole numbers; `reaction_of` scales back.
            let value = match row {
                Conserved::Element(e) => i128::from(composition.scaled_count(*e)),
                Conserved::Charge => {
                    i128::from(composition.charge()) * i128::from(composition.denominator())
                }
            };
            matrix.set(r, c, value);
        }
    }
    (matrix, rows)
}

fn sign(x: &BigInt) -> i8 {
    if x.is_positive() {
        1
    } else if x.is_negative() {
        -1
    } else {
        0
    }
}

/// Whether a vector with these `signs` is to be flipped so that as many user species as
/// possible sit on their written side (on a tie, the first user species with a nonzero entry
/// decides). `sides` holds each column's side (see [`Column`]).
fn flip_wanted(signs: &[i8], sides: &[i8]) -> bool {
    let mut agree = 0i64;
    let mut first: Option<bool> = None;
    for (&s, &side) in signs.iter().zip(sides) {
        if side == 0 || s == 0 {
            continue;
        }
        let same = s == side;
        agree += if same { 1 } else { -1 };
        first.get_or_insert(same);
    }
    agree < 0 || (agree == 0 && first == Some(false))
}

/// Flips `vector` as [`flip_wanted`] says.
fn orient(vector: &mut [BigInt], sides: &[i8]) {
    let signs: Vec<i8> = vector.iter().map(sign).collect();
    if flip_wanted(&signs, sides) {
        for x in vector.iter_mut() {
            *x = -&*x;
        }
    }
}

fn reaction_of(vector: &[BigInt], columns: &[Column]) -> Reaction {
    let denominator = |c: &Column| c.species.composition.denominator();
    let scaled;
    let vector = if columns.iter().all(|c| denominator(c) == 1) {
        vector
    } else {
        // Columns of non-integer formulas count `denominator` formula units each.
        scaled = primitive(
            vector
                .iter()
                .zip(columns)
                .map(|(x, c)| x * BigInt::from(denominator(c)))
                .collect(),
        );
        &scaled
    };
    // Columns are distinct species by construction (a repeated one is refused before).
    Reaction::from_distinct_species(
        vector
            .iter()
            .zip(columns)
            .filter(|(x, _)| !x.is_zero())
            .map(|(x, c)| (c.species.clone(), BigRational::from_integer(x.clone()))),
    )
}

/// Whether some balance exists in which every user species takes part, judged from a null
/// space basis (used only to find what to blame; it depends on the span only, not on the
/// basis chosen).
fn all_user_species_can_take_part(basis: &[Vec<BigInt>], sides: &[i8]) -> bool {
    !basis.is_empty()
        && sides
            .iter()
            .enumerate()
            .filter(|(_, side)| **side != 0)
            .all(|(i, _)| basis.iter().any(|v| !v[i].is_zero()))
}

/// The one conservation row without which every user species could take part. The charge is
/// tried first (a missing `e-` is the usual cause), and a row whose removal leaves a balance
/// with every species on its written side beats one that only lets every species take part.
/// The null spaces without each row come from one elimination
/// ([`matrix::null_spaces_without_each_row`]), not one per row.
fn blame(
    matrix: &IntegerMatrix,
    rows: &[Conserved],
    sides: &[i8],
    meter: &mut WorkMeter,
) -> Result<Option<Conserved>, WorkLimitReached> {
    let mut relaxed: Vec<(usize, Vec<Vec<BigInt>>)> =
        matrix::null_spaces_without_each_row(matrix, meter)?
            .into_iter()
            .enumerate()
            .collect();
    // Stable: the charge first, then the elements in order of first appearance.
    relaxed.sort_by_key(|(r, _)| rows[*r] != Conserved::Charge);
    let keeps_sides = |basis: &Vec<Vec<BigInt>>| {
        basis.len() == 1 && all_user_species_can_take_part(basis, sides) && {
            let mut vector = basis[0].clone();
            orient(&mut vector, sides);
            vector
                .iter()
                .zip(sides)
                .all(|(x, &side)| side == 0 || sign(x) == side)
        }
    };
    Ok(relaxed
        .iter()
        .find(|(_, basis)| keeps_sides(basis))
        .or_else(|| {
            relaxed
                .iter()
                .find(|(_, basis)| all_user_species_can_take_part(basis, sides))
        })
        .map(|(r, _)| rows[*r]))
}

/// How well a reaction respects the written sides, from the signs of its entries: species on
/// their side count for it, species on the wrong side count twice against it.
fn side_score(signs: impl Iterator<Item = i8>, sides: &[i8]) -> i64 {
    signs
        .zip(sides)
        .filter(|(s, side)| **side != 0 && *s != 0)
        .map(|(s, &side)| if s == side { 1 } else { -2 })
        .sum()
}

/// The signs of a vector held in `i64`.
fn signs_of(vector: &[i64]) -> Sides {
    vector.iter().map(|x| x.signum() as i8).collect()
}

fn primitive(vector: Vec<BigInt>) -> Vec<BigInt> {
    if let Some(content) = machine_content(&vector) {
        if content <= 1 {
            return vector;
        }
        let content = BigInt::from(content);
        return vector.into_iter().map(|x| x / &content).collect();
    }
    let content = vector
        .iter()
        .fold(BigInt::zero(), |g, x| num_integer::Integer::gcd(&g, x));
    if content.is_zero() {
        return vector;
    }
    vector.into_iter().map(|x| x / &content).collect()
}

/// The gcd of the entries in machine words when every entry fits `u64` in magnitude (the big
/// integer gcd shifts and subtracts word by word, many times slower).
fn machine_content(vector: &[BigInt]) -> Option<u64> {
    let mut content = 0u64;
    for x in vector {
        let magnitude = u64::try_from(x.magnitude()).ok()?;
        if content != 1 {
            content = num_integer::Integer::gcd(&content, &magnitude);
        }
    }
    Some(content)
}

/// Candidates `a·vᵢ + b·vⱼ` tried for each pair by [`prefer_written_sides`]: `1 ≤ a ≤ MAX_A`,
/// `|b| ≤ MAX_B`.
const MAX_A: i64 = 4;
const MAX_B: i64 = 8;
const CANDIDATES_PER_PAIR: u64 = (MAX_A * (2 * MAX_B + 1)) as u64;

/// The largest magnitude of a primitive vector, ordered by value: `Small` holds every value that
/// fits `u128`, `Big` only larger ones, so the derived order is the order of the values.
#[derive(Clone, Debug, PartialEq, Eq, PartialOrd, Ord)]
enum Magnitude {
    Small(u128),
    Big(BigInt),
}

impl Magnitude {
    fn of(vector: &[BigInt]) -> Magnitude {
        let largest = max_magnitude(vector);
        match u128::try_from(&largest) {
            Ok(small) => Magnitude::Small(small),
            Err(_) => Magnitude::Big(largest),
        }
    }
}

/// How [`prefer_written_sides`] ranks a candidate: the side score, then the smaller largest
/// coefficient.
type Key = (i64, std::cmp::Reverse<Magnitude>);

/// A basis vector in `i64` when every entry is below 2⁵⁸ in magnitude, so that
/// `a·x + b·y` with `|a| ≤ 4`, `|b| ≤ 8` cannot overflow.
fn fixed_width(vector: &[BigInt]) -> Option<Vec<i64>> {
    vector
        .iter()
        .map(|x| (x.bits() < 58).then(|| i64::try_from(x).ok()).flatten())
        .collect()
}

/// The key of `a·x + b·y` after [`orient`] and [`primitive`] when it beats `best` (`None`
/// otherwise), computed in fixed width without building the vector. The orientation is read
/// from the signs alone, and the largest magnitude (which needs the content) only when the
/// side score can still win: most candidates lose on the score. `user` holds the entries of
/// the user's species, `(x, y, side)`, in column order, and `(same, different)` how many of
/// them the candidate puts on their written side and across the arrow ([`side_counts`]).
fn fixed_width_key(
    x: &[i64],
    y: &[i64],
    user: &[(i64, i64, i8)],
    (a, b): (i64, i64),
    (same, different): (i64, i64),
    best: &Key,
) -> Option<Key> {
    // As in `orient`: flipped when more species sit on the wrong side, or on a tie when the
    // first one with a nonzero entry does; flipping swaps the two counts.
    let flipped = same < different
        || (same == different
            && user
                .iter()
                .map(|&(x, y, side)| (a * x + b * y).signum() as i8 * side)
                .find(|&agreement| agreement != 0)
                .is_some_and(|agreement| agreement < 0));
    let (same, different) = if flipped {
        (different, same)
    } else {
        (same, different)
    };
    let score = same - 2 * different;
    if score < best.0 {
        return None;
    }
    let (mut largest, mut smallest) = (0u64, u64::MAX);
    for (&x, &y) in x.iter().zip(y) {
        let magnitude = (a * x + b * y).unsigned_abs();
        largest = largest.max(magnitude);
        if magnitude != 0 {
            smallest = smallest.min(magnitude);
        }
    }
    // On an equal score the candidate wins only with a smaller primitive largest entry,
    // largest / content < best, that is content > largest / best. The content divides every
    // entry, so it is at most the smallest nonzero one: when even that is not enough, no gcd
    // is needed. Otherwise the content (a gcd over the vector) can only fall as entries are
    // added, and the search stops as soon as it is down to the bound.
    let at_most = match best.1.0 {
        // A u64 division where the best fits one (a u128 one is a library call).
        Magnitude::Small(best_largest) if score == best.0 => match u64::try_from(best_largest) {
            Ok(best_largest) => largest / best_largest.max(1),
            Err(_) => 0,
        },
        _ => 0,
    };
    if smallest <= at_most {
        return None;
    }
    let mut content = 0u64;
    for (&x, &y) in x.iter().zip(y) {
        let magnitude = (a * x + b * y).unsigned_abs();
        content = num_integer::Integer::gcd(&content, &magnitude);
        if content != 0 && content <= at_most {
            return None;
        }
        // Once the content is 1 it stays 1.
        if content == 1 {
            break;
        }
    }
    let largest = largest.checked_div(content).unwrap_or(0);
    let key = (
        score,
        std::cmp::Reverse(Magnitude::Small(u128::from(largest))),
    );
    (key > *best).then_some(key)
}

/// `a·x + b·y`, oriented and primitive, in `i64` (no entry reaches 2⁶² for vectors below 2⁵⁸).
fn fixed_width_combination(x: &[i64], y: &[i64], a: i64, b: i64, sides: &[i8]) -> Vec<i64> {
    let mut vector: Vec<i64> = x.iter().zip(y).map(|(&x, &y)| a * x + b * y).collect();
    orient_fixed(&mut vector, sides);
    let content = vector
        .iter()
        .fold(0u64, |g, x| {
            num_integer::Integer::gcd(&g, &x.unsigned_abs())
        })
        .max(1) as i64;
    for x in vector.iter_mut() {
        *x /= content;
    }
    vector
}

/// [`orient`] for a vector in `i64`.
fn orient_fixed(vector: &mut [i64], sides: &[i8]) {
    if flip_wanted(&signs_of(vector), sides) {
        for x in vector.iter_mut() {
            *x = -*x;
        }
    }
}

/// Entries below this magnitude let [`fixed_width_key`] combine two vectors in `i64`.
const FIXED_WIDTH_BOUND: u64 = 1 << 58;

/// [`prefer_written_sides`] for a basis held in `i64` (what the stack path gives): the same
/// candidates, keys, choices and work as the fixed-width scoring there, with no big integer
/// anywhere. `None`, with the basis and the meter untouched, when a vector reaches 2⁵⁸
/// (the caller then takes the general path).
fn prefer_written_sides_fixed(
    basis: &mut [Vec<i64>],
    sides: &[i8],
    meter: &mut WorkMeter,
) -> Option<()> {
    let fits = |v: &[i64]| v.iter().all(|x| x.unsigned_abs() < FIXED_WIDTH_BOUND);
    if !basis.iter().all(|v| fits(v)) {
        return None;
    }
    let mut trial = *meter;
    let mut work = basis.to_vec();
    for i in 0..work.len() {
        let mut best_key = fixed_key(&work[i], sides);
        let mut best: Option<Vec<i64>> = None;
        for j in (0..work.len()).filter(|&j| j != i) {
            let (x, y) = (&work[i], &work[j]);
            // Two products and a sum per entry and candidate.
            let per_candidate = 3 * x.len() as u64;
            if trial.charge(per_candidate * CANDIDATES_PER_PAIR).is_err() {
                break;
            }
            if let Some((a, b)) = best_candidate(x, y, sides, &mut best_key) {
                best = Some(fixed_width_combination(x, y, a, b, sides));
            }
        }
        if let Some(best) = best {
            if !fits(&best) {
                return None;
            }
            work[i] = best;
        }
        if trial.used() > trial.limit() {
            break;
        }
    }
    basis.clone_from_slice(&work);
    *meter = trial;
    Some(())
}

/// The [`Key`] of a vector held in `i64`.
fn fixed_key(vector: &[i64], sides: &[i8]) -> Key {
    (
        side_score(vector.iter().map(|x| x.signum() as i8), sides),
        std::cmp::Reverse(Magnitude::Small(u128::from(
            vector.iter().map(|v| v.unsigned_abs()).max().unwrap_or(0),
        ))),
    )
}

/// The first `(a, b)` whose candidate beats `best` (raised as better ones are found), in the
/// order `a`, `b`.
fn best_candidate(x: &[i64], y: &[i64], sides: &[i8], best: &mut Key) -> Option<(i64, i64)> {
    let user: SmallVec<[(i64, i64, i8); small::MAX_COLUMNS]> = x
        .iter()
        .zip(y)
        .zip(sides)
        .filter(|(_, side)| **side != 0)
        .map(|((&x, &y), &side)| (x, y, side))
        .collect();
    let mut winner = None;
    for a in 1..=MAX_A {
        let (same, different) = side_counts(&user, a);
        for (b, (&same, &different)) in (-MAX_B..=MAX_B).zip(same.iter().zip(&different)) {
            let counts = (i64::from(same), i64::from(different));
            // The score in the better orientation bounds the candidate's: most lose here,
            // without a call.
            if (counts.0 - 2 * counts.1).max(counts.1 - 2 * counts.0) < best.0 {
                continue;
            }
            if let Some(key) = fixed_width_key(x, y, &user, (a, b), counts, best) {
                *best = key;
                winner = Some((a, b));
            }
        }
    }
    winner
}

/// Candidates per value of `a`: `b` from −MAX_B to MAX_B.
const B_VALUES: usize = (2 * MAX_B + 1) as usize;

/// For every `b` (index `b + MAX_B`), how many user species `a·x + b·y` puts on their written
/// side and how many across the arrow, before any flip. Each entry's value is linear in `b`,
/// so its sign changes at most once, at `b = −a·x/y`: the entry adds to a range of `b` on
/// each side of that point, kept in difference arrays. A pass over the entries and one over
/// the 17 values of `b`, instead of one over the entries for every `b`.
fn side_counts(user: &[(i64, i64, i8)], a: i64) -> ([i32; B_VALUES], [i32; B_VALUES]) {
    // Ranges of b, inclusive; empty when low > high.
    let floor = |n: i64, d: i64| n.div_euclid(d);
    let ceil = |n: i64, d: i64| -(-n).div_euclid(d);
    let mut same = [0i32; B_VALUES + 1];
    let mut different = [0i32; B_VALUES + 1];
    let add = |counts: &mut [i32; B_VALUES + 1], (low, high): (i64, i64)| {
        let (low, high) = (low.max(-MAX_B), high.min(MAX_B));
        if low <= high {
            counts[(low + MAX_B) as usize] += 1;
            counts[(high + MAX_B + 1) as usize] -= 1;
        }
    };
    const NONE: (i64, i64) = (1, 0);
    const ALL: (i64, i64) = (-MAX_B, MAX_B);
    for &(x, y, side) in user {
        // value(b) = b·y − c with c = −a·x.
        let c = -a * x;
        let (positive, negative) = match y.signum() {
            0 => match c.signum() {
                -1 => (ALL, NONE),
                1 => (NONE, ALL),
                _ => (NONE, NONE),
            },
            // b·y > c ⟺ b > c/y; b·y < c ⟺ b < c/y.
            1 => ((floor(c, y) + 1, MAX_B), (-MAX_B, ceil(c, y) - 1)),
            // Dividing by y < 0 turns the inequalities round: c/y = (−c)/(−y).
            _ => ((-MAX_B, ceil(-c, -y) - 1), (floor(-c, -y) + 1, MAX_B)),
        };
        let (agrees, disagrees) = if side > 0 {
            (positive, negative)
        } else {
            (negative, positive)
        };
        add(&mut same, agrees);
        add(&mut different, disagrees);
    }
    let mut totals = ([0i32; B_VALUES], [0i32; B_VALUES]);
    let (mut running_same, mut running_different) = (0, 0);
    for i in 0..B_VALUES {
        running_same += same[i];
        running_different += different[i];
        totals.0[i] = running_same;
        totals.1[i] = running_different;
    }
    totals
}

/// Rewrites a null-space basis so that each vector keeps as many user species on their written
/// side as small combinations `a·vᵢ + b·vⱼ` (a ≠ 0, so the span is unchanged) allow: a chemist
/// reads "these reactions, in any positive mix" far more easily than vectors with species
/// thrown across the arrow. The rewriting is cosmetic, so a spent meter ends it early (the
/// basis stays a basis of the same family) instead of failing the balance.
///
/// Candidates are ranked by [`Key`], in the order `j`, `a`, `b`, the first best one kept.
/// When both vectors fit fixed width ([`fixed_width`]) a candidate is scored on the signs of
/// its entries without being built, and only each row's winner is made into big integers;
/// otherwise every candidate is built in big integers. Both give the same ranking.
fn prefer_written_sides(basis: &mut [Vec<BigInt>], sides: &[i8], meter: &mut WorkMeter) {
    prefer_written_sides_in(basis, sides, meter, Width::FixedWhenItFits)
}

/// Whether [`prefer_written_sides`] may score in fixed width (the tests compare both).
#[derive(Clone, Copy, PartialEq, Eq)]
enum Width {
    FixedWhenItFits,
    #[cfg(test)]
    BigOnly,
}

fn prefer_written_sides_in(
    basis: &mut [Vec<BigInt>],
    sides: &[i8],
    meter: &mut WorkMeter,
    width: Width,
) {
    let mirror = |v: &Vec<BigInt>| match width {
        Width::FixedWhenItFits => fixed_width(v),
        #[cfg(test)]
        Width::BigOnly => None,
    };
    let mut fixed: Vec<Option<Vec<i64>>> = basis.iter().map(mirror).collect();
    for i in 0..basis.len() {
        let mut best_key: Key = match &fixed[i] {
            Some(x) => fixed_key(x, sides),
            None => (
                side_score(basis[i].iter().map(sign), sides),
                std::cmp::Reverse(Magnitude::of(&basis[i])),
            ),
        };
        let mut best: Option<Vec<BigInt>> = None;
        for j in (0..basis.len()).filter(|&j| j != i) {
            if let (Some(x), Some(y)) = (&fixed[i], &fixed[j]) {
                // Two products and a sum per entry and candidate.
                let per_candidate = 3 * x.len() as u64;
                if meter.charge(per_candidate * CANDIDATES_PER_PAIR).is_err() {
                    break;
                }
                if let Some((a, b)) = best_candidate(x, y, sides, &mut best_key) {
                    best = Some(
                        fixed_width_combination(x, y, a, b, sides)
                            .into_iter()
                            .map(BigInt::from)
                            .collect(),
                    );
                }
                continue;
            }
            // Each candidate: a combination, an orientation, and a gcd and a division over the
            // vector (quadratic in the words of each entry, plus an allocation per entry).
            let per_candidate: u64 = basis[i]
                .iter()
                .zip(&basis[j])
                .map(|(x, y)| {
                    let words = x.bits().max(y.bits()) / 64 + 2;
                    8 * words * words
                })
                .sum();
            if meter.charge(per_candidate * CANDIDATES_PER_PAIR).is_err() {
                break;
            }
            for a in 1..=MAX_A {
                for b in -MAX_B..=MAX_B {
                    let mut candidate: Vec<BigInt> = basis[i]
                        .iter()
                        .zip(&basis[j])
                        .map(|(x, y)| x * a + y * b)
                        .collect();
                    orient(&mut candidate, sides);
                    let candidate = primitive(candidate);
                    let key = (
                        side_score(candidate.iter().map(sign), sides),
                        std::cmp::Reverse(Magnitude::of(&candidate)),
                    );
                    if key > best_key {
                        best = Some(candidate);
                        best_key = key;
                    }
                }
            }
        }
        if let Some(best) = best {
            fixed[i] = mirror(&best);
            basis[i] = best;
        }
        if meter.used() > meter.limit() {
            return;
        }
    }
}

fn max_magnitude(vector: &[BigInt]) -> BigInt {
    vector.iter().map(|x| x.abs()).max().unwrap_or_default()
}

fn solve(
    written: &[(&Species, i8)],
    medium: Medium,
    add_electrons: bool,
    meter: &mut WorkMeter,
) -> Result<Reaction, Failure> {
    let columns = columns(written, medium, add_electrons);
    let sides: Sides = columns.iter().map(|c| c.side).collect();
    let mut basis = match small::null_space(&columns, meter) {
        Some(space) if space.dimension() == 1 => {
            return solve_line(space.vector(0), &columns, &sides, written);
        }
        Some(space) if space.dimension() >= 2 => {
            let basis = (0..space.dimension())
                .map(|i| space.vector(i).to_vec())
                .collect();
            return solve_plane(basis, &columns, sides, meter);
        }
        Some(_) => Vec::new(),
        None => matrix::null_space_within(&conservation_matrix(&columns).0, meter)?,
    };
    let never_taking_part: Vec<Species> = columns
        .iter()
        .enumerate()
        .filter(|(i, c)| c.side != 0 && basis.iter().all(|v| v[*i].is_zero()))
        .map(|(_, c)| c.species.clone())
        .collect();
    if basis.is_empty() || !never_taking_part.is_empty() {
        // With no balance at all, no species is singled out.
        let never_taking_part = if basis.is_empty() {
            Vec::new()
        } else {
            never_taking_part
        };
        return Err(unexplained(never_taking_part, &columns, &sides));
    }
    for vector in basis.iter_mut() {
        orient(vector, &sides);
    }
    if basis.len() >= 2 {
        prefer_written_sides(&mut basis, &sides, meter);
        return Err(BalanceError::NotUnique {
            basis: basis.iter().map(|v| reaction_of(v, &columns)).collect(),
        }
        .into());
    }
    let vector = &basis[0];
    let signs: Vec<i8> = vector.iter().map(sign).collect();
    finish(&signs, reaction_of(vector, &columns), &columns, written)
}

/// The end of [`solve`] for two or more independent balances found on the stack: the same
/// decisions as the general tail, in `i64` until the reactions are written.
fn solve_plane(
    mut basis: Vec<Vec<i64>>,
    columns: &[Column],
    sides: Sides,
    meter: &mut WorkMeter,
) -> Result<Reaction, Failure> {
    let never_taking_part: Vec<Species> = columns
        .iter()
        .enumerate()
        .filter(|(i, c)| c.side != 0 && basis.iter().all(|v| v[*i] == 0))
        .map(|(_, c)| c.species.clone())
        .collect();
    if !never_taking_part.is_empty() {
        return Err(unexplained(never_taking_part, columns, &sides));
    }
    for vector in basis.iter_mut() {
        orient_fixed(vector, &sides);
    }
    let big = |basis: &[Vec<i64>]| -> Vec<Vec<BigInt>> {
        basis
            .iter()
            .map(|v| v.iter().map(|&x| BigInt::from(x)).collect())
            .collect()
    };
    let basis = match prefer_written_sides_fixed(&mut basis, &sides, meter) {
        Some(()) => big(&basis),
        None => {
            let mut wide = big(&basis);
            prefer_written_sides(&mut wide, &sides, meter);
            wide
        }
    };
    Err(BalanceError::NotUnique {
        basis: basis.iter().map(|v| reaction_of(v, columns)).collect(),
    }
    .into())
}

/// A failed solve, with what [`Failure::explain`] needs to find the row to blame.
fn unexplained(never_taking_part: Vec<Species>, columns: &[Column], sides: &[i8]) -> Failure {
    let (matrix, rows) = conservation_matrix(columns);
    Failure::Unexplained(Unexplained {
        never_taking_part,
        matrix,
        rows,
        sides: sides.to_vec(),
    })
}

/// The end of [`solve`] for the usual one-line null space found on the stack
/// ([`small::null_space`]): the same decisions on the same vector, in `i64`.
fn solve_line(
    line: &[i64],
    columns: &[Column],
    sides: &[i8],
    written: &[(&Species, i8)],
) -> Result<Reaction, Failure> {
    let mut signs = signs_of(line);
    if signs
        .iter()
        .zip(sides)
        .any(|(&s, &side)| side != 0 && s == 0)
    {
        let never_taking_part = columns
            .iter()
            .zip(signs.iter())
            .filter(|(c, s)| c.side != 0 && **s == 0)
            .map(|(c, _)| c.species.clone())
            .collect();
        return Err(unexplained(never_taking_part, columns, sides));
    }
    let flip = flip_wanted(&signs, sides);
    if flip {
        for s in signs.iter_mut() {
            *s = -*s;
        }
    }
    let oriented = |x: i64| if flip { -x } else { x };
    let reaction = if columns.iter().all(|c| c.species.composition.is_integral()) {
        Reaction::from_distinct_species(line.iter().zip(columns).filter(|(x, _)| **x != 0).map(
            |(&x, c)| {
                (
                    c.species.clone(),
                    BigRational::from_integer(BigInt::from(oriented(x))),
                )
            },
        ))
    } else {
        let vector: Vec<BigInt> = line.iter().map(|&x| BigInt::from(oriented(x))).collect();
        reaction_of(&vector, columns)
    };
    finish(&signs, reaction, columns, written)
}

/// The user's species on their written sides (or the error naming those that are not), then
/// the independent recount. `signs` are those of the oriented vector behind `reaction`.
fn finish(
    signs: &[i8],
    reaction: Reaction,
    columns: &[Column],
    written: &[(&Species, i8)],
) -> Result<Reaction, Failure> {
    if signs
        .iter()
        .zip(columns)
        .any(|(&s, c)| c.side != 0 && s != c.side)
    {
        let wrong_side = signs
            .iter()
            .zip(columns)
            .filter(|(s, c)| c.side != 0 && **s != c.side)
            .map(|(_, c)| c.species.clone())
            .collect();
        return Err(BalanceError::Impossible(Impossible::WrongSide {
            species: wrong_side,
            moved: reaction,
        })
        .into());
    }
    self_check(&reaction, written)?;
    Ok(reaction)
}

/// The independent recount, and the user's species on their written sides with integer
/// coefficients, checked on the finished reaction (lowest terms hold by construction: the null
/// vector is primitive, and the tests check it).
fn self_check(reaction: &Reaction, written: &[(&Species, i8)]) -> Result<(), BalanceError> {
    let internal = || Err(BalanceError::Internal(reaction.to_string()));
    if !conserves(reaction) {
        return internal();
    }
    let entries = reaction.entries();
    for (i, &(species, side)) in written.iter().enumerate() {
        // The user's species come first, in order, so the lookup usually ends at once.
        let Some(entry) = entries
            .get(i)
            .filter(|e| same_species(&e.species, species))
            .or_else(|| entries.iter().find(|e| same_species(&e.species, species)))
        else {
            return internal();
        };
        if sign(entry.nu.numer()) != side || !entry.nu.is_integer() {
            return internal();
        }
    }
    Ok(())
}

/// Whether every element and the charge are conserved, recounted from the species'
/// compositions and the reaction's coefficients alone. Whole coefficients of whole-number
/// formulas are summed in `i128` while no sum overflows, then in big integers (a balanced
/// reaction's coefficients can exceed any machine word); anything else takes the rational
/// recount of [`Reaction::imbalance`]. Integers need no normalising at each step, which is
/// what makes the rational recount slow for large coefficients.
fn conserves(reaction: &Reaction) -> bool {
    let entries = reaction.entries();
    let integral = entries
        .iter()
        .all(|e| e.nu.is_integer() && e.species.composition.is_integral());
    if !integral {
        return reaction.imbalance().is_balanced();
    }
    if let Some(balanced) = conserves_in_i128(reaction) {
        return balanced;
    }
    let mut totals: Vec<(Option<Element>, BigInt)> = vec![(None, BigInt::zero())];
    for entry in entries {
        let nu = entry.nu.numer();
        totals[0].1 += nu * entry.species.charge();
        for &(element, count) in entry.species.composition.counts() {
            let change = nu * count;
            match totals.iter_mut().find(|(e, _)| *e == Some(element)) {
                Some((_, total)) => *total += change,
                None => totals.push((Some(element), change)),
            }
        }
    }
    totals.iter().all(|(_, total)| total.is_zero())
}

/// The recount of [`conserves`] in `i128` for whole coefficients; `None` when a coefficient
/// or a sum does not fit. Up to 32 elements are counted on the stack.
fn conserves_in_i128(reaction: &Reaction) -> Option<bool> {
    const STACK: usize = 32;
    let mut elements = [None::<Element>; STACK];
    let mut totals = [0i128; STACK];
    let mut used = 0;
    let mut charge: i128 = 0;
    for entry in reaction.entries() {
        let nu = i128::try_from(entry.nu.numer()).ok()?;
        charge = charge.checked_add(nu.checked_mul(i128::from(entry.species.charge()))?)?;
        for &(element, count) in entry.species.composition.counts() {
            let change = nu.checked_mul(i128::from(count))?;
            let slot = match elements[..used].iter().position(|e| *e == Some(element)) {
                Some(slot) => slot,
                None if used < STACK => {
                    elements[used] = Some(element);
                    used += 1;
                    used - 1
                }
                None => return None,
            };
            totals[slot] = totals[slot].checked_add(change)?;
        }
    }
    Some(charge == 0 && totals[..used].iter().all(|&t| t == 0))
}

#[cfg(test)]
mod tests {
    use super::*;
    use matrix::RowEchelon;

    /// The null space of a written equation as `solve` hands it to [`prefer_written_sides`]
    /// (oriented), with the sides of its columns.
    fn oriented_basis(text: &str) -> (Vec<Vec<BigInt>>, Vec<i8>) {
        let equation = parse_equation(text).unwrap();
        let written = written_species(&equation);
        let columns = columns(&written, Medium::None, false);
        let sides: Vec<i8> = columns.iter().map(|c| c.side).collect();
        let (matrix, _) = conservation_matrix(&columns);
        let mut basis = RowEchelon::new(&matrix).null_space();
        for vector in basis.iter_mut() {
            orient(vector, &sides);
        }
        (basis, sides)
    }

    /// The difference-array counts are the signs counted one candidate at a time.
    #[test]
    fn side_counts_are_the_counted_signs() {
        let mut seed: u64 = 99;
        let mut next = |range: i64| {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((seed >> 33) as i64).rem_euclid(2 * range + 1) - range
        };
        for round in 0..2000 {
            let range = if round % 2 == 0 { 12 } else { 1 << 40 };
            let user: Vec<(i64, i64, i8)> = (0..1 + round % 9)
                .map(|_| {
                    let side = if next(1) >= 0 { 1 } else { -1 };
                    // Zeros are common in null vectors: make them common here too.
                    let pick = |v: i64| if v % 3 == 0 { 0 } else { v };
                    (pick(next(range)), pick(next(range)), side)
                })
                .collect();
            for a in 1..=MAX_A {
                let (same, different) = side_counts(&user, a);
                for (i, b) in (-MAX_B..=MAX_B).enumerate() {
                    let agreements = user
                        .iter()
                        .map(|&(x, y, side)| (a * x + b * y).signum() as i8 * side);
                    let expected_same = agreements.clone().filter(|&g| g > 0).count() as i32;
                    let expected_different = agreements.filter(|&g| g < 0).count() as i32;
                    assert_eq!(
                        (same[i], different[i]),
                        (expected_same, expected_different),
                        "{user:?}, a = {a}, b = {b}"
                    );
                }
            }
        }
    }

    #[test]
    fn fixed_width_scoring_chooses_what_big_integers_choose() {
        // m alkanes burned together (a family of dimension m), corpus nonunique-16 and the
        // iron oxides; then a basis with entries past 2^58, where only big integers apply.
        let mut texts: Vec<String> = (2..=7)
            .map(|m| {
                let fuels: Vec<String> = (1..=m).map(|n| format!("C{n}H{}", 2 * n + 2)).collect();
                format!("{} + O2 -> CO2 + H2O", fuels.join(" + "))
            })
            .collect();
        texts.push("C + O2 + H2 -> CO + CO2 + H2O".to_owned());
        texts.push("Fe + O2 + Fe2O3 -> FeO + Fe3O4".to_owned());
        for text in &texts {
            let (basis, sides) = oriented_basis(text);
            assert!(basis.len() >= 2, "{text}");
            let mut fixed = basis.clone();
            let mut big = basis.clone();
            let (mut fixed_meter, mut big_meter) =
                (WorkMeter::new(u64::MAX), WorkMeter::new(u64::MAX));
            prefer_written_sides_in(&mut fixed, &sides, &mut fixed_meter, Width::FixedWhenItFits);
            prefer_written_sides_in(&mut big, &sides, &mut big_meter, Width::BigOnly);
            assert_eq!(fixed, big, "{text}");
            assert!(fixed_meter.used() < big_meter.used(), "{text}");
            // The stack path's own search, all in i64, chooses the same and charges the same.
            let mut machine: Vec<Vec<i64>> = basis
                .iter()
                .map(|v| v.iter().map(|x| i64::try_from(x).unwrap()).collect())
                .collect();
            let mut machine_meter = WorkMeter::new(u64::MAX);
            prefer_written_sides_fixed(&mut machine, &sides, &mut machine_meter).unwrap();
            let machine: Vec<Vec<BigInt>> = machine
                .iter()
                .map(|v| v.iter().map(|&x| BigInt::from(x)).collect())
                .collect();
            assert_eq!(machine, big, "{text}");
            assert_eq!(machine_meter.used(), fixed_meter.used(), "{text}");
        }
        // Entries of 2^125 (past 2^58) leave the fixed width; the answer is the big-integer one.
        let huge = BigInt::from(1) << 125usize;
        let basis = vec![
            vec![
                huge.clone(),
                BigInt::from(-3),
                BigInt::from(1),
                BigInt::from(0),
            ],
            vec![
                BigInt::from(2),
                BigInt::from(5),
                BigInt::from(0),
                BigInt::from(1),
            ],
        ];
        assert!(fixed_width(&basis[0]).is_none());
        let sides = [-1, -1, 1, 1];
        let (mut a, mut b) = (basis.clone(), basis);
        prefer_written_sides_in(
            &mut a,
            &sides,
            &mut WorkMeter::new(u64::MAX),
            Width::FixedWhenItFits,
        );
        prefer_written_sides_in(
            &mut b,
            &sides,
            &mut WorkMeter::new(u64::MAX),
            Width::BigOnly,
        );
        assert_eq!(a, b);
    }
}

//! Chemical notation: the typed values that the parser returns and the displays write.
//!
//! Text flows one way: [`parse_input`] turns what a chemist types into [`Species`],
//! [`Equation`] and [`Formula`] values that carry byte [`Span`]s into the input;
//! [`species_to_string`] and [`equation_to_string`] write them back as canonical ASCII (which
//! the parser reads again), Unicode, or LaTeX for the mhchem `\ce{}` macro. Element counts and charge are computed once, when a
//! species is read, with checked arithmetic.

mod display;
mod error;
mod parse;

pub(crate) use display::write_species;
pub use display::{Style, equation_to_string, species_to_string};
pub use error::{NotationError, NotationErrorKind, render_caret};
pub use parse::{
    Input, LIGAND_ABBREVIATIONS, LIMITS, Limits, parse_equation, parse_input, parse_species,
};

use crate::composition::Composition;
use crate::elements::Element;
use num_rational::Ratio;
use smallvec::SmallVec;
use std::fmt;
use std::hash::{Hash, Hasher};
use std::str::FromStr;
use std::sync::Arc;

/// A byte range into the text a value was read from.
///
/// Spans never take part in equality or hashing: two values read from different text are
/// equal when they say the same thing (the same choice syn makes for its syntax trees).
#[derive(Clone, Copy, Debug, Default)]
pub struct Span {
    /// First byte.
    pub start: usize,
    /// One past the last byte.
    pub end: usize,
}

impl Span {
    /// A span from `start` to `end` (bytes).
    pub fn new(start: usize, end: usize) -> Span {
        Span { start, end }
    }
}

impl PartialEq for Span {
    fn eq(&self, _: &Span) -> bool {
        true
    }
}
impl Eq for Span {}
impl Hash for Span {
    fn hash<H: Hasher>(&self, _: &mut H) {}
}

/// Round `()` or square `[]` brackets around a group.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Bracket {
    /// `( … )`
    Round,
    /// `[ … ]`
    Square,
}

/// A subscript: a whole number, or an exact decimal for non-integer stoichiometry (`0.8` in
/// `LiNi0.8Mn0.1Co0.1O2`, kept as the rational 4/5).
pub type Count = Ratio<u64>;

/// One piece of a formula body: an element with its count, or a bracketed group with its count.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub enum Unit {
    /// `O4` in `SO4`.
    Atom {
        /// The element (or isotope label).
        element: Element,
        /// The subscript, 1 when none was written.
        count: Count,
        /// Where it was read.
        span: Span,
    },
    /// `(OH)2` in `Zn(OH)2`.
    Group {
        /// Which brackets.
        bracket: Bracket,
        /// What is inside.
        body: Vec<Unit>,
        /// The subscript after the closing bracket, 1 when none was written.
        count: Count,
        /// The ligand abbreviation the group was written as (`en` in `[Co(en)3]^3+`), whose
        /// atoms `body` holds; `None` for a group written out.
        abbreviation: Option<&'static str>,
        /// Where it was read, brackets and count included.
        span: Span,
    },
}

/// One component of a formula: the main body, or an adduct after `·` (`5H2O` in `CuSO4·5H2O`).
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct Component {
    /// How many times the body occurs (1 for the main body).
    pub multiplier: u32,
    /// The element and group units.
    pub body: Vec<Unit>,
}

/// The components of a formula: almost always one, which then lives inline.
pub type Components = SmallVec<[Component; 1]>;

/// A formula with its charge: `SO4^2-`, `CuSO4·5H2O`, `[Fe(CN)6]4-`.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct Formula {
    /// The main body first, then adducts in the order written.
    pub components: Components,
    /// Net charge in elementary charges.
    pub charge: i32,
}

/// Phase or state label written after a species.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum State {
    /// `(s)`
    Solid,
    /// `(l)`
    Liquid,
    /// `(g)`
    Gas,
    /// `(aq)`
    Aqueous,
    /// `(cr)`
    Crystal,
}

impl State {
    /// The label as written between the brackets: `s`, `l`, `g`, `aq`, `cr`.
    pub fn label(self) -> &'static str {
        match self {
            State::Solid => "s",
            State::Liquid => "l",
            State::Gas => "g",
            State::Aqueous => "aq",
            State::Crystal => "cr",
        }
    }

    /// Reads a label (without brackets).
    pub fn from_label(label: &str) -> Option<State> {
        Some(match label {
            "s" => State::Solid,
            "l" => State::Liquid,
            "g" => State::Gas,
            "aq" => State::Aqueous,
            "cr" => State::Crystal,
            _ => return None,
        })
    }

    /// True for solids and crystals.
    pub fn is_condensed_solid(self) -> bool {
        matches!(self, State::Solid | State::Crystal)
    }
}

/// Which electrode compartment of a cell a species is in: written `(cathode)` or `(anode)` after
/// the state label. Only a concentration cell needs it, where the same couple sits on both
/// sides and the same ion must be told apart by where it is (`Cu2+(cathode)`, `Cu2+(anode)`).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Compartment {
    /// The compartment of the electrode where reduction happens.
    Cathode,
    /// The compartment of the electrode where oxidation happens.
    Anode,
}

impl Compartment {
    /// The label as written between the brackets: `cathode`, `anode`.
    pub fn label(self) -> &'static str {
        match self {
            Compartment::Cathode => "cathode",
            Compartment::Anode => "anode",
        }
    }

    /// Reads a label (without brackets).
    pub fn from_label(label: &str) -> Option<Compartment> {
        match label {
            "cathode" => Some(Compartment::Cathode),
            "anode" => Some(Compartment::Anode),
            _ => None,
        }
    }
}

/// What a species is: the electron, or a formula.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub enum SpeciesKind {
    /// `e-`
    Electron,
    /// Anything else. Shared: a species is cloned into every reaction it takes part in, and
    /// the formula never changes once read.
    Formula(Arc<Formula>),
}

/// A species as written: formula or electron, with an optional state label, and its
/// element counts and charge.
#[derive(Clone, Debug)]
pub struct Species {
    /// Electron or formula.
    pub kind: SpeciesKind,
    /// `(s)`, `(aq)`, … when written.
    pub state: Option<State>,
    /// `(cathode)` or `(anode)` when written (concentration cells).
    pub compartment: Option<Compartment>,
    /// Element counts and charge, computed when the species was read.
    pub composition: Composition,
    /// Where it was read.
    pub span: Span,
}

impl PartialEq for Species {
    fn eq(&self, other: &Species) -> bool {
        // The composition is derived from `kind`, so it need not be compared.
        self.kind == other.kind
            && self.state == other.state
            && self.compartment == other.compartment
    }
}
impl Eq for Species {}
impl Hash for Species {
    fn hash<H: Hasher>(&self, state: &mut H) {
        self.kind.hash(state);
        self.state.hash(state);
        self.compartment.hash(state);
    }
}

impl Species {
    /// True for `e-`.
    pub fn is_electron(&self) -> bool {
        matches!(self.kind, SpeciesKind::Electron)
    }

    /// Net charge.
    pub fn charge(&self) -> i64 {
        self.composition.charge()
    }

    /// The same species placed in a compartment of a cell.
    pub fn in_compartment(&self, compartment: Compartment) -> Species {
        Species {
            compartment: Some(compartment),
            ..self.clone()
        }
    }

    /// The same species with no state label, for comparing what a species *is* (the
    /// compartment, where written, stays: it says which species, not which phase).
    pub fn without_state(&self) -> Species {
        Species {
            state: None,
            ..self.clone()
        }
    }

    /// Canonical ASCII, the form the parser reads back.
    pub fn ascii(&self) -> String {
        species_to_string(self, Style::Ascii)
    }

    /// Unicode with sub- and superscripts, for terminals.
    pub fn unicode(&self) -> String {
        species_to_string(self, Style::Unicode)
    }

    /// The mhchem form, without the `\ce{}` wrapper.
    pub fn mhchem(&self) -> String {
        species_to_string(self, Style::Mhchem)
    }
}

impl FromStr for Species {
    type Err = NotationError;
    fn from_str(text: &str) -> Result<Species, NotationError> {
        parse_species(text)
    }
}

impl fmt::Display for Species {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.ascii())
    }
}

/// An exact, non-negative coefficient as written (`2`, `1/2`, `0.25`); 1 when none was written.
pub type Coefficient = Ratio<u64>;

/// A species with its coefficient, one term of an equation side.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct Term {
    /// As written; 1 when omitted.
    pub coefficient: Coefficient,
    /// The species.
    pub species: Species,
    /// Where the whole term was read.
    pub span: Span,
}

/// The arrow between the sides, as the user wrote it.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Arrow {
    /// `->` or `→`
    Forward,
    /// `=`
    Equals,
    /// `<->`, `<=>` or `⇌`
    Equilibrium,
}

impl Arrow {
    /// Canonical ASCII spelling.
    pub fn ascii(self) -> &'static str {
        match self {
            Arrow::Forward => "->",
            Arrow::Equals => "=",
            Arrow::Equilibrium => "<=>",
        }
    }
}

/// A chemical equation or half-reaction as written: two sides and an arrow.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct Equation {
    /// Left side.
    pub reactants: Vec<Term>,
    /// Right side.
    pub products: Vec<Term>,
    /// The arrow.
    pub arrow: Arrow,
}

impl Equation {
    /// True when an electron appears on either side.
    pub fn has_electrons(&self) -> bool {
        self.reactants
            .iter()
            .chain(&self.products)
            .any(|t| t.species.is_electron())
    }

    /// Canonical ASCII, the form the parser reads back.
    pub fn ascii(&self) -> String {
        equation_to_string(self, Style::Ascii)
    }

    /// Unicode with sub- and superscripts and a real arrow.
    pub fn unicode(&self) -> String {
        equation_to_string(self, Style::Unicode)
    }

    /// LaTeX for the mhchem package: `\ce{…}`.
    pub fn latex(&self) -> String {
        format!("\\ce{{{}}}", equation_to_string(self, Style::Mhchem))
    }
}

impl FromStr for Equation {
    type Err = NotationError;
    fn from_str(text: &str) -> Result<Equation, NotationError> {
        parse_equation(text)
    }
}

impl fmt::Display for Equation {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.ascii())
    }
}

//! Standard-potential tables: the built-in table and users' own, loaded into couples whose
//! half-reactions are parsed and checked, with lookup by id, by couple notation (`Ox/Red`),
//! by half-reaction, by element and by free text.
//!
//! Species in a query may be written in any notation the parser reads (`[Fe(CN)6]3-` finds
//! the table's `Fe(CN)6^3-`: species compare by formula unit, atoms and charge) or by the name
//! of a known ion (`ferricyanide/ferrocyanide`, `permanganate`), from the ion table. A query
//! that finds nothing gets suggestions: the couple written the right way round when it was
//! reversed, couples whose species differ only in charge or count, ids a typo away.
//!
//! Lookup never picks silently: where a query fits several couples (an acid and a base form,
//! say) it returns [`LookupError::Ambiguous`] with every candidate, and the caller asks the
//! user to choose.

pub mod record;

pub use record::{
    CoupleFile, CoupleRecord, Field, FileFormat, ProblemKind, PublishedRecord, ReadProblem,
    Uncuttable, csv_row_starts, toml_couple_starts,
};

use crate::elements::Element;
use crate::notation::{NotationError, Span, Species, parse_equation, parse_species, render_caret};
use crate::oxidation::IonTable;
use crate::reaction::{Reaction, same_species};
use num_rational::BigRational;
use num_traits::{Signed, ToPrimitive, Zero};
use std::fmt;
use std::path::PathBuf;
use std::sync::LazyLock;

/// The built-in table exactly as shipped (`data/potentials.toml`).
pub const BUILTIN_POTENTIALS_TOML: &str = include_str!("../../data/potentials.toml");

/// The solution a half-reaction is written for.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Medium {
    /// Written with H+ (a(H+) = 1).
    Acid,
    /// Written with OH- (a(OH-) = 1).
    Base,
    /// Neither H+ nor OH- takes part.
    Neutral,
}

impl Medium {
    /// `acid`, `base` or `neutral`.
    pub fn name(self) -> &'static str {
        match self {
            Medium::Acid => "acid",
            Medium::Base => "base",
            Medium::Neutral => "neutral",
        }
    }

    /// Reads `acid`, `base` or `neutral`.
    pub fn from_name(name: &str) -> Option<Medium> {
        match name.trim() {
            "acid" => Some(Medium::Acid),
            "base" => Some(Medium::Base),
            "neutral" => Some(Medium::Neutral),
            _ => None,
        }
    }

    /// The medium a reaction is written for, from whether H+ or OH- takes part (H+ wins when
    /// both do, which no normal form allows).
    pub fn of_reaction(reaction: &Reaction) -> Medium {
        let has = |formula: &str| {
            let species = parse_species(formula).expect("a fixed formula parses");
            !reaction.nu(&species).is_zero()
        };
        if has("H+") {
            Medium::Acid
        } else if has("OH-") {
            Medium::Base
        } else {
            Medium::Neutral
        }
    }
}

impl fmt::Display for Medium {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// Where a couple came from.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Origin {
    /// The built-in table.
    BuiltIn,
    /// A user's table file.
    File(PathBuf),
    /// Typed on the command line or built in code.
    Given,
    /// Computed from formation data (no table lists it).
    FormationData,
}

impl fmt::Display for Origin {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Origin::BuiltIn => f.write_str("built-in table"),
            Origin::File(path) => write!(f, "{}", path.display()),
            Origin::Given => f.write_str("given"),
            Origin::FormationData => f.write_str("formation data"),
        }
    }
}

/// Why a half-reaction cannot be a couple.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum CoupleError {
    /// The reaction text does not parse.
    #[error("{0}")]
    Notation(#[from] NotationError),
    /// No electrons take part.
    #[error("'{0}' has no electrons: a couple is a half-reaction")]
    NoElectrons(String),
    /// Electrons are released: an oxidation.
    #[error("'{0}' releases electrons: write the couple as a reduction (electrons on the left)")]
    NotReduction(String),
    /// Atoms or charge are not conserved.
    #[error("'{reaction}' does not balance ({detail}); see couplet balance")]
    Unbalanced {
        /// The reaction.
        reaction: String,
        /// What is not conserved.
        detail: String,
    },
    /// The potential is NaN or infinite.
    #[error("the potential of '{0}' is not a finite number")]
    NotFinite(String),
}

/// A couple: a reduction half-reaction with its standard potential and what is known about it.
#[derive(Clone, Debug, PartialEq)]
pub struct Couple {
    /// The id, when one was given.
    pub id: Option<String>,
    /// The half-reaction as stored: a reduction, electrons on the left.
    pub reaction: Reaction,
    /// E° in volts vs SHE at 298.15 K.
    pub e0_volts: f64,
    /// dE°/dT in mV/K, when published.
    pub dedt_millivolts_per_kelvin: Option<f64>,
    /// The medium: as stated, or read from the reaction when not stated.
    pub medium: Medium,
    /// The publication the value comes from.
    pub source: Option<String>,
    /// Remarks.
    pub note: Option<String>,
    /// A second source, read, that gives the same value (within 10 mV), and what it gives.
    pub confirmed_by: Option<String>,
    /// False when the table marks the value `verified = false`: no read source confirms it.
    pub verified: bool,
    /// Other published values of the same couple, each with its source; `e0_volts` is the
    /// default among them, chosen by the rule written in `data/potentials.toml`.
    pub also_published: Vec<PublishedValue>,
    /// Which table it came from.
    pub origin: Origin,
}

/// A value another compilation or paper gives for a couple, beside the default one.
#[derive(Clone, Debug, PartialEq)]
pub struct PublishedValue {
    /// E° in volts vs SHE at 298.15 K.
    pub e0_volts: f64,
    /// dE°/dT in mV/K, when that source prints one.
    pub dedt_millivolts_per_kelvin: Option<f64>,
    /// Where it was read, or that it was recalled.
    pub source: String,
    /// Remarks (standard state, method, stated uncertainty).
    pub note: Option<String>,
}

/// The spread of the published values of a couple: the lowest and highest E° and how many
/// values there are. The natural start of an uncertainty on E°: compilations that disagree by
/// this much cannot both be right to better than half of it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct E0Spread {
    /// The lowest published E°, V.
    pub lowest_volts: f64,
    /// The highest published E°, V.
    pub highest_volts: f64,
    /// How many values (the default included).
    pub values: usize,
}

impl E0Spread {
    /// Highest minus lowest, V.
    pub fn width_volts(&self) -> f64 {
        self.highest_volts - self.lowest_volts
    }
}

/// Describes what a reaction fails to conserve, for messages.
pub fn imbalance_text(reaction: &Reaction) -> Option<String> {
    let imbalance = reaction.imbalance();
    if imbalance.is_balanced() {
        return None;
    }
    let mut parts: Vec<String> = imbalance
        .elements
        .iter()
        .map(|(element, change)| format!("{element} changes by {change}"))
        .collect();
    if !imbalance.charge.is_zero() {
        parts.push(format!("charge changes by {}", imbalance.charge));
    }
    Some(parts.join(", "))
}

impl Couple {
    /// A couple from a reduction half-reaction and its E° (V vs SHE at 298.15 K): the text
    /// must parse, balance in atoms and charge, and take up electrons.
    pub fn new(reaction_text: &str, e0_volts: f64) -> Result<Couple, CoupleError> {
        let equation = parse_equation(reaction_text)?;
        let reaction = Reaction::from_equation(&equation);
        Couple::from_reaction(reaction, e0_volts)
    }

    /// A couple from a reaction already read; the same checks as [`Couple::new`].
    pub fn from_reaction(reaction: Reaction, e0_volts: f64) -> Result<Couple, CoupleError> {
        let text = reaction.to_string();
        let electrons = reaction.electron_nu();
        if electrons.is_zero() {
            return Err(CoupleError::NoElectrons(text));
        }
        if electrons.is_positive() {
            return Err(CoupleError::NotReduction(text));
        }
        if let Some(detail) = imbalance_text(&reaction) {
            return Err(CoupleError::Unbalanced {
                reaction: text,
                detail,
            });
        }
        if !e0_volts.is_finite() {
            return Err(CoupleError::NotFinite(text));
        }
        let medium = Medium::of_reaction(&reaction);
        Ok(Couple {
            id: None,
            reaction,
            e0_volts,
            dedt_millivolts_per_kelvin: None,
            medium,
            source: None,
            note: None,
            confirmed_by: None,
            verified: true,
            also_published: Vec::new(),
            origin: Origin::Given,
        })
    }

    /// n: electrons taken up as written (exact; a whole number in every normal table entry).
    pub fn electrons(&self) -> BigRational {
        -self.reaction.electron_nu()
    }

    /// n as a float, for the figures.
    pub fn electrons_f64(&self) -> f64 {
        self.electrons().to_f64().unwrap_or(f64::NAN)
    }

    /// The id when there is one, else the reaction.
    pub fn label(&self) -> String {
        self.id.clone().unwrap_or_else(|| self.reaction.to_string())
    }

    /// True when `ox` is taken up with the electrons and `red` is made.
    pub fn links(&self, ox: &Species, red: &Species) -> bool {
        let nu_of = |s: &Species| {
            self.reaction
                .entries()
                .iter()
                .find(|e| same_formula_unit(&e.species, s) || hydrate_equivalent(&e.species, s))
                .map(|e| e.nu.clone())
        };
        matches!(nu_of(ox), Some(nu) if nu.is_negative())
            && matches!(nu_of(red), Some(nu) if nu.is_positive())
    }

    /// The spread of the published values when there are several (`also_published`).
    pub fn e0_spread(&self) -> Option<E0Spread> {
        if self.also_published.is_empty() {
            return None;
        }
        let values = self
            .also_published
            .iter()
            .map(|p| p.e0_volts)
            .chain([self.e0_volts]);
        let (lowest_volts, highest_volts) = values
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
                (lo.min(v), hi.max(v))
            });
        Some(E0Spread {
            lowest_volts,
            highest_volts,
            values: self.also_published.len() + 1,
        })
    }

    /// True when any species holds `element` (isotope labels count as their element).
    pub fn contains_element(&self, element: Element) -> bool {
        self.reaction.entries().iter().any(|e| {
            e.species
                .composition
                .counts()
                .iter()
                .any(|(el, _)| el.chemical_element() == element.chemical_element())
        })
    }
}

/// True when two reactions are the same up to a positive factor (species order, missing
/// state labels and the way a formula is written aside: see [`same_formula_unit`]).
pub fn same_reaction(a: &Reaction, b: &Reaction) -> bool {
    let (a, b) = (a.in_lowest_integers(), b.in_lowest_integers());
    a.entries().len() == b.entries().len()
        && a.entries().iter().all(|x| {
            b.entries()
                .iter()
                .any(|y| same_formula_unit(&x.species, &y.species) && x.nu == y.nu)
        })
}

/// True when two species have the same atoms and charge in the same compartment, with the same
/// state label when both carry one: `[Fe(CN)6]3-` and `Fe(CN)6^3-`, `HCOOH` and `CH2O2`. For
/// finding a couple, where the user's way of writing a formula should not matter.
pub fn same_formula_unit(a: &Species, b: &Species) -> bool {
    if same_species(a, b) {
        return true;
    }
    same_atoms(a, b)
        && a.charge() == b.charge()
        && a.compartment == b.compartment
        && match (a.state, b.state) {
            (Some(x), Some(y)) => x == y,
            _ => true,
        }
}

/// True when two dissolved species differ only by whole molecules of water, as the forms an
/// oxoacid is written in do: `HAsO2` and `H3AsO3`, `H4SiO4` and `SiO2(aq)`. Both must be
/// neutral, dissolved (or carry no state) and free of carbon (ethanol is not hydrated
/// ethylene), in the same compartment. Compilations write the same couple either way, so
/// lookups and the checker's duplicate and cycle rules see them as one.
pub fn hydrate_equivalent(a: &Species, b: &Species) -> bool {
    if !(may_be_hydrated(a) && may_be_hydrated(b)) || a.compartment != b.compartment {
        return false;
    }
    let form = |s: &Species| least_hydrated(s).map_or_else(|| s.clone(), |(form, _)| form);
    same_formula_unit(&form(a), &form(b))
}

/// Whether a species is a solute whose hydrates are one: dissolved (or unlabelled), neutral,
/// carbon-free, with whole-number counts.
fn may_be_hydrated(species: &Species) -> bool {
    use crate::notation::State;
    let Some(carbon) = Element::from_symbol("C") else {
        return false;
    };
    !species.is_electron()
        && matches!(species.state, None | Some(State::Aqueous))
        && species.charge() == 0
        && species.composition.is_integral()
        && species.composition.scaled_count(carbon) == 0
}

/// The least hydrated form of a dissolved neutral solute, as a dissolved species, with the
/// number of H2O taken out (as many as its H and O allow: H3AsO3 → HAsO2 + H2O); `None` when
/// none can be taken out or the species is not such a solute. The elements keep the order
/// they were written in.
pub fn least_hydrated(species: &Species) -> Option<(Species, u64)> {
    if !may_be_hydrated(species) {
        return None;
    }
    let (hydrogen, oxygen) = (Element::from_symbol("H")?, Element::from_symbol("O")?);
    let composition = &species.composition;
    let waters = (composition.scaled_count(hydrogen) / 2).min(composition.scaled_count(oxygen));
    if waters == 0 {
        return None;
    }
    let mut formula = String::new();
    for &(element, count) in composition.counts() {
        let left = if element == hydrogen {
            count - 2 * waters
        } else if element == oxygen {
            count - waters
        } else {
            count
        };
        match left {
            0 => {}
            1 => formula.push_str(element.symbol()),
            n => formula.push_str(&format!("{}{n}", element.symbol())),
        }
    }
    let holds_another_element = composition
        .counts()
        .iter()
        .any(|&(element, _)| element != hydrogen && element != oxygen);
    if !holds_another_element {
        // Water itself, or H2O2 (not a hydrate of atomic oxygen).
        return None;
    }
    let mut form = parse_species(&format!("{formula}(aq)")).ok()?;
    form.compartment = species.compartment;
    Some((form, waters))
}

/// The reaction with every dissolved neutral solute in its least hydrated form and the water it
/// gave up moved into the H2O term ([`least_hydrated`]); the reaction itself when no species
/// has a hydrate form.
pub fn in_least_hydrated_forms(reaction: &Reaction) -> std::borrow::Cow<'_, Reaction> {
    let forms: Vec<Option<(Species, u64)>> = reaction
        .entries()
        .iter()
        .map(|e| least_hydrated(&e.species))
        .collect();
    if forms.iter().all(Option::is_none) {
        return std::borrow::Cow::Borrowed(reaction);
    }
    let Ok(water) = parse_species("H2O(l)") else {
        return std::borrow::Cow::Borrowed(reaction);
    };
    let mut out = Reaction::new();
    for (entry, form) in reaction.entries().iter().zip(forms) {
        match form {
            Some((form, waters)) => {
                out.add(&form, entry.nu.clone());
                out.add(&water, &entry.nu * BigRational::from_integer(waters.into()));
            }
            None => {
                let bare = entry.species.without_state();
                if bare.ascii() == "H2O" {
                    out.add(&water, entry.nu.clone());
                } else {
                    out.add(&entry.species, entry.nu.clone());
                }
            }
        }
    }
    std::borrow::Cow::Owned(out)
}

/// True when two half-reactions are the same couple: the same up to a positive factor
/// ([`same_reaction`]), also once each dissolved oxoacid is written in its least hydrated form
/// (`H3AsO4 + 2 H+ + 2 e- -> HAsO2 + 2 H2O` and `H3AsO4 + 2 H+ + 2 e- -> H3AsO3 + H2O`).
pub fn same_couple(a: &Reaction, b: &Reaction) -> bool {
    same_reaction(a, b) || same_reaction(&in_least_hydrated_forms(a), &in_least_hydrated_forms(b))
}

/// A fault in a table file, located in the file.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[error("{origin}:{line}:{column}: {message}")]
pub struct TableError {
    /// The file.
    pub origin: Origin,
    /// 1-based line.
    pub line: usize,
    /// 1-based column (characters).
    pub column: usize,
    /// One line, lower-case, no trailing period.
    pub message: String,
    /// Where in the file.
    pub span: Span,
    /// The file's text, for rendering.
    pub text: String,
}

impl TableError {
    fn at(file: &CoupleFile, origin: &Origin, span: Span, message: String) -> TableError {
        let (line, column) = file.line_column(span.start);
        TableError {
            origin: origin.clone(),
            line,
            column,
            message,
            span,
            text: file.text.clone(),
        }
    }

    /// The message with the file's line and a caret under the fault.
    pub fn render(&self) -> String {
        render_caret(
            &self.text,
            self.span,
            &format!(
                "{}:{}:{}: error: {}",
                self.origin, self.line, self.column, self.message
            ),
        )
    }
}

/// One couple that a later table replaced.
#[derive(Clone, Debug, PartialEq)]
pub struct Override {
    /// The shared id.
    pub id: String,
    /// Where the replaced couple came from.
    pub replaced: Origin,
    /// Where the replacement came from.
    pub by: Origin,
}

/// Why a lookup found no single couple.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum LookupError {
    /// Nothing fits.
    #[error("no couple in the table fits '{query}'{}", hint_text(.hints))]
    NotFound {
        /// What was asked.
        query: String,
        /// Ids of couples that the query's words find, to help the user.
        hints: Vec<String>,
    },
    /// Several couples fit; the user must name one.
    #[error("'{query}' fits {} couples; name one by its id (or give --medium)", .candidates.len())]
    Ambiguous {
        /// What was asked.
        query: String,
        /// Every couple that fits.
        candidates: Vec<Couple>,
    },
    /// The query names a couple reduced form first (`Cu/Cu2+`).
    #[error(
        "'{query}' names the reduced form first: a couple is written oxidised form / reduced form (did you mean: {}?)",
        .couples.join(", ")
    )]
    Reversed {
        /// What was asked.
        query: String,
        /// Ids (or reactions) of the couples the reversed query names.
        couples: Vec<String>,
    },
    /// The query looks like a half-reaction or a couple but does not parse.
    #[error("{0}")]
    Notation(NotationError),
}

fn hint_text(hints: &[String]) -> String {
    if hints.is_empty() {
        String::new()
    } else {
        format!(" (did you mean: {}?)", hints.join(", "))
    }
}

/// A loaded table: couples in order (built-in first, then each user file), and the record of
/// which ids a later file replaced.
#[derive(Clone, Debug, Default)]
pub struct Table {
    couples: Vec<Couple>,
    overrides: Vec<Override>,
}

static BUILTIN: LazyLock<Table> = LazyLock::new(|| {
    let file = CoupleFile::from_text(BUILTIN_POTENTIALS_TOML, FileFormat::Toml);
    let mut table = Table::default();
    if let Err(error) = table.add_file(&file, Origin::BuiltIn) {
        // The test suite loads the built-in table, so this cannot ship broken.
        panic!("the built-in table is broken: {error}");
    }
    table
});

/// Ligand names of the IUPAC 2005 recommendations and the older names beside them: both are
/// in use (hexacyanidoferrate, hexacyanoferrate).
const LIGAND_SPELLINGS: &[(&str, &str)] = &[
    ("cyanido", "cyano"),
    ("chlorido", "chloro"),
    ("fluorido", "fluoro"),
    ("hydroxido", "hydroxo"),
    ("bromido", "bromo"),
    ("iodido", "iodo"),
];

/// A name reduced for comparison: lower case, no spaces or hyphens, older ligand spellings.
fn name_key(name: &str) -> String {
    let mut key: String = name
        .chars()
        .filter(|c| !c.is_whitespace() && *c != '-')
        .flat_map(char::to_lowercase)
        .collect();
    for (new, old) in LIGAND_SPELLINGS {
        key = key.replace(new, old);
    }
    key
}

/// The species a known ion's name stands for, from the ion table (`data/polyatomic_ions.toml`):
/// its systematic name or the common name in brackets, in any case, with old or new ligand
/// spellings: `permanganate` → MnO4-, `ferricyanide` and `hexacyanoferrate(III)` →
/// Fe(CN)6^3-, `hydronium` → H3O+.
pub fn species_named(name: &str) -> Option<Species> {
    let wanted = name_key(name);
    if wanted.is_empty() {
        return None;
    }
    let ions = IonTable::builtin().ok()?;
    ions.ions()
        .iter()
        .find(|ion| {
            let full = ion.name.as_str();
            let (main, common) = match full.split_once(" (") {
                Some((main, rest)) => (main, rest.strip_suffix(')')),
                None => (full, None),
            };
            [Some(full), Some(main), common]
                .into_iter()
                .flatten()
                .any(|n| name_key(n) == wanted)
        })
        .and_then(|ion| parse_species(&ion.formula).ok())
}

/// The known-ion name nearest to `word` when it is one or two typing errors away (names of
/// eight letters or more; one error for shorter ones) and `word` itself is no name.
fn ion_name_near(word: &str) -> Option<String> {
    let key = name_key(word);
    if key.is_empty() || species_named(word).is_some() {
        return None;
    }
    let allowed = if key.chars().count() >= 8 { 2 } else { 1 };
    let ions = IonTable::builtin().ok()?;
    ions.ions()
        .iter()
        .flat_map(|ion| {
            let full = ion.name.as_str();
            match full.split_once(" (") {
                Some((main, rest)) => vec![main, rest.trim_end_matches(')')],
                None => vec![full],
            }
        })
        .map(|name| (edit_distance(&name_key(name), &key), name))
        .filter(|(d, _)| *d <= allowed)
        .min_by_key(|(d, _)| *d)
        .map(|(_, name)| name.to_owned())
}

/// The query with a mistyped ion name on either side of `/` (or alone) corrected.
fn query_with_names_fixed(query: &str) -> Option<String> {
    let parts: Vec<&str> = query.split('/').map(str::trim).collect();
    let mut changed = false;
    let fixed: Vec<String> = parts
        .iter()
        .map(|part| {
            if parse_species(part).is_ok() {
                return (*part).to_owned();
            }
            match ion_name_near(part) {
                Some(name) => {
                    changed = true;
                    name
                }
                None => (*part).to_owned(),
            }
        })
        .collect();
    changed.then(|| fixed.join("/"))
}

/// A species as written, or else the known ion the text names.
fn species_or_name(text: &str) -> Result<Species, NotationError> {
    parse_species(text).or_else(|error| species_named(text).ok_or(error))
}

/// Splits `Ox/Red` into its two species, trying each `/` (no formula contains one); either
/// side may be a known ion's name (`ferricyanide/ferrocyanide`).
pub fn parse_couple_notation(text: &str) -> Option<Result<(Species, Species), NotationError>> {
    let mut first_error = None;
    for (at, _) in text.match_indices('/') {
        let (left, right) = (text[..at].trim(), text[at + 1..].trim());
        match (species_or_name(left), species_or_name(right)) {
            (Ok(ox), Ok(red)) => return Some(Ok((ox, red))),
            (Err(error), _) | (_, Err(error)) => {
                first_error.get_or_insert(error);
            }
        }
    }
    first_error.map(Err)
}

impl Table {
    /// An empty table.
    pub fn new() -> Table {
        Table::default()
    }

    /// The built-in table (`data/potentials.toml`), loaded once.
    pub fn builtin() -> Table {
        BUILTIN.clone()
    }

    /// Loads every couple of a file read by [`CoupleFile`]. The first fault of form or
    /// chemistry is an error and nothing of the file is added; an id already in the table
    /// replaces the earlier couple and is recorded in [`Table::overrides`].
    pub fn add_file(&mut self, file: &CoupleFile, origin: Origin) -> Result<(), TableError> {
        if let Some(problem) = file.problems.first() {
            return Err(TableError::at(
                file,
                &origin,
                problem.span,
                problem.message.clone(),
            ));
        }
        let mut loaded = Vec::with_capacity(file.records.len());
        for record in &file.records {
            loaded.push(couple_from_record(file, record, &origin)?);
        }
        for couple in loaded {
            self.insert(couple);
        }
        Ok(())
    }

    /// Adds a couple; one with the same id as an earlier couple replaces it.
    pub fn insert(&mut self, couple: Couple) {
        if let Some(id) = &couple.id
            && let Some(i) = self
                .couples
                .iter()
                .position(|c| c.id.as_deref().is_some_and(|c| c.eq_ignore_ascii_case(id)))
        {
            self.overrides.push(Override {
                id: id.clone(),
                replaced: self.couples[i].origin.clone(),
                by: couple.origin.clone(),
            });
            self.couples[i] = couple;
            return;
        }
        self.couples.push(couple);
    }

    /// Every couple, in order.
    pub fn couples(&self) -> &[Couple] {
        &self.couples
    }

    /// Couples that a later file replaced.
    pub fn overrides(&self) -> &[Override] {
        &self.overrides
    }

    /// The couple with this id (ids compare without regard to ASCII case).
    pub fn by_id(&self, id: &str) -> Option<&Couple> {
        let id = id.trim();
        self.couples
            .iter()
            .find(|c| c.id.as_deref().is_some_and(|c| c.eq_ignore_ascii_case(id)))
    }

    /// Couples that take up `ox` and make `red`.
    pub fn by_pair(&self, ox: &Species, red: &Species) -> Vec<&Couple> {
        self.couples.iter().filter(|c| c.links(ox, red)).collect()
    }

    /// Couples whose half-reaction is `reaction` up to a positive factor.
    pub fn by_reaction(&self, reaction: &Reaction) -> Vec<&Couple> {
        self.couples
            .iter()
            .filter(|c| same_couple(&c.reaction, reaction))
            .collect()
    }

    /// Couples in which `species` takes part (compared by formula unit).
    pub fn with_species(&self, species: &Species) -> Vec<&Couple> {
        self.couples
            .iter()
            .filter(|c| {
                c.reaction
                    .entries()
                    .iter()
                    .any(|e| same_formula_unit(&e.species, species))
            })
            .collect()
    }

    /// What the user may have meant by a query that found nothing, best first: ids (or
    /// reactions) of couples whose species differ from a queried `Ox/Red` only in charge or
    /// count (`MnO4/Mn2+`, `Cu3+/Cu`), ids one or two typing errors away, couples that the
    /// query's words find. At most six.
    pub fn suggestions(&self, query: &str) -> Vec<String> {
        let query = query.trim();
        let mut out: Vec<String> = Vec::new();
        let mut push = |label: String| {
            if !out.contains(&label) && out.len() < 6 {
                out.push(label);
            }
        };
        if let Some(Ok((ox, red))) = parse_couple_notation(query) {
            for c in self.by_pair(&red, &ox) {
                push(c.label());
            }
            let mut scored: Vec<(u8, &Couple)> = self
                .couples
                .iter()
                .filter_map(|c| Some((pair_likeness(c, &ox, &red)?, c)))
                .collect();
            scored.sort_by_key(|s| std::cmp::Reverse(s.0));
            for (_, c) in scored {
                push(c.label());
            }
        }
        for id in self.ids_near(query) {
            push(id);
        }
        if let Some(fixed) = query_with_names_fixed(query) {
            push(fixed);
        }
        for c in self.matching(&query.replace('/', " ")) {
            if let Some(id) = &c.id {
                push(id.clone());
            }
        }
        out
    }

    /// Ids one typing error away from `query` (two for ids of eight characters or more).
    fn ids_near(&self, query: &str) -> Vec<String> {
        let key = query.trim().to_lowercase();
        let allowed = if key.chars().count() >= 8 { 2 } else { 1 };
        self.couples
            .iter()
            .filter_map(|c| c.id.clone())
            .filter(|id| edit_distance(&id.to_lowercase(), &key) <= allowed)
            .collect()
    }

    /// Couples with any species holding `element`.
    pub fn with_element(&self, element: Element) -> Vec<&Couple> {
        self.couples
            .iter()
            .filter(|c| c.contains_element(element))
            .collect()
    }

    /// Every couple a query can mean, for listing: an id, a couple `Ox/Red`, a half-reaction,
    /// an element name or symbol, or else words found in ids, reactions, notes and sources.
    pub fn matching(&self, query: &str) -> Vec<&Couple> {
        let query = query.trim();
        if let Some(couple) = self.by_id(query) {
            return vec![couple];
        }
        if is_reaction_text(query)
            && let Ok(equation) = parse_equation(query)
        {
            return self.by_reaction(&Reaction::from_equation(&equation));
        }
        if let Some(Ok((ox, red))) = parse_couple_notation(query) {
            let found = self.by_pair(&ox, &red);
            if !found.is_empty() {
                return found;
            }
        }
        if let Some(element) = element_named(query) {
            return self.with_element(element);
        }
        if let Ok(species) = species_or_name(query)
            && !species.is_electron()
        {
            let found = self.with_species(&species);
            if !found.is_empty() {
                return found;
            }
        }
        let words = query.to_lowercase();
        self.couples
            .iter()
            .filter(|c| {
                let fields = [
                    c.id.clone().unwrap_or_default(),
                    c.reaction.to_string(),
                    c.note.clone().unwrap_or_default(),
                    c.source.clone().unwrap_or_default(),
                ];
                fields.iter().any(|f| f.to_lowercase().contains(&words))
            })
            .collect()
    }

    /// The one couple a query names (an id, `Ox/Red`, or a half-reaction), optionally only
    /// among couples of one medium. Several fits are an error listing them.
    pub fn find(&self, query: &str, medium: Option<Medium>) -> Result<&Couple, LookupError> {
        let query = query.trim();
        if let Some(couple) = self.by_id(query) {
            return Ok(couple);
        }
        let found = if is_reaction_text(query) {
            let equation = parse_equation(query).map_err(LookupError::Notation)?;
            self.by_reaction(&Reaction::from_equation(&equation))
        } else {
            match parse_couple_notation(query) {
                Some(Ok((ox, red))) => self.by_pair(&ox, &red),
                Some(Err(error)) => {
                    // A mistyped id (`cu2+/cuu`) or ion name (`ferricyanid`) reads as bad
                    // notation: offer the corrections first.
                    let near = self.suggestions(query);
                    if near.is_empty() {
                        return Err(LookupError::Notation(error));
                    }
                    return Err(LookupError::NotFound {
                        query: query.to_owned(),
                        hints: near,
                    });
                }
                None => Vec::new(),
            }
        };
        let in_medium: Vec<&Couple> = match medium {
            Some(m) => found.iter().copied().filter(|c| c.medium == m).collect(),
            None => found.clone(),
        };
        // A medium that rules out every fit is ignored rather than hiding the couple: the
        // cell engine converts between media when asked.
        let chosen = if in_medium.is_empty() {
            found
        } else {
            in_medium
        };
        match chosen.as_slice() {
            [one] => Ok(one),
            [] => {
                if let Some(Ok((ox, red))) = parse_couple_notation(query) {
                    let reversed = self.by_pair(&red, &ox);
                    if !reversed.is_empty() {
                        return Err(LookupError::Reversed {
                            query: query.to_owned(),
                            couples: reversed.iter().map(|c| c.label()).collect(),
                        });
                    }
                }
                Err(LookupError::NotFound {
                    query: query.to_owned(),
                    hints: self.suggestions(query),
                })
            }
            many => Err(LookupError::Ambiguous {
                query: query.to_owned(),
                candidates: many.iter().map(|c| (*c).clone()).collect(),
            }),
        }
    }
}

/// How close a couple comes to linking `ox` to `red`, per side: 4 where a species of the
/// couple's side is the queried one, 3 where it has the same atoms with another charge, 1 where
/// it only has the same elements; `None` below 5 (one side right, the other near).
fn pair_likeness(couple: &Couple, ox: &Species, red: &Species) -> Option<u8> {
    let elements = |s: &Species| {
        let mut e: Vec<Element> = s
            .composition
            .counts()
            .iter()
            .map(|(e, _)| e.chemical_element())
            .collect();
        e.sort();
        e.dedup();
        e
    };
    let likeness = |wanted: &Species, taken_up: bool| {
        couple
            .reaction
            .entries()
            .iter()
            .filter(|e| !e.species.is_electron() && e.nu.is_negative() == taken_up)
            .map(|e| {
                if same_formula_unit(&e.species, wanted) {
                    4
                } else if same_atoms(&e.species, wanted) {
                    3
                } else if elements(&e.species) == elements(wanted) {
                    1
                } else {
                    0
                }
            })
            .max()
            .unwrap_or(0)
    };
    let score = likeness(ox, true) + likeness(red, false);
    (score >= 5).then_some(score)
}

fn sorted_counts(s: &Species) -> Vec<(Element, u64)> {
    let mut counts = s.composition.counts().to_vec();
    counts.sort();
    counts
}

/// The same atoms, whatever the charge.
fn same_atoms(a: &Species, b: &Species) -> bool {
    a.is_electron() == b.is_electron()
        && a.composition.denominator() == b.composition.denominator()
        && sorted_counts(a) == sorted_counts(b)
}

/// Levenshtein distance in characters, for ids typed nearly right.
fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut row: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut diagonal = row[0];
        row[0] = i + 1;
        for (j, cb) in b.iter().enumerate() {
            let above = row[j + 1];
            row[j + 1] = if ca == *cb {
                diagonal
            } else {
                1 + diagonal.min(above).min(row[j])
            };
            diagonal = above;
        }
    }
    row[b.len()]
}

/// True when the text has an arrow, so it is a half-reaction rather than a couple name.
pub fn is_reaction_text(text: &str) -> bool {
    ["->", "→", "=", "⇌", "<->"]
        .iter()
        .any(|a| text.contains(a))
}

/// The element a word names: a symbol as written (`Mn`) or an English name in any case.
pub fn element_named(word: &str) -> Option<Element> {
    let word = word.trim();
    if let Some(element) = Element::from_symbol(word) {
        return Some(element);
    }
    // "sulphur" and "aluminium" are common spellings beside the IUPAC names.
    let word = match word.to_lowercase().as_str() {
        "sulphur" => "sulfur".to_owned(),
        "aluminum" => "aluminium".to_owned(),
        other => other.to_owned(),
    };
    Element::all().find(|e| e.data().name.eq_ignore_ascii_case(&word))
}

fn couple_from_record(
    file: &CoupleFile,
    record: &CoupleRecord,
    origin: &Origin,
) -> Result<Couple, TableError> {
    let error = |span: Span, message: String| TableError::at(file, origin, span, message);
    let reaction_field = record.reaction.as_ref().ok_or_else(|| {
        error(
            record.span,
            format!("couple {} has no 'reaction'", record.index + 1),
        )
    })?;
    let e0_field = record.e0_volts.as_ref().ok_or_else(|| {
        error(
            record.span,
            format!("couple {} has no 'e0'", record.index + 1),
        )
    })?;
    let equation = parse_equation(&reaction_field.value).map_err(|e| {
        let start = reaction_field.file_offset(e.span.start);
        let end = reaction_field.file_offset(e.span.end).max(start + 1);
        error(Span::new(start, end), e.message.clone())
    })?;
    let mut couple = Couple::from_reaction(Reaction::from_equation(&equation), e0_field.value)
        .map_err(|e| {
            let span = if matches!(e, CoupleError::NotFinite(_)) {
                e0_field.span
            } else {
                reaction_field.span
            };
            error(span, e.to_string())
        })?;
    if let Some(medium) = &record.medium {
        couple.medium = Medium::from_name(&medium.value).ok_or_else(|| {
            error(
                medium.span,
                format!(
                    "medium must be acid, base or neutral, not '{}'",
                    medium.value
                ),
            )
        })?;
    }
    if let Some(dedt) = &record.dedt_millivolts_per_kelvin {
        if !dedt.value.is_finite() {
            return Err(error(dedt.span, "dedt is not a finite number".to_owned()));
        }
        couple.dedt_millivolts_per_kelvin = Some(dedt.value);
    }
    couple.id = record.id.as_ref().map(|f| f.value.trim().to_owned());
    couple.source = record.source.as_ref().map(|f| f.value.clone());
    couple.note = record.note.as_ref().map(|f| f.value.clone());
    couple.confirmed_by = record.confirmed_by.as_ref().map(|f| f.value.clone());
    couple.verified = record.verified.as_ref().is_none_or(|f| f.value);
    for published in &record.also_published {
        let finite = |field: &record::Field<f64>, what: &str| {
            if field.value.is_finite() {
                Ok(field.value)
            } else {
                Err(error(
                    field.span,
                    format!("{what} in 'also_published' is not a finite number"),
                ))
            }
        };
        couple.also_published.push(PublishedValue {
            e0_volts: finite(&published.e0_volts, "e0")?,
            dedt_millivolts_per_kelvin: published
                .dedt_millivolts_per_kelvin
                .as_ref()
                .map(|d| finite(d, "dedt"))
                .transpose()?,
            source: published.source.value.clone(),
            note: published.note.as_ref().map(|n| n.value.clone()),
        });
    }
    couple.origin = origin.clone();
    Ok(couple)
}

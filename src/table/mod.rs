//! Standard-potential tables: the built-in table and users' own, loaded into couples whose
//! half-reactions are parsed and checked, with lookup by id, by couple notation (`Ox/Red`),
//! by half-reaction, by element and by free text.
//!
//! Lookup never picks silently: where a query fits several couples (an acid and a base form,
//! say) it returns [`LookupError::Ambiguous`] with every candidate, and the caller asks the
//! user to choose.

pub mod record;

pub use record::{CoupleFile, CoupleRecord, Field, FileFormat, ProblemKind, ReadProblem};

use crate::elements::Element;
use crate::notation::{NotationError, Span, Species, parse_equation, parse_species, render_caret};
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
    /// Which table it came from.
    pub origin: Origin,
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
                .find(|e| same_species(&e.species, s))
                .map(|e| e.nu.clone())
        };
        matches!(nu_of(ox), Some(nu) if nu.is_negative())
            && matches!(nu_of(red), Some(nu) if nu.is_positive())
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

/// True when two reactions are the same up to a positive factor (species order and missing
/// state labels aside).
pub fn same_reaction(a: &Reaction, b: &Reaction) -> bool {
    let (a, b) = (a.in_lowest_integers(), b.in_lowest_integers());
    a.entries().len() == b.entries().len()
        && a.entries().iter().all(|x| {
            b.entries()
                .iter()
                .any(|y| same_species(&x.species, &y.species) && x.nu == y.nu)
        })
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

/// Splits `Ox/Red` into its two species, trying each `/` (no formula contains one).
pub fn parse_couple_notation(text: &str) -> Option<Result<(Species, Species), NotationError>> {
    let mut first_error = None;
    for (at, _) in text.match_indices('/') {
        let (left, right) = (text[..at].trim(), text[at + 1..].trim());
        match (parse_species(left), parse_species(right)) {
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
            .filter(|c| same_reaction(&c.reaction, reaction))
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
                Some(Err(error)) => return Err(LookupError::Notation(error)),
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
            [] => Err(LookupError::NotFound {
                query: query.to_owned(),
                hints: self
                    .matching(&query.replace('/', " "))
                    .iter()
                    .filter_map(|c| c.id.clone())
                    .take(6)
                    .collect(),
            }),
            many => Err(LookupError::Ambiguous {
                query: query.to_owned(),
                candidates: many.iter().map(|c| (*c).clone()).collect(),
            }),
        }
    }
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
    couple.origin = origin.clone();
    Ok(couple)
}

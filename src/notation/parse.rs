//! The parser: text → [`Species`], [`Equation`] and [`Input`] values with spans.
//!
//! Built from small nom parsers, smallest first: counts, element symbols, units, formula
//! bodies, charges, state labels, species, terms, sides, arrows, equations. nom stays inside
//! this file: every public function returns the project's [`NotationError`].
//!
//! ## The rules where `+`, `-` and digits could mean two things
//! - After a formula, digits followed by a sign are the **charge** only when the formula is one
//!   element symbol (`Fe3+`, `S2-`) or ends with a square bracket (`[Fe(CN)6]4-`); otherwise
//!   they are a subscript and the sign alone is the charge (`NO3-`, `NH4+`). A caret or braces
//!   always mark a charge: `SO4^2-`, `Hg2^2+`, `SO4{2-}`, `Fe^{3+}`.
//! - A sign followed by digits (`Fe+3`) is a charge only when the species ends there (end of
//!   text, a space, a state label or an arrow); otherwise the `+` separates species and the
//!   digits are the next coefficient (`2Fe+3Cl2`).
//! - A single `+` between two formulas with no space separates them (`H2O+CO2`). Two or more
//!   `+` between formulas (`Na++Cl-`) is ambiguous and refused: write spaces around the `+`
//!   that separates species.
//! - `-` followed by `>` is always the arrow, never a charge.

use super::{
    Arrow, Bracket, Compartment, Component, Components, Count, Equation, Formula, NotationError,
    NotationErrorKind, Span, Species, SpeciesKind, State, Term, Unit,
};
use crate::composition::Composition;
use crate::elements::Element;
use nom::IResult;
use nom::error::{ErrorKind, ParseError};
use num_rational::Ratio;
use std::borrow::Cow;
use std::sync::Arc;

/// Documented bounds on what the parser accepts; input past them is a `limit` error.
#[derive(Clone, Copy, Debug)]
pub struct Limits {
    /// Longest input, in bytes.
    pub max_input_bytes: usize,
    /// Deepest bracket nesting.
    pub max_nesting: usize,
    /// Largest subscript or adduct multiplier.
    pub max_count: u32,
    /// Largest charge magnitude.
    pub max_charge: u32,
    /// Largest numerator or denominator of a coefficient.
    pub max_coefficient: u64,
    /// Most terms in an equation or species list.
    pub max_terms: usize,
}

/// The limits in force.
pub const LIMITS: Limits = Limits {
    max_input_bytes: 4096,
    max_nesting: 8,
    max_count: 1_000_000,
    max_charge: 99,
    max_coefficient: 1_000_000_000_000,
    max_terms: 64,
};

/// What `couplet parse` can be given: a list of species (`SO4^2-`, `H2O + CO2`) or an equation.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Input {
    /// One or more terms with no arrow.
    Species(Vec<Term>),
    /// Two sides and an arrow.
    Equation(Equation),
}

type Res<'a, T> = IResult<&'a str, T, PErr<'a>>;

/// The error nom carries inside this file: where, how long, what.
#[derive(Debug)]
struct PErr<'a> {
    at: &'a str,
    len: usize,
    kind: NotationErrorKind,
    message: Cow<'static, str>,
}

impl<'a> ParseError<&'a str> for PErr<'a> {
    fn from_error_kind(input: &'a str, _kind: ErrorKind) -> Self {
        PErr {
            at: input,
            len: input.chars().next().map_or(0, char::len_utf8),
            kind: NotationErrorKind::Syntax,
            message: Cow::Borrowed("unexpected text"),
        }
    }
    fn append(_: &'a str, _: ErrorKind, other: Self) -> Self {
        other
    }
}

/// A hard failure at `at` (no backtracking past it).
fn fail<'a, T>(
    at: &'a str,
    len: usize,
    kind: NotationErrorKind,
    message: impl Into<Cow<'static, str>>,
) -> Res<'a, T> {
    Err(nom::Err::Failure(PErr {
        at,
        len,
        kind,
        message: message.into(),
    }))
}

/// Ligand abbreviations read inside formulas, with the formula each stands for (the free
/// ligand's atoms; its charge and internal oxidation states are in `data/ligands.toml` or, for
/// oxalate, `data/polyatomic_ions.toml`). Common practice of coordination chemistry
/// (IUPAC Red Book 2005, IR-4.4.4 and Table VII, lists such abbreviations; from memory). None
/// collides with a state or compartment label.
pub const LIGAND_ABBREVIATIONS: [(&str, &str); 10] = [
    ("en", "C2H8N2"),
    ("py", "C5H5N"),
    ("bpy", "C10H8N2"),
    ("bipy", "C10H8N2"),
    ("phen", "C12H8N2"),
    ("dien", "C4H13N3"),
    ("ox", "C2O4"),
    ("acac", "C5H7O2"),
    ("gly", "C2H4NO2"),
    ("edta", "C10H12N2O8"),
];

/// The abbreviation as kept in the formula tree and the atoms it stands for (read once).
fn ligand_abbreviation(word: &str) -> Option<(&'static str, &'static [Unit])> {
    static BODIES: std::sync::LazyLock<Vec<Vec<Unit>>> = std::sync::LazyLock::new(|| {
        LIGAND_ABBREVIATIONS
            .iter()
            .map(|(_, formula)| match parse_species(formula) {
                Ok(Species {
                    kind: SpeciesKind::Formula(f),
                    ..
                }) => f.components[0].body.clone(),
                _ => unreachable!("the abbreviations' formulas are plain formulas"),
            })
            .collect()
    });
    let index = LIGAND_ABBREVIATIONS.iter().position(|(a, _)| *a == word)?;
    Some((LIGAND_ABBREVIATIONS[index].0, &BODIES[index]))
}

/// A soft miss: the caller may try something else here.
fn miss<'a, T>(at: &'a str) -> Res<'a, T> {
    Err(nom::Err::Error(PErr::from_error_kind(at, ErrorKind::Fail)))
}

fn syntax<'a, T>(at: &'a str, message: impl Into<Cow<'static, str>>) -> Res<'a, T> {
    let len = at.chars().next().map_or(0, char::len_utf8);
    fail(at, len, NotationErrorKind::Syntax, message)
}

fn first_char(s: &str) -> Option<char> {
    s.chars().next()
}

fn describe(s: &str) -> String {
    match first_char(s) {
        Some(c) => format!("'{c}'"),
        None => "the end of the input".to_owned(),
    }
}

// ---------------------------------------------------------------- numbers

const SUBSCRIPTS: [char; 10] = ['₀', '₁', '₂', '₃', '₄', '₅', '₆', '₇', '₈', '₉'];
const SUPERSCRIPTS: [char; 10] = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];

fn digit_value(c: char, digits: &[char; 10]) -> Option<u64> {
    digits.iter().position(|&d| d == c).map(|v| v as u64)
}

/// The value of a digit in `script` (ASCII when `None`).
fn digit_in(c: char, script: Option<&[char; 10]>) -> Option<u64> {
    match script {
        None => c.to_digit(10).filter(|_| c.is_ascii_digit()).map(u64::from),
        Some(set) => digit_value(c, set),
    }
}

/// Digits in one script (ASCII, subscript or superscript) as a number, with their length in
/// bytes; `None` when there are no such digits. Fails past `limit`.
fn number_in<'a>(
    input: &'a str,
    script: Option<&[char; 10]>,
    limit: u64,
    what: &'static str,
) -> Res<'a, Option<u64>> {
    let mut value: u64 = 0;
    let mut taken = 0;
    for c in input.chars() {
        let Some(digit) = digit_in(c, script) else {
            break;
        };
        value = match value.checked_mul(10).and_then(|v| v.checked_add(digit)) {
            Some(v) if v <= limit => v,
            _ => {
                let digits_len = input
                    .char_indices()
                    .find(|&(_, c)| !(c.is_ascii_digit() || script.is_some_and(|s| s.contains(&c))))
                    .map_or(input.len(), |(i, _)| i);
                return fail(
                    input,
                    digits_len,
                    NotationErrorKind::Limit,
                    format!("{what} is larger than the limit of {limit}"),
                );
            }
        };
        taken += c.len_utf8();
    }
    if taken == 0 {
        Ok((input, None))
    } else {
        Ok((&input[taken..], Some(value)))
    }
}

/// Most decimal places a subscript may have.
pub(crate) const MAX_DECIMAL_PLACES: u32 = 6;

/// The digits after a decimal point, in `script` (ASCII when `None`): value and places.
fn decimals<'a>(input: &'a str, script: Option<&[char; 10]>) -> Res<'a, (u64, u32)> {
    let mut value = 0u64;
    let mut places = 0u32;
    let mut taken = 0;
    for c in input.chars() {
        let Some(digit) = digit_in(c, script) else {
            break;
        };
        places += 1;
        if places > MAX_DECIMAL_PLACES {
            return fail(
                input,
                taken + c.len_utf8(),
                NotationErrorKind::Limit,
                format!("a subscript with more than {MAX_DECIMAL_PLACES} decimal places"),
            );
        }
        value = value * 10 + digit;
        taken += c.len_utf8();
    }
    Ok((&input[taken..], (value, places)))
}

/// A fraction bar and denominator after the numerator of a subscript (`1/3` in
/// `LiNi1/3Mn1/3Co1/3O2`), in `script` (ASCII when `None`); `None` when no fraction follows.
fn fraction<'a>(
    start: &'a str,
    rest: &'a str,
    numerator: u64,
    script: Option<&[char; 10]>,
) -> Res<'a, Option<Count>> {
    let Some(after) = rest.strip_prefix('/') else {
        return Ok((rest, None));
    };
    if after
        .chars()
        .next()
        .and_then(|c| digit_in(c, script))
        .is_none()
    {
        return Ok((rest, None));
    }
    let max = super::LIMITS.max_count as u64;
    let (after, denominator) = number_in(after, script, max, "a subscript's denominator")?;
    match denominator {
        Some(0) | None => fail(
            start,
            start.len() - after.len(),
            NotationErrorKind::Syntax,
            "a subscript with a zero denominator",
        ),
        Some(d) => Ok((after, Some(Ratio::new(numerator, d)))),
    }
}

/// `whole.decimals` as an exact count, checked against the limit.
fn decimal_count<'a>(
    start: &'a str,
    rest: &'a str,
    whole: u64,
    (decimals, places): (u64, u32),
) -> Res<'a, Count> {
    let scale = 10u64.pow(places);
    let value = Ratio::new(whole * scale + decimals, scale);
    if value > Ratio::from_integer(super::LIMITS.max_count as u64) {
        return fail(
            start,
            start.len() - rest.len(),
            NotationErrorKind::Limit,
            format!(
                "a count is larger than the limit of {}",
                super::LIMITS.max_count
            ),
        );
    }
    Ok((rest, value))
}

/// A subscript after an element or group: ASCII digits, Unicode subscript digits, a decimal
/// (`0.8`, `1.25`, `₀.₅`, `_{2.5}`) or a fraction (`1/3`, `₁/₃`, `_{1/3}`). Returns the count
/// and whether ASCII digits of a whole number were written (only those can turn out to be a
/// charge, as in `Fe3+`).
///
/// A decimal point after ASCII digits is read as such only after `0` or `1` (`Li0.5CoO2`,
/// `Li1.2Mn0.6Ni0.2O2`): after larger digits it stays the adduct dot of `CuSO4.5H2O`. A
/// larger decimal is written in braces, `_{2.5}` (as mhchem does), or in subscript digits.
fn count(input: &str) -> Res<'_, (Count, bool)> {
    match plain_count(input) {
        Some(read) => Ok(read),
        None => any_count(input),
    }
}

/// [`count`] for every way of writing a subscript.
fn any_count(input: &str) -> Res<'_, (Count, bool)> {
    let max = super::LIMITS.max_count as u64;
    let zero = |rest: &str| {
        fail(
            input,
            input.len() - rest.len(),
            NotationErrorKind::Syntax,
            "a count of zero: leave the element out instead",
        )
    };
    if let Some(inner) = input.strip_prefix("_{") {
        let (rest, whole) = number_in(inner, None, max, "a count")?;
        let Some(whole) = whole else {
            return syntax(inner, "expected digits of a subscript after '_{'");
        };
        let (rest, value) = match rest.strip_prefix('.') {
            Some(after) => {
                let (after, digits) = decimals(after, None)?;
                if digits.1 == 0 {
                    return syntax(after, "expected digits after the decimal point");
                }
                decimal_count(input, after, whole, digits)?
            }
            None => match fraction(input, rest, whole, None)? {
                (after, Some(value)) => (after, value),
                (after, None) => (after, Ratio::from_integer(whole)),
            },
        };
        let Some(rest) = rest.strip_prefix('}') else {
            return syntax(rest, "expected '}' to close the subscript");
        };
        if value == Ratio::from_integer(0) {
            return zero(rest);
        }
        return Ok((rest, (value, false)));
    }
    let (rest, ascii) = number_in(input, None, max, "a count")?;
    let (rest, value, written_ascii, script) = match ascii {
        Some(v) => (rest, Some(v), true, None),
        None => {
            let (rest, sub) = number_in(input, Some(&SUBSCRIPTS), max, "a count")?;
            (rest, sub, false, Some(&SUBSCRIPTS))
        }
    };
    let Some(whole) = value else {
        return Ok((input, (Ratio::from_integer(1), false)));
    };
    // A decimal point: before subscript digits always, before ASCII digits after 0 or 1.
    if let Some(after) = rest.strip_prefix('.') {
        let next_is_digit = match script {
            None => after.starts_with(|c: char| c.is_ascii_digit()) && whole <= 1,
            Some(set) => after.chars().next().is_some_and(|c| set.contains(&c)),
        };
        if next_is_digit {
            let (after, digits) = decimals(after, script)?;
            let (after, value) = decimal_count(input, after, whole, digits)?;
            if value == Ratio::from_integer(0) {
                return zero(after);
            }
            return Ok((after, (value, false)));
        }
    }
    if let (after, Some(value)) = fraction(input, rest, whole, script)? {
        if value == Ratio::from_integer(0) {
            return zero(after);
        }
        return Ok((after, (value, false)));
    }
    if whole == 0 {
        return zero(rest);
    }
    Ok((rest, (Ratio::from_integer(whole), written_ascii)))
}

/// The usual subscripts, read straight from the bytes: none at all (the next byte is ASCII
/// and neither a digit nor `_`), or up to six ASCII digits with no decimal point, fraction bar
/// or subscript digit after them, and not zero. Exactly what [`count`]'s general reading gives
/// for such input; anything else (`None`) goes through it, with its errors.
fn plain_count(input: &str) -> Option<(&str, (Count, bool))> {
    let bytes = input.as_bytes();
    match bytes.first() {
        None => return Some((input, (Ratio::from_integer(1), false))),
        Some(b) if b.is_ascii() && !b.is_ascii_digit() && *b != b'_' => {
            return Some((input, (Ratio::from_integer(1), false)));
        }
        _ => {}
    }
    let digits = bytes
        .iter()
        .take(7)
        .take_while(|b| b.is_ascii_digit())
        .count();
    if digits == 0 || digits > 6 {
        return None;
    }
    match bytes.get(digits) {
        Some(b) if !b.is_ascii() || matches!(b, b'.' | b'/') => return None,
        _ => {}
    }
    let value = bytes[..digits]
        .iter()
        .fold(0u64, |v, b| v * 10 + u64::from(b - b'0'));
    (value != 0).then(|| (&input[digits..], (Ratio::from_integer(value), true)))
}

// ---------------------------------------------------------------- formulas

/// An element symbol: a capital letter and, if it makes a known symbol, one small letter.
fn element_symbol(input: &str) -> Res<'_, Element> {
    let bytes = input.as_bytes();
    match bytes.first() {
        Some(b) if b.is_ascii_uppercase() => {}
        Some(b) if b.is_ascii_lowercase() => {
            return syntax(
                input,
                format!(
                    "element symbols start with a capital letter, found {}",
                    describe(input)
                ),
            );
        }
        _ => return miss(input),
    }
    if let Some(second) = bytes.get(1).filter(|b| b.is_ascii_lowercase()) {
        let _ = second;
        return match Element::from_symbol(&input[..2]) {
            Some(element) => Ok((&input[2..], element)),
            None => fail(
                input,
                2,
                NotationErrorKind::UnknownElement,
                format!("no element has the symbol '{}'", &input[..2]),
            ),
        };
    }
    match Element::from_symbol(&input[..1]) {
        Some(element) => Ok((&input[1..], element)),
        None => fail(
            input,
            1,
            NotationErrorKind::UnknownElement,
            format!("no element has the symbol '{}'", &input[..1]),
        ),
    }
}

/// Where a unit's count came from, so that `Fe3+` can give its digits to the charge.
#[derive(Clone, Copy)]
struct LastCount {
    ascii_written: bool,
    value: u32,
}

impl LastCount {
    /// Only whole ASCII digits can be lent to a charge.
    fn of(count: Count, ascii_written: bool) -> LastCount {
        let whole = count.is_integer();
        LastCount {
            ascii_written: ascii_written && whole,
            value: if whole {
                u32::try_from(*count.numer()).unwrap_or(u32::MAX)
            } else {
                0
            },
        }
    }
}

/// Parsing context: the whole text (for spans) and the bracket depth.
#[derive(Clone, Copy)]
struct Ctx<'a> {
    text: &'a str,
}

impl<'a> Ctx<'a> {
    fn offset(&self, rest: &str) -> usize {
        self.text.len() - rest.len()
    }

    fn span(&self, from: &str, to: &str) -> Span {
        Span::new(self.offset(from), self.offset(to))
    }

    /// One element with its count, or a bracketed group with its count.
    fn unit(&self, input: &'a str, depth: usize) -> Res<'a, (Unit, LastCount)> {
        let open = match first_char(input) {
            Some('(') => Bracket::Round,
            Some('[') => Bracket::Square,
            _ => {
                let (rest, element) = element_symbol(input)?;
                let (rest, (count, ascii_written)) = count(rest)?;
                let unit = Unit::Atom {
                    element,
                    count,
                    span: self.span(input, rest),
                };
                return Ok((rest, (unit, LastCount::of(count, ascii_written))));
            }
        };
        // `(` before a small letter starts a ligand abbreviation (`(en)`), or else a state
        // label, not a group.
        if open == Bracket::Round && input[1..].starts_with(|c: char| c.is_ascii_lowercase()) {
            return match self.abbreviated_ligand(input) {
                Some(found) => Ok(found),
                None => miss(input),
            };
        }
        if depth >= super::LIMITS.max_nesting {
            return fail(
                input,
                1,
                NotationErrorKind::Limit,
                format!(
                    "brackets nest deeper than the limit of {}",
                    super::LIMITS.max_nesting
                ),
            );
        }
        let (inner, (body, _)) = self.body_with_last(&input[1..], depth + 1)?;
        let close = match open {
            Bracket::Round => ')',
            Bracket::Square => ']',
        };
        let Some(rest) = inner.strip_prefix(close) else {
            return fail(
                input,
                1,
                NotationErrorKind::Syntax,
                format!(
                    "this bracket is not closed: expected '{close}' before {}",
                    describe(inner)
                ),
            );
        };
        let (rest, (count, ascii_written)) = count(rest)?;
        let unit = Unit::Group {
            bracket: open,
            body,
            count,
            abbreviation: None,
            span: self.span(input, rest),
        };
        Ok((rest, (unit, LastCount::of(count, ascii_written))))
    }

    /// `(en)3` and the like: a ligand abbreviation of [`LIGAND_ABBREVIATIONS`] in round
    /// brackets, read as the group of its formula's atoms (each with the abbreviation's span)
    /// that keeps the abbreviation for writing back. `None` when the word is no abbreviation.
    fn abbreviated_ligand(&self, input: &'a str) -> Option<(&'a str, (Unit, LastCount))> {
        let word_end = input[1..]
            .find(|c: char| !c.is_ascii_lowercase())
            .map(|i| i + 1)?;
        let after = input[word_end..].strip_prefix(')')?;
        let (abbreviation, body) = ligand_abbreviation(&input[1..word_end])?;
        let (rest, (count, ascii_written)) = count(after).ok()?;
        let span = self.span(input, rest);
        let body = body
            .iter()
            .map(|unit| match unit {
                Unit::Atom { element, count, .. } => Unit::Atom {
                    element: *element,
                    count: *count,
                    span,
                },
                group => group.clone(),
            })
            .collect();
        let unit = Unit::Group {
            bracket: Bracket::Round,
            body,
            count,
            abbreviation: Some(abbreviation),
            span,
        };
        Some((rest, (unit, LastCount::of(count, ascii_written))))
    }

    /// One or more units, and how the last one's count was written.
    fn body_with_last(
        &self,
        input: &'a str,
        depth: usize,
    ) -> Res<'a, (Vec<Unit>, Option<LastCount>)> {
        let mut units = Vec::new();
        let mut last = None;
        let mut rest = input;
        loop {
            match self.unit(rest, depth) {
                Ok((next, (unit, count))) => {
                    units.push(unit);
                    last = Some(count);
                    rest = next;
                }
                Err(nom::Err::Error(_)) => break,
                Err(e) => return Err(e),
            }
        }
        if units.is_empty() {
            let message = match first_char(rest) {
                Some(')') | Some(']') => "empty brackets: expected an element symbol".to_owned(),
                _ => format!("expected an element symbol, found {}", describe(rest)),
            };
            return syntax(rest, message);
        }
        Ok((rest, (units, last)))
    }

    /// The components of a formula: a body, then adducts after `·`, `*`, `•` or `.`.
    fn components(&self, input: &'a str) -> Res<'a, (Components, Option<LastCount>)> {
        let (mut rest, (body, mut last)) = self.body_with_last(input, 0)?;
        let mut components = Components::new();
        components.push(Component {
            multiplier: 1,
            body,
        });
        while let Some(dot) = first_char(rest).filter(|c| matches!(c, '·' | '*' | '•' | '.')) {
            let after_dot = &rest[dot.len_utf8()..];
            let (after_count, multiplier) = match number_in(
                after_dot,
                None,
                super::LIMITS.max_count as u64,
                "an adduct multiplier",
            )? {
                (_, Some(0)) => {
                    return fail(
                        after_dot,
                        1,
                        NotationErrorKind::Syntax,
                        "a multiplier of zero",
                    );
                }
                (r, Some(m)) => (r, m as u32),
                (r, None) => (r, 1),
            };
            let (next, (body, body_last)) = self.body_with_last(after_count, 0)?;
            components.push(Component { multiplier, body });
            last = body_last;
            rest = next;
        }
        Ok((rest, (components, last)))
    }

    /// A formula with its charge, or the electron, then optional state and compartment labels.
    fn species(&self, input: &'a str) -> Res<'a, Species> {
        if let Some((rest, ())) = electron(input)? {
            let (after, (state, compartment)) = labels(rest)?;
            if compartment.is_some() {
                let at = rest.trim_start();
                return fail(
                    at,
                    at.len() - after.len(),
                    NotationErrorKind::Syntax,
                    "the electron is in no compartment: label the ions instead",
                );
            }
            let rest = after;
            return Ok((
                rest,
                Species {
                    kind: SpeciesKind::Electron,
                    state,
                    compartment: None,
                    composition: Composition::charged(-1),
                    span: self.span(input, rest),
                },
            ));
        }
        let (after_body, (mut components, last)) = self.components(input)?;
        let single_atom = components.len() == 1
            && components[0].body.len() == 1
            && matches!(components[0].body[0], Unit::Atom { .. });
        let square_end = components.len() == 1
            && matches!(
                components[0].body.last(),
                Some(Unit::Group {
                    bracket: Bracket::Square,
                    ..
                })
            );
        // Digits that may belong to the charge (`Fe3+`, `[Fe(CN)6]4-`).
        let lendable = last
            .filter(|l| l.ascii_written && (single_atom || square_end))
            .map(|l| l.value);
        let (rest, charge) = charge(after_body, lendable)?;
        if let Charge::Borrowed(_) = charge {
            match components[0].body.last_mut() {
                Some(Unit::Atom { count, .. }) | Some(Unit::Group { count, .. }) => {
                    *count = Ratio::from_integer(1)
                }
                None => {}
            }
        }
        let charge_value = charge.value();
        if charge_value.unsigned_abs() > super::LIMITS.max_charge {
            return fail(
                after_body,
                after_body.len() - rest.len(),
                NotationErrorKind::Limit,
                format!(
                    "a charge larger than the limit of {}",
                    super::LIMITS.max_charge
                ),
            );
        }
        let formula = Formula {
            components,
            charge: charge_value,
        };
        let composition = match composition_of(&formula) {
            Some(c) => c,
            None => {
                return fail(
                    input,
                    input.len() - rest.len(),
                    NotationErrorKind::Limit,
                    "atom counts in this formula overflow 64 bits",
                );
            }
        };
        // Protons per `denominator` formula units, like the counts.
        let protons: u64 = composition
            .counts()
            .iter()
            .map(|&(e, n)| (e.atomic_number() as u64).saturating_mul(n))
            .fold(0, u64::saturating_add);
        let denominator = composition.denominator();
        if charge_value > 0 && (charge_value as u64).saturating_mul(denominator) > protons {
            let protons = crate::composition::decimal_text(&Ratio::new(protons, denominator));
            return fail(
                input,
                input.len() - rest.len(),
                NotationErrorKind::Chemistry,
                format!(
                    "a charge of +{charge_value} is more than the {protons} protons this formula has"
                ),
            );
        }
        let (rest, (state, compartment)) = labels(rest)?;
        Ok((
            rest,
            Species {
                kind: SpeciesKind::Formula(Arc::new(formula)),
                state,
                compartment,
                composition,
                span: self.span(input, rest),
            },
        ))
    }

    /// An optional coefficient, optional spaces, then a species.
    fn term(&self, input: &'a str) -> Res<'a, Term> {
        let (rest, coefficient) = coefficient(input)?;
        let after_ws = if coefficient.is_some() {
            rest.trim_start()
        } else {
            rest
        };
        if coefficient.is_some() && !starts_species(after_ws) {
            return syntax(
                after_ws,
                format!(
                    "expected a formula after the coefficient, found {}",
                    describe(after_ws)
                ),
            );
        }
        if !starts_species(after_ws) {
            return syntax(
                after_ws,
                format!("expected a formula, found {}", describe(after_ws)),
            );
        }
        let (rest, species) = self.species(after_ws)?;
        Ok((
            rest,
            Term {
                coefficient: coefficient.unwrap_or_else(|| Ratio::from_integer(1)),
                species,
                span: self.span(input, rest),
            },
        ))
    }

    /// Terms separated by `+`. `side` names the side in messages.
    fn terms(&self, input: &'a str, side: &str) -> Res<'a, Vec<Term>> {
        let mut rest = input.trim_start();
        if rest.is_empty() || arrow(rest).is_ok() {
            return syntax(rest, format!("the {side} is empty"));
        }
        let mut terms = Vec::new();
        loop {
            if terms.len() >= super::LIMITS.max_terms {
                return fail(
                    rest,
                    rest.len(),
                    NotationErrorKind::Limit,
                    format!("more than {} species", super::LIMITS.max_terms),
                );
            }
            let (next, term) = self.term(rest)?;
            terms.push(term);
            let after = next.trim_start();
            match after.strip_prefix('+') {
                Some(more) => {
                    let more = more.trim_start();
                    if more.is_empty() || arrow(more).is_ok() {
                        return syntax(
                            after,
                            "a '+' with nothing after it: expected another species",
                        );
                    }
                    rest = more;
                }
                None => return Ok((next, terms)),
            }
        }
    }
}

/// The count lent to a charge, or the charge written on its own.
enum Charge {
    None,
    Written(i32),
    /// `Fe3+`: the digits read as a count are the charge magnitude.
    Borrowed(i32),
}

impl Charge {
    fn value(&self) -> i32 {
        match *self {
            Charge::None => 0,
            Charge::Written(z) | Charge::Borrowed(z) => z,
        }
    }
}

fn is_sign(c: char) -> bool {
    matches!(c, '+' | '-' | '−')
}

fn sign_of(c: char) -> i32 {
    if c == '+' { 1 } else { -1 }
}

/// True where a species may end: end of text, space, state label or arrow.
fn ends_species(rest: &str) -> bool {
    match first_char(rest) {
        None => true,
        Some(c) if c.is_whitespace() => true,
        Some('(') => rest[1..].starts_with(|c: char| c.is_ascii_lowercase()),
        Some(_) => arrow(rest).is_ok(),
    }
}

/// True where a term may start: a digit, a capital letter, a bracket, or the electron.
fn starts_species(rest: &str) -> bool {
    match first_char(rest) {
        Some(c) if c.is_ascii_uppercase() || c == '(' || c == '[' => true,
        Some('e') => true,
        _ => false,
    }
}

fn starts_term(rest: &str) -> bool {
    starts_species(rest) || rest.starts_with(|c: char| c.is_ascii_digit() || c == '.')
}

/// The contents of a caret or brace charge: `2-`, `-2`, `-`, `--`, `+`.
fn charge_body(input: &str) -> Res<'_, i32> {
    let max = super::LIMITS.max_charge as u64;
    let (rest, digits) = number_in(input, None, max, "a charge")?;
    if let Some(magnitude) = digits {
        return match first_char(rest).filter(|&c| is_sign(c)) {
            Some(sign) => Ok((&rest[sign.len_utf8()..], sign_of(sign) * magnitude as i32)),
            None => syntax(rest, "expected '+' or '-' after the charge number"),
        };
    }
    let Some(sign) = first_char(input).filter(|&c| is_sign(c)) else {
        return syntax(input, "expected a charge such as 2+, 3- or -");
    };
    let after = &input[sign.len_utf8()..];
    let (rest, digits) = number_in(after, None, max, "a charge")?;
    if let Some(magnitude) = digits {
        return Ok((rest, sign_of(sign) * magnitude as i32));
    }
    let run = after.chars().take_while(|&c| c == sign).count();
    let rest = &after[run * sign.len_utf8()..];
    Ok((rest, sign_of(sign) * (run as i32 + 1)))
}

/// The charge written after a formula, in any of the accepted forms.
fn charge(input: &str, lendable: Option<u32>) -> Res<'_, Charge> {
    let Some(c) = first_char(input) else {
        return Ok((input, Charge::None));
    };
    match c {
        '^' => {
            let after = &input[1..];
            let (rest, z) = if let Some(inner) = after.strip_prefix('{') {
                let (rest, z) = charge_body(inner)?;
                match rest.strip_prefix('}') {
                    Some(rest) => (rest, z),
                    None => return syntax(rest, "expected '}' to close the charge"),
                }
            } else {
                charge_body(after)?
            };
            Ok((rest, Charge::Written(z)))
        }
        '{' => {
            let (rest, z) = charge_body(&input[1..])?;
            match rest.strip_prefix('}') {
                Some(rest) => Ok((rest, Charge::Written(z))),
                None => syntax(rest, "expected '}' to close the charge"),
            }
        }
        '⁺' | '⁻' | '⁰'..='⁹' | '¹' | '²' | '³' => {
            let max = super::LIMITS.max_charge as u64;
            let (rest, magnitude) = number_in(input, Some(&SUPERSCRIPTS), max, "a charge")?;
            match first_char(rest) {
                Some(s @ ('⁺' | '⁻')) => {
                    let sign = if s == '⁺' { 1 } else { -1 };
                    let rest = &rest[s.len_utf8()..];
                    let magnitude = match magnitude {
                        Some(m) => m as i32,
                        None => {
                            let run = rest.chars().take_while(|&r| r == s).count();
                            return Ok((
                                &rest[run * s.len_utf8()..],
                                Charge::Written(sign * (run as i32 + 1)),
                            ));
                        }
                    };
                    Ok((rest, Charge::Written(sign * magnitude)))
                }
                _ => syntax(
                    rest,
                    "expected a superscript sign ⁺ or ⁻ after the charge digits",
                ),
            }
        }
        '+' | '-' | '−' => {
            // `->` is the arrow, not a charge.
            if c == '-' && input[1..].starts_with('>') {
                return Ok((input, Charge::None));
            }
            let run_chars = input.chars().take_while(|&r| r == c).count();
            let mut run_len = run_chars * c.len_utf8();
            let mut run = run_chars as i32;
            // A run of `-` must not swallow the `-` of a following `->`.
            if c == '-' && input[run_len..].starts_with('>') {
                run -= 1;
                run_len -= 1;
            }
            let after = &input[run_len..];
            let sign = sign_of(c);
            // `Fe+3`: a sign, then digits, then the species ends.
            if run == 1 && after.starts_with(|d: char| d.is_ascii_digit()) {
                let max = super::LIMITS.max_charge as u64;
                let (rest, digits) = number_in(after, None, u64::MAX / 10, "a charge")?;
                if ends_species(rest) || (c != '+' && rest.starts_with('+')) {
                    if lendable.is_some() {
                        return syntax(
                            input,
                            "two charges written: use one form, e.g. Fe3+ or Fe+3",
                        );
                    }
                    let magnitude = digits.unwrap_or(0);
                    if magnitude > max {
                        return fail(
                            after,
                            after.len() - rest.len(),
                            NotationErrorKind::Limit,
                            format!("a charge larger than the limit of {max}"),
                        );
                    }
                    return Ok((rest, Charge::Written(sign * magnitude as i32)));
                }
                if c == '+' {
                    // `2Fe+3Cl2`: the `+` separates, the digits are the next coefficient.
                    return Ok((input, Charge::None));
                }
                return syntax(
                    input,
                    "a '-' between two formulas: separate species with ' + '",
                );
            }
            let ends = ends_species(after) || (c != '+' && after.starts_with('+'));
            if ends {
                return Ok(match (lendable, run) {
                    (Some(count), 1) => (after, Charge::Borrowed(sign * count as i32)),
                    (Some(_), _) => {
                        return syntax(
                            input,
                            "ambiguous charge: digits and repeated signs; write e.g. Fe^3+ or Fe3^2+",
                        );
                    }
                    (None, _) => (after, Charge::Written(sign * run)),
                });
            }
            if c == '+' && starts_term(after) {
                if run == 1 {
                    return Ok((input, Charge::None));
                }
                return syntax(
                    input,
                    "ambiguous '+' signs between formulas: write spaces around the '+' that separates species",
                );
            }
            if c != '+' && starts_term(after) {
                return syntax(
                    input,
                    "a '-' between two formulas: separate species with ' + '",
                );
            }
            syntax(
                after,
                format!("unexpected {} after the charge", describe(after)),
            )
        }
        _ => Ok((input, Charge::None)),
    }
}

/// `e-` and its other spellings; `None` when the input does not start with the electron.
fn electron(input: &str) -> Result<Option<(&str, ())>, nom::Err<PErr<'_>>> {
    let Some(after) = input.strip_prefix('e') else {
        return Ok(None);
    };
    for form in ["-", "^-", "⁻", "^{-}", "{-}", "−", "^−"] {
        if let Some(rest) = after.strip_prefix(form) {
            // `e->` reads as `e` then the arrow.
            if form == "-" && rest.starts_with('>') {
                break;
            }
            return Ok(Some((rest, ())));
        }
    }
    Err(nom::Err::Failure(PErr {
        at: input,
        len: 1,
        kind: NotationErrorKind::Syntax,
        message: Cow::Borrowed(
            "write the electron as e- (element symbols start with a capital letter)",
        ),
    }))
}

/// A label read after a species.
enum Label {
    State(State),
    Compartment(Compartment),
}

/// An optional label after optional spaces: a state `(s)`, `(l)`, `(g)`, `(aq)`, `(cr)` or a
/// compartment `(cathode)`, `(anode)`.
fn label(input: &str) -> Res<'_, Option<Label>> {
    let trimmed = input.trim_start();
    let Some(inner) = trimmed.strip_prefix('(') else {
        return Ok((input, None));
    };
    if !inner.starts_with(|c: char| c.is_ascii_lowercase()) {
        return Ok((input, None));
    }
    let label_len = inner
        .find(|c: char| !c.is_ascii_lowercase())
        .unwrap_or(inner.len());
    let label = &inner[..label_len];
    let after = &inner[label_len..];
    let read = State::from_label(label)
        .map(Label::State)
        .or_else(|| Compartment::from_label(label).map(Label::Compartment));
    match (read, after.strip_prefix(')')) {
        (Some(read), Some(rest)) => Ok((rest, Some(read))),
        _ => fail(
            trimmed,
            label_len + 1 + usize::from(after.starts_with(')')),
            NotationErrorKind::Syntax,
            format!(
                "unknown state label '({label})': use (s), (l), (g), (aq) or (cr), or a compartment (cathode) or (anode); a ligand abbreviation in a formula is one of {}",
                LIGAND_ABBREVIATIONS.map(|(a, _)| a).join(", ")
            ),
        ),
    }
}

/// An optional state label, then an optional compartment label: `Cu2+(aq)(anode)`.
fn labels(input: &str) -> Res<'_, (Option<State>, Option<Compartment>)> {
    let (rest, first) = label(input)?;
    match first {
        None => Ok((rest, (None, None))),
        Some(Label::Compartment(c)) => match label(rest) {
            Ok((_, Some(Label::State(_)))) => {
                let at = rest.trim_start();
                let len = at.find(')').map_or(at.len(), |i| i + 1);
                fail(
                    at,
                    len,
                    NotationErrorKind::Syntax,
                    "the state label comes before the compartment: write Cu2+(aq)(anode)",
                )
            }
            _ => Ok((rest, (None, Some(c)))),
        },
        Some(Label::State(state)) => {
            let (after, second) = label(rest)?;
            match second {
                None => Ok((rest, (Some(state), None))),
                Some(Label::Compartment(c)) => Ok((after, (Some(state), Some(c)))),
                Some(Label::State(_)) => {
                    let at = rest.trim_start();
                    let len = at.find(')').map_or(at.len(), |i| i + 1);
                    fail(
                        at,
                        len,
                        NotationErrorKind::Syntax,
                        "a second state label: a species has one state",
                    )
                }
            }
        }
    }
}

/// An optional coefficient: `2`, `1/2`, `0.5`, `.5`.
fn coefficient(input: &str) -> Res<'_, Option<Ratio<u64>>> {
    let max = super::LIMITS.max_coefficient;
    let (rest, whole) = number_in(input, None, max, "a coefficient")?;
    let (rest, value) = if let Some(fraction) = rest.strip_prefix('.') {
        let (after, digits) = number_in(fraction, None, max, "a coefficient")?;
        let Some(decimals) = digits else {
            return syntax(fraction, "expected digits after the decimal point");
        };
        let places = (fraction.len() - after.len()) as u32;
        let scale = 10u64.pow(places.min(12));
        if places > 12 {
            return fail(
                fraction,
                places as usize,
                NotationErrorKind::Limit,
                "a coefficient with more than 12 decimal places",
            );
        }
        let whole = whole.unwrap_or(0);
        match whole
            .checked_mul(scale)
            .and_then(|w| w.checked_add(decimals))
        {
            Some(n) if n <= max => (after, Some(Ratio::new(n, scale))),
            _ => {
                return fail(
                    input,
                    input.len() - after.len(),
                    NotationErrorKind::Limit,
                    "a coefficient larger than the limit",
                );
            }
        }
    } else if let (Some(numerator), Some(denominator_text)) = (whole, rest.strip_prefix('/')) {
        let (after, denominator) = number_in(denominator_text, None, max, "a coefficient")?;
        match denominator {
            Some(0) => return syntax(denominator_text, "a coefficient with a zero denominator"),
            Some(d) => (after, Some(Ratio::new(numerator, d))),
            None => return syntax(denominator_text, "expected a denominator after '/'"),
        }
    } else {
        (rest, whole.map(Ratio::from_integer))
    };
    if value.is_some_and(|v| v == Ratio::from_integer(0)) {
        return syntax(
            input,
            "a coefficient of zero: leave the species out instead",
        );
    }
    Ok((rest, value))
}

/// The arrow between the sides.
fn arrow(input: &str) -> Res<'_, Arrow> {
    const ARROWS: [(&str, Arrow); 8] = [
        ("<=>", Arrow::Equilibrium),
        ("<->", Arrow::Equilibrium),
        ("⇌", Arrow::Equilibrium),
        ("⇄", Arrow::Equilibrium),
        ("->", Arrow::Forward),
        ("→", Arrow::Forward),
        ("⟶", Arrow::Forward),
        ("=", Arrow::Equals),
    ];
    for (text, kind) in ARROWS {
        if let Some(rest) = input.strip_prefix(text) {
            return Ok((rest, kind));
        }
    }
    miss(input)
}

// ---------------------------------------------------------------- composition

fn composition_of(formula: &Formula) -> Option<Composition> {
    let mut composition = Composition::charged(formula.charge as i64);
    for component in &formula.components {
        add_units(
            &mut composition,
            &component.body,
            Ratio::from_integer(component.multiplier as u64),
        )?;
    }
    Some(composition)
}

fn add_units(composition: &mut Composition, units: &[Unit], multiplier: Count) -> Option<()> {
    for unit in units {
        match unit {
            // Whole numbers, the usual case, stay in integer arithmetic.
            Unit::Atom { element, count, .. } if count.is_integer() && multiplier.is_integer() => {
                composition.add(*element, count.numer().checked_mul(*multiplier.numer())?)?;
            }
            Unit::Atom { element, count, .. } => {
                composition.add_exact(*element, checked_product(count, &multiplier)?)?;
            }
            Unit::Group { body, count, .. } => {
                add_units(composition, body, checked_product(count, &multiplier)?)?;
            }
        }
    }
    Some(())
}

fn checked_product(a: &Count, b: &Count) -> Option<Count> {
    use num_traits::CheckedMul;
    a.checked_mul(b)
}

// ---------------------------------------------------------------- entry points

fn check_length(text: &str) -> Result<(), NotationError> {
    let max = super::LIMITS.max_input_bytes;
    if text.len() > max {
        let mut start = max;
        while !text.is_char_boundary(start) {
            start -= 1;
        }
        return Err(NotationError::new(
            NotationErrorKind::Limit,
            format!("input longer than the limit of {max} bytes"),
            Span::new(start, text.len()),
            text,
        ));
    }
    Ok(())
}

fn convert(text: &str, error: nom::Err<PErr<'_>>) -> NotationError {
    match error {
        nom::Err::Error(e) | nom::Err::Failure(e) => {
            let start = text.len() - e.at.len();
            NotationError::new(e.kind, e.message, Span::new(start, start + e.len), text)
        }
        nom::Err::Incomplete(_) => NotationError::new(
            NotationErrorKind::Syntax,
            "unexpected end of input",
            Span::new(text.len(), text.len()),
            text,
        ),
    }
}

fn trailing(text: &str, rest: &str, what: &str) -> NotationError {
    let start = text.len() - rest.len();
    let len = rest.chars().next().map_or(0, char::len_utf8);
    let message = if rest.starts_with('+') || rest.starts_with('-') {
        format!("unexpected {} after {what}", describe(rest))
    } else if arrow(rest).is_ok() {
        "a second arrow: an equation has exactly two sides".to_owned()
    } else {
        format!(
            "unexpected {} after {what}: expected ' + ' or an arrow",
            describe(rest)
        )
    };
    NotationError::new(
        NotationErrorKind::Syntax,
        message,
        Span::new(start, start + len),
        text,
    )
}

/// Reads one species, such as `SO4^2-`, `Fe³⁺`, `CuSO4·5H2O(s)` or `e-`. Spaces around it are
/// ignored.
pub fn parse_species(text: &str) -> Result<Species, NotationError> {
    check_length(text)?;
    let ctx = Ctx { text };
    let start = text.trim_start();
    if start.is_empty() {
        return Err(NotationError::new(
            NotationErrorKind::Syntax,
            "empty input: expected a formula",
            Span::new(0, text.len()),
            text,
        ));
    }
    if !starts_species(start) {
        return Err(convert(
            text,
            syntax::<()>(
                start,
                format!("expected a formula, found {}", describe(start)),
            )
            .unwrap_err(),
        ));
    }
    let (rest, species) = ctx.species(start).map_err(|e| convert(text, e))?;
    let rest = rest.trim_start();
    if !rest.is_empty() {
        return Err(trailing(text, rest, "the species"));
    }
    Ok(species)
}

/// Reads an equation or half-reaction: `MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O`.
pub fn parse_equation(text: &str) -> Result<Equation, NotationError> {
    match parse_input(text)? {
        Input::Equation(equation) => Ok(equation),
        Input::Species(_) => {
            let end = text.trim_end().len();
            Err(NotationError::new(
                NotationErrorKind::Syntax,
                "no arrow: an equation needs ->, =, <=> or → between its sides",
                Span::new(end, end),
                text,
            ))
        }
    }
}

/// Reads whatever `couplet parse` accepts: species separated by `+`, or an equation.
pub fn parse_input(text: &str) -> Result<Input, NotationError> {
    check_length(text)?;
    let ctx = Ctx { text };
    if text.trim().is_empty() {
        return Err(NotationError::new(
            NotationErrorKind::Syntax,
            "empty input: expected a formula or an equation",
            Span::new(0, text.len()),
            text,
        ));
    }
    let (rest, reactants) = ctx.terms(text, "left side").map_err(|e| convert(text, e))?;
    let rest = rest.trim_start();
    if rest.is_empty() {
        return Ok(Input::Species(reactants));
    }
    let Ok((after_arrow, arrow)) = arrow(rest) else {
        return Err(trailing(text, rest, "the species"));
    };
    let (rest, products) = ctx
        .terms(after_arrow, "right side")
        .map_err(|e| convert(text, e))?;
    let rest = rest.trim_start();
    if !rest.is_empty() {
        return Err(trailing(text, rest, "the right side"));
    }
    Ok(Input::Equation(Equation {
        reactants,
        products,
        arrow,
    }))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The byte-level reading of plain subscripts agrees with the general one wherever it
    /// answers: on every string of up to four characters from digits, the decimal point, the
    /// fraction bar, braces, a subscript digit, a letter and the end.
    #[test]
    fn plain_counts_read_as_the_general_reading_does() {
        let alphabet = [
            "0", "1", "2", "9", ".", "/", "_", "{", "}", "₂", "O", "+", "(", " ",
        ];
        let mut texts: Vec<String> = vec![String::new()];
        for _ in 0..4 {
            let longer: Vec<String> = texts
                .iter()
                .flat_map(|t| alphabet.iter().map(move |c| format!("{t}{c}")))
                .collect();
            texts.extend(longer);
        }
        texts.extend(["999999O", "1000000", "9999999", "000001H", "12345/"].map(String::from));
        let mut answered = 0;
        for text in &texts {
            if let Some(plain) = plain_count(text) {
                let general = any_count(text).unwrap_or_else(|_| panic!("{text:?}"));
                assert_eq!(plain, general, "{text:?}");
                answered += 1;
            }
        }
        assert!(answered > 10_000, "{answered}");
    }
}

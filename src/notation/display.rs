//! Writing species and equations back out: canonical ASCII (read back by the parser),
//! Unicode for terminals, and the body of an mhchem `\ce{}` macro for LaTeX.

use super::{
    Arrow, Bracket, Component, Count, Equation, Formula, Species, SpeciesKind, Term, Unit,
};
use crate::composition::decimal_text_within;
use num_rational::Ratio;
use std::fmt::Write;

/// Which written form.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Style {
    /// `SO4^2-`, `Fe3+`, `CuSO4*5H2O`, `->`: the canonical form, parsed back unchanged.
    Ascii,
    /// `SO₄²⁻`, `Fe³⁺`, `CuSO₄·5H₂O`, `→`: also parsed back.
    Unicode,
    /// `SO4^2-`, `Fe^3+`, for inside `\ce{…}` (charges always behind a caret).
    Mhchem,
}

const SUBSCRIPTS: [char; 10] = ['₀', '₁', '₂', '₃', '₄', '₅', '₆', '₇', '₈', '₉'];
const SUPERSCRIPTS: [char; 10] = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];

fn write_number(out: &mut String, value: u64, digits: Option<&[char; 10]>) {
    match digits {
        None => {
            let _ = write!(out, "{value}");
        }
        Some(set) => {
            for c in value.to_string().bytes() {
                out.push(set[(c - b'0') as usize]);
            }
        }
    }
}

fn write_count(out: &mut String, count: Count, style: Style) {
    if count.is_integer() {
        if *count.numer() != 1 {
            let digits = (style == Style::Unicode).then_some(&SUBSCRIPTS);
            write_number(out, *count.numer(), digits);
        }
        return;
    }
    // Decimals: `0.8` and `1.25` plain in ASCII (the parser reads a point after 0 or 1 as a
    // decimal point), larger ones and mhchem in braces, Unicode in subscript digits.
    // Fractions that are no decimal (`1/3`) plain in ASCII, braced in mhchem.
    // No longer a decimal than the parser reads (`1/256` stays a fraction), so that canonical
    // text always reads back.
    let text = decimal_text_within(&count, super::parse::MAX_DECIMAL_PLACES);
    let is_fraction = text.contains('/');
    match style {
        Style::Unicode => {
            for c in text.chars() {
                match c.to_digit(10) {
                    Some(d) => out.push(SUBSCRIPTS[d as usize]),
                    None => out.push(c),
                }
            }
        }
        Style::Ascii if is_fraction || count < Ratio::from_integer(2) => out.push_str(&text),
        _ => {
            let _ = write!(out, "_{{{text}}}");
        }
    }
}

fn write_units(out: &mut String, units: &[Unit], style: Style) {
    for unit in units {
        match unit {
            Unit::Atom { element, count, .. } => {
                out.push_str(element.symbol());
                write_count(out, *count, style);
            }
            Unit::Group {
                bracket,
                body,
                count,
                abbreviation,
                ..
            } => {
                let (open, close) = match bracket {
                    Bracket::Round => ('(', ')'),
                    Bracket::Square => ('[', ']'),
                };
                out.push(open);
                match abbreviation {
                    // Written back as the user wrote it: `[Co(en)3]^3+`.
                    Some(abbreviation) => out.push_str(abbreviation),
                    None => write_units(out, body, style),
                }
                out.push(close);
                write_count(out, *count, style);
            }
        }
    }
}

fn write_components(out: &mut String, components: &[Component], style: Style) {
    for (i, component) in components.iter().enumerate() {
        if i > 0 {
            out.push(if style == Style::Unicode { '·' } else { '*' });
            if component.multiplier != 1 {
                write_number(out, component.multiplier as u64, None);
            }
        }
        write_units(out, &component.body, style);
    }
}

/// Whether digits written straight before a sign would be read as this formula's charge
/// (see the parser's rules), and whether its last count shows digits.
fn digits_lend_to_charge(formula: &Formula) -> (bool, bool) {
    if formula.components.len() != 1 {
        return (false, false);
    }
    let body = &formula.components[0].body;
    match body.last() {
        Some(Unit::Atom { count, .. }) if body.len() == 1 => (true, *count != Count::from(1)),
        Some(Unit::Group {
            bracket: Bracket::Square,
            count,
            ..
        }) => (true, *count != Count::from(1)),
        _ => (false, false),
    }
}

fn write_charge(out: &mut String, formula: &Formula, style: Style) {
    let z = formula.charge;
    if z == 0 {
        return;
    }
    let sign = if z > 0 { '+' } else { '-' };
    let magnitude = z.unsigned_abs();
    match style {
        Style::Unicode => {
            if magnitude != 1 {
                write_number(out, magnitude as u64, Some(&SUPERSCRIPTS));
            }
            out.push(if z > 0 { '⁺' } else { '⁻' });
        }
        Style::Mhchem => {
            out.push('^');
            if magnitude != 1 {
                write_number(out, magnitude as u64, None);
            }
            out.push(sign);
        }
        Style::Ascii => {
            let (lends, shows_digits) = digits_lend_to_charge(formula);
            if magnitude == 1 {
                if lends && shows_digits {
                    out.push('^');
                }
                out.push(sign);
            } else {
                if !lends || shows_digits {
                    out.push('^');
                }
                write_number(out, magnitude as u64, None);
                out.push(sign);
            }
        }
    }
}

/// Writes one species in the given style.
pub fn species_to_string(species: &Species, style: Style) -> String {
    let mut out = String::new();
    write_species(&mut out, species, style);
    out
}

pub(crate) fn write_species(out: &mut String, species: &Species, style: Style) {
    match &species.kind {
        SpeciesKind::Electron => out.push_str(if style == Style::Unicode {
            "e⁻"
        } else {
            "e-"
        }),
        SpeciesKind::Formula(formula) => {
            write_components(out, &formula.components, style);
            write_charge(out, formula, style);
        }
    }
    if let Some(state) = species.state {
        out.push('(');
        out.push_str(state.label());
        out.push(')');
    }
    if let Some(compartment) = species.compartment {
        out.push('(');
        out.push_str(compartment.label());
        out.push(')');
    }
}

/// Writes a coefficient: nothing for 1, `2`, `1/2`.
pub(crate) fn write_coefficient(out: &mut String, coefficient: &Ratio<u64>) {
    if *coefficient == Ratio::from_integer(1) {
        return;
    }
    if coefficient.is_integer() {
        let _ = write!(out, "{} ", coefficient.numer());
    } else {
        let _ = write!(out, "{}/{} ", coefficient.numer(), coefficient.denom());
    }
}

fn write_side(out: &mut String, terms: &[Term], style: Style) {
    for (i, term) in terms.iter().enumerate() {
        if i > 0 {
            out.push_str(" + ");
        }
        write_coefficient(out, &term.coefficient);
        write_species(out, &term.species, style);
    }
}

/// The arrow in a given style.
pub(crate) fn arrow_text(arrow: Arrow, style: Style) -> &'static str {
    match (style, arrow) {
        (Style::Unicode, Arrow::Forward) => "→",
        (Style::Unicode, Arrow::Equilibrium) => "⇌",
        (Style::Mhchem, Arrow::Equals) => "->",
        (_, arrow) => arrow.ascii(),
    }
}

/// Writes an equation in the given style (mhchem without the `\ce{}` wrapper).
pub fn equation_to_string(equation: &Equation, style: Style) -> String {
    let mut out = String::new();
    write_side(&mut out, &equation.reactants, style);
    out.push(' ');
    out.push_str(arrow_text(equation.arrow, style));
    out.push(' ');
    write_side(&mut out, &equation.products, style);
    out
}

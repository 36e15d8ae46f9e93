//! `couplet parse`: how an input was read.

use super::failure::Failure;
use super::{EXIT_OK, argument_or_stdin, print_json};
use couplet::composition::{Composition, decimal_text};
use couplet::notation::{Input, Species, Term, parse_input};
use num_rational::Ratio;
use serde_json::{Value, json};
use std::io::{self, Write};

#[derive(clap::Args)]
pub struct ParseArgs {
    /// A formula (SO4^2-), species joined by + (H2O + CO2), or an equation; - reads standard input
    input: String,
    /// Print JSON instead of a table
    #[arg(long)]
    json: bool,
}

pub fn run(args: &ParseArgs, out: &mut dyn Write) -> io::Result<u8> {
    let text = match argument_or_stdin(&args.input) {
        Ok(text) => text,
        Err(message) => return Failure::usage(message).report(out, args.json),
    };
    let text = text.trim_end_matches(['\n', '\r']);
    match parse_input(text) {
        Ok(input) => {
            if args.json {
                print_json(out, &input_json(&input, text))?;
            } else {
                write!(out, "{}", input_table(&input))?;
            }
            Ok(EXIT_OK)
        }
        Err(error) => Failure::from(&error).report(out, args.json),
    }
}

fn coefficient_text(c: &Ratio<u64>) -> String {
    if c.is_integer() {
        c.numer().to_string()
    } else {
        format!("{}/{}", c.numer(), c.denom())
    }
}

/// The JSON object of one species (schema in the README).
pub fn species_json(species: &Species, coefficient: &Ratio<u64>, input_text: &str) -> Value {
    // Whole counts as JSON integers; non-integer ones as the decimal they are (Li0.5CoO2), or
    // as a string when they are no decimal ("1/3").
    let elements: serde_json::Map<String, Value> = species
        .composition
        .exact_counts()
        .map(|(e, n)| {
            let value = if n.is_integer() {
                json!(n.numer())
            } else {
                let text = decimal_text(&n);
                text.parse::<serde_json::Number>()
                    .map_or(json!(text), Value::Number)
            };
            (e.symbol().to_owned(), value)
        })
        .collect();
    json!({
        "input": input_text,
        "canonical": species.ascii(),
        "coefficient": super::exact_json(&num_rational::BigRational::new(
            (*coefficient.numer()).into(),
            (*coefficient.denom()).into(),
        )),
        "elements": elements,
        "charge": species.charge(),
        "state": species.state.map(|s| s.label()),
        "molar_mass_g_per_mol": species.composition.molar_mass().map(|m| m.grams_per_mol),
    })
}

fn terms_json(terms: &[Term], text: &str) -> Value {
    Value::Array(
        terms
            .iter()
            .map(|t| {
                let written = &text[t.species.span.start..t.species.span.end];
                species_json(&t.species, &t.coefficient, written)
            })
            .collect(),
    )
}

fn input_json(input: &Input, text: &str) -> Value {
    match input {
        Input::Species(terms) => json!({"species": terms_json(terms, text)}),
        Input::Equation(eq) => json!({
            "reactants": terms_json(&eq.reactants, text),
            "products": terms_json(&eq.products, text),
            "arrow": eq.arrow.ascii(),
        }),
    }
}

fn totals(terms: &[Term]) -> (Vec<(String, Ratio<i128>)>, Ratio<i128>) {
    let mut counts: Vec<(String, Ratio<i128>)> = Vec::new();
    let mut charge = Ratio::from_integer(0i128);
    for term in terms {
        let c = Ratio::new(
            *term.coefficient.numer() as i128,
            *term.coefficient.denom() as i128,
        );
        charge += c * Ratio::from_integer(term.species.charge() as i128);
        let per = term.species.composition.denominator() as i128;
        for (element, n) in term.species.composition.counts() {
            let add = c * Ratio::new(*n as i128, per);
            match counts.iter_mut().find(|(s, _)| s == element.symbol()) {
                Some((_, total)) => *total += add,
                None => counts.push((element.symbol().to_owned(), add)),
            }
        }
    }
    (counts, charge)
}

fn rational_text(r: &Ratio<i128>) -> String {
    if r.is_integer() {
        r.numer().to_string()
    } else {
        format!("{}/{}", r.numer(), r.denom())
    }
}

fn composition_text(c: &Composition) -> String {
    if c.is_empty() {
        return "—".to_owned();
    }
    c.exact_counts()
        .map(|(e, n)| format!("{e} {}", decimal_text(&n)))
        .collect::<Vec<_>>()
        .join(", ")
}

fn side_table(out: &mut String, title: &str, terms: &[Term]) {
    out.push_str(title);
    out.push('\n');
    out.push_str(&format!(
        "  {:>6}  {:<18} {:>6}  {:<5} {:>12}  {}\n",
        "coef", "species", "charge", "state", "g/mol", "atoms"
    ));
    for term in terms {
        let s = &term.species;
        let mass = s.composition.molar_mass().map_or("—".to_owned(), |m| {
            format!(
                "{:.3}{}",
                m.grams_per_mol,
                if m.uses_mass_numbers { "*" } else { "" }
            )
        });
        out.push_str(&format!(
            "  {:>6}  {:<18} {:>6}  {:<5} {:>12}  {}\n",
            coefficient_text(&term.coefficient),
            s.unicode(),
            s.charge(),
            s.state.map_or("—", |st| st.label()),
            mass,
            composition_text(&s.composition),
        ));
    }
}

fn input_table(input: &Input) -> String {
    let mut out = String::new();
    match input {
        Input::Species(terms) => {
            side_table(&mut out, "species", terms);
            let latex: Vec<String> = terms
                .iter()
                .map(|t| format!("\\ce{{{}}}", t.species.mhchem()))
                .collect();
            out.push_str(&format!("LaTeX     {}\n", latex.join(" ")));
        }
        Input::Equation(eq) => {
            out.push_str(&format!("read as   {}\n", eq.unicode()));
            out.push_str(&format!("canonical {}\n", eq.ascii()));
            out.push_str(&format!("LaTeX     {}\n\n", eq.latex()));
            side_table(&mut out, "left side", &eq.reactants);
            side_table(&mut out, "right side", &eq.products);
            let (left, left_charge) = totals(&eq.reactants);
            let (right, right_charge) = totals(&eq.products);
            let mut differences = Vec::new();
            for (symbol, n) in &left {
                let m = right
                    .iter()
                    .find(|(s, _)| s == symbol)
                    .map_or(Ratio::from_integer(0), |(_, m)| *m);
                if *n != m {
                    differences.push(format!(
                        "{symbol} {} → {}",
                        rational_text(n),
                        rational_text(&m)
                    ));
                }
            }
            for (symbol, m) in &right {
                if !left.iter().any(|(s, _)| s == symbol) {
                    differences.push(format!("{symbol} 0 → {}", rational_text(m)));
                }
            }
            if left_charge != right_charge {
                differences.push(format!(
                    "charge {} → {}",
                    rational_text(&left_charge),
                    rational_text(&right_charge)
                ));
            }
            out.push('\n');
            if differences.is_empty() {
                out.push_str("as written: atoms and charge balance\n");
            } else {
                out.push_str(&format!(
                    "as written: not balanced ({}); see couplet balance\n",
                    differences.join("; ")
                ));
            }
        }
    }
    let terms: Vec<&Term> = match input {
        Input::Species(terms) => terms.iter().collect(),
        Input::Equation(eq) => eq.reactants.iter().chain(&eq.products).collect(),
    };
    let approximate = terms.iter().any(|t| {
        t.species
            .composition
            .molar_mass()
            .is_some_and(|m| m.uses_mass_numbers)
    });
    if approximate {
        out.push_str("* an element with no standard atomic weight counts with the mass number of its longest-lived isotope\n");
    }
    out
}

//! The JSON lines of `couplet balance --json`: one object per equation with the balanced form,
//! both sides, electrons, the caution, the redox analysis and the two half-reactions.
//!
//! A batch names the same species over and over (H2O, H+, OH-, e-, the common ions), so what
//! depends on a species alone (its text, its oxidation numbers, its hazard) is worked out once
//! per distinct species and kept by [`BalanceJson`]. Objects are written straight into one
//! reused byte buffer: no JSON tree, no string per field. The redox analysis is made once per
//! equation and shared by the electrons, the redox fields and the half-reaction split.

use crate::balance::{
    BalanceError, BalanceOptions, BalancedReaction, HalfReactions, Medium, balance_text,
};
use crate::cell::{caution_of_hazards, species_hazard};
use crate::elements::Element;
use crate::notation::Species;
use crate::oxidation::{
    MachineAnalysis, MachineSites, OxidationError, RedoxAnalysis, RedoxError, RedoxKind,
    SpeciesOxidation, analyse_conserved, analyse_prepared, oxidation_numbers_shared,
};
use crate::reaction::Reaction;
use num_bigint::BigInt;
use num_rational::{BigRational, Rational64};
use num_traits::{One, Signed, ToPrimitive};
use smallvec::SmallVec;
use std::collections::HashMap;
use std::io::{self, Write};
use std::sync::Arc;

/// What a batch keeps per distinct species.
struct SpeciesFacts {
    species: Species,
    /// Canonical ASCII as a JSON string, quotes and escapes included.
    json: Box<str>,
    /// Oxidation numbers (the electron has none).
    oxidation: Result<Arc<SpeciesOxidation>, OxidationError>,
    /// The same in machine rationals, when they fit.
    machine: Option<MachineSites>,
    /// The caution's hazard when the species is a reactant, and when it is a product.
    hazard_as_reactant: Option<&'static str>,
    hazard_as_product: Option<&'static str>,
}

impl SpeciesFacts {
    fn of(species: &Species) -> SpeciesFacts {
        let json = json_string(&species.ascii());
        let oxidation = if species.is_electron() {
            Err(OxidationError::Electron)
        } else {
            oxidation_numbers_shared(species, &Default::default())
        };
        SpeciesFacts {
            species: species.clone(),
            json: json.into(),
            machine: oxidation.as_deref().ok().and_then(MachineSites::of),
            oxidation,
            hazard_as_reactant: species_hazard(species, false),
            hazard_as_product: species_hazard(species, true),
        }
    }
}

/// A hash of a species from its composition (a few machine words; equal species have equal
/// compositions) instead of its formula tree, whose rational counts hash slowly. Isomers
/// share a hash and are told apart by comparing the species.
fn species_hash(species: &Species) -> u64 {
    use std::hash::BuildHasher;
    foldhash::fast::FixedState::default().hash_one((
        &species.composition,
        species.state,
        species.compartment,
    ))
}

/// How many distinct species a [`BalanceJson`] keeps before it starts afresh (memory stays
/// bounded on a batch of ever-new species; the answers do not change).
const SPECIES_CAPACITY: usize = 4096;

/// Writes balance results as JSON objects, one per line, keeping per-species facts across the
/// results it writes. Output does not depend on what was written before.
#[derive(Default)]
pub struct BalanceJson {
    /// Indices into `facts` by [`species_hash`]. A fast fixed-seed hash (foldhash): the keys
    /// are our own parsed formulas, not adversarial.
    index: HashMap<u64, SmallVec<[usize; 1]>, foldhash::fast::FixedState>,
    facts: Vec<SpeciesFacts>,
    /// Indices into `facts` of the entries of the reaction being written.
    entries: Vec<usize>,
    /// The `"caution"` value (JSON) for each sequence of hazards met, in entry order.
    cautions: HashMap<SmallVec<[&'static str; 4]>, Box<[u8]>, foldhash::fast::FixedState>,
    /// Only the analysis in big rationals (the reference the machine one is checked against).
    #[cfg(test)]
    general_only: bool,
}

impl BalanceJson {
    /// A writer with nothing kept yet.
    pub fn new() -> BalanceJson {
        BalanceJson::default()
    }

    fn facts_of(&mut self, species: &Species) -> usize {
        let hash = species_hash(species);
        let facts = &self.facts;
        let bucket = self.index.entry(hash).or_default();
        if let Some(&known) = bucket.iter().find(|&&i| facts[i].species == *species) {
            return known;
        }
        bucket.push(facts.len());
        self.facts.push(SpeciesFacts::of(species));
        self.facts.len() - 1
    }

    /// Looks up every entry of `reaction` into `self.entries`, in entry order.
    fn gather(&mut self, reaction: &Reaction) {
        self.entries.clear();
        // Start afresh before, not during, a reaction: its indices must stay valid.
        if self.facts.len() + reaction.entries().len() > SPECIES_CAPACITY {
            self.index.clear();
            self.facts.clear();
            self.cautions.clear();
        }
        for entry in reaction.entries() {
            let index = self.facts_of(&entry.species);
            self.entries.push(index);
        }
    }

    /// Appends the object for one result and a newline to `out`. `line` is the input line
    /// number, written for errors in a batch; `medium` is the one the equation was balanced in.
    pub fn write(
        &mut self,
        out: &mut Vec<u8>,
        input: &str,
        line: Option<usize>,
        medium: Medium,
        result: &Result<BalancedReaction, BalanceError>,
    ) {
        out.extend_from_slice(b"{\"input\":");
        write_json_string(out, input);
        match result {
            Ok(balanced) => self.write_balanced(out, medium, balanced),
            Err(error) => write_error(out, line, error),
        }
        out.extend_from_slice(b"}\n");
    }

    fn write_balanced(&mut self, out: &mut Vec<u8>, medium: Medium, balanced: &BalancedReaction) {
        let reaction = balanced.reaction();
        self.gather(reaction);
        out.extend_from_slice(b",\"medium\":\"");
        out.extend_from_slice(medium.name().as_bytes());
        out.extend_from_slice(b"\",\"balanced\":\"");
        self.write_ascii(out, reaction);
        out.extend_from_slice(b"\",\"reactants\":");
        self.write_side(out, reaction, true);
        out.extend_from_slice(b",\"products\":");
        self.write_side(out, reaction, false);

        let analysis = self.analysis(reaction);
        out.extend_from_slice(b",\"electrons\":");
        if balanced.is_half_reaction() {
            match balanced.electrons() {
                Some(n) => write_integer(out, &n),
                None => out.extend_from_slice(b"null"),
            }
        } else {
            match &analysis {
                Some(analysis) => analysis.write_electrons(out),
                None => out.extend_from_slice(b"null"),
            }
        }

        let facts = &self.facts;
        let hazards = reaction
            .entries()
            .iter()
            .zip(&self.entries)
            .filter_map(|(entry, &index)| {
                if entry.nu.is_positive() {
                    facts[index].hazard_as_product
                } else {
                    facts[index].hazard_as_reactant
                }
            });
        out.extend_from_slice(b",\"caution\":");
        let hazards: SmallVec<[&'static str; 4]> = hazards.collect();
        if hazards.is_empty() {
            out.extend_from_slice(b"null");
        } else {
            // A batch meets the same few combinations of hazards again and again.
            let caution = self.cautions.entry(hazards).or_insert_with_key(|hazards| {
                let mut json = Vec::new();
                match caution_of_hazards(hazards.iter().copied()) {
                    Some(caution) => write_json_string(&mut json, &caution),
                    None => json.extend_from_slice(b"null"),
                }
                json.into()
            });
            out.extend_from_slice(caution);
        }

        let Some(analysis) = analysis else { return };
        analysis.write_redox(out);
        let halves = HalfReactions::ascii_of(balanced, |i, entry| {
            let is_reactant = entry.nu.is_negative();
            match &analysis {
                Analysis::Machine(machine) => {
                    let facts = &self.facts[self.entries[i]];
                    machine.plays(facts.machine.as_ref(), is_reactant)
                }
                Analysis::Big(big) => big.plays(i, is_reactant),
            }
        });
        if let Some([oxidation, reduction]) = halves {
            out.extend_from_slice(b",\"half_reactions\":{\"oxidation\":");
            write_json_string(out, &oxidation);
            out.extend_from_slice(b",\"reduction\":");
            write_json_string(out, &reduction);
            out.push(b'}');
        }
    }

    /// The redox analysis from the kept oxidation numbers: in machine rationals when they
    /// fit (the result the big-rational analysis would give, see [`analyse_conserved`]), else
    /// in big rationals; `None` when a species has none.
    fn analysis(&self, reaction: &Reaction) -> Option<Analysis> {
        let sites: SmallVec<[Option<&MachineSites>; 8]> = self
            .entries
            .iter()
            .map(|&index| self.facts[index].machine.as_ref())
            .collect();
        #[cfg(test)]
        if self.general_only {
            return self.big_analysis(reaction).map(Analysis::Big);
        }
        // Only a balancer's result comes here: atoms and charge are conserved.
        if let Some(machine) = analyse_conserved(reaction, &sites) {
            return Some(Analysis::Machine(machine));
        }
        self.big_analysis(reaction).map(Analysis::Big)
    }

    /// The analysis in big rationals.
    // The error carries exact values and is made at most once per equation.
    #[allow(clippy::result_large_err)]
    fn big_analysis(&self, reaction: &Reaction) -> Option<RedoxAnalysis> {
        let entries = reaction.entries();
        analyse_prepared(reaction, |species| {
            // The analysis asks about the entries' own species: find which by address.
            let position = entries
                .iter()
                .position(|entry| std::ptr::eq(&entry.species, species));
            let facts = position.map(|i| &self.facts[self.entries[i]]);
            match facts.map(|facts| &facts.oxidation) {
                Some(Ok(oxidation)) => Ok(oxidation.clone()),
                Some(Err(source)) => Err(RedoxError::Oxidation {
                    species: species.ascii(),
                    source: source.clone(),
                }),
                None => oxidation_numbers_shared(species, &Default::default()).map_err(|source| {
                    RedoxError::Oxidation {
                        species: species.ascii(),
                        source,
                    }
                }),
            }
        })
        .ok()
    }

    /// The entries on one side with their kept facts, in order. `self.entries` must be
    /// gathered for `reaction`.
    fn side<'a>(
        &'a self,
        reaction: &'a Reaction,
        reactants: bool,
    ) -> impl Iterator<Item = (&'a BigRational, &'a SpeciesFacts)> {
        reaction
            .entries()
            .iter()
            .zip(&self.entries)
            .filter(move |(entry, _)| {
                if reactants {
                    entry.nu.is_negative()
                } else {
                    entry.nu.is_positive()
                }
            })
            .map(|(entry, &index)| (&entry.nu, &self.facts[index]))
    }

    /// The reaction in canonical ASCII (as [`Reaction::to_text`] writes it with `->`), from
    /// the kept species texts, JSON-escaped without the quotes.
    fn write_ascii(&self, out: &mut Vec<u8>, reaction: &Reaction) {
        for reactants in [true, false] {
            if !reactants {
                out.extend_from_slice(b" -> ");
            }
            for (i, (nu, facts)) in self.side(reaction, reactants).enumerate() {
                if i > 0 {
                    out.extend_from_slice(b" + ");
                }
                if !(nu.is_integer() && nu.numer().magnitude().is_one()) {
                    write_magnitude(out, nu);
                    out.push(b' ');
                }
                // Escaping works character by character, so the escaped pieces joined are the
                // escaped whole.
                out.extend_from_slice(&facts.json.as_bytes()[1..facts.json.len() - 1]);
            }
        }
    }

    /// `[{"species":…,"coefficient":…},…]` for one side.
    fn write_side(&self, out: &mut Vec<u8>, reaction: &Reaction, reactants: bool) {
        out.push(b'[');
        for (i, (nu, facts)) in self.side(reaction, reactants).enumerate() {
            if i > 0 {
                out.push(b',');
            }
            out.extend_from_slice(b"{\"species\":");
            out.extend_from_slice(facts.json.as_bytes());
            // Coefficients are JSON integers of any size, straight from their digits.
            out.extend_from_slice(b",\"coefficient\":");
            write_magnitude(out, nu);
            out.push(b'}');
        }
        out.push(b']');
    }
}

/// The `"line"` and `"error"` fields of a failed equation.
fn write_error(out: &mut Vec<u8>, line: Option<usize>, error: &BalanceError) {
    if let Some(line) = line {
        let _ = write!(out, ",\"line\":{line}");
    }
    // A notation error keeps its own kind (`chemistry` too), as the command reports it.
    let kind = match error {
        BalanceError::Notation(e) => e.kind.name(),
        _ => error.kind(),
    };
    out.extend_from_slice(b",\"error\":{\"kind\":\"");
    out.extend_from_slice(kind.as_bytes());
    out.extend_from_slice(b"\",\"message\":");
    write_json_string(out, &error.to_string());
    if let BalanceError::NotUnique { basis } = error {
        out.extend_from_slice(b",\"basis\":[");
        for (i, reaction) in basis.iter().enumerate() {
            if i > 0 {
                out.push(b',');
            }
            write_json_string(out, &reaction.to_string());
        }
        out.push(b']');
    }
    out.push(b'}');
}

/// The analysis a result is written from.
enum Analysis {
    Machine(MachineAnalysis),
    Big(RedoxAnalysis),
}

impl Analysis {
    /// n of a whole reaction as a JSON integer, or `null` when it is not whole.
    fn write_electrons(&self, out: &mut Vec<u8>) {
        match self {
            Analysis::Machine(a) if a.n.is_integer() => write_i64(out, *a.n.numer()),
            Analysis::Big(a) if a.n.is_integer() => write_integer(out, a.n.numer()),
            _ => out.extend_from_slice(b"null"),
        }
    }

    /// The `"redox"` object.
    fn write_redox(&self, out: &mut Vec<u8>) {
        // The same fields in either arithmetic.
        macro_rules! redox {
            ($a:expr) => {
                write_redox(
                    out,
                    [&$a.oxidized, &$a.reduced]
                        .map(|list| list.iter().map(|c| (c.element, &c.from, &c.to))),
                    &$a.n,
                    $a.kind,
                )
            };
        }
        match self {
            Analysis::Machine(a) => redox!(a),
            Analysis::Big(a) => redox!(a),
        }
    }
}

/// `,"redox":{…}` from the oxidised and the reduced changes (element, from, to), n and kind.
fn write_redox<'a, T: ExactText + 'a>(
    out: &mut Vec<u8>,
    [oxidized, reduced]: [impl Iterator<Item = (Element, &'a T, &'a T)>; 2],
    n: &T,
    kind: RedoxKind,
) {
    out.extend_from_slice(b",\"redox\":{\"oxidized\":");
    write_changes(out, oxidized);
    out.extend_from_slice(b",\"reduced\":");
    write_changes(out, reduced);
    out.extend_from_slice(b",\"n\":");
    write_count(out, n);
    out.extend_from_slice(b",\"kind\":\"");
    out.extend_from_slice(kind.name().as_bytes());
    out.extend_from_slice(b"\"}");
}

/// An exact rational as the JSON output writes it, in either arithmetic.
trait ExactText: Signed {
    /// `n` or `n/d`, as `Display` writes it.
    fn write(&self, out: &mut Vec<u8>);
    fn is_whole(&self) -> bool;
}

impl ExactText for BigRational {
    fn write(&self, out: &mut Vec<u8>) {
        write_integer(out, self.numer());
        if !self.is_integer() {
            out.push(b'/');
            write_integer(out, self.denom());
        }
    }
    fn is_whole(&self) -> bool {
        self.is_integer()
    }
}

impl ExactText for Rational64 {
    fn write(&self, out: &mut Vec<u8>) {
        write_i64(out, *self.numer());
        if !self.is_integer() {
            out.push(b'/');
            write_i64(out, *self.denom());
        }
    }
    fn is_whole(&self) -> bool {
        self.is_integer()
    }
}

/// A count of electrons: a JSON integer when whole, else a string (`"+3/2"`).
fn write_count<T: ExactText>(out: &mut Vec<u8>, value: &T) {
    if value.is_whole() {
        value.write(out);
    } else {
        out.push(b'"');
        write_signed(out, value);
        out.push(b'"');
    }
}

/// An oxidation number as [`crate::oxidation::signed_text`] writes it: `+7`, `-2`, `0`, `+8/3`.
fn write_signed<T: ExactText>(out: &mut Vec<u8>, value: &T) {
    if value.is_positive() {
        out.push(b'+');
    }
    value.write(out);
}

fn write_changes<'a, T: ExactText + 'a>(
    out: &mut Vec<u8>,
    changes: impl Iterator<Item = (Element, &'a T, &'a T)>,
) {
    out.push(b'[');
    for (i, (element, from, to)) in changes.enumerate() {
        if i > 0 {
            out.push(b',');
        }
        out.extend_from_slice(b"{\"element\":");
        write_json_string(out, element.symbol());
        out.extend_from_slice(b",\"from\":\"");
        write_signed(out, from);
        out.extend_from_slice(b"\",\"to\":\"");
        write_signed(out, to);
        out.extend_from_slice(b"\"}");
    }
    out.push(b']');
}

fn json_string(text: &str) -> String {
    serde_json::to_string(text).unwrap_or_default()
}

fn write_json_string(out: &mut Vec<u8>, text: &str) {
    // Species, equations and cautions seldom hold a character JSON escapes (serde_json escapes
    // exactly the quote, the backslash and control characters): those are copied as they are.
    if !text.bytes().any(|b| b == b'"' || b == b'\\' || b < 0x20) {
        out.push(b'"');
        out.extend_from_slice(text.as_bytes());
        out.push(b'"');
        return;
    }
    // Writing into a Vec cannot fail.
    let _ = serde_json::to_writer(&mut *out, text);
}

/// Decimal digits of an integer of any size; machine-sized ones without an allocation.
fn write_integer(out: &mut Vec<u8>, value: &BigInt) {
    match value.to_i64() {
        Some(small) => write_i64(out, small),
        None => {
            let _ = write!(out, "{value}");
        }
    }
}

fn write_i64(out: &mut Vec<u8>, value: i64) {
    if value < 0 {
        out.push(b'-');
    }
    write_u64(out, value.unsigned_abs());
}

/// Decimal digits as `Display` writes them, without the formatting machinery.
fn write_u64(out: &mut Vec<u8>, mut value: u64) {
    let mut digits = [0u8; 20];
    let mut start = digits.len();
    loop {
        start -= 1;
        digits[start] = b'0' + (value % 10) as u8;
        value /= 10;
        if value == 0 {
            break;
        }
    }
    out.extend_from_slice(&digits[start..]);
}

/// |value| as `Display` writes it, without computing |value| as a new number.
fn write_magnitude(out: &mut Vec<u8>, value: &BigRational) {
    match value.numer().to_i64() {
        Some(small) => write_u64(out, small.unsigned_abs()),
        None => write_integer(out, &value.numer().abs()),
    }
    if !value.is_integer() {
        out.push(b'/');
        write_integer(out, value.denom());
    }
}

/// Balances `text` one equation per line (blank lines and `#` comments skipped) and writes one
/// JSON object per line to `out`, the way `couplet balance --json -` does: in input order, on
/// every available core when there are many lines (the objects do not depend on the split).
/// Returns whether every equation balanced.
pub fn balance_lines_json(
    text: &str,
    options: &BalanceOptions,
    out: &mut dyn Write,
) -> io::Result<bool> {
    balance_lines_json_on(text, options, out, super::batch::default_threads())
}

/// [`balance_lines_json`] on at most `threads` threads.
fn balance_lines_json_on(
    text: &str,
    options: &BalanceOptions,
    out: &mut dyn Write,
    threads: usize,
) -> io::Result<bool> {
    let lines = super::batch::batch_lines(text);
    super::batch::write_in_order(
        &lines,
        threads,
        out,
        BalanceJson::new,
        |writer, number, line, buffer| {
            let result = balance_text(line, options);
            writer.write(buffer, line, Some(number), options.medium, &result);
            result.is_ok()
        },
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A batch long enough for the workers gives the objects one thread gives, in input order,
    /// with the input line numbers (comments, blank lines and failures among them).
    #[test]
    fn a_batch_on_several_threads_writes_what_one_thread_writes() {
        let corpus = crate::oxidation::corpus::lines();
        let mut text = String::new();
        let mut i = 0;
        while text.lines().count() < 3 * super::super::batch::PARALLEL_FROM_LINES {
            let (line, _) = &corpus[i % corpus.len()];
            text.push_str(line);
            text.push('\n');
            match i % 7 {
                0 => text.push_str("# a comment\n"),
                3 => text.push_str("\n   \n"),
                5 => text.push_str("Fe + -> Fe2+\n"),
                _ => {}
            }
            i += 1;
        }
        let options = BalanceOptions {
            medium: Medium::Acid,
            ..BalanceOptions::default()
        };
        let mut reference = Vec::new();
        let all = balance_lines_json_on(&text, &options, &mut reference, 1).unwrap();
        assert!(!all, "the syntax errors fail");
        for threads in [2, 3] {
            let mut out = Vec::new();
            assert!(!balance_lines_json_on(&text, &options, &mut out, threads).unwrap());
            assert!(out == reference, "{threads} threads");
        }
        // Failed equations carry their input line number: the last ones come from far down.
        let last_failed = reference
            .split(|&b| b == b'\n')
            .filter(|object| !object.is_empty())
            .filter_map(|object| {
                serde_json::from_slice::<serde_json::Value>(object).unwrap()["line"].as_u64()
            })
            .max()
            .unwrap();
        assert!(last_failed > 6000, "{last_failed}");
    }

    #[test]
    fn machine_rationals_write_what_big_rationals_write() {
        // The corpus inputs and the generated lines, each in all three media.
        let mut lines = crate::oxidation::corpus::lines();
        lines.extend(crate::oxidation::corpus::pairs_of_couples());
        let mut inputs: Vec<&str> = lines.iter().map(|(line, _)| line.as_str()).collect();
        // Isomers share a composition, so the species index hashes them alike.
        inputs.extend([
            "C2H5OH -> CH3OCH3",
            "CH3OCH3 + O2 -> CO2 + H2O",
            "C2H5OH + O2 -> CO2 + H2O",
        ]);
        let mut general = BalanceJson {
            general_only: true,
            ..BalanceJson::default()
        };
        for medium in [Medium::None, Medium::Acid, Medium::Base] {
            let options = BalanceOptions {
                medium,
                ..BalanceOptions::default()
            };
            let text = inputs.join("\n");
            let mut batch = Vec::new();
            balance_lines_json(&text, &options, &mut batch).unwrap();
            let mut reference = Vec::new();
            for (index, line) in inputs.iter().enumerate() {
                let result = balance_text(line, &options);
                if let Ok(balanced) = &result {
                    // The text from the kept species is the reaction's own text.
                    let mut object = Vec::new();
                    general.write(&mut object, line, None, medium, &result);
                    let object: serde_json::Value = serde_json::from_slice(&object).unwrap();
                    assert_eq!(object["balanced"], balanced.ascii().as_str(), "{line}");
                }
                general.write(&mut reference, line, Some(index + 1), medium, &result);
            }
            assert_eq!(
                String::from_utf8(batch).unwrap(),
                String::from_utf8(reference).unwrap()
            );
        }
    }
}

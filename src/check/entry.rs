//! Checks of one couple on its own: form, notation, chemistry (conservation, direction, medium,
//! electrons against oxidation numbers) and numbers (e0, dedt, units).
//!
//! Plausible ranges, documented for users in the rules' descriptions:
//! - e0 within ±3.5 V vs SHE. Tabulated aqueous couples span about −3.1 V to +3.1 V
//!   (Li+/Li near −3.04 V, F2/HF near +3.05 V; from memory, common practice): the margin leaves
//!   room for unusual couples while catching millivolts typed as volts.
//! - dedt within ±5 mV/K. Isothermal coefficients of tabulated couples stay within about
//!   ±2 mV/K (from memory): a larger value is most often µV/K typed as mV/K.

use super::WorkBudget;
use super::consistency::{TableEntry, WrittenCouple};
use super::{CheckOptions, Finding, Fix, Rule};
use crate::balance::{
    BalanceError, BalanceOptions, BalancedReaction, ElectronRule, Medium, balance_counting,
};
use crate::notation::{Equation, Span, Species, parse_equation, parse_species};
use crate::reaction::Reaction;
use crate::table::{CoupleFile, CoupleRecord, Field, ProblemKind};
use num_rational::BigRational;
use num_traits::{Signed, Zero};
use std::collections::HashMap;
use std::sync::LazyLock;

/// Largest |e0| taken as plausible, in volts.
pub const E0_LIMIT_VOLTS: f64 = 3.5;
/// Files with at least this many couples are judged on several threads.
const PARALLEL_FROM_ENTRIES: usize = 4096;

/// Largest |dedt| taken as plausible, in mV/K.
pub const DEDT_LIMIT_MILLIVOLTS_PER_KELVIN: f64 = 5.0;

static PROTON: LazyLock<Species> =
    LazyLock::new(|| parse_species("H+").expect("built-in species parse"));
static HYDROXIDE: LazyLock<Species> =
    LazyLock::new(|| parse_species("OH-").expect("built-in species parse"));

/// The medium an entry declares.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
enum DeclaredMedium {
    Acid,
    Base,
    Neutral,
}

/// The findings of a file's form: problems the reader found and unknown top-level keys.
/// `text` is the whole file's (a piece's spans are file offsets).
pub fn check_form(file_index: usize, text: &str, file: &CoupleFile) -> Vec<Finding> {
    let mut findings = Vec::new();
    let finding = |rule, span, message: String| Finding {
        rule,
        file: file_index,
        span,
        message,
        suggestion: None,
        fix: None,
    };
    for problem in &file.problems {
        let rule = match (problem.kind, problem.key.as_deref()) {
            (ProblemKind::MissingKey, Some("e0")) => Rule::MissingE0,
            (ProblemKind::MissingKey, _) => Rule::MissingReaction,
            (ProblemKind::WrongType, Some(key @ ("e0" | "dedt"))) => {
                let written = text.get(problem.span.start..problem.span.end);
                if let Some(suggestion) = written.and_then(|w| unit_suggestion(key, w)) {
                    let mut f = finding(
                        Rule::MixedUnits,
                        problem.span,
                        format!(
                            "'{key}' is written with a unit; write a bare number in {}",
                            unit_of(key)
                        ),
                    );
                    f.suggestion = Some(suggestion);
                    findings.push(f);
                    continue;
                }
                Rule::WrongType
            }
            (ProblemKind::WrongType, _) => Rule::WrongType,
            _ => Rule::FileSyntax,
        };
        findings.push(finding(rule, problem.span, problem.message.clone()));
    }
    for key in &file.unknown_keys {
        findings.push(finding(
            Rule::UnknownKey,
            key.span,
            format!("unknown top-level key '{}'", key.value),
        ));
    }
    findings
}

/// The findings of records judged one by one, and what the table-wide checks need of each.
/// Many records are judged in chunks on the available cores, and the chunks joined in file
/// order so that the output does not depend on the split.
pub fn check_records(
    file_index: usize,
    records: &[CoupleRecord],
    options: &CheckOptions,
    budget: &WorkBudget,
) -> (Vec<Finding>, Vec<TableEntry>) {
    let threads = std::thread::available_parallelism().map_or(1, |n| n.get().min(8));
    if records.len() < PARALLEL_FROM_ENTRIES || threads == 1 {
        return judge_records(file_index, records, options, budget);
    }
    let chunk = records.len().div_ceil(threads);
    let parts: Vec<(Vec<Finding>, Vec<TableEntry>)> = std::thread::scope(|scope| {
        let handles: Vec<_> = records
            .chunks(chunk)
            .map(|records| scope.spawn(move || judge_records(file_index, records, options, budget)))
            .collect();
        handles
            .into_iter()
            .map(|h| {
                h.join()
                    .unwrap_or_else(|panic| std::panic::resume_unwind(panic))
            })
            .collect()
    });
    let mut findings = Vec::new();
    let mut entries = Vec::with_capacity(records.len());
    for (part_findings, part_entries) in parts {
        findings.extend(part_findings);
        entries.extend(part_entries);
    }
    (findings, entries)
}

/// As [`check_records`], on the calling thread.
pub fn judge_records(
    file_index: usize,
    records: &[CoupleRecord],
    options: &CheckOptions,
    budget: &WorkBudget,
) -> (Vec<Finding>, Vec<TableEntry>) {
    let mut findings = Vec::new();
    let mut entries = Vec::with_capacity(records.len());
    let mut memo = Memo::new();
    for record in records {
        let (entry_findings, entry) = check_record(file_index, record, options, budget, &mut memo);
        findings.extend(entry_findings);
        entries.push(entry);
    }
    (findings, entries)
}

fn unit_of(key: &str) -> &'static str {
    if key == "e0" { "V" } else { "mV/K" }
}

/// For a string value like `"0.34 V"` or `"340 mV"`, the bare number in the key's unit.
fn unit_suggestion(key: &str, written: &str) -> Option<String> {
    let inner = written.trim().trim_matches(['"', '\'']).trim();
    let split = inner
        .find(|c: char| !(c.is_ascii_digit() || matches!(c, '.' | '-' | '+' | 'e' | 'E' | '_')))
        .unwrap_or(inner.len());
    let (number, unit) = inner.split_at(split);
    let value: f64 = number.trim().replace('_', "").parse().ok()?;
    let unit = unit.trim().replace(['µ', 'μ'], "u");
    let factor = match (key, unit.as_str()) {
        ("e0", "" | "V" | "v" | "volt" | "volts") => 1.0,
        ("e0", "mV" | "mv") => 1e-3,
        ("dedt", "" | "mV/K" | "mv/K" | "mV K-1" | "mV/°C") => 1.0,
        ("dedt", "V/K" | "V K-1") => 1e3,
        ("dedt", "uV/K" | "uV K-1") => 1e-3,
        _ => return None,
    };
    Some(format!("{key} = {}", trim_float(value * factor)))
}

/// A float without noise from the unit conversion (at most 9 decimals).
fn trim_float(value: f64) -> String {
    let text = format!("{value:.9}");
    let text = text.trim_end_matches('0').trim_end_matches('.');
    if text.is_empty() || text == "-" {
        "0".to_owned()
    } else {
        text.to_owned()
    }
}

/// Reactions already judged in this batch, by text and declared medium, with spans relative
/// to the start of the reaction text.
type Memo = HashMap<(String, Option<DeclaredMedium>), Analysis>;

fn check_record(
    file_index: usize,
    record: &CoupleRecord,
    options: &CheckOptions,
    budget: &WorkBudget,
    memo: &mut Memo,
) -> (Vec<Finding>, TableEntry) {
    let mut findings = Vec::new();
    let mut push = |rule, span, message: String, suggestion: Option<String>, fix| {
        findings.push(Finding {
            rule,
            file: file_index,
            span,
            message,
            suggestion,
            fix,
        })
    };
    let header_span = Span::new(record.span.start, record.span.start + 1);

    for key in &record.unknown_keys {
        push(
            Rule::UnknownKey,
            key.span,
            format!(
                "unknown key '{}' (known: id, reaction, e0, dedt, medium, source, note)",
                key.value
            ),
            None,
            None,
        );
    }

    let medium = match &record.medium {
        None => None,
        Some(field) => match field.value.trim() {
            "acid" => Some(DeclaredMedium::Acid),
            "base" => Some(DeclaredMedium::Base),
            "neutral" => Some(DeclaredMedium::Neutral),
            other => {
                push(
                    Rule::UnknownMedium,
                    field.span,
                    format!("unknown medium '{other}': expected acid, base or neutral"),
                    None,
                    None,
                );
                None
            }
        },
    };

    let analysis = record.reaction.as_ref().map(|field| {
        // The same reaction text in the same medium, written without escapes, is judged the
        // same wherever it stands: data lakes repeat couples, so each piece judges each distinct
        // reaction once and moves the findings to where the others stand.
        let cacheable = field.content_start.is_some() && field.escapes.is_empty();
        if !cacheable {
            return analyse(record.index, field, medium, options, budget);
        }
        let start = field.content_start.unwrap_or(field.span.start);
        let key = (field.value.clone(), medium);
        memo.entry(key)
            .or_insert_with(|| {
                analyse(record.index, field, medium, options, budget).relative(field.span, start)
            })
            .placed(field.span, start, record.index)
    });
    let (mut couple, mut formation_e0) = (None, None);
    if let Some(analysis) = analysis {
        for (rule, span, message, suggestion, fix) in analysis.findings {
            push(rule, span, message, suggestion, fix);
        }
        couple = analysis.couple;
        formation_e0 = analysis.formation_e0;
    }

    let mut e0_volts = None;
    if let Some(e0) = &record.e0_volts {
        let value = e0.value;
        if !value.is_finite() {
            push(
                Rule::NotFinite,
                e0.span,
                format!("e0 must be a finite number of volts, found {value}"),
                None,
                None,
            );
        } else if value.abs() > E0_LIMIT_VOLTS {
            if value.abs() >= 10.0 && value.abs() / 1000.0 <= E0_LIMIT_VOLTS {
                push(
                    Rule::MixedUnits,
                    e0.span,
                    format!("e0 = {value} looks like millivolts; e0 is in volts"),
                    Some(format!("e0 = {}", trim_float(value / 1000.0))),
                    None,
                );
            } else {
                push(
                    Rule::E0OutOfRange,
                    e0.span,
                    format!(
                        "e0 = {value} V is outside the plausible range -{E0_LIMIT_VOLTS} V to +{E0_LIMIT_VOLTS} V"
                    ),
                    None,
                    None,
                );
            }
        } else {
            e0_volts = Some((value, e0.span));
        }
    }
    if let Some(dedt) = &record.dedt_millivolts_per_kelvin {
        let value = dedt.value;
        if !value.is_finite() {
            push(
                Rule::NotFinite,
                dedt.span,
                format!("dedt must be a finite number of mV/K, found {value}"),
                None,
                None,
            );
        } else if value.abs() > DEDT_LIMIT_MILLIVOLTS_PER_KELVIN {
            let as_microvolts = value / 1000.0;
            let suggestion = (as_microvolts.abs() <= DEDT_LIMIT_MILLIVOLTS_PER_KELVIN).then(|| {
                format!(
                    "dedt = {} (if the value was in µV/K)",
                    trim_float(as_microvolts)
                )
            });
            push(
                Rule::DedtOutOfRange,
                dedt.span,
                format!(
                    "dedt = {value} mV/K is outside the plausible range -{DEDT_LIMIT_MILLIVOLTS_PER_KELVIN} to +{DEDT_LIMIT_MILLIVOLTS_PER_KELVIN} mV/K"
                ),
                suggestion,
                None,
            );
        }
    }

    if record
        .source
        .as_ref()
        .is_none_or(|s| s.value.trim().is_empty())
    {
        push(
            Rule::MissingSource,
            header_span,
            format!(
                "couple {}{} names no source",
                record.index + 1,
                record
                    .id
                    .as_ref()
                    .map(|id| format!(" ('{}')", id.value))
                    .unwrap_or_default()
            ),
            None,
            None,
        );
    }

    if options.refuse_unverified {
        findings.extend(super::verification::check_record(file_index, record));
    }
    // The table-wide checks compare potentials: a reaction without a usable e0 takes no part
    // in them; of one that does, only its compact couple is kept.
    let couple = match (couple, e0_volts) {
        (Some(couple), Some((e0, span))) => {
            if let (Some(formation), Some((computed, rows))) = (&options.formation, &formation_e0) {
                findings.extend(super::formation::finding(
                    file_index, e0, span, *computed, rows, formation,
                ));
            }
            Some((couple, e0, span))
        }
        _ => None,
    };
    let entry = TableEntry {
        file: file_index,
        span: record.span,
        id: record.id.as_ref().map(|f| (f.value.clone(), f.span)),
        couple,
        source: record.source.as_ref().map(|f| f.span),
    };
    (findings, entry)
}

type ChemistryFinding = (Rule, Span, String, Option<String>, Option<Fix>);

/// What judging one reaction gives: its findings, and for a balanced reduction its compact
/// couple and the E° formation data give it (with the rows used).
#[derive(Clone, Debug)]
struct Analysis {
    findings: Vec<ChemistryFinding>,
    couple: Option<std::sync::Arc<WrittenCouple>>,
    formation_e0: Option<(f64, String)>,
}

/// Marks a span that is the whole reaction value in a stored [`Analysis`].
const WHOLE_VALUE: Span = Span {
    start: usize::MAX,
    end: usize::MAX,
};

impl Analysis {
    /// The analysis of a value at `value` (its text starting at `start`) with spans relative to
    /// `start`, so that it can be placed at another value of the same text.
    fn relative(mut self, value: Span, start: usize) -> Analysis {
        for finding in &mut self.findings {
            // (Span's == ignores positions: compare them.)
            finding.1 = if (finding.1.start, finding.1.end) == (value.start, value.end) {
                WHOLE_VALUE
            } else {
                Span::new(finding.1.start - start, finding.1.end - start)
            };
        }
        self
    }

    /// A relative analysis placed at a value at `value` whose text starts at `start`, for
    /// couple `record`.
    fn placed(&self, value: Span, start: usize, record: usize) -> Analysis {
        let mut placed = self.clone();
        for finding in &mut placed.findings {
            finding.1 = if finding.1.start == WHOLE_VALUE.start {
                value
            } else {
                Span::new(finding.1.start + start, finding.1.end + start)
            };
            if let Some(fix) = &mut finding.4 {
                fix.record = record;
                fix.span = value;
            }
        }
        placed
    }
}

/// Judges one reaction value.
fn analyse(
    record_index: usize,
    field: &Field<String>,
    medium: Option<DeclaredMedium>,
    options: &CheckOptions,
    budget: &WorkBudget,
) -> Analysis {
    let mut analysis = Analysis {
        findings: Vec::new(),
        couple: None,
        formation_e0: None,
    };
    match parse_equation(&field.value) {
        Err(error) => {
            let span = match field.content_start {
                Some(_) => Span::new(
                    field.file_offset(error.span.start),
                    field.file_offset(error.span.end.max(error.span.start)),
                ),
                None => field.span,
            };
            analysis
                .findings
                .push((Rule::Notation, span, error.message.clone(), None, None));
        }
        Ok(equation) => {
            let (chemistry, is_reduction) =
                check_chemistry(record_index, field, &equation, medium, options, budget);
            analysis.findings = chemistry;
            if is_reduction {
                let reaction = Reaction::from_equation(&equation);
                analysis.couple = WrittenCouple::of(&reaction).map(std::sync::Arc::new);
                analysis.formation_e0 = options
                    .formation
                    .as_ref()
                    .and_then(|formation| super::formation::formation_e0(&reaction, formation));
            }
        }
    }
    analysis
}

/// The file span of a species inside the reaction string (the whole string when the text
/// cannot be mapped one to one).
fn species_span(field: &Field<String>, span: Span) -> Span {
    match field.content_start {
        Some(_) => Span::new(field.file_offset(span.start), field.file_offset(span.end)),
        None => field.span,
    }
}

fn check_chemistry(
    record_index: usize,
    field: &Field<String>,
    equation: &Equation,
    medium: Option<DeclaredMedium>,
    options: &CheckOptions,
    budget: &WorkBudget,
) -> (Vec<ChemistryFinding>, bool) {
    let mut findings: Vec<ChemistryFinding> = Vec::new();
    let whole = field.span;
    let reaction = Reaction::from_equation(equation);
    let species: Vec<&Species> = equation
        .reactants
        .iter()
        .chain(&equation.products)
        .map(|t| &t.species)
        .collect();
    let find = |wanted: &Species| species.iter().find(|s| s.kind == wanted.kind);

    // Medium against species.
    let proton = find(&PROTON);
    let hydroxide = find(&HYDROXIDE);
    let mismatch = match medium {
        Some(DeclaredMedium::Acid) => hydroxide.map(|s| {
            (
                s,
                "OH- in an acid entry: write the acid form with H+ and H2O",
            )
        }),
        Some(DeclaredMedium::Base) => proton.map(|s| {
            (
                s,
                "H+ in a base entry: write the base form with OH- and H2O",
            )
        }),
        Some(DeclaredMedium::Neutral) => proton.or(hydroxide).map(|s| {
            (
                s,
                "H+ or OH- in a neutral entry: declare medium acid or base",
            )
        }),
        None => match (proton, hydroxide) {
            (Some(_), Some(s)) => {
                Some((s, "H+ and OH- in one entry: write it for acid or for base"))
            }
            _ => None,
        },
    };
    if let Some((s, message)) = mismatch {
        findings.push((
            Rule::MediumMismatch,
            species_span(field, s.span),
            message.to_owned(),
            None,
            None,
        ));
    }

    let balance_medium = match (medium, proton, hydroxide) {
        (Some(DeclaredMedium::Acid), _, None) => Medium::Acid,
        (Some(DeclaredMedium::Base), None, _) => Medium::Base,
        (None, Some(_), None) => Medium::Acid,
        (None, None, Some(_)) => Medium::Base,
        _ => Medium::None,
    };
    let suggest = || -> Suggestion {
        let wanted = options.reaction_work_limit;
        let granted = budget.take(wanted);
        if granted == 0 {
            return Suggestion::BudgetSpent;
        }
        let options = BalanceOptions {
            medium: balance_medium,
            electrons: ElectronRule::Always,
            work_limit: granted,
            // Only the balance is wanted, never why there is none.
            explain_impossible: false,
            ..BalanceOptions::default()
        };
        let (result, used) = balance_counting(equation, &options);
        budget.give_back(granted.saturating_sub(used));
        match result {
            Ok(b) if b.reaction().electron_nu().is_negative() => Suggestion::Balanced(b),
            Err(BalanceError::Limit { .. }) if granted < wanted => Suggestion::BudgetSpent,
            Err(BalanceError::Limit { limit }) => Suggestion::TooMuchWork(limit),
            _ => Suggestion::None,
        }
    };

    let electrons = reaction.electron_nu();
    let mut is_reduction = true;
    if electrons.is_zero() {
        // The missing electrons are also why the charge does not close: one finding, and the
        // balancer's half-reaction (electrons added) as the fix.
        let suggested = suggest();
        let message = "no e- is written: a couple is a half-reaction, written as a reduction";
        let (message, suggestion, fix) =
            suggested.into_parts(message, equation, record_index, field.span);
        findings.push((Rule::NoElectrons, whole, message, suggestion, fix));
        return (findings, false);
    } else if electrons.is_positive() {
        is_reduction = false;
        let electron_span = species
            .iter()
            .find(|s| s.is_electron())
            .map_or(whole, |s| species_span(field, s.span));
        findings.push((
            Rule::NotAReduction,
            electron_span,
            "electrons on the right: tabulated potentials belong to reductions (electrons on the left)"
                .to_owned(),
            Some(format!(
                "{} (reversed; check that e0 is the reduction potential)",
                reaction.reversed()
            )),
            None,
        ));
    }

    // The exact recount only when the integer count does not already show conservation.
    let imbalance = match conserved_in_integers(equation) {
        Some(true) => None,
        _ => Some(reaction.imbalance()).filter(|i| !i.is_balanced()),
    };
    if let Some(imbalance) = imbalance {
        is_reduction = false;
        let suggested = suggest();
        let (rule, message) = if imbalance.elements.is_empty() {
            (
                Rule::ChargeNotConserved,
                format!(
                    "charge not conserved: the right side carries {} {} than the left",
                    imbalance.charge.abs(),
                    if imbalance.charge.is_negative() {
                        "less"
                    } else {
                        "more"
                    }
                ),
            )
        } else {
            let elements: Vec<String> = imbalance
                .elements
                .iter()
                .map(|(e, n)| format!("{e} {}{n}", if n.is_positive() { "+" } else { "" }))
                .collect();
            let mut message = format!(
                "atoms not conserved (right minus left): {}",
                elements.join(", ")
            );
            if !imbalance.charge.is_zero() {
                message.push_str(&format!(
                    ", charge {}{}",
                    if imbalance.charge.is_positive() {
                        "+"
                    } else {
                        ""
                    },
                    imbalance.charge
                ));
            }
            (Rule::AtomsNotConserved, message)
        };
        let (message, suggestion, fix) =
            suggested.into_parts(&message, equation, record_index, field.span);
        findings.push((rule, whole, message, suggestion, fix));
    }

    let change = match options.oxidation_number_change {
        Some(oxidation_change) if is_reduction => oxidation_change(&reaction),
        _ => None,
    };
    if let Some(change) = change {
        let n = -electrons.clone();
        if change != n {
            findings.push((
                Rule::ElectronsVsOxidation,
                whole,
                format!("{n} electrons written, but the oxidation numbers change by {change}"),
                None,
                None,
            ));
        }
    }
    (findings, is_reduction)
}

/// What the balancer offers for a faulty reaction.
enum Suggestion {
    /// A balanced reduction.
    Balanced(BalancedReaction),
    /// This reaction needs more than the balancer's work limit (in units).
    TooMuchWork(u64),
    /// The check's shared balancing budget ([`super::CheckOptions::work_limit`]) is spent.
    BudgetSpent,
    /// No balanced reduction (impossible, not unique, or an oxidation).
    None,
}

impl Suggestion {
    /// The finding's message, suggestion and fix. The balanced form is an automatic fix only
    /// when it keeps the couple the entry is: no electrons were written (they are completed),
    /// or the first reactant other than H+, OH- and H2O (the oxidant) takes as many electrons
    /// per formula unit as written. Otherwise e0 may belong to another couple (`Fe3+ + e- ->
    /// Fe` with the Fe3+/Fe2+ value), so the form is only suggested and the message says why.
    fn into_parts(
        self,
        message: &str,
        written: &Equation,
        record: usize,
        span: Span,
    ) -> (String, Option<String>, Option<Fix>) {
        match self {
            Suggestion::Balanced(balanced) => {
                let text = balanced.ascii();
                match electrons_per_oxidant_changed(written, balanced.reaction()) {
                    None => (
                        message.to_owned(),
                        Some(text.clone()),
                        Some(Fix {
                            record,
                            span,
                            reaction: text,
                        }),
                    ),
                    Some((from, to)) => (
                        format!(
                            "{message}; not fixed automatically: the balanced form changes the electrons per oxidant from {from} to {to}, so check that e0 belongs to it"
                        ),
                        Some(text),
                        None,
                    ),
                }
            }
            Suggestion::TooMuchWork(limit) => (
                format!(
                    "{message} (no suggestion: balancing it needs more than the work limit of {limit} units)"
                ),
                None,
                None,
            ),
            Suggestion::BudgetSpent => (
                format!(
                    "{message} (no suggestion: this check has spent its balancing budget on other entries)"
                ),
                None,
                None,
            ),
            Suggestion::None => (message.to_owned(), None, None),
        }
    }
}

/// When electrons were written and the balanced reaction gives the oxidant (the first
/// reactant other than e-, H+, OH- and H2O) a different number of electrons per formula unit,
/// the written and the balanced number.
fn electrons_per_oxidant_changed(
    written: &Equation,
    balanced: &Reaction,
) -> Option<(BigRational, BigRational)> {
    let written_reaction = Reaction::from_equation(written);
    let written_electrons = -written_reaction.electron_nu();
    if written_electrons.is_zero() {
        return None;
    }
    let oxidant = written
        .reactants
        .iter()
        .map(|t| &t.species)
        .find(|s| !s.is_electron() && !is_solvent_ion_or_water(s))?;
    let per = |reaction: &Reaction, electrons: BigRational| {
        let nu = reaction.nu(oxidant);
        (!nu.is_zero()).then(|| electrons / -nu)
    };
    let before = per(&written_reaction, written_electrons)?;
    let after = per(balanced, -balanced.electron_nu()).unwrap_or_else(BigRational::zero);
    (before != after).then_some((before, after))
}

fn is_solvent_ion_or_water(species: &Species) -> bool {
    let plain = species.without_state();
    plain.kind == PROTON.kind || plain.kind == HYDROXIDE.kind || plain.ascii() == "H2O"
}

/// Whether atoms and charge are conserved, counted in i128 on the written coefficients: the
/// fast path for the common case. `None` when a number does not fit; then the exact recount of
/// [`Reaction::imbalance`] decides.
fn conserved_in_integers(equation: &Equation) -> Option<bool> {
    let terms = || equation.reactants.iter().chain(&equation.products);
    let mut denominators_lcm: i128 = 1;
    for term in terms() {
        // Non-integer stoichiometry (Li0.5CoO2) takes the exact recount.
        if !term.species.composition.is_integral() {
            return None;
        }
        let denominator = i128::from(*term.coefficient.denom());
        let divisor = gcd_i128(denominators_lcm, denominator);
        denominators_lcm = denominators_lcm.checked_mul(denominator / divisor)?;
    }
    let mut totals: Vec<(crate::elements::Element, i128)> = Vec::with_capacity(8);
    let mut charge: i128 = 0;
    for (side, sign) in [(&equation.reactants, -1i128), (&equation.products, 1)] {
        for term in side {
            let scale = denominators_lcm / i128::from(*term.coefficient.denom());
            let coefficient = i128::from(*term.coefficient.numer())
                .checked_mul(scale)?
                .checked_mul(sign)?;
            charge =
                charge.checked_add(coefficient.checked_mul(i128::from(term.species.charge()))?)?;
            for &(element, count) in term.species.composition.counts() {
                let change = coefficient.checked_mul(i128::from(count))?;
                match totals.iter_mut().find(|(e, _)| *e == element) {
                    Some((_, total)) => *total = total.checked_add(change)?,
                    None => totals.push((element, change)),
                }
            }
        }
    }
    Some(charge == 0 && totals.iter().all(|(_, total)| *total == 0))
}

fn gcd_i128(mut a: i128, mut b: i128) -> i128 {
    while b != 0 {
        (a, b) = (b, a % b);
    }
    a.abs().max(1)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_integer_count_agrees_with_the_exact_recount() {
        for text in [
            "1/2 O2 + 2 H+ + 2 e- -> H2O",
            "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O",
            "MnO4- + 8 H+ + 5 e- -> Mn2+ + 3 H2O",
            "Fe3+ + 2 e- -> Fe2+",
            "1/3 Fe3+ + 1/3 e- -> 1/3 Fe2+",
            "Cu2+ -> Cu(s)",
        ] {
            let equation: Equation = text.parse().unwrap();
            let exact = Reaction::from_equation(&equation).imbalance().is_balanced();
            assert_eq!(conserved_in_integers(&equation), Some(exact), "{text}");
        }
    }

    #[test]
    fn units_written_into_values_are_converted() {
        assert_eq!(
            unit_suggestion("e0", "\"0.34 V\"").as_deref(),
            Some("e0 = 0.34")
        );
        assert_eq!(
            unit_suggestion("e0", "\"-760 mV\"").as_deref(),
            Some("e0 = -0.76")
        );
        assert_eq!(
            unit_suggestion("dedt", "\"0.00088 V/K\"").as_deref(),
            Some("dedt = 0.88")
        );
        assert_eq!(unit_suggestion("e0", "\"high\""), None);
    }
}

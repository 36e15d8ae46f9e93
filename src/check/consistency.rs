//! Checks across every entry of every file given together: ids used twice, the same couple with
//! two potentials, and free energies that do not add up.
//!
//! Free energies (DOMAIN.md §Nernst, free energy): potentials do not add, free energies do,
//! ΔG° = −nFE°. Every couple is kept in its acid form: a couple written with OH- is rewritten
//! with H+ and H2O by adding water's ionisation (H2O → H+ + OH-, ΔG° = RT·ln10·pKw, with the
//! project's one Kw at 298.15 K, [`crate::kw`]) once per OH-, which moves its potential by
//! (h/n)·(RT/F)·ln10·pKw for h OH- and n electrons. Then
//! - two couples with the same acid form, one written for acid and one for base, must have the
//!   same acid-form potential (an acid/base pair related through pKw);
//! - for every two couples sharing a species other than e-, H+ and H2O (the intermediate), the
//!   combination that cancels it is looked up; when it is (a multiple of) a third couple, the
//!   three satisfy w1·n1·E1 + w2·n2·E2 + w3·n3·E3 = 0 with whole weights w, i.e. n1E1 + n2E2 =
//!   n3E3 for the couples as combined. The mismatch is stated as the potential of the couple
//!   with the fewest electrons in the relation (the one the relation pins most tightly):
//!   |Σ w·n·E| / min |w·n|. That couple carries the finding.
//!
//! Couples are kept compactly: species interned as numbers, stoichiometric numbers as 64-bit
//! integers (big integers only for a couple whose numbers do not fit), no parsed reaction.

use super::{CheckOptions, Finding, Rule, SourceFile};
use crate::notation::{Span, Species, Style, species_to_string};
use crate::quotient::{Phase, phase};
use crate::reaction::Reaction;
use indexmap::IndexSet;
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{Signed, ToPrimitive, Zero};
use std::collections::{HashMap, HashSet};
use std::hash::{Hash, Hasher};

/// The most couples sharing one species that the additivity check pairs up; past that the
/// species is not used as a link (pairs grow with the square of the count).
pub const MAX_COUPLES_PER_LINK: usize = 500;

/// The default threshold of rule CPL403 (free energies that do not add up), in volts.
pub const DEFAULT_ADDITIVITY_THRESHOLD_VOLTS: f64 = 0.010;

/// How a species is told apart in a couple key: its formula and the phase it has in Q and in
/// the cell engine ([`crate::quotient::phase`], the one rule of state defaults): `Fe` and
/// `Fe(s)` are one species, `Cu2+` and `Cu2+(aq)` one, `H2O` and `H2O(l)` one, `Br2(l)` and
/// `Br2(aq)` two.
fn species_key(species: &Species) -> String {
    if species.is_electron() {
        return ELECTRON.to_owned();
    }
    let plain = species_to_string(&species.without_state(), Style::Ascii);
    match phase(species) {
        // Solutes and the solvent are how unlabelled ions and water are read: no tag.
        Phase::Solute | Phase::Solvent => plain,
        Phase::Solid => format!("{plain}(s)"),
        Phase::PureLiquid => format!("{plain}(l)"),
        Phase::Gas => format!("{plain}(g)"),
    }
}

const ELECTRON: &str = "e-";
const PROTON: &str = "H+";
const HYDROXIDE: &str = "OH-";
const WATER: &str = "H2O";

/// Whole numbers the couple arithmetic runs on: i128 for couples whose numbers fit in 64 bits
/// (a product of two such numbers, and the sum of two products, cannot overflow it), big
/// integers otherwise.
trait Whole: Integer + Signed + Clone {
    fn to_big(&self) -> BigInt;
    fn to_small(&self) -> Option<i64>;
    fn to_float(&self) -> f64;
}

impl Whole for i128 {
    fn to_big(&self) -> BigInt {
        BigInt::from(*self)
    }
    fn to_small(&self) -> Option<i64> {
        i64::try_from(*self).ok()
    }
    fn to_float(&self) -> f64 {
        *self as f64
    }
}

impl Whole for BigInt {
    fn to_big(&self) -> BigInt {
        self.clone()
    }
    fn to_small(&self) -> Option<i64> {
        self.to_i64()
    }
    fn to_float(&self) -> f64 {
        self.to_f64().unwrap_or(f64::NAN)
    }
}

/// Stoichiometric numbers: 64-bit integers, or big integers when one does not fit.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Numbers {
    /// Every number fits in an i64 (the usual case).
    Small(Box<[i64]>),
    /// At least one does not.
    Big(Box<[BigInt]>),
}

impl Numbers {
    fn from_whole<T: Whole>(numbers: &[T]) -> Numbers {
        match numbers
            .iter()
            .map(Whole::to_small)
            .collect::<Option<Box<[i64]>>>()
        {
            Some(small) => Numbers::Small(small),
            None => Numbers::Big(numbers.iter().map(Whole::to_big).collect()),
        }
    }

    fn big(&self) -> Vec<BigInt> {
        match self {
            Numbers::Small(v) => v.iter().map(|&n| BigInt::from(n)).collect(),
            Numbers::Big(v) => v.to_vec(),
        }
    }

    fn float(&self, index: usize) -> f64 {
        match self {
            Numbers::Small(v) => v[index] as f64,
            Numbers::Big(v) => v[index].to_f64().unwrap_or(f64::NAN),
        }
    }
}

/// A couple as the table-wide checks keep it, independent of how it was written: electrons on
/// the left, species (formula and phase, as Q reads them) in a fixed order with their numbers
/// in lowest integers, OH- rewritten as H2O − H+ (the acid form), and how many OH- per
/// electron were written (0 for a couple written for acid or neutral solution).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct WrittenCouple {
    species: Vec<String>,
    numbers: Numbers,
    /// OH- written per electron, as a reduced fraction [h, n].
    hydroxide: Numbers,
}

impl WrittenCouple {
    /// The couple of a balanced reduction, or `None` when the reaction has no electrons.
    pub fn of(reaction: &Reaction) -> Option<WrittenCouple> {
        if reaction.electron_nu().is_zero() {
            return None;
        }
        // HAsO2 and H3AsO3 are one solute: a couple is keyed in its least hydrated forms, so
        // that duplicates and cycles written either way are found.
        let reaction = &*crate::table::in_least_hydrated_forms(reaction);
        let species: Vec<String> = reaction
            .entries()
            .iter()
            .map(|e| species_key(&e.species))
            .collect();
        match lowest_integers_i128(reaction) {
            Some(numbers) => Some(build(species, numbers)),
            None => {
                let lowest = reaction.in_lowest_integers();
                let numbers = lowest.entries().iter().map(|e| e.nu.to_integer()).collect();
                Some(build(species, numbers))
            }
        }
    }

    /// Whether OH- was written (the couple's acid form differs from what was written).
    pub fn written_for_base(&self) -> bool {
        self.hydroxide.float(0) != 0.0
    }
}

fn build<T: Whole>(species: Vec<String>, numbers: Vec<T>) -> WrittenCouple {
    let mut terms: Vec<(String, T)> = species.into_iter().zip(numbers).collect();
    terms.sort_by(|a, b| a.0.cmp(&b.0));
    // `Fe` and `Fe(s)` in one reaction are one species.
    terms.dedup_by(|later, kept| {
        if later.0 == kept.0 {
            kept.1 = kept.1.clone() + later.1.clone();
            true
        } else {
            false
        }
    });
    let number = |terms: &[(String, T)], key: &str| {
        terms
            .iter()
            .find(|(s, _)| s == key)
            .map_or_else(T::zero, |(_, n)| n.clone())
    };
    if number(&terms, ELECTRON).is_positive() {
        for term in &mut terms {
            term.1 = -term.1.clone();
        }
    }
    let electrons = -number(&terms, ELECTRON);
    let hydroxide = number(&terms, HYDROXIDE);
    if !hydroxide.is_zero() {
        terms.retain(|(s, _)| s != HYDROXIDE);
        for (key, change) in [(WATER, hydroxide.clone()), (PROTON, -hydroxide.clone())] {
            match terms.iter_mut().find(|(s, _)| s == key) {
                Some(term) => term.1 = term.1.clone() + change,
                None => terms.push((key.to_owned(), change)),
            }
        }
        terms.retain(|(_, n)| !n.is_zero());
        terms.sort_by(|a, b| a.0.cmp(&b.0));
    }
    let common = terms.iter().fold(T::zero(), |g, (_, n)| g.gcd(n));
    let divide = |n: &T| {
        if common.is_zero() {
            n.clone()
        } else {
            n.clone() / common.clone()
        }
    };
    let numbers: Vec<T> = terms.iter().map(|(_, n)| divide(n)).collect();
    let per = hydroxide.gcd(&electrons);
    let per = if per.is_zero() { T::one() } else { per };
    WrittenCouple {
        species: terms.into_iter().map(|(s, _)| s).collect(),
        numbers: Numbers::from_whole(&numbers),
        hydroxide: Numbers::from_whole(&[hydroxide / per.clone(), electrons / per]),
    }
}

/// The stoichiometric numbers scaled to the smallest whole numbers, in i128 (the common case,
/// without big-number arithmetic); `None` when a number does not fit.
fn lowest_integers_i128(reaction: &Reaction) -> Option<Vec<i128>> {
    let mut fractions = Vec::with_capacity(reaction.entries().len());
    let mut denominators_lcm: i128 = 1;
    for e in reaction.entries() {
        let (numerator, denominator) = (e.nu.numer().to_i128()?, e.nu.denom().to_i128()?);
        denominators_lcm =
            denominators_lcm.checked_mul(denominator / denominators_lcm.gcd(&denominator))?;
        fractions.push((numerator, denominator));
    }
    let mut whole = Vec::with_capacity(fractions.len());
    let mut common = 0i128;
    for (numerator, denominator) in fractions {
        let value = numerator.checked_mul(denominators_lcm / denominator)?;
        common = common.gcd(&value);
        whole.push(value);
    }
    Some(whole.into_iter().map(|v| v / common.max(1)).collect())
}

/// A couple's key: interned species in increasing order and their numbers.
#[derive(Clone, Debug, PartialEq, Eq)]
struct CoupleKey {
    species: Box<[u32]>,
    numbers: Numbers,
}

/// A key being looked up, borrowed: lets the pair loop look up a combination without
/// allocating a key for each of millions of pairs.
struct SmallKey<'a> {
    species: &'a [u32],
    numbers: &'a [i64],
}

impl Hash for CoupleKey {
    fn hash<H: Hasher>(&self, state: &mut H) {
        self.species.hash(state);
        match &self.numbers {
            Numbers::Small(v) => v.hash(state),
            Numbers::Big(v) => {
                state.write_u8(1);
                v.hash(state)
            }
        }
    }
}

impl Hash for SmallKey<'_> {
    fn hash<H: Hasher>(&self, state: &mut H) {
        self.species.hash(state);
        self.numbers.hash(state);
    }
}

impl indexmap::Equivalent<CoupleKey> for SmallKey<'_> {
    fn equivalent(&self, key: &CoupleKey) -> bool {
        *self.species == *key.species
            && matches!(&key.numbers, Numbers::Small(v) if **v == *self.numbers)
    }
}

/// Where an entry is: its file and a span in it.
#[derive(Clone, Copy, Debug)]
struct Place {
    file: usize,
    span: Span,
}

/// One way a couple is written (acid or base form) with its potential.
#[derive(Clone, Debug)]
struct Written {
    hydroxide: Numbers,
    /// e0 as written, and its acid-form potential.
    e0_volts: f64,
    acid_volts: f64,
    entry: Place,
    e0_span: Span,
    source: Option<Span>,
}

/// A finding whose message names other entries: rendered once every file is read.
enum Pending {
    Id {
        at: Place,
        id: Box<str>,
        first: Place,
    },
    SameCouple {
        at: Place,
        e0_volts: f64,
        first: Written,
    },
    AcidBase {
        later: Written,
        earlier: Written,
    },
}

/// What the table-wide checks need of one entry.
#[derive(Clone, Debug)]
pub struct TableEntry {
    /// The file (index into the report's files).
    pub file: usize,
    /// Where the entry starts and ends.
    pub span: Span,
    /// The id and where it was written.
    pub id: Option<(String, Span)>,
    /// The couple, when it is a balanced reduction with a usable e0, with e0 and its span.
    pub couple: Option<(std::sync::Arc<WrittenCouple>, f64, Span)>,
    /// Where the `source` value is written.
    pub source: Option<Span>,
}

/// The table-wide checks, fed entry by entry as files are read (nothing per entry is kept but
/// its id, and one compact couple per distinct couple), then finished over the whole table.
pub struct TableChecker {
    tolerance_volts: f64,
    threshold_volts: f64,
    pair_limit: usize,
    /// (RT/F)·ln10·pKw at 298.15 K: the potential of water's ionisation per OH- and electron.
    water_volts: f64,
    species: IndexSet<Box<str>>,
    ids: HashMap<Box<str>, Place>,
    keys: IndexSet<CoupleKey>,
    /// Per key: the ways it is written (one per distinct OH- count).
    forms: Vec<Vec<Written>>,
    pending: Vec<Pending>,
}

impl TableChecker {
    /// A checker with the options' tolerances and limits.
    pub fn new(options: &CheckOptions) -> TableChecker {
        let temperature = crate::constants::STANDARD_TEMPERATURE_KELVIN;
        TableChecker {
            tolerance_volts: options.tolerance_volts,
            threshold_volts: options.additivity_threshold_volts,
            pair_limit: options.additivity_pair_limit,
            water_volts: crate::constants::nernst_slope_volts_per_decade(temperature)
                * crate::kw::pkw(temperature),
            species: IndexSet::new(),
            ids: HashMap::new(),
            keys: IndexSet::new(),
            forms: Vec::new(),
            pending: Vec::new(),
        }
    }

    /// Takes one entry.
    pub fn add(&mut self, entry: TableEntry) {
        if let Some((id, span)) = entry.id {
            let at = Place {
                file: entry.file,
                span,
            };
            let id: Box<str> = id.into();
            match self.ids.get(&id) {
                Some(&first) => self.pending.push(Pending::Id { at, id, first }),
                None => {
                    self.ids.insert(id, at);
                }
            }
        }
        let Some((couple, e0_volts, e0_span)) = entry.couple else {
            return;
        };
        let mut order: Vec<(u32, usize)> = couple
            .species
            .iter()
            .enumerate()
            .map(|(i, s)| {
                let id = match self.species.get_index_of(s.as_str()) {
                    Some(id) => id,
                    None => self.species.insert_full(s.as_str().into()).0,
                };
                (id as u32, i)
            })
            .collect();
        order.sort_unstable();
        let species: Box<[u32]> = order.iter().map(|&(id, _)| id).collect();
        let numbers = match &couple.numbers {
            Numbers::Small(v) => Numbers::Small(order.iter().map(|&(_, i)| v[i]).collect()),
            Numbers::Big(v) => Numbers::Big(order.iter().map(|&(_, i)| v[i].clone()).collect()),
        };
        let shift = couple.hydroxide.float(0) / couple.hydroxide.float(1) * self.water_volts;
        let written = Written {
            hydroxide: couple.hydroxide.clone(),
            e0_volts,
            acid_volts: e0_volts + shift,
            entry: Place {
                file: entry.file,
                span: entry.span,
            },
            e0_span,
            source: entry.source,
        };
        let (index, new) = self.keys.insert_full(CoupleKey { species, numbers });
        if new {
            self.forms.push(vec![written]);
            return;
        }
        let forms = &mut self.forms[index];
        if let Some(same) = forms.iter().find(|f| f.hydroxide == written.hydroxide) {
            if (e0_volts - same.e0_volts).abs() > self.tolerance_volts {
                self.pending.push(Pending::SameCouple {
                    at: Place {
                        file: entry.file,
                        span: e0_span,
                    },
                    e0_volts,
                    first: same.clone(),
                });
            }
            return;
        }
        for earlier in forms.iter() {
            if (written.acid_volts - earlier.acid_volts).abs() > self.threshold_volts {
                self.pending.push(Pending::AcidBase {
                    later: written.clone(),
                    earlier: earlier.clone(),
                });
            }
        }
        forms.push(written);
    }

    /// The table-wide findings, once every entry was added.
    pub fn finish(self, files: &[SourceFile]) -> Vec<Finding> {
        let place = |p: Place| {
            let source = &files[p.file];
            let (line, column) = source.line_column(p.span.start);
            format!("{}:{line}:{column}", source.name)
        };
        let source_of = |w: &Written| quoted_source(files, w);
        let mut findings = Vec::new();
        for pending in &self.pending {
            findings.push(match pending {
                Pending::Id { at, id, first } => Finding {
                    rule: Rule::DuplicateId,
                    file: at.file,
                    span: at.span,
                    message: format!("id '{id}' is already used at {}", place(*first)),
                    suggestion: None,
                    fix: None,
                },
                Pending::SameCouple {
                    at,
                    e0_volts,
                    first,
                } => Finding {
                    rule: Rule::ConflictingPotentials,
                    file: at.file,
                    span: at.span,
                    message: format!(
                        "the same couple is at {} with e0 = {} V; they differ by {:.4} V, beyond the tolerance {} V (when both values are published, keep one entry and list the other under also_published with its source)",
                        place(first.entry),
                        first.e0_volts,
                        (e0_volts - first.e0_volts).abs(),
                        self.tolerance_volts
                    ),
                    suggestion: None,
                    fix: None,
                },
                Pending::AcidBase { later, earlier } => {
                    let (base, acid) = if later.hydroxide.float(0) != 0.0 {
                        (later, earlier)
                    } else {
                        (earlier, later)
                    };
                    let other = if std::ptr::eq(later, base) { acid } else { base };
                    Finding {
                        rule: Rule::AdditivityViolated,
                        file: later.entry.file,
                        span: later.e0_span,
                        message: format!(
                            "acid and base forms of one couple disagree through pKw: {} (e0 = {} V{}) and this entry (e0 = {} V{}) are the same couple in acid form at {:.4} V and {:.4} V (the base form taken to acid with pKw {:.3} at 298.15 K: E(acid) = E(base) + (h/n)·(RT/F)·ln10·pKw for h OH- and n e-), {:.1} mV apart, beyond the {:.0} mV threshold",
                            place(other.entry),
                            other.e0_volts,
                            source_of(other),
                            later.e0_volts,
                            source_of(later),
                            acid.acid_volts,
                            base.acid_volts,
                            crate::kw::pkw(crate::constants::STANDARD_TEMPERATURE_KELVIN),
                            (later.acid_volts - earlier.acid_volts).abs() * 1000.0,
                            self.threshold_volts * 1000.0
                        ),
                        suggestion: None,
                        fix: None,
                    }
                }
            });
        }
        findings.extend(self.additivity(files));
        findings
    }

    /// Rule CPL403 over triads (and CPL405 when the pair limit is reached).
    fn additivity(&self, files: &[SourceFile]) -> Vec<Finding> {
        let mut findings = Vec::new();
        let ignored: Vec<Option<usize>> = [ELECTRON, PROTON, WATER]
            .iter()
            .map(|s| self.species.get_index_of(*s))
            .collect();
        let electron = ignored[0];
        let Some(electron) = electron.map(|e| e as u32) else {
            return findings;
        };
        // Links: species (other than e-, H+, H2O) to the couples they appear in.
        let mut links: HashMap<u32, Vec<usize>> = HashMap::new();
        for (index, key) in self.keys.iter().enumerate() {
            for &s in key.species.iter() {
                if !ignored.contains(&Some(s as usize)) {
                    links.entry(s).or_default().push(index);
                }
            }
        }
        let mut link_names: Vec<(&str, u32)> = links
            .keys()
            .map(|&s| (&*self.species[s as usize], s))
            .collect();
        link_names.sort_unstable();
        let mut seen: HashSet<[usize; 3]> = HashSet::new();
        let mut pairs = 0usize;
        'links: for (name, shared) in link_names {
            let members = &links[&shared];
            if members.len() > MAX_COUPLES_PER_LINK {
                continue;
            }
            for (a, &i) in members.iter().enumerate() {
                for &j in &members[a + 1..] {
                    if pairs >= self.pair_limit {
                        let entry = self.forms[i][0].entry;
                        findings.push(Finding {
                            rule: Rule::AdditivityCutShort,
                            file: entry.file,
                            span: Span::new(entry.span.start, entry.span.start + 1),
                            message: format!(
                                "the additivity check stopped after {pairs} pairs of couples (its limit); couples linked through {name} and later links were not all compared"
                            ),
                            suggestion: None,
                            fix: None,
                        });
                        break 'links;
                    }
                    pairs += 1;
                    let Some((k, weights)) = self.third(i, j, shared, electron) else {
                        continue;
                    };
                    let mut triple = [i, j, k];
                    triple.sort_unstable();
                    if !seen.insert(triple) {
                        continue;
                    }
                    let members = [i, j, k];
                    let electrons: Vec<f64> = members
                        .iter()
                        .map(|&c| self.electrons(c, electron))
                        .collect();
                    // Every written form of each couple (acid and base), each combination a pair
                    // more against the limit.
                    for x in &self.forms[i] {
                        for y in &self.forms[j] {
                            for z in &self.forms[k] {
                                let forms = [x, y, z];
                                if !std::ptr::eq(x, &self.forms[i][0])
                                    || !std::ptr::eq(y, &self.forms[j][0])
                                    || !std::ptr::eq(z, &self.forms[k][0])
                                {
                                    pairs += 1;
                                }
                                if let Some(finding) =
                                    self.judge_triad(files, forms, &weights, &electrons)
                                {
                                    findings.push(finding);
                                }
                            }
                        }
                    }
                }
            }
        }
        findings
    }

    /// Electrons of couple `index` as its key is written.
    fn electrons(&self, index: usize, electron: u32) -> f64 {
        let key = &self.keys[index];
        key.species
            .iter()
            .position(|&s| s == electron)
            .map_or(0.0, |at| -key.numbers.float(at))
    }

    /// The couple k that couples i and j make when their shared species is cancelled, with the
    /// whole weights [w_i, w_j, w_k] of w_i·R_i + w_j·R_j + w_k·R_k = 0, as floats.
    fn third(&self, i: usize, j: usize, shared: u32, electron: u32) -> Option<(usize, [f64; 3])> {
        let (a, b) = (&self.keys[i], &self.keys[j]);
        match (&a.numbers, &b.numbers) {
            (Numbers::Small(x), Numbers::Small(y)) => {
                let x: Vec<i128> = x.iter().map(|&n| i128::from(n)).collect();
                let y: Vec<i128> = y.iter().map(|&n| i128::from(n)).collect();
                let combination = combine(&a.species, &x, &b.species, &y, shared, electron)?;
                let small: Option<Vec<i64>> =
                    combination.numbers.iter().map(Whole::to_small).collect();
                let k = match small {
                    Some(numbers) => self.keys.get_index_of(&SmallKey {
                        species: &combination.species,
                        numbers: &numbers,
                    })?,
                    None => self.keys.get_index_of(&CoupleKey {
                        species: combination.species.clone().into(),
                        numbers: Numbers::from_whole(&combination.numbers),
                    })?,
                };
                (k != i && k != j).then(|| (k, combination.weights()))
            }
            _ => {
                let combination = combine(
                    &a.species,
                    &a.numbers.big(),
                    &b.species,
                    &b.numbers.big(),
                    shared,
                    electron,
                )?;
                let k = self.keys.get_index_of(&CoupleKey {
                    species: combination.species.clone().into(),
                    numbers: Numbers::from_whole(&combination.numbers),
                })?;
                (k != i && k != j).then(|| (k, combination.weights()))
            }
        }
    }

    fn judge_triad(
        &self,
        files: &[SourceFile],
        forms: [&Written; 3],
        weights: &[f64; 3],
        electrons: &[f64],
    ) -> Option<Finding> {
        // Σ w·n·E = 0 when free energies add up.
        let residual: f64 = (0..3)
            .map(|c| weights[c] * electrons[c] * forms[c].acid_volts)
            .sum();
        let pinned = |c: usize| (weights[c] * electrons[c]).abs();
        // The couple with the fewest electrons in the relation; the earliest on a tie.
        let judged = (0..3).min_by(|&p, &q| {
            pinned(p).total_cmp(&pinned(q)).then_with(|| {
                let (x, y) = (forms[p].entry, forms[q].entry);
                (x.file, x.span.start).cmp(&(y.file, y.span.start))
            })
        })?;
        let mismatch = residual / (weights[judged] * electrons[judged]);
        if mismatch.is_nan() || mismatch.abs() <= self.threshold_volts {
            return None;
        }
        let this = forms[judged];
        let predicted = this.e0_volts - mismatch;
        let place = |p: Place| {
            let source = &files[p.file];
            let (line, column) = source.line_column(p.span.start);
            format!("{}:{line}:{column}", source.name)
        };
        let describe = |c: usize| {
            let form = forms[c];
            let base = if form.hydroxide.float(0) != 0.0 {
                format!(", base form: {:.4} V in acid form", form.acid_volts)
            } else {
                String::new()
            };
            format!(
                "{} (e0 = {} V{base}{})",
                place(form.entry),
                form.e0_volts,
                quoted_source(files, form)
            )
        };
        let others: Vec<usize> = (0..3).filter(|&c| c != judged).collect();
        let label = |c: usize| match others.iter().position(|&o| o == c) {
            Some(at) => format!("E[{}]", at + 1),
            None => "E(this)".to_owned(),
        };
        // Σ w·n·E = 0 written with positive terms on each side: n1·E1 + n2·E2 = n3·E3.
        let side = |positive: bool| {
            (0..3)
                .filter(|&c| (weights[c] > 0.0) == positive)
                .map(|c| format!("{}·{}", (weights[c] * electrons[c]).abs(), label(c)))
                .collect::<Vec<_>>()
                .join(" + ")
        };
        Some(Finding {
            rule: Rule::AdditivityViolated,
            file: this.entry.file,
            span: this.e0_span,
            message: format!(
                "free energies do not add up: with [1] {} and [2] {} this couple closes the cycle {} = {}, which puts its e0 at {:.4} V, not {} V{}: {:.1} mV off, beyond the {:.0} mV threshold",
                describe(others[0]),
                describe(others[1]),
                side(true),
                side(false),
                predicted,
                this.e0_volts,
                quoted_source(files, this).replacen(", source", " (this entry's source", 1)
                    + if this.source.is_some() { ")" } else { "" },
                mismatch.abs() * 1000.0,
                self.threshold_volts * 1000.0
            ),
            suggestion: None,
            fix: None,
        })
    }
}

/// `, source: "…"` for a form with a source, from the file's text (at most 160 characters).
fn quoted_source(files: &[SourceFile], form: &Written) -> String {
    let Some(span) = form.source else {
        return ", no source".to_owned();
    };
    let text = &files[form.entry.file].file.text;
    let Some(written) = text.get(span.start..span.end) else {
        return String::new();
    };
    let value = written.trim().trim_matches(['"', '\'']);
    let mut shown: String = value.chars().take(160).collect();
    if shown.len() < value.len() {
        shown.push('…');
    }
    format!(", source: {shown}")
}

/// The combination of two couples that cancels their shared species: p·A + q·B with p > 0,
/// in lowest integers with the electrons on the left, and the factor `scale` such that
/// p·A + q·B = scale·(the combination).
struct Combination<T> {
    species: Vec<u32>,
    numbers: Vec<T>,
    p: T,
    q: T,
    scale: T,
}

impl<T: Whole> Combination<T> {
    /// [p, q, −scale]: p·A + q·B − scale·K = 0.
    fn weights(&self) -> [f64; 3] {
        [self.p.to_float(), self.q.to_float(), -self.scale.to_float()]
    }
}

fn combine<T: Whole>(
    a_species: &[u32],
    a: &[T],
    b_species: &[u32],
    b: &[T],
    shared: u32,
    electron: u32,
) -> Option<Combination<T>> {
    let at = |species: &[u32], numbers: &[T], s: u32| {
        species
            .binary_search(&s)
            .map_or_else(|_| T::zero(), |i| numbers[i].clone())
    };
    let (a_shared, b_shared) = (at(a_species, a, shared), at(b_species, b, shared));
    if a_shared.is_zero() || b_shared.is_zero() {
        return None;
    }
    let common = a_shared.gcd(&b_shared);
    let p = b_shared.abs() / common.clone();
    let q = -(a_shared / common) * b_shared.signum();
    // A combination without electrons is no couple: known before building it.
    let electrons = p.clone() * at(a_species, a, electron) + q.clone() * at(b_species, b, electron);
    if electrons.is_zero() {
        return None;
    }
    let mut species = Vec::with_capacity(a_species.len() + b_species.len());
    let mut numbers = Vec::with_capacity(a_species.len() + b_species.len());
    let (mut x, mut y) = (0, 0);
    while x < a_species.len() || y < b_species.len() {
        let (s, n) = match (a_species.get(x), b_species.get(y)) {
            (Some(&sa), Some(&sb)) if sa == sb => {
                x += 1;
                y += 1;
                (
                    sa,
                    p.clone() * a[x - 1].clone() + q.clone() * b[y - 1].clone(),
                )
            }
            (Some(&sa), Some(&sb)) if sa < sb => {
                x += 1;
                (sa, p.clone() * a[x - 1].clone())
            }
            (Some(&sa), None) => {
                x += 1;
                (sa, p.clone() * a[x - 1].clone())
            }
            (_, Some(&sb)) => {
                y += 1;
                (sb, q.clone() * b[y - 1].clone())
            }
            (None, None) => break,
        };
        if !n.is_zero() {
            species.push(s);
            numbers.push(n);
        }
    }
    let common = numbers.iter().fold(T::zero(), |g, n| g.gcd(n));
    // Electrons on the left: the e- number negative.
    let scale = if electrons.is_positive() {
        -common
    } else {
        common
    };
    for n in &mut numbers {
        *n = n.clone() / scale.clone();
    }
    Some(Combination {
        species,
        numbers,
        p,
        q,
        scale,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn couple(text: &str) -> Option<WrittenCouple> {
        WrittenCouple::of(&Reaction::from_equation(&text.parse().unwrap()))
    }

    #[test]
    fn a_couple_has_one_key_however_it_is_written() {
        let silver = couple("Ag+ + e- -> Ag(s)");
        assert!(silver.is_some());
        assert_eq!(couple("2 Ag+ + 2 e- -> 2 Ag(s)"), silver);
        assert_eq!(couple("Ag(s) -> Ag+ + e-"), silver);
        assert_eq!(couple("1/2 Ag+ + 1/2 e- -> 1/2 Ag(s)"), silver);
        // Water's (l) and an ion's (aq) are left out; other states tell couples apart.
        assert_eq!(
            couple("1/2 O2(g) + 2 H+ + 2 e- -> H2O"),
            couple("O2(g) + 4 H+(aq) + 4 e- -> 2 H2O(l)")
        );
        assert_ne!(
            couple("Br2(l) + 2 e- -> 2 Br-"),
            couple("Br2(aq) + 2 e- -> 2 Br-")
        );
        // Unlabelled species take the phase Q gives them.
        assert_eq!(
            couple("Cu2+ + 2 e- -> Cu"),
            couple("Cu2+(aq) + 2 e- -> Cu(s)")
        );
        assert_eq!(
            couple("Cl2 + 2 e- -> 2 Cl-"),
            couple("Cl2(g) + 2 e- -> 2 Cl-")
        );
        assert_eq!(
            couple("Br2 + 2 e- -> 2 Br-"),
            couple("Br2(l) + 2 e- -> 2 Br-")
        );
        assert_ne!(
            couple("Cl2 + 2 e- -> 2 Cl-"),
            couple("Cl2(aq) + 2 e- -> 2 Cl-")
        );
        assert_eq!(couple("Ag+ -> Ag(s)"), None);
    }

    #[test]
    fn the_base_form_has_the_acid_form_and_its_hydroxide() {
        let acid = couple("O2(g) + 4 H+ + 4 e- -> 2 H2O").unwrap();
        let base = couple("O2(g) + 2 H2O + 4 e- -> 4 OH-").unwrap();
        assert_eq!(acid.species, base.species);
        assert_eq!(acid.numbers, base.numbers);
        assert!(!acid.written_for_base() && base.written_for_base());
        assert_eq!(base.hydroxide, Numbers::Small(vec![1, 1].into()));
    }

    #[test]
    fn the_integer_and_big_paths_give_the_same_couple() {
        for text in [
            "3/2 O2 + 6 H+ + 6 e- -> 3 H2O",
            "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O",
            "MnO4- + 2 H2O + 3 e- -> MnO2(s) + 4 OH-",
        ] {
            let reaction = Reaction::from_equation(&text.parse().unwrap());
            let fast = WrittenCouple::of(&reaction).unwrap();
            let species = reaction
                .entries()
                .iter()
                .map(|e| species_key(&e.species))
                .collect();
            let lowest = reaction.in_lowest_integers();
            let big: Vec<BigInt> = lowest.entries().iter().map(|e| e.nu.to_integer()).collect();
            assert_eq!(fast, build(species, big), "{text}");
        }
    }
}

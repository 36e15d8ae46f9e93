//! The table of known polyatomic ions (`data/polyatomic_ions.toml`): loading and checking it,
//! and splitting a salt into those ions so each keeps its own oxidation states.
//!
//! Ions are found in the written structure: a bracketed group whose atoms are those of an ion
//! (`(NO3)2`, `[Fe(CN)6]`, `(CN)6`), or a run of plain atoms written as the ion is (`NH4` and
//! `NO3` in `NH4NO3`). A split is kept only when what is left is free of carbon (so `CH3CN` is
//! not read as a cyanide salt) and the rest can be assigned by the rules with the charge that
//! the ions leave; where ions of the same atoms differ in charge (`[Fe(CN)6]3-`/`4-`) the charge
//! balance of the rest picks. Ions of one element (O2^2-, N3-) are never matched: `SO2` is not
//! a peroxide.
//!
//! Ligands (`data/ligands.toml`: H2O, NH3, CO, urea, en, …) are read the same way, but only as
//! bracketed groups (`(NH3)6` in `[Co(NH3)6]Cl3`): written so, the group is one unit bound to a
//! metal, and the metal follows by charge balance from the ligand's charge (the ionic
//! convention). The rule then says which ligand was taken as which unit.

use super::rules::{Fragment, assign_fragment};
use super::{Assignment, OxidationError, Pin, Rule, Status, parse_signed_rational};
use crate::composition::Composition;
use crate::elements::Element;
use crate::notation::{Bracket, Count, Formula, SpeciesKind, Unit, parse_species};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;
use std::sync::LazyLock;

/// The ion table as shipped, compiled into the binary.
pub const POLYATOMIC_IONS_TOML: &str = include_str!("../../data/polyatomic_ions.toml");

/// The ligand table as shipped, compiled into the binary.
pub const LIGANDS_TOML: &str = include_str!("../../data/ligands.toml");

static BUILTIN: LazyLock<Result<IonTable, IonTableError>> =
    LazyLock::new(|| IonTable::from_toml(POLYATOMIC_IONS_TOML)?.with_ligands_toml(LIGANDS_TOML));

/// Most alternative splits tried for one species (ions with the same atoms but other charges).
const MAX_SPLITS: usize = 256;

/// One known ion with the oxidation numbers of its atoms.
#[derive(Clone, Debug)]
pub struct KnownIon {
    /// The formula as written in the table.
    pub formula: String,
    /// Its name.
    pub name: String,
    /// Its charge.
    pub charge: i64,
    /// Each element with its oxidation number, in the order of the formula.
    pub oxidation: Vec<(Element, BigRational)>,
    /// Atoms per element, in the order of the formula.
    counts: Vec<(Element, u64)>,
    /// The written units, with one outer bracket pair removed (`[Fe(CN)6]4-`).
    body: Vec<Unit>,
    /// For an ion of one element: metals whose binary compound with it is usually read as a
    /// salt of this ion (FeS2 as iron(II) disulfide).
    pub usual_with: Vec<Element>,
    /// From the ligand table: matched only as a bracketed group.
    pub ligand: bool,
}

impl KnownIon {
    /// Atoms per element.
    pub fn counts(&self) -> &[(Element, u64)] {
        &self.counts
    }
}

/// A checked table of known polyatomic ions.
#[derive(Clone, Debug, Default)]
pub struct IonTable {
    /// The ions, then the ligands (from `ion_count` on).
    ions: Vec<KnownIon>,
    ion_count: usize,
}

/// Why an ion table could not be used.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("ion table: {message}")]
pub struct IonTableError {
    /// Lower-case reason with the entry or line it concerns.
    pub message: String,
}

fn table_error(message: String) -> IonTableError {
    IonTableError { message }
}

#[derive(serde::Deserialize)]
struct TableFile {
    #[serde(default)]
    ion: Vec<IonEntry>,
}

#[derive(serde::Deserialize)]
struct LigandFile {
    #[serde(default)]
    ligand: Vec<IonEntry>,
}

#[derive(serde::Deserialize)]
struct IonEntry {
    formula: String,
    name: String,
    oxidation: toml::Table,
    #[serde(default)]
    usual_with: Vec<String>,
}

impl IonTable {
    /// The table shipped in `data/polyatomic_ions.toml`.
    pub fn builtin() -> Result<&'static IonTable, IonTableError> {
        BUILTIN.as_ref().map_err(Clone::clone)
    }

    /// Reads and checks a table: every formula parses, every element has exactly one value,
    /// and the values add up to the charge.
    pub fn from_toml(text: &str) -> Result<IonTable, IonTableError> {
        let file: TableFile = read_toml(text)?;
        let mut ions = Vec::with_capacity(file.ion.len());
        for (index, entry) in file.ion.iter().enumerate() {
            ions.push(check_entry(index + 1, entry, false)?);
        }
        let ion_count = ions.len();
        Ok(IonTable { ions, ion_count })
    }

    /// This table with the ligands of a ligand table (`[[ligand]]` entries, the fields of an
    /// ion), checked the same way. Ligands are matched only as bracketed groups.
    pub fn with_ligands_toml(mut self, text: &str) -> Result<IonTable, IonTableError> {
        let file: LigandFile = read_toml(text)?;
        for (index, entry) in file.ligand.iter().enumerate() {
            self.ions.push(check_entry(index + 1, entry, true)?);
        }
        Ok(self)
    }

    /// Every ion, in table order (without the ligands).
    pub fn ions(&self) -> &[KnownIon] {
        &self.ions[..self.ion_count]
    }

    /// Every ligand, in table order.
    pub fn ligands(&self) -> &[KnownIon] {
        &self.ions[self.ion_count..]
    }

    /// Ions with exactly these atoms (any charge), in table order; ligands too when the atoms
    /// were written as a bracketed group.
    fn with_atoms(&self, counts: &[(Element, u64)], bracketed: bool) -> Vec<usize> {
        let end = if bracketed {
            self.ions.len()
        } else {
            self.ion_count
        };
        (0..end)
            .filter(|&i| same_atoms(&self.ions[i].counts, counts))
            .collect()
    }

    /// The longest run of plain atoms at the start of `units` written as an ion is, with every
    /// ion written that way; inside a complex (`in_complex`) the ligands count too, so that
    /// the NO of `[Fe(CN)5NO]2-` is the nitrosyl ligand without brackets of its own.
    fn run_at(&self, units: &[Unit], in_complex: bool) -> Option<(usize, Vec<usize>)> {
        let end = if in_complex {
            self.ions.len()
        } else {
            self.ion_count
        };
        let mut best: Option<(usize, Vec<usize>)> = None;
        for (i, ion) in self.ions[..end].iter().enumerate() {
            let len = ion.body.len();
            let plain = ion.body.iter().all(|u| matches!(u, Unit::Atom { .. }));
            if !plain || len > units.len() || units[..len] != ion.body[..] {
                continue;
            }
            match &mut best {
                Some((best_len, list)) if *best_len == len => list.push(i),
                Some((best_len, _)) if *best_len > len => {}
                _ => best = Some((len, vec![i])),
            }
        }
        best
    }
}

fn read_toml<T: serde::de::DeserializeOwned>(text: &str) -> Result<T, IonTableError> {
    toml::from_str(text).map_err(|e| {
        let line = e
            .span()
            .map(|s| text[..s.start.min(text.len())].matches('\n').count() + 1);
        table_error(match line {
            Some(line) => format!("line {line}: {}", e.message()),
            None => e.message().to_owned(),
        })
    })
}

fn check_entry(index: usize, entry: &IonEntry, ligand: bool) -> Result<KnownIon, IonTableError> {
    let kind = if ligand { "ligand" } else { "ion" };
    let at =
        |message: String| table_error(format!("{kind} {index} ({}): {message}", entry.formula));
    let species = parse_species(&entry.formula).map_err(|e| at(e.message.clone()))?;
    let formula = match &species.kind {
        SpeciesKind::Formula(f) => f,
        SpeciesKind::Electron => return Err(at("the electron is not an ion".into())),
    };
    if formula.components.len() != 1 {
        return Err(at("an ion has no adducts".into()));
    }
    let mut body = formula.components[0].body.clone();
    if let [
        Unit::Group {
            body: inner, count, ..
        },
    ] = body.as_slice()
        && *count == Count::from(1)
    {
        body = inner.clone();
    }
    let counts = species.composition.counts().to_vec();
    let mut oxidation = Vec::with_capacity(counts.len());
    let mut total = BigRational::zero();
    for &(element, count) in &counts {
        let value = entry
            .oxidation
            .get(element.symbol())
            .ok_or_else(|| at(format!("no oxidation number for {element}")))?;
        let value = match value {
            toml::Value::String(s) => parse_signed_rational(s.trim()),
            toml::Value::Integer(n) => Some(BigRational::from_integer(BigInt::from(*n))),
            _ => None,
        }
        .ok_or_else(|| {
            at(format!(
                "the value for {element} must be like \"+5\" or \"-1/2\""
            ))
        })?;
        total += &value * BigRational::from_integer(BigInt::from(count));
        oxidation.push((element, value));
    }
    for key in entry.oxidation.keys() {
        if !counts.iter().any(|(e, _)| e.symbol() == key) {
            return Err(at(format!("{key} is not in the formula")));
        }
    }
    if total != BigRational::from_integer(BigInt::from(species.charge())) {
        return Err(at(format!(
            "the oxidation numbers add up to {} but the charge is {}",
            super::signed_text(&total),
            species.charge()
        )));
    }
    let mut usual_with = Vec::with_capacity(entry.usual_with.len());
    for symbol in &entry.usual_with {
        if counts.len() != 1 {
            return Err(at("usual_with is only for ions of one element".into()));
        }
        let metal = Element::from_symbol(symbol)
            .ok_or_else(|| at(format!("usual_with: no element has the symbol '{symbol}'")))?;
        usual_with.push(metal);
    }
    Ok(KnownIon {
        formula: entry.formula.clone(),
        name: entry.name.clone(),
        charge: species.charge(),
        oxidation,
        counts,
        body,
        usual_with,
        ligand,
    })
}

fn same_atoms(a: &[(Element, u64)], b: &[(Element, u64)]) -> bool {
    a.len() == b.len() && a.iter().all(|x| b.contains(x))
}

/// A whole-number subscript; `None` for a decimal one (such formulas are not split into ions).
fn whole(count: &Count) -> Option<u64> {
    count.is_integer().then(|| *count.numer())
}

/// Atom counts of some units, times `factor`; `None` on overflow.
fn units_composition(units: &[Unit], factor: u64, into: &mut Composition) -> Option<()> {
    for unit in units {
        match unit {
            Unit::Atom { element, count, .. } => {
                into.add(*element, whole(count)?.checked_mul(factor)?)?
            }
            Unit::Group { body, count, .. } => {
                units_composition(body, factor.checked_mul(whole(count)?)?, into)?
            }
        }
    }
    Some(())
}

/// A place in a formula where known ions were found: the candidates and how many of it.
struct Found {
    candidates: Vec<usize>,
    times: u64,
    /// Written as a bracketed group, e.g. (NO3)3 or (N3)2: the writer marked it as one unit.
    bracketed: bool,
}

/// One component of a formula, scanned for ions.
struct Scanned {
    found: Vec<Found>,
    rest: Composition,
    charge: i64,
}

/// Scans `units` (`factor` times over) for known ions, and for ligands as well inside a
/// complex (`in_complex`: within square brackets), into `found`; other atoms go to `rest`.
fn scan(
    table: &IonTable,
    units: &[Unit],
    factor: u64,
    found: &mut Vec<Found>,
    rest: &mut Composition,
    in_complex: bool,
) -> Option<()> {
    let mut i = 0;
    while i < units.len() {
        match &units[i] {
            Unit::Group {
                body,
                count,
                bracket,
                ..
            } => {
                let times = factor.checked_mul(whole(count)?)?;
                let mut atoms = Composition::default();
                units_composition(body, 1, &mut atoms)?;
                // A bracketed group may be a one-element ion too (azide in Pb(N3)2): the
                // brackets say it is one unit, so there is no risk of cutting a molecule.
                let candidates = table.with_atoms(atoms.counts(), true);
                if candidates.is_empty() {
                    let complex = in_complex || *bracket == Bracket::Square;
                    scan(table, body, times, found, rest, complex)?;
                } else {
                    found.push(Found {
                        candidates,
                        times,
                        bracketed: true,
                    });
                }
                i += 1;
            }
            Unit::Atom { element, count, .. } => {
                match table
                    .run_at(&units[i..], in_complex)
                    .map(|(len, c)| (len, polyatomic(table, c)))
                {
                    Some((len, candidates)) if !candidates.is_empty() => {
                        found.push(Found {
                            candidates,
                            times: factor,
                            bracketed: false,
                        });
                        i += len;
                    }
                    _ => {
                        rest.add(*element, whole(count)?.checked_mul(factor)?)?;
                        i += 1;
                    }
                }
            }
        }
    }
    Some(())
}

/// Keeps the ions with two or more elements.
fn polyatomic(table: &IonTable, candidates: Vec<usize>) -> Vec<usize> {
    candidates
        .into_iter()
        .filter(|&i| table.ions[i].counts.len() >= 2)
        .collect()
}

fn has_carbon(composition: &Composition) -> bool {
    composition
        .counts()
        .iter()
        .any(|(e, n)| *n > 0 && e.symbol() == "C")
}

/// Assigns every atom of a formula: split into known ions where that works, rules otherwise.
pub(super) fn assign(
    table: &IonTable,
    formula: &Formula,
    composition: &Composition,
    pins: &[Pin],
) -> Result<Vec<Assignment>, OxidationError> {
    let charge = composition.charge();
    if !composition.is_integral() {
        // Non-integer stoichiometry: no ion split; the rules on whole atoms of
        // `denominator` formula units, whose charge is `denominator` times the species'.
        let scaled = BigInt::from(charge) * BigInt::from(composition.denominator());
        return assign_fragment(
            composition.counts(),
            &BigRational::from_integer(scaled),
            pins,
            Fragment::SharedSites,
        );
    }
    let whole = || {
        assign_fragment(
            composition.counts(),
            &BigRational::from_integer(BigInt::from(charge)),
            pins,
            Fragment::Whole,
        )
    };
    let elements: Vec<Element> = composition.counts().iter().map(|(e, _)| *e).collect();
    let pinned = |ion: &KnownIon| {
        pins.iter().any(|p| {
            ion.counts
                .iter()
                .any(|(e, _)| e.chemical_element() == p.element.chemical_element())
        })
    };

    // The species is itself a known ion.
    if let Some(&i) = table
        .with_atoms(composition.counts(), false)
        .iter()
        .find(|&&i| table.ions[i].charge == charge && table.ions[i].counts.len() >= 2)
        && !pinned(&table.ions[i])
    {
        return Ok(ion_assignments(&table.ions[i], 1));
    }

    if let Some(assignments) = usual_salt(table, composition, pins) {
        return Ok(assignments);
    }

    let mut scanned = Vec::with_capacity(formula.components.len());
    for (index, component) in formula.components.iter().enumerate() {
        let mut found = Vec::new();
        let mut rest = Composition::default();
        let factor = component.multiplier as u64;
        let ok = scan(table, &component.body, factor, &mut found, &mut rest, false);
        // Carbon left over means an organic formula, which is not cut into ions unless the
        // writer bracketed the ion (nitrate groups in C3H5(NO3)3).
        let usable = ok.is_some()
            && (!has_carbon(&rest) || found.iter().all(|f| f.bracketed))
            && !found
                .iter()
                .any(|f| f.candidates.iter().any(|&c| pinned(&table.ions[c])));
        if !usable {
            found.clear();
            rest = Composition::default();
            units_composition(&component.body, factor, &mut rest)
                .ok_or(OxidationError::Overflow)?;
        }
        scanned.push(Scanned {
            found,
            rest,
            // Adducts after `·` are neutral; the formula's charge belongs to the main body.
            charge: if index == 0 { charge } else { 0 },
        });
    }
    if scanned.iter().all(|s| s.found.is_empty()) {
        return whole();
    }

    // Try each choice among same-atom ions; keep the first that the rest accepts, preferring
    // whole-number states for the rest (mixed valence such as Prussian blue).
    let slots: Vec<&Found> = scanned.iter().flat_map(|s| &s.found).collect();
    let mut choice = vec![0usize; slots.len()];
    let mut results: Vec<Vec<Assignment>> = Vec::new();
    for _ in 0..MAX_SPLITS {
        if let Some(result) = try_split(table, &scanned, &choice, pins, &elements)
            && !results.iter().any(|r| same_values(r, &result))
        {
            results.push(result);
        }
        // Next choice, odometer style.
        let mut k = 0;
        loop {
            if k == slots.len() {
                break;
            }
            choice[k] += 1;
            if choice[k] < slots[k].candidates.len() {
                break;
            }
            choice[k] = 0;
            k += 1;
        }
        if k == slots.len() {
            break;
        }
    }
    let whole_numbers = |r: &Vec<Assignment>| r.iter().all(|a| a.value.is_integer());
    // A d-block metal of groups 3 to 10 left below +2 by charge balance beside a known ion is
    // rare in salts (common practice): K2Fe[Fe(CN)6] is Fe(II) with ferrocyanide, not Fe(I)
    // with ferricyanide. Such a split is taken only when no other fits in whole numbers.
    let unusually_low = |r: &Vec<Assignment>| {
        r.iter().any(|a| {
            matches!(a.rule, Rule::ChargeBalance)
                && matches!(a.element.data().group, Some(3..=10))
                && a.value < BigRational::from_integer(BigInt::from(2))
        })
    };
    let best = results
        .iter()
        .position(|r| whole_numbers(r) && !unusually_low(r))
        .or_else(|| results.iter().position(whole_numbers))
        .or(if results.is_empty() { None } else { Some(0) });
    match best {
        None => whole(),
        Some(i) => {
            let several = results.len() > 1;
            let mut chosen = results.swap_remove(i);
            if several {
                // Other splits fit the formula too: the one shown is a choice.
                for a in &mut chosen {
                    a.status = Status::Assumed;
                }
            }
            Ok(chosen)
        }
    }
}

/// A binary compound of a metal and one element read as a salt of that element's ion, where
/// the ion table names the metal in `usual_with` (FeS2: Fe +2 and S2^2−). Only when nothing
/// is pinned and the metal comes out at a whole-number positive state (greigite Fe3S4 is a
/// sulfide, and stays with the rules). Every value is an assumption.
fn usual_salt(
    table: &IonTable,
    composition: &Composition,
    pins: &[Pin],
) -> Option<Vec<Assignment>> {
    let [(first, first_count), (second, second_count)] = *composition.counts() else {
        return None;
    };
    if !pins.is_empty() {
        return None;
    }
    let reads_as = |metal: Element, other: Element| {
        table.ions.iter().find(|ion| {
            matches!(ion.counts.as_slice(), [(e, _)] if *e == other.chemical_element())
                && ion.usual_with.contains(&metal.chemical_element())
        })
    };
    let (metal, metal_count, other_count, ion) = match reads_as(first, second) {
        Some(ion) => (first, first_count, second_count, ion),
        None => (second, second_count, first_count, reads_as(second, first)?),
    };
    let other = if metal == first { second } else { first };
    let per_ion = ion.counts[0].1;
    if per_ion == 0 || other_count % per_ion != 0 {
        return None;
    }
    let times = BigInt::from(other_count / per_ion);
    let rest = BigInt::from(composition.charge()) - BigInt::from(ion.charge) * times;
    let value = BigRational::new(rest, BigInt::from(metal_count));
    if !value.is_integer() || value <= BigRational::zero() {
        return None;
    }
    let rule = Rule::UsualIon {
        name: ion.name.clone(),
    };
    Some(vec![
        Assignment {
            element: metal,
            count: metal_count,
            value,
            status: Status::Assumed,
            rule: Rule::ChargeBalanceAfterAssumption,
        },
        Assignment {
            element: other,
            count: other_count,
            value: ion.oxidation[0].1.clone(),
            status: Status::Assumed,
            rule,
        },
    ])
}

fn same_values(a: &[Assignment], b: &[Assignment]) -> bool {
    let key = |r: &[Assignment]| {
        let mut v: Vec<(Element, BigRational, u64)> = r
            .iter()
            .map(|x| (x.element, x.value.clone(), x.count))
            .collect();
        v.sort_by(|x, y| (x.0, &x.1).cmp(&(y.0, &y.1)));
        v
    };
    key(a) == key(b)
}

fn try_split(
    table: &IonTable,
    scanned: &[Scanned],
    choice: &[usize],
    pins: &[Pin],
    elements: &[Element],
) -> Option<Vec<Assignment>> {
    let mut out = Vec::new();
    let mut k = 0;
    for component in scanned {
        let mut rest_charge = BigInt::from(component.charge);
        for found in &component.found {
            let ion = &table.ions[found.candidates[choice[k]]];
            k += 1;
            rest_charge -= BigInt::from(ion.charge) * BigInt::from(found.times);
            out.extend(ion_assignments(ion, found.times));
        }
        let fragment = if component.found.is_empty() {
            Fragment::Whole
        } else {
            Fragment::Rest { species: elements }
        };
        let rest = assign_fragment(
            component.rest.counts(),
            &BigRational::from_integer(rest_charge),
            pins,
            fragment,
        )
        .ok()?;
        if !component.found.is_empty() {
            // A split is only worth keeping when the rest follows from the rules, and any O
            // left over is plain oxide: O at another value means the ions were misread (HS− in
            // NaHSO3 would leave "O3" at 0).
            if pins.is_empty() && rest.iter().any(|a| a.status == Status::Assumed) {
                return None;
            }
            let minus_two = BigRational::from_integer(BigInt::from(-2));
            if rest
                .iter()
                .any(|a| a.element.symbol() == "O" && a.value != minus_two)
            {
                return None;
            }
        }
        out.extend(rest);
    }
    Some(out)
}

fn ion_assignments(ion: &KnownIon, times: u64) -> Vec<Assignment> {
    ion.counts
        .iter()
        .zip(&ion.oxidation)
        .map(|(&(element, count), (_, value))| Assignment {
            element,
            count: count.saturating_mul(times),
            value: value.clone(),
            status: Status::Determined,
            rule: if ion.ligand {
                Rule::Ligand {
                    name: ion.name.clone(),
                    charge: ion.charge,
                }
            } else {
                Rule::KnownIon {
                    name: ion.name.clone(),
                }
            },
        })
        .collect()
}

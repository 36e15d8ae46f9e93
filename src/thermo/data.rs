//! Formation data of species (ΔfH°, ΔfG°, S°, Cp° per phase): the built-in rows generated from
//! the CRC Handbook tables (`data/formation.csv`), user rows in the same layout, and the one
//! rule that picks the row a written species means.

use crate::composition::Composition;
use crate::notation::{Species, State, parse_species};
use crate::quotient::{Phase, phase_of};
use std::collections::HashMap;
use std::fmt;
use std::path::{Path, PathBuf};
use std::sync::LazyLock;

/// The built-in formation data exactly as shipped.
pub const BUILTIN_FORMATION_CSV: &str = include_str!("../../data/formation.csv");

/// The phase a row of formation data is for.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum DataPhase {
    /// Crystalline or amorphous solid.
    Solid,
    /// Pure liquid.
    Liquid,
    /// Ideal gas at p° = 1 bar.
    Gas,
    /// Solute at m° = 1 mol/kg, ideal dilute.
    Aqueous,
}

impl DataPhase {
    /// `s`, `l`, `g` or `aq`, as the data file and the notation's state labels write it.
    pub fn label(self) -> &'static str {
        match self {
            DataPhase::Solid => "s",
            DataPhase::Liquid => "l",
            DataPhase::Gas => "g",
            DataPhase::Aqueous => "aq",
        }
    }

    /// The phase a label names.
    pub fn from_label(label: &str) -> Option<DataPhase> {
        match label {
            "s" | "cr" => Some(DataPhase::Solid),
            "l" => Some(DataPhase::Liquid),
            "g" => Some(DataPhase::Gas),
            "aq" => Some(DataPhase::Aqueous),
            _ => None,
        }
    }

    /// The data phase of a species: its state label, or the project's one rule of state
    /// defaults ([`phase_of`]) when it has none (a charged species is dissolved; the sentence
    /// saying what was assumed comes from [`DataPhase::assumption`]).
    pub fn of_species(species: &Species) -> DataPhase {
        match species.state {
            Some(State::Solid | State::Crystal) => DataPhase::Solid,
            Some(State::Liquid) => DataPhase::Liquid,
            Some(State::Gas) => DataPhase::Gas,
            Some(State::Aqueous) => DataPhase::Aqueous,
            None if species.charge() != 0 => DataPhase::Aqueous,
            None => match phase_of(species).0 {
                Phase::Solid => DataPhase::Solid,
                Phase::PureLiquid | Phase::Solvent => DataPhase::Liquid,
                Phase::Gas => DataPhase::Gas,
                Phase::Solute => DataPhase::Aqueous,
            },
        }
    }

    /// What was assumed about the phase of a species written without a state label.
    pub fn assumption(species: &Species) -> Option<String> {
        phase_of(species).1
    }
}

impl fmt::Display for DataPhase {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.label())
    }
}

/// Where a row of formation data was read.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum DataOrigin {
    /// `data/formation.csv`.
    BuiltIn,
    /// A user's file.
    File(PathBuf),
}

impl fmt::Display for DataOrigin {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            DataOrigin::BuiltIn => f.write_str("built-in formation data"),
            DataOrigin::File(path) => write!(f, "{}", path.display()),
        }
    }
}

/// One species in one phase with its standard formation data at 298.15 K and 1 bar.
#[derive(Clone, Debug, PartialEq)]
pub struct FormationRow {
    /// The species as the file writes it, read by couplet's notation (no state label).
    pub species: Species,
    /// The phase the values are for.
    pub phase: DataPhase,
    /// The source table's name of the substance.
    pub name: String,
    /// CAS registry number, when the source gives one.
    pub cas: Option<String>,
    /// Key of the source table (`crc-ions`, `crc-substances`, or a user's key).
    pub table: String,
    /// ΔfH° in J/mol.
    pub dfh_joules_per_mol: Option<f64>,
    /// ΔfG° in J/mol.
    pub dfg_joules_per_mol: f64,
    /// S° in J/(mol·K) (for ions the conventional partial molar entropy, S°(H+) = 0).
    pub entropy_joules_per_mol_kelvin: Option<f64>,
    /// Cp° in J/(mol·K).
    pub cp_joules_per_mol_kelvin: Option<f64>,
    /// Molar mass as the source lists it (a check on the formula).
    pub listed_molar_mass: Option<f64>,
    /// Why a value is not the table's own print.
    pub note: Option<String>,
    /// Line in its file (1-based).
    pub line: usize,
    /// Which file.
    pub origin: DataOrigin,
}

impl FormationRow {
    /// The species with this row's state label, in canonical ASCII (`PbSO4(s)`, `Cu^2+(aq)`).
    pub fn label(&self) -> String {
        format!("{}({})", self.species.ascii(), self.phase.label())
    }

    /// One line naming the row and its source: name, CAS, phase, table key and file line.
    pub fn citation(&self) -> String {
        let cas = self
            .cas
            .as_deref()
            .map(|c| format!(", CAS {c}"))
            .unwrap_or_default();
        format!(
            "{} ({}{cas}), {} line {} [{}]",
            self.name, self.phase, self.origin, self.line, self.table
        )
    }
}

/// Why a formation-data file does not read.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum DataError {
    /// A line does not fit the documented layout.
    #[error("{origin}:{}{message}", line_text(*.line))]
    Row {
        /// Which file.
        origin: DataOrigin,
        /// 1-based line.
        line: usize,
        /// What is wrong.
        message: String,
    },
}

/// The result of picking the row a written species means.
#[derive(Clone, Debug)]
pub struct Resolved<'a> {
    /// The row used.
    pub row: &'a FormationRow,
    /// True when the species had no state label and its phase came from the defaults
    /// ([`DataPhase::assumption`] says which).
    pub phase_by_default: bool,
    /// Other rows of the same species and phase (polymorphs, isomers) that were not chosen,
    /// most stable first.
    pub alternatives: Vec<&'a FormationRow>,
}

/// Why no row fits a species.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum MissingData {
    /// The species has rows, but not in the phase asked for.
    #[error("no formation data for {species} in phase '{phase}'; the data have it as {}", phase_list(.available))]
    OtherPhase {
        /// The species as written.
        species: String,
        /// The phase asked for.
        phase: DataPhase,
        /// The phases the data do have.
        available: Vec<DataPhase>,
    },
    /// No row has this formula and charge.
    #[error("no formation data for {species} in any phase{}", assumed_text(.assumed))]
    Absent {
        /// The species as written.
        species: String,
        /// The phase assumption, when one was made.
        assumed: Option<String>,
    },
}

/// `12: ` for a line, nothing when the fault is the file as a whole (line 0).
fn line_text(line: usize) -> String {
    if line == 0 {
        " ".to_owned()
    } else {
        format!("{line}: ")
    }
}

fn phase_list(phases: &[DataPhase]) -> String {
    phases
        .iter()
        .map(|p| format!("({p})"))
        .collect::<Vec<_>>()
        .join(", ")
}

fn assumed_text(assumed: &Option<String>) -> String {
    assumed
        .as_deref()
        .map(|a| format!(" ({a})"))
        .unwrap_or_default()
}

/// Formation data: rows in file order, indexed by composition and charge.
#[derive(Clone, Debug, Default)]
pub struct FormationData {
    rows: Vec<FormationRow>,
    by_composition: HashMap<u64, Vec<usize>>,
    tables: Vec<(String, String)>,
    replaced: Vec<String>,
    hydrogen_gas: Option<usize>,
}

/// A hash that two formulas share when they hold the same atoms and charge, whatever order or
/// grouping they were written in (`PbSO4`, `O4PbS`); rows under one hash are told apart by
/// [`same_composition`]. Computed without allocating.
pub fn composition_key(composition: &Composition) -> u64 {
    use std::hash::{Hash, Hasher};
    let mut hasher = std::collections::hash_map::DefaultHasher::new();
    // Order-independent: a sum and a xor of per-element hashes.
    let (mut sum, mut xor) = (0u64, 0u64);
    for (element, count) in composition.counts() {
        let mut one = std::collections::hash_map::DefaultHasher::new();
        (element, count).hash(&mut one);
        let h = one.finish();
        sum = sum.wrapping_add(h);
        xor ^= h;
    }
    (
        sum,
        xor,
        composition.counts().len(),
        composition.denominator(),
        composition.charge(),
    )
        .hash(&mut hasher);
    hasher.finish()
}

/// True when two compositions hold the same atoms and charge in any order.
pub fn same_composition(a: &Composition, b: &Composition) -> bool {
    // Counts are kept over the least common denominator, so equal compositions have equal
    // denominators and equal scaled counts.
    a.charge() == b.charge()
        && a.denominator() == b.denominator()
        && a.counts().len() == b.counts().len()
        && a.counts()
            .iter()
            .all(|(element, count)| b.scaled_count(*element) == *count)
}

static BUILTIN: LazyLock<FormationData> = LazyLock::new(|| {
    match FormationData::from_csv(BUILTIN_FORMATION_CSV, DataOrigin::BuiltIn) {
        Ok(data) => data,
        // The test suite loads the built-in data, so this cannot ship broken.
        Err(error) => panic!("data/formation.csv is broken: {error}"),
    }
});

const COLUMNS: [&str; 11] = [
    "formula", "state", "name", "cas", "table", "dfh_j", "dfg_j", "s_j_k", "cp_j_k", "mw", "note",
];

impl FormationData {
    /// The built-in rows (`data/formation.csv`), read once.
    pub fn builtin() -> &'static FormationData {
        &BUILTIN
    }

    /// Reads formation data in the layout of `data/formation.csv`: `#` comment lines (a line
    /// `# KEY: TEXT` names a source table), one header row with the documented columns, then
    /// one row per species and phase. Values in J/mol and J/(mol·K).
    pub fn from_csv(text: &str, origin: DataOrigin) -> Result<FormationData, DataError> {
        let mut data = FormationData::default();
        data.add_csv(text, origin)?;
        Ok(data)
    }

    /// Reads a user's file of formation data (the layout of [`FormationData::from_csv`]).
    pub fn read_file(path: &Path) -> Result<FormationData, DataError> {
        let mut data = FormationData::default();
        data.add_file(path)?;
        Ok(data)
    }

    /// Adds the rows of a user's file ([`FormationData::add_csv`] on its text).
    pub fn add_file(&mut self, path: &Path) -> Result<(), DataError> {
        let origin = DataOrigin::File(path.to_path_buf());
        let text = std::fs::read_to_string(path).map_err(|e| DataError::Row {
            origin: origin.clone(),
            line: 0,
            message: format!("cannot read: {e}"),
        })?;
        self.add_csv(&text, origin)
    }

    /// Adds rows; a row for a species and phase already present replaces the earlier one
    /// (recorded in [`FormationData::replaced`]).
    pub fn add_csv(&mut self, text: &str, origin: DataOrigin) -> Result<(), DataError> {
        let error = |line: usize, message: String| DataError::Row {
            origin: origin.clone(),
            line,
            message,
        };
        // `# KEY: TEXT` comment lines name source tables (a key is one word).
        for comment in text.lines().filter_map(|l| l.trim().strip_prefix('#')) {
            if let Some((key, value)) = comment.trim().split_once(": ")
                && !key.is_empty()
                && !key.contains(' ')
            {
                self.tables.push((key.to_owned(), value.to_owned()));
            }
        }
        let mut reader = csv::ReaderBuilder::new()
            .has_headers(false)
            .comment(Some(b'#'))
            .flexible(true)
            .from_reader(text.as_bytes());
        let mut header_seen = false;
        for record in reader.records() {
            let record = record.map_err(|e| {
                let line = e.position().map_or(0, |p| p.line() as usize);
                error(line, format!("not CSV: {e}"))
            })?;
            let line = record.position().map_or(0, |p| p.line() as usize);
            let cells: Vec<String> = record.iter().map(str::to_owned).collect();
            if !header_seen {
                if cells != COLUMNS {
                    return Err(error(
                        line,
                        format!("the header must be {}", COLUMNS.join(",")),
                    ));
                }
                header_seen = true;
                continue;
            }
            if cells.len() != COLUMNS.len() {
                return Err(error(
                    line,
                    format!(
                        "{} cells where the header has {}",
                        cells.len(),
                        COLUMNS.len()
                    ),
                ));
            }
            let row = read_row(&cells, line, &origin).map_err(|m| error(line, m))?;
            self.insert(row);
        }
        if !header_seen {
            return Err(error(0, "no header row".to_owned()));
        }
        Ok(())
    }

    fn insert(&mut self, row: FormationRow) {
        let key = composition_key(&row.species.composition);
        let same = self.by_composition.get(&key).and_then(|indices| {
            indices.iter().copied().find(|&i| {
                let old = &self.rows[i];
                old.phase == row.phase && old.origin != row.origin && old.species == row.species
            })
        });
        let is_hydrogen_gas = row.phase == DataPhase::Gas
            && row.species.charge() == 0
            && row.species.composition.is_integral()
            && row.species.composition.counts().len() == 1
            && row.species.composition.counts()[0].0.symbol() == "H"
            && row.species.composition.counts()[0].1 == 2;
        if let Some(i) = same {
            self.replaced.push(format!(
                "{} from {} replaces the row from {}",
                row.label(),
                row.origin,
                self.rows[i].origin
            ));
            self.rows[i] = row;
            if is_hydrogen_gas {
                self.hydrogen_gas = Some(i);
            }
            return;
        }
        if is_hydrogen_gas && self.hydrogen_gas.is_none() {
            self.hydrogen_gas = Some(self.rows.len());
        }
        self.by_composition
            .entry(key)
            .or_default()
            .push(self.rows.len());
        self.rows.push(row);
    }

    /// The row of H2(g), whose entropy and heat capacity the electron shares under the SHE
    /// convention.
    pub fn hydrogen_gas(&self) -> Option<&FormationRow> {
        self.hydrogen_gas.map(|i| &self.rows[i])
    }

    /// Every row, in file order.
    pub fn rows(&self) -> &[FormationRow] {
        &self.rows
    }

    /// The source tables named in the files' comments: (key, citation).
    pub fn tables(&self) -> &[(String, String)] {
        &self.tables
    }

    /// The citation of a table key.
    pub fn table_citation(&self, key: &str) -> Option<&str> {
        self.tables
            .iter()
            .find(|(k, _)| k == key)
            .map(|(_, v)| v.as_str())
    }

    /// Notes on rows that a later file replaced.
    pub fn replaced(&self) -> &[String] {
        &self.replaced
    }

    /// Every row with the atoms and charge of `species`, any phase.
    pub fn rows_for(&self, species: &Species) -> Vec<&FormationRow> {
        self.candidates(species).collect()
    }

    fn candidates<'s, 'q>(
        &'s self,
        species: &'q Species,
    ) -> impl Iterator<Item = &'s FormationRow> + use<'s, 'q> {
        let composition = &species.composition;
        self.by_composition
            .get(&composition_key(composition))
            .into_iter()
            .flatten()
            .map(|&i| &self.rows[i])
            .filter(move |row| same_composition(&row.species.composition, composition))
    }

    /// The row a written species means. Its phase is its state label or the documented
    /// default; among several rows of that phase (polymorphs, isomers) the one with the lowest
    /// ΔfG°, the stable form at 298.15 K, is taken and the others are listed.
    pub fn resolve(&self, species: &Species) -> Result<Resolved<'_>, MissingData> {
        let phase = DataPhase::of_species(species);
        let mut best: Option<&FormationRow> = None;
        let mut others = 0;
        for row in self.candidates(species).filter(|r| r.phase == phase) {
            match best {
                Some(b) if b.dfg_joules_per_mol <= row.dfg_joules_per_mol => others += 1,
                Some(_) => {
                    others += 1;
                    best = Some(row);
                }
                None => best = Some(row),
            }
        }
        if let Some(row) = best {
            let alternatives = if others == 0 {
                Vec::new()
            } else {
                let mut rest: Vec<&FormationRow> = self
                    .candidates(species)
                    .filter(|r| r.phase == phase && !std::ptr::eq(*r, row))
                    .collect();
                rest.sort_by(|a, b| a.dfg_joules_per_mol.total_cmp(&b.dfg_joules_per_mol));
                rest
            };
            return Ok(Resolved {
                row,
                phase_by_default: species.state.is_none(),
                alternatives,
            });
        }
        let written = species.ascii();
        let assumed = DataPhase::assumption(species);
        let mut available: Vec<DataPhase> = self.candidates(species).map(|r| r.phase).collect();
        if available.is_empty() {
            return Err(MissingData::Absent {
                species: written,
                assumed,
            });
        }
        available.sort();
        available.dedup();
        Err(MissingData::OtherPhase {
            species: match species.state {
                Some(_) => written,
                None => format!("{written} ({})", assumed.unwrap_or_default()),
            },
            phase,
            available,
        })
    }
}

fn optional_number(text: &str, column: &str) -> Result<Option<f64>, String> {
    let text = text.trim();
    if text.is_empty() {
        return Ok(None);
    }
    let value: f64 = text
        .parse()
        .map_err(|_| format!("{column}: '{text}' is not a number"))?;
    if !value.is_finite() {
        return Err(format!("{column}: '{text}' is not a finite number"));
    }
    Ok(Some(value))
}

fn read_row(cells: &[String], line: usize, origin: &DataOrigin) -> Result<FormationRow, String> {
    let species =
        parse_species(&cells[0]).map_err(|e| format!("formula '{}': {}", cells[0], e.message))?;
    if species.state.is_some() {
        return Err(format!(
            "formula '{}': write the phase in the state column, not in the formula",
            cells[0]
        ));
    }
    if species.is_electron() {
        return Err("the electron has no formation data of its own (zero by convention)".into());
    }
    let phase = DataPhase::from_label(cells[1].trim())
        .ok_or_else(|| format!("state '{}': expected s, l, g or aq", cells[1]))?;
    if species.charge() != 0 && phase != DataPhase::Aqueous {
        return Err(format!(
            "{} is charged: ions have formation data only as (aq)",
            cells[0]
        ));
    }
    let dfg = optional_number(&cells[6], "dfg_j")?
        .ok_or_else(|| "dfg_j: every row needs ΔfG°".to_owned())?;
    let non_empty = |text: &String| (!text.trim().is_empty()).then(|| text.trim().to_owned());
    Ok(FormationRow {
        species,
        phase,
        name: cells[2].trim().to_owned(),
        cas: non_empty(&cells[3]),
        table: non_empty(&cells[4])
            .ok_or_else(|| "table: every row names its source".to_owned())?,
        dfh_joules_per_mol: optional_number(&cells[5], "dfh_j")?,
        dfg_joules_per_mol: dfg,
        entropy_joules_per_mol_kelvin: optional_number(&cells[7], "s_j_k")?,
        cp_joules_per_mol_kelvin: optional_number(&cells[8], "cp_j_k")?,
        listed_molar_mass: optional_number(&cells[9], "mw")?,
        note: non_empty(&cells[10]),
        line,
        origin: origin.clone(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keys_ignore_order_and_grouping() {
        let a = parse_species("PbSO4").unwrap();
        let b = parse_species("O4PbS").unwrap();
        assert_eq!(
            composition_key(&a.composition),
            composition_key(&b.composition)
        );
        assert!(same_composition(&a.composition, &b.composition));
        let c = parse_species("PbSO3").unwrap();
        assert!(!same_composition(&a.composition, &c.composition));
    }
}

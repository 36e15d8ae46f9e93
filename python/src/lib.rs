//! Python bindings of couplet: thin wrappers that call the library and convert its values
//! (exact numbers to `int` / `fractions.Fraction`, arrays through numpy's buffers). No
//! chemistry is computed here.

mod errors;
mod model;

use couplet::activity::{ActivityModel, GammaModel};
use couplet::balance::{BalanceOptions, ElectronRule, Medium as Solvent, balance};
use couplet::capacity::{self, Densities};
use couplet::cell::{self, CellOptions};
use couplet::check::{CheckOptions, check, load_file};
use couplet::constants::STANDARD_TEMPERATURE_KELVIN;
use couplet::discharge::{Amount, DischargeSpec, discharge};
use couplet::nernst::{Conditions, Standard, evaluate};
use couplet::notation::{Equation, Species, parse_equation, parse_species};
use couplet::oxidation::{RedoxAnalysis, analyse, oxidation_numbers};
use couplet::quotient::{Basis, Quotient, QuotientOptions};
use couplet::reaction::Reaction;
use couplet::table::{Couple as LibCouple, LookupError, Medium, Table};
use couplet::thermo::{FormationData, couple_from_data};
use errors::Failure;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::ToPrimitive;
use numpy::IntoPyArray;
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList};
use std::collections::HashMap;
use std::sync::OnceLock;

/// `fractions.Fraction(numerator, denominator)`.
fn fraction<'py>(py: Python<'py>, value: &BigRational) -> PyResult<Bound<'py, PyAny>> {
    py.import("fractions")?
        .getattr("Fraction")?
        .call1((value.numer().clone(), value.denom().clone()))
}

/// A whole number as `int`, anything else as `Fraction`.
fn exact<'py>(py: Python<'py>, value: &BigRational) -> PyResult<Bound<'py, PyAny>> {
    if value.is_integer() {
        Ok(value.to_integer().into_pyobject(py)?.into_any())
    } else {
        fraction(py, value)
    }
}

fn species_of(text: &str) -> Result<Species, Failure> {
    parse_species(text).map_err(Failure::from)
}

/// Species/value pairs from a mapping of formula text to number.
fn pairs(map: Option<HashMap<String, f64>>) -> Result<Vec<(Species, f64)>, Failure> {
    let mut out = Vec::new();
    for (text, value) in map.unwrap_or_default() {
        out.push((species_of(&text)?, value));
    }
    // HashMap order is arbitrary; the library's results do not depend on it, messages do.
    out.sort_by_key(|(s, _)| s.ascii());
    Ok(out)
}

fn gamma_model(name: &str) -> Result<GammaModel, Failure> {
    GammaModel::from_name(name).ok_or_else(|| {
        Failure::usage(format!(
            "activity model '{name}': expected ideal, debye-huckel, extended, davies or table"
        ))
    })
}

fn medium_of(name: Option<&str>) -> Result<Option<Medium>, Failure> {
    name.map(|n| {
        Medium::from_name(n).ok_or_else(|| {
            Failure::usage(format!("medium must be acid, base or neutral, not '{n}'"))
        })
    })
    .transpose()
}

fn temperature(kelvin: f64) -> Result<f64, Failure> {
    if kelvin.is_finite() && kelvin > 0.0 {
        Ok(kelvin)
    } else {
        Err(Failure::usage(format!(
            "temperature must be a positive number of kelvin, not {kelvin}"
        )))
    }
}

/// (species text, exact coefficient) for each side of a reaction.
fn sides<'py>(
    py: Python<'py>,
    reaction: &Reaction,
) -> PyResult<(Bound<'py, PyList>, Bound<'py, PyList>)> {
    let list = |terms: Vec<(&Species, BigRational)>| -> PyResult<Bound<'py, PyList>> {
        let items = terms
            .into_iter()
            .map(|(s, nu)| Ok((s.ascii(), exact(py, &nu)?)))
            .collect::<PyResult<Vec<_>>>()?;
        PyList::new(py, items)
    };
    Ok((
        list(reaction.reactants().collect())?,
        list(reaction.products().collect())?,
    ))
}

/// One species as read: canonical forms, charge, state, composition and molar mass.
#[pyclass(frozen, module = "couplet")]
struct ParsedSpecies {
    inner: Species,
}

#[pymethods]
impl ParsedSpecies {
    /// Canonical ASCII, which the parser reads back.
    #[getter]
    fn ascii(&self) -> String {
        self.inner.ascii()
    }
    /// Unicode with sub- and superscripts.
    #[getter]
    fn unicode(&self) -> String {
        self.inner.unicode()
    }
    /// mhchem form for LaTeX (`\ce{...}`).
    #[getter]
    fn mhchem(&self) -> String {
        self.inner.mhchem()
    }
    /// Net charge.
    #[getter]
    fn charge(&self) -> i64 {
        self.inner.charge()
    }
    /// State label (`s`, `l`, `g`, `aq`, `cr`) or None.
    #[getter]
    fn state(&self) -> Option<&'static str> {
        self.inner.state.map(|s| s.label())
    }
    /// True for the electron.
    #[getter]
    fn is_electron(&self) -> bool {
        self.inner.is_electron()
    }
    /// Atom counts by element symbol.
    #[getter]
    fn elements(&self) -> Vec<(String, u64)> {
        self.inner
            .composition
            .counts()
            .iter()
            .map(|(e, n)| (e.symbol().to_owned(), *n))
            .collect()
    }
    /// Molar mass in g/mol (CIAAW 2021 abridged), None for the electron.
    #[getter]
    fn molar_mass(&self) -> Option<f64> {
        if self.inner.is_electron() {
            return None;
        }
        self.inner.composition.molar_mass().map(|m| m.grams_per_mol)
    }
    fn __str__(&self) -> String {
        self.inner.ascii()
    }
    fn __repr__(&self) -> String {
        format!("Species('{}')", self.inner.ascii())
    }
    fn __eq__(&self, other: &Bound<'_, PyAny>) -> bool {
        other
            .downcast::<ParsedSpecies>()
            .is_ok_and(|o| o.get().inner == self.inner)
    }
    fn __hash__(&self) -> u64 {
        use std::hash::{Hash, Hasher};
        let mut hasher = std::collections::hash_map::DefaultHasher::new();
        self.inner.ascii().hash(&mut hasher);
        hasher.finish()
    }
}

/// Reads one species (`"SO4^2-"`, `"CuSO4*5H2O"`, `"O2(g)"`).
#[pyfunction(name = "species")]
fn py_species(text: &str) -> Result<ParsedSpecies, Failure> {
    Ok(ParsedSpecies {
        inner: species_of(text)?,
    })
}

/// An equation as written.
#[pyclass(frozen, module = "couplet")]
struct ParsedEquation {
    inner: Equation,
}

#[pymethods]
impl ParsedEquation {
    /// `[(coefficient, Species), ...]` on the left; coefficients are `Fraction`s.
    #[getter]
    fn reactants<'py>(&self, py: Python<'py>) -> PyResult<Vec<(Bound<'py, PyAny>, ParsedSpecies)>> {
        terms(py, &self.inner.reactants)
    }
    /// `[(coefficient, Species), ...]` on the right.
    #[getter]
    fn products<'py>(&self, py: Python<'py>) -> PyResult<Vec<(Bound<'py, PyAny>, ParsedSpecies)>> {
        terms(py, &self.inner.products)
    }
    /// True when `e-` is written (a half-reaction).
    #[getter]
    fn has_electrons(&self) -> bool {
        self.inner.has_electrons()
    }
    /// Canonical ASCII.
    #[getter]
    fn ascii(&self) -> String {
        self.inner.ascii()
    }
    /// Unicode.
    #[getter]
    fn unicode(&self) -> String {
        self.inner.unicode()
    }
    /// mhchem LaTeX.
    #[getter]
    fn latex(&self) -> String {
        self.inner.latex()
    }
    /// True when atoms and charge are conserved as written.
    #[getter]
    fn is_balanced(&self) -> bool {
        Reaction::from_equation(&self.inner)
            .imbalance()
            .is_balanced()
    }
    fn __str__(&self) -> String {
        self.inner.ascii()
    }
    fn __repr__(&self) -> String {
        format!("Equation('{}')", self.inner.ascii())
    }
}

fn terms<'py>(
    py: Python<'py>,
    terms: &[couplet::notation::Term],
) -> PyResult<Vec<(Bound<'py, PyAny>, ParsedSpecies)>> {
    terms
        .iter()
        .map(|t| {
            let c = BigRational::new(
                BigInt::from(*t.coefficient.numer()),
                BigInt::from(*t.coefficient.denom()),
            );
            Ok((
                fraction(py, &c)?,
                ParsedSpecies {
                    inner: t.species.clone(),
                },
            ))
        })
        .collect()
}

/// Reads an equation or half-reaction.
#[pyfunction(name = "equation")]
fn py_equation(text: &str) -> Result<ParsedEquation, Failure> {
    Ok(ParsedEquation {
        inner: parse_equation(text).map_err(Failure::from)?,
    })
}

/// A reaction the balancer made and checked.
#[pyclass(frozen, module = "couplet")]
struct Balanced {
    reaction: Reaction,
    electrons: Option<BigInt>,
    medium: &'static str,
    half: bool,
    ascii: String,
    unicode: String,
}

#[pymethods]
impl Balanced {
    /// `[(species, int), ...]` on the left.
    #[getter]
    fn reactants<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        Ok(sides(py, &self.reaction)?.0)
    }
    /// `[(species, int), ...]` on the right.
    #[getter]
    fn products<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        Ok(sides(py, &self.reaction)?.1)
    }
    /// Electrons of a half-reaction, or transferred in a whole reaction (None when unknown).
    #[getter]
    fn electrons(&self) -> Option<BigInt> {
        self.electrons.clone()
    }
    /// `none`, `acid` or `base`.
    #[getter]
    fn medium(&self) -> &'static str {
        self.medium
    }
    /// True for a half-reaction.
    #[getter]
    fn is_half_reaction(&self) -> bool {
        self.half
    }
    /// Canonical ASCII.
    #[getter]
    fn ascii(&self) -> String {
        self.ascii.clone()
    }
    /// Unicode.
    #[getter]
    fn unicode(&self) -> String {
        self.unicode.clone()
    }
    /// The usual caution when the reaction involves a hazard, else None.
    #[getter]
    fn caution(&self) -> Option<String> {
        cell::caution(&self.reaction)
    }
    /// The redox analysis of this reaction.
    fn redox(&self) -> Result<Redox, Failure> {
        Ok(Redox {
            inner: analyse(&self.reaction)?,
        })
    }
    fn __str__(&self) -> String {
        self.ascii.clone()
    }
    fn __repr__(&self) -> String {
        format!("Balanced('{}')", self.ascii)
    }
}

/// Balances an equation exactly. `medium` is "none", "acid" or "base"; `half=True` says an
/// equation written without `e-` is a half-reaction.
#[pyfunction(name = "balance", signature = (text, medium = "none", half = false))]
fn py_balance(text: &str, medium: &str, half: bool) -> Result<Balanced, Failure> {
    let solvent = match medium {
        "none" => Solvent::None,
        "acid" => Solvent::Acid,
        "base" => Solvent::Base,
        other => {
            return Err(Failure::usage(format!(
                "medium must be none, acid or base, not '{other}'"
            )));
        }
    };
    let options = BalanceOptions {
        medium: solvent,
        electrons: if half {
            ElectronRule::Always
        } else {
            ElectronRule::HalfReactions
        },
        ..BalanceOptions::default()
    };
    let balanced = balance(&parse_equation(text).map_err(Failure::from)?, &options)?;
    Ok(Balanced {
        reaction: balanced.reaction().clone(),
        electrons: balanced.electrons(),
        medium: balanced.medium().name(),
        half: balanced.is_half_reaction(),
        ascii: balanced.ascii(),
        unicode: balanced.unicode(),
    })
}

/// Oxidation numbers of a species: `{symbol: Fraction}` (averages where sites differ).
#[pyfunction(name = "oxidation_numbers")]
fn py_oxidation_numbers<'py>(py: Python<'py>, text: &str) -> PyResult<Bound<'py, PyDict>> {
    let species = species_of(text)?;
    let found = oxidation_numbers(&species).map_err(Failure::from)?;
    let out = PyDict::new(py);
    for element in &found.elements {
        out.set_item(
            element.element.symbol(),
            fraction(py, &element.oxidation_number)?,
        )?;
    }
    Ok(out)
}

/// Atoms of one element going from one oxidation number to another.
#[pyclass(frozen, get_all, module = "couplet")]
struct ElementChange {
    /// Element symbol.
    element: String,
    /// Oxidation number before (Fraction).
    before: PyObject,
    /// Oxidation number after (Fraction).
    after: PyObject,
    /// Atoms (Fraction).
    atoms: PyObject,
    /// Electrons moved (Fraction).
    electrons: PyObject,
}

#[pymethods]
impl ElementChange {
    fn __repr__(&self, py: Python<'_>) -> String {
        format!(
            "ElementChange({} {} -> {}, {} e-)",
            self.element,
            self.before.bind(py),
            self.after.bind(py),
            self.electrons.bind(py)
        )
    }
}

/// The redox analysis: who is oxidised and reduced, n and the kind.
#[pyclass(frozen, module = "couplet")]
struct Redox {
    inner: RedoxAnalysis,
}

fn changes(
    py: Python<'_>,
    list: &[couplet::oxidation::ElementChange],
) -> PyResult<Vec<ElementChange>> {
    list.iter()
        .map(|c| {
            Ok(ElementChange {
                element: c.element.symbol().to_owned(),
                before: fraction(py, &c.from)?.unbind(),
                after: fraction(py, &c.to)?.unbind(),
                atoms: fraction(py, &c.atoms)?.unbind(),
                electrons: fraction(py, &c.electrons)?.unbind(),
            })
        })
        .collect()
}

#[pymethods]
impl Redox {
    /// `redox`, `disproportionation`, `comproportionation`, `no_redox`, `reduction`, `oxidation`.
    #[getter]
    fn kind(&self) -> &'static str {
        self.inner.kind.name()
    }
    /// Electrons transferred, from oxidation-number changes (Fraction).
    #[getter]
    fn n<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        fraction(py, &self.inner.n)
    }
    /// Elements whose oxidation number goes up.
    #[getter]
    fn oxidized(&self, py: Python<'_>) -> PyResult<Vec<ElementChange>> {
        changes(py, &self.inner.oxidized)
    }
    /// Elements whose oxidation number goes down.
    #[getter]
    fn reduced(&self, py: Python<'_>) -> PyResult<Vec<ElementChange>> {
        changes(py, &self.inner.reduced)
    }
    fn __repr__(&self) -> String {
        format!(
            "Redox(kind='{}', n={})",
            self.inner.kind.name(),
            self.inner.n
        )
    }
}

/// The redox analysis of an equation as written (balance it first for a full account).
#[pyfunction(name = "redox")]
fn py_redox(text: &str) -> Result<Redox, Failure> {
    let equation = parse_equation(text).map_err(Failure::from)?;
    Ok(Redox {
        inner: analyse(&Reaction::from_equation(&equation))?,
    })
}

fn table() -> &'static Table {
    static TABLE: OnceLock<Table> = OnceLock::new();
    TABLE.get_or_init(Table::builtin)
}

/// The couple a query names: table id, `Ox/Red` or half-reaction; with `e0` a typed
/// half-reaction; otherwise a couple no table lists from formation data.
fn resolve(query: &str, e0: Option<f64>, medium: Option<Medium>) -> Result<LibCouple, Failure> {
    if let Some(e0) = e0 {
        return LibCouple::new(query, e0).map_err(Failure::from);
    }
    match table().find(query, medium) {
        Ok(found) => Ok(found.clone()),
        Err(not_found @ LookupError::NotFound { .. }) => {
            match couple_from_data(query, medium, FormationData::builtin()) {
                Ok(found) => Ok(found.couple),
                Err(why) => Err(Failure::new(
                    errors::Class::Chemistry,
                    "not_found",
                    format!("{not_found}; nor from formation data: {why}"),
                )),
            }
        }
        Err(other) => Err(other.into()),
    }
}

/// A couple: a reduction half-reaction with its E° and where it came from.
#[pyclass(frozen, module = "couplet")]
#[derive(Clone)]
struct Couple {
    inner: LibCouple,
}

#[pymethods]
impl Couple {
    /// The table id, None for a typed or computed couple.
    #[getter]
    fn id(&self) -> Option<String> {
        self.inner.id.clone()
    }
    /// The half-reaction, canonical ASCII.
    #[getter]
    fn reaction(&self) -> String {
        self.inner.reaction.to_string()
    }
    /// E° in V vs SHE at 298.15 K.
    #[getter]
    fn e0(&self) -> f64 {
        self.inner.e0_volts
    }
    /// dE°/dT in mV/K, None when unknown.
    #[getter]
    fn dedt(&self) -> Option<f64> {
        self.inner.dedt_millivolts_per_kelvin
    }
    /// Electrons taken up: an int (a Fraction only for a couple written with fractions).
    #[getter]
    fn electrons<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        exact(py, &self.inner.electrons())
    }
    /// The source of E°.
    #[getter]
    fn source(&self) -> Option<String> {
        self.inner.source.clone()
    }
    /// `acid`, `base` or `neutral`.
    #[getter]
    fn medium(&self) -> &'static str {
        self.inner.medium.name()
    }
    /// Specific capacities of the electrode materials of this half-reaction:
    /// `{species: mAh/g}` (both its oxidised and reduced forms, per formula unit).
    fn capacities(&self) -> Result<Vec<(String, f64)>, Failure> {
        let materials =
            capacity::half_reaction_materials(&self.inner.reaction, &Densities::builtin())?;
        Ok(materials
            .into_iter()
            .map(|m| (m.species.ascii(), m.milliamp_hours_per_gram))
            .collect())
    }
    fn __repr__(&self) -> String {
        format!(
            "Couple('{}', e0={})",
            self.inner.reaction, self.inner.e0_volts
        )
    }
}

/// Looks a couple up by id, `Ox/Red` or half-reaction (formation data when no table lists
/// it), or makes one from a typed half-reaction and `e0` (V vs SHE).
#[pyfunction(name = "couple", signature = (query, e0 = None, medium = None))]
fn py_couple(query: &str, e0: Option<f64>, medium: Option<&str>) -> Result<Couple, Failure> {
    Ok(Couple {
        inner: resolve(query, e0, medium_of(medium)?)?,
    })
}

/// A cell made of two couples.
#[pyclass(frozen, subclass, module = "couplet")]
struct Cell {
    inner: couplet::cell::Cell,
}

impl Cell {
    fn standard(&self) -> Standard<'_> {
        let dedt = match (
            self.inner.cathode.dedt_millivolts_per_kelvin,
            self.inner.anode.dedt_millivolts_per_kelvin,
        ) {
            (Some(c), Some(a)) => Some((c - a) / 1000.0),
            _ => None,
        };
        Standard {
            reaction: &self.inner.net,
            e0_volts: self.inner.e0_volts,
            electrons: self.inner.electrons.to_f64().unwrap_or(f64::NAN),
            de0_dt_volts_per_kelvin: dedt,
        }
    }
}

#[pymethods]
impl Cell {
    /// Builds the cell `cathode | anode` from two couple queries (ids, `Ox/Red`,
    /// half-reactions); `cathode_e0`/`anode_e0` give E° (V vs SHE) of typed half-reactions;
    /// `medium` writes both halves for acid or base.
    #[new]
    #[pyo3(signature = (cathode, anode, *, cathode_e0 = None, anode_e0 = None, medium = None, temperature = STANDARD_TEMPERATURE_KELVIN))]
    fn new(
        cathode: &str,
        anode: &str,
        cathode_e0: Option<f64>,
        anode_e0: Option<f64>,
        medium: Option<&str>,
        temperature: f64,
    ) -> Result<Cell, Failure> {
        let medium = medium_of(medium)?;
        let cathode = resolve(cathode, cathode_e0, medium)?;
        let anode = resolve(anode, anode_e0, medium)?;
        let options = CellOptions {
            temperature_kelvin: temperature,
            medium,
        };
        Ok(Cell {
            inner: cell::combine(&cathode, &anode, options)?,
        })
    }
    /// The cathode couple as used.
    #[getter]
    fn cathode(&self) -> Couple {
        Couple {
            inner: self.inner.cathode.clone(),
        }
    }
    /// The anode couple (as a reduction) as used.
    #[getter]
    fn anode(&self) -> Couple {
        Couple {
            inner: self.inner.anode.clone(),
        }
    }
    /// The net reaction, canonical ASCII.
    #[getter]
    fn net(&self) -> String {
        self.inner.net.to_string()
    }
    /// `[(species, int|Fraction), ...]` consumed by the net reaction.
    #[getter]
    fn reactants<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        Ok(sides(py, &self.inner.net)?.0)
    }
    /// `[(species, int|Fraction), ...]` formed.
    #[getter]
    fn products<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        Ok(sides(py, &self.inner.net)?.1)
    }
    /// Electrons transferred, n (int).
    #[getter]
    fn electrons(&self) -> BigInt {
        self.inner.electrons.clone()
    }
    /// E°cell in V at 298.15 K.
    #[getter]
    fn e0(&self) -> f64 {
        self.inner.e0_volts
    }
    /// ΔG° in kJ/mol of the net reaction as written, at 298.15 K.
    #[getter]
    fn delta_g0(&self) -> f64 {
        self.inner.delta_g0_kilojoules_per_mol
    }
    /// log10 K at 298.15 K.
    #[getter]
    fn log10_k(&self) -> f64 {
        self.inner.log10_k
    }
    /// K at 298.15 K, None when it overflows a float (use log10_k).
    #[getter]
    fn k(&self) -> Option<f64> {
        self.inner.k()
    }
    /// dE°cell/dT in V/K, None unless both halves have one.
    #[getter]
    fn de0_dt(&self) -> Option<f64> {
        self.standard().de0_dt_volts_per_kelvin
    }
    /// True when E°cell > 0 (galvanic as written).
    #[getter]
    fn runs_as_written(&self) -> bool {
        self.inner.runs_as_written
    }
    /// Remarks on conversions and missing data.
    #[getter]
    fn notes(&self) -> Vec<String> {
        self.inner.notes.clone()
    }
    /// The usual caution when the reaction involves a hazard, else None.
    #[getter]
    fn caution(&self) -> Option<String> {
        cell::caution(&self.inner.net)
    }
    /// Q of the net reaction as an expression (`"a(Zn2+) / a(Cu2+)"`); `water=True` keeps
    /// a(H2O) in it.
    #[pyo3(signature = (*, water = false))]
    fn quotient(&self, water: bool) -> String {
        Quotient::new(
            &self.inner.net,
            &QuotientOptions {
                basis: Basis::Molal,
                water_enters: water,
            },
        )
        .expression()
    }
    /// E in V at one state. `activities`, `molalities` (mol/kg) and `pressures` (bar) map
    /// species to values; `model` is the γ model for molalities (ideal, debye-huckel,
    /// extended, davies, table); `force` uses it beyond its documented range; `ph` sets
    /// a(H+). Unlisted pure phases are at unit activity; an unlisted solute is an error.
    #[pyo3(signature = (*, activities = None, molalities = None, pressures = None, temperature = STANDARD_TEMPERATURE_KELVIN, model = "ideal", force = false, ph = None))]
    #[allow(clippy::too_many_arguments)]
    fn potential(
        &self,
        activities: Option<HashMap<String, f64>>,
        molalities: Option<HashMap<String, f64>>,
        pressures: Option<HashMap<String, f64>>,
        temperature: f64,
        model: &str,
        force: bool,
        ph: Option<f64>,
    ) -> Result<f64, Failure> {
        let conditions = Conditions {
            temperature_kelvin: temperature,
            activities: pairs(activities)?,
            amounts: pairs(molalities)?,
            pressures_bar: pairs(pressures)?,
            ph,
            basis: Basis::Molal,
            model: ActivityModel {
                model: gamma_model(model)?,
                force,
            },
            unspecified_at_unity: false,
        };
        Ok(evaluate(&self.standard(), &conditions)?.e_volts()?)
    }
    /// The compiled model of this cell for arrays: `model.species` lists the activities it
    /// takes, in order; `water=True` makes a(H2O) one of them.
    #[pyo3(signature = (*, water = false))]
    fn model(&self, water: bool) -> Result<model::Model, Failure> {
        let quotient = Quotient::new(
            &self.inner.net,
            &QuotientOptions {
                basis: Basis::Molal,
                water_enters: water,
            },
        );
        let standard = self.standard();
        model::Model::of(
            &quotient,
            standard.e0_volts,
            standard.electrons,
            standard.de0_dt_volts_per_kelvin.unwrap_or(0.0),
        )
    }
    /// Theoretical capacity and specific energy on a mass basis: "active",
    /// "with-electrolyte" or "all-reactants".
    #[pyo3(signature = (basis = "active"))]
    fn capacity(&self, basis: &str) -> Result<Capacity, Failure> {
        let basis = capacity::Basis::from_name(basis).ok_or_else(|| {
            Failure::usage(format!(
                "basis must be active, with-electrolyte or all-reactants, not '{basis}'"
            ))
        })?;
        let found = capacity::cell_capacity(
            &self.inner.net,
            &self.inner.electrons,
            self.inner.e0_volts,
            basis,
            &Densities::builtin(),
        )?;
        Ok(Capacity {
            basis: found.basis.name(),
            mass_g_per_mol: found.mass_g_per_mol,
            amp_hours_per_kg: found.amp_hours_per_kg,
            watt_hours_per_kg: found.watt_hours_per_kg,
            amp_hours_per_litre: found.amp_hours_per_litre,
            watt_hours_per_litre: found.watt_hours_per_litre,
            e_volts: found.e_volts,
            notes: found.notes,
        })
    }
    /// The open-circuit discharge curve. `moles` / `grams` map species (of the net reaction,
    /// or a neutral electrolyte) to amounts; `solvent_kg` is the water mass when a dissolved
    /// species enters Q; `steps` from start to the first exhausted reactant.
    #[pyo3(signature = (*, moles = None, grams = None, solvent_kg = None, pressures = None, model = "ideal", force = false, steps = 100))]
    #[allow(clippy::too_many_arguments)]
    fn discharge(
        &self,
        py: Python<'_>,
        moles: Option<HashMap<String, f64>>,
        grams: Option<HashMap<String, f64>>,
        solvent_kg: Option<f64>,
        pressures: Option<HashMap<String, f64>>,
        model: &str,
        force: bool,
        steps: usize,
    ) -> PyResult<Py<PyDict>> {
        let mut amounts: Vec<(Species, Amount)> = pairs(moles)?
            .into_iter()
            .map(|(s, v)| (s, Amount::Moles(v)))
            .collect();
        amounts.extend(
            pairs(grams)?
                .into_iter()
                .map(|(s, v)| (s, Amount::Grams(v))),
        );
        let spec = DischargeSpec {
            amounts,
            solvent_kg,
            activity: ActivityModel {
                model: gamma_model(model)?,
                force,
            },
            pressures_bar: pairs(pressures)?,
            steps,
        };
        let curve = discharge(&self.inner, &spec).map_err(Failure::from)?;
        let column = |f: &dyn Fn(&couplet::discharge::DischargePoint) -> f64| {
            curve
                .points
                .iter()
                .map(f)
                .collect::<Vec<f64>>()
                .into_pyarray(py)
        };
        let out = PyDict::new(py);
        out.set_item("extent_mol", column(&|p| p.extent_mol))?;
        out.set_item("state_of_charge", column(&|p| p.state_of_charge))?;
        out.set_item("charge_Ah", column(&|p| p.charge_amp_hours))?;
        out.set_item("e_V", column(&|p| p.e_volts))?;
        out.set_item("ln_q", column(&|p| p.ln_q))?;
        out.set_item("water_activity", column(&|p| p.water_activity))?;
        let molalities = PyDict::new(py);
        for (i, solute) in curve.solutes.iter().enumerate() {
            molalities.set_item(solute.ascii(), column(&|p| p.molalities[i]))?;
        }
        out.set_item("molalities", molalities)?;
        out.set_item("limiting", curve.limiting.ascii())?;
        out.set_item("capacity_Ah", curve.capacity_amp_hours)?;
        out.set_item("energy_Wh", curve.energy_watt_hours)?;
        out.set_item("temperature_K", curve.temperature_kelvin)?;
        out.set_item("stopped", curve.stopped.clone())?;
        out.set_item("assumptions", curve.assumptions.clone())?;
        Ok(out.unbind())
    }
    fn __repr__(&self) -> String {
        format!("Cell('{}', e0={:.4})", self.inner.net, self.inner.e0_volts)
    }
}

/// Capacity and energy of a cell per mass of its reactants on a stated basis.
#[pyclass(frozen, get_all, module = "couplet")]
struct Capacity {
    /// The mass basis.
    basis: &'static str,
    /// Mass counted, g per mol of the net reaction.
    mass_g_per_mol: f64,
    /// Ah/kg.
    amp_hours_per_kg: f64,
    /// Wh/kg.
    watt_hours_per_kg: f64,
    /// Ah/L when every counted density is known.
    amp_hours_per_litre: Option<f64>,
    /// Wh/L when every counted density is known.
    watt_hours_per_litre: Option<f64>,
    /// The voltage used, V.
    e_volts: f64,
    /// Remarks.
    notes: Vec<String>,
}

/// Theoretical specific capacity in mAh/g of `electrons` per formula unit of `species`:
/// n·F/(3.6·M).
#[pyfunction(name = "specific_capacity")]
fn py_specific_capacity(species: &str, electrons: f64) -> Result<f64, Failure> {
    let species = species_of(species)?;
    let mass = species
        .composition
        .molar_mass()
        .ok_or_else(|| Failure::chemistry(format!("{} has no molar mass", species.ascii())))?;
    if !(electrons.is_finite() && electrons > 0.0) {
        return Err(Failure::usage(format!(
            "electrons must be a positive number, not {electrons}"
        )));
    }
    Ok(capacity::milliamp_hours_per_gram(
        electrons,
        mass.grams_per_mol,
    ))
}

/// Q of an equation as an expression; `water=True` keeps a(H2O).
#[pyfunction(name = "quotient", signature = (text, *, water = false))]
fn py_quotient(text: &str, water: bool) -> Result<String, Failure> {
    let equation = parse_equation(text).map_err(Failure::from)?;
    Ok(Quotient::new(
        &Reaction::from_equation(&equation),
        &QuotientOptions {
            basis: Basis::Molal,
            water_enters: water,
        },
    )
    .expression())
}

/// One finding of the data-file checker.
#[pyclass(frozen, get_all, module = "couplet")]
struct Finding {
    /// File name as given.
    file: String,
    /// 1-based line.
    line: usize,
    /// 1-based column, in characters.
    column: usize,
    /// `error` or `warning`.
    severity: &'static str,
    /// Stable code (`CPL201`).
    code: &'static str,
    /// Short rule name.
    rule: &'static str,
    /// One line.
    message: String,
    /// A suggested replacement, or None.
    suggestion: Option<String>,
}

#[pymethods]
impl Finding {
    fn __repr__(&self) -> String {
        format!(
            "Finding({}:{}:{} {} {}: {})",
            self.file, self.line, self.column, self.severity, self.code, self.message
        )
    }
}

/// Checks couple files (TOML or CSV); returns the findings. `tolerance` in V.
#[pyfunction(name = "check", signature = (paths, *, tolerance = couplet::check::DEFAULT_TOLERANCE_VOLTS))]
fn py_check(paths: Vec<std::path::PathBuf>, tolerance: f64) -> Result<Vec<Finding>, Failure> {
    if !(tolerance.is_finite() && tolerance >= 0.0) {
        return Err(Failure::usage(format!(
            "tolerance must be a non-negative number of volts, not {tolerance}"
        )));
    }
    let found = couplet::check::load::expand_paths(&paths)
        .map_err(|e| Failure::new(errors::Class::File, "file", e.to_string()))?;
    let mut sources = Vec::new();
    for (path, under_directory) in found {
        let source = load_file(&path)
            .map_err(|e| Failure::new(errors::Class::File, "file", e.to_string()))?;
        // As on the command line: a file found in a directory that is not a couple file
        // (another CSV, a settings TOML) is left out; a file named outright is checked.
        if under_directory && !couplet::check::load::looks_like_couple_file(&source) {
            continue;
        }
        sources.push(source);
    }
    let options = CheckOptions {
        tolerance_volts: tolerance,
        ..CheckOptions::default()
    };
    let report = check(sources, &options);
    Ok(report
        .findings
        .iter()
        .map(|f| {
            let (line, column) = report.line_column(f);
            Finding {
                file: report.files[f.file].name.clone(),
                line,
                column,
                severity: f.severity().name(),
                code: f.rule.code(),
                rule: f.rule.name(),
                message: f.message.clone(),
                suggestion: f.suggestion.clone(),
            }
        })
        .collect())
}

/// E° of a half-reaction or `Ox/Red` from formation data (ΔrG° = −nFE°).
#[pyclass(frozen, get_all, module = "couplet.thermo")]
struct FormationE0 {
    /// The half-reaction used (balanced when couplet balanced it).
    reaction: String,
    /// E° in V vs SHE at 298.15 K.
    e0: f64,
    /// dE°/dT in mV/K, None when ΔrS° cannot be had.
    dedt: Option<f64>,
    /// ΔrG° in kJ/mol.
    delta_g: f64,
    /// The formation rows used, with their sources.
    rows: Vec<String>,
}

#[pymethods]
impl FormationE0 {
    fn __repr__(&self) -> String {
        format!("FormationE0('{}', e0={:.4})", self.reaction, self.e0)
    }
}

/// E° (V vs SHE) of a half-reaction or `Ox/Red` from the built-in formation data; `medium`
/// ("acid", "base") for balancing an `Ox/Red`.
#[pyfunction(name = "e0_from_formation", signature = (query, medium = None))]
fn py_e0_from_formation(query: &str, medium: Option<&str>) -> Result<FormationE0, Failure> {
    let found = couple_from_data(query, medium_of(medium)?, FormationData::builtin())?;
    Ok(FormationE0 {
        reaction: found.couple.reaction.to_string(),
        e0: found.couple.e0_volts,
        dedt: found.couple.dedt_millivolts_per_kelvin,
        delta_g: found.thermo.delta_g_joules / 1000.0,
        rows: found.thermo.rows_used(),
    })
}

/// (RT/F)·ln 10 in V at `temperature` K, from the exact SI constants.
#[pyfunction(name = "nernst_slope", signature = (temperature = STANDARD_TEMPERATURE_KELVIN))]
fn py_nernst_slope(temperature: f64) -> Result<f64, Failure> {
    Ok(couplet::nernst::slope_volts_per_decade(self::temperature(
        temperature,
    )?))
}

#[pymodule]
fn _couplet(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<ParsedSpecies>()?;
    m.add_class::<ParsedEquation>()?;
    m.add_class::<Balanced>()?;
    m.add_class::<Redox>()?;
    m.add_class::<ElementChange>()?;
    m.add_class::<Couple>()?;
    m.add_class::<Cell>()?;
    m.add_class::<Capacity>()?;
    m.add_class::<Finding>()?;
    m.add_class::<FormationE0>()?;
    m.add_class::<model::Model>()?;
    m.add_function(wrap_pyfunction!(py_species, m)?)?;
    m.add_function(wrap_pyfunction!(py_equation, m)?)?;
    m.add_function(wrap_pyfunction!(py_balance, m)?)?;
    m.add_function(wrap_pyfunction!(py_oxidation_numbers, m)?)?;
    m.add_function(wrap_pyfunction!(py_redox, m)?)?;
    m.add_function(wrap_pyfunction!(py_couple, m)?)?;
    m.add_function(wrap_pyfunction!(py_specific_capacity, m)?)?;
    m.add_function(wrap_pyfunction!(py_quotient, m)?)?;
    m.add_function(wrap_pyfunction!(py_check, m)?)?;
    m.add_function(wrap_pyfunction!(py_e0_from_formation, m)?)?;
    m.add_function(wrap_pyfunction!(py_nernst_slope, m)?)?;
    Ok(())
}

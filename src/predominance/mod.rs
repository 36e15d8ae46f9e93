//! Potential–pH predominance diagrams of one element, computed exactly from formation data:
//! which species of the element (dissolved, solid, optionally gaseous, holding only the element,
//! H, O and charge) has the lowest free energy per atom of the element at each (pH, E), the
//! straight boundaries between them in closed form, the convex region of each species, the
//! points where three regions meet, and the two lines of water stability.
//!
//! Method. Every species X_n H_h O_o^z is formed from the element's reference state by
//! `n X + o H2O -> X_n H_h O_o^z + m H+ + k e-` with m = 2o − h and k = m + z. With the
//! electron at potential E (vs SHE, so μ(e⁻) = −F·E) and μ(H⁺) = −RT ln10·pH, the free energy of
//! that reaction per atom of X is
//! `g = [ΔfG°(T) + RT ln a − o·ΔfG°(H2O, T)]/n − (m/n)(RT ln10)·pH − (k/n)·F·E`,
//! linear in pH and E (a = the activity of a dissolved species, the pressure in bar of a gas,
//! 1 for a pure solid or liquid). The predominant species minimises g, so the region of a species
//! is the window cut by one half-plane `g_i ≤ g_j` per rival: a convex polygon, found by exact
//! clipping; no grid is sampled. The reaction across each boundary is balanced by couplet's
//! exact balancer.
//!
//! Temperature: ΔfG°(T) = ΔfG° − (T − T°)·ΔfS° with ΔfS° = (ΔfH° − ΔfG°)/T° (the CRC tables'
//! conventional ion values, H⁺ zero at every T, which is the SHE scale); when ΔfH° is missing,
//! ΔfS° from S° of the species, the element, H2 and O2; when neither is there, the species is left
//! out away from 298.15 K (its free energy there is unknown), or, when the caller asks, kept with
//! ΔfG° held at its 298.15 K value, and the diagram says so. ΔfH° and ΔfS° are taken constant (no Cp° term).

mod geometry;

pub use geometry::{Affine, Edge, Line, Polygon, crossing};

use crate::balance::{BalanceOptions, Medium, balance};
use crate::constants::{
    FARADAY_COULOMBS_PER_MOL, GAS_CONSTANT_JOULES_PER_MOL_KELVIN, STANDARD_TEMPERATURE_KELVIN,
    nernst_slope_volts_per_decade,
};
use crate::elements::Element;
use crate::notation::{Arrow, Coefficient, Equation, Species, State, Style, Term, parse_species};
use crate::reaction::Reaction;
use crate::thermo::{DataPhase, FormationData, FormationRow, composition_key};
use num_rational::BigRational;
use num_traits::One;

/// Why a species is left out away from 298.15 K.
const UNKNOWN_AT_T: &str = "no ΔfH° or S° in the data: ΔfG° at this temperature unknown (add ΔfH° with --formation, or hold ΔfG° at 298.15 K with --hold-unknown)";

/// The usual activity of dissolved species in corrosion diagrams (common practice).
pub const DEFAULT_ACTIVITY: f64 = 1e-6;

/// The conditions a diagram is drawn for.
#[derive(Clone, Debug, PartialEq)]
pub struct Conditions {
    /// Activity of every dissolved species of the element.
    pub activity: f64,
    /// Include gaseous species of the element at this pressure (bar); `None` leaves them out.
    pub gas_pressure_bar: Option<f64>,
    /// Temperature in kelvin.
    pub temperature_kelvin: f64,
    /// Away from 298.15 K, keep species with neither ΔfH° nor S° at their 298.15 K ΔfG°
    /// (otherwise they are left out, since their ΔfG°(T) is unknown).
    pub hold_without_entropy: bool,
}

impl Default for Conditions {
    fn default() -> Conditions {
        Conditions {
            activity: DEFAULT_ACTIVITY,
            gas_pressure_bar: None,
            temperature_kelvin: STANDARD_TEMPERATURE_KELVIN,
            hold_without_entropy: false,
        }
    }
}

/// The potential axis: E on it = E vs SHE + `offset_volts` + `volts_per_ph`·pH (SHE: both 0; a
/// reference electrode: minus its potential; RHE: the Nernst slope per pH).
#[derive(Clone, Debug, PartialEq)]
pub struct Axis {
    /// Its name for output (`SHE`, `sce`, `RHE`).
    pub label: String,
    /// Constant shift from SHE in volts.
    pub offset_volts: f64,
    /// Shift per pH unit in volts.
    pub volts_per_ph: f64,
}

impl Axis {
    /// The SHE axis.
    pub fn she() -> Axis {
        Axis {
            label: "SHE".to_owned(),
            offset_volts: 0.0,
            volts_per_ph: 0.0,
        }
    }

    /// E on this axis from E vs SHE at a pH.
    pub fn from_she(&self, ph: f64, e_vs_she: f64) -> f64 {
        e_vs_she + self.offset_volts + self.volts_per_ph * ph
    }

    /// E vs SHE from E on this axis at a pH.
    pub fn to_she(&self, ph: f64, e_on_axis: f64) -> f64 {
        e_on_axis - self.offset_volts - self.volts_per_ph * ph
    }
}

/// The window: a pH range and a potential range on `axis`.
#[derive(Clone, Debug, PartialEq)]
pub struct Window {
    /// Lowest and highest pH.
    pub ph: (f64, f64),
    /// Lowest and highest potential in volts, on `axis`.
    pub e_volts: (f64, f64),
    /// The axis the potentials are on.
    pub axis: Axis,
}

impl Default for Window {
    fn default() -> Window {
        Window {
            ph: (-2.0, 16.0),
            e_volts: (-2.0, 2.4),
            axis: Axis::she(),
        }
    }
}

/// What a diagram is asked for.
#[derive(Clone, Debug)]
pub struct Request<'a> {
    /// The element.
    pub element: Element,
    /// Activity, pressure, temperature.
    pub conditions: Conditions,
    /// The window.
    pub window: Window,
    /// Species to leave out: a state label limits the match to that phase.
    pub exclude: Vec<Species>,
    /// The formation data (built-in plus the user's rows).
    pub data: &'a FormationData,
}

/// Why a diagram cannot be drawn.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum DiagramError {
    /// The data hold no dissolved species of the element with only H, O and charge.
    #[error(
        "the formation data hold no dissolved species of {element} made of {element}, H, O and charge only ({found}); add rows with --formation"
    )]
    NoAqueousData {
        /// The element symbol.
        element: String,
        /// What the data do hold.
        found: String,
    },
    /// No reference-state row (ΔfG° = 0) for the element.
    #[error(
        "the formation data have no reference-state row of {0} (ΔfG° = 0): add one with --formation"
    )]
    NoReferenceState(String),
    /// H and O are the elements of water, whose own diagram is the two water lines.
    #[error(
        "{0} is an element of water itself: its species are the frame of every diagram (the water lines), not a diagram of their own"
    )]
    WaterElement(String),
    /// Water is missing from the data.
    #[error("the formation data have no row for H2O(l)")]
    NoWater,
    /// A window bound is not finite or the range is empty.
    #[error("empty window: {0}")]
    EmptyWindow(String),
    /// Conditions out of range.
    #[error("{0}")]
    Conditions(String),
    /// Fewer than two species are left.
    #[error("only {count} species of {element} left ({names}): a diagram needs at least two")]
    TooFew {
        /// The element symbol.
        element: String,
        /// How many.
        count: usize,
        /// Their names.
        names: String,
    },
    /// Two species have the same free energy everywhere, so neither can predominate.
    #[error(
        "{first} and {second} have the same free energy per {element} atom at every pH and potential (the same data per atom); leave one out with --exclude"
    )]
    Degenerate {
        /// The element symbol.
        element: String,
        /// One species.
        first: String,
        /// The other.
        second: String,
    },
    /// An excluded species is not among the species of the element.
    #[error(
        "--exclude {species}: no such species of the element in the data (write charges with a caret where digits precede them, FeOH^2+); the species here: {available}"
    )]
    UnknownExclusion {
        /// The species as given.
        species: String,
        /// The species the diagram has.
        available: String,
    },
}

/// How ΔfG° was carried to the diagram's temperature.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum TemperatureRoute {
    /// At 298.15 K: the tabulated value.
    Tabulated,
    /// ΔfS° = (ΔfH° − ΔfG°)/T°.
    FromEnthalpy,
    /// ΔfS° from S° of the species and of the elements.
    FromEntropies,
    /// No ΔfH° or S°: ΔfG° held at 298.15 K.
    Held,
}

/// One species that takes part.
#[derive(Clone, Debug)]
pub struct Candidate {
    /// The species with its state label, in conventional order (`Zn(OH)2(s)`).
    pub species: Species,
    /// Its row of formation data.
    pub row: FormationRow,
    /// Atoms of the element in one formula unit.
    pub atoms: u64,
    /// Average oxidation number of the element (from charge balance, H +1, O −2).
    pub oxidation_number: BigRational,
    /// ΔfG°(T) in J/mol.
    pub dfg_joules_per_mol: f64,
    /// How ΔfG°(T) was had.
    pub route: TemperatureRoute,
    /// Its free energy per atom of the element divided by F, in volts: g/F.
    pub energy: Affine,
    /// The source's name, when another row has the same formula and phase (polymorphs).
    pub variant: Option<String>,
}

impl Candidate {
    /// Unicode formula with a state label only for solids, liquids and gases
    /// (`Fe₂O₃(s)`, `Fe²⁺`).
    pub fn label(&self) -> String {
        match &self.variant {
            Some(name) => format!("{} [{name}]", self.species.unicode()),
            None => self.species.unicode(),
        }
    }

    /// True for a dissolved species.
    pub fn is_dissolved(&self) -> bool {
        self.row.phase == DataPhase::Aqueous
    }
}

/// A species of the element that does not take part, and why.
#[derive(Clone, Debug, PartialEq)]
pub struct LeftOut {
    /// The row's species and phase (`FeS2(s)`).
    pub label: String,
    /// Why.
    pub reason: String,
}

/// The region where one species predominates.
#[derive(Clone, Debug)]
pub struct Region {
    /// Index into [`Diagram::species`].
    pub species: usize,
    /// The convex polygon in (pH, E vs SHE).
    pub polygon: Polygon,
}

/// The boundary between two neighbouring regions.
#[derive(Clone, Debug)]
pub struct Boundary {
    /// The two species (indices into [`Diagram::species`]); the first is the one on the
    /// low-potential side, or on the acid side of a vertical line.
    pub species: (usize, usize),
    /// Its line vs SHE.
    pub line: Line,
    /// The segment inside the window, (pH, E vs SHE) at each end.
    pub ends: [(f64, f64); 2],
    /// The reaction across it, balanced by couplet (a reduction when electrons take part).
    pub reaction: Option<Reaction>,
}

/// A point where three or more regions meet.
#[derive(Clone, Debug)]
pub struct TriplePoint {
    /// The species meeting there (indices), sorted.
    pub species: Vec<usize>,
    /// pH.
    pub ph: f64,
    /// E vs SHE in volts.
    pub e_volts: f64,
}

/// The lines of water stability vs SHE at the diagram's temperature (p(H2) = p(O2) = 1 bar).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct WaterLines {
    /// 2 H+ + 2 e- -> H2(g): E = −slope·pH.
    pub hydrogen: Line,
    /// O2(g) + 4 H+ + 4 e- -> 2 H2O(l): E = −ΔfG°(H2O, T)/(2F) − slope·pH.
    pub oxygen: Line,
}

/// A computed diagram.
#[derive(Clone, Debug)]
pub struct Diagram {
    /// The element.
    pub element: Element,
    /// The conditions.
    pub conditions: Conditions,
    /// The window.
    pub window: Window,
    /// Every species that took part.
    pub species: Vec<Candidate>,
    /// Regions of positive area inside the window.
    pub regions: Vec<Region>,
    /// Boundaries between neighbouring regions.
    pub boundaries: Vec<Boundary>,
    /// Triple points inside the window.
    pub triple_points: Vec<TriplePoint>,
    /// Water lines.
    pub water: WaterLines,
    /// Species of the element left out, with reasons.
    pub left_out: Vec<LeftOut>,
    /// Notes on approximations.
    pub notes: Vec<String>,
    /// The source tables of the rows used: (key, citation).
    pub sources: Vec<(String, String)>,
    /// A caution line where the element or a species is hazardous.
    pub caution: Option<String>,
}

impl Diagram {
    /// The species with the lowest free energy at a point, by brute force over all species.
    pub fn lowest_at(&self, ph: f64, e_vs_she: f64) -> usize {
        let mut best = 0;
        for (i, c) in self.species.iter().enumerate() {
            if c.energy.at(ph, e_vs_she) < self.species[best].energy.at(ph, e_vs_she) {
                best = i;
            }
        }
        best
    }

    /// The region containing a point (vs SHE), when one does.
    pub fn region_at(&self, ph: f64, e_vs_she: f64) -> Option<&Region> {
        self.regions
            .iter()
            .find(|r| r.polygon.contains(ph, e_vs_she, 1e-9))
    }

    /// Species never predominant inside the window.
    pub fn absent(&self) -> Vec<usize> {
        (0..self.species.len())
            .filter(|i| self.regions.iter().all(|r| r.species != *i))
            .collect()
    }

    /// The window's corners (pH, E vs SHE), counter-clockwise from bottom left.
    pub fn corners(&self) -> [(f64, f64); 4] {
        corners(&self.window)
    }
}

fn corners(window: &Window) -> [(f64, f64); 4] {
    let (p0, p1) = window.ph;
    let (e0, e1) = window.e_volts;
    let she = |ph: f64, e: f64| (ph, window.axis.to_she(ph, e));
    [she(p0, e0), she(p1, e0), she(p1, e1), she(p0, e1)]
}

/// ΔfG°(T) of a row and how it was had; `formation_entropy` gives ΔfS° from S° when ΔfH° is missing.
fn dfg_at(
    row: &FormationRow,
    temperature: f64,
    formation_entropy: impl Fn(&FormationRow) -> Option<f64>,
) -> (f64, TemperatureRoute) {
    let t0 = STANDARD_TEMPERATURE_KELVIN;
    if temperature == t0 {
        return (row.dfg_joules_per_mol, TemperatureRoute::Tabulated);
    }
    if let Some(h) = row.dfh_joules_per_mol {
        let s = (h - row.dfg_joules_per_mol) / t0;
        return (
            row.dfg_joules_per_mol - (temperature - t0) * s,
            TemperatureRoute::FromEnthalpy,
        );
    }
    match formation_entropy(row) {
        Some(s) => (
            row.dfg_joules_per_mol - (temperature - t0) * s,
            TemperatureRoute::FromEntropies,
        ),
        None => (row.dfg_joules_per_mol, TemperatureRoute::Held),
    }
}

fn row_of<'a>(data: &'a FormationData, text: &str, phase: DataPhase) -> Option<&'a FormationRow> {
    let species = parse_species(text).ok()?;
    data.rows_for(&species)
        .into_iter()
        .filter(|r| r.phase == phase)
        .min_by(|a, b| a.dfg_joules_per_mol.total_cmp(&b.dfg_joules_per_mol))
}

/// The element's counts in a row: (n of X, h, o, charge) when the row holds X and only H, O.
fn counts_of(row: &FormationRow, element: Element) -> Option<Counts> {
    let composition = &row.species.composition;
    // Decimal-subscript rows (a user's non-stoichiometric phase) have no whole count per atom.
    if !composition.is_integral() {
        return None;
    }
    let n = composition.scaled_count(element);
    if n == 0 {
        return None;
    }
    let mut h = 0;
    let mut o = 0;
    for &(e, count) in composition.counts() {
        match e.chemical_element().symbol() {
            s if s == element.symbol() => {}
            "H" => h += count,
            "O" => o += count,
            _ => return None,
        }
    }
    Some((n, h, o, composition.charge()))
}

/// The oxidation states a row's name states in Roman numerals (`Iron(II,III) oxide` → 2..3).
fn named_states(name: &str) -> Option<(i64, i64)> {
    let value = |roman: &str| -> Option<i64> {
        let digit = |c| match c {
            'I' => Some(1),
            'V' => Some(5),
            'X' => Some(10),
            _ => None,
        };
        let digits: Vec<i64> = roman.chars().map(digit).collect::<Option<_>>()?;
        let mut total = 0;
        for (k, d) in digits.iter().enumerate() {
            if digits.get(k + 1).is_some_and(|next| next > d) {
                total -= d;
            } else {
                total += d;
            }
        }
        (total > 0).then_some(total)
    };
    for (open, close) in [('(', ')'), ('[', ']')] {
        let mut rest = name;
        while let Some(start) = rest.find(open) {
            let after = &rest[start + 1..];
            let Some(end) = after.find(close) else { break };
            let inside = &after[..end];
            let states: Option<Vec<i64>> = inside.split(',').map(|p| value(p.trim())).collect();
            if let Some(states) = states.filter(|s| !s.is_empty()) {
                let low = *states.iter().min().expect("not empty");
                let high = *states.iter().max().expect("not empty");
                return Some((low, high));
            }
            rest = &after[end + 1..];
        }
    }
    None
}

/// A formula the row's name writes out in brackets (`Aluminum oxide (Al2O)`), when it parses as
/// a species holding the element.
fn named_formula(name: &str, element: Element) -> Option<Species> {
    for (open, close) in [('(', ')'), ('[', ']')] {
        let mut rest = name;
        while let Some(start) = rest.find(open) {
            let after = &rest[start + 1..];
            let Some(end) = after.find(close) else { break };
            if let Ok(species) = parse_species(&after[..end])
                && species.composition.scaled_count(element) > 0
            {
                return Some(species);
            }
            rest = &after[end + 1..];
        }
    }
    None
}

/// The species written in conventional order (metal first, hydroxide groups in brackets) with
/// its state label: CAS-keyed rows come in Hill order (`H2O2Zn`).
fn conventional(row: &FormationRow, element: Element, counts: Counts) -> Species {
    let (n, h, o, charge) = counts;
    let number = |k: u64| if k == 1 { String::new() } else { k.to_string() };
    let state = match row.phase {
        DataPhase::Solid => Some(State::Solid),
        DataPhase::Liquid => Some(State::Liquid),
        DataPhase::Gas => Some(State::Gas),
        DataPhase::Aqueous if charge == 0 => Some(State::Aqueous),
        DataPhase::Aqueous => None,
    };
    let mut species = row.species.clone();
    if charge == 0 {
        let symbol = element.symbol();
        let text = if h == 0 {
            let oxide = if o == 0 {
                String::new()
            } else {
                format!("O{}", number(o))
            };
            format!("{symbol}{}{oxide}", number(n))
        } else if h <= o {
            let oxide = match o - h {
                0 => String::new(),
                k => format!("O{}", number(k)),
            };
            let hydroxide = if h == 1 {
                "(OH)".to_owned()
            } else {
                format!("(OH){h}")
            };
            format!("{symbol}{}{oxide}{hydroxide}", number(n))
        } else {
            row.species.ascii()
        };
        if let Ok(written) = parse_species(&text)
            && composition_key(&written.composition) == composition_key(&row.species.composition)
        {
            species = written;
        }
    }
    species.state = state;
    species
}

/// Atoms in one formula unit: (of the element, of H, of O) and the charge.
pub type Counts = (u64, u64, u64, i64);

/// The species of an element the diagram can use, and those it leaves out with the reason.
pub fn select(
    element: Element,
    data: &FormationData,
    include_gases: bool,
) -> (Vec<(FormationRow, Counts)>, Vec<LeftOut>) {
    let mut taken = Vec::new();
    let mut left_out = Vec::new();
    for row in data.rows() {
        let composition = &row.species.composition;
        if composition.scaled_count(element) == 0 {
            continue;
        }
        let Some(counts) = counts_of(row, element) else {
            left_out.push(LeftOut {
                label: row.label(),
                reason: "holds elements other than H and O (sulfates, chlorides, carbonates and the like are outside this diagram)".to_owned(),
            });
            continue;
        };
        if row.phase == DataPhase::Gas && !include_gases {
            left_out.push(LeftOut {
                label: row.label(),
                reason: "a gas (include gases with their pressure to use it)".to_owned(),
            });
            continue;
        }
        let (n, h, o, z) = counts;
        // Average oxidation number from charge balance with H +1 and O −2.
        let ox = BigRational::new((z - h as i64 + 2 * o as i64).into(), (n as i64).into());
        if let Some((low, high)) = named_states(&row.name) {
            let (low, high) = (
                BigRational::from_integer(low.into()),
                BigRational::from_integer(high.into()),
            );
            if ox < low || ox > high {
                left_out.push(LeftOut {
                    label: row.label(),
                    reason: format!(
                        "its formula gives {} {} but its name '{}' says otherwise: the row's formula does not fit the compound (add the right one with --formation)",
                        element.symbol(),
                        crate::oxidation::signed_text(&ox),
                        row.name
                    ),
                });
                continue;
            }
        }
        if let Some(named) = named_formula(&row.name, element)
            && composition_key(&named.composition) != composition_key(composition)
        {
            left_out.push(LeftOut {
                label: row.label(),
                reason: format!(
                    "its name '{}' writes {} but the row's formula is {}: the row's formula does not fit the compound",
                    row.name,
                    named.ascii(),
                    row.species.ascii()
                ),
            });
            continue;
        }
        taken.push((row.clone(), counts));
    }
    (taken, left_out)
}

fn check_window(request: &Request<'_>) -> Result<(), DiagramError> {
    let w = &request.window;
    let finite = [w.ph.0, w.ph.1, w.e_volts.0, w.e_volts.1]
        .iter()
        .all(|v| v.is_finite());
    if !finite {
        return Err(DiagramError::EmptyWindow(
            "every bound must be a finite number".to_owned(),
        ));
    }
    if w.ph.0 >= w.ph.1 {
        return Err(DiagramError::EmptyWindow(format!(
            "the pH range {} to {} is empty (the lower bound must be below the upper)",
            w.ph.0, w.ph.1
        )));
    }
    if w.e_volts.0 >= w.e_volts.1 {
        return Err(DiagramError::EmptyWindow(format!(
            "the potential range {} V to {} V is empty (the lower bound must be below the upper)",
            w.e_volts.0, w.e_volts.1
        )));
    }
    let c = &request.conditions;
    if !(c.activity > 0.0 && c.activity.is_finite()) {
        return Err(DiagramError::Conditions(format!(
            "the activity of dissolved species must be a positive finite number, not {}",
            c.activity
        )));
    }
    if let Some(p) = c.gas_pressure_bar
        && !(p > 0.0 && p.is_finite())
    {
        return Err(DiagramError::Conditions(format!(
            "the gas pressure must be a positive finite number of bar, not {p}"
        )));
    }
    if !(c.temperature_kelvin > 0.0 && c.temperature_kelvin.is_finite()) {
        return Err(DiagramError::Conditions(format!(
            "the temperature must be positive, not {} K",
            c.temperature_kelvin
        )));
    }
    Ok(())
}

fn excluded(species: &FormationRow, exclude: &[Species]) -> bool {
    exclude.iter().any(|x| {
        composition_key(&x.composition) == composition_key(&species.species.composition)
            && x.state.is_none_or(|s| {
                DataPhase::from_label(s.label()).is_some_and(|p| p == species.phase)
            })
    })
}

/// Computes the diagram.
pub fn diagram(request: &Request<'_>) -> Result<Diagram, DiagramError> {
    check_window(request)?;
    let element = request.element;
    if matches!(element.chemical_element().symbol(), "H" | "O") {
        return Err(DiagramError::WaterElement(element.symbol().to_owned()));
    }
    let symbol = element.symbol().to_owned();
    let data = request.data;
    let conditions = &request.conditions;
    let temperature = conditions.temperature_kelvin;
    let (rows, mut left_out) = select(element, data, conditions.gas_pressure_bar.is_some());
    for x in &request.exclude {
        if !rows
            .iter()
            .any(|(r, _)| excluded(r, std::slice::from_ref(x)))
        {
            let available: Vec<String> = rows
                .iter()
                .map(|(r, c)| conventional(r, element, *c).ascii())
                .collect();
            return Err(DiagramError::UnknownExclusion {
                species: x.ascii(),
                available: available.join(", "),
            });
        }
    }
    // The reference state need not take part (Cl2 and N2 are gases): any row of the pure
    // element with ΔfG° = 0 by definition.
    let reference = data
        .rows()
        .iter()
        .filter_map(|r| counts_of(r, element).map(|c| (r, c)))
        .find(|(r, (_, h, o, z))| {
            *h == 0
                && *o == 0
                && *z == 0
                && r.dfg_joules_per_mol == 0.0
                && r.phase != DataPhase::Aqueous
        })
        .map(|(r, c)| (r.clone(), c))
        .ok_or_else(|| DiagramError::NoReferenceState(symbol.clone()))?;
    if !rows.iter().any(|(r, _)| r.phase == DataPhase::Aqueous) {
        let found: Vec<String> = rows.iter().map(|(r, _)| r.label()).collect();
        return Err(DiagramError::NoAqueousData {
            element: symbol.clone(),
            found: if found.is_empty() {
                "nothing".to_owned()
            } else {
                found.join(", ")
            },
        });
    }
    let water = row_of(data, "H2O", DataPhase::Liquid).ok_or(DiagramError::NoWater)?;
    let h2 = row_of(data, "H2", DataPhase::Gas);
    let o2 = row_of(data, "O2", DataPhase::Gas);
    let s = |r: Option<&FormationRow>| r.and_then(|r| r.entropy_joules_per_mol_kelvin);
    let (s_h2, s_o2) = (s(h2), s(o2));
    let s_element = reference
        .0
        .entropy_joules_per_mol_kelvin
        .map(|s| s / reference.1.0 as f64);
    // Conventional ΔfS° from entropies: elements + z H+ -> species + (z/2) H2.
    let formation_entropy = |row: &FormationRow| -> Option<f64> {
        let (n, h, o, z) = counts_of(row, element).unwrap_or((0, 0, 0, 0));
        let mut s = row.entropy_joules_per_mol_kelvin? - n as f64 * s_element?;
        if h > 0 || z != 0 {
            s += s_h2? * (z as f64 - h as f64) / 2.0;
        }
        if o > 0 {
            s -= s_o2? * o as f64 / 2.0;
        }
        Some(s)
    };
    let water_entropy = |row: &FormationRow| -> Option<f64> {
        Some(row.entropy_joules_per_mol_kelvin? - s_h2? - s_o2? / 2.0)
    };
    let (dfg_water, water_route) = dfg_at(water, temperature, water_entropy);
    let rt = GAS_CONSTANT_JOULES_PER_MOL_KELVIN * temperature;
    let slope = nernst_slope_volts_per_decade(temperature);
    let f = FARADAY_COULOMBS_PER_MOL;
    let mut species = Vec::new();
    let mut notes = Vec::new();
    for (row, counts) in rows {
        if excluded(&row, &request.exclude) {
            left_out.push(LeftOut {
                label: row.label(),
                reason: "left out on request".to_owned(),
            });
            continue;
        }
        let (n, h, o, z) = counts;
        let m = 2 * o as i64 - h as i64;
        let k = m + z;
        let (dfg, route) = dfg_at(&row, temperature, formation_entropy);
        if route == TemperatureRoute::Held && !conditions.hold_without_entropy {
            left_out.push(LeftOut {
                label: row.label(),
                reason: UNKNOWN_AT_T.to_owned(),
            });
            continue;
        }
        let ln_activity = match row.phase {
            DataPhase::Aqueous => conditions.activity.ln(),
            DataPhase::Gas => conditions.gas_pressure_bar.unwrap_or(1.0).ln(),
            DataPhase::Solid | DataPhase::Liquid => 0.0,
        };
        let per_atom = n as f64;
        let energy = Affine {
            constant: (dfg + rt * ln_activity - o as f64 * dfg_water) / (f * per_atom),
            per_ph: -(m as f64) * slope / per_atom,
            per_volt: -(k as f64) / per_atom,
        };
        let oxidation_number = BigRational::new(k.into(), (n as i64).into());
        species.push(Candidate {
            species: conventional(&row, element, counts),
            row,
            atoms: n,
            oxidation_number,
            dfg_joules_per_mol: dfg,
            route,
            energy,
            variant: None,
        });
    }
    // Polymorphs and isomers share a formula: their labels add the source's name.
    for i in 0..species.len() {
        if species
            .iter()
            .filter(|c| c.species == species[i].species)
            .count()
            > 1
        {
            species[i].variant = Some(species[i].row.name.clone());
        }
    }
    if species.len() < 2 {
        return Err(DiagramError::TooFew {
            element: symbol.clone(),
            count: species.len(),
            names: species
                .iter()
                .map(Candidate::label)
                .collect::<Vec<_>>()
                .join(", "),
        });
    }
    for i in 0..species.len() {
        for j in i + 1..species.len() {
            let d = species[i].energy.minus(&species[j].energy);
            if d.constant.abs() < 1e-12 && d.per_ph.abs() < 1e-12 && d.per_volt.abs() < 1e-12 {
                return Err(DiagramError::Degenerate {
                    element: symbol.clone(),
                    first: species[i].row.label(),
                    second: species[j].row.label(),
                });
            }
        }
    }
    let held: Vec<String> = species
        .iter()
        .filter(|c| c.route == TemperatureRoute::Held)
        .map(|c| c.row.label())
        .collect();
    if !held.is_empty() {
        notes.push(format!(
            "ΔfG° held at its 298.15 K value (the data give no ΔfH° or S°): {}",
            held.join(", ")
        ));
    }
    let unknown: Vec<&str> = left_out
        .iter()
        .filter(|l| l.reason == UNKNOWN_AT_T)
        .map(|l| l.label.as_str())
        .collect();
    if !unknown.is_empty() {
        notes.push(format!(
            "left out at this temperature, having no ΔfH° or S° to carry ΔfG° from 298.15 K: {}",
            unknown.join(", ")
        ));
    }
    if temperature != STANDARD_TEMPERATURE_KELVIN {
        notes.push(
            "ΔfG°(T) = ΔfG° − (T − 298.15 K)·ΔfS°, ΔfS° = (ΔfH° − ΔfG°)/298.15 K (from S° where ΔfH° is missing): ΔfH° and ΔfS° taken constant".to_owned(),
        );
        if (temperature - STANDARD_TEMPERATURE_KELVIN).abs() > 25.0 {
            notes
                .push("more than 25 K from 298.15 K: treat the boundaries as estimates".to_owned());
        }
        if water_route == TemperatureRoute::Held {
            notes.push("ΔfG°(H2O, l) held at 298.15 K (no ΔfH° or S°)".to_owned());
        }
    }
    let window_polygon = Polygon::window(corners(&request.window));
    let mut regions = Vec::new();
    for i in 0..species.len() {
        let mut polygon = Some(window_polygon.clone());
        for j in 0..species.len() {
            if i == j {
                continue;
            }
            let cut = species[i].energy.minus(&species[j].energy);
            polygon = polygon.and_then(|p| p.clipped(&cut, Edge::Rival(j)));
            if polygon.is_none() {
                break;
            }
        }
        if let Some(polygon) = polygon {
            regions.push(Region {
                species: i,
                polygon,
            });
        }
    }
    let boundaries = boundaries_of(&species, &regions);
    let triple_points = triple_points_of(&species, &regions);
    let water = WaterLines {
        hydrogen: Line::Sloped {
            intercept_volts: 0.0,
            volts_per_ph: -slope,
        },
        oxygen: Line::Sloped {
            intercept_volts: -dfg_water / (2.0 * f),
            volts_per_ph: -slope,
        },
    };
    let mut sources: Vec<(String, String)> = Vec::new();
    for c in &species {
        if !sources.iter().any(|(k, _)| *k == c.row.table) {
            let citation = data
                .table_citation(&c.row.table)
                .map(str::to_owned)
                .unwrap_or_else(|| c.row.origin.to_string());
            sources.push((c.row.table.clone(), citation));
        }
    }
    let mut all = Reaction::new();
    for c in &species {
        all.add(&c.species, -BigRational::one());
    }
    Ok(Diagram {
        element,
        conditions: conditions.clone(),
        window: request.window.clone(),
        caution: crate::cell::caution(&all),
        species,
        regions,
        boundaries,
        triple_points,
        water,
        left_out,
        notes,
        sources,
    })
}

/// The reaction between two species, balanced by couplet in acid (H2O, H+ and e- may be added).
pub fn boundary_reaction(first: &Species, second: &Species) -> Option<Reaction> {
    let term = |species: &Species| Term {
        coefficient: Coefficient::from_integer(1),
        species: species.clone(),
        span: Default::default(),
    };
    let equation = Equation {
        reactants: vec![term(first)],
        products: vec![term(second)],
        arrow: Arrow::Forward,
    };
    let options = BalanceOptions {
        medium: Medium::Acid,
        ..BalanceOptions::default()
    };
    balance(&equation, &options)
        .ok()
        .map(|b| b.reaction().clone())
}

fn boundaries_of(species: &[Candidate], regions: &[Region]) -> Vec<Boundary> {
    let mut found: Vec<Boundary> = Vec::new();
    for region in regions {
        let i = region.species;
        let vertices = &region.polygon.vertices;
        for (k, edge) in region.polygon.edges.iter().enumerate() {
            let Edge::Rival(j) = *edge else { continue };
            if j < i && regions.iter().any(|r| r.species == j) {
                continue; // written from the other side
            }
            let d = species[i].energy.minus(&species[j].energy);
            let Some(line) = d.zero_line() else { continue };
            // Low side first: the species with more electrons taken up per atom (lower
            // oxidation number) lies below; for a vertical line, the acid side first.
            let (low, high) = if d.per_volt != 0.0 {
                if species[i].oxidation_number < species[j].oxidation_number {
                    (i, j)
                } else {
                    (j, i)
                }
            } else {
                let acid_side = if d.per_ph > 0.0 { i } else { j };
                (acid_side, if acid_side == i { j } else { i })
            };
            let ends = [vertices[k], vertices[(k + 1) % vertices.len()]];
            // The reduction: the oxidised (high) species takes up electrons.
            let reaction = boundary_reaction(&species[high].species, &species[low].species);
            found.push(Boundary {
                species: (low, high),
                line,
                ends,
                reaction,
            });
        }
    }
    found
}

fn triple_points_of(species: &[Candidate], regions: &[Region]) -> Vec<TriplePoint> {
    let mut points: Vec<TriplePoint> = Vec::new();
    for region in regions {
        let i = region.species;
        let n = region.polygon.vertices.len();
        for k in 0..n {
            let before = region.polygon.edges[(k + n - 1) % n];
            let after = region.polygon.edges[k];
            let (Edge::Rival(j), Edge::Rival(l)) = (before, after) else {
                continue;
            };
            let f = species[i].energy.minus(&species[j].energy);
            let g = species[i].energy.minus(&species[l].energy);
            let (ph, e) = crossing(&f, &g).unwrap_or(region.polygon.vertices[k]);
            match points
                .iter_mut()
                .find(|p| (p.ph - ph).abs() < 1e-7 && (p.e_volts - e).abs() < 1e-7)
            {
                Some(p) => {
                    for s in [i, j, l] {
                        if !p.species.contains(&s) {
                            p.species.push(s);
                        }
                    }
                    p.species.sort_unstable();
                }
                None => {
                    let mut meeting = vec![i, j, l];
                    meeting.sort_unstable();
                    meeting.dedup();
                    points.push(TriplePoint {
                        species: meeting,
                        ph,
                        e_volts: e,
                    });
                }
            }
        }
    }
    points.sort_by(|a, b| a.ph.total_cmp(&b.ph).then(a.e_volts.total_cmp(&b.e_volts)));
    points
}

/// The reaction of a boundary as Unicode text.
pub fn reaction_text(reaction: &Reaction) -> String {
    reaction.to_text(Style::Unicode, Arrow::Equilibrium)
}

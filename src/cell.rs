//! The cell engine: a cathode couple and an anode couple combined into the net cell reaction
//! with n, E°cell, ΔG°, K and their temperature dependence; and derived couples by adding free
//! energies of half-reactions.
//!
//! Half-reactions are combined as exact [`Reaction`]s (scale to the least common multiple of
//! the electrons, reverse the anode, add), so species on both sides cancel by construction and
//! the net reaction is recounted, never assumed balanced. Potentials are combined through
//! free energies (DOMAIN.md), and only a couple minus a couple is a plain difference.

use crate::constants::{
    FARADAY_COULOMBS_PER_MOL, STANDARD_TEMPERATURE_KELVIN, nernst_slope_volts_per_decade,
};
use crate::elements::Element;
use crate::kw::{KW_SOURCE, pkw};
use crate::notation::{Compartment, Species, parse_species};
use crate::quotient::{Phase, phase_of};
use crate::reaction::Reaction;
use crate::table::{Couple, Medium, Origin, imbalance_text};
use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};

/// Beyond this distance from 298.15 K a first-order temperature correction is a rough guide
/// only (DOMAIN.md: good within roughly ±25 K).
pub const LINEAR_TEMPERATURE_RANGE_KELVIN: f64 = 25.0;

/// What the caller wants besides the two couples.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CellOptions {
    /// Temperature for E(T), ΔG(T) and K(T).
    pub temperature_kelvin: f64,
    /// Write both halves in this medium (acid ↔ base through Kw) before combining.
    pub medium: Option<Medium>,
}

impl Default for CellOptions {
    fn default() -> CellOptions {
        CellOptions {
            temperature_kelvin: STANDARD_TEMPERATURE_KELVIN,
            medium: None,
        }
    }
}

/// Why two couples make no cell.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum CellError {
    /// Both halves are the same couple and every species of it is a pure phase, so not even a
    /// concentration cell results.
    #[error(
        "cathode and anode are the same couple and it has no dissolved or gaseous species: the net reaction is empty and E = 0 at any composition"
    )]
    SameCouple,
    /// One half is written with H+ and the other with OH-.
    #[error(
        "the cathode is written for {cathode} and the anode for {anode}; give --medium acid or --medium base to write both in one solution"
    )]
    MixedMedia {
        /// Medium of the cathode couple.
        cathode: Medium,
        /// Medium of the anode couple.
        anode: Medium,
    },
    /// The net reaction does not conserve atoms or charge (a half was unbalanced).
    #[error("the net reaction does not balance ({0})")]
    Unbalanced(String),
    /// The temperature is not a positive finite number.
    #[error("temperature must be a positive number of kelvins, not {0}")]
    BadTemperature(f64),
}

/// Figures at a temperature other than 298.15 K, to first order in T − T°.
#[derive(Clone, Debug, PartialEq)]
pub struct AtTemperature {
    /// The temperature.
    pub temperature_kelvin: f64,
    /// E°(T) = E°(T°) + (dE°/dT)(T − T°).
    pub e0_volts: f64,
    /// dE°cell/dT in mV/K.
    pub dedt_millivolts_per_kelvin: f64,
    /// ΔS° = nF·dE°/dT in J/(mol·K).
    pub delta_s0_joules_per_mol_kelvin: f64,
    /// ΔH° = ΔG° + T°ΔS° in kJ/mol (taken as constant over the range).
    pub delta_h0_kilojoules_per_mol: f64,
    /// ΔG°(T) = −nF·E°(T) in kJ/mol.
    pub delta_g0_kilojoules_per_mol: f64,
    /// log10 K(T).
    pub log10_k: f64,
}

/// A cell: the two halves as used, the net reaction and its figures.
#[derive(Clone, Debug, PartialEq)]
pub struct Cell {
    /// The cathode couple (reduction), after any medium conversion.
    pub cathode: Couple,
    /// The anode couple, as a reduction (it runs in reverse).
    pub anode: Couple,
    /// Net reaction in lowest whole numbers, reactants → products.
    pub net: Reaction,
    /// Electrons transferred in the net reaction as written.
    pub electrons: BigInt,
    /// E°cell = E°(cathode) − E°(anode), V, at 298.15 K.
    pub e0_volts: f64,
    /// ΔG° = −nF·E°cell in kJ/mol of the net reaction as written, at 298.15 K.
    pub delta_g0_kilojoules_per_mol: f64,
    /// log10 K at 298.15 K (K itself overflows for strong cells).
    pub log10_k: f64,
    /// E°cell > 0: the reaction runs as written.
    pub runs_as_written: bool,
    /// The temperature asked for.
    pub temperature_kelvin: f64,
    /// Figures at that temperature when it is not 298.15 K and both dE°/dT are known.
    pub at_temperature: Option<AtTemperature>,
    /// Remarks the user should read (conversions, missing data, range of validity).
    pub notes: Vec<String>,
}

impl Cell {
    /// The lowest and highest E°cell (V, 298.15 K) that the published values of the two couples
    /// allow, when either couple has several (`also_published`); `None` otherwise, and for a
    /// concentration cell, whose E° is 0 whichever value is used.
    pub fn e0_range_volts(&self) -> Option<(f64, f64)> {
        let same_couple = self.cathode.id.is_some() && self.cathode.id == self.anode.id;
        if same_couple
            || (self.cathode.also_published.is_empty() && self.anode.also_published.is_empty())
        {
            return None;
        }
        let range = |c: &Couple| {
            c.e0_spread().map_or((c.e0_volts, c.e0_volts), |s| {
                (s.lowest_volts, s.highest_volts)
            })
        };
        let (cathode_low, cathode_high) = range(&self.cathode);
        let (anode_low, anode_high) = range(&self.anode);
        Some((cathode_low - anode_high, cathode_high - anode_low))
    }

    /// K at 298.15 K, or `None` when it overflows f64.
    pub fn k(&self) -> Option<f64> {
        let k = 10f64.powf(self.log10_k);
        (k.is_finite() && k > 0.0).then_some(k)
    }
}

/// log10 K for n electrons and E in volts at T: nFE/(RT ln 10).
pub fn log10_k(electrons: f64, e_volts: f64, temperature_kelvin: f64) -> f64 {
    electrons * e_volts / nernst_slope_volts_per_decade(temperature_kelvin)
}

/// ΔG = −nFE in kJ/mol.
pub fn delta_g_kilojoules_per_mol(electrons: f64, e_volts: f64) -> f64 {
    -electrons * FARADAY_COULOMBS_PER_MOL * e_volts / 1000.0
}

fn species(formula: &str) -> Species {
    parse_species(formula).expect("a fixed formula parses")
}

/// The self-ionisation of water, H2O → H+ + OH-.
fn water_ionisation() -> Reaction {
    let mut w = Reaction::new();
    w.add(&species("H2O(l)"), -BigRational::one());
    w.add(&species("H+"), BigRational::one());
    w.add(&species("OH-"), BigRational::one());
    w
}

/// The couple written for another medium: H+ traded for H2O and OH- (or back) with
/// the water self-ionisation, its E° moved by (ν/n)·(RT/F)·ln10·pKw. Neutral couples and
/// couples already in the medium come back unchanged. `None` when nothing changed.
pub fn in_medium(couple: &Couple, medium: Medium) -> Option<Couple> {
    let ion = match medium {
        Medium::Base => species("H+"),
        Medium::Acid => species("OH-"),
        Medium::Neutral => return None,
    };
    let nu = couple.reaction.nu(&ion);
    if nu.is_zero() {
        return None;
    }
    let reaction = couple
        .reaction
        .plus(&water_ionisation().scaled(&-nu.clone()));
    let slope = nernst_slope_volts_per_decade(STANDARD_TEMPERATURE_KELVIN);
    // Tabulated E° are for 298.15 K, so the conversion uses Kw at that temperature.
    let pkw = pkw(STANDARD_TEMPERATURE_KELVIN);
    let shift = nu.to_f64().unwrap_or(f64::NAN) * slope * pkw / couple.electrons_f64();
    let mut converted = couple.clone();
    converted.reaction = reaction;
    converted.e0_volts = couple.e0_volts + shift;
    for published in &mut converted.also_published {
        published.e0_volts += shift;
        published.dedt_millivolts_per_kelvin = None;
    }
    converted.medium = medium;
    converted.dedt_millivolts_per_kelvin = None;
    converted.id = couple.id.as_ref().map(|id| format!("{id} (in {medium})"));
    converted.note = Some(format!(
        "converted from the {} form with pKw = {pkw:.3} at 298.15 K ({KW_SOURCE})",
        couple.medium
    ));
    Some(converted)
}

/// Combines a cathode couple and an anode couple into a cell.
pub fn combine(cathode: &Couple, anode: &Couple, options: CellOptions) -> Result<Cell, CellError> {
    let temperature = options.temperature_kelvin;
    if !(temperature.is_finite() && temperature > 0.0) {
        return Err(CellError::BadTemperature(temperature));
    }
    let mut notes = Vec::new();
    let (mut cathode, mut anode) = (cathode.clone(), anode.clone());
    if let Some(medium) = options.medium {
        for half in [&mut cathode, &mut anode] {
            if let Some(converted) = in_medium(half, medium) {
                notes.push(format!(
                    "{} written for {medium}: E° {:.4} V → {:.4} V (pKw {:.3} at 298.15 K, {KW_SOURCE})",
                    half.label(),
                    half.e0_volts,
                    converted.e0_volts,
                    pkw(STANDARD_TEMPERATURE_KELVIN)
                ));
                *half = converted;
            }
        }
    }
    let uses = |c: &Couple, formula: &str| !c.reaction.nu(&species(formula)).is_zero();
    if (uses(&cathode, "H+") && uses(&anode, "OH-"))
        || (uses(&cathode, "OH-") && uses(&anode, "H+"))
    {
        return Err(CellError::MixedMedia {
            cathode: cathode.medium,
            anode: anode.medium,
        });
    }
    let (n_cathode, n_anode) = (cathode.electrons(), anode.electrons());
    let common = lcm_rational(&n_cathode, &n_anode);
    let add_halves = |cathode: &Couple, anode: &Couple| {
        cathode
            .reaction
            .scaled(&(&common / &n_cathode))
            .plus(&anode.reaction.scaled(&(&common / &n_anode)).reversed())
    };
    let mut sum = add_halves(&cathode, &anode);
    if sum.is_empty() {
        // The same couple on both sides: a concentration cell. Its dissolved and gaseous
        // species are told apart by compartment, and E° = 0 follows from the subtraction.
        cathode.reaction = in_compartment(&cathode.reaction, Compartment::Cathode);
        anode.reaction = in_compartment(&anode.reaction, Compartment::Anode);
        sum = add_halves(&cathode, &anode);
        if sum.is_empty() {
            return Err(CellError::SameCouple);
        }
        notes.push(
            "concentration cell: the same couple in both compartments, so E° = 0 and E = −(RT/nF)·ln Q comes from the difference in activities; species are labelled (cathode) and (anode)"
                .to_owned(),
        );
    }
    let net = sum.in_lowest_integers();
    if let Some(detail) = imbalance_text(&net) {
        return Err(CellError::Unbalanced(detail));
    }
    // in_lowest_integers scaled every ν by one factor; n follows it.
    let factor = &net.entries()[0].nu / &sum.nu(&net.entries()[0].species);
    let electrons_exact = &common * &factor;
    let electrons = electrons_exact.to_integer();
    let n = electrons_exact.to_f64().unwrap_or(f64::NAN);
    let e0 = cathode.e0_volts - anode.e0_volts;
    let mut cell = Cell {
        net,
        electrons,
        e0_volts: e0,
        delta_g0_kilojoules_per_mol: delta_g_kilojoules_per_mol(n, e0),
        log10_k: log10_k(n, e0, STANDARD_TEMPERATURE_KELVIN),
        runs_as_written: e0 > 0.0,
        temperature_kelvin: temperature,
        at_temperature: None,
        notes,
        cathode,
        anode,
    };
    if (temperature - STANDARD_TEMPERATURE_KELVIN).abs() > 1e-9 {
        match (
            cell.cathode.dedt_millivolts_per_kelvin,
            cell.anode.dedt_millivolts_per_kelvin,
        ) {
            (Some(dc), Some(da)) => {
                let dedt_mv = dc - da;
                let e_t = e0 + dedt_mv / 1000.0 * (temperature - STANDARD_TEMPERATURE_KELVIN);
                let delta_s = n * FARADAY_COULOMBS_PER_MOL * dedt_mv / 1000.0;
                cell.at_temperature = Some(AtTemperature {
                    temperature_kelvin: temperature,
                    e0_volts: e_t,
                    dedt_millivolts_per_kelvin: dedt_mv,
                    delta_s0_joules_per_mol_kelvin: delta_s,
                    delta_h0_kilojoules_per_mol: cell.delta_g0_kilojoules_per_mol
                        + STANDARD_TEMPERATURE_KELVIN * delta_s / 1000.0,
                    delta_g0_kilojoules_per_mol: delta_g_kilojoules_per_mol(n, e_t),
                    log10_k: log10_k(n, e_t, temperature),
                });
                if (temperature - STANDARD_TEMPERATURE_KELVIN).abs()
                    > LINEAR_TEMPERATURE_RANGE_KELVIN
                {
                    cell.notes.push(format!(
                        "{temperature} K is more than {LINEAR_TEMPERATURE_RANGE_KELVIN} K from 298.15 K: the first-order E°(T) is a rough guide only"
                    ));
                }
            }
            (c, a) => {
                let missing: Vec<String> = [(c, &cell.cathode), (a, &cell.anode)]
                    .iter()
                    .filter(|(d, _)| d.is_none())
                    .map(|(_, couple)| couple.label())
                    .collect();
                cell.notes.push(format!(
                    "no dE°/dT for {}: figures are given at 298.15 K only",
                    missing.join(" and ")
                ));
            }
        }
    }
    Ok(cell)
}

/// The reaction with its dissolved and gaseous species placed in `compartment`; pure phases,
/// the solvent and electrons stay as they are (they are the same in both compartments, or
/// have activity 1).
pub fn in_compartment(reaction: &Reaction, compartment: Compartment) -> Reaction {
    let mut placed = Reaction::new();
    for entry in reaction.entries() {
        let species = match phase_of(&entry.species).0 {
            Phase::Solute | Phase::Gas if !entry.species.is_electron() => {
                entry.species.in_compartment(compartment)
            }
            _ => entry.species.clone(),
        };
        placed.add(&species, entry.nu.clone());
    }
    placed
}

fn lcm_rational(a: &BigRational, b: &BigRational) -> BigRational {
    // For whole numbers this is the ordinary lcm; for fractions the smallest positive value
    // that both divide into whole multiples.
    let numer = (a.numer() * b.denom()).lcm(&(b.numer() * a.denom()));
    BigRational::new(numer, a.denom() * b.denom())
}

/// A couple derived from others by adding free energies.
#[derive(Clone, Debug, PartialEq)]
pub struct Derived {
    /// The new couple (reaction in lowest whole numbers, E° from free energies).
    pub couple: Couple,
    /// The couples it came from, in order, each with the signed multiple used.
    pub from: Vec<(Couple, BigRational)>,
}

/// Why couples cannot be combined into a new couple.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum DeriveError {
    /// Fewer than two couples.
    #[error("give at least two couples to combine")]
    TooFew,
    /// A couple shares no species (other than water, H+, OH- and electrons) with those before.
    #[error("{0} shares no species with the couples before it")]
    NothingShared(String),
    /// The electrons cancel: the result is a whole reaction, not a half-reaction.
    #[error(
        "the electrons cancel: these couples make a cell reaction, not a new couple (see couplet cell)"
    )]
    NoElectrons,
    /// The sum does not balance.
    #[error("the combination does not balance ({0})")]
    Unbalanced(String),
}

fn is_medium_species(s: &Species) -> bool {
    s.is_electron()
        || [species("H2O"), species("H+"), species("OH-")]
            .iter()
            .any(|w| w.kind == s.kind)
}

/// Combines couples that share species into one half-reaction whose E° follows from adding
/// free energies: E° = Σ(ν_i n_i E°_i)/n. Each couple after the first is added or subtracted
/// (and scaled) so that a species it shares with the sum so far cancels.
pub fn derive(couples: &[Couple]) -> Result<Derived, DeriveError> {
    let [first, rest @ ..] = couples else {
        return Err(DeriveError::TooFew);
    };
    if rest.is_empty() {
        return Err(DeriveError::TooFew);
    }
    let mut sum = first.reaction.clone();
    // Σ multiple·n·E°: minus the free energy over F.
    let mut electron_volts = first.electrons_f64() * first.e0_volts;
    let mut from = vec![(first.clone(), BigRational::one())];
    for couple in rest {
        let shared = couple.reaction.entries().iter().find_map(|e| {
            if is_medium_species(&e.species) {
                return None;
            }
            let in_sum = sum.nu(&e.species);
            (!in_sum.is_zero()).then(|| -in_sum / &e.nu)
        });
        let Some(multiple) = shared else {
            return Err(DeriveError::NothingShared(couple.label()));
        };
        sum = sum.plus(&couple.reaction.scaled(&multiple));
        electron_volts +=
            multiple.to_f64().unwrap_or(f64::NAN) * couple.electrons_f64() * couple.e0_volts;
        from.push((couple.clone(), multiple));
    }
    let mut electrons = -sum.electron_nu();
    if electrons.is_zero() {
        return Err(DeriveError::NoElectrons);
    }
    if electrons.is_negative() {
        // The sum came out as an oxidation: its reverse is the couple, with the opposite E°.
        sum = sum.reversed();
        electrons = -electrons;
        electron_volts = -electron_volts;
    }
    if let Some(detail) = imbalance_text(&sum) {
        return Err(DeriveError::Unbalanced(detail));
    }
    let e0 = electron_volts / electrons.to_f64().unwrap_or(f64::NAN);
    let reaction = sum.in_lowest_integers();
    let mut couple =
        Couple::from_reaction(reaction, e0).map_err(|e| DeriveError::Unbalanced(e.to_string()))?;
    couple.origin = Origin::Given;
    couple.source = Some(format!(
        "derived by free-energy addition from {}",
        from.iter()
            .map(|(c, _)| c.label())
            .collect::<Vec<_>>()
            .join(", ")
    ));
    Ok(Derived { couple, from })
}

/// A species that the caution line names.
/// True when some chromium of the species is at +6 by the oxidation-number rules (dichromate,
/// chromate, CrO3, salts such as K2Cr2O7).
fn holds_chromium_vi(species: &Species) -> bool {
    let six = num_rational::BigRational::from_integer(6.into());
    // The shared answer of the per-thread memo: a copy of it is not needed to read one value.
    let options = crate::oxidation::Options::default();
    crate::oxidation::oxidation_numbers_shared(species, &options).is_ok_and(|oxidation| {
        oxidation.elements.iter().any(|e| {
            e.element.symbol() == "Cr" && e.sites.iter().any(|s| s.oxidation_number == six)
        })
    })
}

/// Substances a caution names by their exact composition (neutral species of whole-number
/// formulas; the isotopes of hydrogen count as hydrogen), with their hazard, and whether they
/// are named only as products. The hazards are common practice of the trade (the hazard
/// statements of the usual safety data sheets, from memory). Oxygen is named only when it is
/// evolved (on charge, in electrolysis): as a reactant it is usually the air of a corrosion
/// reaction or an air cathode. Every other substance here is a hazard whichever side it is on
/// (hydrogen consumed by a fuel cell, bromine stored in a flow cell).
const NAMED_SUBSTANCES: &[NamedSubstance] = &[
    NamedSubstance {
        formula: &[("H", 2)],
        hazard: "hydrogen (flammable, explosive with air)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("O", 2)],
        hazard: "oxygen (feeds fires; with hydrogen explosive)",
        products_only: true,
    },
    NamedSubstance {
        formula: &[("O", 3)],
        hazard: "ozone (toxic; strong oxidiser)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("F", 2)],
        hazard: "fluorine (extremely toxic and corrosive; ignites most materials)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("Cl", 2)],
        hazard: "chlorine (toxic gas)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("Br", 2)],
        hazard: "bromine (toxic, corrosive; fumes at room temperature)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("H", 2), ("S", 1)],
        hazard: "hydrogen sulfide (toxic gas; dulls the sense of smell)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("C", 1), ("O", 1)],
        hazard: "carbon monoxide (toxic gas)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("S", 1), ("O", 2)],
        hazard: "sulfur dioxide (toxic gas)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("N", 1), ("O", 1)],
        hazard: "nitrogen oxides (toxic gases)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("N", 1), ("O", 2)],
        hazard: "nitrogen oxides (toxic gases)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("N", 2), ("O", 4)],
        hazard: "nitrogen oxides (toxic gases)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("N", 1), ("H", 3)],
        hazard: "ammonia (toxic, corrosive)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("N", 2), ("H", 4)],
        hazard: "hydrazine (toxic, carcinogenic; flammable)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("H", 2), ("O", 2)],
        hazard: "hydrogen peroxide (strong oxidiser; concentrated solutions burn skin)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("Na", 1)],
        hazard: "sodium metal (reacts violently with water; can ignite)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("K", 1)],
        hazard: "potassium metal (reacts violently with water; can ignite)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("Rb", 1)],
        hazard: "rubidium metal (reacts violently with water; ignites in air)",
        products_only: false,
    },
    NamedSubstance {
        formula: &[("Cs", 1)],
        hazard: "caesium metal (reacts violently with water; ignites in air)",
        products_only: false,
    },
];

/// A substance of [`NAMED_SUBSTANCES`]: its composition by element symbol, the hazard the
/// caution names, and whether it is named only as a product.
struct NamedSubstance {
    formula: &'static [(&'static str, u64)],
    hazard: &'static str,
    products_only: bool,
}

/// Elements whose every compound a caution names (common practice of the trade, from memory).
const NAMED_ELEMENTS: &[(&str, &str)] = &[
    ("Hg", "mercury (toxic)"),
    ("Cd", "cadmium (toxic, carcinogenic)"),
    ("Pb", "lead (toxic)"),
    ("As", "arsenic (toxic)"),
    (
        "Li",
        "lithium (reacts violently with water; lithium cells can run away thermally)",
    ),
    ("V", "vanadium compounds (toxic)"),
    ("Ni", "nickel compounds (carcinogenic)"),
    ("Co", "cobalt compounds (toxic)"),
    ("Tl", "thallium (highly toxic)"),
    ("Be", "beryllium (toxic, carcinogenic)"),
    ("Se", "selenium compounds (toxic)"),
    ("Sb", "antimony compounds (toxic)"),
    ("Ba", "barium compounds (toxic when soluble)"),
    ("U", "uranium (radioactive, toxic)"),
    ("Th", "thorium (radioactive)"),
    ("Ra", "radium (intensely radioactive)"),
];

/// The hazard the caution line names for one species on one side of a reaction, or `None`.
/// Depends on the species alone, so a batch can keep it.
pub fn species_hazard(species: &Species, is_product: bool) -> Option<&'static str> {
    let counts = species.composition.counts();
    // Counts by chemical element: D2 is hydrogen, HDO is water.
    let count = |symbol: &str| -> u64 {
        counts
            .iter()
            .filter(|(e, _)| e.chemical_element().symbol() == symbol)
            .map(|&(_, n)| n)
            .sum()
    };
    let only = |symbols: &[&str]| {
        counts
            .iter()
            .all(|(e, _)| symbols.contains(&e.chemical_element().symbol()))
    };
    if species.charge() == 0 && species.composition.is_integral() {
        let evolved_gas =
            is_product && !matches!(species.state, Some(s) if s != crate::notation::State::Gas);
        for named in NAMED_SUBSTANCES {
            let in_formula = |element: &Element| {
                let symbol = element.chemical_element().symbol();
                named.formula.iter().any(|&(s, _)| s == symbol)
            };
            if (!named.products_only || evolved_gas)
                && counts.iter().all(|(e, _)| in_formula(e))
                && named.formula.iter().all(|&(symbol, n)| count(symbol) == n)
            {
                return Some(named.hazard);
            }
        }
    }
    if count("Cr") > 0 && holds_chromium_vi(species) {
        return Some("chromium(VI) (carcinogenic)");
    }
    if let Some(&(_, hazard)) = NAMED_ELEMENTS
        .iter()
        .find(|&&(symbol, _)| count(symbol) > 0)
    {
        return Some(hazard);
    }
    if count("C") > 0 && count("C") == count("N") && count("O") == 0 && count("S") == 0 {
        return Some("cyanide (highly toxic; never acidify)");
    }
    // Chlorates and perchlorates (three or four oxygens per chlorine, no carbon): strong
    // oxidisers that burn or explode with fuels, organics, sulfur and reducing metals (common
    // practice of the trade).
    if count("Cl") > 0 && count("C") == 0 && count("O") >= 3 * count("Cl") {
        return Some(
            "chlorate or perchlorate (strong oxidiser; explosive with fuels and organics)",
        );
    }
    if count("F") > 0 && count("H") > 0 && only(&["H", "F"]) {
        return Some("hydrogen fluoride (corrosive, toxic through skin)");
    }
    None
}

/// One caution line for a reaction, or `None` when none of the named hazards is involved.
pub fn caution(reaction: &Reaction) -> Option<String> {
    caution_of_hazards(
        reaction
            .entries()
            .iter()
            .filter_map(|entry| species_hazard(&entry.species, entry.nu.is_positive())),
    )
}

/// The caution line for the [`species_hazard`]s of a reaction's entries, in entry order
/// (repeats named once), or `None` when there are none.
pub fn caution_of_hazards(hazards: impl IntoIterator<Item = &'static str>) -> Option<String> {
    let mut named: Vec<&str> = Vec::new();
    for hazard in hazards {
        if !named.contains(&hazard) {
            named.push(hazard);
        }
    }
    if named.is_empty() {
        return None;
    }
    Some(format!(
        "caution: involves {}; these are ideal figures, not a procedure: follow local codes and the safety data sheets of every material",
        named.join(", ")
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn couple(text: &str, e0: f64) -> Couple {
        Couple::new(text, e0).unwrap()
    }

    #[test]
    fn named_substances_match_by_composition_and_side() {
        let hazard = |text: &str, is_product: bool| {
            species_hazard(&parse_species(text).unwrap(), is_product)
        };
        // Oxygen only when evolved as a gas; hydrogen on either side, written any way.
        assert_eq!(hazard("O2", false), None);
        assert_eq!(hazard("O2(aq)", true), None);
        assert!(hazard("O2(g)", true).unwrap().starts_with("oxygen"));
        for text in ["H2", "H2(g)", "D2", "HD"] {
            assert!(
                hazard(text, false).unwrap().starts_with("hydrogen ("),
                "{text}"
            );
        }
        // The composition must match exactly: water, the nitrite ion, ammonium and sodium
        // ion are not the named substances.
        for text in ["H2O", "NO2-", "NH4+", "Na+", "H2O2^2+"] {
            assert_eq!(hazard(text, true), None, "{text}");
        }
        assert!(
            hazard("H2O2", false)
                .unwrap()
                .starts_with("hydrogen peroxide")
        );
        assert!(hazard("N2O4", true).unwrap().starts_with("nitrogen oxides"));
        assert!(hazard("Na(s)", false).unwrap().starts_with("sodium metal"));
        assert!(hazard("TlCl", false).unwrap().starts_with("thallium"));
    }

    #[test]
    fn electrons_scale_to_their_least_common_multiple() {
        // Values from data/potentials.toml (Harris App. H): Ag+/Ag 0.7996, Zn2+/Zn -0.762.
        let cell = combine(
            &couple("Ag+ + e- -> Ag(s)", 0.7996),
            &couple("Zn2+ + 2 e- -> Zn(s)", -0.762),
            CellOptions::default(),
        )
        .unwrap();
        assert_eq!(cell.net.to_string(), "2 Ag+ + Zn(s) -> 2 Ag(s) + Zn2+");
        assert_eq!(cell.electrons, BigInt::from(2));
    }

    #[test]
    fn acid_and_base_halves_need_a_medium() {
        let o2 = couple("O2(g) + 4 H+ + 4 e- -> 2 H2O(l)", 1.2291);
        let zn = couple("Zn(OH)4^2- + 2 e- -> Zn(s) + 4 OH-", -1.199);
        assert!(matches!(
            combine(&o2, &zn, CellOptions::default()),
            Err(CellError::MixedMedia { .. })
        ));
        let in_base = in_medium(&o2, Medium::Base).unwrap();
        assert_eq!(
            in_base.reaction.to_string(),
            "O2(g) + 4 e- + 2 H2O(l) -> 4 OH-"
        );
        // O2/OH- is 0.401 V in OpenStax App. L: the conversion must land there.
        assert!(
            (in_base.e0_volts - 0.401).abs() < 0.001,
            "{}",
            in_base.e0_volts
        );
    }
}

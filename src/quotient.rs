//! The reaction quotient Q of a reaction or half-reaction: which species enter it and how each
//! one's activity is measured (by phase), its symbolic text, and the defaults assumed for
//! species written without a state label.

use crate::notation::{Species, SpeciesKind, State};
use crate::reaction::Reaction;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive};
use std::fmt::Write;

/// How a species takes part in Q, decided from its state label or a documented default.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Phase {
    /// A pure solid: activity 1, left out of Q.
    Solid,
    /// A pure liquid other than the solvent (Hg, Br2): activity 1, left out of Q.
    PureLiquid,
    /// Water as the solvent: activity 1 unless given or supplied by a γ model.
    Solvent,
    /// An ideal gas: activity p/p° with p° = 1 bar.
    Gas,
    /// A dissolved species: activity γ·m/m° (or γ·c/c°).
    Solute,
}

impl Phase {
    /// True for the phases whose activity is 1 by definition.
    pub fn is_pure(self) -> bool {
        matches!(self, Phase::Solid | Phase::PureLiquid)
    }
}

/// Concentration basis of solutes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum Basis {
    /// m/m°, m° = 1 mol/kg (the IUPAC standard state; default).
    #[default]
    Molal,
    /// c/c°, c° = 1 mol/L.
    Molar,
}

/// How the activity of a factor is obtained, as the JSON field `activity` names it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ActivityKind {
    /// Activity 1 by definition (pure phase, or the solvent taken as 1).
    Unity,
    /// p/p°.
    Pressure,
    /// γ·m/m°.
    Molality,
    /// γ·c/c°.
    Molarity,
    /// Given directly as an activity (or from pH, or supplied by a model for water).
    Given,
}

impl ActivityKind {
    /// `unity`, `pressure`, `molality`, `molarity` or `given`.
    pub fn name(self) -> &'static str {
        match self {
            ActivityKind::Unity => "unity",
            ActivityKind::Pressure => "pressure",
            ActivityKind::Molality => "molality",
            ActivityKind::Molarity => "molarity",
            ActivityKind::Given => "given",
        }
    }
}

/// One species of the reaction with its exponent and phase.
#[derive(Clone, Debug)]
pub struct Factor {
    /// The species as written in the reaction.
    pub species: Species,
    /// Its exponent in Q: the signed stoichiometric number ν (products > 0).
    pub nu: BigRational,
    /// Its phase.
    pub phase: Phase,
    /// Whether its activity enters Q (false for pure phases, and for water taken as 1).
    pub enters: bool,
}

impl Factor {
    /// ν as a float.
    pub fn exponent(&self) -> f64 {
        self.nu.to_f64().unwrap_or(f64::NAN)
    }
}

/// Options for building Q.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct QuotientOptions {
    /// Concentration basis of solutes.
    pub basis: Basis,
    /// Whether the activity of solvent water enters Q (it does when the user gives `a(H2O)` or a
    /// γ model supplies it); otherwise water is taken as 1.
    pub water_enters: bool,
}

/// The reaction quotient of one reaction: factors in reaction order, electrons left out.
#[derive(Clone, Debug)]
pub struct Quotient {
    factors: Vec<Factor>,
    basis: Basis,
    assumptions: Vec<String>,
}

fn is_water(species: &Species) -> bool {
    let counts = species.composition.counts();
    species.charge() == 0
        && species.composition.is_integral()
        && counts.len() == 2
        && counts
            .iter()
            .all(|(e, n)| (e.symbol() == "H" && *n == 2) || (e.symbol() == "O" && *n == 1))
}

/// Elements whose standard state is a gas, with the molecule that is meant.
const GAS_ELEMENTS: &[(&str, u64)] = &[
    ("H", 2),
    ("N", 2),
    ("O", 2),
    ("F", 2),
    ("Cl", 2),
    ("He", 1),
    ("Ne", 1),
    ("Ar", 1),
    ("Kr", 1),
    ("Xe", 1),
    ("Rn", 1),
];

/// Neutral molecules usually met dissolved in water in half-reactions (common practice).
const NEUTRAL_SOLUTES: &[&str] = &[
    "H2O2", "NH3", "H3PO4", "HNO2", "HClO", "HBrO", "HIO", "HIO3", "H2SO3", "H3AsO4", "HAsO2",
    "H3AsO3", "H3BO3", "H2S", "HCN", "HF", "HCOOH", "CH3OH", "H2C2O4", "HOCl", "HOBr", "HOI",
];

/// Why an unlabelled species was given its phase.
#[derive(Clone, Copy)]
enum Assumed {
    Water,
    Ion,
    GasElement,
    LiquidElement,
    SolidElement,
    NeutralSolute,
    NeutralCompound,
}

/// The phase of a species: its state label, or for an unlabelled species the documented
/// default. This is the one rule of state defaults: Q, the cell engine and the data-file
/// checker's couple matching (`Fe` is `Fe(s)`, `Cu2+` is `Cu2+(aq)`) all use it.
pub fn phase(species: &Species) -> Phase {
    classify(species).0
}

fn classify(species: &Species) -> (Phase, Option<Assumed>) {
    match species.state {
        Some(State::Solid | State::Crystal) => return (Phase::Solid, None),
        Some(State::Gas) => return (Phase::Gas, None),
        Some(State::Aqueous) => return (Phase::Solute, None),
        Some(State::Liquid) if is_water(species) => return (Phase::Solvent, None),
        Some(State::Liquid) => return (Phase::PureLiquid, None),
        None => {}
    }
    if is_water(species) {
        return (Phase::Solvent, Some(Assumed::Water));
    }
    if species.charge() != 0 {
        return (Phase::Solute, Some(Assumed::Ion));
    }
    let counts = species.composition.counts();
    if counts.len() == 1 && species.composition.is_integral() {
        let (element, count) = counts[0];
        let symbol = element.symbol();
        if GAS_ELEMENTS.contains(&(symbol, count)) {
            return (Phase::Gas, Some(Assumed::GasElement));
        }
        if (symbol == "Br" && count == 2) || (symbol == "Hg" && count == 1) {
            return (Phase::PureLiquid, Some(Assumed::LiquidElement));
        }
        return (Phase::Solid, Some(Assumed::SolidElement));
    }
    let bare = Species {
        state: None,
        compartment: None,
        ..species.clone()
    };
    if NEUTRAL_SOLUTES.contains(&bare.ascii().as_str()) {
        return (Phase::Solute, Some(Assumed::NeutralSolute));
    }
    (Phase::Solid, Some(Assumed::NeutralCompound))
}

/// The phase of a species ([`phase`]) and, when no state label was written, the sentence
/// saying what was assumed.
pub fn phase_of(species: &Species) -> (Phase, Option<String>) {
    let (phase, default) = classify(species);
    let Some(default) = default else {
        return (phase, None);
    };
    let name = species.ascii();
    let sentence = match default {
        Assumed::Water => format!("{name} taken as the solvent (liquid water)"),
        Assumed::Ion => format!("{name} taken as a dissolved (aqueous) ion"),
        Assumed::GasElement => format!("{name} taken as a gas (its element's standard state)"),
        Assumed::LiquidElement => {
            format!("{name} taken as a pure liquid (its element's standard state)")
        }
        Assumed::SolidElement => format!("{name} taken as a solid (its element's standard state)"),
        Assumed::NeutralSolute => format!("{name} taken as a dissolved neutral molecule"),
        Assumed::NeutralCompound => format!(
            "{name} taken as a pure solid (a neutral compound with no state label); write {name}(aq) or {name}(g) otherwise"
        ),
    };
    (phase, Some(sentence))
}

impl Quotient {
    /// Q of `reaction`: every species but the electron, in reaction order.
    pub fn new(reaction: &Reaction, options: &QuotientOptions) -> Quotient {
        let mut factors = Vec::new();
        let mut assumptions = Vec::new();
        for entry in reaction.entries() {
            if matches!(entry.species.kind, SpeciesKind::Electron) {
                continue;
            }
            let (phase, assumed) = phase_of(&entry.species);
            if let Some(text) = assumed {
                assumptions.push(text);
            }
            let enters = match phase {
                Phase::Solid | Phase::PureLiquid => false,
                Phase::Solvent => options.water_enters,
                Phase::Gas | Phase::Solute => true,
            };
            if phase == Phase::Solvent && !options.water_enters {
                assumptions.push(format!(
                    "a({}) = 1 (dilute solution; give a(H2O) or use a model that supplies it otherwise)",
                    entry.species.without_state().ascii()
                ));
            }
            factors.push(Factor {
                species: entry.species.clone(),
                nu: entry.nu.clone(),
                phase,
                enters,
            });
        }
        Quotient {
            factors,
            basis: options.basis,
            assumptions,
        }
    }

    /// Every species of the reaction but the electron.
    pub fn factors(&self) -> &[Factor] {
        &self.factors
    }

    /// The factors whose activity enters Q.
    pub fn entering(&self) -> impl Iterator<Item = &Factor> {
        self.factors.iter().filter(|f| f.enters)
    }

    /// The concentration basis.
    pub fn basis(&self) -> Basis {
        self.basis
    }

    /// What was assumed about phases and water, one sentence each.
    pub fn assumptions(&self) -> &[String] {
        &self.assumptions
    }

    /// How each factor's activity is measured when no value is given for it directly.
    pub fn default_kind(&self, factor: &Factor) -> ActivityKind {
        match factor.phase {
            Phase::Solid | Phase::PureLiquid => ActivityKind::Unity,
            Phase::Solvent if factor.enters => ActivityKind::Given,
            Phase::Solvent => ActivityKind::Unity,
            Phase::Gas => ActivityKind::Pressure,
            Phase::Solute => match self.basis {
                Basis::Molal => ActivityKind::Molality,
                Basis::Molar => ActivityKind::Molarity,
            },
        }
    }

    /// The name of a factor's species inside `a(…)` and `p(…)`: canonical ASCII without the
    /// state label (`a(H2O)`, `a(O2)`), the phase being given by the activity kind. The label is
    /// kept only when two species of the reaction would otherwise share a name (`O2(g)` and
    /// `O2(aq)`). Every output that writes `a(…)` uses this.
    pub fn label(&self, factor: &Factor) -> String {
        let plain = factor.species.without_state().ascii();
        let shared = self
            .factors
            .iter()
            .filter(|f| f.species.without_state().ascii() == plain)
            .count();
        if shared > 1 {
            factor.species.ascii()
        } else {
            plain
        }
    }

    /// `Q = a(Mn2+) / (a(MnO4-)·a(H+)^8)`; `Q = 1` when nothing enters.
    pub fn expression(&self) -> String {
        let side = |positive: bool| -> (String, usize) {
            let mut text = String::new();
            let mut count = 0;
            for f in self.entering().filter(|f| f.nu.is_positive() == positive) {
                if count > 0 {
                    text.push('·');
                }
                count += 1;
                let _ = write!(text, "a({})", self.label(f));
                let power = f.nu.abs();
                if !power.is_one() {
                    let _ = write!(text, "^{}", ratio_text(&power));
                }
            }
            (text, count)
        };
        let (top, top_count) = side(true);
        let (bottom, bottom_count) = side(false);
        let top = if top_count == 0 { "1".to_owned() } else { top };
        match bottom_count {
            0 => format!("Q = {top}"),
            1 => format!("Q = {top} / {bottom}"),
            _ => format!("Q = {top} / ({bottom})"),
        }
    }
}

/// `8`, `1/2`.
pub fn ratio_text(value: &BigRational) -> String {
    if value.is_integer() {
        value.numer().to_string()
    } else {
        format!("{}/{}", value.numer(), value.denom())
    }
}

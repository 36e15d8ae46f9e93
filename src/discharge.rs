//! Open-circuit voltage along a discharge: from initial amounts of a cell's reactants, step the
//! extent of reaction ξ until the first reactant runs out, updating every amount (water made
//! or consumed included), the solvent mass, molalities, activities (through a γ model), Q and E.
//!
//! The cell reaction runs forward as written: ξ mol of reaction moves n·ξ mol of electrons,
//! n·ξ·F/3600 Ah. State of charge is 1 − ξ/ξ_end, where ξ_end is where the limiting reactant
//! is used up. Everything here is an equilibrium (open-circuit) voltage: no overpotential,
//! no resistance, no self-discharge.

use crate::activity::{ActivityModel, GammaModel, Solution, split_electrolyte};
use crate::capacity::AMP_HOURS_PER_MOL_ELECTRONS;
use crate::cell::Cell;
use crate::constants::thermal_voltage_volts;
use crate::figures::{SIGNIFICANT, significant};
use crate::notation::{Species, parse_species};
use crate::quotient::{Phase, phase_of};
use num_traits::ToPrimitive;
use std::sync::LazyLock;

/// Molar mass of water in kg/mol from the element table (H2O).
static WATER_KG_PER_MOL: LazyLock<f64> = LazyLock::new(|| {
    parse_species("H2O(l)")
        .expect("a fixed formula parses")
        .composition
        .molar_mass()
        .expect("water has atoms")
        .grams_per_mol
        / 1000.0
});

/// An amount as the user gave it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Amount {
    /// Moles.
    Moles(f64),
    /// Grams (converted with the molar mass of the species).
    Grams(f64),
}

/// What to discharge and how.
#[derive(Clone, Debug, PartialEq)]
pub struct DischargeSpec {
    /// Initial amounts: species of the net reaction, or a neutral electrolyte (H2SO4, KOH)
    /// that supplies ions the reaction uses or that only sets the ionic strength.
    pub amounts: Vec<(Species, Amount)>,
    /// Mass of solvent water at the start, kg; needed when a dissolved species enters Q.
    pub solvent_kg: Option<f64>,
    /// The γ model.
    pub activity: ActivityModel,
    /// Pressure of each gas in bar (p° = 1 bar); gases not listed are at 1 bar.
    pub pressures_bar: Vec<(Species, f64)>,
    /// Number of steps from start to end (points = steps + 1).
    pub steps: usize,
}

impl Default for DischargeSpec {
    fn default() -> DischargeSpec {
        DischargeSpec {
            amounts: Vec::new(),
            solvent_kg: None,
            activity: ActivityModel::new(GammaModel::Ideal),
            pressures_bar: Vec::new(),
            steps: 100,
        }
    }
}

/// Why a discharge cannot be computed.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum DischargeError {
    /// The cell does not run as written.
    #[error("E°cell = {0:+.4} V: the reaction does not run as written; swap cathode and anode")]
    NotGalvanic(f64),
    /// A concentration cell: two compartments, two solutions.
    #[error(
        "a concentration cell has a separate solution in each compartment, and the discharge model follows one electrolyte: give each compartment's activities to `couplet cell` instead"
    )]
    TwoCompartments,
    /// A species given an amount takes no part and is no electrolyte.
    #[error(
        "{0} takes no part in the net reaction and is no electrolyte of known ions; amounts are for reactants, products or a dissolved electrolyte"
    )]
    NotInReaction(String),
    /// An amount that is not a finite number ≥ 0 (or > 0 for a reactant).
    #[error("amount of {species} must be a finite positive number, not {value}")]
    BadAmount {
        /// The species.
        species: String,
        /// The value.
        value: f64,
    },
    /// A species given twice.
    #[error("{0} is given an amount twice")]
    Twice(String),
    /// Every reactant is in excess.
    #[error("every reactant is in excess: give the amount of at least one reactant")]
    NothingLimits,
    /// A dissolved species in Q needs a solvent mass.
    #[error("{0} is dissolved and enters Q: give the solvent (water) mass in kg")]
    NeedsSolvent(String),
    /// A dissolved species in Q has no amount.
    #[error(
        "{0} is dissolved and enters Q but has no amount: a dissolved species in excess still needs its concentration"
    )]
    NeedsAmount(String),
    /// A dissolved product starts at zero: Q and E are unbounded at the start.
    #[error(
        "{0} is made by the reaction and starts at zero, so E is unbounded at the start: give it a small initial amount"
    )]
    ProductStartsAtZero(String),
    /// The solvent mass is not a positive finite number.
    #[error("solvent mass must be a positive number of kg, not {0}")]
    BadSolvent(f64),
    /// A pressure that is not positive and finite.
    #[error("pressure of {species} must be a positive number of bar, not {value}")]
    BadPressure {
        /// The gas.
        species: String,
        /// The value.
        value: f64,
    },
    /// The γ model (or a zero activity) refused the solution at the start.
    #[error("at the start: {0}")]
    AtStart(String),
    /// Fewer than one step.
    #[error("steps must be at least 1")]
    NoSteps,
}

/// One point of the curve.
#[derive(Clone, Debug, PartialEq)]
pub struct DischargePoint {
    /// Extent of reaction ξ, mol.
    pub extent_mol: f64,
    /// State of charge, 1 at the start and 0 when the limiting reactant is used up.
    pub state_of_charge: f64,
    /// Charge passed, Ah.
    pub charge_amp_hours: f64,
    /// Open-circuit voltage, V.
    pub e_volts: f64,
    /// ln Q.
    pub ln_q: f64,
    /// Solvent water, kg.
    pub solvent_kg: Option<f64>,
    /// Water activity used (1 unless the γ model supplies it).
    pub water_activity: f64,
    /// Molality of each tracked dissolved species, mol/kg, in [`Discharge::solutes`] order.
    pub molalities: Vec<f64>,
}

/// A computed discharge.
#[derive(Clone, Debug, PartialEq)]
pub struct Discharge {
    /// Net reaction, as text.
    pub reaction: String,
    /// Electrons per reaction.
    pub electrons: f64,
    /// E° used (at the cell's temperature when it has one).
    pub e0_volts: f64,
    /// Temperature, K.
    pub temperature_kelvin: f64,
    /// The γ model.
    pub gamma_model: GammaModel,
    /// The reactant that runs out first.
    pub limiting: Species,
    /// Reactants with no amount (in excess).
    pub excess: Vec<Species>,
    /// ξ at which the limiting reactant runs out, mol.
    pub extent_end_mol: f64,
    /// Theoretical capacity to the end, Ah.
    pub capacity_amp_hours: f64,
    /// ∫E dq over the computed points, Wh.
    pub energy_watt_hours: f64,
    /// Dissolved species tracked (their molalities are in every point).
    pub solutes: Vec<Species>,
    /// The points, from the start.
    pub points: Vec<DischargePoint>,
    /// Why the curve stops before soc 0, if it does (a γ model's range, an activity reaching 0).
    pub stopped: Option<String>,
    /// What was assumed, in sentences.
    pub assumptions: Vec<String>,
}

/// A species tracked along the discharge.
struct Tracked {
    species: Species,
    nu: f64,
    /// Initial moles; `None` for a reactant in excess.
    initial_mol: Option<f64>,
    phase: Phase,
    /// Takes part in the reaction (false for spectator ions of an electrolyte).
    reacts: bool,
}

fn moles(species: &Species, amount: Amount) -> Result<f64, DischargeError> {
    let value = match amount {
        Amount::Moles(m) => m,
        Amount::Grams(g) => {
            let mass = species
                .composition
                .molar_mass()
                .map_or(f64::NAN, |m| m.grams_per_mol);
            g / mass
        }
    };
    if !(value.is_finite() && value >= 0.0) {
        return Err(DischargeError::BadAmount {
            species: species.ascii(),
            value: match amount {
                Amount::Moles(v) | Amount::Grams(v) => v,
            },
        });
    }
    Ok(value)
}

fn find<'a>(tracked: &'a mut [Tracked], species: &Species) -> Option<&'a mut Tracked> {
    tracked.iter_mut().find(|t| t.species.kind == species.kind)
}

fn add_amount(tracked: &mut Vec<Tracked>, species: &Species, mol: f64, reacts: bool) {
    match find(tracked, species) {
        Some(t) => *t.initial_mol.get_or_insert(0.0) += mol,
        None => tracked.push(Tracked {
            species: species.without_state(),
            nu: 0.0,
            initial_mol: Some(mol),
            phase: Phase::Solute,
            reacts,
        }),
    }
}

/// Steps the discharge of `cell` from the amounts of `spec`.
pub fn discharge(cell: &Cell, spec: &DischargeSpec) -> Result<Discharge, DischargeError> {
    if cell
        .net
        .entries()
        .iter()
        .any(|e| e.species.compartment.is_some())
    {
        return Err(DischargeError::TwoCompartments);
    }
    if !cell.runs_as_written {
        return Err(DischargeError::NotGalvanic(cell.e0_volts));
    }
    if spec.steps == 0 {
        return Err(DischargeError::NoSteps);
    }
    let temperature = cell.temperature_kelvin;
    let e0 = cell
        .at_temperature
        .as_ref()
        .map_or(cell.e0_volts, |t| t.e0_volts);
    let electrons = cell.electrons.to_f64().unwrap_or(f64::NAN);
    let mut assumptions = Vec::new();
    let mut tracked: Vec<Tracked> = Vec::new();
    for entry in cell.net.entries() {
        let (phase, assumed) = phase_of(&entry.species);
        if let Some(text) = assumed {
            assumptions.push(text);
        }
        let nu = entry.nu.to_f64().unwrap_or(f64::NAN);
        tracked.push(Tracked {
            species: entry.species.clone(),
            nu,
            // Products start at zero unless given; reactants are in excess unless given.
            initial_mol: (nu > 0.0).then_some(0.0),
            phase,
            reacts: true,
        });
    }
    let mut given: Vec<Species> = Vec::new();
    for (species, amount) in &spec.amounts {
        if given.iter().any(|g| g.kind == species.kind) {
            return Err(DischargeError::Twice(species.ascii()));
        }
        given.push(species.clone());
        let mol = moles(species, *amount)?;
        if let Some(t) = find(&mut tracked, species) {
            t.initial_mol = Some(mol);
            continue;
        }
        let Some((cation, nu_c, anion, nu_a)) = split_electrolyte(species) else {
            return Err(DischargeError::NotInReaction(species.ascii()));
        };
        let uses = |ion: &Species| {
            cell.net
                .entries()
                .iter()
                .any(|e| e.species.kind == ion.kind)
        };
        assumptions.push(format!(
            "{} taken as fully dissociated: {} mol gives {} mol {} and {} mol {}{}",
            species.ascii(),
            significant(mol, SIGNIFICANT),
            significant(mol * f64::from(nu_c), SIGNIFICANT),
            cation.ascii(),
            significant(mol * f64::from(nu_a), SIGNIFICANT),
            anion.ascii(),
            if uses(&cation) || uses(&anion) {
                ""
            } else {
                " (neither takes part: it only sets the ionic strength and water activity)"
            }
        ));
        add_amount(&mut tracked, &cation, mol * f64::from(nu_c), uses(&cation));
        add_amount(&mut tracked, &anion, mol * f64::from(nu_a), uses(&anion));
    }
    if let Some(kg) = spec.solvent_kg
        && !(kg.is_finite() && kg > 0.0)
    {
        return Err(DischargeError::BadSolvent(kg));
    }
    for (gas, bar) in &spec.pressures_bar {
        if !(bar.is_finite() && *bar > 0.0) {
            return Err(DischargeError::BadPressure {
                species: gas.ascii(),
                value: *bar,
            });
        }
    }
    // Water: the solvent, limited by its mass when consumed.
    let water_kg_per_mol = *WATER_KG_PER_MOL;
    let water_nu = tracked
        .iter()
        .find(|t| t.phase == Phase::Solvent)
        .map_or(0.0, |t| t.nu);
    if let (Some(kg), Some(t)) = (
        spec.solvent_kg,
        tracked.iter_mut().find(|t| t.phase == Phase::Solvent),
    ) && t.initial_mol.is_none()
    {
        t.initial_mol = Some(kg / water_kg_per_mol);
    }
    // Checks on dissolved species that enter Q.
    for t in &tracked {
        if t.phase != Phase::Solute || !t.reacts {
            continue;
        }
        if spec.solvent_kg.is_none() {
            return Err(DischargeError::NeedsSolvent(t.species.ascii()));
        }
        match t.initial_mol {
            None => return Err(DischargeError::NeedsAmount(t.species.ascii())),
            Some(m) if m <= 0.0 => {
                return Err(DischargeError::ProductStartsAtZero(t.species.ascii()));
            }
            Some(_) => {}
        }
    }
    // The end: the first reactant with a finite amount to run out.
    let mut end: Option<(f64, Species)> = None;
    let mut excess = Vec::new();
    for t in tracked.iter().filter(|t| t.nu < 0.0) {
        match t.initial_mol {
            Some(mol) => {
                let xi = mol / -t.nu;
                if end.as_ref().is_none_or(|(e, _)| xi < *e) {
                    end = Some((xi, t.species.clone()));
                }
            }
            None => excess.push(t.species.clone()),
        }
    }
    let Some((extent_end, limiting)) = end else {
        return Err(DischargeError::NothingLimits);
    };
    for s in &excess {
        assumptions.push(format!("{} in excess (no amount given)", s.ascii()));
    }
    if tracked.iter().any(|t| t.phase == Phase::Gas) {
        for t in tracked.iter().filter(|t| t.phase == Phase::Gas) {
            let p = pressure(spec, &t.species);
            assumptions.push(format!(
                "{} held at {p} bar throughout (p° = 1 bar, ideal gas)",
                t.species.ascii()
            ));
        }
    }
    let solutes: Vec<Species> = tracked
        .iter()
        .filter(|t| t.phase == Phase::Solute)
        .map(|t| t.species.without_state())
        .collect();
    let thermal = thermal_voltage_volts(temperature);
    let mut points = Vec::with_capacity(spec.steps + 1);
    let mut stopped = None;
    let mut water_model_note = false;
    for step in 0..=spec.steps {
        // State of charge from the step count, so the ends are exactly 1 and 0.
        let state_of_charge = (spec.steps - step) as f64 / spec.steps as f64;
        let xi = if step == spec.steps {
            extent_end
        } else {
            extent_end * step as f64 / spec.steps as f64
        };
        let solvent = spec
            .solvent_kg
            .map(|kg| kg + water_nu * xi * water_kg_per_mol);
        match state_at(&tracked, xi, solvent, spec, temperature) {
            Ok((ln_q, water_activity, molalities, modelled_water)) => {
                water_model_note |= modelled_water;
                points.push(DischargePoint {
                    extent_mol: xi,
                    state_of_charge,
                    charge_amp_hours: electrons * xi * AMP_HOURS_PER_MOL_ELECTRONS,
                    e_volts: e0 - thermal / electrons * ln_q,
                    ln_q,
                    solvent_kg: solvent,
                    water_activity,
                    molalities,
                });
            }
            Err(reason) if step > 0 => {
                stopped = Some(format!("curve stops at soc {state_of_charge:.3}: {reason}"));
                break;
            }
            Err(reason) => return Err(DischargeError::AtStart(reason)),
        }
    }
    if !solutes.is_empty() {
        assumptions.push(if water_model_note {
            "water activity from the γ model's published data (Gibbs–Duhem)".to_owned()
        } else {
            "water activity taken as 1 (the γ model supplies none)".to_owned()
        });
    }
    let energy_watt_hours = points
        .windows(2)
        .map(|w| {
            (w[1].charge_amp_hours - w[0].charge_amp_hours) * (w[0].e_volts + w[1].e_volts) / 2.0
        })
        .sum();
    Ok(Discharge {
        reaction: cell.net.to_string(),
        electrons,
        e0_volts: e0,
        temperature_kelvin: temperature,
        gamma_model: spec.activity.model,
        limiting,
        excess,
        extent_end_mol: extent_end,
        capacity_amp_hours: electrons * extent_end * AMP_HOURS_PER_MOL_ELECTRONS,
        energy_watt_hours,
        solutes,
        points,
        stopped,
        assumptions,
    })
}

fn pressure(spec: &DischargeSpec, gas: &Species) -> f64 {
    spec.pressures_bar
        .iter()
        .find(|(s, _)| s.kind == gas.kind)
        .map_or(1.0, |(_, p)| *p)
}

type State = (f64, f64, Vec<f64>, bool);

/// ln Q, water activity, molalities and whether the model supplied the water activity, at ξ.
fn state_at(
    tracked: &[Tracked],
    xi: f64,
    solvent_kg: Option<f64>,
    spec: &DischargeSpec,
    temperature: f64,
) -> Result<State, String> {
    let mut molalities = Vec::new();
    let mut amounts = Vec::new();
    for t in tracked.iter().filter(|t| t.phase == Phase::Solute) {
        let mol = t.initial_mol.unwrap_or(0.0) + t.nu * xi;
        let kg = solvent_kg.unwrap_or(f64::NAN);
        let m = (mol / kg).max(0.0);
        molalities.push(m);
        if m > 0.0 {
            amounts.push((t.species.without_state(), m));
        } else if t.reacts {
            return Err(format!(
                "{} is used up (its activity reaches 0)",
                t.species.ascii()
            ));
        }
    }
    let solution = if amounts.is_empty() {
        None
    } else {
        Some(Solution::from_amounts(&amounts).map_err(|e| e.to_string())?)
    };
    let (water_activity, modelled) = match &solution {
        Some(s) => match spec
            .activity
            .water_activity(s, temperature)
            .map_err(|e| e.to_string())?
        {
            Some(a) => (a, true),
            None => (1.0, false),
        },
        None => (1.0, false),
    };
    let mut ln_q = 0.0;
    for t in tracked.iter().filter(|t| t.reacts) {
        let ln_a = match t.phase {
            Phase::Solid | Phase::PureLiquid => 0.0,
            Phase::Solvent => water_activity.ln(),
            Phase::Gas => pressure(spec, &t.species).ln(),
            Phase::Solute => {
                let s = solution.as_ref().expect("a reacting solute is present");
                let gamma = spec
                    .activity
                    .gamma(&t.species, s, temperature)
                    .map_err(|e| e.to_string())?;
                let m = s.amount(&t.species).unwrap_or(0.0);
                (gamma * m).ln()
            }
        };
        ln_q += t.nu * ln_a;
    }
    if !ln_q.is_finite() {
        return Err("Q is not a finite number".to_owned());
    }
    Ok((ln_q, water_activity, molalities, modelled))
}

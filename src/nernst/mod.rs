//! The Nernst potential `E = E° − (RT/nF)·ln Q` at the given composition and temperature:
//! input checks, the activity of each factor of Q from what was given (activities, molalities
//! or molarities with a γ model, pressures, pH with Kw(T)), and E against pH.

pub mod model;

use crate::activity::{ActivityError, ActivityModel, GammaModel, Solution, same_substance};
use crate::constants::{STANDARD_TEMPERATURE_KELVIN, thermal_voltage_volts};
use crate::kw::{KW_FIT_MAX_KELVIN, KW_FIT_MIN_KELVIN, KW_SOURCE, log10_kw};
use crate::notation::Species;
use crate::quotient::{ActivityKind, Basis, Phase, Quotient, QuotientOptions};
use crate::reaction::Reaction;
use thiserror::Error;

pub use model::{CellModel, ModelError};

/// Why a Nernst potential could not be computed.
#[derive(Debug, Error, Clone, PartialEq)]
#[non_exhaustive]
pub enum NernstError {
    /// A species of Q has no value.
    #[error("no value for {species}: give its {needed}")]
    Missing {
        /// The species.
        species: String,
        /// What would supply it (`activity or molality`, `pressure`).
        needed: &'static str,
    },
    /// A value that is zero, negative, NaN or infinite.
    #[error("{what} of {species} must be a finite positive number, got {value}")]
    BadValue {
        /// The species (or `temperature`, `pH`).
        species: String,
        /// Which quantity.
        what: &'static str,
        /// The value given.
        value: f64,
    },
    /// A value given for a species the reaction does not contain or cannot use.
    #[error("{species}: {reason}")]
    NotUsable {
        /// The species.
        species: String,
        /// Why.
        reason: String,
    },
    /// The number of electrons is not a positive finite number.
    #[error("the number of electrons n must be positive, got {0}")]
    BadElectrons(f64),
    /// pH given but the reaction has neither H+ nor OH-.
    #[error("pH was given but the reaction has neither H+ nor OH-")]
    PhUnused,
    /// Kw(T) is needed outside the range of its fit.
    #[error(
        "Kw at {0} K is outside the 273.15..333.15 K range of its fit; force it to extrapolate"
    )]
    KwTemperature(f64),
    /// From the activity model.
    #[error(transparent)]
    Activity(#[from] ActivityError),
}

/// The composition and temperature at which E is wanted.
#[derive(Clone, Debug)]
pub struct Conditions {
    /// Temperature in K.
    pub temperature_kelvin: f64,
    /// Activities given directly (water included: `H2O=0.8`).
    pub activities: Vec<(Species, f64)>,
    /// Molalities (mol/kg) or, on the molar basis, molarities (mol/L) of dissolved species,
    /// neutral electrolytes (`H2SO4`) included; species not in Q count for the ionic strength.
    pub amounts: Vec<(Species, f64)>,
    /// Gas pressures in bar.
    pub pressures_bar: Vec<(Species, f64)>,
    /// pH: sets a(H+) = 10^−pH, and a(OH−) = Kw(T)/a(H+).
    pub ph: Option<f64>,
    /// Concentration basis of `amounts`.
    pub basis: Basis,
    /// The γ model.
    pub model: ActivityModel,
    /// Take species with no value at unit activity (as `ph-line` does) instead of failing.
    pub unspecified_at_unity: bool,
}

impl Conditions {
    /// 298.15 K, nothing given, ideal, molal.
    pub fn standard() -> Conditions {
        Conditions {
            temperature_kelvin: STANDARD_TEMPERATURE_KELVIN,
            activities: Vec::new(),
            amounts: Vec::new(),
            pressures_bar: Vec::new(),
            ph: None,
            basis: Basis::Molal,
            model: ActivityModel::new(GammaModel::Ideal),
            unspecified_at_unity: false,
        }
    }

    /// True when no composition was given at all.
    pub fn is_empty(&self) -> bool {
        self.activities.is_empty()
            && self.amounts.is_empty()
            && self.pressures_bar.is_empty()
            && self.ph.is_none()
    }
}

/// One factor of Q with the activity used.
#[derive(Clone, Debug, PartialEq)]
pub struct FactorValue {
    /// Canonical ASCII of the species, as written in the reaction (state label included).
    pub species: String,
    /// The species as written inside `a(…)` ([`Quotient::label`]: no state label).
    pub label: String,
    /// ν.
    pub exponent: f64,
    /// How the activity was obtained.
    pub kind: ActivityKind,
    /// The activity, `None` when it could not be given.
    pub value: Option<f64>,
    /// The activity coefficient used, for solutes.
    pub gamma: Option<f64>,
}

/// What the reaction is, for the Nernst equation.
#[derive(Clone, Copy, Debug)]
pub struct Standard<'a> {
    /// The reaction (a reduction half-reaction or a net cell reaction).
    pub reaction: &'a Reaction,
    /// E° at 298.15 K in V.
    pub e0_volts: f64,
    /// Electrons transferred, n.
    pub electrons: f64,
    /// dE°/dT in V/K when known.
    pub de0_dt_volts_per_kelvin: Option<f64>,
}

/// The Nernst result.
#[derive(Clone, Debug)]
pub struct Nernst {
    /// Q with its factors.
    pub quotient: Quotient,
    /// Every factor (pure phases included) with its value.
    pub factors: Vec<FactorValue>,
    /// Q, when every entering factor has a value.
    pub q: Option<f64>,
    /// ln Q, computed as Σ ν ln a (no overflow for extreme Q).
    pub ln_q: Option<f64>,
    /// E° at the temperature (from dE°/dT when given).
    pub e0_at_temperature_volts: f64,
    /// E, when Q is known.
    pub e_volts: Option<f64>,
    /// The ionic strength, when solutes were given.
    pub ionic_strength: Option<f64>,
    /// Everything assumed, one sentence each.
    pub assumptions: Vec<String>,
    /// Factors without a value (empty when E is known).
    pub missing: Vec<(String, &'static str)>,
}

impl Nernst {
    /// E, or an error naming the first factor without a value.
    pub fn e_volts(&self) -> Result<f64, NernstError> {
        match (self.e_volts, self.missing.first()) {
            (Some(e), _) => Ok(e),
            (None, Some((species, needed))) => Err(NernstError::Missing {
                species: species.clone(),
                needed,
            }),
            (None, None) => unreachable!("E is known whenever nothing is missing"),
        }
    }
}

fn positive(species: &Species, what: &'static str, value: f64) -> Result<f64, NernstError> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(NernstError::BadValue {
            species: species.ascii(),
            what,
            value,
        })
    }
}

fn find<'a>(list: &'a [(Species, f64)], species: &Species) -> Option<&'a f64> {
    list.iter()
        .find(|(s, _)| same_substance(s, species))
        .map(|(_, v)| v)
}

/// Why a value was refused for a species the reaction does not contain; names the compartments
/// when the reaction holds the species in both sides of a concentration cell.
fn not_contained(what: &str, quotient: &Quotient, species: &Species) -> String {
    let placed: Vec<String> = quotient
        .factors()
        .iter()
        .filter(|f| f.species.kind == species.kind && f.species.compartment.is_some())
        .map(|f| f.species.without_state().ascii())
        .collect();
    if placed.is_empty() || species.compartment.is_some() {
        format!("{what} was given but the reaction does not contain it")
    } else {
        format!(
            "{what} was given but the reaction holds this species in two compartments: give {}",
            placed.join(" and ")
        )
    }
}

fn is_hydrogen_ion(species: &Species) -> bool {
    species.ascii() == "H+"
}
fn is_hydroxide(species: &Species) -> bool {
    species.ascii() == "OH-"
}

/// E° at `temperature_kelvin` from dE°/dT, with a note when far from 298.15 K.
pub fn e0_at(couple: &Standard, temperature_kelvin: f64, assumptions: &mut Vec<String>) -> f64 {
    let dt = temperature_kelvin - STANDARD_TEMPERATURE_KELVIN;
    match couple.de0_dt_volts_per_kelvin {
        Some(slope) => {
            if dt.abs() > 25.0 {
                assumptions.push(format!(
                    "E°(T) = E°(298.15 K) + (dE°/dT)·(T − 298.15 K) is first-order; {temperature_kelvin} K is {:.0} K from 298.15 K",
                    dt.abs()
                ));
            }
            couple.e0_volts + slope * dt
        }
        None => {
            if dt != 0.0 {
                assumptions.push(
                    "no dE°/dT known: E° at 298.15 K used unchanged; only the RT/nF term follows T"
                        .to_owned(),
                );
            }
            couple.e0_volts
        }
    }
}

/// Computes Q and E for `couple` at `conditions`. Values are checked first (zero, negative, NaN
/// and infinity are errors naming the species); factors left without a value are listed in
/// [`Nernst::missing`] and leave E unknown.
pub fn evaluate(couple: &Standard, conditions: &Conditions) -> Result<Nernst, NernstError> {
    let t = conditions.temperature_kelvin;
    if !(t.is_finite() && t > 0.0) {
        return Err(NernstError::BadValue {
            species: "the system".into(),
            what: "temperature (K)",
            value: t,
        });
    }
    if !(couple.electrons.is_finite() && couple.electrons > 0.0) {
        return Err(NernstError::BadElectrons(couple.electrons));
    }
    for (s, v) in &conditions.activities {
        positive(s, "activity", *v)?;
    }
    for (s, v) in &conditions.amounts {
        let what = match conditions.basis {
            Basis::Molal => "molality",
            Basis::Molar => "molarity",
        };
        positive(s, what, *v)?;
    }
    for (s, v) in &conditions.pressures_bar {
        positive(s, "pressure (bar)", *v)?;
    }
    if let Some(ph) = conditions.ph
        && !ph.is_finite()
    {
        return Err(NernstError::BadValue {
            species: "H+".into(),
            what: "pH",
            value: ph,
        });
    }
    if conditions.model.model == GammaModel::Table && conditions.basis == Basis::Molar {
        return Err(ActivityError::TableNeedsMolality.into());
    }

    let mut assumptions = Vec::new();
    let solution = if conditions.amounts.is_empty() {
        None
    } else {
        let solution = Solution::from_amounts(&conditions.amounts)?;
        conditions.model.check(&solution, t)?;
        assumptions.extend(solution.assumptions.iter().cloned());
        Some(solution)
    };
    let model_water = match &solution {
        Some(s) => conditions.model.water_activity(s, t)?,
        None => None,
    };
    let has_water = couple
        .reaction
        .entries()
        .iter()
        .any(|e| crate::quotient::phase_of(&e.species).0 == Phase::Solvent);
    let given_water = couple
        .reaction
        .entries()
        .iter()
        .filter(|e| crate::quotient::phase_of(&e.species).0 == Phase::Solvent)
        .find_map(|e| find(&conditions.activities, &e.species).copied());
    let quotient = Quotient::new(
        couple.reaction,
        &QuotientOptions {
            basis: conditions.basis,
            water_enters: has_water && (given_water.is_some() || model_water.is_some()),
        },
    );
    assumptions.splice(0..0, quotient.assumptions().iter().cloned());

    // Values for species the reaction does not use are mistakes, except amounts (ionic strength).
    for (s, _) in &conditions.activities {
        let Some(f) = quotient
            .factors()
            .iter()
            .find(|f| same_substance(&f.species, s))
        else {
            return Err(NernstError::NotUsable {
                species: s.ascii(),
                reason: not_contained("an activity", &quotient, s),
            });
        };
        if f.phase.is_pure() {
            return Err(NernstError::NotUsable {
                species: s.ascii(),
                reason: "a pure solid or liquid has activity 1 by definition".into(),
            });
        }
    }
    for (s, _) in &conditions.pressures_bar {
        match quotient
            .factors()
            .iter()
            .find(|f| same_substance(&f.species, s))
        {
            Some(f) if f.phase == Phase::Gas => {}
            Some(_) => {
                return Err(NernstError::NotUsable {
                    species: s.ascii(),
                    reason: "a pressure was given but it is not a gas in the reaction".into(),
                });
            }
            None => {
                return Err(NernstError::NotUsable {
                    species: s.ascii(),
                    reason: not_contained("a pressure", &quotient, s),
                });
            }
        }
    }
    for (s, _) in &conditions.amounts {
        if s.compartment.is_some() && conditions.model.model != GammaModel::Ideal {
            return Err(NernstError::NotUsable {
                species: s.ascii(),
                reason: "each compartment has its own ionic strength, and the γ models here describe one solution: give activities (--activity) or use --gamma ideal".into(),
            });
        }
        if let Some(f) = quotient
            .factors()
            .iter()
            .find(|f| same_substance(&f.species, s))
            && f.phase != Phase::Solute
        {
            return Err(NernstError::NotUsable {
                species: s.ascii(),
                reason: "a molality or molarity was given but it is not a dissolved species in the reaction".into(),
            });
        }
    }
    if let Some(ph) = conditions.ph {
        let uses = quotient
            .entering()
            .any(|f| is_hydrogen_ion(&f.species) || is_hydroxide(&f.species));
        if !uses {
            if let Some(f) = quotient.factors().iter().find(|f| {
                let bare = Species {
                    compartment: None,
                    ..f.species.without_state()
                };
                f.species.compartment.is_some() && (is_hydrogen_ion(&bare) || is_hydroxide(&bare))
            }) {
                return Err(NernstError::NotUsable {
                    species: f.species.ascii(),
                    reason: "a concentration cell has a pH in each compartment: give --activity for H+(cathode) and H+(anode) (or OH-) instead of --ph".into(),
                });
            }
            return Err(NernstError::PhUnused);
        }
        for f in quotient.entering() {
            let given = find(&conditions.activities, &f.species).is_some()
                || find(&conditions.amounts, &f.species).is_some();
            if (is_hydrogen_ion(&f.species) || is_hydroxide(&f.species)) && given {
                return Err(NernstError::NotUsable {
                    species: f.species.ascii(),
                    reason: "given twice: by pH and by its own value".into(),
                });
            }
        }
        let _ = ph;
    }

    let mut factors = Vec::new();
    let mut missing = Vec::new();
    let mut ln_q = 0.0;
    for f in quotient.factors() {
        let species = &f.species;
        let label = quotient.label(f);
        let mut gamma = None;
        let (kind, value) = if !f.enters {
            (ActivityKind::Unity, Some(1.0))
        } else if let Some(v) = find(&conditions.activities, species) {
            (ActivityKind::Given, Some(*v))
        } else if f.phase == Phase::Solvent {
            let a_w = model_water.expect("water enters only when given or supplied");
            assumptions.push(format!(
                "a({label}) = {a_w:.4} from the table model (Gibbs–Duhem integration of the published γ± values)"
            ));
            (ActivityKind::Given, Some(a_w))
        } else if let (Some(ph), true) = (conditions.ph, is_hydrogen_ion(species)) {
            assumptions.push(format!("a(H+) = 10^-{ph} from the pH"));
            (ActivityKind::Given, Some(10f64.powf(-ph)))
        } else if let (Some(ph), true) = (conditions.ph, is_hydroxide(species)) {
            if !conditions.model.force && !(KW_FIT_MIN_KELVIN..=KW_FIT_MAX_KELVIN).contains(&t) {
                return Err(NernstError::KwTemperature(t));
            }
            let log_kw = log10_kw(t);
            assumptions.push(format!(
                "a(OH-) = Kw/a(H+) with pKw = {:.3} at {t} K ({KW_SOURCE})",
                -log_kw
            ));
            (ActivityKind::Given, Some(10f64.powf(log_kw + ph)))
        } else if f.phase == Phase::Gas {
            match find(&conditions.pressures_bar, species) {
                Some(p) => (ActivityKind::Pressure, Some(*p)),
                None if conditions.unspecified_at_unity => {
                    assumptions.push(format!("p({label}) = 1 bar (not given)"));
                    (ActivityKind::Pressure, Some(1.0))
                }
                None => {
                    missing.push((species.ascii(), "pressure"));
                    (ActivityKind::Pressure, None)
                }
            }
        } else {
            let kind = quotient.default_kind(f);
            match solution
                .as_ref()
                .and_then(|s| s.amount(species).map(|m| (s, m)))
            {
                Some((s, m)) => {
                    let g = conditions.model.gamma(species, s, t)?;
                    gamma = Some(g);
                    (kind, Some(g * m))
                }
                None if conditions.unspecified_at_unity => {
                    assumptions.push(format!("a({label}) = 1 (not given)"));
                    (ActivityKind::Given, Some(1.0))
                }
                None => {
                    missing.push((species.ascii(), "activity, molality or molarity"));
                    (kind, None)
                }
            }
        };
        if f.enters
            && let Some(a) = value
        {
            ln_q += f.exponent() * a.ln();
        }
        factors.push(FactorValue {
            species: species.ascii(),
            label,
            exponent: f.exponent(),
            kind,
            value,
            gamma,
        });
    }
    let e0_t = e0_at(couple, t, &mut assumptions);
    let (ln_q, q, e_volts) = if missing.is_empty() {
        let e = e0_t - thermal_voltage_volts(t) / couple.electrons * ln_q;
        (Some(ln_q), Some(ln_q.exp()), Some(e))
    } else {
        (None, None, None)
    };
    if conditions.model.force {
        assumptions.push(format!(
            "the {} model was allowed beyond its documented range",
            conditions.model.model
        ));
    }
    Ok(Nernst {
        quotient,
        factors,
        q,
        ln_q,
        e0_at_temperature_volts: e0_t,
        e_volts,
        ionic_strength: solution.map(|s| s.ionic_strength),
        assumptions,
        missing,
    })
}

/// The Nernst slope per decade of Q for one electron, (RT/F)·ln 10, in V.
pub fn slope_volts_per_decade(temperature_kelvin: f64) -> f64 {
    thermal_voltage_volts(temperature_kelvin) * std::f64::consts::LN_10
}

/// `E = E° − (RT/nF)·ln Q` for a known Q.
pub fn potential_volts(e0_volts: f64, electrons: f64, q: f64, temperature_kelvin: f64) -> f64 {
    e0_volts - thermal_voltage_volts(temperature_kelvin) / electrons * q.ln()
}

/// One point of an E–pH line.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PhPoint {
    /// pH.
    pub ph: f64,
    /// E in V vs SHE.
    pub e_volts: f64,
}

/// E against pH for a half-reaction, from `from` to `to` in `step`s; species other than H+/OH−
/// keep the values in `conditions`, or unit activity when not given (said in the assumptions of
/// the returned evaluation at the first point).
pub fn ph_line(
    couple: &Standard,
    conditions: &Conditions,
    from: f64,
    to: f64,
    step: f64,
) -> Result<(Vec<PhPoint>, Vec<String>), NernstError> {
    for (what, v) in [("pH start", from), ("pH end", to)] {
        if !v.is_finite() {
            return Err(NernstError::BadValue {
                species: "H+".into(),
                what,
                value: v,
            });
        }
    }
    if !(step.is_finite() && step > 0.0) || (to - from) / step > 1e6 {
        return Err(NernstError::BadValue {
            species: "H+".into(),
            what: "pH step",
            value: step,
        });
    }
    let count = ((to - from) / step + 1e-9).floor().max(0.0) as usize;
    let mut points = Vec::with_capacity(count + 1);
    let mut assumptions = Vec::new();
    let mut at = conditions.clone();
    at.unspecified_at_unity = true;
    for i in 0..=count {
        let ph = from + step * i as f64;
        at.ph = Some(ph);
        let result = evaluate(couple, &at)?;
        if i == 0 {
            assumptions = result.assumptions.clone();
        }
        points.push(PhPoint {
            ph,
            e_volts: result.e_volts()?,
        });
    }
    Ok((points, assumptions))
}

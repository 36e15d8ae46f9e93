//! Activity coefficients of aqueous species: the solution's ions and ionic strength, and the
//! γ models `ideal`, `debye-huckel` (limiting law), `extended`, `davies` and `table`, each with
//! the range it is documented for.

pub mod table;
pub mod water;

use crate::figures::{SIGNIFICANT, significant};
use crate::notation::{Species, parse_species};
use std::fmt;
use std::sync::OnceLock;
use thiserror::Error;

/// Why an activity coefficient could not be given.
#[derive(Debug, Error, Clone, PartialEq)]
#[non_exhaustive]
pub enum ActivityError {
    /// The ionic strength is beyond what the model is documented for.
    #[error(
        "ionic strength {} mol/kg is beyond the {model} model's range (I <= {limit} mol/kg); use the table model or force it",
        crate::figures::significant(*.ionic_strength, crate::figures::SIGNIFICANT)
    )]
    OutsideRange {
        /// Model name.
        model: GammaModel,
        /// The solution's ionic strength.
        ionic_strength: f64,
        /// The documented upper limit.
        limit: f64,
    },
    /// A molality outside the published range of an electrolyte.
    #[error(
        "{electrolyte} at {} mol/kg is outside its published range {low}..{high} mol/kg; the table model does not extrapolate",
        crate::figures::significant(*.molality, crate::figures::SIGNIFICANT)
    )]
    OutsideTable {
        /// Electrolyte formula.
        electrolyte: String,
        /// Requested molality.
        molality: f64,
        /// Lowest tabulated molality.
        low: f64,
        /// Highest tabulated molality.
        high: f64,
    },
    /// The table model needs the solution to be one tabulated electrolyte.
    #[error("the table model needs a solution of one tabulated electrolyte ({known}); {found}")]
    TableNeedsOneElectrolyte {
        /// The electrolytes the table knows.
        known: String,
        /// What the solution held instead.
        found: String,
    },
    /// A species whose γ the table model cannot give.
    #[error("{species} is not an ion of the tabulated electrolyte {electrolyte}")]
    NotInTable {
        /// The species.
        species: String,
        /// The electrolyte of the solution.
        electrolyte: String,
    },
    /// The extended law needs an ion size that is not known.
    #[error("no ion size known for {species}; give one for the extended model")]
    UnknownIonSize {
        /// The species.
        species: String,
    },
    /// A temperature the model's data do not cover.
    #[error("{model} model: temperature {temperature_kelvin} K is outside {low}..{high} K")]
    Temperature {
        /// Model name.
        model: GammaModel,
        /// Requested temperature.
        temperature_kelvin: f64,
        /// Lowest covered.
        low: f64,
        /// Highest covered.
        high: f64,
    },
    /// A molality or molarity that is not a finite positive number.
    #[error("amount of {species} must be a finite positive number, got {value}")]
    BadAmount {
        /// The species.
        species: String,
        /// The value given.
        value: f64,
    },
    /// The table holds molal data only.
    #[error("the table model holds molal (mol/kg) data only; give molalities")]
    TableNeedsMolality,
}

/// The γ models.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum GammaModel {
    /// γ = 1.
    Ideal,
    /// Debye–Hückel limiting law `log10 γ = −A z² √I`.
    DebyeHuckel,
    /// Extended Debye–Hückel `log10 γ = −A z² √I/(1 + B å √I)` with Kielland's ion sizes.
    Extended,
    /// Davies `log10 γ = −A z² (√I/(1 + √I) − 0.3 I)`.
    Davies,
    /// Published mean ionic activity coefficients of one electrolyte.
    Table,
}

impl GammaModel {
    /// The name used on the command line and in JSON.
    pub fn name(self) -> &'static str {
        match self {
            GammaModel::Ideal => "ideal",
            GammaModel::DebyeHuckel => "debye-huckel",
            GammaModel::Extended => "extended",
            GammaModel::Davies => "davies",
            GammaModel::Table => "table",
        }
    }

    /// Reads a model name.
    pub fn from_name(name: &str) -> Option<GammaModel> {
        [
            GammaModel::Ideal,
            GammaModel::DebyeHuckel,
            GammaModel::Extended,
            GammaModel::Davies,
            GammaModel::Table,
        ]
        .into_iter()
        .find(|m| m.name() == name)
    }

    /// The highest ionic strength (mol/kg) the model is documented for, `None` for no limit of
    /// its own. Limiting law 0.01, extended law 0.1 (common practice: textbook statements of
    /// the range of these laws); Davies 0.5 (Davies, *Ion Association*, 1962, as in DOMAIN.md).
    pub fn ionic_strength_limit(self) -> Option<f64> {
        match self {
            GammaModel::DebyeHuckel => Some(0.01),
            GammaModel::Extended => Some(0.1),
            GammaModel::Davies => Some(0.5),
            GammaModel::Ideal | GammaModel::Table => None,
        }
    }
}

impl fmt::Display for GammaModel {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// Kielland 1937, J. Am. Chem. Soc. 59, 1675, Table I: effective ion sizes å in Å (values from
/// memory, to the nearest half Å the table gives).
const ION_SIZES_ANGSTROM: &[(&str, f64)] = &[
    ("H+", 9.0),
    ("Li+", 6.0),
    ("Na+", 4.5),
    ("K+", 3.0),
    ("Rb+", 2.5),
    ("Cs+", 2.5),
    ("NH4+", 2.5),
    ("Ag+", 2.5),
    ("Mg2+", 8.0),
    ("Ca2+", 6.0),
    ("Zn2+", 6.0),
    ("Cu2+", 6.0),
    ("Ni2+", 6.0),
    ("Co2+", 6.0),
    ("Fe2+", 6.0),
    ("Mn2+", 6.0),
    ("Sr2+", 5.0),
    ("Ba2+", 5.0),
    ("Cd2+", 5.0),
    ("Pb2+", 4.5),
    ("Fe3+", 9.0),
    ("Al3+", 9.0),
    ("Cr3+", 9.0),
    ("Ce3+", 9.0),
    ("OH-", 3.5),
    ("F-", 3.5),
    ("Cl-", 3.0),
    ("Br-", 3.0),
    ("I-", 3.0),
    ("NO3-", 3.0),
    ("ClO4-", 3.5),
    ("MnO4-", 3.5),
    ("HSO4-", 4.0),
    ("SO4^2-", 4.0),
    ("CO3^2-", 4.5),
    ("PO4^3-", 4.0),
    ("Fe(CN)6^3-", 4.0),
    ("Fe(CN)6^4-", 5.0),
];

/// Ions a neutral electrolyte is split into when it is given by its formula (complete
/// dissociation assumed, and said so).
const CATIONS: &[&str] = &[
    "H+", "Li+", "Na+", "K+", "Rb+", "Cs+", "NH4+", "Ag+", "Mg2+", "Ca2+", "Sr2+", "Ba2+", "Zn2+",
    "Cd2+", "Cu2+", "Ni2+", "Co2+", "Fe2+", "Mn2+", "Pb2+", "Fe3+", "Al3+", "Cr3+",
];
const ANIONS: &[&str] = &[
    "OH-", "F-", "Cl-", "Br-", "I-", "NO3-", "ClO4-", "SO4^2-", "CO3^2-", "PO4^3-",
];

fn parsed(
    list: &'static [&'static str],
    cell: &'static OnceLock<Vec<Species>>,
) -> &'static [Species] {
    cell.get_or_init(|| {
        list.iter()
            .map(|t| parse_species(t).expect("built-in ion list parses"))
            .collect()
    })
}

/// Two species are the same ion when formula, charge and compartment agree (state labels
/// aside).
pub fn same_substance(a: &Species, b: &Species) -> bool {
    a.kind == b.kind && a.compartment == b.compartment
}

fn sorted_counts(species: &Species, times: u64) -> Vec<(String, u64)> {
    let mut v: Vec<(String, u64)> = species
        .composition
        .counts()
        .iter()
        .map(|(e, n)| (e.symbol().to_owned(), n * times))
        .collect();
    v.sort();
    v
}

fn merge(a: Vec<(String, u64)>, b: Vec<(String, u64)>) -> Vec<(String, u64)> {
    let mut out = a;
    for (e, n) in b {
        match out.iter_mut().find(|(x, _)| *x == e) {
            Some((_, m)) => *m += n,
            None => out.push((e, n)),
        }
    }
    out.sort();
    out
}

/// A neutral electrolyte split into (cation, ν+, anion, ν−) from the built-in ion lists, if it is
/// one of their salts, acids or bases.
pub fn split_electrolyte(species: &Species) -> Option<(Species, u32, Species, u32)> {
    static C: OnceLock<Vec<Species>> = OnceLock::new();
    static A: OnceLock<Vec<Species>> = OnceLock::new();
    if species.charge() != 0 || species.is_electron() || !species.composition.is_integral() {
        return None;
    }
    let target = sorted_counts(species, 1);
    for cation in parsed(CATIONS, &C) {
        for anion in parsed(ANIONS, &A) {
            let (zc, za) = (cation.charge() as u64, (-anion.charge()) as u64);
            let g = num_integer::gcd(zc, za);
            let (nu_c, nu_a) = (za / g, zc / g);
            if merge(sorted_counts(cation, nu_c), sorted_counts(anion, nu_a)) == target {
                return Some((cation.clone(), nu_c as u32, anion.clone(), nu_a as u32));
            }
        }
    }
    None
}

/// The tabulated electrolyte a solution is made of.
#[derive(Clone, Debug, PartialEq)]
pub struct TabulatedElectrolyte {
    /// Formula as written in the data file.
    pub formula: String,
    /// Its molality in mol/kg.
    pub molality: f64,
    /// Ions per formula unit (ν = ν+ + ν−).
    pub ions_per_formula: u32,
    /// Its cation and anion.
    pub ions: [Species; 2],
}

/// The dissolved species of a solution, its ionic strength and what was assumed to get them.
#[derive(Clone, Debug)]
pub struct Solution {
    /// Each dissolved species with its molality (or molarity on the molar basis).
    pub solutes: Vec<(Species, f64)>,
    /// `I = ½ Σ m_i z_i²`, counter-ions inferred by charge balance included.
    pub ionic_strength: f64,
    /// The single tabulated electrolyte the solution consists of, when it does.
    pub electrolyte: Option<TabulatedElectrolyte>,
    /// Sentences saying what was assumed (dissociation, inferred counter-ions).
    pub assumptions: Vec<String>,
}

fn add_solute(solutes: &mut Vec<(Species, f64)>, species: &Species, amount: f64) {
    match solutes.iter_mut().find(|(s, _)| same_substance(s, species)) {
        Some((_, m)) => *m += amount,
        None => solutes.push((species.without_state(), amount)),
    }
}

impl Solution {
    /// A solution from the amounts given (molalities, or molarities on the molar basis): ions as
    /// given, neutral electrolytes of the built-in ion lists split completely into their ions,
    /// other neutral solutes kept whole. When the charges do not balance, a monovalent
    /// counter-ion of the missing charge is assumed for the ionic strength, and said so.
    pub fn from_amounts(amounts: &[(Species, f64)]) -> Result<Solution, ActivityError> {
        let mut solutes: Vec<(Species, f64)> = Vec::new();
        let mut assumptions = Vec::new();
        let mut given_electrolytes: Vec<(String, f64)> = Vec::new();
        for (species, amount) in amounts {
            if !(amount.is_finite() && *amount > 0.0) {
                return Err(ActivityError::BadAmount {
                    species: species.ascii(),
                    value: *amount,
                });
            }
            match split_electrolyte(species) {
                Some((cation, nu_c, anion, nu_a)) => {
                    assumptions.push(format!(
                        "{} taken as fully dissociated: {} mol/kg gives {} {} + {} {}",
                        species.ascii(),
                        significant(*amount, SIGNIFICANT),
                        significant(amount * nu_c as f64, SIGNIFICANT),
                        cation.ascii(),
                        significant(amount * nu_a as f64, SIGNIFICANT),
                        anion.ascii()
                    ));
                    add_solute(&mut solutes, &cation, amount * nu_c as f64);
                    add_solute(&mut solutes, &anion, amount * nu_a as f64);
                    given_electrolytes.push((species.without_state().ascii(), *amount));
                }
                None => add_solute(&mut solutes, species, *amount),
            }
        }
        let ionic_strength = ionic_strength_with_counter_ion(&solutes);
        let net_charge: f64 = solutes.iter().map(|(s, m)| m * s.charge() as f64).sum();
        let scale: f64 = solutes.iter().map(|(_, m)| m).sum::<f64>().max(1e-300);
        if net_charge.abs() > 1e-9 * scale {
            assumptions.push(format!(
                "charge balance: {} mol/kg of an unnamed monovalent counter-{} assumed for the ionic strength",
                significant(net_charge.abs(), SIGNIFICANT),
                if net_charge > 0.0 { "anion" } else { "cation" }
            ));
        }
        let electrolyte = identify_electrolyte(&solutes);
        Ok(Solution {
            solutes,
            ionic_strength,
            electrolyte,
            assumptions,
        })
    }

    /// The amount of `species` in the solution, if present.
    pub fn amount(&self, species: &Species) -> Option<f64> {
        self.solutes
            .iter()
            .find(|(s, _)| same_substance(s, species))
            .map(|(_, m)| *m)
    }
}

/// `I = ½ Σ m_i z_i² + ½ |Σ m_i z_i|`: the ions given plus an unnamed monovalent counter-ion of
/// whatever charge they leave unbalanced. The counter-ion term is always added (it is zero for a
/// balanced solution, rounding aside) so that exported code, which computes I the same way, agrees
/// with the library to the last digits; the assumption is reported only when it matters.
pub fn ionic_strength_with_counter_ion(solutes: &[(Species, f64)]) -> f64 {
    let mut squares = 0.0;
    let mut net_charge = 0.0;
    for (species, m) in solutes {
        let z = species.charge() as f64;
        squares += m * z * z;
        net_charge += m * z;
    }
    0.5 * squares + 0.5 * net_charge.abs()
}

/// The one tabulated electrolyte whose ions make up exactly the solution's ions, in its
/// stoichiometric ratio.
fn identify_electrolyte(solutes: &[(Species, f64)]) -> Option<TabulatedElectrolyte> {
    let ions: Vec<&(Species, f64)> = solutes.iter().filter(|(s, _)| s.charge() != 0).collect();
    if ions.len() != 2 {
        return None;
    }
    for t in table::electrolyte_tables() {
        let Ok(formula) = parse_species(&t.electrolyte) else {
            continue;
        };
        let Some((cation, nu_c, anion, nu_a)) = split_electrolyte(&formula) else {
            continue;
        };
        let m_c = ions
            .iter()
            .find(|(s, _)| same_substance(s, &cation))
            .map(|(_, m)| *m);
        let m_a = ions
            .iter()
            .find(|(s, _)| same_substance(s, &anion))
            .map(|(_, m)| *m);
        if let (Some(m_c), Some(m_a)) = (m_c, m_a) {
            let molality = m_c / nu_c as f64;
            if ((m_a / nu_a as f64) - molality).abs() <= 1e-9 * molality {
                return Some(TabulatedElectrolyte {
                    formula: t.electrolyte.clone(),
                    molality,
                    ions_per_formula: nu_c + nu_a,
                    ions: [cation, anion],
                });
            }
        }
    }
    None
}

/// Kielland's ion size for `species`, if listed.
pub fn ion_size_angstrom(species: &Species) -> Option<f64> {
    static SIZES: OnceLock<Vec<(Species, f64)>> = OnceLock::new();
    SIZES
        .get_or_init(|| {
            ION_SIZES_ANGSTROM
                .iter()
                .map(|(t, a)| (parse_species(t).expect("built-in ion parses"), *a))
                .collect()
        })
        .iter()
        .find(|(s, _)| same_substance(s, species))
        .map(|(_, a)| *a)
}

/// How activity coefficients are computed.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ActivityModel {
    /// Which model.
    pub model: GammaModel,
    /// Use the model beyond its documented range (ionic strength, temperature).
    pub force: bool,
}

impl ActivityModel {
    /// A model that keeps to its documented range.
    pub fn new(model: GammaModel) -> ActivityModel {
        ActivityModel {
            model,
            force: false,
        }
    }

    fn check_temperature(
        &self,
        temperature_kelvin: f64,
        low: f64,
        high: f64,
    ) -> Result<(), ActivityError> {
        if self.force || (temperature_kelvin >= low && temperature_kelvin <= high) {
            Ok(())
        } else {
            Err(ActivityError::Temperature {
                model: self.model,
                temperature_kelvin,
                low,
                high,
            })
        }
    }

    /// Checks the solution against the model's range once, before any γ is asked for.
    pub fn check(&self, solution: &Solution, temperature_kelvin: f64) -> Result<(), ActivityError> {
        use water::{WATER_FIT_MAX_KELVIN, WATER_FIT_MIN_KELVIN};
        match self.model {
            GammaModel::Ideal => Ok(()),
            GammaModel::Table => {
                // The published values are for 25 °C.
                self.check_temperature(temperature_kelvin, 298.15, 298.15)?;
                match &solution.electrolyte {
                    Some(e) => table::electrolyte_table(&e.formula)
                        .expect("identified electrolytes are tabulated")
                        .gamma_pm(e.molality)
                        .map(|_| ()),
                    None => Err(ActivityError::TableNeedsOneElectrolyte {
                        known: table::electrolyte_tables()
                            .iter()
                            .map(|t| t.electrolyte.as_str())
                            .collect::<Vec<_>>()
                            .join(", "),
                        found: format!(
                            "the solution holds {}",
                            solution
                                .solutes
                                .iter()
                                .map(|(s, m)| format!("{} {m}", s.ascii()))
                                .collect::<Vec<_>>()
                                .join(", ")
                        ),
                    }),
                }
            }
            model => {
                self.check_temperature(
                    temperature_kelvin,
                    WATER_FIT_MIN_KELVIN,
                    WATER_FIT_MAX_KELVIN,
                )?;
                let limit = model
                    .ionic_strength_limit()
                    .expect("Debye–Hückel models have limits");
                if !self.force && solution.ionic_strength > limit {
                    return Err(ActivityError::OutsideRange {
                        model,
                        ionic_strength: solution.ionic_strength,
                        limit,
                    });
                }
                Ok(())
            }
        }
    }

    /// γ of one dissolved species in `solution` at `temperature_kelvin`, after [`Self::check`].
    /// Neutral solutes get γ = 1 in every model. In the `table` model each ion of the electrolyte
    /// gets the mean coefficient γ±: exact for any Q in which the two ions enter in the
    /// electrolyte's ratio, a convention otherwise.
    pub fn gamma(
        &self,
        species: &Species,
        solution: &Solution,
        temperature_kelvin: f64,
    ) -> Result<f64, ActivityError> {
        self.check(solution, temperature_kelvin)?;
        let z = species.charge() as f64;
        if z == 0.0 {
            return Ok(1.0);
        }
        let root_i = solution.ionic_strength.sqrt();
        let a = || water::debye_huckel_a(temperature_kelvin);
        let log10_gamma = match self.model {
            GammaModel::Ideal => 0.0,
            GammaModel::DebyeHuckel => -a() * z * z * root_i,
            GammaModel::Extended => {
                let size =
                    ion_size_angstrom(species).ok_or_else(|| ActivityError::UnknownIonSize {
                        species: species.ascii(),
                    })?;
                -a() * z * z * root_i
                    / (1.0 + water::debye_huckel_b_per_angstrom(temperature_kelvin) * size * root_i)
            }
            GammaModel::Davies => {
                -a() * z * z * (root_i / (1.0 + root_i) - 0.3 * solution.ionic_strength)
            }
            GammaModel::Table => {
                let e = solution.electrolyte.as_ref().expect("checked above");
                if !e.ions.iter().any(|ion| same_substance(ion, species)) {
                    return Err(ActivityError::NotInTable {
                        species: species.ascii(),
                        electrolyte: e.formula.clone(),
                    });
                }
                return table::electrolyte_table(&e.formula)
                    .expect("identified electrolytes are tabulated")
                    .gamma_pm(e.molality);
            }
        };
        Ok(10f64.powf(log10_gamma))
    }

    /// The water activity the model supplies, if it supplies one: only `table`, from the
    /// Gibbs–Duhem equation over the same published γ± values.
    pub fn water_activity(
        &self,
        solution: &Solution,
        temperature_kelvin: f64,
    ) -> Result<Option<f64>, ActivityError> {
        if self.model != GammaModel::Table {
            return Ok(None);
        }
        self.check(solution, temperature_kelvin)?;
        let e = solution.electrolyte.as_ref().expect("checked above");
        table::electrolyte_table(&e.formula)
            .expect("identified electrolytes are tabulated")
            .water_activity(e.molality, e.ions_per_formula)
            .map(Some)
    }
}

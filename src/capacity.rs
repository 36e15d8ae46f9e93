//! Theoretical capacity and energy: mAh/g of electrode materials, Ah/kg and Wh/kg of a cell
//! reaction on a stated mass basis, and volumetric figures from densities.
//!
//! Conventions (DOMAIN.md §Cell design figures): `q = n·F/(3.6·M)` mAh/g with F exact and M
//! from the CIAAW weights of the element table; specific energy = E × capacity on the same
//! mass basis, and the basis is always named. Which species a basis counts is decided here
//! from the phase of each species, once, so the text, JSON and examples cannot disagree:
//!
//! * electrode materials: species labelled `(s)`, `(cr)` or `(l)` other than water, and
//!   uncharged species with no label other than water (assumed solid, and said so);
//! * electrolyte: dissolved species (`(aq)` or charged) and water;
//! * gases: taken from the surroundings (air and fuel electrodes) and counted only on the
//!   all-reactants basis, as Linden's tables do not carry O2 (battery_facts.md).

use crate::constants::FARADAY_COULOMBS_PER_MOL;
use crate::notation::{Species, State, parse_species};
use crate::reaction::{Reaction, same_species};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{Signed, ToPrimitive, Zero};
use std::fmt;
use std::sync::LazyLock;

/// The built-in densities exactly as shipped (`data/densities.toml`).
pub const BUILTIN_DENSITIES_TOML: &str = include_str!("../data/densities.toml");

/// Charge of one mole of electrons in ampere-hours: F/3600 (26.8015 Ah).
pub const AMP_HOURS_PER_MOL_ELECTRONS: f64 = FARADAY_COULOMBS_PER_MOL / 3600.0;

/// `q = n·F/(3.6·M)`: theoretical capacity in mAh/g of a material of molar mass
/// `molar_mass_g_per_mol` that takes up or gives `electrons` per formula unit.
pub fn milliamp_hours_per_gram(electrons: f64, molar_mass_g_per_mol: f64) -> f64 {
    electrons * FARADAY_COULOMBS_PER_MOL / (3.6 * molar_mass_g_per_mol)
}

/// Which reactant masses a cell figure is divided by.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Basis {
    /// Electrode materials only (solids and liquids other than water): Linden's convention.
    Active,
    /// Electrode materials plus consumed dissolved species and water.
    WithElectrolyte,
    /// Every reactant, gases included (an air electrode's oxygen, a fuel cell's hydrogen).
    AllReactants,
}

impl Basis {
    /// `active`, `with-electrolyte` or `all-reactants`.
    pub fn name(self) -> &'static str {
        match self {
            Basis::Active => "active",
            Basis::WithElectrolyte => "with-electrolyte",
            Basis::AllReactants => "all-reactants",
        }
    }

    /// Reads a basis name.
    pub fn from_name(name: &str) -> Option<Basis> {
        match name.trim() {
            "active" => Some(Basis::Active),
            "with-electrolyte" => Some(Basis::WithElectrolyte),
            "all-reactants" => Some(Basis::AllReactants),
            _ => None,
        }
    }

    /// What the basis counts, in words for output.
    pub fn description(self) -> &'static str {
        match self {
            Basis::Active => "electrode materials only (solids and liquids other than water)",
            Basis::WithElectrolyte => {
                "electrode materials plus consumed dissolved species and water"
            }
            Basis::AllReactants => "every reactant, gases included",
        }
    }

    fn counts(self, role: MassRole) -> bool {
        match self {
            Basis::Active => role == MassRole::ElectrodeMaterial,
            Basis::WithElectrolyte => role != MassRole::Gas,
            Basis::AllReactants => true,
        }
    }
}

impl fmt::Display for Basis {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// How a species takes part in the mass of a cell.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum MassRole {
    /// A solid or liquid that an electrode is made of.
    ElectrodeMaterial,
    /// A dissolved species or water.
    Electrolyte,
    /// A gas supplied from outside.
    Gas,
}

impl MassRole {
    /// `electrode material`, `electrolyte` or `gas`.
    pub fn name(self) -> &'static str {
        match self {
            MassRole::ElectrodeMaterial => "electrode material",
            MassRole::Electrolyte => "electrolyte",
            MassRole::Gas => "gas",
        }
    }
}

fn is_water(species: &Species) -> bool {
    static WATER: LazyLock<Species> =
        LazyLock::new(|| parse_species("H2O").expect("a fixed formula parses"));
    species.kind == WATER.kind
}

/// The mass role of a species, and whether it was assumed (no state label).
pub fn mass_role(species: &Species) -> (MassRole, bool) {
    if is_water(species) {
        return (MassRole::Electrolyte, false);
    }
    match species.state {
        Some(State::Solid | State::Crystal | State::Liquid) => (MassRole::ElectrodeMaterial, false),
        Some(State::Gas) => (MassRole::Gas, false),
        Some(State::Aqueous) => (MassRole::Electrolyte, false),
        None if species.charge() != 0 => (MassRole::Electrolyte, false),
        None => (MassRole::ElectrodeMaterial, true),
    }
}

/// Why a capacity cannot be computed.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum CapacityError {
    /// The reaction moves no electrons.
    #[error("the reaction moves no electrons: no capacity")]
    NoElectrons,
    /// No species of the half-reaction is an electrode material.
    #[error(
        "no electrode material (solid or liquid other than water) in {0}: give a cell with --basis with-electrolyte for dissolved reactants"
    )]
    NoMaterials(String),
    /// Nothing on the basis has mass.
    #[error(
        "no reactant of {reaction} counts on the {basis} basis ({}); try --basis with-electrolyte",
        .basis.description()
    )]
    NothingOnBasis {
        /// The reaction.
        reaction: String,
        /// The basis asked for.
        basis: Basis,
    },
    /// A density that is not a positive finite number.
    #[error("density of {species} must be a positive number of g/cm3, not {value}")]
    BadDensity {
        /// The species.
        species: String,
        /// The value given.
        value: f64,
    },
    /// The densities file does not read.
    #[error("densities file: {0}")]
    DensityFile(String),
    /// A concentration that is not a positive finite number.
    #[error("concentration of {species} must be a positive number of mol/L, not {value}")]
    BadConcentration {
        /// The species.
        species: String,
        /// The value given.
        value: f64,
    },
    /// An electrolyte species that no half-reaction (or both) holds, or a medium species.
    #[error("{species}: {reason}")]
    NotAnElectrolyteSpecies {
        /// The species.
        species: String,
        /// Why it cannot carry the capacity.
        reason: String,
    },
}

/// A density and where it comes from.
#[derive(Clone, Debug, PartialEq)]
pub struct Density {
    /// The species it belongs to.
    pub species: Species,
    /// g/cm³.
    pub grams_per_cm3: f64,
    /// The source, or "given" for the command line.
    pub source: String,
}

/// Densities to look species up in; later entries replace earlier ones of the same species.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Densities {
    entries: Vec<Density>,
}

#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct DensityFile {
    density: Vec<DensityRecord>,
}

#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct DensityRecord {
    species: String,
    g_per_cm3: f64,
    source: String,
}

static BUILTIN_DENSITIES: LazyLock<Densities> = LazyLock::new(|| {
    // The test suite loads the built-in file, so this cannot ship broken.
    Densities::from_toml(BUILTIN_DENSITIES_TOML)
        .unwrap_or_else(|e| panic!("data/densities.toml is broken: {e}"))
});

impl Densities {
    /// No densities.
    pub fn new() -> Densities {
        Densities::default()
    }

    /// The built-in densities (`data/densities.toml`).
    pub fn builtin() -> Densities {
        BUILTIN_DENSITIES.clone()
    }

    /// Reads a densities file of `[[density]]` tables (`species`, `g_per_cm3`, `source`).
    pub fn from_toml(text: &str) -> Result<Densities, CapacityError> {
        let file: DensityFile =
            toml::from_str(text).map_err(|e| CapacityError::DensityFile(e.to_string()))?;
        let mut densities = Densities::new();
        for (index, record) in file.density.into_iter().enumerate() {
            let species = parse_species(&record.species).map_err(|e| {
                CapacityError::DensityFile(format!("entry {}: {}", index + 1, e.message))
            })?;
            densities.insert(species, record.g_per_cm3, record.source)?;
        }
        Ok(densities)
    }

    /// Adds or replaces the density of a species.
    pub fn insert(
        &mut self,
        species: Species,
        grams_per_cm3: f64,
        source: String,
    ) -> Result<(), CapacityError> {
        if !(grams_per_cm3.is_finite() && grams_per_cm3 > 0.0) {
            return Err(CapacityError::BadDensity {
                species: species.ascii(),
                value: grams_per_cm3,
            });
        }
        self.entries
            .retain(|d| !(d.species.kind == species.kind && d.species.state == species.state));
        self.entries.push(Density {
            species,
            grams_per_cm3,
            source,
        });
        Ok(())
    }

    /// The density of a species: same formula, and same state where both carry one.
    pub fn get(&self, species: &Species) -> Option<&Density> {
        self.entries
            .iter()
            .rev()
            .find(|d| same_species(&d.species, species))
    }

    /// Every entry, in order.
    pub fn entries(&self) -> &[Density] {
        &self.entries
    }
}

/// The capacity of one material.
#[derive(Clone, Debug, PartialEq)]
pub struct MaterialCapacity {
    /// The material.
    pub species: Species,
    /// Electrons taken up or given per `formula_units` formula units (whole).
    pub electrons: BigInt,
    /// How many formula units `electrons` refers to (1 unless the electrons per formula unit
    /// are fractional, as for 3 Fe2O3 → 2 Fe3O4).
    pub formula_units: BigInt,
    /// g/mol of one formula unit.
    pub molar_mass_g_per_mol: f64,
    /// Theoretical capacity, mAh/g (numerically equal to Ah/kg).
    pub milliamp_hours_per_gram: f64,
    /// g/Ah.
    pub grams_per_amp_hour: f64,
    /// On which side of the half-reaction (or net reaction) it stands.
    pub side: Side,
    /// Its density, when known.
    pub density: Option<Density>,
    /// mAh/cm³ when the density is known.
    pub milliamp_hours_per_cm3: Option<f64>,
    /// True when the molar mass uses a mass number (element with no standard atomic weight).
    pub approximate_mass: bool,
    /// True when the species had no state label and was taken as a solid.
    pub assumed_solid: bool,
}

/// Where a material stands in the reaction it was read from.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Side {
    /// The oxidised form of a couple (left of a reduction).
    Oxidised,
    /// The reduced form of a couple (right of a reduction).
    Reduced,
    /// A reactant of a cell reaction (charged state).
    Reactant,
}

impl Side {
    /// `oxidised form`, `reduced form` or `reactant`.
    pub fn name(self) -> &'static str {
        match self {
            Side::Oxidised => "oxidised form",
            Side::Reduced => "reduced form",
            Side::Reactant => "reactant",
        }
    }
}

fn to_f64(value: &BigRational) -> f64 {
    value.to_f64().unwrap_or(f64::NAN)
}

/// The capacity of `species` when `nu` formula units of it go with `electrons` electrons.
fn material(
    species: &Species,
    nu: &BigRational,
    electrons: &BigRational,
    side: Side,
    densities: &Densities,
) -> Option<MaterialCapacity> {
    let mass = species.composition.molar_mass()?;
    let per_unit = (electrons / nu).abs();
    let (electrons_whole, units) = (per_unit.numer().clone(), per_unit.denom().clone());
    let q = milliamp_hours_per_gram(to_f64(&per_unit), mass.grams_per_mol);
    let density = densities.get(species).cloned();
    Some(MaterialCapacity {
        species: species.clone(),
        electrons: electrons_whole,
        formula_units: units,
        molar_mass_g_per_mol: mass.grams_per_mol,
        milliamp_hours_per_gram: q,
        grams_per_amp_hour: 1000.0 / q,
        side,
        milliamp_hours_per_cm3: density.as_ref().map(|d| q * d.grams_per_cm3),
        density,
        approximate_mass: mass.uses_mass_numbers,
        assumed_solid: mass_role(species).1,
    })
}

/// Capacities of the electrode materials of a half-reaction (either direction), both its
/// oxidised and its reduced form, each per formula unit.
pub fn half_reaction_materials(
    half: &Reaction,
    densities: &Densities,
) -> Result<Vec<MaterialCapacity>, CapacityError> {
    let electrons = half.electron_nu().abs();
    if electrons.is_zero() {
        return Err(CapacityError::NoElectrons);
    }
    // A reduction has e- on the left (ν < 0): its reactants are the oxidised form.
    let reduction = half.electron_nu().is_negative();
    let materials: Vec<MaterialCapacity> = half
        .entries()
        .iter()
        .filter(|e| !e.species.is_electron())
        .filter(|e| mass_role(&e.species).0 == MassRole::ElectrodeMaterial)
        .filter_map(|e| {
            let side = if e.nu.is_negative() == reduction {
                Side::Oxidised
            } else {
                Side::Reduced
            };
            material(&e.species, &e.nu, &electrons, side, densities)
        })
        .collect();
    if materials.is_empty() {
        return Err(CapacityError::NoMaterials(half.to_string()));
    }
    Ok(materials)
}

/// One reactant's share of the cell mass.
#[derive(Clone, Debug, PartialEq)]
pub struct MassShare {
    /// The species.
    pub species: Species,
    /// Its stoichiometric coefficient in the net reaction (positive).
    pub coefficient: BigRational,
    /// Its role.
    pub role: MassRole,
    /// ν·M in g per mole of reaction.
    pub grams: f64,
    /// Whether the basis counts it.
    pub counted: bool,
}

/// Capacity and energy of a cell reaction on one mass basis.
#[derive(Clone, Debug, PartialEq)]
pub struct CellCapacity {
    /// The basis.
    pub basis: Basis,
    /// The net reaction the figures are for.
    pub reaction: Reaction,
    /// Electrons per reaction as written.
    pub electrons: BigInt,
    /// Cell voltage used for the energy (E° or E°(T)).
    pub e_volts: f64,
    /// Every reactant with its mass and whether it is counted.
    pub shares: Vec<MassShare>,
    /// Σ ν·M of the counted reactants, g per mole of reaction.
    pub mass_g_per_mol: f64,
    /// Ah/kg (numerically mAh/g).
    pub amp_hours_per_kg: f64,
    /// g/Ah.
    pub grams_per_amp_hour: f64,
    /// Wh/kg = E × Ah/kg.
    pub watt_hours_per_kg: f64,
    /// Σ ν·M/ρ of the counted reactants in cm³ per mole of reaction, when every counted
    /// reactant has a density (volumes taken as additive).
    pub volume_cm3_per_mol: Option<f64>,
    /// Ah/L when the volume is known.
    pub amp_hours_per_litre: Option<f64>,
    /// Wh/L when the volume is known.
    pub watt_hours_per_litre: Option<f64>,
    /// Counted reactants with no density (why the volumetric figures are missing).
    pub missing_densities: Vec<Species>,
    /// Assumptions and remarks for the user.
    pub notes: Vec<String>,
}

/// Capacity and energy of a cell whose net reaction `net` moves `electrons` electrons at
/// `e_volts`, per mass of its reactants on `basis`.
pub fn cell_capacity(
    net: &Reaction,
    electrons: &BigInt,
    e_volts: f64,
    basis: Basis,
    densities: &Densities,
) -> Result<CellCapacity, CapacityError> {
    if electrons.is_zero() {
        return Err(CapacityError::NoElectrons);
    }
    let mut shares = Vec::new();
    let mut notes = Vec::new();
    let (mut mass, mut volume, mut missing) = (0.0, 0.0, Vec::new());
    for (species, coefficient) in net.reactants() {
        let Some(molar) = species.composition.molar_mass() else {
            continue;
        };
        let (role, assumed) = mass_role(species);
        if assumed {
            notes.push(format!(
                "{} has no state label: taken as a solid electrode material",
                species.ascii()
            ));
        }
        if molar.uses_mass_numbers {
            notes.push(format!(
                "{} holds an element with no standard atomic weight: its mass uses a mass number",
                species.ascii()
            ));
        }
        let grams = to_f64(&coefficient) * molar.grams_per_mol;
        let counted = basis.counts(role);
        if counted {
            mass += grams;
            match densities.get(species) {
                Some(d) => volume += grams / d.grams_per_cm3,
                None => missing.push(species.clone()),
            }
        }
        shares.push(MassShare {
            species: species.clone(),
            coefficient,
            role,
            grams,
            counted,
        });
    }
    if mass <= 0.0 {
        return Err(CapacityError::NothingOnBasis {
            reaction: net.to_string(),
            basis,
        });
    }
    if basis != Basis::AllReactants && shares.iter().any(|s| s.role == MassRole::Gas) {
        notes.push(
            "gases are supplied from outside the cell and not counted (use --basis all-reactants to count them)"
                .to_owned(),
        );
    }
    if shares
        .iter()
        .any(|s| s.counted && s.role == MassRole::Electrolyte && s.species.charge() != 0)
    {
        notes.push(
            "dissolved ions are counted by their own mass, without counter-ions or the water that dissolves them"
                .to_owned(),
        );
    }
    let n = electrons.to_f64().unwrap_or(f64::NAN);
    let amp_hours_per_kg = milliamp_hours_per_gram(n, mass);
    let volume_known = missing.is_empty();
    if volume_known && basis != Basis::Active {
        notes.push(
            "volumes of the counted reactants are added as if unmixed: a rough guide for solutions"
                .to_owned(),
        );
    }
    let amp_hours_per_litre =
        volume_known.then(|| n * AMP_HOURS_PER_MOL_ELECTRONS / volume * 1000.0);
    Ok(CellCapacity {
        basis,
        reaction: net.clone(),
        electrons: electrons.clone(),
        e_volts,
        shares,
        mass_g_per_mol: mass,
        amp_hours_per_kg,
        grams_per_amp_hour: 1000.0 / amp_hours_per_kg,
        watt_hours_per_kg: e_volts * amp_hours_per_kg,
        volume_cm3_per_mol: volume_known.then_some(volume),
        amp_hours_per_litre,
        watt_hours_per_litre: amp_hours_per_litre.map(|c| c * e_volts),
        missing_densities: missing,
        notes,
    })
}

/// The charge one side of a flow cell's electrolyte stores per litre.
#[derive(Clone, Debug, PartialEq)]
pub struct ElectrolyteSide {
    /// The species whose concentration was given.
    pub species: Species,
    /// The half-reaction of that side.
    pub half: Reaction,
    /// mol/L of the species.
    pub concentration_mol_per_litre: f64,
    /// Electrons per mole of the species: n/|ν| in its half-reaction.
    pub electrons_per_mol: BigRational,
    /// c·(n/|ν|)·F/3600: Ah per litre of this side's electrolyte (numerically mAh/mL).
    pub amp_hours_per_litre: f64,
    /// Ah/L × the cell voltage: Wh per litre of this side's electrolyte, when a voltage is known.
    pub watt_hours_per_litre: Option<f64>,
}

/// Volumetric capacity and energy of a flow cell's electrolytes.
#[derive(Clone, Debug, PartialEq)]
pub struct ElectrolyteCapacity {
    /// Each side given, in the order given.
    pub sides: Vec<ElectrolyteSide>,
    /// The cell voltage the energies use (E° or E°(T)), when a cell was given.
    pub e_volts: Option<f64>,
    /// Ah per litre of both electrolytes together, the tanks sized to hold equal charge
    /// (1/Σ(1/q_side)); half a side's figure when both sides store the same per litre.
    /// Only when two sides are given.
    pub amp_hours_per_litre_both: Option<f64>,
    /// Wh per litre of both electrolytes together, when a voltage is known.
    pub watt_hours_per_litre_both: Option<f64>,
}

/// Charge and energy per litre of electrolyte from the concentration of the active species of
/// each side: q = c·(n/|ν|)·F/3600 Ah/L for each `(species, mol/L)` given, the species found
/// in exactly one of `halves`; energies with `e_volts` (the cell voltage), and with two sides
/// the figures per litre of both tanks. H+, OH- and water carry no capacity and are refused.
pub fn electrolyte_capacity(
    halves: &[&Reaction],
    given: &[(Species, f64)],
    e_volts: Option<f64>,
) -> Result<ElectrolyteCapacity, CapacityError> {
    let refuse = |species: &Species, reason: &str| CapacityError::NotAnElectrolyteSpecies {
        species: species.ascii(),
        reason: reason.to_owned(),
    };
    let mut sides = Vec::with_capacity(given.len());
    for (species, concentration) in given {
        if !(concentration.is_finite() && *concentration > 0.0) {
            return Err(CapacityError::BadConcentration {
                species: species.ascii(),
                value: *concentration,
            });
        }
        if is_water(species) || ["H+", "OH-"].contains(&species.without_state().ascii().as_str()) {
            return Err(refuse(
                species,
                "the medium carries no capacity: give the redox-active species of a side",
            ));
        }
        let holding: Vec<(&Reaction, BigRational)> = halves
            .iter()
            .filter_map(|half| {
                let nu = half
                    .entries()
                    .iter()
                    .find(|e| same_species(&e.species, species))?
                    .nu
                    .clone();
                Some((*half, nu))
            })
            .collect();
        let (half, nu) = match holding.as_slice() {
            [one] => one.clone(),
            [] => return Err(refuse(species, "no half-reaction of the cell holds it")),
            _ => {
                return Err(refuse(
                    species,
                    "both half-reactions hold it: name a species of one side",
                ));
            }
        };
        let electrons = half.electron_nu().abs();
        if electrons.is_zero() {
            return Err(CapacityError::NoElectrons);
        }
        let per_mol = electrons / nu.abs();
        let q = concentration * to_f64(&per_mol) * AMP_HOURS_PER_MOL_ELECTRONS;
        sides.push(ElectrolyteSide {
            species: species.clone(),
            half: half.clone(),
            concentration_mol_per_litre: *concentration,
            electrons_per_mol: per_mol,
            amp_hours_per_litre: q,
            watt_hours_per_litre: e_volts.map(|e| e * q),
        });
    }
    let both = match sides.as_slice() {
        [] | [_] => None,
        [a, b] if a.half != b.half => {
            Some(1.0 / (1.0 / a.amp_hours_per_litre + 1.0 / b.amp_hours_per_litre))
        }
        [_, b] => {
            return Err(refuse(
                &b.species,
                "a concentration for this side was given already: one species per side",
            ));
        }
        [.., extra] => {
            return Err(refuse(
                &extra.species,
                "a cell has two sides: give at most two concentrations",
            ));
        }
    };
    Ok(ElectrolyteCapacity {
        sides,
        e_volts,
        amp_hours_per_litre_both: both,
        watt_hours_per_litre_both: both.and_then(|q| e_volts.map(|e| e * q)),
    })
}

/// Capacities of the electrode materials among a cell's reactants (the charged state), each
/// with the electrons of the net reaction shared out by its coefficient.
pub fn cell_materials(
    net: &Reaction,
    electrons: &BigInt,
    densities: &Densities,
) -> Vec<MaterialCapacity> {
    let electrons = BigRational::from_integer(electrons.clone());
    net.reactants()
        .filter(|(s, _)| mass_role(s).0 == MassRole::ElectrodeMaterial)
        .filter_map(|(s, nu)| material(s, &nu, &electrons, Side::Reactant, densities))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_mole_of_electrons_is_26_8_amp_hours() {
        // battery_facts.md: 1 mol e- = F/3600 = 26.8015 Ah.
        assert!((AMP_HOURS_PER_MOL_ELECTRONS - 26.8015).abs() < 1e-4);
    }

    #[test]
    fn roles_follow_state_labels() {
        let role = |s: &str| mass_role(&parse_species(s).unwrap());
        assert_eq!(role("Zn(s)"), (MassRole::ElectrodeMaterial, false));
        assert_eq!(role("Hg(l)"), (MassRole::ElectrodeMaterial, false));
        assert_eq!(role("H2O(l)"), (MassRole::Electrolyte, false));
        assert_eq!(role("SO4^2-"), (MassRole::Electrolyte, false));
        assert_eq!(role("O2(g)"), (MassRole::Gas, false));
        assert_eq!(role("Zn"), (MassRole::ElectrodeMaterial, true));
    }
}

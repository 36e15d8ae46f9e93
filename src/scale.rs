//! Reference scales: potentials vs SHE restated against a practical reference electrode
//! (from `data/reference_electrodes.toml`) or the reversible hydrogen electrode at a pH.

use crate::constants::{STANDARD_TEMPERATURE_KELVIN, nernst_slope_volts_per_decade};
use crate::reaction::Reaction;
use std::sync::LazyLock;
use toml::de::DeTable;

/// The reference-electrode data exactly as shipped.
pub const REFERENCE_ELECTRODES_TOML: &str = include_str!("../data/reference_electrodes.toml");

/// A reference electrode and its potential on the SHE scale at 298.15 K.
#[derive(Clone, Debug, PartialEq)]
pub struct ReferenceElectrode {
    /// Short id (`sce`, `ag-agcl-3m-kcl`).
    pub id: String,
    /// What it is.
    pub name: String,
    /// Its filling solution.
    pub electrolyte: String,
    /// E vs SHE in volts at 298.15 K.
    pub e_vs_she_volts: f64,
    /// dE/dT in mV/K where published.
    pub dedt_millivolts_per_kelvin: Option<f64>,
    /// The publication.
    pub source: String,
}

/// The scale potentials are printed on.
#[derive(Clone, Debug, PartialEq)]
pub enum Scale {
    /// Standard hydrogen electrode (the tables' own scale).
    She,
    /// Reversible hydrogen electrode in a solution of this pH.
    Rhe {
        /// pH of the solution.
        ph: f64,
    },
    /// A reference electrode.
    Electrode(ReferenceElectrode),
}

/// Why a scale name cannot be used.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum ScaleError {
    /// No electrode has that name.
    #[error("no reference scale '{name}'; known: she, rhe, {}", .known.join(", "))]
    Unknown {
        /// What was asked.
        name: String,
        /// Ids that exist.
        known: Vec<String>,
    },
    /// Several electrodes fit the name.
    #[error("'{name}' fits several reference electrodes: {}; name one", .candidates.join(", "))]
    Ambiguous {
        /// What was asked.
        name: String,
        /// The fitting ids.
        candidates: Vec<String>,
    },
    /// RHE needs the pH.
    #[error("the rhe scale needs --ph")]
    NeedsPh,
}

static ELECTRODES: LazyLock<Vec<ReferenceElectrode>> = LazyLock::new(|| {
    read_electrodes(REFERENCE_ELECTRODES_TOML)
        .unwrap_or_else(|e| panic!("the built-in reference electrodes are broken: {e}"))
});

fn read_electrodes(text: &str) -> Result<Vec<ReferenceElectrode>, String> {
    let document = DeTable::parse(text).map_err(|e| e.message().to_owned())?;
    let Some(array) = document
        .get_ref()
        .get("electrode")
        .and_then(|v| v.get_ref().as_array())
    else {
        return Err("no [[electrode]] tables".to_owned());
    };
    let mut electrodes = Vec::new();
    for item in array.iter() {
        let table = item
            .get_ref()
            .as_table()
            .ok_or("an electrode is not a table")?;
        let string = |key: &str| -> Result<String, String> {
            table
                .get(key)
                .and_then(|v| v.get_ref().as_str())
                .map(str::to_owned)
                .ok_or_else(|| format!("an electrode has no string '{key}'"))
        };
        let number = |key: &str| -> Option<f64> {
            let value = table.get(key)?;
            let raw = &text[value.span()];
            raw.replace('_', "").parse().ok()
        };
        electrodes.push(ReferenceElectrode {
            id: string("id")?,
            name: string("name")?,
            electrolyte: string("electrolyte")?,
            e_vs_she_volts: number("e_vs_she").ok_or("an electrode has no e_vs_she")?,
            dedt_millivolts_per_kelvin: number("dedt"),
            source: string("source")?,
        });
    }
    Ok(electrodes)
}

/// Every built-in reference electrode.
pub fn reference_electrodes() -> &'static [ReferenceElectrode] {
    &ELECTRODES
}

impl Scale {
    /// Reads a scale name: `she`, `rhe` (needs `ph`), an electrode id, or the start of exactly
    /// one id (`ag-agcl-sat` for `ag-agcl-sat-kcl`). Several fits are an error, never a guess.
    pub fn from_name(name: &str, ph: Option<f64>) -> Result<Scale, ScaleError> {
        let key = name.trim().to_lowercase();
        match key.as_str() {
            "she" => return Ok(Scale::She),
            "rhe" => return ph.map(|ph| Scale::Rhe { ph }).ok_or(ScaleError::NeedsPh),
            _ => {}
        }
        let electrodes = reference_electrodes();
        if let Some(e) = electrodes.iter().find(|e| e.id == key) {
            return Ok(Scale::Electrode(e.clone()));
        }
        let fits: Vec<&ReferenceElectrode> = electrodes
            .iter()
            .filter(|e| e.id.starts_with(&key))
            .collect();
        match fits.as_slice() {
            [one] => Ok(Scale::Electrode((*one).clone())),
            [] => Err(ScaleError::Unknown {
                name: name.to_owned(),
                known: electrodes.iter().map(|e| e.id.clone()).collect(),
            }),
            many => Err(ScaleError::Ambiguous {
                name: name.to_owned(),
                candidates: many.iter().map(|e| e.id.clone()).collect(),
            }),
        }
    }

    /// The scale's name for output: `SHE`, `RHE (pH 7)`, or the electrode id.
    pub fn label(&self) -> String {
        match self {
            Scale::She => "SHE".to_owned(),
            Scale::Rhe { ph } => format!("RHE (pH {ph})"),
            Scale::Electrode(e) => e.id.clone(),
        }
    }

    /// A measured potential vs SHE restated on this scale at 298.15 K: the reference's own
    /// potential subtracted (for RHE, −(RT/F)·ln 10·pH, so E(RHE) = E(SHE) + (RT/F)·ln 10·pH).
    pub fn from_she(&self, e_vs_she_volts: f64) -> f64 {
        self.from_she_at(e_vs_she_volts, STANDARD_TEMPERATURE_KELVIN)
    }

    /// [`Scale::from_she`] at a temperature: the RHE shift uses RT/F at `temperature_kelvin`,
    /// and a reference electrode with a published dE/dT moves by it (first order from 298.15 K).
    pub fn from_she_at(&self, e_vs_she_volts: f64, temperature_kelvin: f64) -> f64 {
        match self {
            Scale::She => e_vs_she_volts,
            Scale::Rhe { ph } => {
                e_vs_she_volts + nernst_slope_volts_per_decade(temperature_kelvin) * ph
            }
            Scale::Electrode(e) => {
                let drift = e.dedt_millivolts_per_kelvin.map_or(0.0, |d| {
                    d / 1000.0 * (temperature_kelvin - STANDARD_TEMPERATURE_KELVIN)
                });
                e_vs_she_volts - (e.e_vs_she_volts + drift)
            }
        }
    }

    /// The potential of a couple (a reduction half-reaction with standard potential
    /// `e0_vs_she_volts`) as it is read on this scale at 298.15 K.
    ///
    /// On SHE and a reference electrode this is E° shifted by the reference. On RHE the
    /// hydrogen electrode sits in the solution of the scale's pH, so the couple is taken in that
    /// solution too: H+ and OH- at that pH (a(OH-) from the project's one Kw), every other species
    /// at unit activity. A couple that takes up as many H+ as electrons (O2/H2O) therefore reads
    /// E° at every pH: 1.229 V vs RHE.
    pub fn couple_potential(&self, reaction: &Reaction, e0_vs_she_volts: f64) -> f64 {
        self.from_she(e0_vs_she_volts + self.ph_term(reaction))
    }

    /// The inverse of [`Scale::couple_potential`]: a couple's E° vs SHE from its potential
    /// typed on this scale.
    pub fn couple_e0_vs_she(&self, reaction: &Reaction, e_on_scale_volts: f64) -> f64 {
        e_on_scale_volts - self.from_she(0.0) - self.ph_term(reaction)
    }

    /// The change of a couple's potential from a(H+) = 1 to the scale's pH:
    /// −(RT/nF)·ln(a(H+)^ν(H+)·a(OH-)^ν(OH-)); zero except on RHE.
    fn ph_term(&self, reaction: &Reaction) -> f64 {
        let Scale::Rhe { ph } = self else {
            return 0.0;
        };
        let mut nu_h = 0.0;
        let mut nu_oh = 0.0;
        for entry in reaction.entries() {
            let nu = num_traits::ToPrimitive::to_f64(&entry.nu).unwrap_or(0.0);
            match entry.species.without_state().ascii().as_str() {
                "H+" => nu_h += nu,
                "OH-" => nu_oh += nu,
                _ => {}
            }
        }
        let electrons = -num_traits::ToPrimitive::to_f64(&reaction.electron_nu()).unwrap_or(0.0);
        if electrons == 0.0 {
            return 0.0;
        }
        let t = STANDARD_TEMPERATURE_KELVIN;
        let log10_a_h = -ph;
        let log10_a_oh = crate::kw::log10_kw(t) + ph;
        -nernst_slope_volts_per_decade(t) / electrons * (nu_h * log10_a_h + nu_oh * log10_a_oh)
    }

    /// A couple's dE°/dT (mV/K, vs SHE) on this scale: the reference electrode's own published
    /// coefficient subtracted. `None` where the scale has none to subtract (RHE, whose
    /// coefficient depends on the solution, and electrodes the data file gives none for):
    /// then the value vs SHE is all there is, and output must say so.
    pub fn dedt_millivolts_per_kelvin(&self, dedt_vs_she: f64) -> Option<f64> {
        match self {
            Scale::She => Some(dedt_vs_she),
            Scale::Rhe { .. } => None,
            Scale::Electrode(e) => e.dedt_millivolts_per_kelvin.map(|d| dedt_vs_she - d),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn scales_shift_by_the_reference_potential() {
        // SCE 0.2412 V vs SHE (Bard & Faulkner 2000, as in data/reference_electrodes.toml).
        let sce = Scale::from_name("sce", None).unwrap();
        assert!((sce.from_she(0.0) + 0.2412).abs() < 1e-12);
        // RHE: + (RT/F) ln10 · pH (DOMAIN.md).
        let rhe = Scale::from_name("rhe", Some(14.0)).unwrap();
        assert!((rhe.from_she(-0.828) - (-0.828 + 14.0 * 0.0591593)).abs() < 1e-6);
        assert!(matches!(
            Scale::from_name("hg-hgo", None),
            Err(ScaleError::Ambiguous { .. })
        ));
        assert!(Scale::from_name("ag-agcl-sat", None).is_ok());
        assert_eq!(reference_electrodes().len(), 22);
    }

    #[test]
    fn rhe_reads_a_couple_at_the_scale_ph_and_typed_values_come_back() {
        use crate::notation::parse_equation;
        // O2 + 4 H+ + 4 e- -> 2 H2O, E° 1.229 V (Harris App. H): one H+ per electron, so E vs RHE
        // is E° at every pH (DOMAIN: E(RHE) = E(SHE) + (RT/F) ln10 · pH).
        let oxygen = Reaction::from_equation(&parse_equation("O2 + 4 H+ + 4 e- -> 2 H2O").unwrap());
        for ph in [0.0, 7.0, 14.0] {
            let rhe = Scale::Rhe { ph };
            assert!((rhe.couple_potential(&oxygen, 1.229) - 1.229).abs() < 1e-12);
            assert!((rhe.couple_e0_vs_she(&oxygen, 1.229) - 1.229).abs() < 1e-12);
        }
        let sce = Scale::from_name("sce", None).unwrap();
        let back = sce.couple_e0_vs_she(&oxygen, sce.couple_potential(&oxygen, 1.229));
        assert!((back - 1.229).abs() < 1e-12);
    }
}

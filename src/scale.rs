//! Reference scales: potentials vs SHE restated against a practical reference electrode
//! (from `data/reference_electrodes.toml`) or the reversible hydrogen electrode at a pH.

use crate::constants::nernst_slope_volts_per_decade;
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

    /// A potential vs SHE restated on this scale at 298.15 K.
    pub fn from_she(&self, e_vs_she_volts: f64) -> f64 {
        match self {
            Scale::She => e_vs_she_volts,
            Scale::Rhe { ph } => e_vs_she_volts + nernst_slope_volts_per_decade(298.15) * ph,
            Scale::Electrode(e) => e_vs_she_volts - e.e_vs_she_volts,
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
}

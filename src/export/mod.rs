//! Writes Q and E(activities, T) of a compiled cell model as text, LaTeX, JSON, Python, C or
//! Rust for simulations: argument names derived from species names, constants computed from the
//! exact SI values, a comment header naming the reaction, E°, n and the data source.
//!
//! Exporters never re-parse text: they work from the [`Quotient`] and the [`CellModel`].
//! [`balance_json`] writes the JSON lines of balance results, a batch on every core ([`batch`]).

pub mod balance_json;
pub mod batch;
mod code;
pub mod molality;

use crate::activity::ActivityError;
use crate::nernst::CellModel;
use crate::notation::{Formula, Species, SpeciesKind, Style, species_to_string};
use crate::quotient::Quotient;
use serde_json::json;
use std::fmt;
use std::sync::Arc;
use thiserror::Error;

pub use molality::{Input, InputKind, MolalityForm};

/// Why an export could not be written.
#[derive(Debug, Error, Clone, PartialEq)]
#[non_exhaustive]
pub enum ExportError {
    /// E(molalities, T) was asked for under the `table` model.
    #[error(
        "the table model interpolates published data and has no closed form; only E(activities, T) can be exported"
    )]
    NoClosedForm,
    /// From the activity model (an ion with no known size in the extended model).
    #[error(transparent)]
    Activity(#[from] ActivityError),
}

/// The output formats.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Emit {
    /// Plain text.
    Text,
    /// LaTeX (mhchem for species).
    Latex,
    /// The structure as JSON.
    Json,
    /// Python 3, standard library only.
    Python,
    /// C99 with `<math.h>`.
    C,
    /// Rust.
    Rust,
}

impl Emit {
    /// Reads a format name.
    pub fn from_name(name: &str) -> Option<Emit> {
        Some(match name {
            "text" => Emit::Text,
            "latex" => Emit::Latex,
            "json" => Emit::Json,
            "python" => Emit::Python,
            "c" => Emit::C,
            "rust" => Emit::Rust,
            _ => return None,
        })
    }
}

/// Everything an exporter writes about, in one value.
#[derive(Clone, Debug)]
pub struct Export<'a> {
    /// The reaction as text (canonical ASCII).
    pub reaction: String,
    /// The quotient (which species enter, with phases).
    pub quotient: &'a Quotient,
    /// The compiled model (E°, n, dE°/dT, exponents).
    pub model: &'a CellModel,
    /// Where E° came from.
    pub source: String,
    /// E(molalities, T) under a γ model with a closed form, written after E(activities, T) by
    /// the code exporters and described in the other formats; `None` for activities only.
    pub molality: Option<MolalityForm>,
    /// The reaction's caution line ([`crate::cell::caution`]), which every format carries as a
    /// comment (JSON: `"caution"`), or `None` when the reaction involves no named hazard.
    pub caution: Option<String>,
}

/// The argument name of a species: `a_` then the formula with brackets and dots turned into
/// `_`, then the charge as `_plus`, `_minus`, `_2plus`, `_3minus`: `MnO4-` → `a_MnO4_minus`,
/// `Fe3+` → `a_Fe_3plus`, `Zn(OH)4^2-` → `a_Zn_OH_4_2minus`, `H2O` → `a_H2O`. Only ASCII
/// letters, digits and `_` appear, so the name is a valid identifier in Python, C and Rust and
/// never a keyword (it starts with `a_`).
pub fn argument_name(species: &Species) -> String {
    let body = match &species.kind {
        SpeciesKind::Formula(formula) => {
            let neutral = Species {
                kind: SpeciesKind::Formula(Arc::new(Formula {
                    components: formula.components.clone(),
                    charge: 0,
                })),
                state: None,
                ..species.clone()
            };
            species_to_string(&neutral, Style::Ascii)
        }
        SpeciesKind::Electron => "e".to_owned(),
    };
    let mut name = String::from("a_");
    for c in body.chars() {
        if c.is_ascii_alphanumeric() {
            name.push(c);
        } else if !name.ends_with('_') {
            name.push('_');
        }
    }
    let z = species.charge();
    if z != 0 {
        if !name.ends_with('_') {
            name.push('_');
        }
        if z.abs() > 1 {
            name.push_str(&z.abs().to_string());
        }
        name.push_str(if z > 0 { "plus" } else { "minus" });
    }
    while name.ends_with('_') {
        name.pop();
    }
    name
}

/// Argument names of the species entering Q, in model order, made unique by the state label
/// (`a_O2_g`, `a_O2_aq`) where two would coincide.
pub fn argument_names(quotient: &Quotient) -> Vec<String> {
    let species: Vec<&Species> = quotient.entering().map(|f| &f.species).collect();
    let plain: Vec<String> = species.iter().map(|s| argument_name(s)).collect();
    plain
        .iter()
        .enumerate()
        .map(|(i, name)| {
            if plain.iter().filter(|n| *n == name).count() > 1 {
                let label = species[i].state.map_or("nostate", |s| s.label());
                format!("{name}_{label}")
            } else {
                name.clone()
            }
        })
        .collect()
}

impl fmt::Display for Export<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.render(Emit::Text))
    }
}

impl Export<'_> {
    /// The export in `format`.
    pub fn render(&self, format: Emit) -> String {
        match format {
            Emit::Text => self.text(),
            Emit::Latex => self.latex(),
            Emit::Json => {
                serde_json::to_string_pretty(&self.json()).expect("JSON values always serialise")
            }
            Emit::Python => code::python(self),
            Emit::C => code::c(self),
            Emit::Rust => code::rust(self),
        }
    }

    fn text(&self) -> String {
        let m = self.model;
        let mut out = format!(
            "reaction: {}\nE° = {} V at 298.15 K, n = {}, dE°/dT = {} V/K\nsource: {}\n{}\nE = E° + (dE°/dT)·(T − 298.15 K) − (R·T/(n·F))·ln Q\n",
            self.reaction,
            m.e0_volts(),
            m.electrons(),
            m.de0_dt_volts_per_kelvin(),
            self.source,
            self.quotient.expression()
        );
        out.push_str("F = e·N_A, R = k·N_A (exact SI 2019)\n");
        for (name, f) in argument_names(self.quotient)
            .iter()
            .zip(self.quotient.entering())
        {
            out.push_str(&format!("{name} = a({})\n", self.quotient.label(f)));
        }
        for line in self.molality.iter().flat_map(|f| f.describe()) {
            out.push_str(&line);
            out.push('\n');
        }
        if let Some(caution) = &self.caution {
            out.push_str(caution);
            out.push('\n');
        }
        out
    }

    fn latex(&self) -> String {
        let m = self.model;
        let term = |f: &crate::quotient::Factor| {
            let power = crate::quotient::ratio_text(&num_traits::Signed::abs(&f.nu));
            // The same species name as `a(…)` elsewhere: no state label unless needed.
            let shown = if self.quotient.label(f) == f.species.ascii() {
                f.species.mhchem()
            } else {
                f.species.without_state().mhchem()
            };
            let base = format!("a_{{\\ce{{{shown}}}}}");
            if power == "1" {
                base
            } else {
                format!("{base}^{{{power}}}")
            }
        };
        let top: Vec<String> = self
            .quotient
            .entering()
            .filter(|f| f.exponent() > 0.0)
            .map(term)
            .collect();
        let bottom: Vec<String> = self
            .quotient
            .entering()
            .filter(|f| f.exponent() < 0.0)
            .map(term)
            .collect();
        let top = if top.is_empty() {
            "1".to_owned()
        } else {
            top.join("\\,")
        };
        let q = if bottom.is_empty() {
            top
        } else {
            format!("\\frac{{{top}}}{{{}}}", bottom.join("\\,"))
        };
        // E = E° + (dE°/dT)(T − T°): the sign written is the sign of dE°/dT.
        let slope = m.de0_dt_volts_per_kelvin();
        let sign = if slope < 0.0 { '-' } else { '+' };
        let mut out = format!(
            "% reaction: {}\n% source: {}\n\\begin{{align}}\nQ &= {q} \\\\\nE &= {} {sign} {}\\,(T - 298.15) - \\frac{{RT}}{{{}F}}\\ln Q\n\\end{{align}}\n",
            self.reaction,
            self.source,
            m.e0_volts(),
            slope.abs(),
            m.electrons()
        );
        for line in self
            .molality
            .iter()
            .flat_map(|f| f.describe())
            .chain(self.caution.clone())
        {
            out.push_str(&format!("% {line}\n"));
        }
        out
    }

    /// The structure: reaction, E°, n, dE°/dT, and per species its exponent, activity kind and
    /// argument name.
    pub fn json(&self) -> serde_json::Value {
        let names = argument_names(self.quotient);
        let species: Vec<serde_json::Value> = self
            .quotient
            .entering()
            .zip(&names)
            .map(|(f, name)| {
                json!({
                    "species": f.species.ascii(),
                    "exponent": f.exponent(),
                    "activity": self.quotient.default_kind(f).name(),
                    "argument": name,
                })
            })
            .collect();
        json!({
            "reaction": self.reaction,
            "expression": self.quotient.expression(),
            "e0_V": self.model.e0_volts(),
            "n": self.model.electrons(),
            "dedt_V_per_K": self.model.de0_dt_volts_per_kelvin(),
            "source": self.source,
            "caution": self.caution,
            "species": species,
            "molality_function": self.molality.as_ref().map(|form| json!({
                "gamma_model": form.model.name(),
                "arguments": form.inputs.iter().map(|i| json!({
                    "species": i.species.ascii(),
                    "argument": i.name,
                    "exponent": i.exponent,
                    "kind": match i.kind {
                        InputKind::Solute { .. } => match form.basis {
                            crate::quotient::Basis::Molal => "molality",
                            crate::quotient::Basis::Molar => "molarity",
                        },
                        InputKind::Gas => "pressure",
                        InputKind::Water => "activity",
                        InputKind::Spectator { .. } => "ionic_strength_only",
                    },
                })).collect::<Vec<_>>(),
                "counter_ion_inferred": form.counter_ion_inferred,
                "description": form.describe(),
            })),
            "constants": {
                "elementary_charge_C": crate::constants::ELEMENTARY_CHARGE_COULOMBS,
                "avogadro_per_mol": crate::constants::AVOGADRO_PER_MOL,
                "boltzmann_J_per_K": crate::constants::BOLTZMANN_JOULES_PER_KELVIN,
                "standard_temperature_K": crate::constants::STANDARD_TEMPERATURE_KELVIN,
            },
        })
    }
}

//! E(molalities, T) for the γ models with a closed form (`ideal`, `debye-huckel`, `extended`,
//! `davies`): which inputs the generated function takes, and its Python, C and Rust source,
//! written from the same coefficients and in the same steps as [`crate::activity`] computes
//! ionic strength, A(T), B(T) and γ.

use super::{Export, ExportError, argument_name};
use crate::activity::water::{
    KELL_DENSITY_DENOMINATOR, KELL_DENSITY_NUMERATOR, PERMITTIVITY_COEFFICIENTS,
    VACUUM_PERMITTIVITY_FARADS_PER_METRE, WATER_FIT_MAX_KELVIN, WATER_FIT_MIN_KELVIN,
};
use crate::activity::{
    ActivityError, ActivityModel, GammaModel, Solution, ion_size_angstrom, same_substance,
};
use crate::notation::Species;
use crate::quotient::{Basis, Phase, Quotient};

/// What one argument of the generated E(molalities, T) stands for.
#[derive(Clone, Debug, PartialEq)]
pub enum InputKind {
    /// A dissolved species of Q: molality (or molarity), γ from the model.
    Solute {
        /// Charge number z.
        charge: i64,
        /// Kielland ion size in Å (extended model only).
        ion_size_angstrom: Option<f64>,
    },
    /// A gas of Q: pressure in bar.
    Gas,
    /// Solvent water of the reaction: its activity, given (1 by default in Python).
    Water,
    /// An ion of the solution that is not in Q: counts for the ionic strength only.
    Spectator {
        /// Charge number z.
        charge: i64,
    },
}

/// One argument of the generated function.
#[derive(Clone, Debug, PartialEq)]
pub struct Input {
    /// The species (state label dropped for spectators).
    pub species: Species,
    /// Argument name: `m_`/`c_` for amounts, `p_` for pressures, `a_H2O` for water.
    pub name: String,
    /// Its exponent in Q (0 for spectators).
    pub exponent: f64,
    /// What it is.
    pub kind: InputKind,
}

/// The E(molalities, T) function of a quotient under one γ model with a closed form.
#[derive(Clone, Debug, PartialEq)]
pub struct MolalityForm {
    /// The γ model (never `table`).
    pub model: GammaModel,
    /// Whether the documented ranges are checked (false when the user forced the model).
    pub force: bool,
    /// Molal (`m_` arguments, mol/kg) or molar (`c_`, mol/L).
    pub basis: Basis,
    /// The arguments before the temperature: species of Q in reaction order (water last), then
    /// the other ions of the solution.
    pub inputs: Vec<Input>,
    /// The composition given to couplet did not balance in charge, so it assumed a counter-ion.
    pub counter_ion_inferred: bool,
}

impl MolalityForm {
    /// The function for `quotient` under `model`; `solution` (the composition given, if any)
    /// supplies the ions that count for the ionic strength without entering Q. Fails for the
    /// `table` model (no closed form) and, in the extended model, for an ion of Q with no known
    /// size.
    pub fn new(
        quotient: &Quotient,
        model: ActivityModel,
        solution: Option<&Solution>,
    ) -> Result<MolalityForm, ExportError> {
        if model.model == GammaModel::Table {
            return Err(ExportError::NoClosedForm);
        }
        let prefix = match quotient.basis() {
            Basis::Molal => "m_",
            Basis::Molar => "c_",
        };
        let renamed = |species: &Species, to: &str| {
            let name = argument_name(species);
            format!("{to}{}", name.strip_prefix("a_").unwrap_or(&name))
        };
        let mut inputs = Vec::new();
        let mut water = None;
        for f in quotient.factors() {
            let exponent = f.exponent();
            let species = f.species.clone();
            match f.phase {
                Phase::Solid | Phase::PureLiquid => {}
                Phase::Solvent => {
                    water = Some(Input {
                        name: argument_name(&species),
                        species,
                        exponent,
                        kind: InputKind::Water,
                    })
                }
                Phase::Gas => inputs.push(Input {
                    name: renamed(&species, "p_"),
                    species,
                    exponent,
                    kind: InputKind::Gas,
                }),
                Phase::Solute => {
                    let charge = species.charge();
                    let ion_size_angstrom = if model.model == GammaModel::Extended && charge != 0 {
                        Some(ion_size_angstrom(&species).ok_or_else(|| {
                            ActivityError::UnknownIonSize {
                                species: species.ascii(),
                            }
                        })?)
                    } else {
                        None
                    };
                    inputs.push(Input {
                        name: renamed(&species, prefix),
                        species,
                        exponent,
                        kind: InputKind::Solute {
                            charge,
                            ion_size_angstrom,
                        },
                    });
                }
            }
        }
        // Two species of one formula in different phases would share a name: keep the label.
        let names: Vec<String> = inputs.iter().map(|i| i.name.clone()).collect();
        for input in &mut inputs {
            if names.iter().filter(|n| **n == input.name).count() > 1 {
                let label = input.species.state.map_or("nostate", |s| s.label());
                input.name = format!("{}_{label}", input.name);
            }
        }
        // Only the γ models that use the ionic strength need the other ions.
        if let Some(solution) = solution.filter(|_| model.model != GammaModel::Ideal) {
            for (species, _) in &solution.solutes {
                let in_q = quotient
                    .factors()
                    .iter()
                    .any(|f| f.phase == Phase::Solute && same_substance(&f.species, species));
                if species.charge() != 0 && !in_q {
                    inputs.push(Input {
                        name: renamed(species, prefix),
                        species: species.without_state(),
                        exponent: 0.0,
                        kind: InputKind::Spectator {
                            charge: species.charge(),
                        },
                    });
                }
            }
        }
        inputs.extend(water);
        let counter_ion_inferred = solution.is_some_and(|s| {
            s.assumptions
                .iter()
                .any(|a| a.starts_with("charge balance"))
        });
        Ok(MolalityForm {
            model: model.model,
            force: model.force,
            basis: quotient.basis(),
            inputs,
            counter_ion_inferred,
        })
    }

    /// The charged inputs, which count for the ionic strength, with their charge numbers.
    fn ions(&self) -> impl Iterator<Item = (&Input, i64)> {
        self.inputs.iter().filter_map(|i| match i.kind {
            InputKind::Solute { charge, .. } | InputKind::Spectator { charge } if charge != 0 => {
                Some((i, charge))
            }
            _ => None,
        })
    }

    fn unit(&self) -> &'static str {
        match self.basis {
            Basis::Molal => "mol/kg",
            Basis::Molar => "mol/L",
        }
    }

    /// Header lines describing the function (no comment markers).
    pub fn describe(&self) -> Vec<String> {
        let mut lines = vec![format!(
            "E(molalities, T) with the {} activity-coefficient model: arguments are {} ({}){}{}.",
            self.model,
            match self.basis {
                Basis::Molal => "molalities",
                Basis::Molar => "molarities",
            },
            self.unit(),
            if self.inputs.iter().any(|i| i.kind == InputKind::Gas) {
                ", gas pressures (bar)"
            } else {
                ""
            },
            if self.inputs.iter().any(|i| i.kind == InputKind::Water) {
                ", the activity of water (1 unless known)"
            } else {
                ""
            }
        )];
        if self.model == GammaModel::Ideal {
            lines.push("gamma = 1 for every species; no ionic strength is needed.".to_owned());
            return lines;
        }
        let ions: Vec<String> = self.ions().map(|(i, _)| i.species.ascii()).collect();
        lines.push(format!(
            "Ionic strength I = 1/2 sum m z^2 over {}, plus an unnamed monovalent counter-ion of any charge they leave unbalanced (I += |sum m z|/2), as couplet computes it.",
            if ions.is_empty() {
                "no ions".to_owned()
            } else {
                ions.join(", ")
            }
        ));
        if self.counter_ion_inferred {
            lines.push(
                "The composition given to couplet did not balance in charge: such a counter-ion was inferred there."
                    .to_owned(),
            );
        }
        lines.push(match self.model {
            GammaModel::DebyeHuckel => "log10 gamma = -A z^2 sqrt(I) (Debye-Hueckel limiting law); neutral solutes gamma = 1.".to_owned(),
            GammaModel::Extended => {
                let sizes: Vec<String> = self
                    .inputs
                    .iter()
                    .filter_map(|i| match i.kind {
                        InputKind::Solute { ion_size_angstrom: Some(a), .. } => Some(format!("{} {a}", i.species.without_state().ascii())),
                        _ => None,
                    })
                    .collect();
                format!("log10 gamma = -A z^2 sqrt(I)/(1 + B a sqrt(I)), ion sizes a in Angstrom (Kielland 1937): {}; neutral solutes gamma = 1.", if sizes.is_empty() { "none".to_owned() } else { sizes.join(", ") })
            }
            _ => "log10 gamma = -A z^2 (sqrt(I)/(1 + sqrt(I)) - 0.3 I) (Davies); neutral solutes gamma = 1.".to_owned(),
        });
        lines.push(format!(
            "A(T){} from Debye-Hueckel theory: exact SI e, N_A, k; eps0 (CODATA 2018); permittivity of water, Malmberg & Maryott 1956; density, Kell 1975.",
            if self.model == GammaModel::Extended { " and B(T)" } else { "" }
        ));
        let limit = self.model.ionic_strength_limit().unwrap_or(f64::INFINITY);
        lines.push(if self.force {
            format!("Range checks are off (forced): the model is documented for I <= {limit} {} and {WATER_FIT_MIN_KELVIN}..{WATER_FIT_MAX_KELVIN} K.", self.unit())
        } else {
            format!("Documented for I <= {limit} {} and {WATER_FIT_MIN_KELVIN}..{WATER_FIT_MAX_KELVIN} K: outside, Python raises ValueError, C and Rust return NaN.", self.unit())
        });
        lines
    }
}

/// How one language writes the pieces the generated function needs.
struct Syntax {
    /// Function names: natural log, square root, power, absolute value.
    log: &'static str,
    sqrt: &'static str,
    pow: &'static str,
    abs: &'static str,
    /// `fn name(params) -> f64 {` and its closing, for a function of plain f64 parameters.
    open: fn(&str, &[String]) -> String,
    close: &'static str,
    /// A local binding.
    bind: fn(&str, &str) -> String,
    /// The value returned.
    ret: fn(&str) -> String,
    /// The value returned when a documented range is left.
    out_of_range: fn(&str) -> String,
    /// Name prefix of generated functions.
    prefix: &'static str,
    /// Name of the temperature parameter.
    temperature: &'static str,
    /// Python: keyword defaults, a docstring and argument checks.
    is_python: bool,
}

fn float(value: f64) -> String {
    super::code::float(value)
}

const PYTHON: Syntax = Syntax {
    log: "math.log",
    sqrt: "math.sqrt",
    pow: "math.pow",
    abs: "abs",
    open: |name, params| format!("def {name}({}):\n", params.join(", ")),
    close: "\n\n",
    bind: |name, expr| format!("    {name} = {expr}\n"),
    ret: |expr| format!("    return {expr}\n"),
    out_of_range: |what| format!("raise ValueError(\"{what}\")"),
    prefix: "",
    temperature: "temperature_K",
    is_python: true,
};

const C: Syntax = Syntax {
    log: "log",
    sqrt: "sqrt",
    pow: "pow",
    abs: "fabs",
    open: |name, params| {
        let list: Vec<String> = params.iter().map(|p| format!("double {p}")).collect();
        format!("double {name}({})\n{{\n", list.join(", "))
    },
    close: "}\n\n",
    bind: |name, expr| format!("    double {name} = {expr};\n"),
    ret: |expr| format!("    return {expr};\n"),
    out_of_range: |_| "return NAN;".to_owned(),
    prefix: "couplet_",
    temperature: "temperature_K",
    is_python: false,
};

const RUST: Syntax = Syntax {
    log: "f64::ln",
    sqrt: "f64::sqrt",
    pow: "f64::powf",
    abs: "f64::abs",
    open: |name, params| {
        let list: Vec<String> = params.iter().map(|p| format!("{p}: f64")).collect();
        format!(
            "#[allow(non_snake_case, clippy::too_many_arguments)]\npub fn {name}({}) -> f64 {{\n",
            list.join(", ")
        )
    },
    close: "}\n\n",
    bind: |name, expr| format!("    let {name} = {expr};\n"),
    ret: |expr| format!("    {expr}\n"),
    out_of_range: |_| "return f64::NAN;".to_owned(),
    prefix: "",
    temperature: "temperature_k",
    is_python: false,
};

/// `c0 + c1*t + c2*t*t + …`, powers by repeated multiplication.
fn polynomial(coefficients: &[f64], t: &str) -> String {
    coefficients
        .iter()
        .enumerate()
        .map(|(k, c)| {
            let mut term = format!("({})", float(*c));
            for _ in 0..k {
                term.push_str(&format!(" * {t}"));
            }
            term
        })
        .collect::<Vec<_>>()
        .join(" + ")
}

/// The water-property, A(T), B(T) and ionic-strength helpers, then E(molalities, T).
fn source(export: &Export, form: &MolalityForm, s: &Syntax) -> String {
    let p = s.prefix;
    let temperature = s.temperature;
    let t_param = [temperature.to_owned()];
    let mut out = String::new();
    let needs_ionic_strength = form.model != GammaModel::Ideal;
    if needs_ionic_strength {
        out.push_str(&(s.open)(&format!("{p}water_density_kg_per_m3"), &t_param));
        out.push_str(&(s.bind)("t", &format!("{temperature} - 273.15")));
        out.push_str(&(s.ret)(&format!(
            "({}) / (1.0 + ({}) * t)",
            polynomial(&KELL_DENSITY_NUMERATOR, "t"),
            float(KELL_DENSITY_DENOMINATOR)
        )));
        out.push_str(s.close);
        out.push_str(&(s.open)(
            &format!("{p}water_relative_permittivity"),
            &t_param,
        ));
        out.push_str(&(s.bind)("t", &format!("{temperature} - 273.15")));
        out.push_str(&(s.ret)(&polynomial(&PERMITTIVITY_COEFFICIENTS, "t")));
        out.push_str(s.close);
        // κ/√I in m⁻¹ (kg/mol)^½, as `activity::water::screening_per_metre`.
        out.push_str(&(s.open)(
            &format!("{p}debye_screening_per_metre"),
            &t_param,
        ));
        out.push_str(&(s.bind)(
            "permittivity",
            &format!(
                "{} * {p}water_relative_permittivity({temperature})",
                float(VACUUM_PERMITTIVITY_FARADS_PER_METRE)
            ),
        ));
        out.push_str(&(s.ret)(&format!(
            "{}(2.0 * {na} * {e} * {e} * {p}water_density_kg_per_m3({temperature}) / (permittivity * {k} * {temperature}))",
            s.sqrt,
            na = float(crate::constants::AVOGADRO_PER_MOL),
            e = float(crate::constants::ELEMENTARY_CHARGE_COULOMBS),
            k = float(crate::constants::BOLTZMANN_JOULES_PER_KELVIN),
        )));
        out.push_str(s.close);
        out.push_str(&(s.open)(&format!("{p}debye_huckel_a"), &t_param));
        out.push_str(&(s.bind)(
            "permittivity",
            &format!(
                "{} * {p}water_relative_permittivity({temperature})",
                float(VACUUM_PERMITTIVITY_FARADS_PER_METRE)
            ),
        ));
        out.push_str(&(s.bind)(
            "bjerrum_half",
            &format!(
                "{e} * {e} / (8.0 * {pi} * permittivity * {k} * {temperature})",
                e = float(crate::constants::ELEMENTARY_CHARGE_COULOMBS),
                pi = float(std::f64::consts::PI),
                k = float(crate::constants::BOLTZMANN_JOULES_PER_KELVIN),
            ),
        ));
        out.push_str(&(s.ret)(&format!(
            "bjerrum_half * {p}debye_screening_per_metre({temperature}) / {}",
            float(std::f64::consts::LN_10)
        )));
        out.push_str(s.close);
        if form.model == GammaModel::Extended {
            out.push_str(&(s.open)(
                &format!("{p}debye_huckel_b_per_angstrom"),
                &t_param,
            ));
            out.push_str(&(s.ret)(&format!(
                "{p}debye_screening_per_metre({temperature}) * 1e-10"
            )));
            out.push_str(s.close);
        }
        let ion_names: Vec<String> = form.ions().map(|(i, _)| i.name.clone()).collect();
        out.push_str(&(s.open)(&format!("{p}ionic_strength"), &ion_names));
        let squares: Vec<String> = form
            .ions()
            .map(|(i, z)| format!("{} * {}", float((z * z) as f64), i.name))
            .collect();
        let net: Vec<String> = form
            .ions()
            .map(|(i, z)| format!("({}) * {}", float(z as f64), i.name))
            .collect();
        let sum = |terms: Vec<String>| {
            if terms.is_empty() {
                "0.0".to_owned()
            } else {
                terms.join(" + ")
            }
        };
        out.push_str(&(s.ret)(&format!(
            "0.5 * ({}) + 0.5 * {}({})",
            sum(squares),
            s.abs,
            sum(net)
        )));
        out.push_str(s.close);
    }

    // E(molalities, T).
    let m = export.model;
    let mut params: Vec<String> = form.inputs.iter().map(|i| i.name.clone()).collect();
    let python = s.is_python;
    if python {
        if let Some(w) = params.iter_mut().find(|n| n.as_str() == "a_H2O") {
            w.push_str("=1.0");
        }
        params.push(format!("{temperature}=STANDARD_TEMPERATURE_K"));
    } else {
        params.push(temperature.to_owned());
    }
    out.push_str(&(s.open)(
        &format!("{p}potential_from_molalities_volts"),
        &params,
    ));
    if python {
        out.push_str("    \"\"\"E in volts from molalities (or molarities), gas pressures in bar, the activity of water and the temperature in kelvin.\"\"\"\n");
        let names: Vec<String> = form.inputs.iter().map(|i| i.name.clone()).collect();
        if !names.is_empty() {
            out.push_str(&format!(
                "    for value in ({}{}):\n        if not (value > 0.0 and math.isfinite(value)):\n            raise ValueError(\"molalities, pressures and activities must be finite and positive\")\n",
                names.join(", "),
                if names.len() == 1 { "," } else { "" }
            ));
        }
    }
    if needs_ionic_strength && !form.force {
        out.push_str(&format!(
            "    {}\n",
            condition(
                s,
                &format!(
                    "{temperature} < {} or {temperature} > {}",
                    float(WATER_FIT_MIN_KELVIN),
                    float(WATER_FIT_MAX_KELVIN)
                ),
                (s.out_of_range)("temperature outside the documented range of A(T)")
            )
        ));
    }
    let ion_args: Vec<String> = form.ions().map(|(i, _)| i.name.clone()).collect();
    if needs_ionic_strength {
        out.push_str(&(s.bind)(
            "strength",
            &format!("{p}ionic_strength({})", ion_args.join(", ")),
        ));
        if !form.force {
            let limit = form
                .model
                .ionic_strength_limit()
                .expect("closed-form models");
            out.push_str(&format!(
                "    {}\n",
                condition(
                    s,
                    &format!("strength > {}", float(limit)),
                    (s.out_of_range)("ionic strength beyond the documented range of the model")
                )
            ));
        }
        out.push_str(&(s.bind)("root_i", &format!("{}(strength)", s.sqrt)));
        out.push_str(&(s.bind)("a", &format!("{p}debye_huckel_a({temperature})")));
        if form.model == GammaModel::Extended {
            out.push_str(&(s.bind)(
                "b",
                &format!("{p}debye_huckel_b_per_angstrom({temperature})"),
            ));
        }
    }
    let mut terms = Vec::new();
    for input in &form.inputs {
        let activity = match &input.kind {
            InputKind::Spectator { .. } => continue,
            InputKind::Gas | InputKind::Water => input.name.clone(),
            InputKind::Solute { charge, .. } if *charge == 0 || !needs_ionic_strength => {
                input.name.clone()
            }
            InputKind::Solute {
                charge,
                ion_size_angstrom,
            } => {
                let z2 = float((charge * charge) as f64);
                let log10_gamma = match form.model {
                    GammaModel::DebyeHuckel => format!("-a * {z2} * root_i"),
                    GammaModel::Extended => format!(
                        "-a * {z2} * root_i / (1.0 + b * {} * root_i)",
                        float(ion_size_angstrom.expect("sizes are found for extended"))
                    ),
                    _ => format!("-a * {z2} * (root_i / (1.0 + root_i) - 0.3 * strength)"),
                };
                format!("{}(10.0, {log10_gamma}) * {}", s.pow, input.name)
            }
        };
        terms.push(format!(
            "({}) * {}({activity})",
            float(input.exponent),
            s.log
        ));
    }
    out.push_str(&(s.bind)(
        "ln_q",
        &if terms.is_empty() {
            "0.0".to_owned()
        } else {
            // Python needs the brackets to continue the line; the others would warn.
            let sum = terms.join("\n        + ");
            if s.is_python { format!("({sum})") } else { sum }
        },
    ));
    out.push_str(&(s.bind)(
        "r_over_nf",
        &format!(
            "{} * {} / ({} * {} * {})",
            float(crate::constants::BOLTZMANN_JOULES_PER_KELVIN),
            float(crate::constants::AVOGADRO_PER_MOL),
            float(m.electrons()),
            float(crate::constants::ELEMENTARY_CHARGE_COULOMBS),
            float(crate::constants::AVOGADRO_PER_MOL),
        ),
    ));
    out.push_str(&(s.ret)(&format!(
        "{} + {} * ({temperature} - {}) - r_over_nf * {temperature} * ln_q",
        float(m.e0_volts()),
        float(m.de0_dt_volts_per_kelvin()),
        float(crate::constants::STANDARD_TEMPERATURE_KELVIN)
    )));
    out.push_str(s.close);
    out
}

/// `if (cond) { action }` in the language (`or` written per language).
fn condition(s: &Syntax, cond: &str, action: String) -> String {
    if s.is_python {
        format!("if {cond}:\n        {action}")
    } else if s.prefix.is_empty() {
        format!(
            "if {} {{\n        {action}\n    }}",
            cond.replace(" or ", " || ")
        )
    } else {
        format!(
            "if ({}) {{\n        {action}\n    }}",
            cond.replace(" or ", " || ")
        )
    }
}

/// The Python source of E(molalities, T) (appended to the activity form).
pub fn python(export: &Export, form: &MolalityForm) -> String {
    format!("\n\n{}", source(export, form, &PYTHON).trim_end()) + "\n"
}

/// The C source of E(molalities, T).
pub fn c(export: &Export, form: &MolalityForm) -> String {
    format!("\n{}", source(export, form, &C).trim_end()) + "\n"
}

/// The Rust source of E(molalities, T).
pub fn rust(export: &Export, form: &MolalityForm) -> String {
    format!("\n{}", source(export, form, &RUST).trim_end()) + "\n"
}

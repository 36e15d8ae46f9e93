//! The Nernst options shared by `couplet cell` (composition, γ model, export) and the
//! `couplet ph-line` command: reading `SPECIES=VALUE` arguments, rendering Q and E, and the
//! JSON fields `quotient`, `e_V`, `gamma_model`, `assumptions`.

use super::EXIT_OK;
use super::common::{TableArgs, load_table, medium_arg, resolve, scale};
use super::failure::Failure;
use super::units::species_numbers;
use couplet::activity::{ActivityModel, GammaModel, Solution};
use couplet::export::{Emit, Export, ExportError, MolalityForm};
use couplet::figures::{SIGNIFICANT, significant};
use couplet::nernst::{CellModel, Conditions, Nernst, Standard, evaluate, ph_line};
use couplet::quotient::Basis;
use couplet::scale::Scale;
use couplet::table::Medium;
use serde_json::{Value, json};
use std::io::{self, Write};

/// Composition, γ model and export options.
#[derive(clap::Args, Clone, Debug, Default)]
pub struct NernstArgs {
    /// Activity of a species (dimensionless), e.g. --activity H2O=0.8; repeatable
    #[arg(long = "activity", value_name = "SPECIES=VALUE")]
    pub activities: Vec<String>,
    /// Molality in mol/kg of an ion or a neutral electrolyte (H2SO4=5); repeatable
    #[arg(
        long = "molality",
        value_name = "SPECIES=MOL_PER_KG",
        conflicts_with = "molarities"
    )]
    pub molalities: Vec<String>,
    /// Molarity in mol/L instead of molality (c° = 1 mol/L); repeatable
    #[arg(long = "molarity", value_name = "SPECIES=MOL_PER_L")]
    pub molarities: Vec<String>,
    /// Partial pressure of a gas in bar (p° = 1 bar); repeatable
    #[arg(long = "pressure", value_name = "GAS=BAR")]
    pub pressures: Vec<String>,
    /// Activity-coefficient model: ideal, debye-huckel, extended, davies, table
    #[arg(long, value_name = "MODEL", default_value = "ideal")]
    pub gamma: String,
    /// Use the γ model beyond its documented range of ionic strength or temperature
    #[arg(long)]
    pub force: bool,
    /// Write Q and E(activities, T) as text, latex, json, python, c or rust instead of the report
    #[arg(long, value_name = "FORMAT")]
    pub emit: Option<String>,
}

impl NernstArgs {
    /// The conditions these options describe.
    pub fn conditions(
        &self,
        ph: Option<f64>,
        temperature_kelvin: f64,
    ) -> Result<Conditions, String> {
        let model = GammaModel::from_name(&self.gamma).ok_or_else(|| {
            format!(
                "--gamma {}: expected ideal, debye-huckel, extended, davies or table",
                self.gamma
            )
        })?;
        let (amounts, basis) = if self.molarities.is_empty() {
            (
                species_numbers("--molality", &self.molalities)?,
                Basis::Molal,
            )
        } else {
            (
                species_numbers("--molarity", &self.molarities)?,
                Basis::Molar,
            )
        };
        let activities = species_numbers("--activity", &self.activities)?;
        let pressures = species_numbers("--pressure", &self.pressures)?;
        let amount_option = if basis == Basis::Molal {
            "--molality"
        } else {
            "--molarity"
        };
        super::units::refuse_repeats(
            activities
                .iter()
                .map(|(s, _)| ("--activity", s))
                .chain(amounts.iter().map(|(s, _)| (amount_option, s)))
                .chain(pressures.iter().map(|(s, _)| ("--pressure", s))),
        )?;
        Ok(Conditions {
            temperature_kelvin,
            activities,
            amounts,
            pressures_bar: pressures,
            ph,
            basis,
            model: ActivityModel {
                model,
                force: self.force,
            },
            unspecified_at_unity: false,
        })
    }

    /// The export format, if one was asked for.
    pub fn emit_format(&self) -> Result<Option<Emit>, String> {
        self.emit
            .as_deref()
            .map(|name| {
                Emit::from_name(name).ok_or_else(|| {
                    format!("--emit {name}: expected text, latex, json, python, c or rust")
                })
            })
            .transpose()
    }
}

/// The JSON fields the Nernst layer adds: `quotient`, `e_V`, `gamma_model`, `assumptions`.
pub fn json_fields(result: &Nernst, model: GammaModel) -> serde_json::Map<String, Value> {
    let factors: Vec<Value> = result
        .factors
        .iter()
        .map(|f| {
            let exponent = if f.exponent.fract() == 0.0 {
                json!(f.exponent as i64)
            } else {
                json!(f.exponent)
            };
            json!({
                "species": f.species,
                "exponent": exponent,
                "activity": f.kind.name(),
                "value": f.value,
            })
        })
        .collect();
    let mut map = serde_json::Map::new();
    map.insert(
        "quotient".into(),
        json!({"expression": result.quotient.expression(), "factors": factors, "value": result.q}),
    );
    map.insert("e_V".into(), json!(result.e_volts));
    map.insert("gamma_model".into(), json!(model.name()));
    map.insert("assumptions".into(), json!(result.assumptions));
    map
}

/// The human report of Q and E.
pub fn text(result: &Nernst, temperature_kelvin: f64) -> String {
    let mut out = format!("Q        {}\n", result.quotient.expression());
    for f in result.factors.iter().filter(|f| f.kind.name() != "unity") {
        let value = f
            .value
            .map_or("no value".to_owned(), |v| format!("{v:.6e}"));
        let gamma = f.gamma.map_or(String::new(), |g| format!("  (γ = {g:.4})"));
        out.push_str(&format!(
            "         a({}) = {value}  [{}]{gamma}\n",
            f.label,
            f.kind.name()
        ));
    }
    if let Some(i) = result.ionic_strength {
        out.push_str(&format!("I        {i:.4} mol/kg\n"));
    }
    match (result.q, result.e_volts) {
        (Some(q), Some(e)) => {
            out.push_str(&format!("Q        {q:.6e}\n"));
            out.push_str(&format!(
                "E        {e:+.4} V at {} K  (E = E° − (RT/nF)·ln Q)\n",
                significant(temperature_kelvin, 6)
            ));
        }
        _ => out.push_str("E        needs a value for every species of Q (--activity, --molality, --pressure, --ph)\n"),
    }
    for a in &result.assumptions {
        out.push_str(&format!("assumed: {a}\n"));
    }
    out
}

/// Evaluates and, for `couplet cell`, checks that a composition given is complete.
pub fn run_nernst(
    args: &NernstArgs,
    standard: &Standard,
    ph: Option<f64>,
    temperature_kelvin: f64,
) -> Result<(Nernst, Conditions), String> {
    let conditions = args.conditions(ph, temperature_kelvin)?;
    let result = evaluate(standard, &conditions).map_err(|e| e.to_string())?;
    if !conditions.is_empty() {
        result.e_volts().map_err(|e| e.to_string())?;
    }
    Ok((result, conditions))
}

/// Writes the export of `standard` in `format`: E(activities, T), and E(molalities, T) when
/// the γ model has a closed form (a note on standard error says why it is left out otherwise).
pub fn emit(
    standard: &Standard,
    result: &Nernst,
    conditions: &Conditions,
    format: Emit,
    source: &str,
) -> Result<String, String> {
    let solution = if conditions.amounts.is_empty() {
        None
    } else {
        Some(Solution::from_amounts(&conditions.amounts).map_err(|e| e.to_string())?)
    };
    let molality = match MolalityForm::new(&result.quotient, conditions.model, solution.as_ref()) {
        Ok(form) => Some(form),
        Err(ExportError::NoClosedForm) => {
            say!("note: {}", ExportError::NoClosedForm);
            None
        }
        Err(error) => return Err(error.to_string()),
    };
    let model = CellModel::from_quotient(
        &result.quotient,
        standard.e0_volts,
        standard.electrons,
        standard.de0_dt_volts_per_kelvin.unwrap_or(0.0),
    )
    .map_err(|e| e.to_string())?;
    Ok(Export {
        reaction: standard.reaction.to_string(),
        quotient: &result.quotient,
        model: &model,
        source: source.to_owned(),
        molality,
        caution: couplet::cell::caution(standard.reaction),
    }
    .render(format))
}

/// `couplet ph-line`.
#[derive(clap::Args)]
pub struct PhLineArgs {
    /// A couple (id, Ox/Red) or a typed reduction half-reaction with --e0
    couple: String,
    /// E° in V of a typed half-reaction that is not in the table, on the --scale (vs SHE
    /// unless --scale says otherwise; on rhe, the potential at pH 0)
    #[arg(long, allow_hyphen_values = true, value_parser = super::units::volts)]
    e0: Option<f64>,
    /// Pick the acid or base form when the table has both
    #[arg(long, value_parser = medium_arg)]
    medium: Option<Medium>,
    /// First pH
    #[arg(long, default_value_t = 0.0, allow_hyphen_values = true, value_parser = super::units::ph)]
    from: f64,
    /// Last pH
    #[arg(long, default_value_t = 14.0, allow_hyphen_values = true, value_parser = super::units::ph)]
    to: f64,
    /// pH step
    #[arg(long, default_value_t = 1.0)]
    step: f64,
    /// Temperature with its unit: 25C, 25°C, 298.15K; a bare number is kelvin and must be at
    /// least 200; a warning outside 0–100 °C
    #[arg(long, default_value = "298.15K", value_parser = super::units::temperature)]
    temperature: f64,
    /// Other species: activities, molalities, pressures (unit activity when not given)
    #[command(flatten)]
    nernst: NernstArgs,
    #[command(flatten)]
    table: TableArgs,
}

/// Prints `pH,E_V` rows (CSV; `pH,E_V_vs_<scale>` on another scale) for the couple;
/// assumptions go to standard error.
pub fn run_ph_line(args: &PhLineArgs, out: &mut dyn Write) -> io::Result<u8> {
    let table = match load_table(&args.table) {
        Ok(table) => table,
        Err(failure) => return failure.report(out, false),
    };
    // On RHE each row is read against the hydrogen electrode at that row's pH.
    let rhe = args.table.scale.trim().eq_ignore_ascii_case("rhe");
    if args.table.ph.is_some() {
        return Failure::usage(
            "ph-line sweeps the pH with --from, --to and --step (and --scale rhe reads each row against the RHE at its own pH): leave out --ph",
        )
        .report(out, false);
    }
    let scale = if rhe {
        Scale::Rhe { ph: 0.0 }
    } else {
        match scale(&args.table) {
            Ok(scale) => scale,
            Err(failure) => return failure.report(out, false),
        }
    };
    let couple = match resolve(
        &table,
        &args.couple,
        args.e0.map(|e0| (e0, &scale)),
        args.medium,
    ) {
        Ok(c) => c,
        Err(failure) => return failure.report(out, false),
    };
    let standard = Standard {
        reaction: &couple.reaction,
        e0_volts: couple.e0_volts,
        electrons: couple.electrons_f64(),
        de0_dt_volts_per_kelvin: couple.dedt_millivolts_per_kelvin.map(|d| d / 1000.0),
    };
    let conditions = match args.nernst.conditions(None, args.temperature) {
        Ok(c) => c,
        Err(message) => {
            return Failure::usage(message).report(out, false);
        }
    };
    match ph_line(&standard, &conditions, args.from, args.to, args.step) {
        Ok((points, assumptions)) => {
            let label = if rhe { "RHE".to_owned() } else { scale.label() };
            if scale == Scale::She {
                writeln!(out, "pH,E_V")?;
            } else {
                writeln!(out, "pH,E_V_vs_{label}")?;
            }
            for p in points {
                let row_scale = if rhe {
                    Scale::Rhe { ph: p.ph }
                } else {
                    scale.clone()
                };
                // pH steps are sums of floats: 0.1 + 0.2 is written 0.3.
                writeln!(
                    out,
                    "{},{:.6}",
                    significant(p.ph, 9),
                    row_scale.from_she_at(p.e_volts, args.temperature)
                )?;
            }
            say!(
                "couple: {} (E° {} V vs SHE, {})",
                couple.reaction,
                significant(couple.e0_volts, SIGNIFICANT),
                couple.source.as_deref().unwrap_or("given")
            );
            if scale != Scale::She {
                say!(
                    "potentials vs {}{}",
                    label,
                    if rhe { " at each row's pH" } else { "" }
                );
            }
            for a in assumptions {
                say!("assumed: {a}");
            }
            Ok(EXIT_OK)
        }
        Err(error) => Failure::usage(error.to_string()).report(out, false),
    }
}

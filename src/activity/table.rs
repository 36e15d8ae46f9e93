//! The `table` model: published mean ionic activity coefficients of single electrolytes at
//! 25 °C, embedded from `data/activity_coefficients.csv`, interpolated within each
//! electrolyte's tabulated molality range and never extrapolated; and the water activity that
//! the same data imply through the Gibbs–Duhem equation.

use super::ActivityError;
use super::water::WATER_MOLAR_MASS_KG_PER_MOL;
use std::sync::OnceLock;

const CSV: &str = include_str!("../../data/activity_coefficients.csv");

/// One tabulated point.
#[derive(Clone, Debug, PartialEq)]
pub struct TablePoint {
    /// Molality of the electrolyte in mol/kg.
    pub molality: f64,
    /// Mean ionic activity coefficient γ± (molality basis).
    pub gamma_pm: f64,
    /// The publication the value was read in.
    pub source: String,
}

/// The published points of one electrolyte, in increasing molality.
#[derive(Clone, Debug)]
pub struct ElectrolyteTable {
    /// Formula as written in the data file (`H2SO4`).
    pub electrolyte: String,
    /// Points with a publication behind them (rows marked memory-only are left out).
    pub points: Vec<TablePoint>,
}

/// Splits one CSV line into fields, honouring double quotes and doubled quotes inside them.
fn csv_fields(line: &str) -> Vec<String> {
    let mut fields = Vec::new();
    let mut field = String::new();
    let mut quoted = false;
    let mut chars = line.chars().peekable();
    while let Some(c) = chars.next() {
        match (c, quoted) {
            ('"', true) if chars.peek() == Some(&'"') => {
                field.push('"');
                chars.next();
            }
            ('"', _) => quoted = !quoted,
            (',', false) => fields.push(std::mem::take(&mut field)),
            _ => field.push(c),
        }
    }
    fields.push(field);
    fields
}

fn parse_tables() -> Vec<ElectrolyteTable> {
    let mut tables: Vec<ElectrolyteTable> = Vec::new();
    for line in CSV.lines() {
        if line.starts_with('#') || line.starts_with("quantity,") || line.trim().is_empty() {
            continue;
        }
        let f = csv_fields(line);
        // quantity,electrolyte,molality,value,unit,T_C,source,second_check,confidence,note
        if f.len() < 9 || f[0] != "gamma_pm" || f[8] == "memory-only" {
            continue;
        }
        let (Ok(molality), Ok(gamma_pm)) = (f[2].parse::<f64>(), f[3].parse::<f64>()) else {
            continue;
        };
        let point = TablePoint {
            molality,
            gamma_pm,
            source: f[6].clone(),
        };
        match tables.iter_mut().find(|t| t.electrolyte == f[1]) {
            Some(t) => t.points.push(point),
            None => tables.push(ElectrolyteTable {
                electrolyte: f[1].clone(),
                points: vec![point],
            }),
        }
    }
    for t in &mut tables {
        t.points.sort_by(|a, b| a.molality.total_cmp(&b.molality));
    }
    tables
}

/// Every electrolyte of the embedded table.
pub fn electrolyte_tables() -> &'static [ElectrolyteTable] {
    static TABLES: OnceLock<Vec<ElectrolyteTable>> = OnceLock::new();
    TABLES.get_or_init(parse_tables)
}

/// The table of one electrolyte by its formula as written in the data file.
pub fn electrolyte_table(electrolyte: &str) -> Option<&'static ElectrolyteTable> {
    electrolyte_tables()
        .iter()
        .find(|t| t.electrolyte == electrolyte)
}

impl ElectrolyteTable {
    /// The tabulated molality range in mol/kg.
    pub fn range(&self) -> (f64, f64) {
        (
            self.points[0].molality,
            self.points[self.points.len() - 1].molality,
        )
    }

    /// γ± at `molality`: ln γ± interpolated linearly in √m between neighbouring points (the
    /// Debye–Hückel shape makes ln γ nearly linear in √m at low m); outside the published range
    /// an error, never an extrapolation.
    pub fn gamma_pm(&self, molality: f64) -> Result<f64, ActivityError> {
        let (low, high) = self.range();
        if !(molality >= low && molality <= high) {
            return Err(ActivityError::OutsideTable {
                electrolyte: self.electrolyte.clone(),
                molality,
                low,
                high,
            });
        }
        let i = self
            .points
            .iter()
            .position(|p| p.molality >= molality)
            .unwrap_or(self.points.len() - 1);
        if i == 0 || self.points[i].molality == molality {
            return Ok(self.points[i].gamma_pm);
        }
        let (a, b) = (&self.points[i - 1], &self.points[i]);
        let s = (molality.sqrt() - a.molality.sqrt()) / (b.molality.sqrt() - a.molality.sqrt());
        Ok((a.gamma_pm.ln() + s * (b.gamma_pm.ln() - a.gamma_pm.ln())).exp())
    }

    /// Water activity of the solution at `molality` of this electrolyte, dissociating into
    /// `ions_per_formula` ions, from the Gibbs–Duhem equation: the osmotic coefficient is
    /// `φ = 1 + (1/m)∫₀^m m' d ln γ±` and `ln a_w = −ν·m·M_w·φ`. The integral runs over the same
    /// interpolation as [`Self::gamma_pm`], with the exact limit γ± → 1 as m → 0 joining the first
    /// tabulated point.
    pub fn water_activity(
        &self,
        molality: f64,
        ions_per_formula: u32,
    ) -> Result<f64, ActivityError> {
        self.gamma_pm(molality)?;
        let mut knots: Vec<(f64, f64)> = vec![(0.0, 0.0)];
        knots.extend(self.points.iter().map(|p| (p.molality, p.gamma_pm.ln())));
        // On a piece where ln γ = a + b√m, m d ln γ = (b/2)√m dm integrates to (b/3)·Δ(m^{3/2}).
        let mut integral = 0.0;
        for pair in knots.windows(2) {
            let ((m1, g1), (m2, g2)) = (pair[0], pair[1]);
            if m1 >= molality {
                break;
            }
            let slope = (g2 - g1) / (m2.sqrt() - m1.sqrt());
            let end = m2.min(molality);
            integral += slope / 3.0 * (end.powf(1.5) - m1.powf(1.5));
        }
        let osmotic = 1.0 + integral / molality;
        Ok((-(ions_per_formula as f64) * molality * WATER_MOLAR_MASS_KG_PER_MOL * osmotic).exp())
    }
}

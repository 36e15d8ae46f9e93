//! A compiled cell model: the species of Q with their exponents, E°, n and dE°/dT, evaluated
//! for one state or a batch of states without allocating, for simulations.

use crate::constants::{
    FARADAY_COULOMBS_PER_MOL, GAS_CONSTANT_JOULES_PER_MOL_KELVIN, STANDARD_TEMPERATURE_KELVIN,
};
use crate::quotient::Quotient;
use num_traits::ToPrimitive;
use thiserror::Error;

/// Why a state could not be evaluated.
#[derive(Debug, Error, Clone, PartialEq)]
#[non_exhaustive]
pub enum ModelError {
    /// An activity that is not a finite positive number.
    #[error("state {state}: activity of {species} must be a finite positive number, got {value}")]
    BadActivity {
        /// Index of the state in the batch (0 for a single state).
        state: usize,
        /// The species.
        species: String,
        /// The value.
        value: f64,
    },
    /// A temperature that is not a finite positive number.
    #[error("state {state}: temperature must be a finite positive number of kelvin, got {value}")]
    BadTemperature {
        /// Index of the state.
        state: usize,
        /// The value.
        value: f64,
    },
    /// Slices of the wrong length.
    #[error("expected {expected} values for {what}, got {got}")]
    Shape {
        /// Which slice.
        what: &'static str,
        /// Expected length.
        expected: usize,
        /// Actual length.
        got: usize,
    },
    /// The number of electrons is not positive.
    #[error("the number of electrons n must be positive, got {0}")]
    BadElectrons(f64),
}

/// How one exponent is applied: small whole exponents by repeated multiplication, others by powf.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Power {
    Whole(u32),
    Real(f64),
}

/// Q and E of one reaction as plain numbers: the species whose activities enter Q (in that
/// order), their exponents, E° (V at 298.15 K), n and dE°/dT (V/K).
#[derive(Clone, Debug, PartialEq)]
pub struct CellModel {
    species: Vec<String>,
    exponents: Vec<f64>,
    numerator: Vec<(usize, Power)>,
    denominator: Vec<(usize, Power)>,
    e0_volts: f64,
    electrons: f64,
    de0_dt_volts_per_kelvin: f64,
    /// R/(nF), so that the Nernst term is one multiplication by T.
    r_over_nf: f64,
}

fn power_of(exponent: f64) -> Power {
    let magnitude = exponent.abs();
    if magnitude.fract() == 0.0 && magnitude <= 64.0 {
        Power::Whole(magnitude as u32)
    } else {
        Power::Real(magnitude)
    }
}

#[inline(always)]
fn raise(a: f64, power: Power) -> f64 {
    match power {
        Power::Whole(1) => a,
        Power::Whole(2) => a * a,
        Power::Whole(k) => {
            let (mut base, mut k, mut out) = (a, k, 1.0);
            while k > 0 {
                if k & 1 == 1 {
                    out *= base;
                }
                base *= base;
                k >>= 1;
            }
            out
        }
        Power::Real(p) => a.powf(p),
    }
}

impl CellModel {
    /// A model from species names and exponents (ν, products > 0).
    pub fn new(
        species: Vec<String>,
        exponents: Vec<f64>,
        e0_volts: f64,
        electrons: f64,
        de0_dt_volts_per_kelvin: f64,
    ) -> Result<CellModel, ModelError> {
        if species.len() != exponents.len() {
            return Err(ModelError::Shape {
                what: "exponents",
                expected: species.len(),
                got: exponents.len(),
            });
        }
        if !(electrons.is_finite() && electrons > 0.0) {
            return Err(ModelError::BadElectrons(electrons));
        }
        let split = |positive: bool| -> Vec<(usize, Power)> {
            exponents
                .iter()
                .enumerate()
                .filter(|(_, nu)| (**nu > 0.0) == positive && **nu != 0.0)
                .map(|(i, nu)| (i, power_of(*nu)))
                .collect()
        };
        Ok(CellModel {
            numerator: split(true),
            denominator: split(false),
            r_over_nf: GAS_CONSTANT_JOULES_PER_MOL_KELVIN / (electrons * FARADAY_COULOMBS_PER_MOL),
            species,
            exponents,
            e0_volts,
            electrons,
            de0_dt_volts_per_kelvin,
        })
    }

    /// The model of a quotient: the factors that enter Q, named by canonical ASCII.
    pub fn from_quotient(
        quotient: &Quotient,
        e0_volts: f64,
        electrons: f64,
        de0_dt_volts_per_kelvin: f64,
    ) -> Result<CellModel, ModelError> {
        let (species, exponents) = quotient
            .entering()
            .map(|f| (f.species.ascii(), f.nu.to_f64().unwrap_or(f64::NAN)))
            .unzip();
        CellModel::new(
            species,
            exponents,
            e0_volts,
            electrons,
            de0_dt_volts_per_kelvin,
        )
    }

    /// Species whose activities are expected, in order.
    pub fn species(&self) -> &[String] {
        &self.species
    }
    /// Exponents ν, in the order of [`Self::species`].
    pub fn exponents(&self) -> &[f64] {
        &self.exponents
    }
    /// E° at 298.15 K in V.
    pub fn e0_volts(&self) -> f64 {
        self.e0_volts
    }
    /// n.
    pub fn electrons(&self) -> f64 {
        self.electrons
    }
    /// dE°/dT in V/K (0 when unknown).
    pub fn de0_dt_volts_per_kelvin(&self) -> f64 {
        self.de0_dt_volts_per_kelvin
    }

    #[inline(always)]
    fn check(
        &self,
        state: usize,
        activities: &[f64],
        temperature_kelvin: f64,
    ) -> Result<(), ModelError> {
        if !(temperature_kelvin.is_finite() && temperature_kelvin > 0.0) {
            return Err(ModelError::BadTemperature {
                state,
                value: temperature_kelvin,
            });
        }
        for (j, &a) in activities.iter().enumerate() {
            // `a > 0` is false for NaN; `a < inf` rejects infinity.
            if !(a > 0.0 && a < f64::INFINITY) {
                return Err(ModelError::BadActivity {
                    state,
                    species: self.species[j].clone(),
                    value: a,
                });
            }
        }
        Ok(())
    }

    /// ln Q: one logarithm of the product, or Σ ν ln a when the product leaves the normal range.
    #[inline(always)]
    fn ln_q(&self, activities: &[f64]) -> f64 {
        let mut top = 1.0;
        for &(j, p) in &self.numerator {
            top *= raise(activities[j], p);
        }
        let mut bottom = 1.0;
        for &(j, p) in &self.denominator {
            bottom *= raise(activities[j], p);
        }
        let q = top / bottom;
        if q.is_normal() && top.is_normal() && bottom.is_normal() {
            q.ln()
        } else {
            activities
                .iter()
                .zip(&self.exponents)
                .map(|(a, nu)| nu * a.ln())
                .sum()
        }
    }

    #[inline(always)]
    fn potential_unchecked(&self, activities: &[f64], temperature_kelvin: f64) -> f64 {
        self.e0_volts
            + self.de0_dt_volts_per_kelvin * (temperature_kelvin - STANDARD_TEMPERATURE_KELVIN)
            - self.r_over_nf * temperature_kelvin * self.ln_q(activities)
    }

    /// Q for activities in the order of [`Self::species`].
    pub fn quotient(&self, activities: &[f64]) -> Result<f64, ModelError> {
        self.check_len(activities.len())?;
        self.check(0, activities, 1.0)?;
        Ok(self.ln_q(activities).exp())
    }

    fn check_len(&self, got: usize) -> Result<(), ModelError> {
        if got == self.species.len() {
            Ok(())
        } else {
            Err(ModelError::Shape {
                what: "activities",
                expected: self.species.len(),
                got,
            })
        }
    }

    /// E in V at one state: activities in the order of [`Self::species`], T in K.
    pub fn evaluate(&self, activities: &[f64], temperature_kelvin: f64) -> Result<f64, ModelError> {
        self.check_len(activities.len())?;
        self.check(0, activities, temperature_kelvin)?;
        Ok(self.potential_unchecked(activities, temperature_kelvin))
    }

    /// E in V for a batch: `activities` holds one row of [`Self::species`]`.len()` values per
    /// state, `temperatures_kelvin` one value per state, and `out` receives one E per state.
    /// Stops at the first invalid state, naming it.
    pub fn evaluate_batch(
        &self,
        activities: &[f64],
        temperatures_kelvin: &[f64],
        out: &mut [f64],
    ) -> Result<(), ModelError> {
        let width = self.species.len();
        let states = temperatures_kelvin.len();
        if activities.len() != states * width {
            return Err(ModelError::Shape {
                what: "activities (states × species)",
                expected: states * width,
                got: activities.len(),
            });
        }
        if out.len() != states {
            return Err(ModelError::Shape {
                what: "out",
                expected: states,
                got: out.len(),
            });
        }
        if width == 0 {
            for (i, (&t, e)) in temperatures_kelvin.iter().zip(out.iter_mut()).enumerate() {
                self.check(i, &[], t)?;
                *e = self.potential_unchecked(&[], t);
            }
            return Ok(());
        }
        // The usual widths get a loop the compiler unrolls (a row of known length); the
        // arithmetic is the same as for any width.
        match width {
            1 => self.batch_of::<1>(activities, temperatures_kelvin, out),
            2 => self.batch_of::<2>(activities, temperatures_kelvin, out),
            3 => self.batch_of::<3>(activities, temperatures_kelvin, out),
            4 => self.batch_of::<4>(activities, temperatures_kelvin, out),
            5 => self.batch_of::<5>(activities, temperatures_kelvin, out),
            6 => self.batch_of::<6>(activities, temperatures_kelvin, out),
            _ => {
                for (i, ((row, &t), e)) in activities
                    .chunks_exact(width)
                    .zip(temperatures_kelvin)
                    .zip(out.iter_mut())
                    .enumerate()
                {
                    self.check(i, row, t)?;
                    *e = self.potential_unchecked(row, t);
                }
                Ok(())
            }
        }
    }

    /// [`Self::evaluate_batch`] for rows of `W` species: one validity test per state (a
    /// branch-free fold), the detailed check only to name a state that fails it.
    #[inline(always)]
    fn batch_of<const W: usize>(
        &self,
        activities: &[f64],
        temperatures_kelvin: &[f64],
        out: &mut [f64],
    ) -> Result<(), ModelError> {
        let rows = activities
            .chunks_exact(W)
            .map(|row| <&[f64; W]>::try_from(row).expect("chunks_exact gives rows of W"));
        for (i, ((row, &t), e)) in rows
            .zip(temperatures_kelvin)
            .zip(out.iter_mut())
            .enumerate()
        {
            // `a > 0` is false for NaN; `a < inf` rejects infinity.
            let valid = row.iter().fold(t > 0.0 && t < f64::INFINITY, |ok, &a| {
                ok & (a > 0.0) & (a < f64::INFINITY)
            });
            if !valid {
                self.check(i, row, t)?;
            }
            *e = self.potential_unchecked(row, t);
        }
        Ok(())
    }
}

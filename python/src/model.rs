//! `couplet.Model`: the library's compiled `CellModel` over numpy arrays. Activities arrive as
//! one C-contiguous float64 buffer (states × species), temperatures as a scalar or one value per
//! state; the loop runs in Rust without the GIL, with no Python call per element.

use crate::errors::Failure;
use couplet::nernst::CellModel;
use couplet::quotient::Quotient;
use numpy::{PyArray1, PyArrayMethods, PyReadonlyArray1, PyReadonlyArray2, PyUntypedArrayMethods};
use pyo3::prelude::*;

/// E = E°(T) − (RT/nF)·ln Q over arrays of activities and temperatures.
#[pyclass(frozen, module = "couplet")]
pub struct Model {
    inner: CellModel,
}

impl Model {
    /// The model of a quotient.
    pub fn of(
        quotient: &Quotient,
        e0_volts: f64,
        electrons: f64,
        de0_dt_volts_per_kelvin: f64,
    ) -> Result<Model, Failure> {
        Ok(Model {
            inner: CellModel::from_quotient(
                quotient,
                e0_volts,
                electrons,
                de0_dt_volts_per_kelvin,
            )?,
        })
    }
}

/// A temperature argument: one value for every state, or one per state.
#[derive(FromPyObject)]
enum Temperatures<'py> {
    // An array is tried first: numpy deprecates reading a one-element array as a float.
    Each(PyReadonlyArray1<'py, f64>),
    One(f64),
}

#[pymethods]
impl Model {
    /// A model from its parts: species names, exponents ν (products > 0), E° (V at
    /// 298.15 K), n and dE°/dT (V/K).
    #[new]
    #[pyo3(signature = (species, exponents, e0, electrons, de0_dt = 0.0))]
    fn new(
        species: Vec<String>,
        exponents: Vec<f64>,
        e0: f64,
        electrons: f64,
        de0_dt: f64,
    ) -> Result<Model, Failure> {
        Ok(Model {
            inner: CellModel::new(species, exponents, e0, electrons, de0_dt)?,
        })
    }
    /// The species whose activities the model takes, in column order.
    #[getter]
    fn species(&self) -> Vec<String> {
        self.inner.species().to_vec()
    }
    /// Their exponents ν in Q (products > 0).
    #[getter]
    fn exponents(&self) -> Vec<f64> {
        self.inner.exponents().to_vec()
    }
    /// E° in V at 298.15 K.
    #[getter]
    fn e0(&self) -> f64 {
        self.inner.e0_volts()
    }
    /// n.
    #[getter]
    fn electrons(&self) -> f64 {
        self.inner.electrons()
    }
    /// dE°/dT in V/K (0 when unknown).
    #[getter]
    fn de0_dt(&self) -> f64 {
        self.inner.de0_dt_volts_per_kelvin()
    }
    /// E in V at one state: activities in the order of `species`.
    #[pyo3(signature = (activities, temperature = 298.15))]
    fn potential(&self, activities: Vec<f64>, temperature: f64) -> Result<f64, Failure> {
        Ok(self.inner.evaluate(&activities, temperature)?)
    }
    /// E in V for many states: `activities` a float64 array of shape (states, species) in the
    /// order of `species`, `temperature` in K a float or an array of shape (states,).
    /// An invalid state raises `InputError` naming its index.
    #[pyo3(signature = (activities, temperature = Temperatures::One(298.15)))]
    fn potentials<'py>(
        &self,
        py: Python<'py>,
        activities: PyReadonlyArray2<'py, f64>,
        temperature: Temperatures<'py>,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let shape = activities.shape();
        let (states, width) = (shape[0], shape[1]);
        if width != self.inner.species().len() {
            return Err(Failure::usage(format!(
                "activities have {width} columns; the model takes {} ({})",
                self.inner.species().len(),
                self.inner.species().join(", ")
            ))
            .into());
        }
        let rows = activities.as_slice().map_err(|_| {
            Failure::usage(
                "activities must be a C-contiguous float64 array (numpy.ascontiguousarray)",
            )
        })?;
        let filled;
        let temperatures: &[f64] = match &temperature {
            Temperatures::One(t) => {
                filled = vec![*t; states];
                &filled
            }
            Temperatures::Each(array) => array
                .as_slice()
                .map_err(|_| Failure::usage("temperatures must be a contiguous float64 array"))?,
        };
        if temperatures.len() != states {
            return Err(Failure::usage(format!(
                "{} temperatures for {states} states",
                temperatures.len()
            ))
            .into());
        }
        let out = PyArray1::<f64>::zeros(py, states, false);
        {
            let mut written = out.readwrite();
            let target = written.as_slice_mut().expect("a new array is contiguous");
            py.allow_threads(|| self.inner.evaluate_batch(rows, temperatures, target))
                .map_err(Failure::from)?;
        }
        Ok(out)
    }
    fn __repr__(&self) -> String {
        format!(
            "Model(species={:?}, e0={}, electrons={})",
            self.inner.species(),
            self.inner.e0_volts(),
            self.inner.electrons()
        )
    }
}

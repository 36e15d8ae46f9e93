//! The one mapping from the library's errors to the Python exceptions of `couplet.errors`:
//! every exception carries `kind`, `message`, `line` and `column` (1-based, `None` when the
//! fault has no place in the typed text), with the same kinds the command line reports.

use couplet::balance::BalanceError;
use couplet::capacity::CapacityError;
use couplet::cell::CellError;
use couplet::discharge::DischargeError;
use couplet::nernst::{ModelError, NernstError};
use couplet::notation::{NotationError, NotationErrorKind};
use couplet::oxidation::{OxidationError, RedoxError};
use couplet::table::{CoupleError, LookupError};
use couplet::thermo::FromDataError;
use pyo3::prelude::*;

/// Which Python class an error becomes.
#[derive(Clone, Copy)]
pub enum Class {
    /// What was typed cannot be read as meant (`syntax`, `unknown_element`, `limit`, `usage`).
    Input,
    /// It was read, and the chemistry says no.
    Chemistry,
    /// A file could not be read.
    File,
}

impl Class {
    fn name(self) -> &'static str {
        match self {
            Class::Input => "InputError",
            Class::Chemistry => "ChemistryError",
            Class::File => "FileError",
        }
    }
}

/// An error on its way to Python.
pub struct Failure {
    class: Class,
    kind: &'static str,
    message: String,
    location: Option<(usize, usize)>,
}

impl Failure {
    /// A failure with no place in the input.
    pub fn new(class: Class, kind: &'static str, message: impl Into<String>) -> Failure {
        Failure {
            class,
            kind,
            message: message.into(),
            location: None,
        }
    }

    /// Bad arguments.
    pub fn usage(message: impl Into<String>) -> Failure {
        Failure::new(Class::Input, "usage", message)
    }

    /// Read, but chemically impossible.
    pub fn chemistry(message: impl Into<String>) -> Failure {
        Failure::new(Class::Chemistry, "chemistry", message)
    }
}

impl From<Failure> for PyErr {
    fn from(failure: Failure) -> PyErr {
        Python::with_gil(|py| {
            let made = py
                .import("couplet.errors")
                .and_then(|module| module.getattr(failure.class.name()))
                .and_then(|class| {
                    let (line, column) = failure.location.unzip();
                    class.call1((failure.kind, failure.message.clone(), line, column))
                });
            match made {
                Ok(instance) => PyErr::from_value(instance),
                Err(error) => error,
            }
        })
    }
}

impl From<NotationError> for Failure {
    fn from(error: NotationError) -> Failure {
        let class = match error.kind {
            NotationErrorKind::Chemistry => Class::Chemistry,
            _ => Class::Input,
        };
        Failure {
            class,
            kind: error.kind.name(),
            location: Some((error.line(), error.column())),
            message: error.message,
        }
    }
}

impl From<BalanceError> for Failure {
    fn from(error: BalanceError) -> Failure {
        match error {
            BalanceError::Notation(e) => e.into(),
            BalanceError::Repeated { .. } => {
                Failure::new(Class::Input, "syntax", error.to_string())
            }
            other => Failure::new(Class::Chemistry, other.kind(), other.to_string()),
        }
    }
}

impl From<LookupError> for Failure {
    fn from(error: LookupError) -> Failure {
        match error {
            LookupError::Notation(e) => e.into(),
            LookupError::Ambiguous { .. } => {
                Failure::new(Class::Chemistry, "ambiguous", error.to_string())
            }
            _ => Failure::new(Class::Chemistry, "not_found", error.to_string()),
        }
    }
}

impl From<CoupleError> for Failure {
    fn from(error: CoupleError) -> Failure {
        match error {
            CoupleError::Notation(e) => e.into(),
            CoupleError::NotFinite(_) => Failure::usage(error.to_string()),
            _ => Failure::chemistry(error.to_string()),
        }
    }
}

impl From<CellError> for Failure {
    fn from(error: CellError) -> Failure {
        match error {
            CellError::BadTemperature(_) => Failure::usage(error.to_string()),
            _ => Failure::chemistry(error.to_string()),
        }
    }
}

impl From<OxidationError> for Failure {
    fn from(error: OxidationError) -> Failure {
        Failure::new(Class::Chemistry, error.kind_name(), error.to_string())
    }
}

impl From<RedoxError> for Failure {
    fn from(error: RedoxError) -> Failure {
        Failure::new(Class::Chemistry, error.kind_name(), error.to_string())
    }
}

impl From<NernstError> for Failure {
    fn from(error: NernstError) -> Failure {
        match error {
            NernstError::Missing { .. } => Failure::usage(error.to_string()),
            NernstError::BadValue { .. } | NernstError::BadElectrons(_) => {
                Failure::usage(error.to_string())
            }
            _ => Failure::chemistry(error.to_string()),
        }
    }
}

impl From<ModelError> for Failure {
    fn from(error: ModelError) -> Failure {
        Failure::usage(error.to_string())
    }
}

impl From<CapacityError> for Failure {
    fn from(error: CapacityError) -> Failure {
        match error {
            CapacityError::BadDensity { .. } => Failure::usage(error.to_string()),
            _ => Failure::chemistry(error.to_string()),
        }
    }
}

impl From<DischargeError> for Failure {
    fn from(error: DischargeError) -> Failure {
        match error {
            DischargeError::BadAmount { .. }
            | DischargeError::Twice(_)
            | DischargeError::NeedsSolvent(_)
            | DischargeError::NeedsAmount(_)
            | DischargeError::BadSolvent(_)
            | DischargeError::BadPressure { .. }
            | DischargeError::NoSteps => Failure::usage(error.to_string()),
            _ => Failure::chemistry(error.to_string()),
        }
    }
}

impl From<FromDataError> for Failure {
    fn from(error: FromDataError) -> Failure {
        match error {
            FromDataError::Notation(e) => e.into(),
            FromDataError::Balance(e) => e.into(),
            FromDataError::Couple(e) => e.into(),
            other => Failure::new(Class::Chemistry, "not_found", other.to_string()),
        }
    }
}

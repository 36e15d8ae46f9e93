//! One mapping from the library's errors to what every command shows: a kind, a message, a
//! rendering (with a caret where the fault has a place in the input) and the exit status.
//!
//! Kinds and statuses: `syntax`, `unknown_element`, `limit` and `usage` exit 2 (the input could
//! not be read as meant); `chemistry`, `not_found`, `ambiguous`, `not_unique`, `impossible` and
//! the oxidation-number kinds exit 1 (it was read, and the chemistry says no).

use super::{EXIT_FINDINGS, EXIT_USAGE, print_json};
use couplet::balance::BalanceError;
use couplet::capacity::CapacityError;
use couplet::cell::{CellError, DeriveError};
use couplet::discharge::DischargeError;
use couplet::notation::{NotationError, NotationErrorKind};
use couplet::table::{CoupleError, LookupError};
use serde_json::json;
use std::io::{self, Write};

/// Why a command could not do what it was asked.
#[derive(Debug)]
pub struct Failure {
    /// Stable short name (`syntax`, `chemistry`, …).
    pub kind: &'static str,
    /// One line, lower case.
    pub message: String,
    /// What standard error shows (headline, caret rendering, candidates).
    rendered: String,
    /// 1-based line and column of the fault in the typed input, where it has one.
    location: Option<(usize, usize)>,
    /// The exit status.
    pub status: u8,
}

impl Failure {
    /// A failure with no place in the input.
    pub fn new(kind: &'static str, status: u8, message: impl Into<String>) -> Failure {
        let message = message.into();
        Failure {
            kind,
            rendered: format!("error ({kind}): {message}"),
            message,
            location: None,
            status,
        }
    }

    /// Bad arguments: exit 2.
    pub fn usage(message: impl Into<String>) -> Failure {
        let message = message.into();
        Failure {
            rendered: format!("error: {message}"),
            ..Failure::new("usage", EXIT_USAGE, message)
        }
    }

    /// Read, but chemically impossible or not found: exit 1.
    pub fn chemistry(message: impl Into<String>) -> Failure {
        Failure::new("chemistry", EXIT_FINDINGS, message)
    }

    /// Standard error shows `rendered` instead of the headline.
    pub fn shown_as(mut self, rendered: String) -> Failure {
        self.rendered = rendered;
        self
    }

    /// Lines shown on standard error under the headline (candidates, hints).
    pub fn with_detail(mut self, detail: &str) -> Failure {
        self.rendered.push('\n');
        self.rendered.push_str(detail.trim_end());
        self
    }

    /// What standard error shows.
    pub fn rendered(&self) -> &str {
        &self.rendered
    }

    /// Shows the failure (JSON on standard output with `json`, else text on standard error)
    /// and returns the exit status.
    pub fn report(&self, out: &mut dyn Write, json: bool) -> io::Result<u8> {
        if json {
            print_json(out, &self.json())?;
        } else {
            let _ = writeln!(io::stderr(), "{}", self.rendered);
        }
        Ok(self.status)
    }

    /// `{"error": {"kind", "message", "line", "column"}}`; line and column are null when the
    /// fault has no place in the input.
    pub fn json(&self) -> serde_json::Value {
        json!({"error": {
            "kind": self.kind,
            "message": self.message,
            "line": self.location.map(|(line, _)| line),
            "column": self.location.map(|(_, column)| column),
        }})
    }
}

impl From<&NotationError> for Failure {
    fn from(error: &NotationError) -> Failure {
        let status = match error.kind {
            NotationErrorKind::Chemistry => EXIT_FINDINGS,
            _ => EXIT_USAGE,
        };
        Failure {
            kind: error.kind.name(),
            message: error.message.clone(),
            rendered: error.render(),
            location: Some((error.line(), error.column())),
            status,
        }
    }
}

impl From<&LookupError> for Failure {
    fn from(error: &LookupError) -> Failure {
        match error {
            LookupError::Notation(e) => e.into(),
            LookupError::Ambiguous { candidates, .. } => {
                let listed: Vec<String> = candidates
                    .iter()
                    .map(|c| {
                        format!(
                            "  {:<24} {:>8.4} V  {:<7}  {}",
                            c.id.as_deref().unwrap_or("(no id)"),
                            c.e0_volts,
                            c.medium.name(),
                            c.reaction
                        )
                    })
                    .collect();
                Failure::new("ambiguous", EXIT_FINDINGS, error.to_string())
                    .with_detail(&listed.join("\n"))
            }
            _ => Failure::new("not_found", EXIT_FINDINGS, error.to_string()),
        }
    }
}

impl From<&CoupleError> for Failure {
    fn from(error: &CoupleError) -> Failure {
        match error {
            CoupleError::Notation(e) => e.into(),
            CoupleError::NotFinite(_) => Failure::usage(error.to_string()),
            _ => Failure::chemistry(error.to_string()),
        }
    }
}

impl From<&CellError> for Failure {
    fn from(error: &CellError) -> Failure {
        match error {
            CellError::BadTemperature(_) => Failure::usage(error.to_string()),
            _ => Failure::chemistry(error.to_string()),
        }
    }
}

impl From<&DeriveError> for Failure {
    fn from(error: &DeriveError) -> Failure {
        Failure::chemistry(error.to_string())
    }
}

impl From<&CapacityError> for Failure {
    fn from(error: &CapacityError) -> Failure {
        match error {
            CapacityError::BadDensity { .. } => Failure::usage(error.to_string()),
            _ => Failure::chemistry(error.to_string()),
        }
    }
}

impl From<&DischargeError> for Failure {
    fn from(error: &DischargeError) -> Failure {
        match error {
            // What was typed is incomplete or not a number: the same kind and status as a bad
            // --activity or --molality of `couplet cell`.
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

/// A balancing failure for `input`: notation faults as everywhere else, the rest with the
/// balancer's own kinds (`not_unique`, `impossible` exit 1; a species written twice exits 2).
pub fn balance(error: &BalanceError, input: &str) -> Failure {
    match error {
        BalanceError::Notation(e) => e.into(),
        _ => Failure {
            kind: error.kind(),
            message: error.to_string(),
            rendered: error.render(input),
            location: None,
            status: match error {
                BalanceError::Repeated { .. } => EXIT_USAGE,
                _ => EXIT_FINDINGS,
            },
        },
    }
}

//! Rule CPL307: with `--refuse-unverified`, a couple marked `verified = false` (a value no
//! read source confirms, such as one recalled from memory) is an error, so a team's CI can
//! insist that every potential it relies on was confirmed.

use super::{Finding, Rule};
use crate::table::CoupleRecord;

/// The finding of rule CPL307 for one couple marked `verified = false`, at that mark.
pub fn check_record(file: usize, record: &CoupleRecord) -> Option<Finding> {
    let mark = record.verified.as_ref().filter(|mark| !mark.value)?;
    let name = record.id.as_ref().map_or_else(
        || format!("couple {}", record.index + 1),
        |id| format!("'{}'", id.value),
    );
    let value = record
        .e0_volts
        .as_ref()
        .map_or_else(String::new, |e0| format!(" ({} V)", e0.value));
    Some(Finding {
        rule: Rule::UnverifiedValue,
        file,
        span: mark.span,
        message: format!(
            "{name} is marked verified = false: no read source confirms its e0{value}; confirm it in a source you read and name that source in confirmed_by, or leave the couple out"
        ),
        suggestion: None,
        fix: None,
    })
}

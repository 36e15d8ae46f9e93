//! Rule CPL307: with `--refuse-unverified`, a couple marked `verified = false` (a value no
//! read source confirms, such as one recalled from memory) is an error, so a team's CI can
//! insist that every potential it relies on was confirmed.

use super::{Finding, Rule, SourceFile};

/// Findings of rule CPL307: one per couple marked `verified = false`, at that mark.
pub fn check_files(files: &[SourceFile]) -> Vec<Finding> {
    let mut findings = Vec::new();
    for (index, source) in files.iter().enumerate() {
        for record in &source.file.records {
            let Some(mark) = record.verified.as_ref().filter(|mark| !mark.value) else {
                continue;
            };
            let name = record.id.as_ref().map_or_else(
                || format!("couple {}", record.index + 1),
                |id| format!("'{}'", id.value),
            );
            let value = record
                .e0_volts
                .as_ref()
                .map_or_else(String::new, |e0| format!(" ({} V)", e0.value));
            findings.push(Finding {
                rule: Rule::UnverifiedValue,
                file: index,
                span: mark.span,
                message: format!(
                    "{name} is marked verified = false: no read source confirms its e0{value}; confirm it in a source you read and name that source in confirmed_by, or leave the couple out"
                ),
                suggestion: None,
                fix: None,
            });
        }
    }
    findings
}

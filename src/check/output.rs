//! Writing a check [`Report`]: the project's own text layout (location first, then the rule,
//! the message, the source line with the fault marked, and what to write instead), the
//! documented JSON form, and SARIF 2.1.0 (OASIS) for code-scanning services.

use super::{Finding, Report, Rule, Severity};
use serde_json::{Value, json};
use std::io::Write;

/// Characters of a source line shown on each side of the fault when the line is long.
const LINE_WINDOW_CHARS: usize = 60;

/// Whether to colour the text output.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Colour {
    /// Plain text.
    Never,
    /// ANSI colours.
    Always,
}

fn paint(colour: Colour, code: &str, text: &str) -> String {
    match colour {
        Colour::Never => text.to_owned(),
        Colour::Always => format!("\x1b[{code}m{text}\x1b[0m"),
    }
}

/// The findings, each as a block of lines, then the summary line:
///
/// ```text
/// t.toml:2:12: CPL201 error (atoms-not-conserved)
///     atoms not conserved (right minus left): O -1
///     line 2: reaction = "MnO4- + 8 H+ + 5 e- -> Mn2+ + 3 H2O(l)"
///                        =========================================
///     write instead: MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)
/// ```
///
/// The location comes first so that editors and terminals can jump to it; the marker line
/// of `=` runs under exactly the characters the finding is about.
pub fn human(report: &Report, colour: Colour) -> String {
    let mut out = Vec::new();
    write_human(report, colour, &mut out).expect("writing to memory cannot fail");
    String::from_utf8(out).expect("the report is text")
}

/// As [`human`], written finding by finding to `out`, so that a report of a million findings
/// is never held as one text.
pub fn write_human(report: &Report, colour: Colour, out: &mut dyn Write) -> std::io::Result<()> {
    for finding in &report.findings {
        out.write_all(human_finding(report, finding, colour).as_bytes())?;
        out.write_all(b"\n")?;
    }
    writeln!(out, "{}", summary_line(report))
}

/// The closing line: `checked 2 files, 14 couples: 1 error, 0 warnings`.
pub fn summary_line(report: &Report) -> String {
    let s = report.summary();
    let plural =
        |n: usize, one: &str, many: &str| format!("{n} {}", if n == 1 { one } else { many });
    format!(
        "checked {}, {}: {}, {}",
        plural(s.files, "file", "files"),
        plural(s.entries, "couple", "couples"),
        plural(s.errors, "error", "errors"),
        plural(s.warnings, "warning", "warnings")
    )
}

/// How far the message, source line and suggestion are indented under the location line.
const INDENT: &str = "    ";

fn human_finding(report: &Report, finding: &Finding, colour: Colour) -> String {
    let source = &report.files[finding.file];
    let text = &source.file.text;
    let severity = finding.severity();
    let (line_number, column) = report.line_column(finding);
    let severity_colour = match severity {
        Severity::Error => "1;31",
        Severity::Warning => "1;33",
    };
    let mut out = format!(
        "{}: {} {} ({})\n",
        paint(
            colour,
            "1",
            &format!("{}:{line_number}:{column}", source.name)
        ),
        paint(colour, "1", finding.rule.code()),
        paint(colour, severity_colour, severity.name()),
        finding.rule.name(),
    );
    out.push_str(&format!("{INDENT}{}\n", finding.message));
    if !text.is_empty() {
        let start = floor_boundary(text, finding.span.start.min(text.len()));
        let line_start = text[..start].rfind('\n').map_or(0, |i| i + 1);
        let line_end = text[start..].find('\n').map_or(text.len(), |i| start + i);
        let end = floor_boundary(text, finding.span.end.clamp(start, line_end));
        let line = text[line_start..line_end].trim_end_matches('\r');
        let before = text[line_start..start].chars().count();
        let marked = text[start..end].chars().count().max(1);
        // Long lines (a million characters) are shown as a window around the fault.
        let skip = before.saturating_sub(LINE_WINDOW_CHARS);
        let shown: String = line
            .chars()
            .skip(skip)
            .take(2 * LINE_WINDOW_CHARS + marked.min(LINE_WINDOW_CHARS))
            .collect();
        let prefix = if skip > 0 { "…" } else { "" };
        let suffix = if skip + shown.chars().count() < line.chars().count() {
            "…"
        } else {
            ""
        };
        let label = format!("line {line_number}: ");
        out.push_str(&format!("{INDENT}{label}{prefix}{shown}{suffix}\n"));
        let marker_pad = label.chars().count() + before - skip + prefix.chars().count();
        out.push_str(&format!(
            "{INDENT}{}{}\n",
            " ".repeat(marker_pad),
            paint(
                colour,
                severity_colour,
                &"=".repeat(marked.min(2 * LINE_WINDOW_CHARS))
            )
        ));
    }
    if let Some(suggestion) = &finding.suggestion {
        out.push_str(&format!(
            "{INDENT}{} {suggestion}\n",
            paint(colour, "1;32", "write instead:")
        ));
    }
    out
}

fn floor_boundary(text: &str, mut offset: usize) -> usize {
    while !text.is_char_boundary(offset) {
        offset -= 1;
    }
    offset
}

/// The documented JSON form:
/// `{"diagnostics": [{"file", "line", "column", "severity", "code", "message", "suggestion"}],
/// "summary": {"files", "entries", "errors", "warnings"}}`; `suggestion` is null when there is
/// none.
pub fn json(report: &Report) -> Value {
    let diagnostics: Vec<Value> = report
        .findings
        .iter()
        .map(|finding| json_diagnostic(report, finding))
        .collect();
    json!({ "diagnostics": diagnostics, "summary": report.summary() })
}

/// As [`json()`], on one line followed by a newline, written diagnostic by diagnostic to `out`
/// (the whole report is never held as a JSON tree).
pub fn write_json(report: &Report, out: &mut dyn Write) -> std::io::Result<()> {
    out.write_all(b"{\"diagnostics\":[")?;
    for (i, finding) in report.findings.iter().enumerate() {
        if i > 0 {
            out.write_all(b",")?;
        }
        serde_json::to_writer(&mut *out, &json_diagnostic(report, finding))?;
    }
    out.write_all(b"],\"summary\":")?;
    serde_json::to_writer(&mut *out, &report.summary())?;
    out.write_all(b"}\n")
}

fn json_diagnostic(report: &Report, finding: &Finding) -> Value {
    let (line, column) = report.line_column(finding);
    json!({
        "file": report.files[finding.file].name,
        "line": line,
        "column": column,
        "severity": finding.severity().name(),
        "code": finding.rule.code(),
        "message": finding.message,
        "suggestion": finding.suggestion,
    })
}

/// The published SARIF 2.1.0 schema address (OASIS, errata 01).
pub const SARIF_SCHEMA_URI: &str =
    "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json";

/// A file path as a relative URI reference (forward slashes; characters outside the unreserved
/// set and `/` percent-encoded).
fn uri_reference(path: &str) -> String {
    let path = path.replace('\\', "/");
    let mut out = String::new();
    for byte in path.bytes() {
        match byte {
            b'A'..=b'Z' | b'a'..=b'z' | b'0'..=b'9' | b'-' | b'.' | b'_' | b'~' | b'/' => {
                out.push(byte as char)
            }
            _ => out.push_str(&format!("%{byte:02X}")),
        }
    }
    out
}

/// The report as a SARIF 2.1.0 log: one run, every rule described, one result per finding with
/// its region (columns in Unicode code points), and a `fixes` entry where `--fix` would rewrite.
pub fn sarif(report: &Report) -> Value {
    let results: Vec<Value> = report
        .findings
        .iter()
        .map(|finding| sarif_result(report, finding))
        .collect();
    json!({
        "$schema": SARIF_SCHEMA_URI,
        "version": "2.1.0",
        "runs": [{
            "tool": sarif_tool(),
            "columnKind": SARIF_COLUMN_KIND,
            "results": results,
        }],
    })
}

const SARIF_COLUMN_KIND: &str = "unicodeCodePoints";

/// As [`sarif`], written result by result to `out` and ended with a newline: a million
/// findings are never held as one JSON tree.
pub fn write_sarif(report: &Report, out: &mut dyn Write) -> std::io::Result<()> {
    write!(
        out,
        "{{\n  \"$schema\": {},\n  \"version\": \"2.1.0\",\n  \"runs\": [\n    {{\n      \"tool\": {},\n      \"columnKind\": {},\n      \"results\": [",
        compact(&SARIF_SCHEMA_URI),
        compact(&sarif_tool()),
        compact(&SARIF_COLUMN_KIND),
    )?;
    for (i, finding) in report.findings.iter().enumerate() {
        out.write_all(if i == 0 {
            b"\n        "
        } else {
            b",\n        "
        })?;
        serde_json::to_writer(&mut *out, &sarif_result(report, finding))?;
    }
    out.write_all(b"\n      ]\n    }\n  ]\n}\n")
}

fn compact(value: &impl serde::Serialize) -> String {
    serde_json::to_string(value).expect("JSON values always serialise")
}

/// The SARIF tool object: couplet and every rule it has.
fn sarif_tool() -> Value {
    let rules: Vec<Value> = Rule::ALL
        .iter()
        .map(|rule| {
            json!({
                "id": rule.code(),
                "name": rule.name(),
                "shortDescription": { "text": rule.description() },
                "defaultConfiguration": { "level": rule.severity().name() },
            })
        })
        .collect();
    json!({
        "driver": {
            "name": "couplet",
            "version": env!("CARGO_PKG_VERSION"),
            "rules": rules,
        }
    })
}

fn sarif_result(report: &Report, finding: &Finding) -> Value {
    let source = &report.files[finding.file];
    let (start_line, start_column) = report.line_column(finding);
    let (end_line, end_column) = source.line_column(finding.span.end);
    let (end_line, end_column) = if (end_line, end_column) <= (start_line, start_column) {
        (start_line, start_column + 1)
    } else {
        (end_line, end_column)
    };
    let uri = uri_reference(&source.name);
    let region = json!({
        "startLine": start_line,
        "startColumn": start_column,
        "endLine": end_line,
        "endColumn": end_column,
    });
    let mut message = finding.message.clone();
    if let Some(suggestion) = &finding.suggestion {
        message.push_str(&format!(" (suggestion: {suggestion})"));
    }
    let mut result = json!({
        "ruleId": finding.rule.code(),
        "ruleIndex": Rule::ALL.iter().position(|r| *r == finding.rule).unwrap_or(0),
        "level": finding.severity().name(),
        "message": { "text": message },
        "locations": [{
            "physicalLocation": {
                "artifactLocation": { "uri": uri },
                "region": region,
            }
        }],
    });
    if let Some(replacement) = fix_replacement(report, finding) {
        result["fixes"] = json!([{
            "description": { "text": "write the balanced reaction" },
            "artifactChanges": [{
                "artifactLocation": { "uri": uri },
                "replacements": [replacement],
            }],
        }]);
    }
    result
}

/// The SARIF replacement for a finding's fix: the reaction value's region and the new value
/// as the file format writes it.
fn fix_replacement(report: &Report, finding: &Finding) -> Option<Value> {
    let fix = finding.fix.as_ref()?;
    let source = &report.files[finding.file];
    let (start_line, start_column) = source.line_column(fix.span.start);
    let (end_line, end_column) = source.line_column(fix.span.end);
    Some(json!({
        "deletedRegion": {
            "startLine": start_line,
            "startColumn": start_column,
            "endLine": end_line,
            "endColumn": end_column,
        },
        "insertedContent": {
            "text": super::fix::written_value(
                source.file.format,
                source.file.text.get(fix.span.start..fix.span.end).unwrap_or(""),
                &fix.reaction,
            )
        },
    }))
}

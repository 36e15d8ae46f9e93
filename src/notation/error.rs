//! The notation layer's error: what went wrong, where in the input, and how to show it.

use super::Span;
use std::fmt;

/// What kind of notation error, with a stable name for JSON output.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum NotationErrorKind {
    /// The text does not follow the notation.
    Syntax,
    /// A capitalised symbol that names no element.
    UnknownElement,
    /// Input longer, deeper or with larger numbers than the documented limits.
    Limit,
    /// Well-formed text that no species can be (a charge larger than the protons present).
    Chemistry,
}

impl NotationErrorKind {
    /// Stable name: `syntax`, `unknown_element`, `limit`, `chemistry`.
    pub fn name(self) -> &'static str {
        match self {
            NotationErrorKind::Syntax => "syntax",
            NotationErrorKind::UnknownElement => "unknown_element",
            NotationErrorKind::Limit => "limit",
            NotationErrorKind::Chemistry => "chemistry",
        }
    }
}

/// A notation error: its kind, a one-line reason, and the byte span of the fault in `input`.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("{message}")]
pub struct NotationError {
    /// What kind of error.
    pub kind: NotationErrorKind,
    /// One line, lower-case, no trailing period.
    pub message: String,
    /// Where in `input`.
    pub span: Span,
    /// The text that was being read.
    pub input: String,
}

impl NotationError {
    pub(crate) fn new(
        kind: NotationErrorKind,
        message: impl Into<String>,
        span: Span,
        input: &str,
    ) -> NotationError {
        NotationError {
            kind,
            message: message.into(),
            span,
            input: input.to_owned(),
        }
    }

    /// 1-based line of the fault in `input`.
    pub fn line(&self) -> usize {
        self.input[..self.span.start.min(self.input.len())]
            .matches('\n')
            .count()
            + 1
    }

    /// 1-based column of the fault, counted in characters.
    pub fn column(&self) -> usize {
        let start = self.span.start.min(self.input.len());
        let line_start = self.input[..start].rfind('\n').map_or(0, |i| i + 1);
        self.input[line_start..start].chars().count() + 1
    }

    /// The faulty line with a caret under the fault and the reason:
    ///
    /// ```text
    /// error (unknown_element): no element has the symbol 'Xx'
    ///     MnXx4 -> Mn2+
    ///       ^^ column 3
    /// ```
    pub fn render(&self) -> String {
        render_caret(
            &self.input,
            self.span,
            &format!("error ({}): {}", self.kind.name(), self.message),
        )
    }
}

/// Renders `headline`, then the line of `text` that holds `span`, indented, with carets under
/// the span and where it starts (the line too when the text has several).
pub fn render_caret(text: &str, span: Span, headline: &str) -> String {
    let start = span.start.min(text.len());
    let end = span.end.clamp(start, text.len());
    let line_start = text[..start].rfind('\n').map_or(0, |i| i + 1);
    let line_end = text[start..].find('\n').map_or(text.len(), |i| start + i);
    let line = &text[line_start..line_end];
    let pad = text[line_start..start].chars().count();
    let width = text[start..end.min(line_end)].chars().count().max(1);
    let place = if text.contains('\n') {
        let line_number = text[..start].matches('\n').count() + 1;
        format!("line {line_number}, column {}", pad + 1)
    } else {
        format!("column {}", pad + 1)
    };
    format!(
        "{headline}\n    {line}\n    {}{} {place}",
        " ".repeat(pad),
        "^".repeat(width)
    )
}

impl fmt::Display for NotationErrorKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

//! Reading couple files (TOML `[[couple]]` tables or CSV with the same columns) into records
//! that remember where every value was written.
//!
//! This is the only reader of couple files: the loaded table and the data-file checker both
//! start from [`CoupleFile`]. It judges form only (syntax, value types, required keys); the
//! chemistry of an entry is left to whoever reads the records, so a checker can report every
//! fault in a file instead of stopping at the first.

use crate::notation::Span;
use std::borrow::Cow;
use toml::Spanned;
use toml::de::{DeTable, DeValue};

/// The keys a couple may have, in the documented order.
pub const KNOWN_KEYS: [&str; 10] = [
    "id",
    "reaction",
    "e0",
    "dedt",
    "medium",
    "source",
    "note",
    "confirmed_by",
    "verified",
    "also_published",
];

/// The keys of one entry of `also_published`.
pub const PUBLISHED_KEYS: [&str; 4] = ["e0", "dedt", "source", "note"];

/// Keys every couple must have.
pub const REQUIRED_KEYS: [&str; 2] = ["reaction", "e0"];

/// A value and the byte span where it was written in the file.
///
/// For a TOML string the span includes the quotes; [`Field::content_start`] gives the first
/// byte of the text itself when it can be mapped one to one.
#[derive(Clone, Debug, PartialEq)]
pub struct Field<T> {
    /// The value as read.
    pub value: T,
    /// Where it was written (for TOML strings, quotes included).
    pub span: Span,
    /// Byte offset in the file of the first character of a string value, when every byte of
    /// the value appears literally in the file (no escapes), so that an offset inside the
    /// value maps to `content_start + offset`.
    pub content_start: Option<usize>,
    /// Where escapes break the one-to-one mapping (TOML basic strings): pairs of (byte offset
    /// in the value, byte offset in the file), sorted; between two pairs bytes map one to one.
    pub escapes: Vec<(usize, usize)>,
}

impl<T> Field<T> {
    /// The file offset of byte `offset` inside a string value, falling back to the start of
    /// the span when the value cannot be mapped one to one (escapes, CSV quoting).
    pub fn file_offset(&self, offset: usize) -> usize {
        match self.content_start {
            Some(start) => {
                let after = self.escapes.partition_point(|&(value, _)| value <= offset);
                match after.checked_sub(1).map(|i| self.escapes[i]) {
                    Some((value, file)) => file + (offset - value),
                    None => start + offset,
                }
            }
            None => self.span.start,
        }
    }
}

/// Which of the two couple-file formats.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum FileFormat {
    /// `[[couple]]` tables.
    Toml,
    /// A header row naming the columns, one couple per row; `#` starts a comment line.
    Csv,
}

impl FileFormat {
    /// CSV for a `.csv` file name, TOML otherwise.
    pub fn from_path(path: &std::path::Path) -> FileFormat {
        match path.extension().and_then(|e| e.to_str()) {
            Some(ext) if ext.eq_ignore_ascii_case("csv") => FileFormat::Csv,
            _ => FileFormat::Toml,
        }
    }

    /// `toml` or `csv`.
    pub fn name(self) -> &'static str {
        match self {
            FileFormat::Toml => "toml",
            FileFormat::Csv => "csv",
        }
    }
}

/// One couple as written: every known key with its span, and the keys nobody knows.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct CoupleRecord {
    /// Position among the couples of the file, from 0.
    pub index: usize,
    /// The whole entry (TOML table or CSV row).
    pub span: Span,
    /// `id`: a unique name for the couple.
    pub id: Option<Field<String>>,
    /// `reaction`: the half-reaction text, not yet parsed.
    pub reaction: Option<Field<String>>,
    /// `e0`: standard potential in volts vs SHE at 298.15 K.
    pub e0_volts: Option<Field<f64>>,
    /// `dedt`: temperature coefficient in mV/K.
    pub dedt_millivolts_per_kelvin: Option<Field<f64>>,
    /// `medium`: the text as written (`acid`, `base`, `neutral`); judged by the reader of the
    /// record.
    pub medium: Option<Field<String>>,
    /// `source`: the publication.
    pub source: Option<Field<String>>,
    /// `note`: free text.
    pub note: Option<Field<String>>,
    /// `confirmed_by`: a second source, read, that gives the same value, and what it gives.
    pub confirmed_by: Option<Field<String>>,
    /// `verified`: `false` marks a value no read source confirms.
    pub verified: Option<Field<bool>>,
    /// `also_published`: other published values of the same couple, each with its source
    /// (TOML only: an array of inline tables).
    pub also_published: Vec<PublishedRecord>,
    /// Keys other than the known ones, with the span of the key.
    pub unknown_keys: Vec<Field<String>>,
}

/// One entry of `also_published`: a value another compilation or paper gives for the same
/// couple, as written.
#[derive(Clone, Debug, PartialEq)]
pub struct PublishedRecord {
    /// The whole inline table.
    pub span: Span,
    /// `e0`: the value in volts vs SHE at 298.15 K.
    pub e0_volts: Field<f64>,
    /// `dedt`: its temperature coefficient in mV/K, when that source prints one.
    pub dedt_millivolts_per_kelvin: Option<Field<f64>>,
    /// `source`: where the value was read (or that it was recalled).
    pub source: Field<String>,
    /// `note`: free text (standard state, method, uncertainty).
    pub note: Option<Field<String>>,
}

/// What kind of problem a file has with its form.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum ProblemKind {
    /// The text is not valid TOML, CSV or UTF-8.
    Syntax,
    /// A known key holds a value of the wrong type (`e0 = "0.34"`).
    WrongType,
    /// A couple lacks `reaction` or `e0`.
    MissingKey,
}

impl ProblemKind {
    /// Stable name: `syntax`, `wrong_type`, `missing_key`.
    pub fn name(self) -> &'static str {
        match self {
            ProblemKind::Syntax => "syntax",
            ProblemKind::WrongType => "wrong_type",
            ProblemKind::MissingKey => "missing_key",
        }
    }
}

/// A problem with the form of a file, located by byte span.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[error("{message}")]
pub struct ReadProblem {
    /// What kind.
    pub kind: ProblemKind,
    /// One line, lower-case, no trailing period.
    pub message: String,
    /// Where in the file.
    pub span: Span,
    /// The couple it concerns (index into [`CoupleFile::records`]), if any.
    pub record: Option<usize>,
    /// The key it concerns (`e0` for a wrong type or a missing `e0`), if any.
    pub key: Option<String>,
}

/// A couple file as read: its text, its records and the problems with its form.
#[derive(Clone, Debug)]
pub struct CoupleFile {
    /// Which format it was read as.
    pub format: FileFormat,
    /// The text (invalid UTF-8 replaced, so spans stay valid for rendering).
    pub text: String,
    /// The couples, in file order.
    pub records: Vec<CoupleRecord>,
    /// Problems of form, in file order.
    pub problems: Vec<ReadProblem>,
    /// Top-level keys other than `couple` (TOML) or columns other than the known ones (CSV).
    pub unknown_keys: Vec<Field<String>>,
}

impl CoupleFile {
    /// Reads bytes in the given format. Invalid UTF-8 is a syntax problem at the first bad
    /// byte, and nothing further is read.
    pub fn from_bytes(bytes: &[u8], format: FileFormat) -> CoupleFile {
        match std::str::from_utf8(bytes) {
            Ok(text) => CoupleFile::from_text(text, format),
            Err(error) => {
                let at = error.valid_up_to();
                CoupleFile {
                    format,
                    text: String::from_utf8_lossy(bytes).into_owned(),
                    records: Vec::new(),
                    problems: vec![ReadProblem {
                        kind: ProblemKind::Syntax,
                        key: None,
                        message: format!("the file is not valid UTF-8 (byte {at})"),
                        span: Span::new(at, at + 1),
                        record: None,
                    }],
                    unknown_keys: Vec::new(),
                }
            }
        }
    }

    /// Reads text in the given format.
    pub fn from_text(text: &str, format: FileFormat) -> CoupleFile {
        CoupleFile::from_string(text.to_owned(), format)
    }

    /// Reads text in the given format, keeping the string as the file's text (no copy).
    pub fn from_string(text: String, format: FileFormat) -> CoupleFile {
        let mut file = match format {
            FileFormat::Toml => read_toml(&text),
            FileFormat::Csv => read_csv(&text),
        };
        file.text = text;
        file
    }

    /// Reads a file from disk, choosing the format from its extension. At most
    /// [`MAX_COUPLE_FILE_BYTES`] are read: a larger file (or a device such as `/dev/zero`)
    /// is an error of kind `InvalidData`, found without reading more than the limit.
    pub fn read(path: &std::path::Path) -> std::io::Result<CoupleFile> {
        let bytes = read_bounded(std::fs::File::open(path)?)?;
        Ok(CoupleFile::from_bytes(&bytes, FileFormat::from_path(path)))
    }

    /// 1-based line and column (in characters) of a byte offset.
    pub fn line_column(&self, offset: usize) -> (usize, usize) {
        line_column(&self.text, offset)
    }
}

/// The largest couple file read: 32 MiB, about 200,000 couples.
pub const MAX_COUPLE_FILE_BYTES: u64 = 32 * 1024 * 1024;

/// All of `source` when it holds at most [`MAX_COUPLE_FILE_BYTES`]; an `InvalidData` error
/// after reading one byte more otherwise.
pub fn read_bounded(source: impl std::io::Read) -> std::io::Result<Vec<u8>> {
    use std::io::Read;
    let mut bytes = Vec::new();
    source
        .take(MAX_COUPLE_FILE_BYTES + 1)
        .read_to_end(&mut bytes)?;
    if bytes.len() as u64 > MAX_COUPLE_FILE_BYTES {
        return Err(std::io::Error::new(
            std::io::ErrorKind::InvalidData,
            format!(
                "more than {} MiB: a couple file is at most that large (split the table)",
                MAX_COUPLE_FILE_BYTES / 1024 / 1024
            ),
        ));
    }
    Ok(bytes)
}

/// 1-based line and column (in characters) of byte `offset` in `text`.
pub fn line_column(text: &str, offset: usize) -> (usize, usize) {
    let mut offset = offset.min(text.len());
    while !text.is_char_boundary(offset) {
        offset -= 1;
    }
    let before = &text[..offset];
    let line = before.matches('\n').count() + 1;
    let line_start = before.rfind('\n').map_or(0, |i| i + 1);
    (line, text[line_start..offset].chars().count() + 1)
}

fn span_of<T>(spanned: &Spanned<T>) -> Span {
    let range = spanned.span();
    Span::new(range.start, range.end)
}

/// Where the characters of a quoted TOML string start, and where escapes break the one-to-one
/// mapping of value bytes to file bytes; `None` when the written form does not decode to
/// `value`.
fn content_mapping(text: &str, span: Span, value: &str) -> Option<(usize, Vec<(usize, usize)>)> {
    let raw = text.get(span.start..span.end)?;
    for quote in ["\"\"\"", "'''", "\"", "'"] {
        let Some(inner) = raw.strip_prefix(quote).and_then(|r| r.strip_suffix(quote)) else {
            continue;
        };
        let mut starts = vec![(inner, span.start + quote.len())];
        // A multi-line string drops a newline right after the opening quotes.
        if quote.len() == 3 {
            for newline in ["\r\n", "\n"] {
                if let Some(rest) = inner.strip_prefix(newline) {
                    starts.push((rest, span.start + quote.len() + newline.len()));
                }
            }
        }
        for (body, start) in starts {
            if body == value {
                return Some((start, Vec::new()));
            }
            if !quote.starts_with('"') {
                continue;
            }
            if let Some((decoded, escapes)) = decode_basic(body, start, quote.len() == 3)
                && decoded == value
            {
                return Some((start, escapes));
            }
        }
        return None;
    }
    None
}

/// Decodes the body of a TOML basic string written at file offset `start`, recording for every
/// escape where it starts and ends in the value and in the file.
fn decode_basic(
    body: &str,
    start: usize,
    multi_line: bool,
) -> Option<(String, Vec<(usize, usize)>)> {
    let bytes = body.as_bytes();
    let mut decoded = String::with_capacity(body.len());
    let mut escapes = Vec::new();
    let mut i = 0;
    while i < bytes.len() {
        if bytes[i] != b'\\' {
            let c = body[i..].chars().next()?;
            decoded.push(c);
            i += c.len_utf8();
            continue;
        }
        escapes.push((decoded.len(), start + i));
        let kind = *bytes.get(i + 1)?;
        let hex = |len: usize| -> Option<char> {
            let digits = body.get(i + 2..i + 2 + len)?;
            char::from_u32(u32::from_str_radix(digits, 16).ok()?)
        };
        let (c, length) = match kind {
            b'b' => (Some('\u{8}'), 2),
            b't' => (Some('\t'), 2),
            b'n' => (Some('\n'), 2),
            b'f' => (Some('\u{c}'), 2),
            b'r' => (Some('\r'), 2),
            b'e' => (Some('\u{1b}'), 2),
            b'"' => (Some('"'), 2),
            b'\\' => (Some('\\'), 2),
            b'x' => (Some(hex(2)?), 4),
            b'u' => (Some(hex(4)?), 6),
            b'U' => (Some(hex(8)?), 10),
            b' ' | b'\t' | b'\r' | b'\n' if multi_line => {
                // A line-ending backslash drops the whitespace and newlines that follow.
                let rest = &body[i + 1..];
                let kept = rest.trim_start_matches([' ', '\t', '\r', '\n']);
                (None, 1 + rest.len() - kept.len())
            }
            _ => return None,
        };
        if let Some(c) = c {
            decoded.push(c);
        }
        i += length;
        escapes.push((decoded.len(), start + i));
    }
    Some((decoded, escapes))
}

/// A TOML float or integer as f64 (TOML allows `_` between digits, `inf` and `nan`).
fn toml_number(value: &DeValue<'_>) -> Option<f64> {
    let (text, radix) = match value {
        DeValue::Float(f) => (f.as_str(), 10),
        DeValue::Integer(i) => (i.as_str(), i.radix()),
        _ => return None,
    };
    let cleaned: String = text.chars().filter(|&c| c != '_').collect();
    if radix != 10 {
        let digits = cleaned.get(2..).unwrap_or("");
        return i64::from_str_radix(digits, radix).ok().map(|n| n as f64);
    }
    match cleaned.trim_start_matches('+') {
        "inf" => Some(f64::INFINITY),
        "-inf" => Some(f64::NEG_INFINITY),
        "nan" | "-nan" => Some(f64::NAN),
        number => number.parse().ok(),
    }
}

/// TOML files at least this large are parsed in pieces when that is safe (see
/// [`read_toml_in_pieces`]).
const PIECEWISE_FROM_BYTES: usize = 1 << 20;

/// Couples per piece of a piecewise parse.
const COUPLES_PER_PIECE: usize = 1024;

fn read_toml(text: &str) -> CoupleFile {
    if text.len() >= PIECEWISE_FROM_BYTES
        && let Some(file) = read_toml_in_pieces(text)
    {
        return file;
    }
    read_toml_whole(text)
}

/// Whether a line (leading spaces removed) is exactly a `[[couple]]` header, perhaps with a
/// comment after it.
fn is_couple_header(line: &str) -> bool {
    line.strip_prefix("[[couple]]")
        .is_some_and(|rest| rest.trim().is_empty() || rest.trim_start().starts_with('#'))
}

/// Why a couple file cannot be cut into pieces between couples, with the byte offset that
/// shows it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Uncuttable {
    /// Byte offset of what stops the cut.
    pub offset: usize,
    /// One phrase, lower-case.
    pub reason: &'static str,
}

/// Where each couple of a TOML text starts (the offset of its `[[couple]]` line), when the text
/// can be cut there with certainty: no multi-line strings, and every line that starts with `[`
/// a plain `[[couple]]` header.
pub fn toml_couple_starts(text: &str) -> Result<Vec<usize>, Uncuttable> {
    // A file of a million couples is 150 MB: the scans use memchr's vectorised searches, and
    // only a line that starts with `[` (after blanks) is looked at further.
    for quotes in ["\'\'\'", "\"\"\""] {
        if let Some(offset) = memchr::memmem::find(text.as_bytes(), quotes.as_bytes()) {
            return Err(Uncuttable {
                offset,
                reason: "a multi-line string",
            });
        }
    }
    let mut starts = Vec::new();
    let line_starts = std::iter::once(0)
        .chain(memchr::memchr_iter(b'\n', text.as_bytes()).map(|newline| newline + 1))
        .take_while(|&start| start < text.len());
    for offset in line_starts {
        let rest = &text[offset..];
        let trimmed = rest.trim_start_matches(|c: char| c.is_whitespace() && c != '\n');
        if trimmed.starts_with('[') {
            let line_end =
                memchr::memchr(b'\n', trimmed.as_bytes()).map_or(trimmed.len(), |i| i + 1);
            if !is_couple_header(&trimmed[..line_end]) {
                return Err(Uncuttable {
                    offset: offset + rest.len() - trimmed.len(),
                    reason: "a table header other than [[couple]]",
                });
            }
            starts.push(offset);
        }
    }
    Ok(starts)
}

/// Where each row of a CSV text starts, the header row first, found by the reader's own rules
/// (comment and blank lines skipped, a field that starts with `"` runs to its closing quote
/// with `""` inside it) without decoding the fields: for cutting a large file between rows.
pub fn csv_row_starts(text: &str) -> Result<Vec<usize>, Uncuttable> {
    let bytes = text.as_bytes();
    let mut rows = Vec::new();
    let mut i = 0;
    while let Some(start) = next_row(text, i) {
        i = start;
        rows.push(i);
        // One row: fields up to a line break outside quotes.
        loop {
            if bytes.get(i) == Some(&b'"') {
                let open = i;
                i += 1;
                loop {
                    match text[i..].find('"') {
                        None => {
                            return Err(Uncuttable {
                                offset: open,
                                reason: "a quoted field that is never closed",
                            });
                        }
                        Some(n) if bytes.get(i + n + 1) == Some(&b'"') => i += n + 2,
                        Some(n) => {
                            i += n + 1;
                            break;
                        }
                    }
                }
            }
            i = text[i..]
                .find([',', '\n', '\r'])
                .map_or(bytes.len(), |n| i + n);
            if bytes.get(i) == Some(&b',') {
                i += 1;
                continue;
            }
            i = skip_line_break(bytes, i);
            break;
        }
    }
    Ok(rows)
}

impl CoupleFile {
    /// Maps every span of a file read from a piece of a larger text through `to_file`, and
    /// numbers its couples from `first_record` (the messages that name a couple by number too).
    pub fn relocate(&mut self, to_file: &dyn Fn(usize) -> usize, first_record: usize) {
        for record in &mut self.records {
            record.relocate(to_file, first_record);
        }
        for problem in &mut self.problems {
            problem.span = Span::new(to_file(problem.span.start), to_file(problem.span.end));
            let Some(local) = problem.record else {
                continue;
            };
            problem.record = Some(local + first_record);
            // The reader numbers the couple in this message from the start of the piece.
            if let (ProblemKind::MissingKey, Some(key)) = (problem.kind, &problem.key)
                && problem.message == format!("couple {} has no '{key}'", local + 1)
            {
                problem.message = format!("couple {} has no '{key}'", local + first_record + 1);
            }
        }
        for key in &mut self.unknown_keys {
            key.relocate(to_file);
        }
    }
}

/// Parses a large file a thousand couples at a time. The TOML parser holds about twenty times
/// the text it parses (tokens, tables, maps); piece by piece, a 31 MiB file needs that only for
/// one piece. Done only when the pieces are certain to be the file's own tables: no multi-line
/// strings, every line that starts with `[` a plain `[[couple]]` header, and every piece free
/// of syntax errors; otherwise (`None`) the whole file is parsed at once, so that errors are
/// reported exactly as the parser sees them.
fn read_toml_in_pieces(text: &str) -> Option<CoupleFile> {
    let headers = toml_couple_starts(text).ok()?;
    let mut bounds: Vec<usize> = std::iter::once(0)
        .chain(
            headers
                .iter()
                .copied()
                .skip(COUPLES_PER_PIECE)
                .step_by(COUPLES_PER_PIECE),
        )
        .collect();
    bounds.push(text.len());
    let mut file = read_toml_whole("");
    // Exactly as many records as headers (a doubling vector would hold up to twice that).
    file.records.reserve_exact(headers.len());
    for piece in bounds.windows(2) {
        let (start, end) = (piece[0], piece[1]);
        let mut part = read_toml_whole(&text[start..end]);
        if part.problems.iter().any(|p| p.kind == ProblemKind::Syntax) {
            return None;
        }
        part.relocate(&|at| at + start, file.records.len());
        file.records.extend(part.records);
        file.problems.extend(part.problems);
        file.unknown_keys.extend(part.unknown_keys);
    }
    Some(file)
}

impl CoupleRecord {
    /// Maps every byte offset the record holds through `to_file` and moves its index by
    /// `first_index`: for a record read from a piece of a larger text. Every field is moved, so
    /// a field added to the record is added here once for every reader that cuts files.
    pub fn relocate(&mut self, to_file: &dyn Fn(usize) -> usize, first_index: usize) {
        self.index += first_index;
        self.span = Span::new(to_file(self.span.start), to_file(self.span.end));
        for field in [
            &mut self.id,
            &mut self.reaction,
            &mut self.medium,
            &mut self.source,
            &mut self.note,
            &mut self.confirmed_by,
        ]
        .into_iter()
        .flatten()
        {
            field.relocate(to_file);
        }
        for field in [&mut self.e0_volts, &mut self.dedt_millivolts_per_kelvin]
            .into_iter()
            .flatten()
        {
            field.relocate(to_file);
        }
        if let Some(field) = &mut self.verified {
            field.relocate(to_file);
        }
        for key in &mut self.unknown_keys {
            key.relocate(to_file);
        }
        for published in &mut self.also_published {
            published.span = Span::new(to_file(published.span.start), to_file(published.span.end));
            published.e0_volts.relocate(to_file);
            published.source.relocate(to_file);
            if let Some(dedt) = &mut published.dedt_millivolts_per_kelvin {
                dedt.relocate(to_file);
            }
            if let Some(note) = &mut published.note {
                note.relocate(to_file);
            }
        }
    }
}

impl<T> Field<T> {
    /// Maps the span, the content start and every escape's file offset through `to_file`.
    pub fn relocate(&mut self, to_file: &dyn Fn(usize) -> usize) {
        self.span = Span::new(to_file(self.span.start), to_file(self.span.end));
        self.content_start = self.content_start.map(to_file);
        for (_, file) in &mut self.escapes {
            *file = to_file(*file);
        }
    }
}

fn read_toml_whole(text: &str) -> CoupleFile {
    let mut file = CoupleFile {
        format: FileFormat::Toml,
        // The caller stores the text it owns.
        text: String::new(),
        records: Vec::new(),
        problems: Vec::new(),
        unknown_keys: Vec::new(),
    };
    let (document, errors) = DeTable::parse_recoverable(text);
    for error in &errors {
        let range = error.span().unwrap_or(0..0);
        file.problems.push(ReadProblem {
            kind: ProblemKind::Syntax,
            key: None,
            message: first_line_lower(error.message()),
            span: Span::new(range.start, range.end),
            record: None,
        });
    }
    for (key, value) in document.get_ref().iter() {
        if key.get_ref() != "couple" {
            file.unknown_keys.push(string_field(text, key));
            continue;
        }
        let Some(array) = value.get_ref().as_array() else {
            file.problems.push(ReadProblem {
                kind: ProblemKind::WrongType,
                key: None,
                message: format!(
                    "'couple' must be an array of tables ([[couple]]), found {}",
                    value.get_ref().type_str()
                ),
                span: span_of(value),
                record: None,
            });
            continue;
        };
        for item in array.iter() {
            let index = file.records.len();
            match item.get_ref().as_table() {
                Some(table) => {
                    let record = toml_record(text, index, span_of(item), table, &mut file);
                    file.records.push(record);
                }
                None => file.problems.push(ReadProblem {
                    kind: ProblemKind::WrongType,
                    key: None,
                    message: format!(
                        "each couple must be a table, found {}",
                        item.get_ref().type_str()
                    ),
                    span: span_of(item),
                    record: None,
                }),
            }
        }
    }
    file
}

fn string_field(text: &str, key: &Spanned<Cow<'_, str>>) -> Field<String> {
    let span = span_of(key);
    let (content_start, escapes) = match content_mapping(text, span, key.get_ref()) {
        Some((start, escapes)) => (Some(start), escapes),
        // A bare key is written without quotes.
        None => (
            Some(span.start).filter(|_| text.get(span.start..span.end) == Some(key.get_ref())),
            Vec::new(),
        ),
    };
    Field {
        value: key.get_ref().to_string(),
        content_start,
        escapes,
        span,
    }
}

fn toml_record(
    text: &str,
    index: usize,
    span: Span,
    table: &DeTable<'_>,
    file: &mut CoupleFile,
) -> CoupleRecord {
    let mut record = CoupleRecord {
        index,
        span,
        ..CoupleRecord::default()
    };
    let wrong_type = |key: &str, expected: &str, value: &Spanned<DeValue<'_>>| ReadProblem {
        kind: ProblemKind::WrongType,
        key: Some(key.to_owned()),
        message: format!(
            "'{key}' must be {expected}, found {}",
            value.get_ref().type_str()
        ),
        span: span_of(value),
        record: Some(index),
    };
    let mut problems = Vec::new();
    for (key, value) in table.iter() {
        let name = key.get_ref().as_ref();
        let value_span = span_of(value);
        match name {
            "e0" | "dedt" => match toml_number(value.get_ref()) {
                Some(number) => {
                    let field = Some(Field {
                        value: number,
                        span: value_span,
                        content_start: None,
                        escapes: Vec::new(),
                    });
                    if name == "e0" {
                        record.e0_volts = field;
                    } else {
                        record.dedt_millivolts_per_kelvin = field;
                    }
                }
                None => problems.push(wrong_type(name, "a number", value)),
            },
            "verified" => match value.get_ref() {
                DeValue::Boolean(flag) => {
                    record.verified = Some(Field {
                        value: *flag,
                        span: value_span,
                        content_start: None,
                        escapes: Vec::new(),
                    });
                }
                _ => problems.push(wrong_type(name, "true or false", value)),
            },
            "id" | "reaction" | "medium" | "source" | "note" | "confirmed_by" => {
                match value.get_ref().as_str() {
                    Some(string) => {
                        let mapping = content_mapping(text, value_span, string);
                        let field = Some(Field {
                            value: string.to_owned(),
                            span: value_span,
                            content_start: mapping.as_ref().map(|m| m.0),
                            escapes: mapping.map(|m| m.1).unwrap_or_default(),
                        });
                        match name {
                            "id" => record.id = field,
                            "reaction" => record.reaction = field,
                            "medium" => record.medium = field,
                            "source" => record.source = field,
                            "confirmed_by" => record.confirmed_by = field,
                            _ => record.note = field,
                        }
                    }
                    None => problems.push(wrong_type(name, "a string", value)),
                }
            }
            "also_published" => match value.get_ref().as_array() {
                Some(items) => {
                    for item in items.iter() {
                        match published_record(text, index, item) {
                            Ok(published) => record.also_published.push(published),
                            Err(problem) => problems.push(problem),
                        }
                    }
                }
                None => problems.push(wrong_type(
                    name,
                    "an array of tables ({ e0 = ..., source = \"...\" })",
                    value,
                )),
            },
            _ => record.unknown_keys.push(string_field(text, key)),
        }
    }
    for key in REQUIRED_KEYS {
        if !table.iter().any(|(k, _)| k.get_ref() == key) {
            problems.push(missing_key(key, index, span));
        }
    }
    file.problems.extend(problems);
    record
}

/// One inline table of `also_published`: `e0` and `source` required, `dedt` and `note` optional,
/// nothing else (a misspelt key would silently drop what it holds).
fn published_record(
    text: &str,
    index: usize,
    item: &Spanned<DeValue<'_>>,
) -> Result<PublishedRecord, ReadProblem> {
    let span = span_of(item);
    let problem = |kind, message: String, span: Span| ReadProblem {
        kind,
        key: Some("also_published".to_owned()),
        message,
        span,
        record: Some(index),
    };
    let Some(table) = item.get_ref().as_table() else {
        return Err(problem(
            ProblemKind::WrongType,
            format!(
                "each value in 'also_published' must be a table {{ e0 = ..., source = \"...\" }}, found {}",
                item.get_ref().type_str()
            ),
            span,
        ));
    };
    let (mut e0, mut dedt, mut source, mut note) = (None, None, None, None);
    for (key, value) in table.iter() {
        let name = key.get_ref().as_ref();
        let value_span = span_of(value);
        let number = || {
            toml_number(value.get_ref())
                .map(|number| Field {
                    value: number,
                    span: value_span,
                    content_start: None,
                    escapes: Vec::new(),
                })
                .ok_or_else(|| {
                    problem(
                        ProblemKind::WrongType,
                        format!(
                            "'{name}' in 'also_published' must be a number, found {}",
                            value.get_ref().type_str()
                        ),
                        value_span,
                    )
                })
        };
        let string = || {
            value
                .get_ref()
                .as_str()
                .map(|string| {
                    let mapping = content_mapping(text, value_span, string);
                    Field {
                        value: string.to_owned(),
                        span: value_span,
                        content_start: mapping.as_ref().map(|m| m.0),
                        escapes: mapping.map(|m| m.1).unwrap_or_default(),
                    }
                })
                .ok_or_else(|| {
                    problem(
                        ProblemKind::WrongType,
                        format!(
                            "'{name}' in 'also_published' must be a string, found {}",
                            value.get_ref().type_str()
                        ),
                        value_span,
                    )
                })
        };
        match name {
            "e0" => e0 = Some(number()?),
            "dedt" => dedt = Some(number()?),
            "source" => source = Some(string()?),
            "note" => note = Some(string()?),
            other => {
                return Err(problem(
                    ProblemKind::WrongType,
                    format!(
                        "'also_published' values take only {}, not '{other}'",
                        PUBLISHED_KEYS.join(", ")
                    ),
                    span_of(key),
                ));
            }
        }
    }
    let missing = |key: &str| {
        problem(
            ProblemKind::MissingKey,
            format!("a value in 'also_published' has no '{key}'"),
            span,
        )
    };
    Ok(PublishedRecord {
        span,
        e0_volts: e0.ok_or_else(|| missing("e0"))?,
        dedt_millivolts_per_kelvin: dedt,
        source: source.ok_or_else(|| missing("source"))?,
        note,
    })
}

fn missing_key(key: &str, index: usize, span: Span) -> ReadProblem {
    // Point at the start of the entry only: a whole table is many lines.
    ReadProblem {
        kind: ProblemKind::MissingKey,
        key: Some(key.to_owned()),
        message: format!("couple {} has no '{key}'", index + 1),
        span: Span::new(span.start, span.start + 1),
        record: Some(index),
    }
}

fn first_line_lower(message: &str) -> String {
    let line = message.lines().next().unwrap_or("").trim();
    let line = line.trim_end_matches('.');
    let mut chars = line.chars();
    match chars.next() {
        Some(first) => first.to_lowercase().chain(chars).collect(),
        None => "invalid TOML".to_owned(),
    }
}

/// One field of a CSV row as written.
struct CsvField {
    /// The field in the file, quotes included.
    span: Span,
    /// The decoded text (quotes removed, `""` read as `"`).
    value: String,
    /// Where the text starts in the file when it maps one to one (no `""` inside).
    content_start: Option<usize>,
}

/// One CSV row: where it is and its fields.
struct CsvRow {
    span: Span,
    fields: Vec<CsvField>,
}

/// The rows of a CSV text with exact byte spans, read by hand rather than through a CSV
/// library so that every span is a position in the text itself: lines starting with `#` and
/// blank lines are skipped, `\r\n`, `\n` and `\r` all end a row, and a quoted field may hold
/// commas, quotes written `""` and line breaks. An unterminated quote is returned as a problem
/// (the rows before it are kept).
fn csv_rows(text: &str) -> (Vec<CsvRow>, Option<ReadProblem>) {
    let bytes = text.as_bytes();
    let mut rows = Vec::new();
    let mut i = 0;
    while let Some(start) = next_row(text, i) {
        i = start;
        let row_start = i;
        let mut fields = Vec::new();
        loop {
            let field_start = i;
            let field = if bytes.get(i) == Some(&b'"') {
                let mut value = String::new();
                let mut clean = true;
                let mut closed = false;
                i += 1;
                while i < bytes.len() {
                    let next = text[i..].find('"').map_or(bytes.len(), |n| i + n);
                    value.push_str(&text[i..next]);
                    i = next;
                    if i >= bytes.len() {
                        break;
                    }
                    if bytes.get(i + 1) == Some(&b'"') {
                        value.push('"');
                        clean = false;
                        i += 2;
                        continue;
                    }
                    i += 1;
                    closed = true;
                    break;
                }
                if !closed {
                    let problem = ReadProblem {
                        kind: ProblemKind::Syntax,
                        key: None,
                        message: "a quoted field is never closed: add the closing '\"'".to_owned(),
                        span: Span::new(field_start, field_start + 1),
                        record: None,
                    };
                    return (rows, Some(problem));
                }
                // Text after the closing quote belongs to the field, as written.
                let rest_end = text[i..]
                    .find([',', '\n', '\r'])
                    .map_or(bytes.len(), |n| i + n);
                if rest_end > i {
                    value.push_str(&text[i..rest_end]);
                    clean = false;
                    i = rest_end;
                }
                CsvField {
                    span: Span::new(field_start, i),
                    value,
                    content_start: clean.then_some(field_start + 1),
                }
            } else {
                let field_end = text[i..]
                    .find([',', '\n', '\r'])
                    .map_or(bytes.len(), |n| i + n);
                i = field_end;
                CsvField {
                    span: Span::new(field_start, field_end),
                    value: text[field_start..field_end].to_owned(),
                    content_start: Some(field_start),
                }
            };
            fields.push(field);
            if bytes.get(i) == Some(&b',') {
                i += 1;
                continue;
            }
            break;
        }
        rows.push(CsvRow {
            span: Span::new(row_start, i),
            fields,
        });
        i = skip_line_break(bytes, i);
    }
    (rows, None)
}

/// The offset after the line break at `at` (`\r\n`, `\n` or `\r`), or `at` at the end.
/// Where the next CSV row starts at or after `i`, comment lines (`#`) and blank lines skipped;
/// `None` at the end of the text.
fn next_row(text: &str, mut i: usize) -> Option<usize> {
    let bytes = text.as_bytes();
    while i < bytes.len() {
        let line_end = text[i..].find(['\n', '\r']).map_or(bytes.len(), |n| i + n);
        let line = &text[i..line_end];
        if !(line.trim().is_empty() || line.starts_with('#')) {
            return Some(i);
        }
        i = skip_line_break(bytes, line_end);
    }
    None
}

fn skip_line_break(bytes: &[u8], at: usize) -> usize {
    match (bytes.get(at), bytes.get(at + 1)) {
        (Some(b'\r'), Some(b'\n')) => at + 2,
        (Some(b'\r' | b'\n'), _) => at + 1,
        _ => at,
    }
}

fn read_csv(text: &str) -> CoupleFile {
    let mut file = CoupleFile {
        format: FileFormat::Csv,
        // The caller stores the text it owns.
        text: String::new(),
        records: Vec::new(),
        problems: Vec::new(),
        unknown_keys: Vec::new(),
    };
    let (rows, problem) = csv_rows(text);
    let mut rows = rows.into_iter();
    let Some(header) = rows.next() else {
        file.problems.extend(problem);
        return file;
    };
    let columns: Vec<String> = header
        .fields
        .iter()
        .map(|f| f.value.trim().to_owned())
        .collect();
    // A column named twice would let one value silently win over the other: an error, and
    // only the first column of that name is read.
    let mut read_column = vec![true; columns.len()];
    for (i, name) in columns.iter().enumerate() {
        let field = &header.fields[i];
        if let Some(first) = columns[..i].iter().position(|n| n == name && !n.is_empty()) {
            read_column[i] = false;
            file.problems.push(ReadProblem {
                kind: ProblemKind::Syntax,
                key: Some(name.clone()),
                message: format!(
                    "column '{name}' is named twice in the header (columns {} and {}): name each column once",
                    first + 1,
                    i + 1
                ),
                span: field.span,
                record: None,
            });
            continue;
        }
        if !KNOWN_KEYS.contains(&name.as_str()) {
            file.unknown_keys.push(Field {
                value: name.clone(),
                span: field.span,
                content_start: field.content_start,
                escapes: Vec::new(),
            });
        }
    }
    for key in REQUIRED_KEYS {
        if !columns.iter().any(|n| n == key) {
            file.problems.push(ReadProblem {
                kind: ProblemKind::MissingKey,
                key: Some(key.to_owned()),
                message: format!("the header row has no '{key}' column"),
                span: header.span,
                record: None,
            });
        }
    }
    for row in rows {
        let index = file.records.len();
        let mut record = CoupleRecord {
            index,
            span: row.span,
            ..CoupleRecord::default()
        };
        if row.fields.len() != columns.len() {
            file.problems.push(ReadProblem {
                kind: ProblemKind::Syntax,
                key: None,
                message: format!(
                    "row has {} fields, the header has {}",
                    row.fields.len(),
                    columns.len()
                ),
                span: row.span,
                record: Some(index),
            });
        }
        let mut wrong_type = false;
        for ((name, cell), _) in columns
            .iter()
            .zip(row.fields)
            .zip(&read_column)
            .filter(|(_, read)| **read)
        {
            // An empty cell is an absent key: spreadsheets have no other way to leave one out.
            if cell.value.trim().is_empty() {
                continue;
            }
            let span = cell.span;
            let number_field = |value: f64| Field {
                value,
                span,
                content_start: None,
                escapes: Vec::new(),
            };
            match name.as_str() {
                "verified" => match cell.value.trim() {
                    "true" | "false" => {
                        record.verified = Some(Field {
                            value: cell.value.trim() == "true",
                            span,
                            content_start: None,
                            escapes: Vec::new(),
                        })
                    }
                    other => file.problems.push(ReadProblem {
                        kind: ProblemKind::WrongType,
                        key: Some(name.clone()),
                        message: format!("'{name}' must be true or false, found '{other}'"),
                        span,
                        record: Some(index),
                    }),
                },
                "e0" | "dedt" => match cell.value.trim().parse::<f64>() {
                    Ok(number) => {
                        if name == "e0" {
                            record.e0_volts = Some(number_field(number));
                        } else {
                            record.dedt_millivolts_per_kelvin = Some(number_field(number));
                        }
                    }
                    Err(_) => {
                        wrong_type = true;
                        file.problems.push(ReadProblem {
                            kind: ProblemKind::WrongType,
                            key: Some(name.clone()),
                            message: format!(
                                "'{name}' must be a number, found '{}'",
                                cell.value.trim()
                            ),
                            span,
                            record: Some(index),
                        });
                    }
                },
                "id" | "reaction" | "medium" | "source" | "note" | "confirmed_by" => {
                    let field = Some(Field {
                        value: cell.value,
                        span,
                        content_start: cell.content_start,
                        escapes: Vec::new(),
                    });
                    match name.as_str() {
                        "id" => record.id = field,
                        "reaction" => record.reaction = field,
                        "medium" => record.medium = field,
                        "source" => record.source = field,
                        "confirmed_by" => record.confirmed_by = field,
                        _ => record.note = field,
                    }
                }
                "also_published" => file.problems.push(ReadProblem {
                    kind: ProblemKind::WrongType,
                    key: Some(name.clone()),
                    message: "'also_published' is read from TOML files only (an array of tables per couple): move these couples to a .toml file".to_owned(),
                    span,
                    record: Some(index),
                }),
                _ => {}
            }
        }
        for key in REQUIRED_KEYS {
            let present = match key {
                "reaction" => record.reaction.is_some(),
                _ => record.e0_volts.is_some() || wrong_type,
            };
            if !present && columns.iter().any(|c| c == key) {
                file.problems.push(missing_key(key, index, record.span));
            }
        }
        file.records.push(record);
    }
    file.problems.extend(problem);
    file
}

#[cfg(test)]
mod tests {
    use super::*;

    fn slice(file: &CoupleFile, span: Span) -> &str {
        &file.text[span.start..span.end]
    }

    /// Where to cut, worked out line by line as the definition says: the vectorised scan must
    /// find the same starts and the same reasons at the same offsets.
    #[test]
    fn couple_starts_are_found_where_the_lines_say() {
        fn by_lines(text: &str) -> Result<Vec<usize>, Uncuttable> {
            for quotes in ["'''", "\"\"\""] {
                if let Some(offset) = text.find(quotes) {
                    return Err(Uncuttable {
                        offset,
                        reason: "a multi-line string",
                    });
                }
            }
            let mut starts = Vec::new();
            let mut offset = 0;
            for line in text.split_inclusive('\n') {
                let trimmed = line.trim_start();
                if trimmed.starts_with('[') {
                    if !is_couple_header(trimmed) {
                        return Err(Uncuttable {
                            offset: offset + line.len() - trimmed.len(),
                            reason: "a table header other than [[couple]]",
                        });
                    }
                    starts.push(offset);
                }
                offset += line.len();
            }
            Ok(starts)
        }
        let pieces = [
            "[[couple]]\n",
            "  [[couple]] # note\n",
            "id = \"a\"\n",
            "\n",
            "   \n",
            "\t[[couple]]\r\n",
            "[table]\n",
            "x = '''y'''\n",
            "z = \"\"\"\n",
            "# [[couple]]\n",
            "[[couple]]x\n",
            "[[couple]]",
        ];
        let mut seed: u64 = 5;
        for _ in 0..3000 {
            let mut text = String::new();
            for _ in 0..6 {
                seed = seed
                    .wrapping_mul(6364136223846793005)
                    .wrapping_add(1442695040888963407);
                text.push_str(pieces[(seed >> 33) as usize % pieces.len()]);
            }
            assert_eq!(toml_couple_starts(&text), by_lines(&text), "{text:?}");
        }
    }

    #[test]
    fn toml_values_keep_their_spans() {
        let text = "[[couple]]\nid = \"zn2+/zn\"\nreaction = \"Zn2+ + 2 e- -> Zn(s)\"\ne0 = -0.7618\ncolour = \"grey\"\n";
        let file = CoupleFile::from_text(text, FileFormat::Toml);
        assert!(file.problems.is_empty(), "{:?}", file.problems);
        let record = &file.records[0];
        let reaction = record.reaction.as_ref().unwrap();
        assert_eq!(slice(&file, reaction.span), "\"Zn2+ + 2 e- -> Zn(s)\"");
        assert_eq!(&text[reaction.file_offset(7)..reaction.file_offset(8)], "2");
        let e0 = record.e0_volts.as_ref().unwrap();
        assert_eq!(e0.value, -0.7618);
        assert_eq!(slice(&file, e0.span), "-0.7618");
        assert_eq!(record.unknown_keys[0].value, "colour");
        assert_eq!(slice(&file, record.unknown_keys[0].span), "colour");
    }

    #[test]
    fn offsets_inside_escaped_strings_map_to_the_written_characters() {
        // `\u002D` is one byte in the value and six in the file; `\\` one and two.
        let text = "[[couple]]\nreaction = \"Ag+ + e- \\u002D> A\\\\g(s) + Xx\"\ne0 = 0.8\nnote = \"\"\"\nab \\\n   cd\"\"\"\n";
        let file = CoupleFile::from_text(text, FileFormat::Toml);
        assert!(file.problems.is_empty(), "{:?}", file.problems);
        let reaction = file.records[0].reaction.as_ref().unwrap();
        assert_eq!(reaction.value, "Ag+ + e- -> A\\g(s) + Xx");
        let xx = reaction.value.find("Xx").unwrap();
        assert_eq!(
            &text[reaction.file_offset(xx)..reaction.file_offset(xx + 2)],
            "Xx"
        );
        let arrow = reaction.value.find("->").unwrap();
        assert_eq!(&text[reaction.file_offset(arrow)..][..6], "\\u002D");
        let note = file.records[0].note.as_ref().unwrap();
        assert_eq!(note.value, "ab cd");
        let cd = note.value.find("cd").unwrap();
        assert_eq!(&text[note.file_offset(cd)..note.file_offset(cd + 2)], "cd");
    }

    #[test]
    fn toml_wrong_types_and_missing_keys_are_problems_not_failures() {
        let text =
            "[[couple]]\nreaction = \"Ag+ + e- -> Ag(s)\"\ne0 = \"0.80\"\n\n[[couple]]\ne0 = 0\n";
        let file = CoupleFile::from_text(text, FileFormat::Toml);
        assert_eq!(file.records.len(), 2);
        let kinds: Vec<_> = file.problems.iter().map(|p| p.kind).collect();
        assert_eq!(kinds, [ProblemKind::WrongType, ProblemKind::MissingKey]);
        assert_eq!(slice(&file, file.problems[0].span), "\"0.80\"");
        assert_eq!(file.records[1].e0_volts.as_ref().unwrap().value, 0.0);
    }

    #[test]
    fn toml_syntax_errors_are_located() {
        let text = "[[couple]]\nreaction = \"Ag+ + e- -> Ag(s)\ne0 = 0.7996\n";
        let file = CoupleFile::from_text(text, FileFormat::Toml);
        let problem = &file.problems[0];
        assert_eq!(problem.kind, ProblemKind::Syntax);
        assert_eq!(file.line_column(problem.span.start).0, 2);
    }

    #[test]
    fn invalid_utf8_is_a_syntax_problem_at_the_byte() {
        let file = CoupleFile::from_bytes(b"[[couple]]\nid = \"\xff\"\n", FileFormat::Toml);
        assert_eq!(file.problems[0].kind, ProblemKind::Syntax);
        assert_eq!(file.problems[0].span.start, 17);
    }

    #[test]
    fn a_large_file_read_in_pieces_reads_like_the_whole() {
        // Invented entries, enough for several pieces; one escape, one wrong type, one
        // unknown key, so that every kind of span is shifted.
        let mut text = String::from("# invented\ntitle = \"t\"\n");
        let mut k = 0;
        while text.len() < PIECEWISE_FROM_BYTES + 200_000 {
            let e0 = if k == 2500 { "\"0.8\"" } else { "0.7996" };
            text.push_str(&format!(
                "\n[[couple]]\nid = \"ag-{k}\"\nreaction = \"Ag+ + e- \\u002D> Ag(s)\"\ne0 = {e0}\ncolour = \"x\"\n"
            ));
            k += 1;
        }
        let pieces = read_toml_in_pieces(&text).expect("safe to read in pieces");
        let whole = read_toml_whole(&text);
        assert!(pieces.records.len() > 2 * COUPLES_PER_PIECE);
        assert_eq!(pieces.records, whole.records);
        assert_eq!(pieces.problems, whole.problems);
        assert_eq!(pieces.unknown_keys, whole.unknown_keys);
        // A line starting with `[` that is not a couple header: the whole file at once.
        assert!(read_toml_in_pieces(&format!("{text}[other]\nx = 1\n")).is_none());
    }

    #[test]
    fn csv_spans_hold_after_comments_blank_lines_and_crlf() {
        // Invented rows: a comment, blank lines and CRLF endings before and between rows.
        let text = "# invented\r\n\r\nid,reaction,e0\r\n# between\r\n\r\nx,\"Ag+ + e- -> Ag(s)\",0.8\r\n  \r\ny,Cu2+ + 2 e- -> Cu(s),abc\r\n";
        let file = CoupleFile::from_text(text, FileFormat::Csv);
        assert_eq!(file.records.len(), 2);
        let reaction = file.records[0].reaction.as_ref().unwrap();
        assert_eq!(slice(&file, reaction.span), "\"Ag+ + e- -> Ag(s)\"");
        assert_eq!(file.line_column(reaction.span.start), (6, 3));
        let second = file.records[1].reaction.as_ref().unwrap();
        assert_eq!(slice(&file, second.span), "Cu2+ + 2 e- -> Cu(s)");
        assert_eq!(file.line_column(second.span.start).0, 8);
        assert_eq!(slice(&file, file.problems[0].span), "abc");
        assert_eq!(
            slice(&file, file.records[0].span),
            "x,\"Ag+ + e- -> Ag(s)\",0.8"
        );
    }

    #[test]
    fn csv_quoted_fields_hold_commas_quotes_and_line_breaks() {
        let text = "id,reaction,e0,note\na,\"Ag+ + e- -> Ag(s)\",0.8,\"says \"\"hi\"\",\nthen more\"\nb,\"Cu2+ + 2 e- -> Cu(s)\",0.34,\n";
        let file = CoupleFile::from_text(text, FileFormat::Csv);
        assert!(file.problems.is_empty(), "{:?}", file.problems);
        assert_eq!(file.records.len(), 2);
        assert_eq!(
            file.records[0].note.as_ref().unwrap().value,
            "says \"hi\",\nthen more"
        );
        assert_eq!(file.records[1].e0_volts.as_ref().unwrap().value, 0.34);
        let unterminated =
            CoupleFile::from_text("id,reaction,e0\na,\"Ag+ -> Ag\n", FileFormat::Csv);
        assert_eq!(unterminated.problems.len(), 1);
        assert_eq!(unterminated.problems[0].kind, ProblemKind::Syntax);
        assert_eq!(unterminated.problems[0].span.start, 17);
    }

    #[test]
    fn a_csv_column_named_twice_is_an_error_at_the_second() {
        let text = "reaction,e0,e0\nAg+ + e- -> Ag(s),0.80,0.10\n";
        let file = CoupleFile::from_text(text, FileFormat::Csv);
        let problem = &file.problems[0];
        assert_eq!(problem.kind, ProblemKind::Syntax);
        assert_eq!(problem.span, Span::new(12, 14));
        assert!(
            problem.message.contains("columns 2 and 3"),
            "{}",
            problem.message
        );
        // The first column is the one read.
        assert_eq!(file.records[0].e0_volts.as_ref().unwrap().value, 0.80);
    }

    #[test]
    fn csv_rows_read_like_toml_tables() {
        let text = "# our own test rows\nid,reaction,e0,colour\nag+/ag,\"Ag+ + e- -> Ag(s)\",0.7996,x\nbad,\"Cu2+ + 2 e- -> Cu(s)\",abc,\n";
        let file = CoupleFile::from_text(text, FileFormat::Csv);
        assert_eq!(file.records.len(), 2);
        assert_eq!(file.unknown_keys[0].value, "colour");
        let reaction = file.records[0].reaction.as_ref().unwrap();
        assert_eq!(reaction.value, "Ag+ + e- -> Ag(s)");
        assert_eq!(slice(&file, reaction.span), "\"Ag+ + e- -> Ag(s)\"");
        assert_eq!(
            &text[reaction.file_offset(0)..reaction.file_offset(3)],
            "Ag+"
        );
        assert_eq!(file.records[0].e0_volts.as_ref().unwrap().value, 0.7996);
        assert_eq!(file.problems.len(), 1);
        assert_eq!(file.problems[0].kind, ProblemKind::WrongType);
        assert_eq!(slice(&file, file.problems[0].span), "abc");
    }
}

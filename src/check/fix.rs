//! Applying the checker's fixes: the new text of a file with only the fixed `reaction` values
//! changed (TOML through toml_edit, which keeps comments, key order and formatting; CSV by
//! replacing the one field), a unified diff for `--dry-run`, and writing every file through a
//! temporary file that is renamed over the original only when all were written.

use super::Fix;
use crate::table::{CoupleFile, FileFormat};
use std::io::Write;
use std::path::{Path, PathBuf};

/// Why a file could not be fixed.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum FixError {
    /// toml_edit could not read what the checker's reader read (never expected: the checker
    /// only fixes files without syntax errors).
    #[error("cannot edit the file: {0}")]
    Edit(String),
    /// The couple to fix was not found where the reader saw it.
    #[error("couple {0} was not found for editing")]
    NotFound(usize),
    /// Reading the rewritten text back did not give the fixed values: nothing is written.
    #[error("the rewritten file does not read back as intended")]
    ReadBack,
    /// Writing failed; nothing was renamed over an original.
    #[error("{path}: cannot write: {source}")]
    Write {
        /// The file.
        path: String,
        /// Why.
        source: std::io::Error,
    },
}

/// A reaction text as the file format writes a value: a TOML string, or a CSV field (quoted when
/// it needs to be).
pub fn written_value(format: FileFormat, reaction: &str) -> String {
    match format {
        FileFormat::Toml => toml_edit::Value::from(reaction).to_string(),
        FileFormat::Csv => csv_field(reaction, false),
    }
}

fn csv_field(text: &str, was_quoted: bool) -> String {
    if was_quoted || text.contains([',', '"', '\n', '\r']) || text.trim() != text {
        format!("\"{}\"", text.replace('"', "\"\""))
    } else {
        text.to_owned()
    }
}

/// The text of `file` with the given fixes applied and nothing else changed.
pub fn apply(file: &CoupleFile, fixes: &[&Fix]) -> Result<String, FixError> {
    if fixes.is_empty() {
        return Ok(file.text.clone());
    }
    let text = match file.format {
        FileFormat::Toml => apply_toml(&file.text, fixes)?,
        FileFormat::Csv => apply_csv(file, fixes)?,
    };
    let reread = CoupleFile::from_text(&text, file.format);
    let reads_back = reread.records.len() == file.records.len()
        && fixes.iter().all(|fix| {
            reread
                .records
                .get(fix.record)
                .and_then(|r| r.reaction.as_ref())
                .is_some_and(|r| r.value == fix.reaction)
        });
    if !reads_back {
        return Err(FixError::ReadBack);
    }
    Ok(text)
}

fn replace_keeping_decor(value: &mut toml_edit::Value, text: &str) {
    let decor = value.decor().clone();
    let mut new = toml_edit::Value::from(text);
    *new.decor_mut() = decor;
    *value = new;
}

fn apply_toml(text: &str, fixes: &[&Fix]) -> Result<String, FixError> {
    let mut document: toml_edit::DocumentMut = text
        .parse()
        .map_err(|e: toml_edit::TomlError| FixError::Edit(e.message().to_owned()))?;
    let couples = document
        .get_mut("couple")
        .ok_or(FixError::NotFound(fixes[0].record))?;
    // The reader numbers the couples that are tables, in file order.
    let mut targets: Vec<Option<&mut toml_edit::Value>> = Vec::new();
    if couples.is_array_of_tables() {
        let tables = couples
            .as_array_of_tables_mut()
            .ok_or(FixError::NotFound(fixes[0].record))?;
        for table in tables.iter_mut() {
            targets.push(table.get_mut("reaction").and_then(|i| i.as_value_mut()));
        }
    } else if let Some(array) = couples.as_array_mut() {
        for item in array.iter_mut() {
            if let Some(table) = item.as_inline_table_mut() {
                targets.push(table.get_mut("reaction"));
            }
        }
    }
    for fix in fixes {
        let value = targets
            .get_mut(fix.record)
            .and_then(|t| t.as_deref_mut())
            .ok_or(FixError::NotFound(fix.record))?;
        replace_keeping_decor(value, &fix.reaction);
    }
    Ok(document.to_string())
}

fn apply_csv(file: &CoupleFile, fixes: &[&Fix]) -> Result<String, FixError> {
    let mut edits: Vec<(usize, usize, String)> = Vec::new();
    for fix in fixes {
        let field = file
            .records
            .get(fix.record)
            .and_then(|r| r.reaction.as_ref())
            .ok_or(FixError::NotFound(fix.record))?;
        let written = &file.text[field.span.start..field.span.end];
        edits.push((
            field.span.start,
            field.span.end,
            csv_field(&fix.reaction, written.starts_with('"')),
        ));
    }
    // From the end, so earlier offsets stay valid.
    edits.sort_by_key(|e| std::cmp::Reverse(e.0));
    let mut text = file.text.clone();
    for (start, end, replacement) in edits {
        text.replace_range(start..end, &replacement);
    }
    Ok(text)
}

/// A unified diff from `old` to `new`, with `path` in the headers (empty when equal).
pub fn unified_diff(path: &str, old: &str, new: &str) -> String {
    if old == new {
        return String::new();
    }
    similar::TextDiff::from_lines(old, new)
        .unified_diff()
        .context_radius(2)
        .header(&format!("a/{path}"), &format!("b/{path}"))
        .to_string()
}

/// Writes every file to a temporary file beside it, then renames each over its original. When
/// any write fails, every temporary file is removed and no original is touched.
pub fn write_all(files: &[(PathBuf, String)]) -> Result<(), FixError> {
    let mut staged = Vec::new();
    for (path, text) in files {
        let error = |source| FixError::Write {
            path: path.display().to_string(),
            source,
        };
        let dir = path
            .parent()
            .filter(|d| !d.as_os_str().is_empty())
            .unwrap_or(Path::new("."));
        let mut temp = tempfile::NamedTempFile::new_in(dir).map_err(error)?;
        temp.write_all(text.as_bytes()).map_err(error)?;
        temp.as_file().sync_all().map_err(error)?;
        if let Ok(metadata) = std::fs::metadata(path) {
            temp.as_file()
                .set_permissions(metadata.permissions())
                .map_err(error)?;
        }
        staged.push((temp, path));
    }
    // Dropping `staged` on an early return removes the temporary files.
    for (temp, path) in staged {
        temp.persist(path).map_err(|e| FixError::Write {
            path: path.display().to_string(),
            source: e.error,
        })?;
    }
    Ok(())
}

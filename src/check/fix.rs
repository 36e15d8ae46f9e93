//! Applying the checker's fixes: the new text of a file with only the fixed `reaction` values
//! changed (TOML through toml_edit, which keeps comments, key order and formatting; CSV by
//! replacing the one field), a unified diff for `--dry-run`, and writing every file through a
//! temporary file that is renamed over the original only when all were written.
//!
//! What a fix will not do, each refused with the file named and nothing written:
//! - overwrite a file that changed since it was read (a couple appended meanwhile would be
//!   lost): the original is read again just before the renames and compared byte for byte;
//! - write a read-only file;
//! - split a hard link: renaming a new file over one name would leave the other names with
//!   the old text, so a file with more than one link is refused (fix the file by hand, or
//!   copy it to break the link on purpose).
//!
//! A symbolic link is followed: its target is fixed and the link stays a link. Temporary files
//! are named `.<file>.couplet-fix-<random>.tmp` beside the target, so that a run killed
//! between write and rename leaves something recognisable; such leftovers older than
//! [`STALE_TEMPORARY`] are removed by the next fix of the same file.

use super::{Fix, SourceFile};
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
    /// The file changed after it was read; nothing was written.
    #[error("{path}: changed while it was being fixed; run the fix again")]
    Changed {
        /// The file.
        path: String,
    },
    /// The file is read-only; nothing was written.
    #[error("{path}: is read-only; make it writable to fix it")]
    ReadOnly {
        /// The file.
        path: String,
    },
    /// The file has several hard links; nothing was written.
    #[error(
        "{path}: has {links} hard links, and a fix would split them (the other names would keep the old text); fix it by hand"
    )]
    HardLinked {
        /// The file.
        path: String,
        /// Its link count.
        links: u64,
    },
    /// Writing failed; nothing was renamed over an original.
    #[error("{path}: cannot write: {source}")]
    Write {
        /// The file.
        path: String,
        /// Why.
        source: std::io::Error,
    },
}

/// A reaction text as the file format writes a value in place of `written` (the value as it
/// is written now, quotes included): a TOML string in the same quoting style where the text
/// allows it (a literal `'…'` string stays literal), or a CSV field quoted when it was or
/// needs to be.
pub fn written_value(format: FileFormat, written: &str, reaction: &str) -> String {
    match format {
        FileFormat::Toml => toml_string_like(written, reaction),
        FileFormat::Csv => csv_field(reaction, written.starts_with('"')),
    }
}

fn toml_string_like(written: &str, text: &str) -> String {
    let literal_fits = !text.contains('\'') && !text.chars().any(|c| c.is_control() && c != '\t');
    for quote in ["'''", "'"] {
        if written.starts_with(quote) && literal_fits {
            return format!("{quote}{text}{quote}");
        }
    }
    toml_edit::Value::from(text).to_string()
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

/// The text of `source` with the given fixes applied: [`apply`] for a file whose records are
/// kept. A file read in pieces holds only plain `[[couple]]` tables (TOML) or rows (CSV), so
/// each reaction value is replaced where it is written, in the quoting style it had, and the
/// new text is read back piece by piece: the same number of couples, each fixed one reading
/// as intended.
pub fn apply_source(source: &SourceFile, fixes: &[&Fix]) -> Result<String, FixError> {
    if !source.is_in_pieces() {
        return apply(&source.file, fixes);
    }
    let file = &source.file;
    let mut edits = Vec::with_capacity(fixes.len());
    for fix in fixes {
        let written = file
            .text
            .get(fix.span.start..fix.span.end)
            .ok_or(FixError::NotFound(fix.record))?;
        edits.push((
            fix.span.start,
            fix.span.end,
            written_value(file.format, written, &fix.reaction),
        ));
    }
    // From the end, so earlier offsets stay valid.
    edits.sort_by_key(|e| std::cmp::Reverse(e.0));
    let mut text = file.text.clone();
    for (start, end, replacement) in edits {
        text.replace_range(start..end, &replacement);
    }
    let reread = SourceFile::in_pieces(source.name.clone(), text, file.format)
        .map_err(|_| FixError::ReadBack)?;
    let wanted: std::collections::HashMap<usize, &str> = fixes
        .iter()
        .map(|f| (f.record, f.reaction.as_str()))
        .collect();
    let mut reads_back = reread.couples() == source.couples();
    reread.for_each_record(|record| {
        if let Some(reaction) = wanted.get(&record.index) {
            reads_back &= record
                .reaction
                .as_ref()
                .is_some_and(|r| r.value == *reaction);
        }
    });
    if !reads_back {
        return Err(FixError::ReadBack);
    }
    Ok(reread.file.text)
}

fn replace_keeping_decor(value: &mut toml_edit::Value, text: &str) {
    let decor = value.decor().clone();
    let written = match value {
        toml_edit::Value::String(formatted) => formatted
            .as_repr()
            .and_then(|repr| repr.as_raw().as_str())
            .unwrap_or("")
            .to_owned(),
        _ => String::new(),
    };
    let mut new = toml_string_like(&written, text)
        .parse::<toml_edit::Value>()
        .unwrap_or_else(|_| toml_edit::Value::from(text));
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

/// How old a leftover temporary file of a killed fix must be before a later fix removes it
/// (a running fix keeps its temporary file for milliseconds).
pub const STALE_TEMPORARY: std::time::Duration = std::time::Duration::from_secs(600);

/// One file to rewrite: where, the text it held when it was read, and the new text.
#[derive(Clone, Debug)]
pub struct Rewrite {
    /// The path as given (a symbolic link is followed to its target).
    pub path: PathBuf,
    /// The text the checker read and the fix was computed from.
    pub original: String,
    /// The fixed text.
    pub text: String,
}

fn temporary_prefix(target: &Path) -> String {
    let name = target
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    format!(".{name}.couplet-fix-")
}

/// Removes leftovers of killed fixes of `target` (named by [`temporary_prefix`], older than
/// [`STALE_TEMPORARY`]). Best effort: a leftover that cannot be removed is left.
fn remove_stale_temporaries(dir: &Path, target: &Path) {
    let prefix = temporary_prefix(target);
    let Ok(entries) = std::fs::read_dir(dir) else {
        return;
    };
    for entry in entries.flatten() {
        let name = entry.file_name();
        let name = name.to_string_lossy();
        if !(name.starts_with(&prefix) && name.ends_with(".tmp")) {
            continue;
        }
        let stale = entry
            .metadata()
            .ok()
            .filter(|m| m.is_file())
            .and_then(|m| m.modified().ok())
            .and_then(|t| t.elapsed().ok())
            .is_some_and(|age| age > STALE_TEMPORARY);
        if stale {
            let _ = std::fs::remove_file(entry.path());
        }
    }
}

/// Whether the file at `target` still holds exactly `original`, read with a bound so that a
/// file grown huge meanwhile is not read whole.
fn unchanged(target: &Path, original: &str) -> std::io::Result<bool> {
    use std::io::Read;
    let mut now = Vec::with_capacity(original.len() + 1);
    std::fs::File::open(target)?
        .take(original.len() as u64 + 1)
        .read_to_end(&mut now)?;
    Ok(now == original.as_bytes())
}

#[cfg(unix)]
fn link_count(metadata: &std::fs::Metadata) -> u64 {
    use std::os::unix::fs::MetadataExt;
    metadata.nlink()
}

#[cfg(not(unix))]
fn link_count(_: &std::fs::Metadata) -> u64 {
    1
}

/// Writes every file to a temporary file beside its target, checks that no original changed
/// since it was read, then renames each over its original. When any step fails before the
/// renames, every temporary file is removed and no original is touched.
pub fn write_all(files: &[Rewrite]) -> Result<(), FixError> {
    let mut staged = Vec::new();
    for rewrite in files {
        let shown = rewrite.path.display().to_string();
        let error = |source| FixError::Write {
            path: shown.clone(),
            source,
        };
        // A symbolic link is followed: the target is what holds the couples.
        let target = std::fs::canonicalize(&rewrite.path).map_err(error)?;
        let metadata = std::fs::metadata(&target).map_err(error)?;
        if metadata.permissions().readonly() {
            return Err(FixError::ReadOnly { path: shown });
        }
        let links = link_count(&metadata);
        if links > 1 {
            return Err(FixError::HardLinked { path: shown, links });
        }
        let dir = target
            .parent()
            .filter(|d| !d.as_os_str().is_empty())
            .unwrap_or(Path::new("."))
            .to_path_buf();
        remove_stale_temporaries(&dir, &target);
        let mut temp = tempfile::Builder::new()
            .prefix(&temporary_prefix(&target))
            .suffix(".tmp")
            .tempfile_in(&dir)
            .map_err(error)?;
        temp.write_all(rewrite.text.as_bytes()).map_err(error)?;
        temp.as_file().sync_all().map_err(error)?;
        temp.as_file()
            .set_permissions(metadata.permissions())
            .map_err(error)?;
        staged.push((temp, target, rewrite));
    }
    // Dropping `staged` on an early return removes the temporary files.
    for (_, target, rewrite) in &staged {
        let same = unchanged(target, &rewrite.original).map_err(|source| FixError::Write {
            path: rewrite.path.display().to_string(),
            source,
        })?;
        if !same {
            return Err(FixError::Changed {
                path: rewrite.path.display().to_string(),
            });
        }
    }
    for (temp, target, rewrite) in staged {
        temp.persist(&target).map_err(|e| FixError::Write {
            path: rewrite.path.display().to_string(),
            source: e.error,
        })?;
    }
    Ok(())
}

//! Turning the paths a user gives into files to check: directories searched for `*.toml` and
//! `*.csv`, a size guard, binary files recognised before parsing.

use super::{Rule, SourceFile};
use crate::table::{CoupleFile, FileFormat};
use std::io::Read;
use std::path::{Path, PathBuf};

/// The largest file the checker reads: 32 MiB, about 200,000 couples (the couple-file
/// reader's own limit). Larger files are reported (rule `CPL106`) without being read, so
/// memory stays bounded.
pub const MAX_FILE_BYTES: u64 = crate::table::record::MAX_COUPLE_FILE_BYTES;

/// Why the checker could not run on a path (exit status 2).
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum LoadError {
    /// The path does not exist.
    #[error("{path}: no such file or directory")]
    Missing {
        /// As given.
        path: String,
    },
    /// The path is a FIFO, a device or a socket: reading it could block forever or never end.
    #[error("{path}: not a regular file (a pipe, device or socket): give a file or a directory")]
    NotRegular {
        /// As given.
        path: String,
    },
    /// The path exists but could not be read.
    #[error("{path}: cannot read: {source}")]
    Unreadable {
        /// As given.
        path: String,
        /// Why.
        source: std::io::Error,
    },
}

/// The files to check under the given paths: a file is taken as given; a directory is searched
/// (recursively, in name order, skipping names that start with `.`) for `*.toml` and `*.csv`.
/// Found files are returned with `true` (found under a directory), given files with `false`.
/// A file reached by two paths (`t.toml` and `./t.toml`, a directory and a file in it, a
/// symbolic link and its target) is returned once, under the first path that reached it, so
/// that its ids are not reported as used twice.
pub fn expand_paths(paths: &[PathBuf]) -> Result<Vec<(PathBuf, bool)>, LoadError> {
    let mut seen = std::collections::HashSet::new();
    let mut unique = Vec::new();
    for (path, under_directory) in expand_all(paths)? {
        let identity = std::fs::canonicalize(&path).unwrap_or_else(|_| path.clone());
        if seen.insert(identity) {
            unique.push((path, under_directory));
        }
    }
    Ok(unique)
}

fn expand_all(paths: &[PathBuf]) -> Result<Vec<(PathBuf, bool)>, LoadError> {
    let mut out = Vec::new();
    for path in paths {
        let metadata = std::fs::metadata(path).map_err(|source| match source.kind() {
            std::io::ErrorKind::NotFound => LoadError::Missing {
                path: path.display().to_string(),
            },
            _ => LoadError::Unreadable {
                path: path.display().to_string(),
                source,
            },
        })?;
        if metadata.is_dir() {
            walk(path, &mut out)?;
        } else {
            out.push((path.clone(), false));
        }
    }
    Ok(out)
}

fn walk(dir: &Path, out: &mut Vec<(PathBuf, bool)>) -> Result<(), LoadError> {
    let unreadable = |source| LoadError::Unreadable {
        path: dir.display().to_string(),
        source,
    };
    let mut entries: Vec<PathBuf> = std::fs::read_dir(dir)
        .map_err(unreadable)?
        .map(|e| e.map(|e| e.path()))
        .collect::<Result<_, _>>()
        .map_err(unreadable)?;
    entries.sort();
    for path in entries {
        let hidden = path
            .file_name()
            .and_then(|n| n.to_str())
            .is_some_and(|n| n.starts_with('.'));
        // symlink_metadata: a link is not followed, so a link loop cannot make the walk endless.
        let Ok(metadata) = std::fs::symlink_metadata(&path) else {
            continue;
        };
        if hidden {
            continue;
        }
        if metadata.is_dir() {
            walk(&path, out)?;
        } else if metadata.is_file() {
            let ext = path.extension().and_then(|e| e.to_str()).unwrap_or("");
            if ext.eq_ignore_ascii_case("toml") || ext.eq_ignore_ascii_case("csv") {
                out.push((path, true));
            }
        }
    }
    Ok(())
}

/// Reads one file for checking. Files over [`MAX_FILE_BYTES`] and binary files (a NUL byte)
/// come back with a load finding and no records.
pub fn load_file(path: &Path) -> Result<SourceFile, LoadError> {
    let name = path.display().to_string();
    let unreadable = |source| LoadError::Unreadable {
        path: name.clone(),
        source,
    };
    // Judged before opening: opening a FIFO for reading blocks until someone writes to it.
    let not_regular = || LoadError::NotRegular { path: name.clone() };
    if !std::fs::metadata(path).map_err(unreadable)?.is_file() {
        return Err(not_regular());
    }
    let handle = std::fs::File::open(path).map_err(unreadable)?;
    let metadata = handle.metadata().map_err(unreadable)?;
    if !metadata.is_file() {
        return Err(not_regular());
    }
    let size = metadata.len();
    let format = FileFormat::from_path(path);
    if size > MAX_FILE_BYTES {
        return Ok(SourceFile::unread(
            name,
            format,
            Rule::FileTooLarge,
            format!(
                "the file is {:.1} MiB; the checker reads files up to {} MiB: split the table into several files",
                size as f64 / 1024.0 / 1024.0,
                MAX_FILE_BYTES / 1024 / 1024
            ),
        ));
    }
    let mut bytes = Vec::with_capacity(size as usize);
    // take(): the file may grow between the size check and the read.
    handle
        .take(MAX_FILE_BYTES + 1)
        .read_to_end(&mut bytes)
        .map_err(unreadable)?;
    if bytes.len() as u64 > MAX_FILE_BYTES {
        return Ok(SourceFile::unread(
            name,
            format,
            Rule::FileTooLarge,
            format!(
                "the file grew past {} MiB while it was read: split the table into several files",
                MAX_FILE_BYTES / 1024 / 1024
            ),
        ));
    }
    Ok(source_from_owned_bytes(&name, bytes, format))
}

/// A file to check from bytes already in memory (binary files recognised by a NUL byte).
pub fn source_from_bytes(name: &str, bytes: &[u8], format: FileFormat) -> SourceFile {
    source_from_owned_bytes(name, bytes.to_vec(), format)
}

/// As [`source_from_bytes`], taking the bytes: valid UTF-8 becomes the file's text without a
/// copy (a 32 MiB file is held once, not twice).
fn source_from_owned_bytes(name: &str, bytes: Vec<u8>, format: FileFormat) -> SourceFile {
    if let Some(at) = bytes.iter().position(|&b| b == 0) {
        return SourceFile::unread(
            name,
            format,
            Rule::FileSyntax,
            format!("binary file (NUL byte at offset {at}): a couple file is text"),
        );
    }
    match String::from_utf8(bytes) {
        Ok(text) => SourceFile::new(name, CoupleFile::from_string(text, format)),
        Err(error) => SourceFile::new(name, CoupleFile::from_bytes(error.as_bytes(), format)),
    }
}

/// Whether a file found under a directory holds couples: TOML with a `couple` key (or that
/// cannot be read), CSV whose header names `reaction` or `e0`. Files given by name are always
/// checked.
pub fn looks_like_couple_file(source: &SourceFile) -> bool {
    if source.load_finding.is_some() {
        return true;
    }
    let file = &source.file;
    match file.format {
        FileFormat::Toml => !file.records.is_empty() || !file.problems.is_empty(),
        FileFormat::Csv => file
            .text
            .lines()
            .map(str::trim)
            .find(|l| !l.is_empty() && !l.starts_with('#'))
            .is_some_and(|header| {
                header
                    .split(',')
                    .map(|c| c.trim().trim_matches('"'))
                    .any(|c| c == "reaction" || c == "e0")
            }),
    }
}

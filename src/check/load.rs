//! Turning the paths a user gives into files to check: directories searched for `*.toml` and
//! `*.csv`, size and line-length guards, binary files recognised before parsing, and the choice
//! between reading a file whole and reading it in pieces ([`super::pieces`]).

use super::{Rule, SourceFile};
use crate::table::{CoupleFile, FileFormat};
use std::io::Read;
use std::path::{Path, PathBuf};

/// The couple-file reader's bound for the other commands (`--table`, standard input): 32 MiB.
/// Files the checker cannot read in pieces are held to it too, since reading one whole needs
/// about twenty times its size.
pub const MAX_FILE_BYTES: u64 = crate::table::record::MAX_COUPLE_FILE_BYTES;

/// The largest file `couplet check` reads by default: 2 GiB, about 13 million couples
/// ([`LoadOptions::max_file_bytes`]; the CLI's `--max-file-mib`). Checking holds the text
/// and a compact form of each distinct couple, so memory stays within a few times the file.
pub const DEFAULT_CHECK_FILE_BYTES: u64 = 2 << 30;

/// In a file over [`MAX_FILE_BYTES`], the longest line read: 16 MiB. A couple's lines are a
/// few hundred bytes; a longer line is refused as soon as reading reaches it, so a multi-GB
/// file of one line is neither held nor parsed.
pub const MAX_LINE_BYTES: usize = 16 << 20;

/// Files at least this large are read in pieces when they can be cut safely.
const IN_PIECES_FROM_BYTES: usize = 1 << 20;

/// How to read files for checking.
#[derive(Clone, Copy, Debug)]
pub struct LoadOptions {
    /// Larger files are reported (rule `CPL106`) without being read.
    pub max_file_bytes: u64,
}

impl Default for LoadOptions {
    fn default() -> LoadOptions {
        LoadOptions {
            max_file_bytes: DEFAULT_CHECK_FILE_BYTES,
        }
    }
}

fn mib(bytes: u64) -> String {
    let value = bytes as f64 / 1024.0 / 1024.0;
    if value.fract() == 0.0 {
        format!("{value:.0} MiB")
    } else {
        format!("{value:.1} MiB")
    }
}

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

/// Reads one file for checking with the default [`LoadOptions`].
pub fn load_file(path: &Path) -> Result<SourceFile, LoadError> {
    load_file_with(path, &LoadOptions::default())
}

/// Reads one file for checking. Files over [`LoadOptions::max_file_bytes`], files over
/// [`MAX_FILE_BYTES`] with a line over [`MAX_LINE_BYTES`] or that cannot be cut into pieces,
/// and binary files (a NUL byte) come back with a load finding and no records.
pub fn load_file_with(path: &Path, options: &LoadOptions) -> Result<SourceFile, LoadError> {
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
    let limit = options.max_file_bytes;
    let refuse =
        |message: String| SourceFile::unread(name.clone(), format, Rule::FileTooLarge, message);
    if size > limit {
        return Ok(refuse(format!(
            "the file is {}; the checker reads files up to {} (--max-file-mib raises the bound): split the table or raise it",
            mib(size),
            mib(limit)
        )));
    }
    // take(): the file may grow between the size check and the read.
    let mut reader = handle.take(limit + 1);
    let mut bytes = Vec::with_capacity(usize::try_from(size).unwrap_or(0));
    let check_lines = size > MAX_FILE_BYTES;
    let mut chunk = vec![0u8; 4 << 20];
    let (mut line_start, mut lines) = (0usize, 1usize);
    loop {
        let read = match reader.read(&mut chunk) {
            Ok(0) => break,
            Ok(read) => read,
            Err(error) if error.kind() == std::io::ErrorKind::Interrupted => continue,
            Err(error) => return Err(unreadable(error)),
        };
        let new = &chunk[..read];
        if check_lines {
            if let Some(last) = new.iter().rposition(|&b| b == b'\n') {
                line_start = bytes.len() + last + 1;
                lines += new.iter().filter(|&&b| b == b'\n').count();
            }
            if bytes.len() + read - line_start > MAX_LINE_BYTES {
                return Ok(refuse(format!(
                    "line {lines} (from byte {line_start}) is longer than {}, the longest line the checker reads in a file over {}: a couple file has short lines",
                    mib(MAX_LINE_BYTES as u64),
                    mib(MAX_FILE_BYTES)
                )));
            }
        }
        bytes.extend_from_slice(new);
    }
    drop(chunk);
    if bytes.len() as u64 > limit {
        return Ok(refuse(format!(
            "the file grew past {} while it was read: split the table",
            mib(limit)
        )));
    }
    Ok(source_from_owned_bytes(&name, bytes, format))
}

/// A file to check from bytes already in memory (binary files recognised by a NUL byte).
pub fn source_from_bytes(name: &str, bytes: &[u8], format: FileFormat) -> SourceFile {
    source_from_owned_bytes(name, bytes.to_vec(), format)
}

/// As [`source_from_bytes`], taking the bytes: valid UTF-8 becomes the file's text without a
/// copy (a large file is held once, not twice), read in pieces when it is large.
fn source_from_owned_bytes(name: &str, bytes: Vec<u8>, format: FileFormat) -> SourceFile {
    if let Some(at) = memchr::memchr(0, &bytes) {
        return SourceFile::unread(
            name,
            format,
            Rule::FileSyntax,
            format!("binary file (NUL byte at offset {at}): a couple file is text"),
        );
    }
    let text = match String::from_utf8(bytes) {
        Ok(text) => text,
        Err(error) => {
            return SourceFile::new(name, CoupleFile::from_bytes(error.as_bytes(), format));
        }
    };
    if text.len() < IN_PIECES_FROM_BYTES {
        return SourceFile::new(name, CoupleFile::from_string(text, format));
    }
    match SourceFile::in_pieces(name, text, format) {
        Ok(source) => source,
        Err((text, _)) if text.len() as u64 <= MAX_FILE_BYTES => {
            SourceFile::new(name, CoupleFile::from_string(text, format))
        }
        Err((text, why)) => {
            let line = text.as_bytes()[..why.offset.min(text.len())]
                .iter()
                .filter(|&&b| b == b'\n')
                .count()
                + 1;
            SourceFile::unread(
                name,
                format,
                Rule::FileTooLarge,
                format!(
                    "the file is {} and has {} at line {line}: a file over {} is read a piece at a time, which needs plain [[couple]] tables without multi-line strings (TOML) and closed quoted fields (CSV); split the file or rewrite that part",
                    mib(text.len() as u64),
                    why.reason,
                    mib(MAX_FILE_BYTES)
                ),
            )
        }
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
        FileFormat::Toml => source.couples() > 0 || !file.problems.is_empty(),
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

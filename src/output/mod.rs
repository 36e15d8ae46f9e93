//! Files the tool writes for people and other programs: SVG plots, CSV tables, and the
//! atomic write that puts them on disk.
//!
//! Outputs use the model and never the other way round: everything here takes computed
//! values and renders them, with no chemistry of its own.

pub mod csv;
pub mod diagram;
pub mod svg;

use std::io::Write;
use std::path::Path;

/// Writes `contents` to `path` so that a reader never sees a half-written file: the bytes go
/// to a temporary file in the same directory (same file system, so the rename is atomic),
/// which is flushed to disk and then renamed over `path`. On any failure the temporary file
/// is removed and `path` is left as it was.
pub fn write_atomically(path: &Path, contents: &[u8]) -> std::io::Result<()> {
    let directory = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    };
    let name = path.file_name().ok_or_else(|| {
        std::io::Error::new(
            std::io::ErrorKind::InvalidInput,
            format!("{} names no file", path.display()),
        )
    })?;
    let temporary = directory.join(format!(
        ".{}.{}.partial",
        name.to_string_lossy(),
        std::process::id()
    ));
    let result = (|| {
        let mut file = std::fs::File::create(&temporary)?;
        file.write_all(contents)?;
        file.sync_all()?;
        std::fs::rename(&temporary, path)
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&temporary);
    }
    result
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_failed_write_leaves_nothing_behind() {
        let directory = std::env::temp_dir().join(format!("couplet-atomic-{}", std::process::id()));
        std::fs::create_dir_all(&directory).unwrap();
        let target = directory.join("out.csv");
        write_atomically(&target, b"soc\n1\n").unwrap();
        assert_eq!(std::fs::read(&target).unwrap(), b"soc\n1\n");
        // Renaming a file over a directory fails: the old content and no partial file remain.
        let blocked = directory.join("sub");
        std::fs::create_dir_all(blocked.join("x")).unwrap();
        assert!(write_atomically(&blocked, b"new").is_err());
        let left: Vec<_> = std::fs::read_dir(&directory)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        assert!(left.iter().all(|n| !n.ends_with(".partial")), "{left:?}");
        std::fs::remove_dir_all(&directory).unwrap();
    }
}

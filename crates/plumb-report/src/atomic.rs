//! Atomic file writes: a temporary file in the same folder, flushed to disk, then renamed.

use std::io::Write;
use std::path::Path;

use crate::{ReportError, Result};

/// Writes `bytes` to `path` so that readers see either the old file or the whole new one:
/// write `path.tmp-<pid>` beside it, `fsync`, rename over `path`, then `fsync` the folder.
///
/// # Errors
/// [`ReportError::Io`] naming the step that failed; the temporary file is removed on failure.
pub fn write_atomically(path: &Path, bytes: &[u8]) -> Result<()> {
    let io = |action: &'static str| {
        move |source| ReportError::Io {
            path: path.to_path_buf(),
            action,
            source,
        }
    };
    let file_name = path
        .file_name()
        .ok_or_else(|| io("naming the file")(std::io::Error::other("the path has no file name")))?;
    let tmp = path.with_file_name(format!(
        ".{}.tmp-{}",
        file_name.to_string_lossy(),
        std::process::id()
    ));
    let result = (|| {
        let mut f = std::fs::File::create(&tmp).map_err(io("creating the temporary file"))?;
        f.write_all(bytes).map_err(io("writing"))?;
        f.sync_all().map_err(io("flushing to disk"))?;
        std::fs::rename(&tmp, path).map_err(io("renaming into place"))?;
        if let Some(dir) = path.parent().filter(|d| !d.as_os_str().is_empty()) {
            // Make the rename itself durable; not every file system allows opening a folder.
            if let Ok(d) = std::fs::File::open(dir) {
                let _ = d.sync_all();
            }
        }
        Ok(())
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn replaces_the_whole_file_and_leaves_no_temporary() {
        let dir = tempfile::tempdir().expect("tempdir");
        let path = dir.path().join("s.json");
        std::fs::write(&path, "old").expect("seed");
        write_atomically(&path, b"new contents").expect("writes");
        assert_eq!(
            std::fs::read_to_string(&path).expect("read"),
            "new contents"
        );
        let names: Vec<_> = std::fs::read_dir(dir.path())
            .expect("list")
            .map(|e| e.expect("entry").file_name())
            .collect();
        assert_eq!(names.len(), 1, "{names:?}");
    }

    #[test]
    fn a_missing_folder_is_an_error_that_names_the_path() {
        let err =
            write_atomically(Path::new("/nonexistent-plumb/x.json"), b"x").expect_err("no folder");
        assert!(
            err.to_string().contains("/nonexistent-plumb/x.json"),
            "{err}"
        );
    }
}

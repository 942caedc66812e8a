//! Before anything is written: no output may be an input (the data file, the session), nor the
//! same as another output, nor anything but a regular file or a new name. Files are compared by
//! device and inode as well as by name, so a hard link or a symbolic link to an input is caught.

use std::path::{Path, PathBuf};

use crate::{ReportError, Result};

/// Something about to be written, and what it is.
#[derive(Debug, Clone)]
pub struct Output<'a> {
    /// Where.
    pub path: &'a Path,
    /// What it is, for the message (`the summary`, `the session`, `a chart`…).
    pub what: &'a str,
}

/// Something read, and what it is.
#[derive(Debug, Clone)]
pub struct Input<'a> {
    /// Where.
    pub path: &'a Path,
    /// What it is (`the data file`, `the session`).
    pub what: &'a str,
}

/// The identity of an existing file: its device and inode on Unix, its full path elsewhere.
#[derive(Debug, Clone, PartialEq, Eq)]
enum Identity {
    #[cfg(unix)]
    Node(u64, u64),
    #[cfg(not(unix))]
    Path(PathBuf),
}

fn identity(path: &Path) -> Option<Identity> {
    let meta = std::fs::metadata(path).ok()?;
    #[cfg(unix)]
    {
        use std::os::unix::fs::MetadataExt;
        Some(Identity::Node(meta.dev(), meta.ino()))
    }
    #[cfg(not(unix))]
    {
        let _ = meta;
        std::fs::canonicalize(path).ok().map(Identity::Path)
    }
}

/// The full path a name stands for, whether or not the file exists yet: its folder resolved,
/// its own name kept.
fn resolved(path: &Path) -> PathBuf {
    let name = path.file_name().map(PathBuf::from).unwrap_or_default();
    let folder = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    std::fs::canonicalize(folder).map_or_else(|_| path.to_path_buf(), |f| f.join(name))
}

/// Refuses the writes unless every output is a new name or an existing regular file (not a
/// symbolic link, a device, a pipe or a folder), no output is an input, and no two outputs
/// are one file.
///
/// # Errors
/// [`ReportError::Unsafe`] naming the output, what it would overwrite, and what to do.
pub fn check_outputs(outputs: &[Output<'_>], inputs: &[Input<'_>]) -> Result<()> {
    let refuse = |path: &Path, why: String| ReportError::Unsafe {
        path: path.to_path_buf(),
        why,
    };
    let inputs: Vec<(Option<Identity>, PathBuf, &str)> = inputs
        .iter()
        .map(|i| (identity(i.path), resolved(i.path), i.what))
        .collect();
    let mut seen: Vec<(PathBuf, Option<Identity>, &str)> = Vec::new();
    for o in outputs {
        if let Ok(meta) = std::fs::symlink_metadata(o.path) {
            if meta.file_type().is_symlink() {
                return Err(refuse(
                    o.path,
                    format!(
                        "{} would be written through a symbolic link; name the file itself",
                        o.what
                    ),
                ));
            }
            if !meta.file_type().is_file() {
                return Err(refuse(o.path, format!("{} would replace something that is not a regular file (a folder, device or pipe); choose another name", o.what)));
            }
        }
        let (id, full) = (identity(o.path), resolved(o.path));
        for (in_id, in_full, in_what) in &inputs {
            let same = (id.is_some() && id == *in_id) || full == *in_full;
            if same {
                return Err(refuse(o.path, format!("{} would overwrite {in_what}, which is only ever read; choose another name for the output", o.what)));
            }
        }
        if let Some((_, _, other)) = seen
            .iter()
            .find(|(f, i, _)| *f == full || (id.is_some() && *i == id))
        {
            return Err(refuse(
                o.path,
                format!(
                    "{} and {other} would be the same file; choose another name",
                    o.what
                ),
            ));
        }
        seen.push((full, id, o.what));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn out<'a>(path: &'a Path, what: &'a str) -> Output<'a> {
        Output { path, what }
    }

    #[test]
    fn an_output_onto_an_input_by_any_name_is_refused() {
        let dir = tempfile::tempdir().expect("dir");
        let data = dir.path().join("d.csv");
        std::fs::write(&data, "x,y\n1,2\n").expect("write");
        let input = [Input {
            path: &data,
            what: "the data file",
        }];
        let e = check_outputs(&[out(&data, "the summary")], &input).expect_err("same name");
        assert!(
            e.to_string().contains("would overwrite the data file"),
            "{e}"
        );
        // Through a dotted path, a hard link and a symbolic link.
        let dotted = dir.path().join(".").join("d.csv");
        assert!(check_outputs(&[out(&dotted, "the summary")], &input).is_err());
        let hard = dir.path().join("hard.csv");
        std::fs::hard_link(&data, &hard).expect("link");
        assert!(check_outputs(&[out(&hard, "the summary")], &input).is_err());
        #[cfg(unix)]
        {
            let soft = dir.path().join("soft.csv");
            std::os::unix::fs::symlink(&data, &soft).expect("symlink");
            let e = check_outputs(&[out(&soft, "a chart")], &input).expect_err("symlink");
            assert!(e.to_string().contains("symbolic link"), "{e}");
        }
        let fresh = dir.path().join("new.html");
        check_outputs(&[out(&fresh, "the summary")], &input).expect("a new name is fine");
        let e = check_outputs(
            &[out(&fresh, "the summary"), out(&fresh, "the session")],
            &input,
        )
        .expect_err("two outputs, one file");
        assert!(e.to_string().contains("the same file"), "{e}");
    }

    #[test]
    fn folders_and_devices_are_not_replaced() {
        let dir = tempfile::tempdir().expect("dir");
        assert!(check_outputs(&[out(dir.path(), "the summary")], &[]).is_err());
        #[cfg(unix)]
        assert!(check_outputs(&[out(Path::new("/dev/null"), "the summary")], &[]).is_err());
    }
}

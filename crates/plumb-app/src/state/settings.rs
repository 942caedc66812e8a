//! Where the workbench keeps its own small files: the recent-files list and the recovery
//! session. `PLUMB_CONFIG_DIR` overrides the location (tests use it); otherwise
//! `$XDG_CONFIG_HOME/plumbline` or `~/.config/plumbline`.

use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

/// Files remembered in the recent list.
pub const RECENT_LIMIT: usize = 10;

/// The workbench's settings folder (not created until something is written).
pub fn config_dir() -> Option<PathBuf> {
    if let Some(dir) = std::env::var_os("PLUMB_CONFIG_DIR") {
        return Some(PathBuf::from(dir));
    }
    std::env::var_os("XDG_CONFIG_HOME")
        .map(PathBuf::from)
        .or_else(|| std::env::var_os("HOME").map(|h| PathBuf::from(h).join(".config")))
        .map(|d| d.join("plumbline"))
}

/// Recently opened files, newest first.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct Recent {
    /// Paths as opened.
    pub files: Vec<PathBuf>,
}

impl Recent {
    fn path(dir: &Path) -> PathBuf {
        dir.join("recent.json")
    }

    /// Reads the list; a missing or unreadable list is empty (it is only a convenience).
    pub fn load(dir: Option<&Path>) -> Self {
        dir.and_then(|d| std::fs::read(Self::path(d)).ok())
            .and_then(|b| serde_json::from_slice(&b).ok())
            .unwrap_or_default()
    }

    /// Puts `file` first and writes the list (atomically).
    ///
    /// # Errors
    /// If the folder or file cannot be written.
    pub fn remember(&mut self, file: &Path, dir: Option<&Path>) -> Result<(), String> {
        self.files.retain(|f| f != file);
        self.files.insert(0, file.to_path_buf());
        self.files.truncate(RECENT_LIMIT);
        let Some(dir) = dir else {
            return Ok(());
        };
        std::fs::create_dir_all(dir).map_err(|e| format!("{}: {e}", dir.display()))?;
        let bytes = serde_json::to_vec_pretty(self).map_err(|e| e.to_string())?;
        plumb_report::write_atomically(&Self::path(dir), &bytes).map_err(|e| e.to_string())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recent_list_keeps_newest_first_without_repeats() {
        let dir = tempfile::tempdir().expect("dir");
        let mut r = Recent::default();
        for name in ["a.csv", "b.csv", "a.csv"] {
            r.remember(Path::new(name), Some(dir.path()))
                .expect("write");
        }
        let back = Recent::load(Some(dir.path()));
        assert_eq!(
            back.files,
            vec![PathBuf::from("a.csv"), PathBuf::from("b.csv")]
        );
        std::fs::write(dir.path().join("recent.json"), b"{not json").expect("write");
        assert_eq!(Recent::load(Some(dir.path())), Recent::default());
    }
}

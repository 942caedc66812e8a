//! A memory budget for loading: an absurdly large text file is refused with a clear message
//! before it is read, instead of driving the machine into swap or the out-of-memory killer.

use std::path::Path;

use crate::{DataError, Result};

/// Bytes of memory a delimited-text load needs per byte of file. Measured: the 38 MB, 1 M-row
/// demo sensor log peaks at 494 MB resident in `plumb columns` (13×); 16 leaves a margin.
pub const TEXT_EXPANSION: u64 = 16;

/// Memory the kernel reports as available (`MemAvailable` in `/proc/meminfo`), if known.
pub fn available_memory() -> Option<u64> {
    let text = std::fs::read_to_string("/proc/meminfo").ok()?;
    let line = text.lines().find(|l| l.starts_with("MemAvailable:"))?;
    let kib: u64 = line.split_whitespace().nth(1)?.parse().ok()?;
    kib.checked_mul(1024)
}

/// Refuses a text file whose load would need more than `limit` bytes (default: the memory
/// available now). Without a known limit nothing is refused.
pub(crate) fn check_text(path: &Path, limit: Option<u64>) -> Result<()> {
    let Some(limit) = limit.or_else(available_memory) else {
        return Ok(());
    };
    let Ok(meta) = std::fs::metadata(path) else {
        return Ok(()); // the read reports the problem with its own message
    };
    let need = meta.len().saturating_mul(TEXT_EXPANSION);
    if need > limit {
        return Err(DataError::TooLarge {
            path: path.to_path_buf(),
            bytes: meta.len(),
            need,
            limit,
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_file_beyond_the_budget_is_refused_with_the_sizes_named() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("big.csv");
        std::fs::write(&path, "a,b\n".repeat(1000)).expect("write");
        assert!(check_text(&path, Some(1 << 30)).is_ok());
        let err = check_text(&path, Some(10_000))
            .expect_err("over budget")
            .to_string();
        assert!(
            err.contains("big.csv") && err.contains("4000 bytes"),
            "{err}"
        );
        assert!(err.contains("Parquet"), "says what to do: {err}");
        assert!(
            available_memory().is_some_and(|m| m > 0),
            "Linux reports MemAvailable"
        );
    }
}

//! How far a load has got, readable from another thread (the workbench's progress bar).

use std::io::Read;
use std::path::Path;
use std::sync::atomic::{AtomicU64, AtomicU8, Ordering};

use crate::DataError;

/// Stage of a load.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Stage {
    /// Reading bytes from disk (see [`Progress::bytes_read`]).
    Reading,
    /// Splitting records and fields.
    Parsing,
    /// Typing every cell.
    Typing,
}

/// Shared progress of one load. All counters only grow.
#[derive(Debug, Default)]
pub struct Progress {
    bytes_read: AtomicU64,
    stage: AtomicU8,
}

impl Progress {
    /// Bytes read from the file so far.
    pub fn bytes_read(&self) -> u64 {
        self.bytes_read.load(Ordering::Relaxed)
    }

    /// The current stage.
    pub fn stage(&self) -> Stage {
        match self.stage.load(Ordering::Relaxed) {
            0 => Stage::Reading,
            1 => Stage::Parsing,
            _ => Stage::Typing,
        }
    }

    pub(crate) fn enter(&self, stage: Stage) {
        self.stage.store(stage as u8, Ordering::Relaxed);
    }
}

/// Chunk size of a tracked read.
const CHUNK: usize = 1 << 20;

/// Reads the whole file, counting bytes into `progress`.
/// Why a read stopped.
#[derive(Debug)]
pub(crate) enum ReadStop {
    /// The operating system refused it.
    Failed(DataError),
    /// More bytes than the cap were read (this many).
    PastCap(u64),
}

/// Reads the whole file, counting bytes into `progress`; with `cap`, stops past that many
/// bytes (an input of unknown size: a pipe, a device).
pub(crate) fn read_all(
    path: &Path,
    progress: Option<&Progress>,
    cap: Option<u64>,
) -> std::result::Result<Vec<u8>, ReadStop> {
    let io = |source| {
        ReadStop::Failed(DataError::Io {
            path: path.to_path_buf(),
            source,
        })
    };
    let mut file = std::fs::File::open(path).map_err(io)?;
    let size = file.metadata().map(|m| m.len()).unwrap_or(0);
    let mut bytes = Vec::with_capacity(usize::try_from(size).unwrap_or(0));
    let mut chunk = vec![0u8; CHUNK];
    loop {
        let n = file.read(&mut chunk).map_err(io)?;
        if n == 0 {
            break;
        }
        bytes.extend_from_slice(&chunk[..n]);
        if let Some(p) = progress {
            p.bytes_read.fetch_add(n as u64, Ordering::Relaxed);
        }
        if cap.is_some_and(|c| bytes.len() as u64 > c) {
            return Err(ReadStop::PastCap(bytes.len() as u64));
        }
    }
    Ok(bytes)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_tracked_read_counts_every_byte_and_stages_advance() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("t.csv");
        let text = "a,b\n".repeat(700_000);
        std::fs::write(&path, &text).expect("write");
        let p = Progress::default();
        assert_eq!(p.stage(), Stage::Reading);
        let bytes = read_all(&path, Some(&p), None).expect("read");
        assert_eq!(bytes.len(), text.len());
        assert_eq!(p.bytes_read(), text.len() as u64);
        p.enter(Stage::Typing);
        assert_eq!(p.stage(), Stage::Typing);
    }
}

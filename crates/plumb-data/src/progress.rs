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
    let meta = file.metadata().map_err(io)?;
    let size = usize::try_from(meta.len()).unwrap_or(0);
    let mut bytes = Vec::new();
    if cap.is_none() && meta.is_file() && size >= CHUNK {
        bytes = read_in_halves(&file, size, progress).map_err(io)?;
    }
    // What the halves did not read: all of a small or unsized input, or what a growing
    // file added.
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

/// The first `size` bytes of a regular file, straight into one buffer, its two halves read
/// side by side (the copies out of the page cache and the fresh pages' faults shared by two
/// cores). The file's position is left at `size`, so the caller reads on from there; if the
/// file came out shorter than `size` (changed while read), only the bytes read in order from
/// the start are kept and the position is left where they end.
fn read_in_halves(
    file: &std::fs::File,
    size: usize,
    progress: Option<&Progress>,
) -> std::io::Result<Vec<u8>> {
    use std::io::{Seek, SeekFrom};
    use std::os::unix::fs::FileExt;
    let mut bytes = vec![0u8; size];
    let read_from = |buf: &mut [u8], mut at: u64| -> std::io::Result<usize> {
        let mut done = 0;
        while done < buf.len() {
            let end = (done + CHUNK).min(buf.len());
            let n = file.read_at(&mut buf[done..end], at)?;
            if n == 0 {
                break;
            }
            done += n;
            at += n as u64;
            if let Some(p) = progress {
                p.bytes_read.fetch_add(n as u64, Ordering::Relaxed);
            }
        }
        Ok(done)
    };
    let (first, second) = bytes.split_at_mut(size / 2);
    let second_at = first.len() as u64;
    let (a, b) = std::thread::scope(|scope| {
        let later = scope.spawn(|| read_from(second, second_at));
        let a = read_from(first, 0);
        (
            a,
            later
                .join()
                .unwrap_or_else(|p| std::panic::resume_unwind(p)),
        )
    });
    let (a, b) = (a?, b?);
    let kept = if a < size / 2 { a } else { size / 2 + b };
    bytes.truncate(kept);
    let mut file = file;
    file.seek(SeekFrom::Start(kept as u64))?;
    Ok(bytes)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn files_of_every_size_around_the_halves_read_whole_and_in_order() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("t.csv");
        for size in [0, 1, CHUNK - 1, CHUNK, CHUNK + 1, 3 * CHUNK + 7] {
            let text: Vec<u8> = (0..size).map(|i| (i % 251) as u8).collect();
            std::fs::write(&path, &text).expect("write");
            let p = Progress::default();
            let bytes = read_all(&path, Some(&p), None).expect("read");
            assert!(bytes == text, "size {size}");
            assert_eq!(p.bytes_read(), size as u64, "size {size}");
        }
    }

    #[test]
    fn a_tracked_read_counts_every_byte_and_stages_advance() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("t.csv");
        let text = "a,b\n".repeat(700_000);
        std::fs::write(&path, &text).expect("write");
        let p = Progress::default();
        assert_eq!(p.stage(), Stage::Reading);
        let bytes = read_all(&path, Some(&p), None).expect("read");
        assert_eq!(bytes, text.as_bytes(), "read in two halves, in order");
        assert_eq!(p.bytes_read(), text.len() as u64);
        p.enter(Stage::Typing);
        assert_eq!(p.stage(), Stage::Typing);
    }
}

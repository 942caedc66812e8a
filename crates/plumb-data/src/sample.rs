//! A seeded random sample of a delimited file's rows, drawn in one pass over a file too large
//! to load, and read as an ordinary table with every column.

use std::fs::File;
use std::ops::ControlFlow;
use std::path::Path;

use plumb_core::sampling::Reservoir;

use crate::sniff;
use crate::stream::{fixed_options, refuse_two_byte_text, Chunks, StreamOptions};
use crate::table::Table;
use crate::{delimited, DataError, Result};

/// A random sample of a file's data rows.
#[derive(Debug, Clone, PartialEq)]
pub struct RowSample {
    /// The sampled rows as a table (every column, in file order; its source is the file, its
    /// hash that of the sample's text, not of the file).
    pub table: Table,
    /// 1-based data row in the file of each of the table's rows.
    pub file_rows: Vec<usize>,
    /// Data rows in the file.
    pub file_row_count: usize,
    /// The generator's seed.
    pub seed: u64,
}

/// Draws a uniform random sample of `size` data rows of the delimited file `path` (all of
/// them when it has fewer) in one pass, with Algorithm R seeded by `seed` (see
/// [`Reservoir`]): the same file, size and seed give the same rows. Memory holds the sampled
/// records' text and one chunk of the file. `progress` hears the bytes read after each chunk
/// and returns [`ControlFlow::Break`] to stop (then `Ok(None)`). Nothing is written.
///
/// # Errors
/// What [`crate::load`] reports for the file's first part or for the sampled rows, an
/// unclosed quote naming its line, and UTF-16 text (not read in pieces).
pub fn sample_rows(
    path: &Path,
    size: usize,
    seed: u64,
    options: &StreamOptions,
    mut progress: impl FnMut(u64) -> ControlFlow<()>,
) -> Result<Option<RowSample>> {
    let io = |source| DataError::Io {
        path: path.to_path_buf(),
        source,
    };
    let mut file = File::open(path).map_err(io)?;
    let mut reader = Chunks::new(&mut file, options.chunk_bytes.max(64 << 10));
    let first = reader.next_chunk().map_err(io)?.unwrap_or_default();
    let head = delimited::from_bytes(path, &first.text, &options.load, None)?;
    refuse_two_byte_text(path, &head)?;
    let fixed = fixed_options(head.format(), &options.load).ok_or_else(|| DataError::Parse {
        path: path.to_path_buf(),
        message: "only delimited text can be sampled in one pass".into(),
    })?;
    let has_header = matches!(fixed.header, sniff::HeaderMode::Yes);
    drop(head);
    let mut reservoir: Reservoir<Vec<u8>> = Reservoir::new(size, seed);
    let mut header: Option<Vec<u8>> = None;
    let (mut bytes, mut lines_before) = (0u64, 0usize);
    let mut chunk = Some(first);
    while let Some(c) = chunk {
        let records = sniff::records(&c.text).map_err(|line| DataError::Parse {
            path: path.to_path_buf(),
            message: format!(
                "line {}: a quote opened here is never closed; close it or remove it",
                lines_before + line
            ),
        })?;
        for r in &records {
            let text = &c.text[r.start..r.end];
            if has_header && header.is_none() {
                header = Some(text.to_vec());
            } else if let Some(slot) = reservoir.draw() {
                reservoir.keep(slot, text.to_vec());
            }
        }
        bytes += c.text.len() as u64;
        lines_before += sniff::count_line_breaks(&c.text, false);
        if progress(bytes).is_break() {
            return Ok(None);
        }
        chunk = reader.next_chunk().map_err(io)?;
    }
    let file_row_count = usize::try_from(reservoir.seen()).unwrap_or(usize::MAX);
    let kept = reservoir.into_ordered();
    let mut text = Vec::with_capacity(kept.iter().map(|(_, t)| t.len() + 1).sum::<usize>());
    if let Some(h) = header {
        text.extend_from_slice(&h);
        text.push(b'\n');
    }
    let mut file_rows = Vec::with_capacity(kept.len());
    for (position, record) in kept {
        file_rows.push(usize::try_from(position).unwrap_or(usize::MAX) + 1);
        text.extend_from_slice(&record);
        text.push(b'\n');
    }
    let table = delimited::from_bytes(path, &text, &fixed, None)?;
    Ok(Some(RowSample {
        table,
        file_rows,
        file_row_count,
        seed,
    }))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn file(rows: usize) -> (tempfile::TempDir, std::path::PathBuf) {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("big.csv");
        let mut text = String::from("id,x,note\n");
        for i in 1..=rows {
            text.push_str(&format!("r{i},{},\"a, \"\"b\"\"\n c\"\n", i * 2));
        }
        std::fs::write(&path, text).expect("write");
        (dir, path)
    }

    fn small_chunks() -> StreamOptions {
        StreamOptions {
            chunk_bytes: 1,
            ..StreamOptions::default()
        }
    }

    #[test]
    fn the_same_seed_draws_the_same_rows_with_every_column_and_their_file_rows() {
        let (_dir, path) = file(20_000);
        let go = |_| ControlFlow::Continue(());
        let a = sample_rows(&path, 500, 1, &small_chunks(), go)
            .expect("reads")
            .expect("not stopped");
        let b = sample_rows(&path, 500, 1, &small_chunks(), go)
            .expect("reads")
            .expect("not stopped");
        assert_eq!(a.file_rows, b.file_rows, "seeded: the same rows");
        assert_eq!(a.table.n_rows(), 500);
        assert_eq!(a.file_row_count, 20_000);
        assert!(a.file_rows.windows(2).all(|w| w[0] < w[1]), "file order");
        let ids = match &a.table.column("id").expect("id").values {
            crate::ColumnValues::Text { values, .. } => values.clone(),
            crate::ColumnValues::Numeric(_) => panic!("text"),
        };
        let x = a.table.numeric("x").expect("numeric");
        for (k, &row) in a.file_rows.iter().enumerate() {
            assert_eq!(ids.get(k), Some(format!("r{row}").as_str()));
            assert_eq!(x.get(k), Some((row * 2) as f64));
        }
        let c = sample_rows(&path, 500, 2, &small_chunks(), go)
            .expect("reads")
            .expect("not stopped");
        assert_ne!(a.file_rows, c.file_rows, "another seed, other rows");
    }

    #[test]
    fn a_small_file_is_taken_whole_and_a_stop_is_honoured() {
        let (_dir, path) = file(30);
        let all = sample_rows(&path, 50, 9, &StreamOptions::default(), |_| {
            ControlFlow::Continue(())
        })
        .expect("reads")
        .expect("not stopped");
        assert_eq!(all.file_rows, (1..=30).collect::<Vec<_>>());
        let stopped =
            sample_rows(&path, 50, 9, &small_chunks(), |_| ControlFlow::Break(())).expect("reads");
        assert!(stopped.is_none());
    }

    #[test]
    fn an_unclosed_quote_is_named_by_its_line() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("q.csv");
        std::fs::write(&path, "a,b\n1,2\n3,\"4\n5,6\n").expect("write");
        let err = sample_rows(&path, 10, 1, &StreamOptions::default(), |_| {
            ControlFlow::Continue(())
        })
        .expect_err("unclosed");
        assert!(err.to_string().contains("q.csv"), "{err}");
    }
}

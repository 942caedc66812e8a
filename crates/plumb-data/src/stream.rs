//! Delimited files too large to hold: read in pieces of whole records, typed by the same
//! rules as [`crate::load`], and handed to the caller piece by piece.
//!
//! The file is read in chunks of about [`StreamOptions::chunk_bytes`], cut at the last line
//! break outside quotes. The first chunk settles the delimiter, decimal mark and header; every
//! later chunk is parsed (polars' CSV reader, then our cell typing) with those settings and the
//! header line put in front, a few chunks at a time on rayon's threads. Memory stays at a few
//! chunks whatever the file's size. Messages name the file's own line and data row.

use std::fs::File;
use std::io::Read;
use std::ops::ControlFlow;
use std::path::Path;

use rayon::prelude::*;

use crate::encoding::TextEncoding;
use crate::select::{first_fault, Dropped};
use crate::sniff::{self, HeaderMode};
use crate::table::{ColumnValues, SourceFormat, Table};
use crate::values::Numbers;
use crate::{delimited, DataError, LoadOptions, Result};

/// How many dropped rows a [`StreamSummary`] lists one by one (all are counted).
pub const LISTED_DROPS: usize = 20;

/// How to read a large file.
#[derive(Debug, Clone, PartialEq)]
pub struct StreamOptions {
    /// Delimiter, decimal mark, header and missing tokens, as for [`crate::load`].
    pub load: LoadOptions,
    /// Bytes per chunk (default 8 MiB; at least 64 KiB is used).
    pub chunk_bytes: usize,
}

impl Default for StreamOptions {
    fn default() -> Self {
        Self {
            load: LoadOptions::default(),
            chunk_bytes: 8 << 20,
        }
    }
}

/// What a pass over the file saw.
#[derive(Debug, Clone, PartialEq)]
pub struct StreamSummary {
    /// Data rows in the file.
    pub rows: usize,
    /// Rows where every requested column holds a finite number.
    pub used: usize,
    /// Rows left out, counted.
    pub dropped_count: usize,
    /// The first [`LISTED_DROPS`] of them.
    pub dropped: Vec<Dropped>,
    /// Bytes read.
    pub bytes: u64,
    /// Delimiter, decimal mark and header, as settled by the first chunk.
    pub format: SourceFormat,
    /// Whether the caller stopped the pass early (the counts cover what was read).
    pub stopped: bool,
}

/// The complete rows of one chunk: values of each requested column, in request order, and
/// the 1-based data row of the chunk's first row.
#[derive(Debug, Clone, PartialEq)]
pub struct Piece {
    /// Values per requested column (complete rows only).
    pub columns: Vec<Vec<f64>>,
    /// 1-based data rows of those values.
    pub rows: Vec<usize>,
    /// Bytes of the file read so far, this piece included (for a progress bar).
    pub bytes_read: u64,
}

/// The table of the file's first chunk alone: its columns, their types as far as that part
/// shows, and the settled format (a quick look before a full pass).
///
/// # Errors
/// What [`crate::load`] reports for that part of the file.
pub fn head(path: &Path, options: &StreamOptions) -> Result<Table> {
    let mut file = File::open(path).map_err(|source| DataError::Io {
        path: path.to_path_buf(),
        source,
    })?;
    let mut reader = Chunks::new(&mut file, options.chunk_bytes.max(64 << 10));
    let first = reader
        .next_chunk()
        .map_err(|source| DataError::Io {
            path: path.to_path_buf(),
            source,
        })?
        .unwrap_or_default();
    delimited::from_bytes(path, &first.text, &options.load, None)
}

/// Reads `path` once, handing `visit` the complete rows of the columns `names`, chunk by
/// chunk in file order; `visit` returns [`ControlFlow::Break`] to stop early (the summary
/// then says so). Nothing is written.
///
/// # Errors
/// What [`crate::load`] reports for the same file (with the file's own line and row
/// numbers), and [`DataError::UnknownColumn`] for a name the header does not have.
pub fn stream_columns(
    path: &Path,
    names: &[&str],
    options: &StreamOptions,
    mut visit: impl FnMut(&Piece) -> ControlFlow<()>,
) -> Result<StreamSummary> {
    let io = |source| DataError::Io {
        path: path.to_path_buf(),
        source,
    };
    let mut file = File::open(path).map_err(io)?;
    let chunk = options.chunk_bytes.max(64 << 10);
    let batch = 2 * rayon::current_num_threads().max(1);
    let mut reader = Chunks::new(&mut file, chunk);
    let first = reader.next_chunk().map_err(io)?.unwrap_or_default();
    // The first chunk settles the format (and the header, when there is one).
    let head = delimited::from_bytes(path, &first.text, &options.load, None)?;
    refuse_two_byte_text(path, &head)?;
    for name in names {
        head.numeric(name)?;
    }
    let mut pass = Pass::new(path, names, &head, &first, options);
    if !pass.take(&head, &mut visit)? {
        return Ok(pass.stopped());
    }
    pass.offset.lines = first.lines;
    drop(head);
    loop {
        let mut pending = Vec::with_capacity(batch);
        while pending.len() < batch {
            match reader.next_chunk().map_err(io)? {
                Some(c) => pending.push(c),
                None => break,
            }
        }
        if pending.is_empty() {
            break;
        }
        for (table, c) in pass.parse(&pending).into_iter().zip(&pending) {
            let table = match table {
                Ok(t) => t,
                // A chunk of blank lines only.
                Err(DataError::NoDataRows { .. } | DataError::Empty { .. }) => {
                    pass.offset.lines += c.lines;
                    pass.summary.bytes += c.text.len() as u64;
                    continue;
                }
                Err(e) => return Err(e.with_row_offset(pass.offset.rows)),
            };
            pass.summary.bytes += c.text.len() as u64;
            if !pass.take(&table, &mut visit)? {
                return Ok(pass.stopped());
            }
            pass.offset.lines += c.lines;
        }
    }
    Ok(pass.summary)
}

/// Chunks are cut at line-break bytes, which in UTF-16 are half of a character: such files
/// are read whole, not streamed.
pub(crate) fn refuse_two_byte_text(path: &Path, head: &Table) -> Result<()> {
    match head.format() {
        SourceFormat::Delimited {
            encoding: e @ (TextEncoding::Utf16Le | TextEncoding::Utf16Be),
            ..
        } => Err(DataError::Parse {
            path: path.to_path_buf(),
            message: format!(
                "{} text is not read in one pass; re-save the file as UTF-8, or open it whole \
                 (plumb fit, or the workbench) if it fits in memory",
                e.as_str()
            ),
        }),
        _ => Ok(()),
    }
}

/// The reading options that repeat `format` (as settled by a file's first chunk) on later
/// pieces of the same file; `None` for a format that is not delimited text.
pub(crate) fn fixed_options(format: &SourceFormat, load: &LoadOptions) -> Option<LoadOptions> {
    let SourceFormat::Delimited {
        encoding,
        delimiter,
        decimal,
        header,
    } = *format
    else {
        return None;
    };
    Some(LoadOptions {
        encoding: Some(encoding),
        delimiter: Some(delimiter),
        decimal: Some(decimal),
        header: if header {
            HeaderMode::Yes
        } else {
            HeaderMode::No
        },
        ..load.clone()
    })
}

/// One pass over the file: the settled format, where the next chunk starts, and the account.
struct Pass<'a> {
    path: &'a Path,
    names: &'a [&'a str],
    /// The first chunk's settings, fixed for every later chunk.
    fixed: LoadOptions,
    /// The header line put in front of every later chunk (when the file has one).
    header_line: Option<Vec<u8>>,
    /// Positions and names of the columns asked for: later chunks read only those.
    keep: (Vec<usize>, Vec<String>),
    offset: Offset,
    summary: StreamSummary,
}

impl<'a> Pass<'a> {
    fn new(
        path: &'a Path,
        names: &'a [&'a str],
        head: &Table,
        first: &Chunk,
        options: &StreamOptions,
    ) -> Self {
        let format = head.format().clone();
        let header = matches!(format, SourceFormat::Delimited { header: true, .. });
        let fixed = fixed_options(&format, &options.load).expect("delimited text");
        let keep = head
            .columns()
            .iter()
            .enumerate()
            .filter(|(_, c)| names.contains(&c.name.as_str()))
            .map(|(j, c)| (j, c.name.clone()))
            .unzip();
        Self {
            path,
            names,
            fixed,
            header_line: header.then(|| first_record(&first.text)),
            keep,
            offset: Offset::default(),
            summary: StreamSummary {
                rows: 0,
                used: 0,
                dropped_count: 0,
                dropped: Vec::new(),
                bytes: first.text.len() as u64,
                format,
                stopped: false,
            },
        }
    }

    /// Hands `visit` the complete rows of one chunk's table; false when it asks to stop.
    fn take(
        &mut self,
        table: &Table,
        visit: &mut impl FnMut(&Piece) -> ControlFlow<()>,
    ) -> Result<bool> {
        let mut piece = complete_piece(table, self.names, self.offset.rows, &mut self.summary)?;
        piece.bytes_read = self.summary.bytes;
        self.summary.rows += table.n_rows();
        self.summary.used += piece.rows.len();
        self.offset.rows += table.n_rows();
        Ok(visit(&piece).is_continue())
    }

    fn stopped(mut self) -> StreamSummary {
        self.summary.stopped = true;
        self.summary
    }

    /// Parses a batch of chunks on rayon's threads, each with the header line in front;
    /// messages carry the file's own line numbers (lines are known before parsing, rows
    /// only after).
    fn parse(&self, pending: &[Chunk]) -> Vec<Result<Table>> {
        let mut line_offsets = Vec::with_capacity(pending.len());
        let mut lines = self.offset.lines;
        for c in pending {
            line_offsets.push(lines);
            lines += c.lines;
        }
        pending
            .par_iter()
            .zip(&line_offsets)
            .map(|(c, &at_line)| {
                let mut text = self.header_line.clone().unwrap_or_default();
                text.extend_from_slice(&c.text);
                let only = delimited::Only {
                    at: &self.keep.0,
                    names: &self.keep.1,
                };
                delimited::piece_of(self.path, &text, &self.fixed, only)
                    .map_err(|e| e.shifted(at_line, self.header_line.is_some()))
            })
            .collect()
    }
}

/// Where a chunk starts: data rows and lines before it.
#[derive(Debug, Clone, Copy, Default)]
struct Offset {
    rows: usize,
    lines: usize,
}

/// The complete rows of `names` in one chunk's table, counting the others.
fn complete_piece(
    table: &Table,
    names: &[&str],
    row_offset: usize,
    summary: &mut StreamSummary,
) -> Result<Piece> {
    let n = table.n_rows();
    let mut columns: Vec<&Numbers> = Vec::with_capacity(names.len());
    for name in names {
        // A piece whose cells in a column are all missing still counts its rows as dropped.
        match table.column(name).map(|c| &c.values) {
            Some(ColumnValues::Numeric(v)) => columns.push(v),
            _ => {
                return Err(table
                    .numeric(name)
                    .expect_err("not numeric")
                    .with_row_offset(row_offset))
            }
        }
    }
    let mut piece = Piece {
        columns: vec![Vec::with_capacity(n); names.len()],
        rows: Vec::with_capacity(n),
        bytes_read: 0,
    };
    for i in 0..n {
        let fault = first_fault(names, &columns, i);
        match fault {
            Some((name, reason)) => {
                summary.dropped_count += 1;
                if summary.dropped.len() < LISTED_DROPS {
                    summary.dropped.push(Dropped {
                        row: row_offset + i + 1,
                        column: name.to_string(),
                        reason,
                    });
                }
            }
            None => {
                for (out, col) in piece.columns.iter_mut().zip(&columns) {
                    out.push(col.as_nan_missing()[i]);
                }
                piece.rows.push(row_offset + i + 1);
            }
        }
    }
    Ok(piece)
}

/// The first record of the text (the header line), with its line break.
fn first_record(text: &[u8]) -> Vec<u8> {
    let start = text
        .iter()
        .position(|&b| b != b'\n' && b != b'\r')
        .unwrap_or(0);
    let end = record_end(&text[start..]).map_or(text.len(), |e| start + e);
    let mut line = text[start..end].to_vec();
    if line.last() != Some(&b'\n') {
        line.push(b'\n');
    }
    line
}

/// One piece of whole records and the number of line breaks in it.
#[derive(Debug, Default)]
pub(crate) struct Chunk {
    pub(crate) text: Vec<u8>,
    lines: usize,
}

/// Reads whole records, about `size` bytes at a time.
pub(crate) struct Chunks<'a> {
    file: &'a mut File,
    size: usize,
    carry: Vec<u8>,
    done: bool,
}

impl<'a> Chunks<'a> {
    pub(crate) fn new(file: &'a mut File, size: usize) -> Self {
        Self {
            file,
            size,
            carry: Vec::new(),
            done: false,
        }
    }

    pub(crate) fn next_chunk(&mut self) -> std::io::Result<Option<Chunk>> {
        let mut text = std::mem::take(&mut self.carry);
        loop {
            if self.done {
                if text.is_empty() {
                    return Ok(None);
                }
                let lines = count_lines(&text);
                return Ok(Some(Chunk { text, lines }));
            }
            let have = text.len();
            text.resize(have + self.size, 0);
            let got = read_full(self.file, &mut text[have..])?;
            text.truncate(have + got);
            if got == 0 {
                self.done = true;
                continue;
            }
            // Cut after the last line break outside quotes; a record longer than the chunk
            // makes the chunk grow.
            if let Some(cut) = last_record_end(&text) {
                self.carry = text.split_off(cut);
                let lines = count_lines(&text);
                return Ok(Some(Chunk { text, lines }));
            }
        }
    }
}

fn read_full(file: &mut File, buf: &mut [u8]) -> std::io::Result<usize> {
    let mut filled = 0;
    while filled < buf.len() {
        match file.read(&mut buf[filled..])? {
            0 => break,
            k => filled += k,
        }
    }
    Ok(filled)
}

fn count_lines(text: &[u8]) -> usize {
    sniff::count_line_breaks(text, false)
}

/// Position just after the last line break (LF, CRLF or a lone CR) outside double quotes
/// (the text starts outside quotes; a CR at its very end waits for the next piece).
fn last_record_end(text: &[u8]) -> Option<usize> {
    let mut quoted = false;
    let mut last = None;
    for (i, &b) in text.iter().enumerate() {
        match b {
            b'"' => quoted = !quoted,
            b'\n' | b'\r' if !quoted && sniff::ends_line(text, i, false) => last = Some(i + 1),
            _ => {}
        }
    }
    last
}

/// Position just after the first line break outside double quotes.
fn record_end(text: &[u8]) -> Option<usize> {
    let mut quoted = false;
    for (i, &b) in text.iter().enumerate() {
        match b {
            b'"' => quoted = !quoted,
            b'\n' | b'\r' if !quoted && sniff::ends_line(text, i, false) => return Some(i + 1),
            _ => {}
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::io::Write;

    fn file_with(text: &str) -> tempfile::NamedTempFile {
        let mut f = tempfile::Builder::new()
            .suffix(".csv")
            .tempfile()
            .expect("temp file");
        f.write_all(text.as_bytes()).expect("write");
        f
    }

    fn small_chunks() -> StreamOptions {
        StreamOptions {
            chunk_bytes: 0, // raised to the 64 KiB floor
            ..StreamOptions::default()
        }
    }

    #[test]
    fn streaming_sees_the_same_complete_rows_as_loading() {
        let mut text = String::from("id,x,y,note\n");
        for i in 0..20_000 {
            let y = if i % 997 == 0 {
                String::new()
            } else {
                format!("{}", f64::from(i) * 0.5 + 1.0)
            };
            text.push_str(&format!(
                "{i},{},{y},\"a, \"\"quoted\"\"\nnote\"\n",
                f64::from(i) / 3.0
            ));
        }
        let f = file_with(&text);
        let mut rows = Vec::new();
        let mut xs = Vec::new();
        let summary = stream_columns(f.path(), &["x", "y"], &small_chunks(), |p| {
            rows.extend_from_slice(&p.rows);
            xs.extend_from_slice(&p.columns[0]);
            ControlFlow::Continue(())
        })
        .expect("streams");
        let table = crate::load(f.path(), &LoadOptions::default()).expect("loads");
        let whole = table.complete_rows(&["x", "y"], &[]).expect("complete");
        assert_eq!(rows, whole.rows);
        assert_eq!(xs, *whole.columns[0]);
        assert_eq!(summary.rows, 20_000);
        assert_eq!(summary.dropped_count, whole.dropped.len());
        assert_eq!(
            summary.dropped[..],
            whole.dropped[..LISTED_DROPS.min(whole.dropped.len())]
        );
        assert!(summary.bytes as usize == text.len());
        assert!(!summary.stopped);
    }

    #[test]
    fn later_pieces_read_only_the_columns_asked_for_under_the_files_names() {
        // Repeated names, a text column between, the asked columns out of file order.
        let mut text = String::from("x,label,x,y\n");
        for i in 0..30_000 {
            text.push_str(&format!("{i},tag {i},{},{}\n", i * 2, i % 7));
        }
        let f = file_with(&text);
        let mut seen = Vec::new();
        let summary = stream_columns(f.path(), &["y", "x_2"], &small_chunks(), |p| {
            seen.extend(
                p.columns[0]
                    .iter()
                    .zip(&p.columns[1])
                    .map(|(&a, &b)| (a, b)),
            );
            ControlFlow::Continue(())
        })
        .expect("streams");
        assert_eq!(summary.rows, 30_000);
        assert!(seen.len() == 30_000, "{} rows", seen.len());
        for (i, &(y, x2)) in seen.iter().enumerate() {
            assert_eq!((y, x2), ((i % 7) as f64, (i * 2) as f64), "row {}", i + 1);
        }
    }

    #[test]
    fn the_caller_can_stop_a_pass_and_the_head_shows_the_columns() {
        let mut text = String::from("a,b,label\n");
        for i in 0..40_000 {
            text.push_str(&format!("{i},{},x\n", i * 3));
        }
        let f = file_with(&text);
        let mut pieces = 0;
        let summary = stream_columns(f.path(), &["a", "b"], &small_chunks(), |p| {
            pieces += 1;
            assert!(p.bytes_read > 0);
            ControlFlow::Break(())
        })
        .expect("streams");
        assert_eq!(pieces, 1);
        assert!(summary.stopped && summary.rows < 40_000);
        let head = head(f.path(), &small_chunks()).expect("head");
        assert_eq!(head.columns().len(), 3);
        assert!(head.n_rows() < 40_000);
    }

    #[test]
    fn a_word_far_down_is_reported_at_its_own_row_and_line() {
        let mut text = String::from("x,y\n");
        for i in 0..30_000 {
            if i == 25_000 {
                text.push_str("12,n.d.\n");
            } else {
                text.push_str(&format!("{i},{}\n", 2 * i));
            }
        }
        let f = file_with(&text);
        let err = stream_columns(f.path(), &["x", "y"], &small_chunks(), |_| {
            ControlFlow::Continue(())
        })
        .expect_err("a word in y");
        let loaded = crate::load(f.path(), &LoadOptions::default())
            .and_then(|t| t.complete_rows(&["x", "y"], &[]).map(|_| ()))
            .expect_err("a word in y");
        assert_eq!(err.to_string(), loaded.to_string());
        assert!(err.to_string().contains("row 25001"), "{err}");
    }

    #[test]
    fn a_ragged_line_far_down_names_the_files_line() {
        let mut text = String::from("x,y\n");
        for i in 0..30_000 {
            if i == 20_000 {
                text.push_str("1,2,3\n");
            } else {
                text.push_str(&format!("{i},{}\n", 2 * i));
            }
        }
        let f = file_with(&text);
        let err = stream_columns(f.path(), &["x", "y"], &small_chunks(), |_| {
            ControlFlow::Continue(())
        })
        .expect_err("ragged");
        let loaded = crate::load(f.path(), &LoadOptions::default()).expect_err("ragged");
        assert_eq!(err.to_string(), loaded.to_string());
    }

    #[test]
    fn an_unknown_column_is_named() {
        let f = file_with("x,y\n1,2\n3,4\n");
        let err = stream_columns(f.path(), &["x", "z"], &small_chunks(), |_| {
            ControlFlow::Continue(())
        })
        .expect_err("no z");
        assert!(err.to_string().contains("'z'"), "{err}");
    }
}

//! Loading tables of measurements for Plumbline.
//!
//! [`load`] opens CSV/TSV/semicolon text (via polars, after sniffing the delimiter, header
//! and decimal mark), Parquet (polars) and spreadsheets (calamine), and types every column
//! as numeric or text. [`Table::complete_rows`] then hands an analysis the complete rows of
//! the columns it needs and says which rows it dropped and why.
//!
//! Rows are numbered from 1 among the file's data rows (the header is not counted); that
//! number is the one users see and the one exclusions name.

pub mod analysis;
mod budget;
mod cell;
mod delimited;
mod encoding;
mod error;
mod guard;
mod parquet;
mod parquet_pages;
mod progress;
mod rows;
mod sample;
mod select;
mod sheet;
mod sniff;
mod stream;
mod table;
mod typed;
mod values;

pub use budget::{available_memory, text_need, TEXT_BYTE_FACTOR, TEXT_CELL_BYTES};
pub use cell::{Cell, DecimalMark, DEFAULT_MISSING_TOKENS};
pub use encoding::TextEncoding;
pub use error::{DataError, Result};
pub use guard::quiet_reader_panics;
pub use progress::{Progress, Stage};
pub use rows::RowList;
pub use sample::{sample_rows, RowSample};
pub use select::{DropReason, Dropped, Selection};
pub use sniff::HeaderMode;
pub use stream::{head, stream_columns, Piece, StreamOptions, StreamSummary, LISTED_DROPS};
pub use table::{Column, ColumnSummary, ColumnValues, SourceFormat, Table};
pub use values::{Numbers, Texts};

use std::path::Path;

/// How to read a file. The defaults detect everything.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct LoadOptions {
    /// Field delimiter for text files; `None` sniffs it from the first lines.
    pub delimiter: Option<u8>,
    /// Whether the first row holds column names.
    pub header: HeaderMode,
    /// Decimal mark of numbers in text files; `None` detects it.
    pub decimal: Option<DecimalMark>,
    /// Text encoding of text files; `None` detects it (byte-order mark, then UTF-16 by its
    /// zero bytes, then UTF-8, then Windows-1252 with a note).
    pub encoding: Option<TextEncoding>,
    /// Extra cell values that mean "missing" (e.g. `-999`), beside [`DEFAULT_MISSING_TOKENS`].
    pub missing_tokens: Vec<String>,
    /// Spreadsheet sheet to read; `None` reads the first.
    pub sheet: Option<String>,
    /// Most memory a text load may need (bytes); `None`: what the system reports available.
    pub memory_limit: Option<u64>,
    /// Read only these columns (by header name) of a delimited text file — when its header
    /// names every column once, holds each name asked for, and its first rows settle the
    /// decimal mark; otherwise every column is read, so that a message about an unknown
    /// column still lists them all. `None`: every column. Other formats read every column.
    pub only: Option<Vec<String>>,
    /// Leave the table's SHA-256 empty instead of hashing the bytes read, for a reader that
    /// never reports it (a command printing numbers): the hash is one more pass over the file,
    /// taken beside the parse. Sessions and summaries, which record the hash, leave this off.
    pub skip_hash: bool,
}

/// Opens `path`, choosing the reader by the file's extension (`.parquet`/`.pq`;
/// `.xlsx`/`.xlsm`/`.xlsb`/`.xls`/`.ods`; anything else is read as delimited text).
///
/// The file is only read, never written.
///
/// # Errors
/// A [`DataError`] naming the file and, where it applies, the line, row or column at fault
/// and what to do about it.
pub fn load(path: &Path, options: &LoadOptions) -> Result<Table> {
    load_tracked(path, options, None)
}

/// [`load`], reporting how far it has got through `progress` (read from another thread).
///
/// # Errors
/// As [`load`].
pub fn load_with_progress(
    path: &Path,
    options: &LoadOptions,
    progress: &Progress,
) -> Result<Table> {
    load_tracked(path, options, Some(progress))
}

/// Reads a table from bytes already in memory (a paste, a download, a fuzzer's input):
/// delimited text, or a spreadsheet when `spreadsheet` is true. `label` stands for the file in
/// messages. Nothing is written.
///
/// # Errors
/// As [`load`].
pub fn load_bytes(
    label: &Path,
    bytes: &[u8],
    spreadsheet: bool,
    options: &LoadOptions,
) -> Result<Table> {
    if spreadsheet {
        sheet::from_bytes(label, bytes.to_vec(), options)
    } else {
        delimited::from_bytes(label, bytes, options, None)
    }
}

/// Reads a Parquet file from bytes already in memory; `label` stands for the file in
/// messages.
///
/// # Errors
/// As [`load`].
pub fn load_parquet_bytes(label: &Path, bytes: &[u8], options: &LoadOptions) -> Result<Table> {
    parquet::from_bytes(label, bytes, options)
}

/// Whether [`load`] would accept `path` under its memory cap (see `LoadOptions::memory_limit`),
/// checked from the file's size (and a workbook's directory) without reading the data.
///
/// # Errors
/// [`DataError::TooLarge`] with the sizes and what to do, or [`DataError::Io`].
pub fn fits_in_memory(path: &Path, options: &LoadOptions) -> Result<()> {
    match extension_of(path).as_str() {
        "parquet" | "pq" => Ok(()), // checked from the file's metadata when it is opened
        "xlsx" | "xlsm" | "xlsb" | "xls" | "ods" => budget::check_sheet(path, options.memory_limit),
        _ => budget::text_read_cap(path, options.memory_limit).map(|_| ()),
    }
}

/// Whether `path` is read as delimited text (the only kind [`stream_columns`] reads).
pub fn is_delimited_text(path: &Path) -> bool {
    !matches!(
        extension_of(path).as_str(),
        "parquet" | "pq" | "xlsx" | "xlsm" | "xlsb" | "xls" | "ods"
    )
}

fn extension_of(path: &Path) -> String {
    path.extension()
        .map(|e| e.to_string_lossy().to_ascii_lowercase())
        .unwrap_or_default()
}

fn load_tracked(path: &Path, options: &LoadOptions, progress: Option<&Progress>) -> Result<Table> {
    match extension_of(path).as_str() {
        "parquet" | "pq" => parquet::load(path, options),
        "xlsx" | "xlsm" | "xlsb" | "xls" | "ods" => sheet::load(path, options),
        _ => delimited::load(path, options, progress),
    }
}

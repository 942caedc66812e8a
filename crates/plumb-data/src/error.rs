//! Errors of loading and selecting data, each naming the file and what to do.

use std::path::PathBuf;

use thiserror::Error;

/// Why a file could not be read or a selection could not be made.
#[derive(Debug, Error)]
pub enum DataError {
    /// Loading the file would need more memory than is available.
    #[error("{}: {bytes} bytes need about {} MB of memory to load, more than the {} MB allowed (the memory available, or the cap for this kind of file); load a smaller extract (fewer rows or columns), or convert the columns you need to Parquet", path.display(), need / 1_000_000, limit / 1_000_000)]
    TooLarge {
        /// File.
        path: PathBuf,
        /// File size.
        bytes: u64,
        /// Estimated memory needed.
        need: u64,
        /// Memory available (or the limit set in the load options).
        limit: u64,
    },
    /// The operating system refused the read.
    #[error("{}: cannot read the file ({source}); check the path and permissions", path.display())]
    Io {
        /// File.
        path: PathBuf,
        /// Underlying error.
        source: std::io::Error,
    },
    /// Nothing but blank lines.
    #[error("{}: the file is empty; export the table again", path.display())]
    Empty {
        /// File.
        path: PathBuf,
    },
    /// A header and no data rows.
    #[error("{}: the file has a header but no data rows", path.display())]
    NoDataRows {
        /// File.
        path: PathBuf,
    },
    /// A sheet with no data rows (perhaps the data are on another sheet).
    #[error("{}, sheet '{sheet}': no data rows; pick the sheet that holds the table with --sheet (the workbook has: {available})", path.display())]
    EmptySheet {
        /// File.
        path: PathBuf,
        /// Sheet read.
        sheet: String,
        /// Sheet names, comma-separated.
        available: String,
    },
    /// Bytes that are not UTF-8.
    #[error("{}, line {line}: the bytes are not valid UTF-8, which was asked for; choose the file's encoding (--encoding windows-1252, or utf-16le/utf-16be), or re-save the file as UTF-8", path.display())]
    NotUtf8 {
        /// File.
        path: PathBuf,
        /// 1-based line number of the first bad byte.
        line: usize,
    },
    /// A row with a different number of fields than the first row.
    #[error("{}, line {line} (data row {row}): {found} {} where the first row has {expected}; fix that line, or check the delimiter (read as {delimiter})", path.display(), if *found == 1 { "field" } else { "fields" })]
    Ragged {
        /// File.
        path: PathBuf,
        /// 1-based line in the file.
        line: usize,
        /// 1-based data row (0 for the header).
        row: usize,
        /// Fields found.
        found: usize,
        /// Fields expected.
        expected: usize,
        /// The delimiter in use, printable.
        delimiter: String,
    },
    /// A quoted field that never closes.
    #[error("{}, line {line}: a quoted field opens here and never closes; add the closing quote", path.display())]
    UnclosedQuote {
        /// File.
        path: PathBuf,
        /// 1-based line where the quote opens.
        line: usize,
    },
    /// A reader library failed in a way not covered above.
    #[error("{}: {message}", path.display())]
    Parse {
        /// File.
        path: PathBuf,
        /// What the reader said.
        message: String,
    },
    /// The requested sheet is not in the workbook.
    #[error("{}: no sheet named '{sheet}'; the workbook has: {available}", path.display())]
    NoSuchSheet {
        /// File.
        path: PathBuf,
        /// Requested sheet.
        sheet: String,
        /// Sheet names, comma-separated.
        available: String,
    },
    /// A column name that the table does not have.
    #[error("{}: no column named '{name}'; {hint}", path.display())]
    UnknownColumn {
        /// File.
        path: PathBuf,
        /// Requested name.
        name: String,
        /// "did you mean …" or the list of columns.
        hint: String,
    },
    /// A numeric analysis asked for a column that holds text.
    #[error("{}, column '{column}': row {row} holds '{value}', which is not a number ({text_count} such cells); if such values mean missing, add them as missing tokens (--missing '{value}'), otherwise fix the file", path.display())]
    TextColumn {
        /// File.
        path: PathBuf,
        /// Column.
        column: String,
        /// First offending data row.
        row: usize,
        /// Its value.
        value: String,
        /// How many cells are not numbers.
        text_count: usize,
    },
    /// A column without a single value.
    #[error("{}, column '{column}': every cell is missing; choose another column", path.display())]
    AllMissing {
        /// File.
        path: PathBuf,
        /// Column.
        column: String,
    },
    /// An exclusion that names a row the file does not have.
    #[error("{}: row {row} does not exist (the file has {n_rows} data rows, numbered from 1 after the header)", path.display())]
    RowOutOfRange {
        /// File.
        path: PathBuf,
        /// Requested row.
        row: usize,
        /// Data rows in the file.
        n_rows: usize,
    },
}

impl DataError {
    /// The same error for text that sat `before` line breaks into the file, parsed with a
    /// copy of the header line in front (`header`) or without: line numbers become the file's.
    pub(crate) fn shifted(mut self, before: usize, header: bool) -> Self {
        let shift = |line: &mut usize| {
            *line = if header {
                before + *line - 1
            } else {
                before + *line
            };
        };
        match &mut self {
            Self::Ragged { line, .. }
            | Self::UnclosedQuote { line, .. }
            | Self::NotUtf8 { line, .. } => {
                shift(line);
            }
            _ => {}
        }
        self
    }

    /// The same error for a piece of the file that starts after `rows` data rows.
    pub(crate) fn with_row_offset(mut self, rows: usize) -> Self {
        match &mut self {
            Self::Ragged { row, .. } | Self::TextColumn { row, .. } if *row > 0 => *row += rows,
            _ => {}
        }
        self
    }
}

/// Result alias for this crate.
pub type Result<T> = std::result::Result<T, DataError>;

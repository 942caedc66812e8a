//! A loaded table: named, typed columns over numbered data rows.

use std::collections::{HashMap, HashSet};
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

use crate::cell::{read_cell, Cell, DecimalMark};
use crate::encoding::TextEncoding;
use crate::values::{Numbers, Texts, TextsBuilder};

/// How the file was read, so that the same reading can be repeated and reported.
#[derive(Debug, Clone, PartialEq)]
pub enum SourceFormat {
    /// Delimited text.
    Delimited {
        /// The text encoding read.
        encoding: TextEncoding,
        /// Field delimiter.
        delimiter: u8,
        /// Decimal mark of numbers.
        decimal: DecimalMark,
        /// Whether the first row was taken as the header.
        header: bool,
    },
    /// Apache Parquet.
    Parquet,
    /// A spreadsheet sheet.
    Sheet {
        /// Sheet name.
        name: String,
        /// Whether the first row was taken as the header.
        header: bool,
    },
}

impl std::fmt::Display for SourceFormat {
    /// How the file was read, in one line: `text (utf-8), delimiter ';', decimal comma, header row`.
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let header = |h: bool| if h { "header row" } else { "no header row" };
        match self {
            Self::Delimited {
                encoding,
                delimiter,
                decimal,
                header: h,
            } => {
                let delimiter = match delimiter {
                    b'\t' => "tab".to_string(),
                    d => format!("'{}'", *d as char),
                };
                let decimal = match decimal {
                    DecimalMark::Point => "point",
                    DecimalMark::Comma => "comma",
                };
                write!(
                    f,
                    "text ({}), delimiter {delimiter}, decimal {decimal}, {}",
                    encoding.as_str(),
                    header(*h)
                )
            }
            Self::Parquet => f.write_str("Parquet"),
            Self::Sheet { name, header: h } => write!(f, "sheet '{name}', {}", header(*h)),
        }
    }
}

/// The values of one column.
#[derive(Debug, Clone, PartialEq)]
pub enum ColumnValues {
    /// Every non-missing cell is a number (a column with no values at all is numeric and empty).
    Numeric(Numbers),
    /// At least one non-missing cell is not a number.
    Text {
        /// Cell texts (numbers kept as written).
        values: Texts,
        /// 1-based data row of the first cell that is not a number.
        first_text_row: usize,
        /// That cell's text.
        first_text: String,
        /// Cells that are not numbers.
        text_count: usize,
    },
}

/// SHA-256 of `bytes`, lower-case hex.
pub(crate) fn sha256_hex(bytes: &[u8]) -> String {
    use sha2::{Digest, Sha256};
    format!("{:x}", Sha256::digest(bytes))
}

/// [`sha256_hex`], or empty when the reader asked for no hash (`LoadOptions::skip_hash`).
pub(crate) fn sha256_unless_skipped(bytes: &[u8], options: &crate::LoadOptions) -> String {
    if options.skip_hash {
        String::new()
    } else {
        sha256_hex(bytes)
    }
}

/// A named column.
#[derive(Debug, Clone, PartialEq)]
pub struct Column {
    /// Name (from the header, or `columnN`).
    pub name: String,
    /// Typed values, one per data row.
    pub values: ColumnValues,
}

/// What a column summary shows: type, missing count, range.
#[derive(Debug, Clone, PartialEq)]
pub struct ColumnSummary {
    /// Column name.
    pub name: String,
    /// `numeric`, `text` or `empty`.
    pub kind: &'static str,
    /// Missing cells.
    pub missing: usize,
    /// Smallest finite value (numeric columns).
    pub min: Option<f64>,
    /// Largest finite value (numeric columns).
    pub max: Option<f64>,
}

impl ColumnValues {
    /// Each cell as text: a text cell as written, a number in Rust's shortest form that reads
    /// back to it; `None` where missing.
    pub fn labels(&self) -> Vec<Option<String>> {
        match self {
            Self::Text { values, .. } => values.iter().map(|v| v.map(str::to_string)).collect(),
            Self::Numeric(values) => values.iter().map(|v| v.map(|v| v.to_string())).collect(),
        }
    }

    /// Types a column of cells: numeric unless some non-missing cell is text.
    pub(crate) fn from_cells(cells: Vec<Cell>) -> Self {
        if !cells.iter().any(|c| matches!(c, Cell::Text(_))) {
            return Self::Numeric(
                cells
                    .into_iter()
                    .map(|c| match c {
                        Cell::Number(v) => Some(v),
                        _ => None,
                    })
                    .collect(),
            );
        }
        Self::text_column(cells.iter().map(|c| match c {
            Cell::Missing => Ok(None),
            Cell::Number(v) => Ok(Some(*v)),
            Cell::Text(s) => Err(s.as_str()),
        }))
    }

    /// A text column from its cells as [`read_cell`] reads them (`Ok(None)` missing,
    /// `Ok(Some)` a number, kept in Rust's shortest form; `Err` a text), remembering the first
    /// text and counting them, without a string per cell.
    fn text_column<'a>(cells: impl Iterator<Item = Result<Option<f64>, &'a str>>) -> Self {
        let mut column = TextColumn::with_capacity(cells.size_hint().0);
        for cell in cells {
            column.push(cell);
        }
        column.finish()
    }

    /// Types a column straight from its cell texts (`None` for an empty field), as
    /// [`ColumnValues::from_cells`] would after [`crate::cell::classify`] — without a string
    /// per cell. `cells` is called again only when a cell turns out to be text.
    pub(crate) fn from_texts<'a, I>(
        cells: impl Fn() -> I,
        decimal: DecimalMark,
        tokens: &[String],
    ) -> Self
    where
        I: Iterator<Item = Option<&'a str>>,
    {
        let mut numbers = Vec::with_capacity(cells().size_hint().0);
        for raw in cells() {
            match raw.map_or(Ok(None), |s| read_cell(s, decimal, tokens)) {
                Ok(v) => numbers.push(v.unwrap_or(f64::NAN)),
                Err(_) => {
                    drop(numbers);
                    let mut column = TextColumn::with_capacity(cells().size_hint().0);
                    for raw in cells() {
                        column.push_raw(raw, decimal, tokens);
                    }
                    return column.finish();
                }
            }
        }
        Self::Numeric(Numbers::from_nan_missing(numbers))
    }
}

/// Builds a text column a cell at a time: its dictionary, how many cells are text, and the
/// first of them.
struct TextColumn {
    values: TextsBuilder,
    /// Whether each level came from a text cell (else from a number's shortest form).
    from_text: Vec<bool>,
    rows: usize,
    first: Option<(usize, String)>,
    text_count: usize,
    shortest: String,
}

impl TextColumn {
    fn with_capacity(rows: usize) -> Self {
        Self {
            values: TextsBuilder::with_capacity(rows),
            from_text: Vec::new(),
            rows: 0,
            first: None,
            text_count: 0,
            shortest: String::new(),
        }
    }

    /// Appends a cell as [`read_cell`] reads it.
    fn push(&mut self, cell: Result<Option<f64>, &str>) {
        self.rows += 1;
        let code = match cell {
            Ok(None) => self.values.push(None),
            Ok(Some(v)) => {
                self.shortest.clear();
                // Writing to a String cannot fail.
                let _ = write!(self.shortest, "{v}");
                self.values.push(Some(&self.shortest))
            }
            Err(text) => {
                self.counted_text(text);
                self.values.push(Some(text))
            }
        };
        if let Some(code) = code {
            self.note_level(code, cell.is_err());
        }
    }

    /// Appends a cell from its raw text (`None` for an empty field). A cell whose trimmed
    /// text is already a level that came from a text cell is that text again ([`read_cell`]
    /// would read it the same way), so it is not read as a number a second time.
    fn push_raw(&mut self, raw: Option<&str>, decimal: DecimalMark, tokens: &[String]) {
        let known = raw
            .map(str::trim)
            .and_then(|s| Some((s, self.values.code_if_known(s)?)))
            .filter(|&(_, code)| self.from_text.get(code as usize) == Some(&true));
        match known {
            Some((text, code)) => {
                self.rows += 1;
                self.counted_text(text);
                self.values.push_code(code);
            }
            None => self.push(raw.map_or(Ok(None), |s| read_cell(s, decimal, tokens))),
        }
    }

    fn counted_text(&mut self, text: &str) {
        self.text_count += 1;
        let row = self.rows;
        self.first.get_or_insert_with(|| (row, shorten(text)));
    }

    /// Records where a level came from when `code` is new.
    fn note_level(&mut self, code: u32, text: bool) {
        if code as usize == self.from_text.len() {
            self.from_text.push(text);
        }
    }

    fn finish(self) -> ColumnValues {
        let (first_text_row, first_text) = self.first.unwrap_or_default();
        ColumnValues::Text {
            values: self.values.finish(),
            first_text_row,
            first_text,
            text_count: self.text_count,
        }
    }
}

impl Column {
    /// Number of data rows.
    pub fn len(&self) -> usize {
        match &self.values {
            ColumnValues::Numeric(v) => v.len(),
            ColumnValues::Text { values, .. } => values.len(),
        }
    }

    /// Whether the column has no rows.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Type, missing count and range.
    pub fn summary(&self) -> ColumnSummary {
        match &self.values {
            ColumnValues::Numeric(v) => {
                let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
                for &x in v.as_nan_missing() {
                    if x.is_finite() {
                        lo = lo.min(x);
                        hi = hi.max(x);
                    }
                }
                let (min, max) = if lo <= hi {
                    (Some(lo), Some(hi))
                } else {
                    (None, None)
                };
                let missing = v.missing();
                ColumnSummary {
                    name: self.name.clone(),
                    kind: if missing == v.len() {
                        "empty"
                    } else {
                        "numeric"
                    },
                    missing,
                    min,
                    max,
                }
            }
            ColumnValues::Text { values, .. } => ColumnSummary {
                name: self.name.clone(),
                kind: "text",
                missing: values.missing(),
                min: None,
                max: None,
            },
        }
    }
}

/// A loaded table.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    source: PathBuf,
    format: SourceFormat,
    columns: Vec<Column>,
    n_rows: usize,
    notes: Vec<String>,
    /// SHA-256 of the very bytes the table was read from, lower-case hex.
    sha256: String,
}

impl Table {
    /// Builds a table, making duplicate or blank column names unique (with a note).
    pub(crate) fn new(
        source: &Path,
        format: SourceFormat,
        names: Vec<String>,
        cells: Vec<Vec<Cell>>,
        notes: Vec<String>,
    ) -> Self {
        let values = cells.into_iter().map(ColumnValues::from_cells).collect();
        Self::from_values(source, format, names, values, notes)
    }

    /// Builds a table from typed columns, making duplicate or blank column names unique
    /// (with a note).
    pub(crate) fn from_values(
        source: &Path,
        format: SourceFormat,
        names: Vec<String>,
        values: Vec<ColumnValues>,
        mut notes: Vec<String>,
    ) -> Self {
        let names = unique_names(names, &mut notes);
        let columns: Vec<Column> = names
            .into_iter()
            .zip(values)
            .map(|(name, values)| Column { name, values })
            .collect();
        let n_rows = columns.first().map_or(0, Column::len);
        Self {
            source: source.to_path_buf(),
            format,
            columns,
            n_rows,
            notes,
            sha256: String::new(),
        }
    }

    /// SHA-256 of the bytes the table was read from (not of a second read of the file, which
    /// could differ), lower-case hex; empty when read with `LoadOptions::skip_hash`.
    pub fn sha256(&self) -> &str {
        &self.sha256
    }

    /// Records the hash of the bytes read (unless the reader asked for none).
    pub(crate) fn with_sha256(mut self, bytes: &[u8], options: &crate::LoadOptions) -> Self {
        self.sha256 = sha256_unless_skipped(bytes, options);
        self
    }

    /// Records a hash computed by the loader.
    pub(crate) fn set_sha256(&mut self, hex: String) {
        self.sha256 = hex;
    }

    /// The file the table came from.
    pub fn source(&self) -> &Path {
        &self.source
    }

    /// How it was read.
    pub fn format(&self) -> &SourceFormat {
        &self.format
    }

    /// All columns, in file order.
    pub fn columns(&self) -> &[Column] {
        &self.columns
    }

    /// Every column's [`Column::summary`], in file order (computed on all cores).
    pub fn summaries(&self) -> Vec<ColumnSummary> {
        use rayon::prelude::*;
        self.columns.par_iter().map(Column::summary).collect()
    }

    /// Number of data rows.
    pub fn n_rows(&self) -> usize {
        self.n_rows
    }

    /// Things the loader changed or noticed (renamed duplicate headers, error cells, …).
    pub fn notes(&self) -> &[String] {
        &self.notes
    }

    /// The column named `name`, if any.
    pub fn column(&self, name: &str) -> Option<&Column> {
        self.columns.iter().find(|c| c.name == name)
    }
}

/// A cell's text as shown in a message: at most 40 characters, then "…".
fn shorten(s: &str) -> String {
    const KEEP: usize = 40;
    match s.char_indices().nth(KEEP) {
        Some((cut, _)) => format!("{}…", &s[..cut]),
        None => s.to_string(),
    }
}

fn unique_names(names: Vec<String>, notes: &mut Vec<String>) -> Vec<String> {
    // Sets, not a scan of the names so far: a file may hold 100 000 columns, or as many
    // repeats of one name.
    let mut taken: HashSet<String> = HashSet::with_capacity(names.len());
    let mut next_suffix: HashMap<String, usize> = HashMap::new();
    let mut out: Vec<String> = Vec::with_capacity(names.len());
    for (i, raw) in names.into_iter().enumerate() {
        let base = if raw.trim().is_empty() {
            format!("column{}", i + 1)
        } else {
            raw.trim().to_string()
        };
        let mut name = base.clone();
        if taken.contains(&name) {
            let k = next_suffix.entry(base.clone()).or_insert(2);
            while taken.contains(&name) {
                name = format!("{base}_{k}");
                *k += 1;
            }
            notes.push(format!(
                "column {} repeats the name '{base}'; it is called '{name}' here",
                i + 1
            ));
        }
        taken.insert(name.clone());
        out.push(name);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_text_column_typed_from_raw_cells_matches_the_cell_by_cell_reading() {
        // Repeats of texts, numbers written several ways, tokens and blanks, in an order
        // where a repeated text comes before and after numbers of the same look.
        let raw = [
            Some("north"),
            Some(" north "),
            Some("12.50"),
            Some("12.5"),
            None,
            Some("NA"),
            Some("north"),
            Some("inf"),
            Some("-0"),
            Some("0"),
            Some("1e3"),
            Some("1000"),
            Some("  "),
            Some("-999"),
            Some("x"),
            Some("north"),
            Some("x "),
        ];
        let tokens = vec!["-999".to_string()];
        let typed = ColumnValues::from_texts(|| raw.into_iter(), DecimalMark::Point, &tokens);
        let cells = raw
            .iter()
            .map(|r| {
                r.map_or(Cell::Missing, |s| {
                    crate::cell::classify(s, DecimalMark::Point, &tokens)
                })
            })
            .collect();
        assert_eq!(typed, ColumnValues::from_cells(cells));
        let ColumnValues::Text {
            first_text_row,
            text_count,
            ..
        } = typed
        else {
            panic!("a text column")
        };
        assert_eq!((first_text_row, text_count), (1, 6));
    }

    #[test]
    fn duplicate_and_blank_names_become_unique_with_a_note() {
        let mut notes = Vec::new();
        let names = unique_names(vec!["x".into(), "x".into(), " ".into()], &mut notes);
        assert_eq!(names, ["x", "x_2", "column3"]);
        assert_eq!(notes.len(), 1);
    }

    #[test]
    fn a_name_repeated_many_times_gets_increasing_suffixes_that_skip_taken_names() {
        let mut notes = Vec::new();
        let mut raw: Vec<String> = vec!["x_3".into()];
        raw.extend(std::iter::repeat_n("x".to_string(), 4));
        let names = unique_names(raw, &mut notes);
        assert_eq!(names, ["x_3", "x", "x_2", "x_4", "x_5"]);
        assert_eq!(notes.len(), 3);
    }

    #[test]
    fn one_text_cell_makes_a_text_column_that_remembers_where() {
        let values = ColumnValues::from_cells(vec![
            Cell::Number(1.0),
            Cell::Missing,
            Cell::Text("n.d.".into()),
        ]);
        let ColumnValues::Text {
            first_text_row,
            text_count,
            ..
        } = values
        else {
            panic!("expected text");
        };
        assert_eq!((first_text_row, text_count), (3, 1));
    }
}

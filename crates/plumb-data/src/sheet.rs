//! Spreadsheets (xlsx, xlsm, xlsb, xls, ods) via calamine: the first sheet or a named one.

use std::path::Path;

use calamine::{open_workbook_auto_from_rs, Data, Reader};

use crate::cell::{classify, Cell, DecimalMark};
use crate::sniff::{self, HeaderMode};
use crate::table::{SourceFormat, Table};
use crate::{DataError, LoadOptions, Result};

pub(crate) fn load(path: &Path, options: &LoadOptions) -> Result<Table> {
    crate::budget::check_sheet(path, options.memory_limit)?;
    // Read once: the hash is of the bytes the table comes from.
    let bytes = std::fs::read(path).map_err(|source| DataError::Io {
        path: path.to_path_buf(),
        source,
    })?;
    from_bytes(path, bytes, options)
}

/// A workbook already in memory (any of the formats calamine detects); `label` names it in
/// messages.
pub(crate) fn from_bytes(label: &Path, bytes: Vec<u8>, options: &LoadOptions) -> Result<Table> {
    let hash = crate::table::sha256_hex(&bytes);
    let workbook = open_workbook_auto_from_rs(std::io::Cursor::new(bytes))
        .map_err(|e| parse_error(label, &e))?;
    let mut table = from_workbook(label, workbook, options)?;
    table.set_sha256(hash);
    Ok(table)
}

fn parse_error(path: &Path, e: &dyn std::fmt::Display) -> DataError {
    DataError::Parse {
        path: path.to_path_buf(),
        message: format!("not a readable spreadsheet ({e})"),
    }
}

fn from_workbook<RS: std::io::Read + std::io::Seek>(
    path: &Path,
    mut workbook: calamine::Sheets<RS>,
    options: &LoadOptions,
) -> Result<Table> {
    let names = workbook.sheet_names();
    let sheet = chosen_sheet(path, &names, options)?;
    let range = workbook
        .worksheet_range(&sheet)
        .map_err(|e| parse_error(path, &e))?;
    let mut error_cells = 0usize;
    let rows: Vec<Vec<Cell>> = range
        .rows()
        .map(|row| {
            row.iter()
                .map(|d| to_cell(d, options, &mut error_cells))
                .collect()
        })
        .filter(|r: &Vec<Cell>| r.iter().any(|c| *c != Cell::Missing))
        .collect();
    let empty_sheet = || DataError::EmptySheet {
        path: path.to_path_buf(),
        sheet: sheet.clone(),
        available: names.join(", "),
    };
    if rows.is_empty() {
        return Err(empty_sheet());
    }
    let header = has_header(&range, options);
    let (column_names, cells) = columns_of(&rows, header);
    if cells.first().is_none_or(Vec::is_empty) {
        return Err(empty_sheet());
    }
    let mut notes = Vec::new();
    if error_cells > 0 {
        notes.push(format!(
            "sheet '{sheet}': {error_cells} cells hold spreadsheet errors (such as #DIV/0!) and are read as missing"
        ));
    }
    Ok(Table::new(
        path,
        SourceFormat::Sheet {
            name: sheet,
            header,
        },
        column_names,
        cells,
        notes,
    ))
}

/// The sheet asked for, or the first.
fn chosen_sheet(path: &Path, names: &[String], options: &LoadOptions) -> Result<String> {
    match &options.sheet {
        Some(s) if names.contains(s) => Ok(s.clone()),
        Some(s) => Err(DataError::NoSuchSheet {
            path: path.to_path_buf(),
            sheet: s.clone(),
            available: names.join(", "),
        }),
        None => names.first().cloned().ok_or_else(|| DataError::Empty {
            path: path.to_path_buf(),
        }),
    }
}

/// Whether the first row names the columns (asked, or sniffed from the first 200 rows).
fn has_header(range: &calamine::Range<Data>, options: &LoadOptions) -> bool {
    match options.header {
        HeaderMode::Yes => true,
        HeaderMode::No => false,
        HeaderMode::Auto => {
            let raw_rows: Vec<Vec<String>> = range
                .rows()
                .take(200)
                .map(|r| r.iter().map(ToString::to_string).collect())
                .collect();
            sniff::has_header(&raw_rows, DecimalMark::Point, &options.missing_tokens)
        }
    }
}

/// Column names (from the header row, or `column1`, `column2`, …) and the cells by column.
fn columns_of(rows: &[Vec<Cell>], header: bool) -> (Vec<String>, Vec<Vec<Cell>>) {
    let width = rows.iter().map(Vec::len).max().unwrap_or(0);
    let (names, body) = if header {
        let names = (0..width)
            .map(|j| match rows[0].get(j) {
                Some(Cell::Text(s)) => s.clone(),
                Some(Cell::Number(v)) => v.to_string(),
                _ => String::new(),
            })
            .collect();
        (names, &rows[1..])
    } else {
        ((1..=width).map(|j| format!("column{j}")).collect(), rows)
    };
    let cells = (0..width)
        .map(|j| {
            body.iter()
                .map(|r| r.get(j).cloned().unwrap_or(Cell::Missing))
                .collect()
        })
        .collect();
    (names, cells)
}

fn to_cell(d: &Data, options: &LoadOptions, error_cells: &mut usize) -> Cell {
    match d {
        Data::Int(i) => Cell::Number(*i as f64),
        Data::Float(f) if f.is_nan() => Cell::Missing,
        Data::Float(f) => Cell::Number(*f),
        Data::DateTime(dt) => Cell::Number(dt.as_f64()),
        Data::String(s) | Data::DateTimeIso(s) | Data::DurationIso(s) => classify(
            s,
            options.decimal.unwrap_or(DecimalMark::Point),
            &options.missing_tokens,
        ),
        Data::Bool(b) => Cell::Text(b.to_string()),
        Data::Error(_) => {
            *error_cells += 1;
            Cell::Missing
        }
        Data::Empty => Cell::Missing,
    }
}

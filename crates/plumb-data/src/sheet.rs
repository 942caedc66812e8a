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
    let bytes = crate::budget::read_binary(path, options.memory_limit)?;
    from_bytes(path, bytes, options)
}

/// A workbook already in memory (any of the formats calamine detects); `label` names it in
/// messages.
pub(crate) fn from_bytes(label: &Path, bytes: Vec<u8>, options: &LoadOptions) -> Result<Table> {
    let hash = crate::table::sha256_unless_skipped(&bytes, options);
    let mut table = crate::guard::contain(label, "spreadsheet", || {
        let workbook = open_workbook_auto_from_rs(std::io::Cursor::new(bytes))
            .map_err(|e| parse_error(label, &e))?;
        from_workbook(label, workbook, options)
    })?;
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
    if let calamine::Sheets::Xlsx(x) = &mut workbook {
        check_extent(path, x, &sheet, options.memory_limit)?;
    }
    let range = workbook
        .worksheet_range(&sheet)
        .map_err(|e| parse_error(path, &e))?;
    let mut seen = Seen::default();
    let rows: Vec<Vec<Cell>> = range
        .rows()
        .enumerate()
        .map(|(i, row)| {
            row.iter()
                .enumerate()
                .map(|(j, d)| to_cell(d, options, &mut seen, (i, j)))
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
    let notes = seen.notes(&sheet, &column_names, header);
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

/// Bytes a cell takes in the grid the spreadsheet reader builds (its `Data` value).
const GRID_CELL_BYTES: u64 = 32;

/// Refuses a sheet whose cells span a grid too large to hold (a stray cell at XFD1048576 makes
/// the reader allocate 550 GB), found by streaming its cells before the grid is built.
fn check_extent<RS: std::io::Read + std::io::Seek>(
    path: &Path,
    book: &mut calamine::Xlsx<RS>,
    sheet: &str,
    limit: Option<u64>,
) -> Result<()> {
    let Ok(mut cells) = book.worksheet_cells_reader(sheet) else {
        return Ok(()); // the range reader names the problem itself
    };
    let (mut first, mut last) = ((u32::MAX, u32::MAX), (0u32, 0u32));
    let mut far = (0u32, 0u32);
    while let Ok(Some(cell)) = cells.next_cell() {
        let (r, c) = cell.get_position();
        first = (first.0.min(r), first.1.min(c));
        if u64::from(r) * 20_000 + u64::from(c) >= u64::from(far.0) * 20_000 + u64::from(far.1) {
            far = (r, c);
        }
        last = (last.0.max(r), last.1.max(c));
    }
    if first.0 == u32::MAX {
        return Ok(());
    }
    let rows = u64::from(last.0 - first.0) + 1;
    let cols = u64::from(last.1 - first.1) + 1;
    let need = rows.saturating_mul(cols).saturating_mul(GRID_CELL_BYTES);
    let limit = limit
        .or_else(crate::budget::available_memory)
        .unwrap_or(u64::MAX);
    if need <= limit {
        return Ok(());
    }
    Err(DataError::Parse {
        path: path.to_path_buf(),
        message: format!(
            "sheet '{sheet}' has a cell at {} that makes its data span {rows} rows × {cols} columns ({} MB as a grid, more than the {} MB available); delete stray cells far from the data, or export the data range as CSV",
            a1(far),
            need >> 20,
            limit >> 20
        ),
    })
}

/// A cell's position in A1 notation (`(0, 0)` is `A1`).
fn a1((row, col): (u32, u32)) -> String {
    let mut letters = Vec::new();
    let mut c = col + 1;
    while c > 0 {
        let k = (c - 1) % 26;
        letters.push(char::from(b'A' + k as u8));
        c = (c - 1) / 26;
    }
    letters.reverse();
    format!("{}{}", letters.into_iter().collect::<String>(), row + 1)
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

/// What reading the cells came across, for the notes: error cells and date or duration cells.
#[derive(Default)]
struct Seen {
    /// Error cells (`#DIV/0!`, `#N/A`…), with the sheet row and column of the first.
    errors: usize,
    first_error: Option<(usize, usize)>,
    /// Columns (by position) holding dates, and those holding durations.
    dates: std::collections::BTreeSet<usize>,
    durations: std::collections::BTreeSet<usize>,
}

impl Seen {
    /// The notes: where the error cells are, and how dates and durations were read.
    fn notes(&self, sheet: &str, names: &[String], header: bool) -> Vec<String> {
        let name = |j: usize| {
            names
                .get(j)
                .cloned()
                .unwrap_or_else(|| format!("column{}", j + 1))
        };
        let mut out = Vec::new();
        if let Some((i, j)) = self.first_error {
            // Data rows count from 1 after the header, as everywhere else.
            let row = i + usize::from(!header);
            out.push(format!(
                "sheet '{sheet}': {} cells hold spreadsheet errors (such as #DIV/0! or #N/A) and are read as missing; the first is in column '{}', data row {row}",
                self.errors,
                name(j)
            ));
        }
        for &j in &self.dates {
            out.push(format!(
                "column '{}' holds dates: read as days since 1970-01-01 (a fraction is the time of day)",
                name(j)
            ));
        }
        for &j in &self.durations {
            out.push(format!(
                "column '{}' holds durations: read as days",
                name(j)
            ));
        }
        out
    }
}

/// Days from 1970-01-01 to the civil date `y-m-d` (proleptic Gregorian; H. Hinnant's
/// `days_from_civil`, public domain, recalled from memory and checked below).
fn days_from_civil(y: i64, m: i64, d: i64) -> i64 {
    let y = if m <= 2 { y - 1 } else { y };
    let era = y.div_euclid(400);
    let yoe = y - era * 400;
    let doy = (153 * (m + if m > 2 { -3 } else { 9 }) + 2) / 5 + d - 1;
    let doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    era * 146_097 + doe - 719_468
}

/// A spreadsheet date as days since 1970-01-01, whichever epoch (1900 or 1904) the workbook
/// counts from.
fn unix_days(dt: &calamine::ExcelDateTime) -> f64 {
    let (y, mo, d, h, mi, s, ms) = dt.to_ymd_hms_milli();
    let day = days_from_civil(i64::from(y), i64::from(mo), i64::from(d)) as f64;
    day + (f64::from(h) * 3_600_000.0
        + f64::from(mi) * 60_000.0
        + f64::from(s) * 1000.0
        + f64::from(ms))
        / 86_400_000.0
}

fn to_cell(d: &Data, options: &LoadOptions, seen: &mut Seen, (i, j): (usize, usize)) -> Cell {
    match d {
        Data::Int(i) => Cell::Number(*i as f64),
        Data::Float(f) if f.is_nan() => Cell::Missing,
        Data::Float(f) => Cell::Number(*f),
        Data::DateTime(dt) if dt.is_duration() => {
            seen.durations.insert(j);
            Cell::Number(dt.as_f64())
        }
        Data::DateTime(dt) => {
            seen.dates.insert(j);
            Cell::Number(unix_days(dt))
        }
        Data::String(s) | Data::DateTimeIso(s) | Data::DurationIso(s) => classify(
            s,
            options.decimal.unwrap_or(DecimalMark::Point),
            &options.missing_tokens,
        ),
        Data::Bool(b) => Cell::Text(b.to_string()),
        Data::Error(_) => {
            seen.errors += 1;
            seen.first_error.get_or_insert((i, j));
            Cell::Missing
        }
        Data::Empty => Cell::Missing,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cells_are_named_as_spreadsheets_name_them() {
        assert_eq!(a1((0, 0)), "A1");
        assert_eq!(a1((9, 25)), "Z10");
        assert_eq!(a1((0, 26)), "AA1");
        assert_eq!(a1((1_048_575, 16_383)), "XFD1048576");
    }

    #[test]
    fn civil_days_count_from_1970() {
        // By hand: 1970-01-01 is day 0, 2000-03-01 is 11017 (30 years of 365 days, 8 leap
        // days to 2000-01-01 = 10957, then 31 + 29 days), 1969-12-31 is −1.
        assert_eq!(days_from_civil(1970, 1, 1), 0);
        assert_eq!(days_from_civil(2000, 3, 1), 11_017);
        assert_eq!(days_from_civil(1969, 12, 31), -1);
    }
}

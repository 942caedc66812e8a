//! Apache Parquet via polars: numeric columns come in as numbers, text is typed as in CSV.

use std::path::Path;

use polars::prelude::{DataType, ParquetReader, SerReader};

use crate::cell::{classify, Cell, DecimalMark};
use crate::table::{SourceFormat, Table};
use crate::{DataError, LoadOptions, Result};

pub(crate) fn load(path: &Path, options: &LoadOptions) -> Result<Table> {
    let parse_error = |e: &dyn std::fmt::Display| DataError::Parse {
        path: path.to_path_buf(),
        message: format!("not a readable Parquet file ({e})"),
    };
    // Read once: the hash is of the bytes the table comes from.
    let bytes = std::fs::read(path).map_err(|source| DataError::Io {
        path: path.to_path_buf(),
        source,
    })?;
    let mut reader = ParquetReader::new(std::io::Cursor::new(&bytes[..]));
    let rows = reader.num_rows().map_err(|e| parse_error(&e))?;
    let columns = reader.schema().map_err(|e| parse_error(&e))?.len();
    crate::budget::check_cells(
        path,
        (rows as u64).saturating_mul(columns as u64),
        options.memory_limit,
    )?;
    let frame = reader.finish().map_err(|e| parse_error(&e))?;
    if frame.height() == 0 {
        return Err(DataError::NoDataRows {
            path: path.to_path_buf(),
        });
    }
    let mut names = Vec::new();
    let mut cells = Vec::new();
    let mut notes = Vec::new();
    for column in frame.get_columns() {
        names.push(column.name().to_string());
        let dtype = column.dtype();
        let col: Vec<Cell> = if dtype.is_primitive_numeric() {
            let floats = column
                .cast(&DataType::Float64)
                .map_err(|e| parse_error(&e))?;
            let floats = floats.f64().map_err(|e| parse_error(&e))?;
            floats
                .into_iter()
                .map(|v| match v {
                    Some(x) if !x.is_nan() => Cell::Number(x),
                    _ => Cell::Missing,
                })
                .collect()
        } else if let Ok(strings) = column.str() {
            strings
                .into_iter()
                .map(|v| {
                    v.map_or(Cell::Missing, |s| {
                        classify(s, DecimalMark::Point, &options.missing_tokens)
                    })
                })
                .collect()
        } else {
            notes.push(format!(
                "column '{}' has Parquet type {dtype}, which is not read; it is treated as empty",
                column.name()
            ));
            vec![Cell::Missing; frame.height()]
        };
        cells.push(col);
    }
    Ok(Table::new(path, SourceFormat::Parquet, names, cells, notes).with_sha256(&bytes))
}

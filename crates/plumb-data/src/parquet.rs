//! Apache Parquet via polars: numeric columns come in as numbers, text is typed as in CSV.

use std::path::Path;

use polars::prelude::{ArrowDataType, DataType, ParquetReader, SerReader};
use polars_utils::mmap::MemSlice;

use crate::cell::{classify, Cell, DecimalMark};
use crate::table::{SourceFormat, Table};
use crate::{DataError, LoadOptions, Result};

pub(crate) fn load(path: &Path, options: &LoadOptions) -> Result<Table> {
    // Read once: the hash is of the bytes the table comes from.
    let bytes = crate::budget::read_binary(path, options.memory_limit)?;
    from_slice(path, MemSlice::from_vec(bytes), options)
}

/// A Parquet file already in memory; `path` names it in messages.
pub(crate) fn from_bytes(path: &Path, bytes: &[u8], options: &LoadOptions) -> Result<Table> {
    from_slice(path, MemSlice::from_vec(bytes.to_vec()), options)
}

/// The file's bytes, held once for the page check and the read. A damaged file that makes
/// the reader panic is reported as unreadable ([`crate::guard::contain`]).
fn from_slice(path: &Path, bytes: MemSlice, options: &LoadOptions) -> Result<Table> {
    crate::guard::contain(path, "Parquet", || {
        crate::parquet_pages::check(path, &bytes)?;
        read(path, &bytes, options)
    })
}

fn read(path: &Path, bytes: &[u8], options: &LoadOptions) -> Result<Table> {
    let parse_error = |e: &dyn std::fmt::Display| DataError::Parse {
        path: path.to_path_buf(),
        message: format!("not a readable Parquet file ({e})"),
    };
    let mut reader = ParquetReader::new(std::io::Cursor::new(bytes));
    let rows = reader.num_rows().map_err(|e| parse_error(&e))?;
    let schema = reader.schema().map_err(|e| parse_error(&e))?;
    // Only numbers and text are read (this build of polars holds no dates, decimals, lists or
    // structs); the other columns are named in a note instead of failing the whole file.
    let mut notes = Vec::new();
    let mut keep = Vec::new();
    for (k, field) in schema.iter_values().enumerate() {
        match kind_of(&field.dtype) {
            Some(()) => keep.push(k),
            None => notes.push(format!(
                "column '{}' holds {} values, which are not read from Parquet (numbers and text are); store it as a number (for times, seconds since an origin) to use it",
                field.name,
                type_words(&field.dtype)
            )),
        }
    }
    if keep.is_empty() {
        return Err(DataError::Parse {
            path: path.to_path_buf(),
            message: format!(
                "no column holds numbers or text ({}); store the values as numbers or text",
                notes.len()
            ),
        });
    }
    if rows == 0 {
        return Err(DataError::NoDataRows {
            path: path.to_path_buf(),
        });
    }
    crate::budget::check_cells(
        path,
        (rows as u64).saturating_mul(keep.len() as u64),
        options.memory_limit,
    )?;
    let frame = reader
        .with_projection(Some(keep))
        .finish()
        .map_err(|e| parse_error(&e))?;
    if frame.height() == 0 {
        return Err(DataError::NoDataRows {
            path: path.to_path_buf(),
        });
    }
    let mut names = Vec::new();
    let mut cells = Vec::new();
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
    Ok(Table::new(path, SourceFormat::Parquet, names, cells, notes).with_sha256(bytes, options))
}

/// Whether a Parquet column's type is read: numbers, booleans and text.
fn kind_of(dtype: &ArrowDataType) -> Option<()> {
    use ArrowDataType as A;
    matches!(
        dtype,
        A::Int8
            | A::Int16
            | A::Int32
            | A::Int64
            | A::UInt8
            | A::UInt16
            | A::UInt32
            | A::UInt64
            | A::Float16
            | A::Float32
            | A::Float64
            | A::Utf8
            | A::LargeUtf8
            | A::Utf8View
    )
    .then_some(())
}

/// A column type in words, for the note.
fn type_words(dtype: &ArrowDataType) -> &'static str {
    use ArrowDataType as A;
    match dtype {
        A::Timestamp(..) => "timestamp",
        A::Date32 | A::Date64 => "date",
        A::Time32(_) | A::Time64(_) => "time-of-day",
        A::Duration(_) | A::Interval(_) => "duration",
        A::Decimal(..) | A::Decimal32(..) | A::Decimal64(..) | A::Decimal256(..) => "decimal",
        A::List(_) | A::LargeList(_) | A::FixedSizeList(..) => "list",
        A::Struct(_) => "struct",
        A::Dictionary(..) => "dictionary-encoded",
        A::Boolean => "true/false",
        A::Binary | A::LargeBinary | A::BinaryView | A::FixedSizeBinary(_) => "binary",
        _ => "other",
    }
}

//! Delimited text (CSV, TSV, semicolon-separated): sniffing, validation, then polars.

use std::borrow::Cow;
use std::io::Cursor;
use std::path::Path;

use polars::prelude::{CsvParseOptions, CsvReadOptions, DataFrame, SerReader, StringChunked};

use crate::cell::DecimalMark;
use crate::progress::{read_all, Progress, ReadStop, Stage};
use crate::sniff::{self, DecimalGuess, HeaderMode, Record};
use crate::table::{ColumnValues, SourceFormat, Table};
use crate::{DataError, LoadOptions, Result};

const BOM: &[u8] = b"\xEF\xBB\xBF";

/// Reads a delimited text file. The whole file is read into memory once; blank lines are
/// skipped and do not count as rows.
pub(crate) fn load(
    path: &Path,
    options: &LoadOptions,
    progress: Option<&Progress>,
) -> Result<Table> {
    let cap = crate::budget::text_read_cap(path, options.memory_limit)?;
    let bytes = read_all(path, progress, cap).map_err(|stop| match stop {
        ReadStop::Failed(e) => e,
        ReadStop::PastCap(read) => {
            crate::budget::unsized_too_large(path, read, options.memory_limit)
        }
    })?;
    if cap.is_some() {
        crate::budget::check_text_read(path, &bytes, options.memory_limit)?;
    }
    from_bytes(path, bytes, options, progress)
}

/// Delimited text already in memory; `path` names it in messages. The table carries the
/// bytes' hash. Bytes handed over (a `Vec`) are let go before polars' columns become ours:
/// the peak then holds the text or the converted columns beside polars' own, not all three.
pub(crate) fn from_bytes(
    path: &Path,
    bytes: impl AsRef<[u8]>,
    options: &LoadOptions,
    progress: Option<&Progress>,
) -> Result<Table> {
    let (hash, stage) = hashed_stage(path, bytes.as_ref(), options, progress);
    drop(bytes);
    let mut table = stage?.finish(path, progress)?;
    table.set_sha256(hash);
    Ok(table)
}

/// The bytes' SHA-256 (unless skipped), taken on another thread beside the parse, and the
/// parse.
fn hashed_stage(
    path: &Path,
    bytes: &[u8],
    options: &LoadOptions,
    progress: Option<&Progress>,
) -> (String, Result<Reached>) {
    std::thread::scope(|scope| {
        let hash = scope.spawn(|| crate::table::sha256_unless_skipped(bytes, options));
        let stage = stage_of(path, bytes, options, progress, None, Way::Typed);
        let hash = hash.join().unwrap_or_else(|p| std::panic::resume_unwind(p));
        (hash, stage)
    })
}

/// How far a read got while the text was at hand.
pub(crate) enum Reached {
    /// Polars has parsed the columns; they become ours without the text.
    Parsed {
        parsed: crate::typed::Parsed,
        names: Vec<String>,
        format: SourceFormat,
        notes: Vec<String>,
    },
    /// The table, read with the text at hand.
    Done(Table),
}

impl Reached {
    fn finish(self, path: &Path, progress: Option<&Progress>) -> Result<Table> {
        match self {
            Self::Done(table) => Ok(table),
            Self::Parsed {
                parsed,
                names,
                format,
                notes,
            } => {
                if let Some(p) = progress {
                    p.enter(Stage::Typing);
                }
                // Only a float equal to a numeric missing token refuses, and such files
                // never reach this stage (`Parsed::may_refuse`).
                let values = parsed.columns().ok_or_else(|| DataError::Parse {
                    path: path.to_path_buf(),
                    message: "polars' columns could not be converted".into(),
                })?;
                Ok(Table::from_values(path, format, names, values, notes))
            }
        }
    }
}

/// Which columns of a piece of a streamed file are split out and typed: those at these
/// positions (file order), under the names the whole file gives them.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Only<'a> {
    /// 0-based positions, rising.
    pub at: &'a [usize],
    /// Their names (as the first piece's table has them: duplicates already told apart).
    pub names: &'a [String],
}

/// One piece of a file being streamed: only the columns of `only` are split out and typed,
/// and no hash is taken.
pub(crate) fn piece_of(
    path: &Path,
    bytes: &[u8],
    options: &LoadOptions,
    only: Only<'_>,
) -> Result<Table> {
    read_text(path, bytes, options, None, Some(only))
}

fn read_text(
    path: &Path,
    bytes: &[u8],
    options: &LoadOptions,
    progress: Option<&Progress>,
    only: Option<Only<'_>>,
) -> Result<Table> {
    read_text_by(path, bytes, options, progress, only, Way::Typed)
}

pub(crate) fn read_text_by(
    path: &Path,
    bytes: &[u8],
    options: &LoadOptions,
    progress: Option<&Progress>,
    only: Option<Only<'_>>,
    way: Way,
) -> Result<Table> {
    stage_of(path, bytes, options, progress, only, way)?.finish(path, progress)
}

/// Whether polars may type the numbers ([`crate::typed`]) or every cell goes through
/// [`ColumnValues::from_texts`]; the two must give the same table (tested).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Way {
    Typed,
    #[cfg(test)]
    CellByCell,
}

/// Reads `bytes` as far as it needs them: to polars' parse on the typed way, to the table
/// on the cell-by-cell way.
fn stage_of(
    path: &Path,
    bytes: &[u8],
    options: &LoadOptions,
    progress: Option<&Progress>,
    only: Option<Only<'_>>,
    way: Way,
) -> Result<Reached> {
    let stage = |s| {
        if let Some(p) = progress {
            p.enter(s);
        }
    };
    stage(Stage::Parsing);
    let decoded = crate::encoding::decode(path, bytes, options.encoding)?;
    let text: &[u8] = &decoded.text;
    let recs = records_of(path, text)?;
    let shape = layout(text, &recs, options);
    let (delimiter, header) = (shape.delimiter, shape.header);
    check_field_counts(path, text, &recs, delimiter, header)?;
    let format = SourceFormat::Delimited {
        encoding: decoded.encoding,
        delimiter,
        decimal: shape.guess.mark,
        header,
    };
    let asked = match only {
        Some(_) => None,
        None => asked_columns(path, text, &recs, &shape, options)?,
    };
    let only = only.or(asked.as_ref().map(|(at, names)| Only { at, names }));
    let fast = (way == Way::Typed)
        .then(|| crate::typed::read(path, text, &recs, &shape, options, only.map(|o| o.at)))
        .flatten();
    if let Some(parsed) = fast {
        let names = match only {
            Some(o) => o.names.to_vec(),
            None => names_of(path, text, &recs, &shape, parsed.width())?,
        };
        let notes: Vec<String> = decoded.note.iter().cloned().collect();
        if !parsed.may_refuse() {
            return Ok(Reached::Parsed {
                parsed,
                names,
                format,
                notes,
            });
        }
        stage(Stage::Typing);
        if let Some(values) = parsed.columns() {
            let table = Table::from_values(path, format, names, values, notes);
            return Ok(Reached::Done(table));
        }
    }
    let guess = shape.guess;
    let frame = parse(path, text, &recs, delimiter, only.map(|o| o.at))?;
    stage(Stage::Typing);
    let texts = text_columns(path, frame)?;
    let skip = usize::from(header);
    let from_file = column_names(header, &texts);
    let names = only.map_or(from_file, |o| o.names.to_vec());
    if texts.first().is_none_or(|c| c.len() <= skip) {
        return Err(DataError::NoDataRows {
            path: path.to_path_buf(),
        });
    }
    let (decimal, mut notes) = settle_decimal(guess, delimiter, &names, &texts, skip);
    notes.extend(decoded.note);
    // Each column's text is dropped as soon as the column is typed.
    let values = texts
        .into_iter()
        .map(|c| ColumnValues::from_texts(|| c.iter().skip(skip), decimal, &options.missing_tokens))
        .collect();
    let format = SourceFormat::Delimited {
        encoding: decoded.encoding,
        delimiter,
        decimal,
        header,
    };
    Ok(Reached::Done(Table::from_values(
        path, format, names, values, notes,
    )))
}

/// The positions and names of the columns in [`LoadOptions::only`], when reading only those
/// cannot change what is read or said: the header names every column once (no blanks, no
/// repeats: no renaming), it holds every name asked for, and the sample settled the decimal
/// mark (an open mark is decided by a vote of every cell).
fn asked_columns(
    path: &Path,
    text: &[u8],
    recs: &[Record],
    shape: &Layout,
    options: &LoadOptions,
) -> Result<Option<(Vec<usize>, Vec<String>)>> {
    let Some(wanted) = options.only.as_ref() else {
        return Ok(None);
    };
    if !shape.header || shape.guess.ambiguous.is_some() {
        return Ok(None);
    }
    let header = names_of(path, text, recs, shape, 0)?;
    let mut seen = std::collections::HashSet::new();
    if header
        .iter()
        .any(|n| n.trim().is_empty() || !seen.insert(n.as_str()))
    {
        return Ok(None);
    }
    let mut at = Vec::new();
    for name in wanted {
        match header.iter().position(|h| h == name) {
            Some(j) => at.push(j),
            None => return Ok(None),
        }
    }
    at.sort_unstable();
    at.dedup();
    let names = at.iter().map(|&j| header[j].clone()).collect();
    Ok(Some((at, names)))
}

/// Column names: the header record's fields as the CSV parser reads them, or `columnN`.
fn names_of(
    path: &Path,
    text: &[u8],
    recs: &[Record],
    shape: &Layout,
    count: usize,
) -> Result<Vec<String>> {
    if !shape.header {
        return Ok((1..=count).map(|j| format!("column{j}")).collect());
    }
    let frame = parse(path, text, &recs[..1], shape.delimiter, None)?;
    Ok(column_names(true, &text_columns(path, frame)?))
}

/// The first cell of each column when the first record is a header, else `columnN`.
fn column_names(header: bool, texts: &[StringChunked]) -> Vec<String> {
    if !header {
        return (1..=texts.len()).map(|j| format!("column{j}")).collect();
    }
    texts
        .iter()
        .map(|c| c.get(0).unwrap_or_default().to_string())
        .collect()
}

/// The non-empty records of `text`, split outside quotes.
fn records_of(path: &Path, text: &[u8]) -> Result<Vec<Record>> {
    let mut recs = sniff::records(text).map_err(|line| DataError::UnclosedQuote {
        path: path.to_path_buf(),
        line,
    })?;
    // A byte-order mark after leading blank lines is still a byte-order mark (found by
    // fuzzing: left in place, the CSV parser saw a first line with no fields and panicked).
    if let Some(first) = recs.first_mut() {
        if text[first.start..first.end].starts_with(BOM) {
            first.start += BOM.len();
        }
    }
    recs.retain(|r| r.start < r.end);
    if recs.is_empty() {
        return Err(DataError::Empty {
            path: path.to_path_buf(),
        });
    }
    Ok(recs)
}

/// How a delimited file is written, as asked or sniffed from its first records.
pub(crate) struct Layout {
    /// Field delimiter.
    pub delimiter: u8,
    /// Decimal mark, and whether some sampled cell leaves it open.
    pub guess: DecimalGuess,
    /// Whether the first record names the columns.
    pub header: bool,
    /// The first 200 records' fields (the header among them).
    pub sample: Vec<Vec<String>>,
}

/// The delimiter, decimal mark and whether there is a header, as asked or sniffed from the
/// first 200 records.
pub(crate) fn layout(text: &[u8], recs: &[Record], options: &LoadOptions) -> Layout {
    let delimiter = options
        .delimiter
        .unwrap_or_else(|| sniff::delimiter(text, recs));
    let sample: Vec<Vec<String>> = recs
        .iter()
        .take(200)
        .map(|r| sniff::fields(&text[r.start..r.end], delimiter))
        .collect();
    let guess = match options.decimal {
        Some(mark) => DecimalGuess {
            mark,
            ambiguous: None,
        },
        None => sniff::decimal_guess(sample.iter().flatten().map(String::as_str), delimiter),
    };
    let header = match options.header {
        HeaderMode::Yes => true,
        HeaderMode::No => false,
        HeaderMode::Auto => sniff::has_header(&sample, guess.mark, &options.missing_tokens),
    };
    Layout {
        delimiter,
        guess,
        header,
        sample,
    }
}

/// The decimal mark to read with. When the sample left it open while some of its cells read
/// as different numbers under each mark (`1,234`), every cell votes; if none settles it, the
/// mark is assumed and a note names a cell whose value depends on it, and how to choose.
fn settle_decimal(
    guess: DecimalGuess,
    delimiter: u8,
    names: &[String],
    columns: &[StringChunked],
    skip: usize,
) -> (DecimalMark, Vec<String>) {
    if guess.ambiguous.is_none() {
        return (guess.mark, Vec::new());
    }
    let cells = columns.iter().flat_map(|c| c.iter().skip(skip).flatten());
    let all = sniff::decimal_guess(cells, delimiter);
    let Some(at) = all
        .ambiguous
        .as_ref()
        .and_then(|_| first_ambiguous(columns, skip))
    else {
        return (all.mark, Vec::new());
    };
    let (i, j, text, point, comma) = at;
    let note = format!(
        "no cell settles the decimal mark: '{text}' (column '{}', row {}) reads as {point} \
         with a decimal point or {comma} with a decimal comma; a decimal point was assumed \
         (choose the decimal comma to read such cells the other way: --decimal comma, or \
         Decimal mark on the columns screen)",
        names.get(j).map_or("?", String::as_str),
        i + 1
    );
    (all.mark, vec![note])
}

/// The first cell, by row and then column, whose number depends on the decimal mark: (row,
/// column, text, value with a point, value with a comma).
fn first_ambiguous(
    columns: &[StringChunked],
    skip: usize,
) -> Option<(usize, usize, String, f64, f64)> {
    columns
        .iter()
        .enumerate()
        .filter_map(|(j, col)| {
            col.iter().skip(skip).enumerate().find_map(|(i, cell)| {
                let s = cell?.trim();
                let point = crate::cell::parse_number(s, DecimalMark::Point)?;
                let comma = crate::cell::parse_number(s, DecimalMark::Comma)?;
                (point != comma).then(|| (i, j, s.to_string(), point, comma))
            })
        })
        .min_by_key(|&(i, j, ..)| (i, j))
}

fn check_field_counts(
    path: &Path,
    text: &[u8],
    recs: &[Record],
    delimiter: u8,
    header: bool,
) -> Result<()> {
    use rayon::prelude::*;
    let count = |r: &Record| sniff::field_count(&text[r.start..r.end], delimiter);
    let expected = count(&recs[0]);
    // Counted on all cores; the first record (in file order) that differs is the one named.
    let Some(i) = recs.par_iter().position_first(|r| count(r) != expected) else {
        return Ok(());
    };
    Err(DataError::Ragged {
        path: path.to_path_buf(),
        line: recs[i].line,
        row: i + usize::from(!header),
        found: count(&recs[i]),
        expected,
        delimiter: printable(delimiter),
    })
}

fn printable(d: u8) -> String {
    match d {
        b'\t' => "tab".into(),
        b',' => "comma".into(),
        b';' => "semicolon".into(),
        other => format!("'{}'", other as char),
    }
}

/// Hands polars the records alone (no blank lines), every column as text: typing is ours,
/// so that a stray word in a numeric column is reported by row instead of silently nulled.
fn parse(
    path: &Path,
    text: &[u8],
    recs: &[Record],
    delimiter: u8,
    keep: Option<&[usize]>,
) -> Result<DataFrame> {
    let clean = records_alone(text, recs);
    let parse_options = CsvParseOptions::default()
        .with_separator(delimiter)
        .with_quote_char(Some(b'"'))
        .with_missing_is_null(true);
    // A panic inside the CSV parser becomes a message naming the file, not a crash.
    crate::guard::contain(path, "CSV", || {
        CsvReadOptions::default()
            .with_has_header(false)
            .with_infer_schema_length(Some(0))
            .with_raise_if_empty(false)
            .with_projection(keep.map(|k| std::sync::Arc::new(k.to_vec())))
            .with_parse_options(parse_options)
            .into_reader_with_file_handle(Cursor::new(clean))
            .finish()
            .map_err(|e| DataError::Parse {
                path: path.to_path_buf(),
                message: format!("the text could not be split into fields ({e})"),
            })
    })
}

/// The records one to a line, without blank lines: the text itself when it is already that
/// (records separated by single LFs), else a copy.
pub(crate) fn records_alone<'a>(text: &'a [u8], recs: &[Record]) -> Cow<'a, [u8]> {
    let (Some(first), Some(last)) = (recs.first(), recs.last()) else {
        return Cow::Borrowed(&[]);
    };
    let lf_separated = recs
        .windows(2)
        .all(|w| text.get(w[0].end) == Some(&b'\n') && w[1].start == w[0].end + 1);
    if lf_separated {
        return Cow::Borrowed(&text[first.start..last.end]);
    }
    let mut clean = Vec::with_capacity(text.len() + recs.len());
    for r in recs {
        clean.extend_from_slice(&text[r.start..r.end]);
        clean.push(b'\n');
    }
    Cow::Owned(clean)
}

/// The frame's columns as text (every column was read as text), one chunk each.
fn text_columns(path: &Path, frame: DataFrame) -> Result<Vec<StringChunked>> {
    frame
        .take_columns()
        .into_iter()
        .map(|c| {
            let strings = c.str().map_err(|e| DataError::Parse {
                path: path.to_path_buf(),
                message: format!("column {} was not read as text ({e})", c.name()),
            })?;
            Ok(strings.rechunk().into_owned())
        })
        .collect()
}

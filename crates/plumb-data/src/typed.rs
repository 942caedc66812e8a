//! The fast way through a delimited file: polars parses the numbers itself, on all cores.
//!
//! For files with a decimal point, columns whose sampled cells are all plain numbers (or
//! missing) are read as 64-bit floats, with the missing tokens as nulls; the others are read as text
//! and typed by [`ColumnValues::from_texts`]. A cell polars cannot read as a number sends its
//! column back to be read as text and typed the same way (which names the first text cell's
//! row), and the file is parsed again; past [`MAX_RETYPED`] such columns, or on any other
//! refusal, the read gives way to the cell-by-cell path — so the fast way changes how fast a
//! file is read, never what is read or said.

use std::io::Cursor;
use std::path::Path;
use std::sync::Arc;

use polars::prelude::{
    CsvParseOptions, CsvReadOptions, DataFrame, DataType, NullValues, PlSmallStr, Schema, SerReader,
};

use crate::cell::{read_cell, DecimalMark, DEFAULT_MISSING_TOKENS};
use crate::delimited::{records_alone, Layout};
use crate::sniff::Record;
use crate::table::ColumnValues;
use crate::values::Numbers;
use crate::LoadOptions;

/// What polars parsed, before it becomes our columns: it no longer needs the file's text.
pub(crate) struct Parsed {
    frame: DataFrame,
    mark: DecimalMark,
    tokens: Vec<String>,
    /// The missing tokens that are numbers (`-999`).
    token_values: Vec<f64>,
}

impl Parsed {
    /// Whether [`Parsed::columns`] can still refuse (a numeric missing token could hide
    /// among the floats, and only the cell-by-cell path can tell): the text must be kept
    /// until then.
    pub(crate) fn may_refuse(&self) -> bool {
        !self.token_values.is_empty()
    }

    /// Number of columns parsed.
    pub(crate) fn width(&self) -> usize {
        self.frame.width()
    }

    /// The columns, typed on all cores; each polars column is let go once converted. `None`
    /// when a value equals a numeric missing token (the file then goes cell by cell).
    pub(crate) fn columns(self) -> Option<Vec<ColumnValues>> {
        use rayon::prelude::*;
        let (mark, tokens, token_values) = (self.mark, self.tokens, self.token_values);
        self.frame
            .take_columns()
            .into_par_iter()
            .with_max_len(1)
            .map(|c| match c.dtype() {
                DataType::Float64 => numbers(&c, &token_values),
                _ => {
                    let strings = c.str().ok()?;
                    Some(ColumnValues::from_texts(|| strings.iter(), mark, &tokens))
                }
            })
            .collect()
    }
}

/// The columns of the file (or those at `keep`), parsed by polars; `None` when the file needs
/// the cell-by-cell path: the decimal mark is still open, or some cell is not a plain number
/// in a column whose sample held only numbers.
pub(crate) fn read(
    path: &Path,
    text: &[u8],
    recs: &[Record],
    shape: &Layout,
    options: &LoadOptions,
    keep: Option<&[usize]>,
) -> Option<Parsed> {
    let mark = shape.guess.mark;
    // With a comma delimiter a decimal comma can only sit in quoted cells: leave those to the
    // cell-by-cell path, as an open decimal mark is.
    if shape.guess.ambiguous.is_some() || (mark == DecimalMark::Comma && shape.delimiter == b',') {
        return None;
    }
    let data = recs
        .get(usize::from(shape.header)..)
        .filter(|r| !r.is_empty())?;
    let numeric = numeric_in_sample(shape, &options.missing_tokens);
    // Each field is compared with every null token, which costs; the first try knows only
    // the tokens the sample holds, and a file with another one further down is read again
    // knowing them all.
    let all = null_tokens(options);
    let seen: Vec<PlSmallStr> = all
        .iter()
        .filter(|t| in_sample(shape, t))
        .cloned()
        .collect();
    let frame = read_retyping(numeric, seen, &all, |numeric, nulls| {
        polars_read(path, text, data, shape, numeric, nulls, keep)
    })?;
    let tokens = options.missing_tokens.clone();
    // A token that is a number ("-999") is missing only when written exactly so, after
    // trimming; polars sees " -999" as a number. Any such value sends the file the other way.
    let token_values: Vec<f64> = tokens
        .iter()
        .filter_map(|t| crate::cell::parse_number(t.trim(), mark))
        .collect();
    Some(Parsed {
        frame,
        mark,
        tokens,
        token_values,
    })
}

/// Most columns a read sends back to be read as text before it gives way to the cell-by-cell
/// path: each costs one more parse of the file.
pub(crate) const MAX_RETYPED: usize = 8;

/// Why polars refused a read.
#[derive(Debug, PartialEq)]
enum Refusal {
    /// Column `column` (0-based) held `cell`, which is not a number.
    NotNumber { column: usize, cell: String },
    /// Anything else.
    Other,
}

/// Reads with `read` until polars accepts: a refused cell that is a missing token the first
/// try did not know brings in `all` the tokens; any other refused cell sends its column to be
/// read as text. `None` on any other refusal, or past [`MAX_RETYPED`] columns.
fn read_retyping(
    mut numeric: Vec<bool>,
    mut nulls: Vec<PlSmallStr>,
    all: &[PlSmallStr],
    read: impl Fn(&[bool], &[PlSmallStr]) -> Result<DataFrame, Refusal>,
) -> Option<DataFrame> {
    let mut retyped = 0;
    loop {
        match read(&numeric, &nulls) {
            Ok(frame) => return Some(frame),
            Err(Refusal::NotNumber { cell, .. })
                if nulls.len() < all.len() && all.iter().any(|t| t.as_str() == cell) =>
            {
                nulls = all.to_vec();
            }
            Err(Refusal::NotNumber { column, .. })
                if retyped < MAX_RETYPED && numeric.get(column) == Some(&true) =>
            {
                numeric[column] = false;
                retyped += 1;
            }
            Err(_) => return None,
        }
    }
}

/// What polars' message says it refused: it names the cell and the column (ours are named
/// `c0`, `c1`, … in [`polars_read`]).
fn refusal(message: &str) -> Refusal {
    let after = |marker: &str, end: &str| {
        let rest = &message[message.find(marker)? + marker.len()..];
        Some(&rest[..rest.find(end)?])
    };
    let column = after("at column 'c", "'").and_then(|j| j.parse().ok());
    let cell = after("could not parse `", "` as dtype");
    match (column, cell) {
        (Some(column), Some(cell)) => Refusal::NotNumber {
            column,
            cell: cell.to_string(),
        },
        _ => Refusal::Other,
    }
}

/// Whether each column's sampled cells (below the header) are all plain numbers or missing,
/// with at least one number: written as polars reads them, with no leading or trailing blanks
/// and no thousands separators.
fn numeric_in_sample(shape: &Layout, tokens: &[String]) -> Vec<bool> {
    let rows = &shape.sample[usize::from(shape.header).min(shape.sample.len())..];
    let width = shape.sample.first().map_or(0, Vec::len);
    let grouping = match shape.guess.mark {
        DecimalMark::Point => ',',
        DecimalMark::Comma => '.',
    };
    (0..width)
        .map(|j| {
            let mut any = false;
            let all_plain = rows.iter().filter_map(|r| r.get(j)).all(|cell| {
                match read_cell(cell, shape.guess.mark, tokens) {
                    Ok(None) => cell.trim() == cell || cell.trim().is_empty(),
                    Ok(Some(_)) => {
                        any = true;
                        cell.trim() == cell && !cell.contains(grouping)
                    }
                    Err(_) => false,
                }
            });
            all_plain && any
        })
        .collect()
}

/// Every token that marks a missing cell, as polars is given it.
fn null_tokens(options: &LoadOptions) -> Vec<PlSmallStr> {
    DEFAULT_MISSING_TOKENS
        .iter()
        .map(|t| PlSmallStr::from(*t))
        .chain(options.missing_tokens.iter().map(|t| t.trim().into()))
        .collect()
}

/// Whether some data cell of the sniffing sample is written exactly as `token`.
fn in_sample(shape: &Layout, token: &str) -> bool {
    shape.sample[usize::from(shape.header).min(shape.sample.len())..]
        .iter()
        .flatten()
        .any(|cell| cell == token)
}

/// Reads the data records with the numeric columns as floats and `nulls` as missing; what
/// polars refused when it refuses (the cell-by-cell path says what is wrong in a way of our
/// own).
fn polars_read(
    path: &Path,
    text: &[u8],
    data: &[Record],
    shape: &Layout,
    numeric: &[bool],
    nulls: &[PlSmallStr],
    keep: Option<&[usize]>,
) -> Result<DataFrame, Refusal> {
    let schema: Schema = numeric
        .iter()
        .enumerate()
        .map(|(j, &is_number)| {
            let dtype = if is_number {
                DataType::Float64
            } else {
                DataType::String
            };
            (PlSmallStr::from(format!("c{j}")), dtype)
        })
        .collect();
    let parse_options = CsvParseOptions::default()
        .with_separator(shape.delimiter)
        .with_quote_char(Some(b'"'))
        .with_missing_is_null(true)
        .with_null_values((!nulls.is_empty()).then(|| NullValues::AllColumns(nulls.to_vec())));
    let input = records_alone(text, data);
    crate::guard::contain(path, "CSV", || {
        Ok(CsvReadOptions::default()
            .with_has_header(false)
            .with_schema(Some(Arc::new(schema)))
            .with_raise_if_empty(false)
            .with_projection(keep.map(|k| Arc::new(k.to_vec())))
            .with_parse_options(parse_options)
            .into_reader_with_file_handle(Cursor::new(input))
            .finish()
            .map_err(|e| refusal(&e.to_string())))
    })
    .unwrap_or(Err(Refusal::Other))
}

/// A float column as numbers, NaN counting as missing (as in the cell-by-cell path); `None`
/// when a value equals a numeric missing token.
fn numbers(column: &polars::prelude::Column, token_values: &[f64]) -> Option<ColumnValues> {
    let floats = column.f64().ok()?;
    // Chunk by chunk (a parse on several threads leaves several): a chunk without nulls is
    // copied whole, one with nulls value by value.
    let mut values: Vec<f64> = Vec::with_capacity(floats.len());
    for chunk in floats.downcast_iter() {
        let slice = chunk.values().as_slice();
        match chunk.validity().filter(|v| v.unset_bits() > 0) {
            None => values.extend_from_slice(slice),
            Some(valid) => {
                values.extend(
                    slice
                        .iter()
                        .zip(valid.iter())
                        .map(|(&v, ok)| if ok { v } else { f64::NAN }),
                )
            }
        }
    }
    let token_like = !token_values.is_empty() && values.iter().any(|v| token_values.contains(v));
    (!token_like).then(|| ColumnValues::Numeric(Numbers::from_nan_missing(values)))
}

#[cfg(test)]
mod tests {
    use std::path::Path;

    use polars::prelude::PlSmallStr;

    use crate::delimited::{read_text_by, Way};
    use crate::{DecimalMark, LoadOptions};

    /// The table each way, or the message each way gives.
    fn same(text: &str, options: &LoadOptions) {
        let path = Path::new("t.csv");
        let read = |way| read_text_by(path, text.as_bytes(), options, None, None, way);
        match (read(Way::Typed), read(Way::CellByCell)) {
            (Ok(fast), Ok(slow)) => {
                assert_eq!(fast.columns(), slow.columns(), "{text}");
                assert_eq!(fast.notes(), slow.notes(), "{text}");
                assert_eq!(fast.format(), slow.format(), "{text}");
            }
            (fast, slow) => assert_eq!(
                fast.map(|t| t.n_rows()).map_err(|e| e.to_string()),
                slow.map(|t| t.n_rows()).map_err(|e| e.to_string()),
                "{text}"
            ),
        }
    }

    #[test]
    fn plain_numbers_with_every_missing_form_read_the_same_both_ways() {
        let mut text = String::from("a,b,site\n");
        for i in 0..300 {
            text.push_str(&format!("{}.25,{}e-3,s{}\n", i, i * 7, i % 3));
        }
        text.push_str("NA,,n/a\n. ,  4.5,x\n\"7\",nan,\"q, r\"\n1e400,-Inf,+\n-0.0,NaN,NA\n");
        same(&text, &LoadOptions::default());
    }

    #[test]
    fn cells_the_two_number_parsers_might_read_differently_give_the_same_table() {
        // Each tricky cell sits below 250 plain rows, past the sample, so polars meets it.
        let tricky = [
            "5 ",
            " 5",
            "1.",
            ".5",
            "+.5",
            "1e",
            "e5",
            "1E5",
            "inf",
            "Infinity",
            "-nan",
            "NAN",
            "0x10",
            "1_000",
            "1,5",
            "1,234.5",
            "١٢",
            "1e-400",
            "  ",
            "-",
            "+",
            "--1",
            "1d3",
            "INF",
            "+inf",
            "infinit",
            "9007199254740993",
            "0.1e+",
            "1.5.2",
        ];
        for cell in tricky {
            let mut text = String::from("x,y\n");
            for i in 0..250 {
                text.push_str(&format!("{i},{}\n", i * 2));
            }
            text.push_str(&format!("\"{cell}\",1\n{cell},2\n"));
            same(&text, &LoadOptions::default());
        }
    }

    #[test]
    fn a_numeric_missing_token_written_with_blanks_is_still_missing() {
        let mut text = String::from("x,y\n");
        for i in 0..250 {
            text.push_str(&format!("{i},{}\n", i * 2));
        }
        text.push_str(" -999,1\n-999,2\n-999.0,3\n");
        let options = LoadOptions {
            missing_tokens: vec!["-999".into()],
            ..LoadOptions::default()
        };
        same(&text, &options);
    }

    #[test]
    fn decimal_comma_files_read_the_same_both_ways() {
        let mut text = String::from("a;b\n");
        for i in 0..250 {
            text.push_str(&format!("{i},5;{i}\n"));
        }
        for cell in ["1.5", "1.234,5", "2,5", " 3,5", "4,", ",5"] {
            let t = format!("{text}{cell};1\n");
            let options = LoadOptions {
                decimal: Some(DecimalMark::Comma),
                ..LoadOptions::default()
            };
            same(&t, &options);
        }
    }

    #[test]
    fn polars_refusals_name_the_cell_and_our_column() {
        let message = "could not parse `oops` as dtype `f64` at column 'c12' (column number 13)\n\nThe current offset in the file is 9 bytes.";
        assert_eq!(
            super::refusal(message),
            super::Refusal::NotNumber {
                column: 12,
                cell: "oops".into()
            }
        );
        assert_eq!(super::refusal("out of memory"), super::Refusal::Other);
        assert_eq!(
            super::refusal("could not parse `x` as dtype `f64` at column 'site'"),
            super::Refusal::Other
        );
    }

    #[test]
    fn stray_words_send_only_their_columns_to_be_read_as_text() {
        let mut text = String::from("a,b,c\n");
        for i in 0..300 {
            text.push_str(&format!("{i},{}.5,{}\n", i * 2, i % 7));
        }
        text.push_str("1,oops,2\nNA,3,n/a\n4,5,bad\n");
        same(&text, &LoadOptions::default());
        let path = Path::new("t.csv");
        let options = LoadOptions::default();
        let recs = crate::sniff::records(text.as_bytes()).expect("records");
        let shape = crate::delimited::layout(text.as_bytes(), &recs, &options);
        let columns = super::read(path, text.as_bytes(), &recs, &shape, &options, None)
            .and_then(super::Parsed::columns)
            .expect("typed");
        let kinds: Vec<bool> = columns
            .iter()
            .map(|c| matches!(c, crate::ColumnValues::Numeric(_)))
            .collect();
        assert_eq!(kinds, [true, false, false]);
    }

    #[test]
    fn past_the_retyping_limit_the_file_goes_cell_by_cell() {
        let width = super::MAX_RETYPED + 1;
        let reads = std::cell::Cell::new(0);
        let refuse_each_numeric = |numeric: &[bool], _: &[PlSmallStr]| {
            reads.set(reads.get() + 1);
            match numeric.iter().position(|&n| n) {
                Some(column) => Err(super::Refusal::NotNumber {
                    column,
                    cell: "x".into(),
                }),
                None => Ok(polars::prelude::DataFrame::empty()),
            }
        };
        let all = [PlSmallStr::from("NA")];
        let gave_up = super::read_retyping(vec![true; width], vec![], &all, refuse_each_numeric);
        assert!(gave_up.is_none());
        assert_eq!(reads.get(), width);
        reads.set(0);
        let read = super::read_retyping(vec![true; width - 1], vec![], &all, refuse_each_numeric);
        assert!(read.is_some());
        assert_eq!(reads.get(), width);
    }

    #[test]
    fn a_token_found_past_the_sample_brings_in_every_token_before_any_retyping() {
        let all = [PlSmallStr::from("NA"), PlSmallStr::from("n/a")];
        let read = super::read_retyping(vec![true], vec![], &all, |numeric, nulls| {
            match (numeric[0], nulls.len()) {
                (true, 0) => Err(super::Refusal::NotNumber {
                    column: 0,
                    cell: "n/a".into(),
                }),
                (true, 2) => Ok(polars::prelude::DataFrame::empty()),
                _ => Err(super::Refusal::Other),
            }
        });
        assert!(read.is_some());
    }

    #[test]
    fn the_typed_way_is_taken_for_a_plain_file() {
        let text = "x,y\n1,2\n3,4\n";
        let path = Path::new("t.csv");
        let options = LoadOptions::default();
        let recs = crate::sniff::records(text.as_bytes()).expect("records");
        let shape = crate::delimited::layout(text.as_bytes(), &recs, &options);
        let parsed = super::read(path, text.as_bytes(), &recs, &shape, &options, None);
        assert!(parsed.and_then(super::Parsed::columns).is_some());
    }
}

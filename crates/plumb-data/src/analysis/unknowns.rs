//! Unknown samples for a calibration: typed or pasted as text, or read from a second file.

use super::{AnalysisError, Unknown};
use crate::table::Table;

/// Parses unknowns typed or pasted as text: one sample per line, an optional name first, then
/// one or more readings. Fields are split at tabs or semicolons when the line has any (so
/// `A7;0,412;0,418` reads decimal commas), otherwise at commas and spaces. Blank lines and
/// lines starting with `#` are skipped; a line with no name is called `unknown N`.
///
/// # Errors
/// A line with a name but no reading, or a field after the name that is not a number; the
/// message names the line.
pub fn parse_unknowns(text: &str) -> Result<Vec<Unknown>, String> {
    let mut out = Vec::new();
    for (k, line) in text.lines().enumerate() {
        let line = line.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        let strong = line.contains(['\t', ';']);
        let fields: Vec<&str> = if strong {
            line.split(['\t', ';']).map(str::trim).collect()
        } else {
            line.split([',', ' ']).map(str::trim).collect()
        };
        let fields: Vec<&str> = fields.into_iter().filter(|f| !f.is_empty()).collect();
        let number = |f: &str| {
            let f = if strong {
                f.replace(',', ".")
            } else {
                f.to_string()
            };
            f.parse::<f64>().ok().filter(|v| v.is_finite())
        };
        let (name, values) = match fields.first().map(|f| number(f)) {
            Some(Some(_)) => (format!("unknown {}", out.len() + 1), &fields[..]),
            _ => (fields[0].trim_end_matches(':').to_string(), &fields[1..]),
        };
        if values.is_empty() {
            return Err(format!(
                "line {}: '{name}' has no reading; write the sample's name and then its readings, such as \"A7 0.412 0.418\"",
                k + 1
            ));
        }
        let readings = values
            .iter()
            .map(|f| {
                number(f).ok_or_else(|| {
                    format!(
                        "line {}: '{f}' is not a reading; write the sample's name and then numbers only",
                        k + 1
                    )
                })
            })
            .collect::<Result<Vec<f64>, String>>()?;
        out.push(Unknown { name, readings });
    }
    Ok(out)
}

/// The unknowns of a table: the readings of column `reading`, grouped by the text (or number)
/// in column `sample` in order of first appearance; without a sample column each row is one
/// unknown, named by its row. Rows with a missing reading are skipped.
///
/// # Errors
/// An unknown or non-numeric reading column, or an unknown sample column; messages name the
/// file and column.
pub fn unknowns_from_table(
    table: &Table,
    reading: &str,
    sample: Option<&str>,
) -> Result<Vec<Unknown>, AnalysisError> {
    let values = table.numeric(reading)?;
    let names: Vec<Option<String>> = match sample {
        None => (1..=values.len())
            .map(|r| Some(format!("row {r}")))
            .collect(),
        Some(col) => {
            let column = table.column(col).ok_or_else(|| {
                AnalysisError::Request(format!(
                    "{}: no column '{col}' to name the samples by",
                    table.source().display()
                ))
            })?;
            column.values.labels()
        }
    };
    let mut out: Vec<Unknown> = Vec::new();
    for (value, name) in values.iter().zip(names) {
        let (Some(v), Some(name)) = (value, name) else {
            continue;
        };
        match out.iter_mut().find(|u| u.name == name) {
            Some(u) => u.readings.push(v),
            None => out.push(Unknown {
                name,
                readings: vec![v],
            }),
        }
    }
    if out.is_empty() {
        return Err(AnalysisError::Request(format!(
            "{}: column '{reading}' holds no readings",
            table.source().display()
        )));
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn pasted_lines_take_names_decimal_commas_and_bare_readings() {
        let u = parse_unknowns("# run 12\nA7 0.412 0.418\nB2;0,300;0,310\n\n0.5, 0.52\n")
            .expect("parses");
        assert_eq!(u.len(), 3);
        assert_eq!(u[0].name, "A7");
        assert_eq!(u[0].readings, vec![0.412, 0.418]);
        assert_eq!(u[1].readings, vec![0.3, 0.31]);
        assert_eq!(u[2].name, "unknown 3");
        assert_eq!(u[2].readings, vec![0.5, 0.52]);
    }

    #[test]
    fn a_bad_line_is_named() {
        let e = parse_unknowns("A1 0.2\nA2 0.3 zero\n").expect_err("a word");
        assert!(e.starts_with("line 2:") && e.contains("'zero'"), "{e}");
        let e = parse_unknowns("lonely\n").expect_err("no reading");
        assert!(e.contains("line 1") && e.contains("no reading"), "{e}");
    }
}

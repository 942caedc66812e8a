//! What a model is made of beyond its numeric columns: a grouping factor (indicator terms
//! against a reference level, optionally a slope of its own per level) and transforms of the
//! response and of each predictor; and how a model's design row is built at one x.

use std::collections::BTreeSet;
use std::sync::Arc;

use plumb_core::regression::{Design, Term, TermKind, Transform};

use super::AnalysisError;
use crate::select::{DropReason, Dropped, Selection};
use crate::table::Table;

/// Most levels a grouping factor may have.
pub const MAX_LEVELS: usize = 50;

/// A column whose values name groups (site, analyst, batch, instrument).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Factor {
    /// The column (text, or numbers used as labels).
    pub column: String,
    /// The level the others are measured against (`None`: the first in sorted order).
    pub reference: Option<String>,
    /// A slope of its own per level for the first predictor (else parallel lines).
    pub separate_slopes: bool,
}

/// How the response enters the model.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub enum ResponseScale {
    /// As measured, or under a fixed transform.
    #[default]
    Identity,
    /// Under a fixed transform.
    Fixed(Transform),
    /// Box–Cox with λ estimated by maximum likelihood for the model.
    BoxCox,
}

impl ResponseScale {
    /// Reads `ln`, `log10`, `sqrt`, `reciprocal`, `box-cox` (λ estimated) or `box-cox:λ`.
    ///
    /// # Errors
    /// A message naming the word and what is accepted.
    pub fn parse(s: &str) -> Result<Self, String> {
        if s == "box-cox" {
            return Ok(Self::BoxCox);
        }
        if let Some(l) = s.strip_prefix("box-cox:") {
            return match l.parse::<f64>() {
                Ok(v) if v.is_finite() => Ok(Self::Fixed(Transform::BoxCox(v))),
                _ => Err(format!(
                    "'{l}' is not a number for box-cox:LAMBDA (such as box-cox:0.5)"
                )),
            };
        }
        match s {
            "none" | "identity" => Ok(Self::Identity),
            _ => transform_named(s).map(Self::Fixed).ok_or_else(|| {
                format!("'{s}' is not ln, log10, sqrt, reciprocal, box-cox or box-cox:LAMBDA")
            }),
        }
    }

    /// The word [`ResponseScale::parse`] reads back.
    pub fn name(self) -> String {
        match self {
            Self::Identity => "none".into(),
            Self::BoxCox => "box-cox".into(),
            Self::Fixed(Transform::BoxCox(l)) => format!("box-cox:{l}"),
            Self::Fixed(t) => transform_name(t).to_string(),
        }
    }
}

/// A predictor's transform by its word: `ln`, `log10`, `sqrt` or `reciprocal`.
pub fn transform_named(kind: &str) -> Option<Transform> {
    Some(match kind {
        "ln" => Transform::Ln,
        "log10" => Transform::Log10,
        "sqrt" => Transform::Sqrt,
        "reciprocal" => Transform::Reciprocal,
        "none" => Transform::Identity,
        _ => return None,
    })
}

/// The word of a transform (`box-cox:λ` for a fixed Box–Cox).
pub fn transform_name(t: Transform) -> String {
    match t {
        Transform::Identity => "none".into(),
        Transform::Ln => "ln".into(),
        Transform::Log10 => "log10".into(),
        Transform::Sqrt => "sqrt".into(),
        Transform::Reciprocal => "reciprocal".into(),
        Transform::BoxCox(l) => format!("box-cox:{l}"),
    }
}

/// The factor's levels on the rows used, the reference first.
#[derive(Debug, Clone, PartialEq)]
pub struct Levels {
    /// The column.
    pub column: String,
    /// Level names; `names[0]` is the reference.
    pub names: Vec<String>,
    /// Level index of each row used (in `selection.rows` order).
    pub of_row: Vec<usize>,
    /// Whether each level has a slope of its own.
    pub separate_slopes: bool,
}

/// The label of a factor's cell: the text, or a number as written by Rust's shortest form.
fn level_labels(table: &Table, column: &str) -> Result<Vec<Option<String>>, AnalysisError> {
    let col = table.column(column).ok_or_else(|| {
        AnalysisError::Request(format!(
            "{}: no column named '{column}' to group by",
            table.source().display()
        ))
    })?;
    Ok(col.values.labels())
}

/// Drops the rows whose factor cell is missing (recorded as dropped) and reads the levels of
/// the others, checking the reference and that every level can support its terms.
pub(super) fn levels(
    table: &Table,
    factor: &Factor,
    selection: &mut Selection,
) -> Result<Levels, AnalysisError> {
    let file = table.source().display().to_string();
    let labels = level_labels(table, &factor.column)?;
    let mut keep = Vec::with_capacity(selection.rows.len());
    for (k, &row) in selection.rows.iter().enumerate() {
        match &labels[row - 1] {
            Some(_) => keep.push(k),
            None => selection.dropped.push(Dropped {
                row,
                column: factor.column.clone(),
                reason: DropReason::Missing,
            }),
        }
    }
    selection.dropped.sort_by_key(|d| d.row);
    selection.rows = keep.iter().map(|&k| selection.rows[k]).collect();
    for column in &mut selection.columns {
        *column = keep.iter().map(|&k| column[k]).collect();
    }
    let present: BTreeSet<&str> = selection
        .rows
        .iter()
        .filter_map(|&r| labels[r - 1].as_deref())
        .collect();
    let mut names: Vec<String> = present.iter().map(|s| s.to_string()).collect();
    if names.len() > MAX_LEVELS {
        return Err(AnalysisError::Request(format!(
            "{file}: column '{}' has {} different values on the rows used; a grouping column may have at most {MAX_LEVELS}",
            factor.column,
            names.len()
        )));
    }
    if let Some(r) = &factor.reference {
        let Some(k) = names.iter().position(|n| n == r) else {
            return Err(AnalysisError::Request(format!(
                "{file}: level '{r}' does not occur in column '{}' on the rows used (levels: {})",
                factor.column,
                names.join(", ")
            )));
        };
        let reference = names.remove(k);
        names.insert(0, reference);
    }
    let of_row = selection
        .rows
        .iter()
        .map(|&r| {
            let label = labels[r - 1].as_deref().unwrap_or_default();
            names.iter().position(|n| n == label).unwrap_or(0)
        })
        .collect();
    let levels = Levels {
        column: factor.column.clone(),
        names,
        of_row,
        separate_slopes: factor.separate_slopes,
    };
    check_level_sizes(&file, &levels)?;
    Ok(levels)
}

/// Every level needs two rows (three with a slope of its own); one level alone is no factor.
fn check_level_sizes(file: &str, levels: &Levels) -> Result<(), AnalysisError> {
    if levels.names.len() < 2 {
        return Err(AnalysisError::Request(format!(
            "{file}: column '{}' has a single level ({}) on the rows used; a grouping needs at least two",
            levels.column,
            levels.names.first().map_or("none", String::as_str)
        )));
    }
    let need = if levels.separate_slopes { 3 } else { 2 };
    for (k, name) in levels.names.iter().enumerate() {
        let n = levels.of_row.iter().filter(|&&l| l == k).count();
        if n < need {
            let what = if levels.separate_slopes {
                "3 rows for a slope of its own"
            } else {
                "2 rows"
            };
            return Err(AnalysisError::Request(format!(
                "{file}: level '{name}' of '{}' has {n} {} on the rows used; each level needs at least {what}. Exclude that level's rows, merge it with another, or fit without the grouping",
                levels.column,
                if n == 1 { "row" } else { "rows" }
            )));
        }
    }
    Ok(())
}

/// Term name of level `name` of factor `column`.
pub fn level_term(column: &str, name: &str) -> String {
    format!("{column}={name}")
}

/// Appends the factor's terms: an indicator per level but the reference, then (with separate
/// slopes) the first predictor times each indicator.
pub(super) fn push_factor_terms(
    design: &mut Design,
    levels: &Levels,
    first: Option<(&str, &[f64])>,
) {
    for (k, name) in levels.names.iter().enumerate().skip(1) {
        let column = levels
            .of_row
            .iter()
            .map(|&l| f64::from(u8::from(l == k)))
            .collect::<Arc<[f64]>>();
        let term = Term {
            name: level_term(&levels.column, name),
            kind: TermKind::Linear,
        };
        design.push(term, column);
    }
    let (true, Some((x_name, x))) = (levels.separate_slopes, first) else {
        return;
    };
    for (k, name) in levels.names.iter().enumerate().skip(1) {
        let column = levels
            .of_row
            .iter()
            .zip(x)
            .map(|(&l, &v)| if l == k { v } else { 0.0 })
            .collect::<Arc<[f64]>>();
        let term = Term {
            name: format!("{x_name}×{}", level_term(&levels.column, name)),
            kind: TermKind::Linear,
        };
        design.push(term, column);
    }
}

/// Applies `t` to `values` (a column of `column`), or says which rows fall outside its domain:
/// how many, and the first few data rows.
pub(super) fn transformed(
    file: &str,
    column: &str,
    t: Transform,
    values: &Arc<[f64]>,
    rows: &[usize],
) -> Result<Arc<[f64]>, AnalysisError> {
    if t == Transform::Identity {
        // The values themselves, shared.
        return Ok(Arc::clone(values));
    }
    let mut bad: Vec<usize> = Vec::new();
    let out: Arc<[f64]> = values
        .iter()
        .zip(rows)
        .map(|(&v, &r)| {
            t.apply(v).unwrap_or_else(|| {
                bad.push(r);
                f64::NAN
            })
        })
        .collect();
    if bad.is_empty() {
        return Ok(out);
    }
    let first: Vec<String> = bad.iter().take(8).map(ToString::to_string).collect();
    Err(AnalysisError::Request(format!(
        "{file}, column '{column}': {} {} not {} as {} needs (first: rows {}); exclude them or choose another transform",
        bad.len(),
        if bad.len() == 1 { "row is" } else { "rows are" },
        t.domain(),
        t.label(column),
        first.join(", ")
    )))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn factor_terms_are_indicators_against_the_reference_and_optional_slopes() {
        let levels = Levels {
            column: "site".into(),
            names: vec!["b".into(), "a".into(), "c".into()],
            of_row: vec![0, 1, 2, 1],
            separate_slopes: true,
        };
        let x = [1.0, 2.0, 3.0, 4.0];
        let mut d = Design::linear(&[("dose", &x)], true);
        push_factor_terms(&mut d, &levels, Some(("dose", &x)));
        let names: Vec<&str> = d.terms().iter().map(|t| t.name.as_str()).collect();
        assert_eq!(
            names,
            [
                "intercept",
                "dose",
                "site=a",
                "site=c",
                "dose×site=a",
                "dose×site=c"
            ]
        );
        assert_eq!(*d.columns()[2], [0.0, 1.0, 0.0, 1.0]);
        assert_eq!(*d.columns()[5], [0.0, 0.0, 3.0, 0.0]);
    }

    #[test]
    fn scales_read_back_what_they_write() {
        for s in [
            "none",
            "ln",
            "log10",
            "sqrt",
            "reciprocal",
            "box-cox",
            "box-cox:0.5",
        ] {
            assert_eq!(ResponseScale::parse(s).expect("known").name(), s);
        }
        assert!(ResponseScale::parse("log2").is_err());
        assert!(ResponseScale::parse("box-cox:x").is_err());
    }

    #[test]
    fn a_value_outside_the_transform_is_reported_by_row() {
        let e = transformed(
            "f.csv",
            "conc",
            Transform::Ln,
            &Arc::from([1.0, 0.0, -2.0, 3.0].as_slice()),
            &[4, 5, 9, 10],
        )
        .expect_err("not positive");
        let text = e.to_string();
        assert!(text.contains("2 rows are not positive"), "{text}");
        assert!(
            text.contains("rows 5, 9") && text.contains("ln(conc)"),
            "{text}"
        );
        let values: Arc<[f64]> = Arc::from([4.0, 9.0].as_slice());
        let ok = transformed("f.csv", "c", Transform::Sqrt, &values, &[1, 2]).expect("fine");
        assert_eq!(*ok, [2.0, 3.0]);
        let same = transformed("f.csv", "c", Transform::Identity, &values, &[1, 2]).expect("ok");
        assert!(
            Arc::ptr_eq(&same, &values),
            "untransformed values are shared, not copied"
        );
    }
}

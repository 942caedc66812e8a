//! Complete-row selection: the rows an analysis can use, and an account of the rest.

use std::sync::Arc;

use rayon::prelude::*;

use crate::table::{ColumnValues, Table};
use crate::values::Numbers;
use crate::{DataError, Result};

/// Why a row was left out of an analysis.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DropReason {
    /// A needed cell is empty or a missing token.
    Missing,
    /// A needed cell holds ±∞ (written as such, or a number beyond the f64 range).
    NonFinite,
}

impl DropReason {
    /// Lower-case name used in output.
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Missing => "missing",
            Self::NonFinite => "non-finite",
        }
    }
}

/// A dropped row and the first needed column that made it so.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Dropped {
    /// 1-based data row.
    pub row: usize,
    /// Column at fault.
    pub column: String,
    /// Why.
    pub reason: DropReason,
}

/// The complete rows of some numeric columns.
#[derive(Debug, Clone, PartialEq)]
pub struct Selection {
    /// 1-based data rows used, ascending.
    pub rows: Vec<usize>,
    /// Values of each requested column on those rows, in request order.
    /// (Shared: the model's response, predictors and design point at these when no
    /// transform changes them.)
    pub columns: Vec<Arc<[f64]>>,
    /// Rows left out for missing or non-finite values.
    pub dropped: Vec<Dropped>,
    /// Rows left out because the caller excluded them (ascending, deduplicated), whether or
    /// not they were also incomplete.
    pub excluded: Vec<usize>,
}

/// The first needed column whose cell in row `i` (0-based) makes the row incomplete, and why.
pub(crate) fn first_fault<'a>(
    names: &[&'a str],
    columns: &[&Numbers],
    i: usize,
) -> Option<(&'a str, DropReason)> {
    names
        .iter()
        .zip(columns)
        .find_map(|(name, col)| match col.get(i) {
            None => Some((*name, DropReason::Missing)),
            Some(v) if !v.is_finite() => Some((*name, DropReason::NonFinite)),
            Some(_) => None,
        })
}

impl Table {
    /// The numeric values of a column.
    ///
    /// # Errors
    /// Unknown column (with a suggestion), text column (naming the first non-number cell),
    /// or a column with no values at all.
    pub fn numeric(&self, name: &str) -> Result<&Numbers> {
        let column = self.column(name).ok_or_else(|| DataError::UnknownColumn {
            path: self.source().to_path_buf(),
            name: name.to_string(),
            hint: self.column_hint(name),
        })?;
        match &column.values {
            ColumnValues::Numeric(v) if v.all_missing() => Err(DataError::AllMissing {
                path: self.source().to_path_buf(),
                column: name.to_string(),
            }),
            ColumnValues::Numeric(v) => Ok(v),
            ColumnValues::Text {
                first_text_row,
                first_text,
                text_count,
                ..
            } => Err(DataError::TextColumn {
                path: self.source().to_path_buf(),
                column: name.to_string(),
                row: *first_text_row,
                value: first_text.clone(),
                text_count: *text_count,
            }),
        }
    }

    /// Rows where every named column holds a finite number, minus `exclude` (1-based rows).
    ///
    /// # Errors
    /// As [`Table::numeric`], and [`DataError::RowOutOfRange`] for an exclusion beyond the table.
    pub fn complete_rows(&self, names: &[&str], exclude: &[usize]) -> Result<Selection> {
        let columns: Vec<&Numbers> = names
            .iter()
            .map(|n| self.numeric(n))
            .collect::<Result<_>>()?;
        let mut excluded = exclude.to_vec();
        excluded.sort_unstable();
        excluded.dedup();
        if let Some(&row) = excluded.iter().find(|&&r| r == 0 || r > self.n_rows()) {
            return Err(DataError::RowOutOfRange {
                path: self.source().to_path_buf(),
                row,
                n_rows: self.n_rows(),
            });
        }
        // Which rows are kept is settled first (the exclusions walked beside the rows, each
        // kept row's cells checked); then each column is gathered at its exact length, the
        // columns on all cores.
        let mut rows = Vec::with_capacity(self.n_rows());
        let mut dropped = Vec::new();
        let mut next_excluded = excluded.iter().copied().peekable();
        for i in 0..self.n_rows() {
            let row = i + 1;
            if next_excluded.next_if_eq(&row).is_some() {
                continue;
            }
            match first_fault(names, &columns, i) {
                Some((name, reason)) => dropped.push(Dropped {
                    row,
                    column: name.to_string(),
                    reason,
                }),
                None => rows.push(row),
            }
        }
        let every_row = rows.len() == self.n_rows();
        let gathered = columns
            .par_iter()
            .map(|col| {
                let values = col.as_nan_missing();
                if every_row {
                    Arc::from(values)
                } else {
                    rows.iter().map(|&r| values[r - 1]).collect::<Arc<[f64]>>()
                }
            })
            .collect();
        Ok(Selection {
            rows,
            columns: gathered,
            dropped,
            excluded,
        })
    }

    fn column_hint(&self, name: &str) -> String {
        let lower = name.to_lowercase();
        let close: Vec<&str> = self
            .columns()
            .iter()
            .map(|c| c.name.as_str())
            .filter(|c| {
                let c = c.to_lowercase();
                c == lower || c.contains(&lower) || lower.contains(&c)
            })
            .collect();
        if close.is_empty() {
            let all: Vec<&str> = self.columns().iter().map(|c| c.name.as_str()).collect();
            format!("the columns are: {}", all.join(", "))
        } else {
            format!("did you mean {}?", close.join(" or "))
        }
    }
}

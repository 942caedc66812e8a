//! A loaded file and what the workbench needs to know about its columns.

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use std::sync::Arc;

use plumb_data::{ColumnSummary, ColumnValues, LoadOptions, Table};

use super::column_facts::{facts_of, suggested_id, NumericFacts};
use crate::error::WorkbenchError;

/// A text column with at most this many distinct values can colour the points.
pub const MAX_GROUPS: usize = 12;

/// A file on the workbench.
#[derive(Debug, Clone)]
pub struct Dataset {
    /// The table, shared with background jobs.
    pub table: Arc<Table>,
    /// How it was read (kept for the session).
    pub options: LoadOptions,
    /// Type, missing count and range of each column.
    pub summaries: Vec<ColumnSummary>,
    /// Names of the numeric columns (with at least one value).
    pub numeric: Vec<String>,
    /// Names of the text columns that can colour the points, with their levels.
    pub groups: Vec<(String, Vec<String>)>,
    /// Mean, SD and histogram of each column, in file order (`None` for text and empty ones).
    pub facts: Vec<Option<NumericFacts>>,
    /// The column suggested to name the rows (see [`suggested_id`]).
    pub suggested_id: Option<String>,
    /// Where the rows came from when the table is a random sample of a larger file.
    pub sample: Option<SampleOrigin>,
}

/// A table that holds a seeded random sample of a file's rows, not the file.
#[derive(Debug, Clone, PartialEq)]
pub struct SampleOrigin {
    /// 1-based data row in the file of each of the table's rows.
    pub file_rows: Vec<usize>,
    /// Data rows in the file.
    pub file_row_count: usize,
    /// The generator's seed.
    pub seed: u64,
}

impl Dataset {
    /// Reads `path` (never writes it).
    ///
    /// # Errors
    /// The loader's message, which names the file and the row or column at fault.
    pub fn load(path: &Path, options: &LoadOptions) -> Result<Self, WorkbenchError> {
        Self::load_with_progress(path, options, &plumb_data::Progress::default())
    }

    /// [`Dataset::load`], reporting progress for the status bar.
    ///
    /// # Errors
    /// As [`Dataset::load`].
    pub fn load_with_progress(
        path: &Path,
        options: &LoadOptions,
        progress: &plumb_data::Progress,
    ) -> Result<Self, WorkbenchError> {
        let table = plumb_data::load_with_progress(path, options, progress)
            .map_err(|e| WorkbenchError::Load(e.to_string()))?;
        Ok(Self::from_table(table, options.clone()))
    }

    /// Describes an already loaded table.
    pub fn from_table(table: Table, options: LoadOptions) -> Self {
        let summaries: Vec<ColumnSummary> = table.summaries();
        let numeric = summaries
            .iter()
            .filter(|s| s.kind == "numeric")
            .map(|s| s.name.clone())
            .collect();
        let groups = table
            .columns()
            .iter()
            .filter_map(|c| match &c.values {
                ColumnValues::Text { values, .. } => {
                    let levels: BTreeSet<&str> = values.levels().collect();
                    (levels.len() >= 2 && levels.len() <= MAX_GROUPS).then(|| {
                        (
                            c.name.clone(),
                            levels.into_iter().map(str::to_string).collect(),
                        )
                    })
                }
                ColumnValues::Numeric(_) => None,
            })
            .collect();
        Self {
            facts: facts_of(table.columns()),
            suggested_id: suggested_id(table.columns()),
            table: Arc::new(table),
            options,
            summaries,
            numeric,
            groups,
            sample: None,
        }
    }

    /// Describes a random sample of a file's rows (labelled as a sample wherever the file's
    /// name is shown).
    pub fn from_sample(sample: plumb_data::RowSample, options: LoadOptions) -> Self {
        let mut d = Self::from_table(sample.table, options);
        d.sample = Some(SampleOrigin {
            file_rows: sample.file_rows,
            file_row_count: sample.file_row_count,
            seed: sample.seed,
        });
        d
    }

    /// The text of the cell of data row `row` (1-based) in `column`, as it names the row: a
    /// whole number in full (a sample number of eight digits must not round to `2.02401e7`),
    /// any other number in full precision, `None` where missing or out of range.
    pub fn cell_text(&self, column: &str, row: usize) -> Option<String> {
        let i = row.checked_sub(1)?;
        match &self.table.column(column)?.values {
            ColumnValues::Numeric(v) => v.get(i).map(name_of_number),
            ColumnValues::Text { values, .. } => values.get(i).map(str::to_string),
        }
    }

    /// The file the table came from.
    pub fn path(&self) -> PathBuf {
        self.table.source().to_path_buf()
    }

    /// File name for the title bar and the columns screen; a sample says so, with its size,
    /// the file's rows and the seed.
    pub fn file_name(&self) -> String {
        let name = self.table.source().file_name().map_or_else(
            || self.table.source().display().to_string(),
            |n| n.to_string_lossy().into_owned(),
        );
        match &self.sample {
            None => name,
            Some(s) => format!(
                "{name} — random sample of {} of {} rows, seed {}",
                plumb_report::text::count(self.table.n_rows()),
                plumb_report::text::count(s.file_row_count),
                s.seed
            ),
        }
    }

    /// Level index of each data row in group column `name` (None where missing).
    pub fn group_of_rows(&self, name: &str) -> Option<Vec<Option<usize>>> {
        let (_, levels) = self.groups.iter().find(|(n, _)| n == name)?;
        match &self.table.column(name)?.values {
            ColumnValues::Text { values, .. } => Some(
                values
                    .iter()
                    .map(|v| v.and_then(|s| levels.iter().position(|l| l == s)))
                    .collect(),
            ),
            ColumnValues::Numeric(_) => None,
        }
    }
}

/// A number as a row's name: whole numbers below 2⁵³ as integers, others in full precision.
fn name_of_number(v: f64) -> String {
    if v.fract() == 0.0 && v.abs() < 9_007_199_254_740_992.0 {
        format!("{}", v as i64)
    } else {
        plumb_report::text::exact(v)
    }
}

#[cfg(test)]
mod tests {
    use super::name_of_number;

    #[test]
    fn numbers_that_name_rows_keep_every_digit() {
        assert_eq!(name_of_number(20_240_117.0), "20240117");
        assert_ne!(name_of_number(20_240_117.0), name_of_number(20_240_118.0));
        assert_eq!(name_of_number(-3.0), "-3");
        assert_eq!(name_of_number(12.25), "12.25");
        assert_eq!(name_of_number(0.1 + 0.2), "0.30000000000000004");
    }
}

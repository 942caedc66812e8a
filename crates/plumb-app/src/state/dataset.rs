//! A loaded file and what the workbench needs to know about its columns.

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use std::sync::Arc;

use plumb_data::{ColumnSummary, ColumnValues, LoadOptions, Table};

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
        let summaries: Vec<ColumnSummary> = table.columns().iter().map(|c| c.summary()).collect();
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
                    let levels: BTreeSet<&str> =
                        values.iter().flatten().map(String::as_str).collect();
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
            table: Arc::new(table),
            options,
            summaries,
            numeric,
            groups,
        }
    }

    /// The file the table came from.
    pub fn path(&self) -> PathBuf {
        self.table.source().to_path_buf()
    }

    /// File name for the title bar.
    pub fn file_name(&self) -> String {
        self.table.source().file_name().map_or_else(
            || self.table.source().display().to_string(),
            |n| n.to_string_lossy().into_owned(),
        )
    }

    /// Level index of each data row in group column `name` (None where missing).
    pub fn group_of_rows(&self, name: &str) -> Option<Vec<Option<usize>>> {
        let (_, levels) = self.groups.iter().find(|(n, _)| n == name)?;
        match &self.table.column(name)?.values {
            ColumnValues::Text { values, .. } => Some(
                values
                    .iter()
                    .map(|v| v.as_ref().and_then(|s| levels.iter().position(|l| l == s)))
                    .collect(),
            ),
            ColumnValues::Numeric(_) => None,
        }
    }
}

//! The model behind the co-movement map: a coefficient for every pair of the chosen numeric
//! columns, with raw and adjusted p-values, the complete pairs behind each, the check for
//! structure a straight line misses, and an order that puts columns moving together side by
//! side. Computed off the UI thread whenever its settings change.

mod notes;
mod row_labels;

use std::collections::BTreeSet;

use plumb_core::association::{
    correlation_matrix, similarity_order, structure_scan_counted, Adjustment, CorrelationMatrix,
    MatrixSize, Method, StructureScan, STRUCTURE_BUDGET,
};

use super::dataset::Dataset;
use super::jobs::{Job, Waker};

pub use notes::MapNote;
pub use row_labels::{row_label, RowLabel};

/// What the map is computed from.
#[derive(Debug, Clone, PartialEq)]
pub struct MapKey {
    /// Coefficient.
    pub method: Method,
    /// p-value adjustment across the pairs.
    pub adjust: Adjustment,
    /// Column giving the order of the rows (adds the shared-trend guard).
    pub order: Option<String>,
    /// Numeric columns left out of the map.
    pub left_out: BTreeSet<String>,
}

/// A computed map.
#[derive(Debug, Clone)]
pub struct MapResult {
    /// Its inputs.
    pub key: MapKey,
    /// Columns in the map (the numeric ones not left out), in file order.
    pub columns: Vec<String>,
    /// The matrix.
    pub matrix: CorrelationMatrix,
    /// Distance correlation against Pearson r for every pair, or why it was skipped.
    pub structure: StructureScan,
    /// Columns ordered so that those moving together sit together.
    pub similarity: Vec<usize>,
    /// Counts the maps computed, so views can cache what they draw from one.
    pub generation: u64,
    /// The pairs the map flags, with their notes' labels (worked out with the map, not per
    /// frame: a thousand columns are half a million pairs).
    pub flagged: Vec<(usize, usize, Vec<&'static str>)>,
    /// The pairs with a coefficient, strongest |coefficient| first, at most [`LISTED`].
    pub strongest: Vec<(usize, usize, f64)>,
}

/// Most pairs kept in [`MapResult::strongest`].
pub const LISTED: usize = 12;

impl MapResult {
    /// The side lists of this map: the flagged pairs and the strongest ones.
    fn with_lists(mut self) -> Self {
        let k = self.columns.len();
        let pairs = || (0..k).flat_map(move |i| (i + 1..k).map(move |j| (i, j)));
        self.flagged = pairs()
            .filter_map(|(i, j)| {
                let notes = self.notes(i, j);
                (!notes.is_empty()).then(|| (i, j, notes.iter().map(|n| n.label()).collect()))
            })
            .collect();
        let mut strongest: Vec<(usize, usize, f64)> = pairs()
            .filter_map(|(i, j)| self.matrix.r[i][j].map(|v| (i, j, v)))
            .collect();
        strongest.sort_by(|a, b| b.2.abs().total_cmp(&a.2.abs()));
        strongest.truncate(LISTED);
        self.strongest = strongest;
        self
    }
}

/// The map's settings, its job and its latest result.
#[derive(Default)]
pub struct MapModel {
    key: MapKey,
    job: Option<Job<MapResult>>,
    result: Option<MapResult>,
    computed: u64,
    /// Columns that look like row labels, with why; found once per file.
    row_labels: Option<Vec<(String, RowLabel)>>,
}

impl Default for MapKey {
    fn default() -> Self {
        Self {
            method: Method::Pearson,
            adjust: Adjustment::Holm,
            order: None,
            left_out: BTreeSet::new(),
        }
    }
}

impl MapModel {
    /// The settings asked for (the result may still be for earlier ones).
    pub fn key(&self) -> &MapKey {
        &self.key
    }

    /// Asks for the map with `key` (computed by the next poll).
    pub fn set_key(&mut self, key: MapKey) {
        self.key = key;
    }

    /// Whether the map is being computed.
    pub fn is_busy(&self) -> bool {
        self.job.is_some()
    }

    /// The map last computed.
    pub fn result(&self) -> Option<&MapResult> {
        self.result.as_ref()
    }

    /// The columns of `data` that look like row labels, with why (left out of the map when
    /// the file was opened).
    pub fn row_labels(&self) -> &[(String, RowLabel)] {
        self.row_labels.as_deref().unwrap_or_default()
    }

    /// The numeric columns of `data` the map is asked for.
    pub fn chosen<'a>(&self, data: &'a Dataset) -> Vec<&'a String> {
        data.numeric
            .iter()
            .filter(|c| !self.key.left_out.contains(*c))
            .collect()
    }

    /// Why no map is computed for `data`: fewer than two columns chosen, or too many for a
    /// matrix (see [`plumb_core::association::MATRIX_MAX_COLUMNS`]).
    pub fn refused(&self, data: &Dataset) -> Option<String> {
        let k = self.chosen(data).len();
        if k < 2 {
            return Some(format!(
                "{k} of the {} numeric columns chosen; the map needs at least two",
                data.numeric.len()
            ));
        }
        let size = MatrixSize::of(k);
        (!size.is_allowed()).then(|| plumb_report::wording::matrix_too_wide(&size))
    }

    /// The map's notes on columns `a` and `b` (either order) as sentences, from the map last
    /// computed; none when either column is not in it.
    pub fn pair_notes(&self, a: &str, b: &str) -> Vec<String> {
        self.result.as_ref().map_or_else(Vec::new, |r| {
            r.notes_named(a, b).iter().map(|n| n.text(a, b)).collect()
        })
    }

    /// Leaves out the columns of a newly opened file that look like row labels, as long as
    /// two columns remain.
    fn find_row_labels(&mut self, data: &Dataset) {
        let found: Vec<(String, RowLabel)> = data
            .numeric
            .iter()
            .filter_map(|c| {
                let values = data.table.numeric(c).ok()?;
                row_label(c, values.as_nan_missing()).map(|why| (c.clone(), why))
            })
            .collect();
        if data.numeric.len() >= found.len() + 2 {
            self.key
                .left_out
                .extend(found.iter().map(|(c, _)| c.clone()));
        }
        self.row_labels = Some(found);
    }

    /// Picks up a finished map; starts one when the inputs changed.
    pub fn poll(&mut self, data: &Dataset, waker: &Waker) {
        if self.row_labels.is_none() {
            self.find_row_labels(data);
        }
        if let Some(mut r) = self.job.as_mut().and_then(Job::poll) {
            self.job = None;
            self.computed += 1;
            r.generation = self.computed;
            self.result = Some(r);
        }
        let current = self.result.as_ref().map(|r| &r.key) == Some(&self.key);
        let wanted = self.refused(data).is_none();
        if !current && self.job.is_none() && wanted {
            let key = self.key.clone();
            let table = std::sync::Arc::clone(&data.table);
            let columns = self.chosen(data).into_iter().cloned().collect();
            self.job = Some(Job::spawn(
                move |_| compute(&table, columns, key),
                waker.hook(),
            ));
        }
    }
}

/// The map for `columns` of `table`: the matrix, the structure scan within
/// [`STRUCTURE_BUDGET`], and the similarity order.
pub fn compute(table: &plumb_data::Table, columns: Vec<String>, key: MapKey) -> MapResult {
    let values: Vec<&[f64]> = columns
        .iter()
        .filter_map(|c| {
            table
                .numeric(c)
                .ok()
                .map(plumb_data::Numbers::as_nan_missing)
        })
        .collect();
    let order = key.order.as_deref().and_then(|c| {
        table
            .numeric(c)
            .ok()
            .map(plumb_data::Numbers::as_nan_missing)
    });
    let matrix = correlation_matrix(&values, key.method, key.adjust, order);
    let similarity = similarity_order(&matrix.r);
    let structure = structure_scan_counted(&values, &matrix.n, STRUCTURE_BUDGET);
    MapResult {
        key,
        columns,
        matrix,
        structure,
        similarity,
        generation: 0,
        flagged: Vec::new(),
        strongest: Vec::new(),
    }
    .with_lists()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A table written to a temporary file and loaded as the workbench loads one.
    fn dataset(header: &str, rows: impl Iterator<Item = String>) -> (tempfile::TempDir, Dataset) {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("d.csv");
        let text: String = std::iter::once(format!("{header}\n")).chain(rows).collect();
        std::fs::write(&path, text).expect("write");
        let data = Dataset::load(&path, &Default::default()).expect("load");
        (dir, data)
    }

    /// Forty rows: a running index, a jittered order, two series drifting along it, and a
    /// parabola over a symmetric range (r = 0, exact dependence); `b` misses three cells.
    fn survey() -> (tempfile::TempDir, Dataset) {
        dataset(
            "idx,t,a,b,x,w",
            (0..40).map(|i| {
                let f = f64::from(i);
                let t = f + 0.4 * f64::from(i % 3);
                let a = t + (f * 1.7).sin();
                let b = if i % 13 == 5 {
                    String::new()
                } else {
                    format!("{}", 2.0 * t + (f * 0.9 + 1.0).cos())
                };
                let x = -1.0 + 2.0 * f64::from((i * 17) % 40) / 39.0;
                format!("{},{t},{a},{b},{x},{}\n", i + 1, x * x)
            }),
        )
    }

    fn computed(model: &mut MapModel, data: &Dataset) -> MapResult {
        model.find_row_labels(data);
        let columns = model.chosen(data).into_iter().cloned().collect();
        compute(&data.table, columns, model.key().clone())
    }

    #[test]
    fn a_running_index_is_left_out_and_n_counts_each_pairs_complete_rows() {
        let (_dir, data) = survey();
        let mut model = MapModel::default();
        let r = computed(&mut model, &data);
        assert_eq!(
            model.row_labels(),
            [("idx".to_string(), RowLabel::RunningIndex { step: 1.0 })]
        );
        assert_eq!(r.columns, ["t", "a", "b", "x", "w"]);
        let (a, b, x) = (r.index_of("a"), r.index_of("b"), r.index_of("x"));
        let (a, b, x) = (a.expect("a"), b.expect("b"), x.expect("x"));
        assert_eq!(r.matrix.n[a][b], 37, "b misses rows 6, 19 and 32");
        assert_eq!(r.matrix.n[a][x], 40);
        assert_eq!(r.structure.cell(a, b).map(|c| c.n), Some(37));
        let mut key = model.key().clone();
        key.left_out.remove("idx");
        model.set_key(key);
        assert_eq!(model.chosen(&data).len(), 6, "put back on request");
    }

    #[test]
    fn notes_name_the_curve_and_the_shared_drift_but_never_the_order_column() {
        let (_dir, data) = survey();
        let mut model = MapModel::default();
        model.set_key(MapKey {
            order: Some("t".into()),
            ..MapKey::default()
        });
        let r = computed(&mut model, &data);
        let kinds = |a: &str, b: &str| -> Vec<&'static str> {
            r.notes_named(a, b).iter().map(MapNote::label).collect()
        };
        assert_eq!(kinds("a", "b"), ["shared drift"]);
        assert_eq!(kinds("b", "a"), ["shared drift"], "either order");
        assert_eq!(kinds("x", "w"), ["structure r misses"]);
        for other in ["a", "b", "t"] {
            assert!(
                !kinds("t", other).contains(&"shared drift"),
                "the order column with {other}"
            );
        }
        assert!(kinds("a", "a").is_empty() && kinds("a", "idx").is_empty());
        model.result = Some(r);
        let said = model.pair_notes("w", "x");
        assert_eq!(said.len(), 1);
        assert!(said[0].contains("distance correlation"), "{said:?}");
    }
}

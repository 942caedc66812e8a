//! The model behind the co-movement map: a coefficient for every pair of numeric columns,
//! with raw and adjusted p-values, and an order that puts columns moving together side by
//! side. Computed off the UI thread whenever its settings change.

use plumb_core::association::{
    correlation_matrix, similarity_order, Adjustment, CorrelationMatrix, MatrixSize, Method,
};

use super::dataset::Dataset;
use super::jobs::{Job, Waker};

/// What the map is computed from.
#[derive(Debug, Clone, PartialEq)]
pub struct MapKey {
    /// Coefficient.
    pub method: Method,
    /// p-value adjustment across the pairs.
    pub adjust: Adjustment,
    /// Column giving the order of the rows (adds the shared-trend guard).
    pub order: Option<String>,
}

/// A computed map.
#[derive(Debug, Clone)]
pub struct MapResult {
    /// Its inputs.
    pub key: MapKey,
    /// Columns, in file order.
    pub columns: Vec<String>,
    /// The matrix.
    pub matrix: CorrelationMatrix,
    /// Columns ordered so that those moving together sit together.
    pub similarity: Vec<usize>,
    /// Counts the maps computed, so views can cache what they draw from one.
    pub generation: u64,
}

/// The map's settings, its job and its latest result.
#[derive(Default)]
pub struct MapModel {
    key: MapKey,
    job: Option<Job<MapResult>>,
    result: Option<MapResult>,
    computed: u64,
}

impl Default for MapKey {
    fn default() -> Self {
        Self {
            method: Method::Pearson,
            adjust: Adjustment::Holm,
            order: None,
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

    /// Why no map is computed for `data`: a table too wide for a matrix (see
    /// [`plumb_core::association::MATRIX_MAX_COLUMNS`]).
    pub fn refused(data: &Dataset) -> Option<String> {
        let size = MatrixSize::of(data.numeric.len());
        (!size.is_allowed()).then(|| plumb_report::wording::matrix_too_wide(&size))
    }

    /// Picks up a finished map; starts one when the inputs changed.
    pub fn poll(&mut self, data: &Dataset, waker: &Waker) {
        if let Some(mut r) = self.job.as_mut().and_then(Job::poll) {
            self.job = None;
            self.computed += 1;
            r.generation = self.computed;
            self.result = Some(r);
        }
        let current = self.result.as_ref().map(|r| &r.key) == Some(&self.key);
        let wanted = data.numeric.len() >= 2 && Self::refused(data).is_none();
        if !current && self.job.is_none() && wanted {
            let key = self.key.clone();
            let table = std::sync::Arc::clone(&data.table);
            let columns = data.numeric.clone();
            self.job = Some(Job::spawn(
                move |_| compute(&table, columns, key),
                waker.hook(),
            ));
        }
    }
}

/// The map for `columns` of `table`.
pub fn compute(table: &plumb_data::Table, columns: Vec<String>, key: MapKey) -> MapResult {
    let values: Vec<&[Option<f64>]> = columns
        .iter()
        .filter_map(|c| table.numeric(c).ok())
        .collect();
    let order = key.order.as_deref().and_then(|c| table.numeric(c).ok());
    let matrix = correlation_matrix(&values, key.method, key.adjust, order);
    let similarity = similarity_order(&matrix.r);
    MapResult {
        key,
        columns,
        matrix,
        similarity,
        generation: 0,
    }
}

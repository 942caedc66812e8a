//! The model on the bench: its complete rows, the live fit that follows the analyst's marks,
//! and the model's numbers. The bench shows the response against the first predictor; the
//! model may have several predictors, weights, a grouping factor and transforms.

use std::sync::Arc;

use plumb_core::calibration::{rule_weights, WeightRule};
use plumb_core::regression::{BoxCox, LiveFit, LiveSummary, Transform};
use plumb_data::analysis::{model_rows, Factor, FitRequest, ModelRows, ResponseScale, WhatIf};
use plumb_data::Table;

use super::cloud::Cloud;
use super::marks::Marks;
use crate::error::WorkbenchError;

/// The model: its response, predictors, and how they enter.
#[derive(Debug, Clone, PartialEq)]
pub struct FitSpec {
    /// Response column.
    pub y: String,
    /// Predictor columns (at least one; the first is the scatter's x).
    pub x: Vec<String>,
    /// Polynomial degree of a single predictor (1 = straight line).
    pub degree: u32,
    /// Fit an intercept.
    pub intercept: bool,
    /// Confidence level of intervals and bands.
    pub level: f64,
    /// Column of positive weights.
    pub weights: Option<String>,
    /// Or weights from a rule on the predictor and the response (1/x, 1/x², 1/y², 1/s²).
    pub weight_rule: Option<WeightRule>,
    /// A grouping column entering as indicator terms.
    pub factor: Option<Factor>,
    /// The response's scale.
    pub response: ResponseScale,
    /// Transforms of predictors, by column.
    pub x_transforms: Vec<(String, Transform)>,
}

impl FitSpec {
    /// A straight line of `y` on `x` with intercept at the 95% level.
    pub fn line(y: &str, x: &str) -> Self {
        Self {
            y: y.to_string(),
            x: vec![x.to_string()],
            degree: 1,
            intercept: true,
            level: 0.95,
            weights: None,
            weight_rule: None,
            factor: None,
            response: ResponseScale::Identity,
            x_transforms: Vec::new(),
        }
    }

    /// The model part of a request (its rows and what-if values set aside).
    pub fn from_request(r: &FitRequest) -> Self {
        Self {
            y: r.y.clone(),
            x: r.x.clone(),
            degree: r.degree,
            intercept: r.intercept,
            level: r.level,
            weights: r.weights.clone(),
            weight_rule: r.weight_rule,
            factor: r.factor.clone(),
            response: r.response,
            x_transforms: r.x_transforms.clone(),
        }
    }

    /// The model in a few words: `ln(y) on dose, temp (degree 2), by site with own slopes,
    /// weighted by w`.
    pub fn describe(&self) -> String {
        let response = match self.response {
            ResponseScale::Identity => self.y.clone(),
            ResponseScale::Fixed(t) => t.label(&self.y),
            ResponseScale::BoxCox => format!("Box–Cox({})", self.y),
        };
        let mut out = format!("{response} on {}", self.model().x_term_names().join(", "));
        if self.degree > 1 {
            out.push_str(&format!(" (degree {})", self.degree));
        }
        if let Some(f) = &self.factor {
            out.push_str(&format!(", by {}", f.column));
            if f.separate_slopes {
                out.push_str(" with own slopes");
            }
        }
        if !self.intercept {
            out.push_str(", through the origin");
        }
        if let Some(w) = &self.weights {
            out.push_str(&format!(", weighted by {w}"));
        }
        if let Some(r) = self.weight_rule {
            out.push_str(&format!(", weights {}", r.label()));
        }
        out
    }

    /// The first predictor (the scatter's x).
    pub fn x0(&self) -> &str {
        &self.x[0]
    }

    /// Whether a dragged point may move in x too: one predictor, as measured, no grouping
    /// (then the design row follows from x alone).
    pub fn moves_in_x(&self) -> bool {
        self.x.len() == 1 && self.factor.is_none()
    }

    /// The model on every complete row (what the live engine starts from).
    pub fn model(&self) -> FitRequest {
        FitRequest {
            y: self.y.clone(),
            x: self.x.clone(),
            intercept: self.intercept,
            degree: self.degree,
            weights: self.weights.clone(),
            weight_rule: self.weight_rule,
            level: self.level,
            factor: self.factor.clone(),
            response: self.response,
            x_transforms: self.x_transforms.clone(),
            ..FitRequest::default()
        }
    }

    /// The model on the file's values without the rows `marks` exclude (what `plumb fit
    /// --exclude` runs, and what the summary and the per-exclusion effects are built from).
    pub fn on_file_rows(&self, marks: &Marks) -> FitRequest {
        FitRequest {
            exclude: marks.excluded.keys().copied().collect(),
            ..self.model()
        }
    }

    /// The model as the analyst sees it: the exclusions of `marks`, and its what-if moves in
    /// place of the measured values (the first predictor and the response).
    pub fn with_marks(&self, marks: &Marks) -> FitRequest {
        let what_if = marks
            .moved
            .iter()
            .flat_map(|(&row, &(x, y))| {
                [
                    WhatIf {
                        row,
                        column: self.x[0].clone(),
                        value: x,
                    },
                    WhatIf {
                        row,
                        column: self.y.clone(),
                        value: y,
                    },
                ]
            })
            .collect();
        FitRequest {
            what_if,
            ..self.on_file_rows(marks)
        }
    }
}

/// The rows and values of the model on the bench: cheap to clone (shared), so views can hold
/// a copy while the workbench changes.
#[derive(Debug, Clone)]
pub struct PairRows {
    /// The model.
    pub spec: FitSpec,
    /// 1-based data rows with every value the model needs, ascending.
    pub rows: Arc<[usize]>,
    /// The first predictor as in the data file, one per entry of `rows`.
    pub x: Arc<[f64]>,
    /// The response as in the data file.
    pub y: Arc<[f64]>,
    /// Rows of the file left out because a value is missing or not finite.
    pub incomplete: usize,
    /// Term names of the fit, in order.
    pub terms: Arc<[String]>,
    /// The points `(x, y)` at their file positions, indexed for hover.
    pub points: Arc<Cloud>,
    /// The model's rows, design and scales (for design rows at moved points and curves).
    pub model: Arc<ModelRows>,
}

/// The complete rows of the model and a live fit over them.
#[derive(Debug, Clone)]
pub struct Pair {
    base: PairRows,
    live: LiveFit,
    applied: Marks,
    /// Why the weighting rule cannot weigh the rows in use (1/s² with a level left with one
    /// reading), when it cannot.
    weight_error: Option<String>,
}

impl std::ops::Deref for Pair {
    type Target = PairRows;

    fn deref(&self) -> &PairRows {
        &self.base
    }
}

impl Pair {
    /// Selects the complete rows of `spec`'s columns and fits them.
    ///
    /// # Errors
    /// A column that is not numeric or unknown, or a model the rows cannot support; the
    /// message names the file and column.
    pub fn new(table: &Table, spec: FitSpec) -> Result<Self, WorkbenchError> {
        let rows =
            model_rows(table, &spec.model()).map_err(|e| WorkbenchError::Model(e.to_string()))?;
        Self::on(table, spec, rows)
    }

    /// The same model with the Box–Cox λ held at `b` (the estimate on the rows in use, which
    /// the diagnostics bring), so that the live numbers are those of a fresh fit.
    ///
    /// # Errors
    /// As [`Pair::new`].
    pub fn at_lambda(table: &Table, spec: FitSpec, b: BoxCox) -> Result<Self, WorkbenchError> {
        let request = FitRequest {
            response: ResponseScale::Fixed(b.transform()),
            ..spec.model()
        };
        let mut rows =
            model_rows(table, &request).map_err(|e| WorkbenchError::Model(e.to_string()))?;
        rows.boxcox = Some(b);
        Self::on(table, spec, rows)
    }

    /// Whether the live fit should move to the Box–Cox estimate `b` of the rows in use.
    pub fn lags_lambda(&self, b: &BoxCox) -> bool {
        self.spec.response == ResponseScale::BoxCox
            && self.model.response_transform != b.transform()
    }

    fn on(table: &Table, spec: FitSpec, rows: ModelRows) -> Result<Self, WorkbenchError> {
        let terms: Vec<String> = rows.design.terms().iter().map(|t| t.name.clone()).collect();
        let weights = rows.weights().map(<[f64]>::to_vec);
        let live = LiveFit::weighted(
            Arc::clone(&rows.design),
            Arc::clone(&rows.y),
            weights,
            rows.options.clone(),
        )
        .map_err(|e| WorkbenchError::Model(format!("{}: {e}", table.source().display())))?;
        let selection = &rows.selection;
        let (y, x) = (selection.columns[0].clone(), selection.columns[1].clone());
        let points = Cloud::new(
            x.iter().copied().zip(y.iter().copied()).collect(),
            (0..selection.rows.len()).collect::<Arc<[usize]>>(),
        );
        Ok(Self {
            base: PairRows {
                spec,
                rows: selection.rows.clone().into(),
                x,
                y,
                incomplete: selection.dropped.len(),
                terms: terms.into(),
                points: Arc::new(points),
                model: Arc::new(rows),
            },
            live,
            applied: Marks::default(),
            weight_error: None,
        })
    }

    /// A cheap copy of the rows and values (no fit).
    pub fn rows(&self) -> PairRows {
        self.base.clone()
    }

    /// Brings the live fit in line with `marks` (only the rows that differ are updated) and
    /// returns the numbers.
    pub fn apply(&mut self, marks: &Marks) -> &Result<LiveSummary, plumb_core::CoreError> {
        let old = std::mem::take(&mut self.applied);
        for &row in old.excluded.keys() {
            if !marks.excluded.contains_key(&row) {
                if let Some(i) = self.index_of(row) {
                    self.live.include(i);
                }
            }
        }
        for &row in marks.excluded.keys() {
            if !old.excluded.contains_key(&row) {
                if let Some(i) = self.index_of(row) {
                    self.live.exclude(i);
                }
            }
        }
        let rows_moved = old.moved.keys().chain(marks.moved.keys());
        let changed: std::collections::BTreeSet<usize> = rows_moved
            .filter(|r| old.moved.get(r) != marks.moved.get(r))
            .copied()
            .collect();
        for row in changed {
            if let Some(i) = self.index_of(row) {
                let (x, y) = self.base.point(i, marks);
                if let Some((design_row, y_t)) = self.base.model_row(i, x, y) {
                    // A finite row of the right length: the engine takes it.
                    let _ = self.live.set_row(i, &design_row, y_t);
                }
            }
        }
        self.applied = marks.clone();
        self.reweigh(marks);
        self.live.summary()
    }

    /// Puts the weighting rule's weights of the rows in use (at their current positions) into
    /// the live fit: a rule on each row's own values changes with moves; 1/s² also when a
    /// replicate is left out. O(n), plus O(p²) for each row whose weight changed.
    fn reweigh(&mut self, marks: &Marks) {
        let Some(rule) = self.spec.weight_rule else {
            return;
        };
        let entries: Vec<usize> = (0..self.base.rows.len())
            .filter(|&i| !self.base.is_excluded(i, marks))
            .collect();
        let (x, y): (Vec<f64>, Vec<f64>) =
            entries.iter().map(|&i| self.base.point(i, marks)).unzip();
        match rule_weights(rule, &x, &y) {
            Ok(w) => {
                self.weight_error = None;
                for (&i, &w) in entries.iter().zip(&w) {
                    // A weight the engine refuses cannot come from a rule that accepted it.
                    let _ = self.live.set_weight(i, w);
                }
            }
            Err(e) => {
                let row = |k: usize| entries.get(k).map_or(0, |&i| self.base.rows[i]);
                self.weight_error = Some(match e {
                    plumb_core::calibration::CalibrationError::UnreplicatedLevel {
                        level,
                        index,
                    } => {
                        format!("{} weights need two readings at every level; x = {level} has one left (row {})", rule.label(), row(index))
                    }
                    other => other.to_string(),
                });
            }
        }
    }

    /// Why the weighting rule cannot weigh the rows in use, if it cannot.
    pub fn weight_error(&self) -> Option<&str> {
        self.weight_error.as_deref()
    }

    /// Whether `marks` would change the fit (a different set of excluded rows or moves;
    /// reasons do not count).
    pub fn differs(&self, marks: &Marks) -> bool {
        !self.applied.excluded.keys().eq(marks.excluded.keys()) || self.applied.moved != marks.moved
    }

    /// The numbers for the marks last applied.
    pub fn summary(&self) -> &Result<LiveSummary, plumb_core::CoreError> {
        self.live.summary()
    }
}

impl PairRows {
    /// Index into `rows` of data row `row`, if the row is one of this pair's.
    pub fn index_of(&self, row: usize) -> Option<usize> {
        self.rows.binary_search(&row).ok()
    }

    /// Current position of entry `i`: moved (what-if) or as in the file.
    pub fn point(&self, i: usize, marks: &Marks) -> (f64, f64) {
        marks
            .moved
            .get(&self.rows[i])
            .copied()
            .unwrap_or((self.x[i], self.y[i]))
    }

    /// Whether entry `i` is excluded under `marks`.
    pub fn is_excluded(&self, i: usize, marks: &Marks) -> bool {
        marks.excluded.contains_key(&self.rows[i])
    }

    /// Data rows excluded under `marks` that belong to this pair, ascending.
    pub fn excluded_rows(&self, marks: &Marks) -> Vec<usize> {
        marks
            .excluded
            .keys()
            .copied()
            .filter(|&r| self.index_of(r).is_some())
            .collect()
    }

    /// The design row and the response on the model's scale of entry `i` with its first
    /// predictor at `x` and its response at `y` (data units): `None` where a transform
    /// cannot take them.
    pub fn model_row(&self, i: usize, x: f64, y: f64) -> Option<(Vec<f64>, f64)> {
        let model = &self.model;
        let mut values: Vec<f64> = (1..=self.spec.x.len())
            .map(|c| model.selection.columns[c][i])
            .collect();
        values[0] = x;
        let level = model.levels.as_ref().map(|l| l.of_row[i]);
        let row = model.row_at(&values, level)?;
        Some((row, model.response_transform.apply(y)?))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::state::marks::Note;
    use plumb_data::analysis::{analyze, Wanted};

    fn table() -> Table {
        let dir = tempfile::tempdir().expect("temp dir");
        let path = dir.path().join("t.csv");
        let mut text = String::from("x,y,label\n");
        for i in 0..40 {
            let x = f64::from(i) * 0.5;
            let wobble = ((i * 7919) % 13) as f64 / 13.0 - 0.5;
            let y = 2.0 + 0.8 * x + 0.1 * x * x + wobble;
            let cell = if i == 5 {
                String::new()
            } else {
                format!("{y}")
            };
            text.push_str(&format!("{x},{cell},p{i}\n"));
        }
        std::fs::write(&path, text).expect("write");
        let t = plumb_data::load(&path, &plumb_data::LoadOptions::default()).expect("load");
        drop(dir);
        t
    }

    fn excluding(rows: &[usize]) -> Marks {
        let mut m = Marks::default();
        for &r in rows {
            m.excluded.insert(
                r,
                Note {
                    reason: "test".into(),
                    at: String::new(),
                },
            );
        }
        m
    }

    #[test]
    fn live_numbers_match_the_shared_fit_path_after_any_sequence_of_marks() {
        let t = table();
        for degree in [1, 2] {
            let spec = FitSpec {
                degree,
                ..FitSpec::line("y", "x")
            };
            let mut pair = Pair::new(&t, spec.clone()).expect("pair");
            assert_eq!(pair.incomplete, 1);
            assert_eq!(pair.index_of(6), None, "row 6 has no y");
            for rows in [vec![3], vec![3, 17, 40], vec![17], vec![], vec![1, 2, 39]] {
                let live = pair.apply(&excluding(&rows)).clone().expect("fits");
                let marks = excluding(&rows);
                let reference = analyze(&t, &spec.on_file_rows(&marks), Wanted::default())
                    .expect("fit")
                    .fit;
                assert!((live.r_squared - reference.r_squared).abs() < 1e-12);
                for (a, c) in live.estimates.iter().zip(&reference.coefficients) {
                    assert!((a - c.estimate).abs() <= 1e-10 * c.estimate.abs().max(1.0));
                }
            }
        }
    }

    #[test]
    fn a_move_changes_the_numbers_and_undoing_it_restores_them() {
        let t = table();
        let mut pair = Pair::new(&t, FitSpec::line("y", "x")).expect("pair");
        let base = pair.apply(&Marks::default()).clone().expect("fits");
        let mut moved = Marks::default();
        moved.moved.insert(10, (4.5, 40.0));
        let what_if = pair.apply(&moved).clone().expect("fits");
        assert!(what_if.r_squared < base.r_squared - 0.01);
        let i = pair.index_of(10).expect("row 10");
        assert_eq!(pair.point(i, &moved), (4.5, 40.0));
        assert_ne!(
            pair.point(i, &Marks::default()).1,
            40.0,
            "the data are unchanged"
        );
        let back = pair.apply(&Marks::default()).clone().expect("fits");
        assert!((back.r_squared - base.r_squared).abs() < 1e-12);
    }
}

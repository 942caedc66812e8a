//! The live exclusion engine: exclude, include or move one observation and get the model's
//! numbers back without refitting from scratch.
//!
//! State: the Gram matrix `A = Σ zᵢzᵢᵀ` of the included rows in the solver's well-scaled
//! working basis (see `basis`), its inverse, `b = Σ zᵢyᵢ`, and the sums of `y` and `y²` (with y
//! shifted by its initial mean, which leaves every reported number unchanged when the model has
//! an intercept and keeps the sums small). Each change is a rank-one update of `A⁻¹`
//! (Sherman–Morrison, O(p²)); the coefficients `β = T·A⁻¹b`, their covariance `σ̂²·T A⁻¹ Tᵀ`
//! and `RSS = Σy² − αᵀb` follow in O(p²) too.
//!
//! Drift guard: `A` itself is kept too (additive O(p²) updates) and `α = A⁻¹b` gets one step
//! of refinement against it; every [`REFRESH_EVERY`] changes the sums are rebuilt from the
//! rows (O(np²), no refit).
//! A full least-squares refit (the QR path of [`super::fit`]) replaces the update whenever the
//! working basis is poorly conditioned (above [`CONDITION_LIMIT`]), an update would divide by
//! `1 − hᵢᵢ` below [`PIVOT_FLOOR`], the fit is so tight (`1 − R² <` [`TIGHT_FIT`]) that
//! `Σy² − αᵀb` would cancel away the digits, or fewer than [`FEW_ROWS_PER_TERM`] rows per term
//! remain.

use std::borrow::Cow;
use std::ops::Range;
use std::sync::Arc;

use nalgebra::{DMatrix, DVector};
use rayon::prelude::*;

use super::basis::Basis;
use super::design::{Design, TermKind};
use super::quality::{FitQuality, TInference};
use super::{fit, FitOptions, LinearFit};
use crate::{CoreError, Result};

/// Changes between rebuilds of the sums from the rows.
pub const REFRESH_EVERY: usize = 16;
/// Working-basis condition number above which every change is a full refit.
pub const CONDITION_LIMIT: f64 = 1e3;
/// Smallest `1 ± zᵀA⁻¹z` accepted in a rank-one update: removing a row of leverage above
/// 0.95 amplifies the rounding already in `A⁻¹` twentyfold, so such a change is a refit.
pub const PIVOT_FLOOR: f64 = 0.05;
/// `1 − R²` below which the numbers come from a full refit.
pub const TIGHT_FIT: f64 = 1e-6;
/// Below this many included rows per term every change is a full refit: with so few rows a
/// refit costs next to nothing, and the updates' rounding is least diluted.
pub const FEW_ROWS_PER_TERM: usize = 5;

/// The model's numbers after a change.
#[derive(Debug, Clone, PartialEq)]
pub struct LiveSummary {
    /// Rows included.
    pub n: usize,
    /// `β̂`, in term order.
    pub estimates: Vec<f64>,
    /// Standard errors.
    pub std_errors: Vec<f64>,
    /// Two-sided p-values of `βⱼ = 0`.
    pub p_values: Vec<f64>,
    /// Interval ends at the options' level.
    pub ci: Vec<(f64, f64)>,
    /// R² (centred with an intercept, uncentred without).
    pub r_squared: f64,
    /// Adjusted R².
    pub adj_r_squared: f64,
    /// `σ̂`.
    pub residual_std_error: f64,
    /// Overall F and its p (None for an intercept-only model).
    pub f_test: Option<(f64, f64)>,
    /// Whether these numbers came from a full refit rather than an update.
    pub refitted: bool,
}

/// Row `i`'s values as `design` holds them: `[x]` for a polynomial (its working rows are built
/// from x), the design row otherwise.
fn design_values(design: &Design, i: usize) -> Vec<f64> {
    match design.polynomial_source() {
        Some(x) => vec![x[i]],
        None => design.row(i).collect(),
    }
}

/// A row given new values by [`LiveFit::set_row`] (a what-if).
#[derive(Debug, Clone)]
struct Moved {
    /// `[x]` for a polynomial, the design row otherwise.
    values: Vec<f64>,
    /// The response.
    y: f64,
}

/// A fit that follows exclusions and moved points.
///
/// The design and the response are shared with whoever built them (an `Arc` each), and the
/// working rows are computed from them when needed: per row the engine keeps only whether
/// the row is in (and `√wᵢ` when weighted).
#[derive(Debug, Clone)]
pub struct LiveFit {
    design: Arc<Design>,
    /// The rows given new values by [`LiveFit::set_row`] (what-ifs). Every other row keeps
    /// the design's values and its response, so nothing per row is copied.
    moved: std::collections::HashMap<usize, Moved>,
    y: Arc<[f64]>,
    /// `√wᵢ` of each row (`None`: ordinary least squares).
    root_w: Option<Vec<f64>>,
    included: Vec<bool>,
    n_included: usize,
    basis_recipe: Basis,
    y_shift: f64,
    a: DMatrix<f64>,
    a_inv: DMatrix<f64>,
    b: DVector<f64>,
    /// `Σ wᵢ(yᵢ − shift)` over the included rows.
    sum_y: f64,
    /// `Σ wᵢ(yᵢ − shift)²`.
    sum_yy: f64,
    /// `Σ wᵢ` (the count without weights).
    sum_w: f64,
    options: FitOptions,
    changes: usize,
    always_refit: bool,
    /// Whether `a_inv` is the inverse of `a` built from more rows than terms. After a state
    /// with too few rows (a singular Gram matrix) it is not, and the next change must rebuild
    /// from the rows instead of updating a meaningless inverse.
    inverse_valid: bool,
    summary: Result<LiveSummary>,
}

impl LiveFit {
    /// Starts with every row included (ordinary least squares).
    ///
    /// # Errors
    /// Whatever the initial fit raises.
    pub fn new(
        design: impl Into<Arc<Design>>,
        y: impl Into<Arc<[f64]>>,
        options: FitOptions,
    ) -> Result<Self> {
        Self::weighted(design, y, None, options)
    }

    /// Starts with every row included, weighted by `weights` when given (the same weighted
    /// least squares as [`super::fit`]).
    ///
    /// # Errors
    /// Whatever the initial fit raises (a weight that is not positive, among others).
    pub fn weighted(
        design: impl Into<Arc<Design>>,
        y: impl Into<Arc<[f64]>>,
        weights: Option<Vec<f64>>,
        options: FitOptions,
    ) -> Result<Self> {
        let (design, y) = (design.into(), y.into());
        let first = fit(&design, &y, weights.as_deref(), &options)?;
        let root_w: Option<Vec<f64>> = weights
            .as_ref()
            .map(|w| w.iter().map(|v| v.sqrt()).collect());
        let mut basis = Basis::new(&design, root_w.as_deref());
        basis.columns = Vec::new(); // the working rows are computed from the design as needed
        let y_shift = if design.has_intercept() {
            crate::describe::mean(&y, weights.as_deref())
        } else {
            0.0
        };
        let p = design.n_terms();
        let mut live = Self {
            included: vec![true; y.len()],
            n_included: y.len(),
            always_refit: first.condition_number > CONDITION_LIMIT,
            inverse_valid: false,
            design,
            moved: std::collections::HashMap::new(),
            y,
            root_w,
            basis_recipe: basis,
            y_shift,
            a: DMatrix::zeros(p, p),
            a_inv: DMatrix::zeros(p, p),
            b: DVector::zeros(p),
            sum_y: 0.0,
            sum_yy: 0.0,
            sum_w: 0.0,
            options,
            changes: 0,
            summary: Ok(from_fit(&first, true)),
        };
        live.rebuild();
        Ok(live)
    }

    /// Row `i`'s response as it stands (its what-if value when moved).
    fn response(&self, i: usize) -> f64 {
        self.moved.get(&i).map_or(self.y[i], |m| m.y)
    }

    /// Row `i`'s working row times `√wᵢ`, as it stands.
    fn working_row(&self, i: usize) -> Vec<f64> {
        let r = self.root_weight(i);
        self.basis_recipe
            .z_row(&self.values_of(i))
            .into_iter()
            .map(|v| v * r)
            .collect()
    }

    /// `√wᵢ` of row `i` (1 without weights).
    fn root_weight(&self, i: usize) -> f64 {
        self.root_w.as_ref().map_or(1.0, |r| r[i])
    }

    /// The numbers after the last change (or why they are undefined, e.g. too few rows).
    pub fn summary(&self) -> &Result<LiveSummary> {
        &self.summary
    }

    /// Whether row `i` (0-based) is included.
    pub fn is_included(&self, i: usize) -> bool {
        self.included[i]
    }

    /// Leaves row `i` out. A no-op if it is already out.
    pub fn exclude(&mut self, i: usize) -> &Result<LiveSummary> {
        if self.included[i] {
            self.included[i] = false;
            self.n_included -= 1;
            self.update(i, -1.0);
        }
        &self.summary
    }

    /// Brings row `i` back. A no-op if it is already in.
    pub fn include(&mut self, i: usize) -> &Result<LiveSummary> {
        if !self.included[i] {
            self.included[i] = true;
            self.n_included += 1;
            self.update(i, 1.0);
        }
        &self.summary
    }

    /// Moves row `i` to predictor value `x` and response `y` (a what-if: only this engine's
    /// copy changes). Only for designs with one predictor (a line or a polynomial).
    ///
    /// # Errors
    /// [`CoreError::InvalidOption`] for a design with several predictors or a non-finite value.
    pub fn move_point(&mut self, i: usize, x: f64, y: f64) -> Result<&Result<LiveSummary>> {
        let one = self.design.polynomial_source().is_some()
            || self
                .design
                .terms()
                .iter()
                .filter(|t| t.kind != TermKind::Intercept)
                .count()
                == 1;
        if !one {
            return Err(CoreError::InvalidOption(
                "a point can be moved in x only in a one-predictor model".into(),
            ));
        }
        let row = self.polynomial_row(x);
        self.set_row(i, &row, y)
    }

    /// Moves row `i`'s response to `y` (a what-if), keeping its predictors: works for any
    /// design.
    ///
    /// # Errors
    /// [`CoreError::InvalidOption`] for a non-finite value.
    pub fn move_response(&mut self, i: usize, y: f64) -> Result<&Result<LiveSummary>> {
        let row = match self.design.polynomial_source() {
            Some(_) => self.polynomial_row(self.value(i, 0)),
            None => self.values_of(i),
        };
        self.set_row(i, &row, y)
    }

    /// Value `k` of row `i` as it stands: `x` (k = 0) for a polynomial, term k's value
    /// otherwise.
    fn value(&self, i: usize, k: usize) -> f64 {
        if let Some(m) = self.moved.get(&i) {
            return m.values[k];
        }
        match self.design.polynomial_source() {
            Some(x) => x[i],
            None => self.design.columns()[k][i],
        }
    }

    /// Row `i`'s values as they stand: `[x]` for a polynomial, the design row otherwise.
    fn values_of(&self, i: usize) -> Vec<f64> {
        match self.moved.get(&i) {
            Some(m) => m.values.clone(),
            None => design_values(&self.design, i),
        }
    }

    /// The design row of a one-predictor model at `x`: each term's power of `x`.
    fn polynomial_row(&self, x: f64) -> Vec<f64> {
        self.design
            .terms()
            .iter()
            .map(|t| x.powi(t.kind.power() as i32))
            .collect()
    }

    /// Gives row `i` the design row `row` (one value per term, as the design would hold it)
    /// and the response `y`: a what-if of any model, e.g. a grouped or transformed one whose
    /// row the caller built.
    ///
    /// # Errors
    /// [`CoreError::InvalidOption`] for a non-finite value or a row of the wrong length.
    pub fn set_row(&mut self, i: usize, row: &[f64], y: f64) -> Result<&Result<LiveSummary>> {
        let p = self.design.n_terms();
        if row.len() != p || !y.is_finite() || row.iter().any(|v| !v.is_finite()) {
            return Err(CoreError::InvalidOption(
                "a point can be moved only to finite values, one per term".into(),
            ));
        }
        let was_in = self.included[i];
        if was_in {
            self.included[i] = false;
            self.n_included -= 1;
            self.update(i, -1.0);
        }
        let values = match self.design.polynomial_source() {
            // The polynomial's working row is built from x, its linear term's value.
            Some(_) => vec![row[usize::from(self.design.has_intercept())]],
            None => row.to_vec(),
        };
        self.moved.insert(i, Moved { values, y });
        if was_in {
            self.included[i] = true;
            self.n_included += 1;
            self.update(i, 1.0);
        }
        Ok(&self.summary)
    }

    /// Gives row `i` the weight `w` (a weighting that depends on the data changes when rows
    /// are left out or moved): the row is taken out, re-weighted and put back, O(p²).
    ///
    /// # Errors
    /// [`CoreError::BadWeight`] for a weight that is not positive and finite;
    /// [`CoreError::InvalidOption`] for an engine started without weights.
    pub fn set_weight(&mut self, i: usize, w: f64) -> Result<&Result<LiveSummary>> {
        if !(w.is_finite() && w > 0.0) {
            return Err(CoreError::BadWeight { index: i, value: w });
        }
        if self.root_w.is_none() {
            return Err(CoreError::InvalidOption(
                "weights can be changed only in a weighted fit".into(),
            ));
        }
        let r = w.sqrt();
        if self.root_weight(i) == r {
            return Ok(&self.summary);
        }
        let was_in = self.included[i];
        if was_in {
            self.included[i] = false;
            self.n_included -= 1;
            self.update(i, -1.0);
        }
        if let Some(root_w) = &mut self.root_w {
            root_w[i] = r;
        }
        if was_in {
            self.included[i] = true;
            self.n_included += 1;
            self.update(i, 1.0);
        }
        Ok(&self.summary)
    }

    /// Recomputes everything from the included rows with the QR solver.
    pub fn refit(&mut self) -> &Result<LiveSummary> {
        self.summary = self.full_fit();
        self.rebuild();
        &self.summary
    }

    fn update(&mut self, i: usize, sign: f64) {
        self.changes += 1;
        let few = self.n_included < FEW_ROWS_PER_TERM * self.design.n_terms();
        if self.always_refit || !self.inverse_valid || few {
            self.refit();
            return;
        }
        if self.changes.is_multiple_of(REFRESH_EVERY) {
            // Drift guard: the sums again from the rows (O(np²), a few ms at a million rows),
            // not a full refit; the refit guards below still apply.
            self.rebuild();
            if !self.inverse_valid {
                self.refit();
                return;
            }
            self.summary = self.summary_from_sums();
            self.refit_if_tight();
            return;
        }
        let z = DVector::from_vec(self.working_row(i));
        let u = &self.a_inv * &z;
        let denom = 1.0 + sign * z.dot(&u);
        if denom.abs() < PIVOT_FLOOR || !denom.is_finite() {
            self.refit();
            return;
        }
        self.a_inv -= &u * u.transpose() * (sign / denom);
        self.a += &z * z.transpose() * sign;
        let r = self.root_weight(i);
        let yi = r * (self.response(i) - self.y_shift);
        self.b += &z * (sign * yi);
        self.sum_y += sign * r * yi;
        self.sum_yy += sign * yi * yi;
        self.sum_w += sign * r * r;
        self.summary = self.summary_from_sums();
        if self.n_included <= self.design.n_terms() {
            // No longer a well-posed fit: the updated inverse is not to be trusted.
            self.inverse_valid = false;
        }
        self.refit_if_tight();
    }

    fn refit_if_tight(&mut self) {
        if self
            .summary
            .as_ref()
            .is_ok_and(|s| 1.0 - s.r_squared < TIGHT_FIT)
        {
            self.refit();
        }
    }

    fn rebuild(&mut self) {
        let p = self.design.n_terms();
        // Fixed-size accumulators for the usual small models (kept in registers), a flat
        // array otherwise; no allocation per row either way.
        // Chunks of rows on rayon's threads, added in row order (the same answer whatever
        // the number of threads).
        let shift = self.y_shift;
        let rw = self.root_w.as_deref();
        let n = self.y.len();
        let parts: Vec<GramSums> = (0..n)
            .into_par_iter()
            .step_by(REBUILD_CHUNK)
            .map(|start| {
                let range = start..(start + REBUILD_CHUNK).min(n);
                let (z, y) = self.chunk_rows(range.clone(), rw);
                let rows = Rows {
                    z: &z,
                    y: &y,
                    root_w: rw.map(|r| &r[range.clone()]),
                    included: &self.included[range],
                    shift,
                };
                match p {
                    1 => gram_sums::<1>(&rows),
                    2 => gram_sums::<2>(&rows),
                    3 => gram_sums::<3>(&rows),
                    4 => gram_sums::<4>(&rows),
                    5 => gram_sums::<5>(&rows),
                    6 => gram_sums::<6>(&rows),
                    7 => gram_sums::<7>(&rows),
                    8 => gram_sums::<8>(&rows),
                    9 => gram_sums::<9>(&rows),
                    10 => gram_sums::<10>(&rows),
                    11 => gram_sums::<11>(&rows),
                    12 => gram_sums::<12>(&rows),
                    _ => gram_sums_any(p, &rows),
                }
            })
            .collect();
        let mut sums = GramSums {
            lower: vec![0.0; p * p],
            b: vec![0.0; p],
            sum_y: 0.0,
            sum_yy: 0.0,
            sum_w: 0.0,
        };
        for part in parts {
            sums.add(&part);
        }
        let GramSums {
            lower,
            b,
            sum_y,
            sum_yy,
            sum_w,
        } = sums;
        self.sum_y = sum_y;
        self.sum_yy = sum_yy;
        self.sum_w = sum_w;
        let a = DMatrix::from_fn(p, p, |j, k| lower[j.max(k) * p + j.min(k)]);
        self.b = DVector::from_vec(b);
        // A singular Gram matrix (too few rows) leaves the inverse at zero and marked invalid;
        // the summary then carries the error from the full fit, and the next change rebuilds.
        let inverse = a.clone().try_inverse();
        self.inverse_valid = inverse.is_some() && self.n_included > p;
        self.a_inv = inverse.unwrap_or_else(|| DMatrix::zeros(p, p));
        self.a = a;
    }

    /// The working rows times `√wᵢ` of the rows in `range` (`p` values each, one row after
    /// another) and their responses, what-ifs in place; `rw` holds every row's `√wᵢ` (`None`: all 1).
    fn chunk_rows(&self, range: Range<usize>, rw: Option<&[f64]>) -> (Vec<f64>, Cow<'_, [f64]>) {
        let p = self.design.n_terms();
        let recipe = &self.basis_recipe;
        let r = |i: usize| rw.map_or(1.0, |w| w[i]);
        let mut z = Vec::with_capacity(range.len() * p);
        match self.design.polynomial_source() {
            Some(x) => {
                for i in range.clone() {
                    z.extend((0..p).map(|k| recipe.z_value(k, x[i]) * r(i)));
                }
            }
            None => {
                let columns = self.design.columns();
                for i in range.clone() {
                    z.extend((0..p).map(|k| recipe.z_value(k, columns[k][i]) * r(i)));
                }
            }
        }
        let mut y = Cow::Borrowed(&self.y[range.clone()]);
        for (&i, m) in &self.moved {
            if range.contains(&i) {
                let at = i - range.start;
                z[at * p..(at + 1) * p].copy_from_slice(&self.working_row(i));
                y.to_mut()[at] = m.y;
            }
        }
        (z, y)
    }

    fn full_fit(&self) -> Result<LiveSummary> {
        let rows: Vec<usize> = (0..self.y.len()).filter(|&i| self.included[i]).collect();
        let y: Vec<f64> = rows.iter().map(|&i| self.response(i)).collect();
        let design = match self.design.polynomial_source() {
            Some(_) => {
                let x: Vec<f64> = rows.iter().map(|&i| self.value(i, 0)).collect();
                let degree = self
                    .design
                    .terms()
                    .iter()
                    .map(|t| t.kind.power())
                    .max()
                    .unwrap_or(1);
                let name = self
                    .design
                    .terms()
                    .iter()
                    .find(|t| t.kind == TermKind::Linear)
                    .map_or("x", |t| t.name.as_str());
                Design::polynomial(name, &x, degree, self.design.has_intercept())?
            }
            None => {
                let mut d = Design::new(rows.len(), false);
                for (k, term) in self.design.terms().iter().enumerate() {
                    d.push(
                        term.clone(),
                        rows.iter()
                            .map(|&i| self.value(i, k))
                            .collect::<Arc<[f64]>>(),
                    );
                }
                d
            }
        };
        let w: Option<Vec<f64>> = self
            .root_w
            .as_ref()
            .map(|r| rows.iter().map(|&i| r[i] * r[i]).collect());
        fit(&design, &y, w.as_deref(), &self.options).map(|f| from_fit(&f, true))
    }

    fn summary_from_sums(&self) -> Result<LiveSummary> {
        let p = self.design.n_terms();
        let n = self.n_included;
        if n <= p {
            return Err(CoreError::TooFewRows { n, p });
        }
        // One step of refinement against the additively kept A removes the drift of A⁻¹ from α.
        let mut alpha = &self.a_inv * &self.b;
        alpha += &self.a_inv * (&self.b - &self.a * &alpha);
        let t = &self.basis_recipe.to_terms;
        let mut beta: Vec<f64> = (t * &alpha).iter().copied().collect();
        let intercept = self.design.has_intercept();
        if intercept {
            beta[0] += self.y_shift;
        }
        let rss = (self.sum_yy - alpha.dot(&self.b)).max(0.0);
        let tss = if intercept {
            self.sum_y.mul_add(-self.sum_y / self.sum_w, self.sum_yy)
        } else {
            self.sum_yy
        };
        let quality = FitQuality::from_sums(n, p, intercept, rss, tss);
        let s2 = quality.residual_std_error.powi(2);
        let cov = t * &self.a_inv * t.transpose();
        let std_errors: Vec<f64> = (0..p).map(|j| (s2 * cov[(j, j)]).sqrt()).collect();
        let inference = TInference::new(self.options.level, (n - p) as f64);
        Ok(LiveSummary {
            n,
            p_values: beta
                .iter()
                .zip(&std_errors)
                .map(|(b, s)| inference.p_value(b / s))
                .collect(),
            ci: beta
                .iter()
                .zip(&std_errors)
                .map(|(&b, &s)| inference.interval(b, s))
                .collect(),
            estimates: beta,
            std_errors,
            r_squared: quality.r_squared,
            adj_r_squared: quality.adj_r_squared,
            residual_std_error: quality.residual_std_error,
            f_test: quality.f_test(),
            refitted: false,
        })
    }
}

/// `Σz̃z̃ᵀ` (lower triangle, row-major `p × p`), `Σz̃·ỹ`, `Σ√w·ỹ`, `Σỹ²` and `Σw` over the
/// included rows, with `z̃ = √w·z` and `ỹ = √w·(y − shift)`.
struct GramSums {
    lower: Vec<f64>,
    b: Vec<f64>,
    sum_y: f64,
    sum_yy: f64,
    sum_w: f64,
}

impl GramSums {
    fn add(&mut self, other: &GramSums) {
        for (a, b) in self.lower.iter_mut().zip(&other.lower) {
            *a += b;
        }
        for (a, b) in self.b.iter_mut().zip(&other.b) {
            *a += b;
        }
        self.sum_y += other.sum_y;
        self.sum_yy += other.sum_yy;
        self.sum_w += other.sum_w;
    }
}

/// Rows per parallel task when the sums are rebuilt.
const REBUILD_CHUNK: usize = 1 << 16;

/// One chunk of rows for a rebuild of the sums.
struct Rows<'a> {
    /// Weighted working rows, `p` values each.
    z: &'a [f64],
    y: &'a [f64],
    /// `√wᵢ` (`None`: all 1).
    root_w: Option<&'a [f64]>,
    included: &'a [bool],
    shift: f64,
}

impl Rows<'_> {
    /// The included rows: `(z̃, ỹ, √w)`.
    fn each(&self, p: usize) -> impl Iterator<Item = (&[f64], f64, f64)> + '_ {
        self.z
            .chunks_exact(p)
            .zip(self.y)
            .zip(self.included)
            .enumerate()
            .filter(|(_, (_, &inc))| inc)
            .map(|(k, ((row, &yv), _))| {
                let r = self.root_w.map_or(1.0, |w| w[k]);
                (row, r * (yv - self.shift), r)
            })
    }
}

fn gram_sums<const P: usize>(rows: &Rows<'_>) -> GramSums {
    let mut a = [[0.0; P]; P];
    let mut b = [0.0; P];
    let (mut sum_y, mut sum_yy, mut sum_w) = (0.0, 0.0, 0.0);
    for (row, yi, r) in rows.each(P) {
        // A fixed-length row: the loops unroll without bounds checks.
        let Ok(row) = <&[f64; P]>::try_from(row) else {
            continue;
        };
        for j in 0..P {
            b[j] += row[j] * yi;
            for k in 0..=j {
                a[j][k] += row[j] * row[k];
            }
        }
        sum_y += r * yi;
        sum_yy += yi * yi;
        sum_w += r * r;
    }
    GramSums {
        lower: a.iter().flatten().copied().collect(),
        b: b.to_vec(),
        sum_y,
        sum_yy,
        sum_w,
    }
}

fn gram_sums_any(p: usize, rows: &Rows<'_>) -> GramSums {
    let mut lower = vec![0.0; p * p];
    let mut b = vec![0.0; p];
    let (mut sum_y, mut sum_yy, mut sum_w) = (0.0, 0.0, 0.0);
    for (row, yi, r) in rows.each(p) {
        for j in 0..p {
            b[j] += row[j] * yi;
            for k in 0..=j {
                lower[j * p + k] += row[j] * row[k];
            }
        }
        sum_y += r * yi;
        sum_yy += yi * yi;
        sum_w += r * r;
    }
    GramSums {
        lower,
        b,
        sum_y,
        sum_yy,
        sum_w,
    }
}

fn from_fit(f: &LinearFit, refitted: bool) -> LiveSummary {
    LiveSummary {
        n: f.n,
        estimates: f.coefficients.iter().map(|c| c.estimate).collect(),
        std_errors: f.coefficients.iter().map(|c| c.std_error).collect(),
        p_values: f.coefficients.iter().map(|c| c.p_value).collect(),
        ci: f
            .coefficients
            .iter()
            .map(|c| (c.ci_low, c.ci_high))
            .collect(),
        r_squared: f.r_squared,
        adj_r_squared: f.adj_r_squared,
        residual_std_error: f.residual_std_error,
        f_test: f.anova.f_statistic.zip(f.anova.f_p_value),
        refitted,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// `|a − b| ≤ tol`, false when either is NaN.
    fn within(a: f64, b: f64, tol: f64) -> bool {
        (a - b).abs() <= tol
    }

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= 1e-9 * a.abs().max(b.abs()) || (a - b).abs() < 1e-300
    }

    /// The engine's numbers must match a fresh fit of the rows it holds to 1e-9 relative. An
    /// estimate (or interval end) is compared relative to the larger of itself and its standard
    /// error: an estimate that is zero within its error has no relative digits to compare.
    /// Likewise R² and adjusted R², proportions of the variance, are compared relative to the
    /// larger of themselves and 1 (an R² of 1e-8 is zero to every digit that matters).
    fn agrees_with_fresh_fit(live: &LiveFit) -> std::result::Result<(), String> {
        let fresh = live.full_fit();
        match (live.summary(), &fresh) {
            (Ok(a), Ok(b)) => {
                for j in 0..a.estimates.len() {
                    let scale = a.estimates[j].abs().max(b.std_errors[j]);
                    let ends = [
                        (a.estimates[j], b.estimates[j]),
                        (a.ci[j].0, b.ci[j].0),
                        (a.ci[j].1, b.ci[j].1),
                    ];
                    // `within` is false for a NaN on either side: a disagreement, not a pass.
                    if let Some((x, y)) = ends.iter().find(|(x, y)| !within(*x, *y, 1e-9 * scale)) {
                        return Err(format!(
                            "term {j}: live {x} vs fresh {y}\nlive {a:?}\nfresh {b:?}"
                        ));
                    }
                }
                for (x, y) in [
                    (a.r_squared, b.r_squared),
                    (a.adj_r_squared, b.adj_r_squared),
                ] {
                    if !within(x, y, 1e-9 * x.abs().max(1.0)) {
                        return Err(format!(
                            "R²: live {x} vs fresh {y}\nlive {a:?}\nfresh {b:?}"
                        ));
                    }
                }
                let pairs = a
                    .std_errors
                    .iter()
                    .zip(&b.std_errors)
                    .chain(a.p_values.iter().zip(&b.p_values))
                    .chain([(&a.residual_std_error, &b.residual_std_error)]);
                for (x, y) in pairs {
                    if !close(*x, *y) {
                        return Err(format!("live {x} vs fresh {y}\nlive {a:?}\nfresh {b:?}"));
                    }
                }
                Ok(())
            }
            (Err(_), Err(_)) => Ok(()),
            (a, b) => Err(format!("live {a:?} vs fresh {b:?}")),
        }
    }

    #[test]
    fn a_nan_in_the_live_numbers_is_a_disagreement() {
        // The comparison itself must catch a NaN (a `>` test lets it through).
        let x: Vec<f64> = (0..12).map(f64::from).collect();
        let y: Vec<f64> = x.iter().map(|v| 1.0 + 0.5 * v + (v * 0.7).sin()).collect();
        let mut live = LiveFit::new(Design::linear(&[("x", &x)], true), y, FitOptions::default())
            .expect("fits");
        agrees_with_fresh_fit(&live).expect("agrees");
        if let Ok(s) = &mut live.summary {
            s.estimates[1] = f64::NAN;
        }
        assert!(
            agrees_with_fresh_fit(&live).is_err(),
            "a NaN estimate must not agree"
        );
        if let Ok(s) = &mut live.summary {
            s.estimates[1] = 0.5;
            s.r_squared = f64::NAN;
        }
        assert!(
            agrees_with_fresh_fit(&live).is_err(),
            "a NaN R² must not agree"
        );
    }

    #[test]
    fn reweighting_rows_matches_a_fresh_weighted_fit() {
        let x: Vec<f64> = (1..=20).map(f64::from).collect();
        let y: Vec<f64> = x
            .iter()
            .map(|v| 0.4 + 1.3 * v + 0.05 * v * (v * 1.7).sin())
            .collect();
        let w: Vec<f64> = x.iter().map(|v| 1.0 / (v * v)).collect();
        let design = Design::linear(&[("x", &x)], true);
        let mut live = LiveFit::weighted(design, y, Some(w), FitOptions::default()).expect("fits");
        live.exclude(4);
        for (i, w) in [(3, 0.5), (4, 2.0), (19, 1.0), (0, 1e-3), (3, 0.25)] {
            live.set_weight(i, w).expect("a positive weight");
            agrees_with_fresh_fit(&live).expect("agrees");
        }
        assert!(live.set_weight(2, 0.0).is_err());
        let mut plain = LiveFit::new(
            Design::linear(&[("x", &x)], true),
            x.clone(),
            FitOptions::default(),
        )
        .expect("fits");
        assert!(plain.set_weight(1, 2.0).is_err(), "no weights to change");
    }

    #[derive(Debug, Clone)]
    enum Change {
        Toggle(usize),
        Move(usize, f64, f64),
    }

    fn change(n: usize) -> impl Strategy<Value = Change> {
        prop_oneof![
            3 => (0..n).prop_map(Change::Toggle),
            1 => (0..n, -5.0..15.0f64, -20.0..40.0f64).prop_map(|(i, x, y)| Change::Move(i, x, y)),
        ]
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(64))]

        #[test]
        fn any_sequence_of_toggles_and_moves_matches_a_fresh_fit(
            degree in 1u32..=3,
            intercept in proptest::bool::ANY,
            noise in proptest::collection::vec(-1.0..1.0f64, 24),
            changes in proptest::collection::vec(change(24), 1..150),
        ) {
            let x: Vec<f64> = (0..24).map(|k| f64::from(k) * 0.4 + 0.3).collect();
            let y: Vec<f64> = x.iter().zip(&noise).map(|(v, e)| 2.0 + 1.5 * v - 0.1 * v * v + e).collect();
            let design = Design::polynomial("x", &x, degree, intercept).expect("degree");
            let mut live = LiveFit::new(design, y, FitOptions::default()).expect("initial fit");
            for c in changes {
                match c {
                    Change::Toggle(i) => {
                        if live.is_included(i) { live.exclude(i); } else { live.include(i); }
                    }
                    Change::Move(i, x, y) => { live.move_point(i, x, y).expect("one predictor"); }
                }
                prop_assert_eq!(agrees_with_fresh_fit(&live), Ok(()));
            }
        }

        #[test]
        fn two_predictor_toggles_match_a_fresh_fit(
            noise in proptest::collection::vec(-1.0..1.0f64, 30),
            toggles in proptest::collection::vec(0usize..30, 1..100),
        ) {
            let a: Vec<f64> = (0..30).map(|k| f64::from(k % 7) + 0.5 * f64::from(k)).collect();
            let b: Vec<f64> = (0..30).map(|k| (f64::from(k) * 0.7).sin() * 4.0).collect();
            let y: Vec<f64> = (0..30).map(|k| 1.0 + 0.8 * a[k] - 1.2 * b[k] + noise[k]).collect();
            let mut live = LiveFit::new(Design::linear(&[("a", &a), ("b", &b)], true), y, FitOptions::default()).expect("fits");
            for i in toggles {
                if live.is_included(i) { live.exclude(i); } else { live.include(i); }
                prop_assert_eq!(agrees_with_fresh_fit(&live), Ok(()));
            }
        }
    }

    /// Models of 6, 12 and 15 terms take the fixed-size and the general rebuild paths; forty
    /// toggles cross the drift guard's rebuild twice.
    #[test]
    fn wide_models_match_a_fresh_fit_through_the_rebuilds() {
        let n = 90;
        for k in [5usize, 11, 14] {
            // Pseudo-random columns (a multiplicative hash of row and column): independent
            // enough that no term is aliased.
            let cell = |i: usize, j: usize| {
                let h = (i as u64 + 1).wrapping_mul(6_364_136_223_846_793_005)
                    ^ (j as u64 + 1).wrapping_mul(1_442_695_040_888_963_407);
                (h.wrapping_mul(2_862_933_555_777_941_757) >> 40) as f64 / 1e5
            };
            let cols: Vec<Vec<f64>> = (0..k)
                .map(|j| (0..n).map(|i| cell(i, j)).collect())
                .collect();
            let names: Vec<String> = (0..k).map(|j| format!("c{j}")).collect();
            let named: Vec<(&str, &[f64])> = names
                .iter()
                .zip(&cols)
                .map(|(n, c)| (n.as_str(), c.as_slice()))
                .collect();
            let y: Vec<f64> = (0..n)
                .map(|i| {
                    let signal: f64 = cols
                        .iter()
                        .enumerate()
                        .map(|(j, c)| c[i] / (j + 1) as f64)
                        .sum();
                    signal + 20.0 * (((i * 7919) % 13) as f64 / 13.0 - 0.5)
                })
                .collect();
            let design = Design::linear(&named, true);
            assert_eq!(design.n_terms(), k + 1);
            let mut live = LiveFit::new(design, y, FitOptions::default()).expect("fits");
            for t in 0..40 {
                let i = (t * 37) % n;
                if live.is_included(i) {
                    live.exclude(i);
                } else {
                    live.include(i);
                }
                assert_eq!(
                    agrees_with_fresh_fit(&live),
                    Ok(()),
                    "{} terms, change {t}",
                    k + 1
                );
            }
        }
    }

    #[test]
    fn moving_a_response_in_a_two_predictor_model_matches_a_fresh_fit() {
        let a: Vec<f64> = (0..30).map(|i| f64::from(i) * 0.5).collect();
        let b: Vec<f64> = (0..30).map(|i| f64::from((i * 7) % 9)).collect();
        let y: Vec<f64> = a
            .iter()
            .zip(&b)
            .map(|(p, q)| 1.0 + 0.4 * p - 0.9 * q + (p * 3.1).sin())
            .collect();
        let design = Design::linear(&[("a", &a), ("b", &b)], true);
        let mut live = LiveFit::new(design, y, FitOptions::default()).expect("fits");
        live.move_response(4, 25.0).expect("finite");
        live.exclude(9);
        assert_eq!(agrees_with_fresh_fit(&live), Ok(()));
        assert!(live.move_response(4, f64::NAN).is_err());
    }

    #[test]
    fn weighted_changes_match_a_fresh_weighted_fit() {
        let a: Vec<f64> = (0..40).map(|i| f64::from(i) * 0.5).collect();
        let b: Vec<f64> = (0..40).map(|i| f64::from((i * 7) % 9)).collect();
        let w: Vec<f64> = (0..40).map(|i| 0.5 + f64::from(i % 5)).collect();
        let y: Vec<f64> = a
            .iter()
            .zip(&b)
            .map(|(p, q)| 1.0 + 0.4 * p - 0.9 * q + (p * 3.1).sin())
            .collect();
        let design = Design::linear(&[("a", &a), ("b", &b)], true);
        let mut live = LiveFit::weighted(design, y, Some(w), FitOptions::default()).expect("fits");
        assert_eq!(agrees_with_fresh_fit(&live), Ok(()));
        for i in [3, 17, 22, 5] {
            live.exclude(i);
            assert_eq!(agrees_with_fresh_fit(&live), Ok(()));
        }
        live.include(17);
        live.move_response(8, 30.0).expect("finite");
        live.set_row(9, &[1.0, 2.5, 4.0], -3.0).expect("a row");
        assert_eq!(agrees_with_fresh_fit(&live), Ok(()));
        assert!(
            !live.summary().as_ref().expect("defined").refitted,
            "the update path"
        );
        assert!(
            live.set_row(9, &[1.0, 2.5], 0.0).is_err(),
            "one value per term"
        );
    }

    #[test]
    fn moved_points_outlast_the_rebuilds_and_leave_the_shared_rows_alone() {
        // The engine keeps no copy of the rows: a what-if lives beside the shared design and
        // response, and must still count after the sums are rebuilt from the rows.
        let x: Vec<f64> = (0..60).map(|i| f64::from(i) * 0.25).collect();
        let y: Vec<f64> = x.iter().map(|v| 1.0 + 2.0 * v + (v * 2.3).sin()).collect();
        let design = Arc::new(Design::linear(&[("x", &x)], true));
        let shared: Arc<[f64]> = y.clone().into();
        let mut live = LiveFit::new(
            Arc::clone(&design),
            Arc::clone(&shared),
            FitOptions::default(),
        )
        .expect("fits");
        live.move_point(7, 40.0, -9.0).expect("one predictor");
        live.move_response(11, 25.0).expect("finite");
        let dropped: Vec<usize> = (20..20 + 2 * REFRESH_EVERY).collect();
        for &i in &dropped {
            live.exclude(i);
        }
        // The same data written out by hand, fitted afresh.
        let keep: Vec<usize> = (0..60).filter(|i| !dropped.contains(i)).collect();
        let (mut xs, mut ys): (Vec<f64>, Vec<f64>) = keep.iter().map(|&i| (x[i], y[i])).unzip();
        let at = |row: usize| keep.iter().position(|&i| i == row).expect("kept");
        (xs[at(7)], ys[at(7)]) = (40.0, -9.0);
        ys[at(11)] = 25.0;
        let fresh = fit(
            &Design::linear(&[("x", &xs)], true),
            &ys,
            None,
            &FitOptions::default(),
        )
        .expect("fits");
        let s = live.summary().as_ref().expect("defined");
        assert!(!s.refitted, "the rebuilt sums, not a refit");
        for (a, c) in s.estimates.iter().zip(&fresh.coefficients) {
            assert!(close(*a, c.estimate), "{a} vs {}", c.estimate);
        }
        assert!(close(s.r_squared, fresh.r_squared));
        assert_eq!(
            (shared[7], shared[11]),
            (y[7], y[11]),
            "the response is shared, not written"
        );
        assert_eq!(design.columns()[1][7], x[7], "so is the design");
    }

    #[test]
    fn excluding_then_including_restores_the_numbers() {
        let x: Vec<f64> = (0..12).map(f64::from).collect();
        let y: Vec<f64> = x.iter().map(|v| 3.0 + 0.5 * v + (v * 1.3).sin()).collect();
        let mut live = LiveFit::new(Design::linear(&[("x", &x)], true), y, FitOptions::default())
            .expect("fits");
        let before = live.summary().clone().expect("defined");
        live.exclude(4);
        assert!(
            !live.summary().as_ref().expect("defined").refitted,
            "an update, not a refit"
        );
        live.include(4);
        let after = live.summary().clone().expect("defined");
        assert!(
            close(before.r_squared, after.r_squared)
                && close(before.estimates[1], after.estimates[1])
        );
    }

    #[test]
    fn cubic_and_origin_models_take_the_update_path() {
        // The property tests above would pass trivially if every change were a refit.
        let x: Vec<f64> = (0..24).map(|k| f64::from(k) * 0.4 + 0.3).collect();
        let y: Vec<f64> = x
            .iter()
            .map(|v| 2.0 + 1.5 * v - 0.1 * v * v + (v * 3.1).sin())
            .collect();
        for intercept in [true, false] {
            let design = Design::polynomial("x", &x, 3, intercept).expect("degree");
            let mut live = LiveFit::new(design, y.clone(), FitOptions::default()).expect("fits");
            assert!(
                !live.always_refit,
                "condition too poor for updates (intercept {intercept})"
            );
            live.exclude(3);
            assert!(!live.summary().as_ref().expect("defined").refitted);
        }
    }

    #[test]
    fn too_few_rows_is_reported_not_panicked() {
        let x = [1.0, 2.0, 3.0, 4.0];
        let y = vec![1.0, 2.5, 2.9, 4.2];
        let mut live = LiveFit::new(Design::linear(&[("x", &x)], true), y, FitOptions::default())
            .expect("fits");
        live.exclude(0);
        live.exclude(1);
        assert!(matches!(live.summary(), Err(CoreError::TooFewRows { .. })));
        live.include(1);
        assert!(live.summary().is_ok());
    }
}

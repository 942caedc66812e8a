//! Means and centred co-moments of several variables in one pass, mergeable across blocks,
//! threads and file chunks.
//!
//! For variables `x₁ … x_k` over `n` rows the accumulator holds `n`, the means `x̄ⱼ` and the
//! centred co-moments `Cᵢⱼ = Σ (xᵢ − x̄ᵢ)(xⱼ − x̄ⱼ)` (so `Cⱼⱼ/(n−1)` is the variance and
//! `Cᵢⱼ/√(CᵢᵢCⱼⱼ)` is Pearson's r). Rows are taken in blocks of [`BLOCK`]: inside a block the
//! deviations are formed from the block's own mean (two passes over data in cache), and blocks
//! are combined with the pairwise update of Chan, Golub & LeVeque, "Algorithms for computing
//! the sample variance" (1979), in its multivariate form (Pébay, Sandia report SAND2008-6212):
//!
//! `n = n_a + n_b`, `δ = x̄_b − x̄_a`, `x̄ = x̄_a + δ·n_b/n`, `C = C_a + C_b + δδᵀ·n_a·n_b/n`.
//!
//! Nothing is ever summed as raw `Σx²`, so a common offset (1e9 + small variation) costs no
//! digits. Chunks of [`CHUNK`] rows run on rayon's threads and are merged in row order, so the
//! result does not depend on the number of threads.

use std::ops::Range;

use nalgebra::{DMatrix, DMatrixView};
use rayon::prelude::*;

/// Rows per block: small enough that a block of 64 columns stays in the L2 cache.
pub const BLOCK: usize = 1024;
/// Rows per parallel task (a whole number of blocks).
pub const CHUNK: usize = 64 * BLOCK;
/// From this many variables on, a block's co-moments are one matrix product (nalgebra's gemm).
const GEMM_FROM: usize = 6;

/// Count, means, centred co-moments, minima and maxima of `k` variables.
#[derive(Debug, Clone, PartialEq)]
pub struct CoMoments {
    n: u64,
    /// A value of each variable seen early (the first of the first block): means are kept
    /// relative to it, so that merging never rounds a mean near a large common offset.
    origin: Vec<f64>,
    /// `x̄ⱼ − originⱼ`.
    mean: Vec<f64>,
    /// `k × k`, row-major, symmetric.
    c: Vec<f64>,
    min: Vec<f64>,
    max: Vec<f64>,
}

impl CoMoments {
    /// Nothing seen yet, over `k` variables.
    pub fn new(k: usize) -> Self {
        Self {
            n: 0,
            origin: vec![0.0; k],
            mean: vec![0.0; k],
            c: vec![0.0; k * k],
            min: vec![f64::INFINITY; k],
            max: vec![f64::NEG_INFINITY; k],
        }
    }

    /// The moments of the rows of `columns` (all of one length), in parallel.
    ///
    /// # Panics
    /// If the columns differ in length (a caller bug).
    pub fn of(columns: &[&[f64]]) -> Self {
        let mut m = Self::new(columns.len());
        m.add(columns);
        m
    }

    /// Takes in the rows of `columns` (all of one length). Values must be finite; the caller
    /// selects complete rows first.
    ///
    /// # Panics
    /// If the number of columns is not `k` or the columns differ in length (a caller bug).
    pub fn add(&mut self, columns: &[&[f64]]) {
        assert_eq!(
            columns.len(),
            self.k(),
            "CoMoments::add: wrong number of columns"
        );
        let n = columns.first().map_or(0, |c| c.len());
        assert!(
            columns.iter().all(|c| c.len() == n),
            "CoMoments::add: columns differ in length"
        );
        self.add_with(n, |j, range, out| out.copy_from_slice(&columns[j][range]));
    }

    /// The moments of columns whose cells may be missing (NaN), when every cell is finite
    /// (and no co-moment overflows); `None` otherwise, so that the caller can fall back to
    /// pairwise-complete rows. One pass: a gap shows up as a non-finite sum.
    ///
    /// # Panics
    /// If the columns differ in length (a caller bug).
    pub fn of_complete(columns: &[&[f64]]) -> Option<Self> {
        let m = Self::of(columns);
        m.is_finite().then_some(m)
    }

    /// Whether every mean and co-moment is finite (false after a NaN or infinite value, or
    /// an overflow).
    pub fn is_finite(&self) -> bool {
        self.mean.iter().chain(&self.c).all(|v| v.is_finite())
    }

    /// Takes in `n` rows whose values `fill(j, rows, out)` writes for column `j`.
    fn add_with(&mut self, n: usize, fill: impl Fn(usize, Range<usize>, &mut [f64]) + Sync) {
        let k = self.k();
        let starts: Vec<usize> = (0..n).step_by(CHUNK).collect();
        let parts: Vec<CoMoments> = starts
            .par_iter()
            .map(|&s| {
                let e = (s + CHUNK).min(n);
                let mut part = Self::new(k);
                let mut scratch = Vec::new();
                for b in (s..e).step_by(BLOCK) {
                    let block = block_moments(k, b..(b + BLOCK).min(e), &fill, &mut scratch);
                    part.merge(&block);
                }
                part
            })
            .collect();
        for part in &parts {
            self.merge(part);
        }
    }

    /// Combines `other` (disjoint rows) into `self` by the pairwise update above.
    ///
    /// # Panics
    /// If the two hold different numbers of variables.
    pub fn merge(&mut self, other: &CoMoments) {
        let k = self.k();
        assert_eq!(other.k(), k, "CoMoments::merge: different variables");
        if other.n == 0 {
            return;
        }
        if self.n == 0 {
            *self = other.clone();
            return;
        }
        let (na, nb) = (self.n as f64, other.n as f64);
        let n = na + nb;
        let delta: Vec<f64> = (0..k)
            .map(|j| (other.mean[j] + (other.origin[j] - self.origin[j])) - self.mean[j])
            .collect();
        let w = na * nb / n;
        for i in 0..k {
            for j in 0..k {
                self.c[i * k + j] += other.c[i * k + j] + delta[i] * delta[j] * w;
            }
            self.mean[i] += delta[i] * (nb / n);
            self.min[i] = self.min[i].min(other.min[i]);
            self.max[i] = self.max[i].max(other.max[i]);
        }
        self.n += other.n;
    }

    /// Number of variables.
    pub fn k(&self) -> usize {
        self.mean.len()
    }

    /// Rows taken in.
    pub fn n(&self) -> u64 {
        self.n
    }

    /// `x̄ⱼ`.
    pub fn mean(&self, j: usize) -> f64 {
        self.origin[j] + self.mean[j]
    }

    /// `Cᵢⱼ = Σ (xᵢ − x̄ᵢ)(xⱼ − x̄ⱼ)`.
    pub fn comoment(&self, i: usize, j: usize) -> f64 {
        self.c[i * self.k() + j]
    }

    /// Smallest value of variable `j` (`+∞` before any row).
    pub fn min(&self, j: usize) -> f64 {
        self.min[j]
    }

    /// Largest value of variable `j` (`−∞` before any row).
    pub fn max(&self, j: usize) -> f64 {
        self.max[j]
    }

    /// Pearson's `rᵢⱼ = Cᵢⱼ / (√Cᵢᵢ·√Cⱼⱼ)`, clamped to [−1, 1]; `None` when either variable
    /// does not vary.
    pub fn correlation(&self, i: usize, j: usize) -> Option<f64> {
        let (a, b) = (self.comoment(i, i), self.comoment(j, j));
        (a > 0.0 && b > 0.0).then(|| (self.comoment(i, j) / (a.sqrt() * b.sqrt())).clamp(-1.0, 1.0))
    }
}

/// The moments of rows `range` (values written by `fill`), from the block's own means.
fn block_moments(
    k: usize,
    range: Range<usize>,
    fill: &impl Fn(usize, Range<usize>, &mut [f64]),
    scratch: &mut Vec<f64>,
) -> CoMoments {
    let b = range.len();
    let mut m = CoMoments::new(k);
    if b == 0 {
        return m;
    }
    m.n = b as u64;
    scratch.clear();
    scratch.resize(b * k, 0.0);
    for j in 0..k {
        let d = &mut scratch[j * b..(j + 1) * b];
        fill(j, range.clone(), d);
        // Summed about the block's first value, so that a large common offset does not
        // round the mean (the shifted terms are small and the shift is exact).
        let shift = d[0];
        let (sum, lo, hi) = shifted_sum_min_max(d, shift);
        let mean = sum / b as f64;
        m.origin[j] = shift;
        m.mean[j] = mean;
        m.min[j] = lo;
        m.max[j] = hi;
        for v in d.iter_mut() {
            *v = (*v - shift) - mean;
        }
    }
    let c = gram(scratch, b, k);
    for i in 0..k {
        for j in 0..k {
            m.c[i * k + j] = c[(i, j)];
        }
    }
    m
}

/// `DᵀD` for the `rows × cols` matrix `D` stored column by column in `d`: one matrix product
/// (nalgebra's gemm, blocked and vectorized by matrixmultiply) from [`GEMM_FROM`] columns on,
/// pairwise dot products below (where nalgebra does not use matrixmultiply).
///
/// # Panics
/// If `d.len() != rows · cols` (a caller bug).
pub(crate) fn gram(d: &[f64], rows: usize, cols: usize) -> DMatrix<f64> {
    assert_eq!(d.len(), rows * cols, "gram: wrong buffer length");
    let mut c = DMatrix::zeros(cols, cols);
    if cols >= GEMM_FROM {
        let dm = DMatrixView::from_slice(d, rows, cols);
        let dt = DMatrixView::from_slice_with_strides(d, cols, rows, rows, 1);
        c.gemm(1.0, &dt, &dm, 0.0);
    } else {
        for i in 0..cols {
            for j in i..cols {
                let v = lane_dot(&d[i * rows..(i + 1) * rows], &d[j * rows..(j + 1) * rows]);
                c[(i, j)] = v;
                c[(j, i)] = v;
            }
        }
    }
    c
}

/// `Σ (v − shift)`, `min v`, `max v` with eight independent partial sums (so the loop
/// vectorizes).
fn shifted_sum_min_max(values: &[f64], shift: f64) -> (f64, f64, f64) {
    let mut acc = [0.0; 8];
    let mut lo = [f64::INFINITY; 8];
    let mut hi = [f64::NEG_INFINITY; 8];
    let chunks = values.chunks_exact(8);
    let rest = chunks.remainder();
    for c in chunks {
        for l in 0..8 {
            acc[l] += c[l] - shift;
            // Plain comparisons (not f64::min) so that the lanes vectorize; a NaN is caught
            // by the sum instead.
            lo[l] = if c[l] < lo[l] { c[l] } else { lo[l] };
            hi[l] = if c[l] > hi[l] { c[l] } else { hi[l] };
        }
    }
    for &v in rest {
        acc[0] += v - shift;
        lo[0] = lo[0].min(v);
        hi[0] = hi[0].max(v);
    }
    let fold = |a: [f64; 8], f: fn(f64, f64) -> f64| a.into_iter().reduce(f).unwrap_or(f64::NAN);
    (acc.iter().sum(), fold(lo, f64::min), fold(hi, f64::max))
}

/// `Σ aᵢbᵢ` with eight independent partial sums.
fn lane_dot(a: &[f64], b: &[f64]) -> f64 {
    let mut acc = [0.0; 8];
    let ca = a.chunks_exact(8);
    let cb = b.chunks_exact(8);
    let tail: f64 = ca
        .remainder()
        .iter()
        .zip(cb.remainder())
        .map(|(x, y)| x * y)
        .sum();
    for (x, y) in ca.zip(cb) {
        for l in 0..8 {
            acc[l] += x[l] * y[l];
        }
    }
    acc.iter().sum::<f64>() + tail
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::accurate;
    use approx::assert_relative_eq;
    use rand::{Rng, SeedableRng};

    fn centred(a: &[f64], b: &[f64]) -> f64 {
        // Reference: compensated two-pass formula.
        let n = a.len() as f64;
        let (ma, mb) = (
            accurate::sum(a.iter().copied()) / n,
            accurate::sum(b.iter().copied()) / n,
        );
        let da: Vec<f64> = a.iter().map(|v| v - ma).collect();
        let db: Vec<f64> = b.iter().map(|v| v - mb).collect();
        accurate::dot(&da, &db)
    }

    fn columns(n: usize, k: usize, offset: f64) -> Vec<Vec<f64>> {
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(7);
        let base: Vec<f64> = (0..n).map(|_| rng.random::<f64>()).collect();
        (0..k)
            .map(|j| {
                base.iter()
                    .map(|b| offset + b * (j as f64 + 1.0) + rng.random::<f64>())
                    .collect()
            })
            .collect()
    }

    #[test]
    fn agrees_with_a_compensated_two_pass_reference_for_few_and_many_columns() {
        for k in [2, 3, 9] {
            let cols = columns(200_003, k, 0.0);
            let refs: Vec<&[f64]> = cols.iter().map(Vec::as_slice).collect();
            let m = CoMoments::of(&refs);
            assert_eq!(m.n(), 200_003);
            for i in 0..k {
                for j in 0..k {
                    assert_relative_eq!(
                        m.comoment(i, j),
                        centred(&cols[i], &cols[j]),
                        max_relative = 1e-13
                    );
                }
            }
        }
    }

    #[test]
    fn a_large_common_offset_costs_no_digits() {
        // Values 1e9 + u: raw sums of squares would cancel 18 digits; the centred update none.
        let cols = columns(100_000, 2, 1e9);
        let refs: Vec<&[f64]> = cols.iter().map(Vec::as_slice).collect();
        let m = CoMoments::of(&refs);
        assert_relative_eq!(
            m.comoment(0, 1),
            centred(&cols[0], &cols[1]),
            max_relative = 1e-12
        );
        assert_relative_eq!(
            m.comoment(0, 0),
            centred(&cols[0], &cols[0]),
            max_relative = 1e-12
        );
    }

    #[test]
    fn merging_two_halves_equals_the_whole() {
        let cols = columns(10_000, 3, 5.0);
        let refs: Vec<&[f64]> = cols.iter().map(Vec::as_slice).collect();
        let whole = CoMoments::of(&refs);
        let first: Vec<&[f64]> = cols.iter().map(|c| &c[..3_333]).collect();
        let second: Vec<&[f64]> = cols.iter().map(|c| &c[3_333..]).collect();
        let mut halves = CoMoments::of(&first);
        halves.merge(&CoMoments::of(&second));
        assert_eq!(halves.n(), whole.n());
        for i in 0..3 {
            assert_relative_eq!(halves.mean(i), whole.mean(i), max_relative = 1e-14);
            assert_eq!(halves.min(i), whole.min(i));
            assert_eq!(halves.max(i), whole.max(i));
            for j in 0..3 {
                assert_relative_eq!(
                    halves.comoment(i, j),
                    whole.comoment(i, j),
                    max_relative = 1e-12
                );
            }
        }
    }

    #[test]
    fn complete_columns_give_the_same_moments_and_a_gap_gives_none() {
        let cols = columns(5_000, 3, 1.0);
        let refs: Vec<&[f64]> = cols.iter().map(Vec::as_slice).collect();
        assert_eq!(CoMoments::of_complete(&refs), Some(CoMoments::of(&refs)));
        let mut gap = cols.clone();
        gap[1][4_321] = f64::NAN;
        let grefs: Vec<&[f64]> = gap.iter().map(Vec::as_slice).collect();
        assert_eq!(CoMoments::of_complete(&grefs), None);
    }

    #[test]
    fn correlation_is_undefined_for_a_constant_and_one_for_a_copy() {
        let x = [1.0, 2.0, 3.0, 4.0];
        let c = [2.0; 4];
        let m = CoMoments::of(&[&x, &x, &c]);
        assert_relative_eq!(
            m.correlation(0, 1).expect("defined"),
            1.0,
            max_relative = 1e-15
        );
        assert_eq!(m.correlation(0, 2), None);
    }
}

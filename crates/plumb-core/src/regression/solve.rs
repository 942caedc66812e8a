//! The least-squares solver: column-pivoted Householder QR of a well-scaled working basis,
//! with iterative refinement on accurately computed residuals.

use nalgebra::{DMatrix, DVector, Dyn};

use super::basis::Basis;
use super::design::Design;
use crate::{accurate, CoreError, Result};

/// Most refinement steps taken after the first solve.
const REFINEMENT_STEPS: usize = 3;

type PivotedQr = nalgebra::linalg::ColPivQR<f64, Dyn, Dyn>;

/// What the solver hands to the inference step.
#[derive(Debug, Clone)]
pub(crate) struct Solution {
    /// `β̂`, in term order and the user's units.
    pub beta: Vec<f64>,
    /// Residuals `eᵢ = yᵢ − xᵢᵀβ̂` (unweighted), computed with compensated dot products.
    pub residuals: Vec<f64>,
    /// `(XᵀWX)⁻¹`, in term order and the user's units.
    pub unscaled_covariance: DMatrix<f64>,
    /// `√[(XᵀWX)⁻¹]ⱼⱼ = ‖row j of M‖`, computed with scaling so that it does not underflow
    /// where its square would (predictors near the f64 limit).
    pub unit_std_errors: Vec<f64>,
    /// 2-norm condition number of the working basis (after equilibration).
    pub condition_number: f64,
}

/// The factorization of one weighted design, shared by the solver and the influence measures.
pub(crate) struct Factor {
    /// `√wᵢ` (ones without weights).
    pub root_w: Vec<f64>,
    /// The working basis `Z` and the map `T` back to the terms.
    pub basis: Basis,
    /// Pivoted QR of `W^{1/2}Z`.
    pub qr: PivotedQr,
    /// Its `R`.
    pub r: DMatrix<f64>,
    /// `order[k]`: working column at pivot position `k`.
    pub order: Vec<usize>,
    /// `R⁻¹`.
    pub r_inv: DMatrix<f64>,
    /// `M = T·P·R⁻¹`: `β = M·(Q₁ᵀ√W y)` and `(XᵀWX)⁻¹ = M·Mᵀ`.
    pub m: DMatrix<f64>,
}

/// Factors the weighted working basis and checks its rank.
pub(crate) fn factor(
    design: &Design,
    weights: Option<&[f64]>,
    rank_tolerance: f64,
) -> Result<Factor> {
    let n = design.n_rows();
    let p = design.n_terms();
    let root_w = root_weights(weights, n);
    let basis = Basis::new(design, weights.map(|_| root_w.as_slice()));
    let z = DMatrix::from_fn(n, p, |i, j| root_w[i] * basis.columns[j][i]);
    let qr = z.col_piv_qr();
    let r = qr.r();
    let order = pivot_order(&qr, p);
    check_rank(design, &r, &order, &basis, rank_tolerance)?;
    let r_inv = r
        .solve_upper_triangular(&DMatrix::identity(p, p))
        .expect("rank was checked, R has a non-zero diagonal");
    let m = DMatrix::from_fn(p, p, |j, l| {
        let t_row: Vec<f64> = order.iter().map(|&col| basis.to_terms[(j, col)]).collect();
        accurate::dot(&t_row, r_inv.column(l).as_slice())
    });
    Ok(Factor {
        root_w,
        basis,
        qr,
        r,
        order,
        r_inv,
        m,
    })
}

/// Solves `min Σ wᵢ (yᵢ − xᵢᵀβ)²`; see [`super::fit`] and [`super::basis`] for the method.
///
/// Two ways to the triangle `R` (with `RᵀR = ZᵀWZ`): when the working basis is well
/// conditioned (`κ(Z) ≤` [`GRAM_CONDITION_LIMIT`]) the Cholesky factor of the Gram matrix
/// (one blocked matrix product, O(np²) flops in cache-friendly blocks); otherwise, or when the
/// Gram matrix is not safely positive definite, the column-pivoted Householder QR with the
/// rank test. Either way the solution is then refined on compensated residuals (corrected
/// semi-normal equations), so both reach the same working accuracy; the Gram route starts
/// from `β = 0`, where the first correction is the semi-normal solution itself.
pub(crate) fn least_squares(
    design: &Design,
    y: &[f64],
    weights: Option<&[f64]>,
    rank_tolerance: f64,
) -> Result<Solution> {
    let (tri, qr_solution) = first_solve(design, y, weights, rank_tolerance)?;
    let refiner = Refiner::new(&tri, weights);
    let gram_route = qr_solution.is_none();
    let beta = qr_solution.unwrap_or_else(|| {
        // The semi-normal solution: the first correction, from β = 0 (residuals = y).
        refiner.correction(&Residuals {
            hi: y.to_vec(),
            lo: vec![0.0; y.len()],
            peak: accurate::max_abs(y),
        })
    });
    let (beta, residuals) = refine(design, y, beta, &refiner, gram_route);
    let p = design.n_terms();
    let m = &tri.m;
    let unscaled_covariance = DMatrix::from_fn(p, p, |a, b| {
        accurate::dot(
            m.row(a).transpose().as_slice(),
            m.row(b).transpose().as_slice(),
        )
    });
    let singular = tri.r.singular_values();
    Ok(Solution {
        beta,
        residuals: residuals.into_rounded(),
        unscaled_covariance,
        unit_std_errors: (0..p)
            .map(|j| accurate::scaled_norm(m.row(j).iter().copied()))
            .collect(),
        condition_number: singular.max() / singular.min(),
    })
}

/// The triangle from the Gram route when it is safe, else from the pivoted QR (which also
/// gives a first solution).
fn first_solve(
    design: &Design,
    y: &[f64],
    weights: Option<&[f64]>,
    rank_tolerance: f64,
) -> Result<(Triangle, Option<Vec<f64>>)> {
    if let Some(tri) = gram_triangle(design, weights) {
        return Ok((tri, None));
    }
    let (n, p) = (y.len(), design.n_terms());
    let Factor {
        root_w,
        basis,
        qr,
        r,
        order,
        r_inv,
        m,
    } = factor(design, weights, rank_tolerance)?;
    let mut b = DVector::from_iterator(n, y.iter().zip(&root_w).map(|(v, w)| v * w));
    qr.q_tr_mul(&mut b);
    let top = &b.as_slice()[..p];
    let beta: Vec<f64> = (0..p)
        .map(|j| accurate::dot(m.row(j).transpose().as_slice(), top))
        .collect();
    let tri = Triangle {
        basis,
        r,
        order,
        r_inv,
        m,
    };
    Ok((tri, Some(beta)))
}

/// Refinement by corrected semi-normal equations: with `g = ZᵀW r` computed by compensated
/// dot products, `Δβ = M·R⁻ᵀ·Pᵀg`. Because `Z` is exact (or nearly so) the gradient `g` is
/// accurate even when the residual is large, which is where a second pass through `Qᵀ` would
/// stall at `ε‖r‖`.
struct Refiner<'a> {
    tri: &'a Triangle,
    weighted_z: std::borrow::Cow<'a, [Vec<f64>]>,
    z_peaks: Vec<f64>,
}

impl<'a> Refiner<'a> {
    fn new(tri: &'a Triangle, weights: Option<&[f64]>) -> Self {
        let weighted_z: std::borrow::Cow<'a, [Vec<f64>]> = match weights {
            Some(w) => tri
                .basis
                .columns
                .iter()
                .map(|c| c.iter().zip(w).map(|(a, b)| a * b).collect())
                .collect(),
            None => std::borrow::Cow::Borrowed(&tri.basis.columns),
        };
        let z_peaks = weighted_z.iter().map(|c| accurate::max_abs(c)).collect();
        Self {
            tri,
            weighted_z,
            z_peaks,
        }
    }

    /// `Δβ` for the current residuals.
    fn correction(&self, residual: &Residuals) -> Vec<f64> {
        let Triangle {
            order, r_inv, m, ..
        } = self.tri;
        let p = m.nrows();
        let g: Vec<f64> = order
            .iter()
            .map(|&col| residual.dot(&self.weighted_z[col], self.z_peaks[col]))
            .collect();
        let h: Vec<f64> = (0..p)
            .map(|k| accurate::dot(r_inv.column(k).as_slice(), &g))
            .collect();
        (0..p)
            .map(|j| accurate::dot(m.row(j).transpose().as_slice(), &h))
            .collect()
    }
}

/// Up to [`REFINEMENT_STEPS`] corrections of `beta`; the refined estimates and their
/// residuals.
fn refine(
    design: &Design,
    y: &[f64],
    mut beta: Vec<f64>,
    refiner: &Refiner<'_>,
    gram_route: bool,
) -> (Vec<f64>, Residuals) {
    let peaks: Vec<f64> = design
        .columns()
        .iter()
        .map(|c| accurate::max_abs(c))
        .collect();
    let mut residuals = Residuals::new(design, y, &beta, &peaks);
    for _ in 0..REFINEMENT_STEPS {
        let delta = refiner.correction(&residuals);
        let mut changed = false;
        let mut largest_step = 0.0_f64;
        for (b, d) in beta.iter_mut().zip(&delta) {
            let next = *b + d;
            changed |= next != *b;
            largest_step = largest_step.max((d / next).abs());
            *b = next;
        }
        if !changed {
            break;
        }
        residuals.refill(design, y, &beta, &peaks);
        // On the Gram route each step shrinks the error by about κ²ε ≤ 2e-10: after a step
        // this small, the next would change no digit, so it is not taken.
        if gram_route && largest_step < 1e-7 {
            break;
        }
    }
    (beta, residuals)
}

/// Largest 2-norm condition number of the working basis for which the Gram route is taken:
/// forming `ZᵀWZ` squares it, and `1e3² · ε ≈ 2e-10` keeps the covariance (from `R⁻¹`) to
/// about ten digits while the refinement restores the estimates to working accuracy.
pub const GRAM_CONDITION_LIMIT: f64 = 1e3;

/// `√wᵢ` (ones without weights).
fn root_weights(weights: Option<&[f64]>, n: usize) -> Vec<f64> {
    match weights {
        Some(w) => w.iter().map(|v| v.sqrt()).collect(),
        None => vec![1.0; n],
    }
}

/// Rows per block when the Gram matrix is formed.
const GRAM_BLOCK: usize = 4096;

/// The triangle of the weighted working basis without its `Q`.
struct Triangle {
    basis: Basis,
    r: DMatrix<f64>,
    order: Vec<usize>,
    r_inv: DMatrix<f64>,
    m: DMatrix<f64>,
}

/// `R` from the Cholesky factor of `G = ZᵀWZ`, when `κ(Z) = √(λ_max/λ_min)(G)` is at most
/// [`GRAM_CONDITION_LIMIT`]; `None` sends the caller to the pivoted QR.
fn gram_triangle(design: &Design, weights: Option<&[f64]>) -> Option<Triangle> {
    let n = design.n_rows();
    let p = design.n_terms();
    let root_w: Option<Vec<f64>> = weights.map(|w| w.iter().map(|v| v.sqrt()).collect());
    let basis = Basis::new(design, root_w.as_deref());
    // ZᵀWZ block by block (no n × p copy of the basis).
    let mut gram = DMatrix::zeros(p, p);
    let mut block = Vec::with_capacity(GRAM_BLOCK * p);
    for start in (0..n).step_by(GRAM_BLOCK) {
        let end = (start + GRAM_BLOCK).min(n);
        block.clear();
        for column in &basis.columns {
            let column = &column[start..end];
            match &root_w {
                Some(r) => block.extend(column.iter().zip(&r[start..end]).map(|(v, w)| v * w)),
                None => block.extend_from_slice(column),
            }
        }
        gram += crate::moments::gram(&block, end - start, p);
    }
    let eigen = gram.clone().symmetric_eigenvalues();
    let (lo, hi) = (eigen.min(), eigen.max());
    if !(lo > 0.0 && (hi / lo).sqrt() <= GRAM_CONDITION_LIMIT) {
        return None;
    }
    let r = gram.cholesky()?.l().transpose();
    let order: Vec<usize> = (0..p).collect();
    let r_inv = r.solve_upper_triangular(&DMatrix::identity(p, p))?;
    let m = DMatrix::from_fn(p, p, |j, l| {
        accurate::dot(
            basis.to_terms.row(j).transpose().as_slice(),
            r_inv.column(l).as_slice(),
        )
    });
    Some(Triangle {
        basis,
        r,
        order,
        r_inv,
        m,
    })
}

/// Residuals `eᵢ = yᵢ − Σⱼ xᵢⱼβⱼ`, each a compensated dot product `[yᵢ, xᵢ]·[1, −β]` kept
/// unrounded as `hiᵢ + loᵢ`: the refinement needs the digits below the residual's last
/// place. Computed column by column (the same operations, in the same order, as one
/// `accurate::dot_split` per row), so that each pass reads the columns sequentially.
struct Residuals {
    hi: Vec<f64>,
    lo: Vec<f64>,
    /// `max |hiᵢ|`.
    peak: f64,
}

impl Residuals {
    /// `peaks[j]` is `max |xᵢⱼ|` of design column `j`: where it and `|βⱼ|` are below
    /// [`accurate::SPLIT_SAFE`] the products use the split (vectorizing) form, which is
    /// exact there; otherwise the fused one.
    fn new(design: &Design, y: &[f64], beta: &[f64], peaks: &[f64]) -> Self {
        let mut r = Self {
            hi: Vec::new(),
            lo: Vec::new(),
            peak: 0.0,
        };
        r.refill(design, y, beta, peaks);
        r
    }

    /// Recomputes the residuals for `beta` in place (the buffers are reused across passes).
    fn refill(&mut self, design: &Design, y: &[f64], beta: &[f64], peaks: &[f64]) {
        self.hi.clear();
        self.hi.extend_from_slice(y);
        self.lo.clear();
        self.lo.resize(y.len(), 0.0);
        for ((column, &b), &peak) in design.columns().iter().zip(beta).zip(peaks) {
            if peak < accurate::SPLIT_SAFE && b.abs() < accurate::SPLIT_SAFE {
                subtract_term(
                    &mut self.hi,
                    &mut self.lo,
                    column,
                    b,
                    accurate::two_prod_split,
                );
            } else {
                subtract_term(&mut self.hi, &mut self.lo, column, b, accurate::two_prod);
            }
        }
        for (h, l) in self.hi.iter_mut().zip(self.lo.iter_mut()) {
            (*h, *l) = accurate::two_sum(*h, *l);
        }
        self.peak = accurate::max_abs(&self.hi);
    }

    /// `Σ zᵢ·(hiᵢ + loᵢ)`: compensated over `zᵢ·hiᵢ`, plain over `zᵢ·loᵢ` (each `|loᵢ|` is at
    /// most half an ulp of `hiᵢ`, so rounding those products costs only `ε²`-sized terms).
    /// `z_peak` is `max |zᵢ|`.
    fn dot(&self, z: &[f64], z_peak: f64) -> f64 {
        let safe = z_peak < accurate::SPLIT_SAFE && self.peak < accurate::SPLIT_SAFE;
        let (hi, lo) = if safe {
            accurate::dot_split_lanes(z, &self.hi)
        } else {
            accurate::dot_split(z.iter().copied().zip(self.hi.iter().copied()))
        };
        let tail: f64 = z.iter().zip(&self.lo).map(|(a, b)| a * b).sum();
        hi + (lo + tail)
    }

    /// `hiᵢ + loᵢ`, rounded in place of `hi` (no third vector).
    fn into_rounded(self) -> Vec<f64> {
        let mut hi = self.hi;
        for (h, l) in hi.iter_mut().zip(&self.lo) {
            *h += l;
        }
        hi
    }
}

/// `(hi, lo) −= x·b` element by element, with the error-free `product` (a generic parameter, so
/// each choice is its own inlined, vectorizable loop).
#[inline(always)]
fn subtract_term(
    hi: &mut [f64],
    lo: &mut [f64],
    column: &[f64],
    b: f64,
    product: impl Fn(f64, f64) -> (f64, f64),
) {
    for ((h, l), &x) in hi.iter_mut().zip(lo.iter_mut()).zip(column) {
        let (p, ep) = product(x, -b);
        let (s, es) = accurate::two_sum(*h, p);
        *h = s;
        *l += ep + es;
    }
}

/// `order[k]` is the working column that pivoting moved to position `k`.
fn pivot_order(qr: &PivotedQr, p: usize) -> Vec<usize> {
    let mut index = DMatrix::from_fn(1, p, |_, j| j as f64);
    qr.p().permute_columns(&mut index);
    index.iter().map(|&v| v as usize).collect()
}

/// Fails with [`CoreError::Aliased`] at the first pivot whose `|R_kk|` is at or below
/// `tolerance · max |R_ii|`, naming the term and what reproduces it. For a general design,
/// solving `R₁₁c = r₁ₖ` gives `zₖ ≈ Σ cᵢ zᵢ`; with `zⱼ = √w·xⱼ/sⱼ` (the basis scales) that is
/// `xₖ ≈ Σ cᵢ (sₖ/sᵢ) xᵢ` in the user's units.
fn check_rank(
    design: &Design,
    r: &DMatrix<f64>,
    order: &[usize],
    basis: &Basis,
    tolerance: f64,
) -> Result<()> {
    let diag: Vec<f64> = (0..order.len()).map(|k| r[(k, k)].abs()).collect();
    let largest = diag.iter().copied().fold(0.0, f64::max);
    let Some(k) = diag.iter().position(|&d| d <= tolerance * largest) else {
        return Ok(());
    };
    let names: Vec<&str> = design.terms().iter().map(|t| t.name.as_str()).collect();
    let target = order[k];
    let combination = if let Some(x) = design.polynomial_source() {
        let mut distinct = x.to_vec();
        distinct.sort_by(f64::total_cmp);
        distinct.dedup();
        format!(
            "a combination of the lower powers (the data hold only {} distinct values of the predictor)",
            distinct.len()
        )
    } else if k == 0 {
        "zero".to_string()
    } else {
        let r11 = r.view((0, 0), (k, k)).into_owned();
        let r1k = r.view((0, k), (k, 1)).into_owned();
        let scale = |j: usize| basis.recipe[j].2;
        match r11.solve_upper_triangular(&r1k) {
            Some(c) => describe_combination(
                (0..k).map(|i| (names[order[i]], c[i] * scale(target) / scale(order[i]))),
            ),
            None => "a combination of the other terms".to_string(),
        }
    };
    Err(CoreError::Aliased {
        term: names[target].to_string(),
        combination,
        tolerance,
    })
}

fn describe_combination<'a>(parts: impl Iterator<Item = (&'a str, f64)>) -> String {
    let parts: Vec<(&str, f64)> = parts.collect();
    let peak = parts.iter().fold(0.0_f64, |m, (_, c)| m.max(c.abs()));
    let shown: Vec<String> = parts
        .iter()
        .filter(|(_, c)| c.abs() > 1e-9 * peak)
        .map(|(name, c)| format!("{}·{name}", crate::short::trimmed(*c, 6)))
        .collect();
    if shown.is_empty() {
        "zero".into()
    } else {
        shown.join(" + ").replace("+ -", "− ")
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::regression::{fit, FitOptions};

    #[test]
    fn exact_collinearity_names_the_aliased_term_and_its_combination() {
        let x1 = [1.0, 2.0, 3.0, 4.0, 5.0, 6.0];
        let x2 = [2.0, 1.0, 4.0, 3.0, 6.0, 5.0];
        let x3: Vec<f64> = x1.iter().zip(&x2).map(|(a, b)| 2.0 * a - b).collect();
        let y = [1.0, 3.0, 2.0, 5.0, 4.0, 7.0];
        let design = Design::linear(&[("a", &x1), ("b", &x2), ("c", &x3)], true);
        let err = fit(&design, &y, None, &FitOptions::default()).expect_err("aliased");
        let CoreError::Aliased { combination, .. } = &err else {
            panic!("expected Aliased, got {err:?}");
        };
        assert!(err.to_string().contains("aliased"), "{err}");
        // Whichever of a, b, c is named, the other two appear in the combination.
        assert_eq!(combination.matches('·').count(), 2, "{combination}");
    }

    #[test]
    fn the_gram_route_is_taken_when_well_conditioned_and_agrees_with_the_qr_route() {
        let n = 2000usize;
        let x1: Vec<f64> = (0..2000u32).map(|i| f64::from(i).sin()).collect();
        let x2: Vec<f64> = (0..2000u32).map(|i| f64::from(i * 7 % 13)).collect();
        let y: Vec<f64> = (0..n)
            .map(|i| 2.0 + 3.0 * x1[i] - 0.5 * x2[i] + ((i * 31 % 17) as f64) / 17.0)
            .collect();
        let design = Design::linear(&[("a", &x1), ("b", &x2)], true);
        assert!(
            gram_triangle(&design, None).is_some(),
            "well conditioned: Gram route"
        );
        let gram = least_squares(&design, &y, None, 1e-13).expect("solves");
        // The QR route on the same problem, by hand: factor, solve, refine as the solver does.
        let f = factor(&design, None, 1e-13).expect("factors");
        let mut b = DVector::from_column_slice(&y);
        f.qr.q_tr_mul(&mut b);
        for j in 0..3 {
            let qr_beta = accurate::dot(f.m.row(j).transpose().as_slice(), &b.as_slice()[..3]);
            assert!(
                (gram.beta[j] - qr_beta).abs() <= 1e-12 * qr_beta.abs().max(1.0),
                "term {j}: {} vs {qr_beta}",
                gram.beta[j]
            );
        }
        // Nearly collinear columns: the Gram route declines.
        let x3: Vec<f64> = x1.iter().map(|v| v + 1e-7 * v.cos()).collect();
        let bad = Design::linear(&[("a", &x1), ("c", &x3)], true);
        assert!(gram_triangle(&bad, None).is_none());
    }

    #[test]
    fn polynomial_with_too_few_distinct_values_is_aliased() {
        let x = [1.0, 1.0, 2.0, 2.0, 3.0, 3.0];
        let y = [1.0, 1.1, 2.0, 2.2, 2.9, 3.1];
        let design = Design::polynomial("x", &x, 3, true).expect("degree 3");
        let err = fit(&design, &y, None, &FitOptions::default()).expect_err("aliased");
        assert!(err.to_string().contains("only 3 distinct values"), "{err}");
    }
}

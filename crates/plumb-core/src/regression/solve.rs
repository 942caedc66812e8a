//! The least-squares solver: equilibrated, column-pivoted Householder QR with refinement.

use nalgebra::{DMatrix, DVector};

use super::design::Design;
use crate::{accurate, CoreError, Result};

/// Most refinement steps taken after the first solve.
const REFINEMENT_STEPS: usize = 3;

/// What the solver hands to the inference step.
#[derive(Debug, Clone)]
pub(crate) struct Solution {
    /// `β̂`, in term order and the user's units.
    pub beta: Vec<f64>,
    /// Residuals `eᵢ = yᵢ − xᵢᵀβ̂` (unweighted), computed with compensated dot products.
    pub residuals: Vec<f64>,
    /// `(XᵀWX)⁻¹`, in term order and the user's units.
    pub unscaled_covariance: DMatrix<f64>,
    /// 2-norm condition number of the equilibrated weighted design.
    pub condition_number: f64,
}

/// Solves `min Σ wᵢ (yᵢ − xᵢᵀβ)²`; see [`super::fit`] for the method.
pub(crate) fn least_squares(
    design: &Design,
    y: &[f64],
    weights: Option<&[f64]>,
    rank_tolerance: f64,
) -> Result<Solution> {
    let n = y.len();
    let p = design.n_terms();
    let root_w: Vec<f64> = match weights {
        Some(w) => w.iter().map(|v| v.sqrt()).collect(),
        None => vec![1.0; n],
    };
    let scales: Vec<f64> = design
        .columns()
        .iter()
        .map(|c| power_of_two_near(weighted_norm(c, &root_w)))
        .collect();
    let scaled = DMatrix::from_fn(n, p, |i, j| root_w[i] * design.columns()[j][i] / scales[j]);
    let qr = scaled.col_piv_qr();
    let r = qr.r();
    let order = pivot_order(&qr, p);
    check_rank(design, &r, &order, &scales, rank_tolerance)?;

    let solve_scaled = |rhs: &[f64]| -> Vec<f64> {
        let mut b = DVector::from_column_slice(rhs);
        qr.q_tr_mul(&mut b);
        let top = DVector::from_iterator(p, b.iter().take(p).copied());
        let c = r
            .solve_upper_triangular(&top)
            .expect("rank was checked, R has a non-zero diagonal");
        let mut beta = vec![0.0; p];
        for (k, &j) in order.iter().enumerate() {
            beta[j] = c[k] / scales[j];
        }
        beta
    };

    let weighted_y: Vec<f64> = y.iter().zip(&root_w).map(|(v, w)| v * w).collect();
    let mut beta = solve_scaled(&weighted_y);
    let mut residuals = residuals_of(design, y, &beta);
    for _ in 0..REFINEMENT_STEPS {
        let weighted_r: Vec<f64> = residuals.iter().zip(&root_w).map(|(v, w)| v * w).collect();
        let delta = solve_scaled(&weighted_r);
        let mut changed = false;
        for (b, d) in beta.iter_mut().zip(&delta) {
            let next = *b + d;
            changed |= next != *b;
            *b = next;
        }
        if !changed {
            break;
        }
        residuals = residuals_of(design, y, &beta);
    }

    let r_inv = r
        .solve_upper_triangular(&DMatrix::identity(p, p))
        .expect("rank was checked, R has a non-zero diagonal");
    let cov_scaled = &r_inv * r_inv.transpose();
    let mut unscaled_covariance = DMatrix::zeros(p, p);
    for (a, &ja) in order.iter().enumerate() {
        for (b, &jb) in order.iter().enumerate() {
            unscaled_covariance[(ja, jb)] = cov_scaled[(a, b)] / (scales[ja] * scales[jb]);
        }
    }
    let singular = r.clone().singular_values();
    let condition_number = singular.max() / singular.min();
    Ok(Solution {
        beta,
        residuals,
        unscaled_covariance,
        condition_number,
    })
}

/// `eᵢ = yᵢ − Σⱼ xᵢⱼβⱼ`, each as one compensated dot product `[yᵢ, xᵢ]·[1, −β]`.
fn residuals_of(design: &Design, y: &[f64], beta: &[f64]) -> Vec<f64> {
    let coefficients: Vec<f64> = std::iter::once(1.0)
        .chain(beta.iter().map(|b| -b))
        .collect();
    let mut row = Vec::with_capacity(beta.len() + 1);
    (0..y.len())
        .map(|i| {
            row.clear();
            row.push(y[i]);
            row.extend(design.row(i));
            accurate::dot(&row, &coefficients)
        })
        .collect()
}

fn weighted_norm(column: &[f64], root_w: &[f64]) -> f64 {
    // Scale first so that squares of values near 1e±300 neither overflow nor underflow.
    let peak = column
        .iter()
        .zip(root_w)
        .fold(0.0_f64, |m, (v, w)| m.max((v * w).abs()));
    if peak == 0.0 {
        return 0.0;
    }
    let sum: f64 = column
        .iter()
        .zip(root_w)
        .map(|(v, w)| (v * w / peak).powi(2))
        .sum();
    peak * sum.sqrt()
}

/// `2^round(log₂ x)`, so that dividing by it is exact; 1 for zero.
fn power_of_two_near(x: f64) -> f64 {
    if x == 0.0 || !x.is_finite() {
        1.0
    } else {
        2f64.powi(x.log2().round() as i32)
    }
}

/// `order[k]` is the original column that pivoting moved to position `k`.
fn pivot_order(qr: &nalgebra::linalg::ColPivQR<f64, nalgebra::Dyn, nalgebra::Dyn>, p: usize) -> Vec<usize> {
    let mut index = DMatrix::from_fn(1, p, |_, j| j as f64);
    qr.p().permute_columns(&mut index);
    index.iter().map(|&v| v as usize).collect()
}

/// Fails with [`CoreError::Aliased`] at the first pivot whose `|R_kk|` is at or below
/// `tolerance · max |R_ii|`, naming the term and the combination of earlier pivots that
/// reproduces it: solving `R₁₁c = r₁ₖ` gives `xₖ ≈ Σ cᵢ (sₖ/sᵢ) xᵢ`.
fn check_rank(
    design: &Design,
    r: &DMatrix<f64>,
    order: &[usize],
    scales: &[f64],
    tolerance: f64,
) -> Result<()> {
    let diag: Vec<f64> = (0..order.len()).map(|k| r[(k, k)].abs()).collect();
    let largest = diag.iter().copied().fold(0.0, f64::max);
    let Some(k) = diag.iter().position(|&d| d <= tolerance * largest) else {
        return Ok(());
    };
    let names: Vec<&str> = design.terms().iter().map(|t| t.name.as_str()).collect();
    let target = order[k];
    let combination = if k == 0 {
        "zero".to_string()
    } else {
        let r11 = r.view((0, 0), (k, k)).into_owned();
        let r1k = r.view((0, k), (k, 1)).into_owned();
        match r11.solve_upper_triangular(&r1k) {
            Some(c) => describe_combination(
                (0..k).map(|i| (names[order[i]], c[i] * scales[target] / scales[order[i]])),
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
        .map(|(name, c)| format!("{c:.6}·{name}"))
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
        let message = err.to_string();
        assert!(message.contains("aliased"), "{message}");
        // Whichever of a, b, c is named, the other two appear in the combination.
        assert_eq!(combination.matches('·').count(), 2, "{combination}");
    }

    #[test]
    fn power_of_two_scaling_is_exact() {
        assert_eq!(power_of_two_near(3.0), 4.0);
        assert_eq!(power_of_two_near(0.0), 1.0);
        assert_eq!(1.1 / power_of_two_near(1000.0) * power_of_two_near(1000.0), 1.1);
    }
}

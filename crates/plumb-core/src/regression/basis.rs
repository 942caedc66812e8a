//! The working basis the solver factors, and the exact map back to the user's terms.
//!
//! The solver never factors `X` itself. It factors `Z`, whose columns span the same space
//! but are better scaled, and recovers `β = T·α` from the working coefficients `α`:
//!
//! * any design: `Zⱼ = (Xⱼ − cⱼ) / sⱼ` with `sⱼ` a power of two near `‖W^{1/2}(Xⱼ − cⱼ)‖` and,
//!   when the model has an intercept, `cⱼ` the data midpoint of a column whose values all lie
//!   within a factor of two of it (so the shift is exact; otherwise, and without an intercept,
//!   `cⱼ = 0`). Then `βⱼ = αⱼ/sⱼ`
//!   and `β₀ = α₀/s₀ − Σⱼ cⱼαⱼ/sⱼ`; the entries of `T` are exact (`sⱼ` is a power of two), and
//!   centring removes the conditioning that a large offset adds (x = 1e6 + small spread);
//! * a polynomial in one predictor: `Zₖ = tᵏ / sₖ` with `t = (x − c)/h`, `c` the midpoint of
//!   the data rounded to `max(4, ⌊45/degree⌋)` significant bits (zero when there is no
//!   intercept) and `h` a power of two covering the half-range. Then
//!   `βⱼ = Σ_{k≥j} αₖ C(k, j) (−c)^{k−j} / (hᵏ sₖ)`. Every entry of `T` is exact in binary
//!   floating point for degrees up to 10, and `T·α` is evaluated with compensated dot products.
//!
//! Factoring the centred, scaled powers keeps the conditioning of the factorization low and
//! leaves only the (exact) change of basis to the user's powers of `x`.

use nalgebra::DMatrix;

use super::design::{Design, TermKind};
use crate::accurate;

/// `Z` (unweighted, by column) and `T` with `β = T·α`.
#[derive(Debug, Clone)]
pub(crate) struct Basis {
    pub columns: Vec<Vec<f64>>,
    pub to_terms: DMatrix<f64>,
    /// Per working column: `(shift, step, scale, power)` with `zₖ = ((v − shift)/step)^power / scale`,
    /// where `v` is the polynomial's predictor, or term k's own value for a general design
    /// (power 1, or 0 for the intercept).
    pub recipe: Vec<(f64, f64, f64, i32)>,
    /// Whether `v` is the single polynomial predictor (true) or each term's own value (false).
    pub polynomial: bool,
}

impl Basis {
    /// Builds the working basis for `design`, with column norms taken under `root_w = √w`
    /// (`None`: unweighted).
    pub fn new(design: &Design, root_w: Option<&[f64]>) -> Self {
        if design.polynomial_source().is_some() {
            Self::polynomial(design, root_w)
        } else {
            Self::general(design, root_w)
        }
    }

    /// `Zₖ = tᵏ/sₖ` with `t = (x − c)/h` (see the module notes).
    fn polynomial(design: &Design, root_w: Option<&[f64]>) -> Self {
        let x = design.polynomial_source().expect("a polynomial design");
        let powers: Vec<i32> = design
            .terms()
            .iter()
            .map(|t| t.kind.power() as i32)
            .collect();
        let degree = powers.iter().copied().max().unwrap_or(1);
        let (c, h) = shift_and_step(x, design.has_intercept(), degree);
        let raw: Vec<Vec<f64>> = powers
            .iter()
            .map(|&k| {
                let k = k.unsigned_abs();
                x.iter()
                    .map(|&v| accurate::int_pow((v - c) / h, k))
                    .collect()
            })
            .collect();
        let scales = scales_of(&raw, root_w);
        let p = design.n_terms();
        let to_terms = DMatrix::from_fn(p, p, |j, k| {
            let (pj, pk) = (powers[j], powers[k]);
            if pk < pj {
                return 0.0;
            }
            binomial(pk, pj) * (-c).powi(pk - pj) / h.powi(pk) / scales[k]
        });
        let recipe = powers
            .iter()
            .zip(&scales)
            .map(|(&k, &sc)| (c, h, sc, k))
            .collect();
        Self {
            columns: divided(raw, &scales),
            to_terms,
            recipe,
            polynomial: true,
        }
    }

    /// `Zⱼ = (Xⱼ − cⱼ)/sⱼ`: with an intercept a column whose values all lie within a factor of
    /// two of its data midpoint `cⱼ` (an offset larger than the spread) is centred there —
    /// `Xⱼ − cⱼ` is then exact (Sterbenz's lemma), so the basis spans exactly the design's
    /// space — and `T`'s entries `−cⱼ/sⱼ` are exact; other columns are only scaled. Then
    /// `βⱼ = αⱼ/sⱼ` and `β₀ = α₀/s₀ − Σⱼ cⱼαⱼ/sⱼ`.
    fn general(design: &Design, root_w: Option<&[f64]>) -> Self {
        let centre = design.has_intercept();
        let shifts: Vec<f64> = design
            .terms()
            .iter()
            .zip(design.columns())
            .map(|(t, col)| {
                if centre && t.kind != TermKind::Intercept {
                    exact_shift(col)
                } else {
                    0.0
                }
            })
            .collect();
        let raw: Vec<Vec<f64>> = design
            .columns()
            .iter()
            .zip(&shifts)
            .map(|(col, &c)| col.iter().map(|&v| v - c).collect())
            .collect();
        let scales = scales_of(&raw, root_w);
        let p = design.n_terms();
        let to_terms = DMatrix::from_fn(p, p, |j, k| {
            if j == k {
                1.0 / scales[k]
            } else if j == 0 && centre {
                -shifts[k] / scales[k]
            } else {
                0.0
            }
        });
        let recipe = design
            .terms()
            .iter()
            .zip(shifts.iter().zip(&scales))
            .map(|(t, (&c, &sc))| (c, 1.0, sc, i32::from(t.kind != TermKind::Intercept)))
            .collect();
        Self {
            columns: divided(raw, &scales),
            to_terms,
            recipe,
            polynomial: false,
        }
    }

    /// The working row `z` for one observation: `values` is `[x]` for a polynomial, or the
    /// design row (one value per term) otherwise.
    pub fn z_row(&self, values: &[f64]) -> Vec<f64> {
        (0..self.recipe.len())
            .map(|k| {
                self.z_value(
                    k,
                    if self.polynomial {
                        values[0]
                    } else {
                        values[k]
                    },
                )
            })
            .collect()
    }

    /// Working column `k` at `v` (the polynomial's predictor, or term k's own value):
    /// `((v − shift)/step)^power / scale`.
    #[inline]
    pub fn z_value(&self, k: usize, v: f64) -> f64 {
        let (shift, step, scale, power) = self.recipe[k];
        accurate::int_pow((v - shift) / step, power.unsigned_abs()) / scale
    }
}

/// Power-of-two scales near each column's weighted norm.
fn scales_of(raw: &[Vec<f64>], root_w: Option<&[f64]>) -> Vec<f64> {
    raw.iter()
        .map(|c| accurate::power_of_two_near(weighted_norm(c, root_w)))
        .collect()
}

/// Each column divided by its scale (exact: the scales are powers of two).
fn divided(raw: Vec<Vec<f64>>, scales: &[f64]) -> Vec<Vec<f64>> {
    raw.into_iter()
        .zip(scales)
        .map(|(c, &s)| c.into_iter().map(|v| v / s).collect())
        .collect()
}

/// The column's midpoint when every value lies within a factor of two of it (so that each
/// `v − c` is exact), else 0.
fn exact_shift(column: &[f64]) -> f64 {
    let c = midpoint(column);
    let near = |v: &f64| {
        let (a, b) = (v.abs(), c.abs());
        v.signum() == c.signum() && a >= 0.5 * b && a <= 2.0 * b
    };
    if c != 0.0 && column.iter().filter(|v| v.is_finite()).all(near) {
        c
    } else {
        0.0
    }
}

/// `lo/2 + hi/2` of the finite values (0 when there are none); halved first so that values
/// near the f64 limit do not overflow.
fn midpoint(column: &[f64]) -> f64 {
    let (lo, hi) = column
        .iter()
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &v| {
            (lo.min(v), hi.max(v))
        });
    if lo.is_finite() {
        0.5 * lo + 0.5 * hi
    } else {
        0.0
    }
}

/// `(c, h)` for a polynomial basis of `degree`: see the module documentation. `c` keeps as
/// many significant bits as leave every entry of `T` exact, `max(4, ⌊45/degree⌋)` (the entries
/// are `C(k, j)·c^{k−j}/h^k`, and `C(10, 5) = 252` takes 8 of a double's 53 bits).
fn shift_and_step(x: &[f64], intercept: bool, degree: i32) -> (f64, f64) {
    let (lo, hi) = x
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &v| {
            (lo.min(v), hi.max(v))
        });
    let c = if intercept {
        round_to_bits(0.5 * lo + 0.5 * hi, (45 / degree.max(1)).max(4))
    } else {
        0.0
    };
    let reach = (hi - c).abs().max((lo - c).abs());
    (c, power_of_two_at_least(reach))
}

fn round_to_bits(v: f64, bits: i32) -> f64 {
    if v == 0.0 || !v.is_finite() {
        return 0.0;
    }
    let e = v.abs().log2().floor() as i32 - (bits - 1);
    let unit = 2f64.powi(e);
    (v / unit).round() * unit
}

fn binomial(n: i32, k: i32) -> f64 {
    (0..k).fold(1.0, |acc, i| acc * f64::from(n - i) / f64::from(i + 1))
}

/// `‖W^{1/2}c‖₂`, free of overflow and underflow.
fn weighted_norm(column: &[f64], root_w: Option<&[f64]>) -> f64 {
    match root_w {
        Some(w) => accurate::scaled_norm(column.iter().zip(w).map(|(v, w)| v * w)),
        None => accurate::scaled_norm(column.iter().copied()),
    }
}

fn power_of_two_at_least(x: f64) -> f64 {
    if x == 0.0 || !x.is_finite() {
        1.0
    } else {
        2f64.powi((x.log2().ceil() as i32).clamp(-1022, 1023))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn polynomial_basis_maps_back_to_powers_of_x() {
        // For any α, X·(T·α) must equal Z·α row by row.
        let x = [0.5, 1.5, 2.0, 3.25, 7.0];
        let design = Design::polynomial("x", &x, 3, true).expect("degree 3");
        let basis = Basis::new(&design, None);
        let alpha = nalgebra::DVector::from_vec(vec![0.3, -1.2, 0.7, 2.5]);
        let beta = &basis.to_terms * &alpha;
        for i in 0..x.len() {
            let via_x: f64 = design.row(i).zip(beta.iter()).map(|(a, b)| a * b).sum();
            let via_z: f64 = basis
                .columns
                .iter()
                .zip(alpha.iter())
                .map(|(c, a)| c[i] * a)
                .sum();
            assert!(
                (via_x - via_z).abs() < 1e-12 * via_z.abs().max(1.0),
                "row {i}: {via_x} vs {via_z}"
            );
        }
    }

    #[test]
    fn rounding_to_four_bits_keeps_the_sign_and_magnitude() {
        assert_eq!(round_to_bits(-5.955, 4), -6.0);
        assert_eq!(round_to_bits(10.0, 4), 10.0);
        assert_eq!(binomial(10, 5), 252.0);
    }
}

//! The working basis the solver factors, and the exact map back to the user's terms.
//!
//! The solver never factors `X` itself. It factors `Z`, whose columns span the same space
//! but are better scaled, and recovers `β = T·α` from the working coefficients `α`:
//!
//! * any design: `Zⱼ = Xⱼ / sⱼ` with `sⱼ` a power of two near `‖W^{1/2}Xⱼ‖`, so `T = diag(1/sⱼ)`
//!   and the map is exact;
//! * a polynomial in one predictor: `Zₖ = tᵏ / sₖ` with `t = (x − c)/h`, `c` the midpoint of
//!   the data rounded to four significant bits (zero when there is no intercept, so the model
//!   still passes through the origin) and `h` a power of two covering the half-range. Then
//!   `βⱼ = Σ_{k≥j} αₖ C(k, j) (−c)^{k−j} / (hᵏ sₖ)`. Every entry of `T` is exact in binary
//!   floating point for degrees up to 10, and `T·α` is evaluated with compensated dot products.
//!
//! Factoring the centred, scaled powers keeps the conditioning of the factorization low and
//! leaves only the (exact) change of basis to the user's powers of `x`.

use nalgebra::DMatrix;

use super::design::Design;
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
    /// Builds the working basis for `design`, with column norms taken under `root_w = √w`.
    pub fn new(design: &Design, root_w: &[f64]) -> Self {
        let (raw, shift, step) = match design.polynomial_source() {
            Some(x) => {
                let (c, h) = shift_and_step(x, design.has_intercept());
                let columns = design
                    .terms()
                    .iter()
                    .map(|t| {
                        let k = t.kind.power() as i32;
                        x.iter().map(|&v| ((v - c) / h).powi(k)).collect()
                    })
                    .collect();
                (columns, c, h)
            }
            None => (design.columns().to_vec(), 0.0, 1.0),
        };
        let scales: Vec<f64> = raw
            .iter()
            .map(|c| accurate::power_of_two_near(weighted_norm(c, root_w)))
            .collect();
        let columns = raw
            .into_iter()
            .zip(&scales)
            .map(|(c, &s)| c.into_iter().map(|v| v / s).collect())
            .collect();
        let p = design.n_terms();
        let powers: Vec<i32> = design
            .terms()
            .iter()
            .map(|t| t.kind.power() as i32)
            .collect();
        let polynomial = design.polynomial_source().is_some();
        let to_terms = DMatrix::from_fn(p, p, |j, k| {
            if !polynomial {
                return if j == k { 1.0 / scales[k] } else { 0.0 };
            }
            let (pj, pk) = (powers[j], powers[k]);
            if pk < pj {
                return 0.0;
            }
            binomial(pk, pj) * (-shift).powi(pk - pj) / step.powi(pk) / scales[k]
        });
        let recipe = powers
            .iter()
            .zip(&scales)
            .map(|(&k, &sc)| {
                if polynomial {
                    (shift, step, sc, k)
                } else {
                    (0.0, 1.0, sc, 1)
                }
            })
            .collect();
        Self {
            columns,
            to_terms,
            recipe,
            polynomial,
        }
    }

    /// The working row `z` for one observation: `values` is `[x]` for a polynomial, or the
    /// design row (one value per term) otherwise.
    pub fn z_row(&self, values: &[f64]) -> Vec<f64> {
        self.recipe
            .iter()
            .enumerate()
            .map(|(k, &(shift, step, scale, power))| {
                let v = if self.polynomial {
                    values[0]
                } else {
                    values[k]
                };
                ((v - shift) / step).powi(power) / scale
            })
            .collect()
    }
}

/// `(c, h)` for a polynomial basis: see the module documentation.
fn shift_and_step(x: &[f64], intercept: bool) -> (f64, f64) {
    let (lo, hi) = x
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &v| {
            (lo.min(v), hi.max(v))
        });
    let c = if intercept {
        round_to_bits(0.5 * lo + 0.5 * hi, 4)
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
fn weighted_norm(column: &[f64], root_w: &[f64]) -> f64 {
    accurate::scaled_norm(column.iter().zip(root_w).map(|(v, w)| v * w))
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
        let basis = Basis::new(&design, &[1.0; 5]);
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

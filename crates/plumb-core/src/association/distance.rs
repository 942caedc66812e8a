//! Distance correlation (Székely, Rizzo & Bakirov 2007), which is zero only under independence
//! and so sees rings, V shapes and other patterns that Pearson's r misses.

use rand::seq::SliceRandom;
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;

use super::{check_pairs, Association, Pairwise, Undefined};

/// Largest n accepted: the method is O(n²) in time (O(n) in memory), and each permutation
/// repeats that work.
pub const DISTANCE_MAX_N: usize = 5_000;
/// Permutations used for the p-value.
pub const DISTANCE_PERMUTATIONS: usize = 199;

/// Distance correlation `dCor = dCov(x, y) / √(dVar(x)·dVar(y))` with the V-statistics
/// `dCov² = S₁ + S₂ − 2S₃`, `S₁ = n⁻²Σᵢⱼ aᵢⱼbᵢⱼ`, `S₂ = n⁻²Σaᵢⱼ · n⁻²Σbᵢⱼ`,
/// `S₃ = n⁻¹Σᵢ āᵢ b̄ᵢ`, where `aᵢⱼ = |xᵢ − xⱼ|`, `bᵢⱼ = |yᵢ − yⱼ|` and `āᵢ`, `b̄ᵢ` are row means.
///
/// p-value: permutation test, `(1 + #{dCor(x, π(y)) ≥ dCor(x, y)}) / (R + 1)` over
/// `R = `[`DISTANCE_PERMUTATIONS`] permutations drawn from ChaCha8 seeded with `seed`
/// (so the same data and seed always give the same p). Undefined beyond [`DISTANCE_MAX_N`] pairs.
pub fn distance_correlation(x: &[f64], y: &[f64], seed: u64) -> Pairwise {
    check_pairs(x, y, 3)?;
    let n = x.len();
    if n > DISTANCE_MAX_N {
        return Err(Undefined::TooLarge {
            n,
            max: DISTANCE_MAX_N,
        });
    }
    let (ax, sx) = row_means(x);
    let (ay, sy) = row_means(y);
    let var_x = dcov2(x, x, &ax, &ax, sx, sx);
    let var_y = dcov2(y, y, &ay, &ay, sy, sy);
    let stat = |yy: &[f64], ayy: &[f64]| {
        (dcov2(x, yy, &ax, ayy, sx, sy).max(0.0) / (var_x * var_y).sqrt()).sqrt()
    };
    let observed = stat(y, &ay);
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut perm: Vec<usize> = (0..n).collect();
    let mut at_least = 0usize;
    for _ in 0..DISTANCE_PERMUTATIONS {
        perm.shuffle(&mut rng);
        let yp: Vec<f64> = perm.iter().map(|&i| y[i]).collect();
        let ap: Vec<f64> = perm.iter().map(|&i| ay[i]).collect();
        if stat(&yp, &ap) >= observed {
            at_least += 1;
        }
    }
    Ok(Association {
        r: observed,
        p_value: (1 + at_least) as f64 / (DISTANCE_PERMUTATIONS + 1) as f64,
        n,
        ci: None,
    })
}

/// The coefficient alone (no permutations), for callers that only need its size.
/// Same formula and limits as [`distance_correlation`].
pub fn distance_correlation_coefficient(x: &[f64], y: &[f64]) -> Option<f64> {
    check_pairs(x, y, 3).ok()?;
    if x.len() > DISTANCE_MAX_N {
        return None;
    }
    let (ax, sx) = row_means(x);
    let (ay, sy) = row_means(y);
    let var = dcov2(x, x, &ax, &ax, sx, sx) * dcov2(y, y, &ay, &ay, sy, sy);
    Some((dcov2(x, y, &ax, &ay, sx, sy).max(0.0) / var.sqrt()).sqrt())
}

/// Row means `āᵢ = n⁻¹Σⱼ|vᵢ − vⱼ|` and the grand mean `n⁻²Σᵢⱼ|vᵢ − vⱼ|`.
fn row_means(v: &[f64]) -> (Vec<f64>, f64) {
    let n = v.len() as f64;
    let rows: Vec<f64> = v
        .iter()
        .map(|&a| v.iter().map(|&b| (a - b).abs()).sum::<f64>() / n)
        .collect();
    let grand = rows.iter().sum::<f64>() / n;
    (rows, grand)
}

fn dcov2(x: &[f64], y: &[f64], ax: &[f64], ay: &[f64], gx: f64, gy: f64) -> f64 {
    let n = x.len() as f64;
    let mut s1 = 0.0;
    for i in 0..x.len() {
        let mut row = 0.0;
        for j in 0..x.len() {
            row += (x[i] - x[j]).abs() * (y[i] - y[j]).abs();
        }
        s1 += row;
    }
    let s3: f64 = ax.iter().zip(ay).map(|(a, b)| a * b).sum::<f64>() / n;
    s1 / (n * n) + gx * gy - 2.0 * s3
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    /// Second implementation: the double-centred distance matrices of the definition.
    fn dcor_by_matrices(x: &[f64], y: &[f64]) -> f64 {
        let n = x.len();
        let centre = |v: &[f64]| -> Vec<Vec<f64>> {
            let d: Vec<Vec<f64>> = v
                .iter()
                .map(|a| v.iter().map(|b| (a - b).abs()).collect())
                .collect();
            let row: Vec<f64> = d.iter().map(|r| r.iter().sum::<f64>() / n as f64).collect();
            let grand = row.iter().sum::<f64>() / n as f64;
            (0..n)
                .map(|i| (0..n).map(|j| d[i][j] - row[i] - row[j] + grand).collect())
                .collect()
        };
        let (a, b) = (centre(x), centre(y));
        let dot = |p: &Vec<Vec<f64>>, q: &Vec<Vec<f64>>| -> f64 {
            p.iter()
                .zip(q)
                .map(|(r, s)| r.iter().zip(s).map(|(u, v)| u * v).sum::<f64>())
                .sum()
        };
        (dot(&a, &b) / (dot(&a, &a) * dot(&b, &b)).sqrt()).sqrt()
    }

    #[test]
    fn agrees_with_the_matrix_definition() {
        let x = [0.3, -1.2, 2.5, 0.7, 1.1, -0.4, 3.0, 0.0];
        let y = [1.0, 0.2, -0.5, 2.2, 0.9, 1.4, -1.0, 0.3];
        let got = distance_correlation(&x, &y, 7).expect("defined").r;
        assert_relative_eq!(got, dcor_by_matrices(&x, &y), max_relative = 1e-12);
    }

    #[test]
    fn sees_a_ring_that_pearson_misses() {
        let angles: Vec<f64> = (0..60).map(|k| f64::from(k) * 0.1047).collect();
        let x: Vec<f64> = angles.iter().map(|a| a.cos()).collect();
        let y: Vec<f64> = angles.iter().map(|a| a.sin()).collect();
        let r = super::super::pearson(&x, &y, 0.95).expect("defined").r;
        let d = distance_correlation(&x, &y, 1).expect("defined");
        assert!(r.abs() < 0.1, "pearson {r}");
        assert!(d.r > 0.1, "dcor {}", d.r);
        let again = distance_correlation(&x, &y, 1).expect("defined");
        assert_eq!(d.p_value, again.p_value, "seeded: same p every time");
    }
}

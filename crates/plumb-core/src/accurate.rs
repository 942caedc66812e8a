//! Compensated (error-free transformation) sums and dot products.
//!
//! These follow Ogita, Rump & Oishi, "Accurate sum and dot product", SIAM J. Sci. Comput. 26
//! (2005): `Sum2` and `Dot2` return results as accurate as if computed in twice the working
//! precision and then rounded. They are used for residuals and sums of squares, where plain
//! summation would cancel away the digits that the least-squares solver worked to keep.

/// Error-free sum: returns `(s, e)` with `s = fl(a + b)` and `a + b = s + e` exactly (Knuth's TwoSum).
#[inline]
pub fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let z = s - a;
    let e = (a - (s - z)) + (b - z);
    (s, e)
}

/// Error-free product: returns `(p, e)` with `p = fl(a·b)` and `a·b = p + e` exactly (via fused multiply-add).
#[inline]
pub fn two_prod(a: f64, b: f64) -> (f64, f64) {
    let p = a * b;
    let e = a.mul_add(b, -p);
    (p, e)
}

/// Magnitude below which [`two_prod_split`] cannot overflow in its splitting (`2^995`).
pub const SPLIT_SAFE: f64 = 3.2e299;

/// Veltkamp's split `a = hi + lo`, `hi` holding the leading 26 bits (exact for `|a| < 2^996`).
#[inline]
fn split(a: f64) -> (f64, f64) {
    let c = 134_217_729.0 * a; // 2^27 + 1
    let hi = c - (c - a);
    (hi, a - hi)
}

/// Error-free product without a fused multiply-add (Dekker, "A floating-point technique for
/// extending the available precision", Numer. Math. 18, 1971): `a·b = p + e` exactly when
/// `|a|, |b| <` [`SPLIT_SAFE`] and `|a·b| ≥ 2^-916` (below that `e` may lose bits under
/// `2^-1022`). Plain multiplies and adds only, so loops over slices vectorize — unlike
/// [`two_prod`], whose `mul_add` is a library call on targets built without FMA.
#[inline]
pub fn two_prod_split(a: f64, b: f64) -> (f64, f64) {
    let p = a * b;
    let (ah, al) = split(a);
    let (bh, bl) = split(b);
    let e = ((ah * bh - p) + ah * bl + al * bh) + al * bl;
    (p, e)
}

/// Compensated `Σ aᵢ·bᵢ` (Dot2 in four interleaved lanes, combined by error-free sums) over
/// slices whose entries are all below [`SPLIT_SAFE`]; as accurate as [`dot_split`], with the
/// summation order changed so that it vectorizes. Returned unrounded as `(hi, lo)`.
///
/// # Panics
/// If the slices differ in length (a caller bug).
pub fn dot_split_lanes(a: &[f64], b: &[f64]) -> (f64, f64) {
    assert_eq!(
        a.len(),
        b.len(),
        "dot_split_lanes: slices of different length"
    );
    let mut s = [0.0; 4];
    let mut c = [0.0; 4];
    let (ca, cb) = (a.chunks_exact(4), b.chunks_exact(4));
    let tail = dot_split(
        ca.remainder()
            .iter()
            .copied()
            .zip(cb.remainder().iter().copied()),
    );
    for (x, y) in ca.zip(cb) {
        for l in 0..4 {
            let (p, ep) = two_prod_split(x[l], y[l]);
            let (t, es) = two_sum(s[l], p);
            s[l] = t;
            c[l] += ep + es;
        }
    }
    let (mut hi, mut lo) = tail;
    for l in 0..4 {
        let (t, e) = two_sum(hi, s[l]);
        hi = t;
        lo += e + c[l];
    }
    two_sum(hi, lo)
}

/// `a^k` for `k ≥ 0` by repeated squaring, written out so that it inlines into a column
/// loop: the same multiplications in the same order as `f64::powi` (compiler-builtins'
/// `__powidf2`: `r = 1; while … { if k odd: r *= a; k /= 2; a *= a }`), so the same bits —
/// tested against `powi`. `powi` itself is an out-of-line call per value.
#[inline(always)]
pub fn int_pow(mut a: f64, mut k: u32) -> f64 {
    let mut r = 1.0;
    loop {
        if k & 1 == 1 {
            r *= a;
        }
        k >>= 1;
        if k == 0 {
            return r;
        }
        a *= a;
    }
}

/// Largest `|vᵢ|` (0 for an empty slice; NaN-free input assumed).
pub fn max_abs(v: &[f64]) -> f64 {
    v.iter().fold(0.0_f64, |m, x| m.max(x.abs()))
}

/// Compensated sum `Σ xᵢ` (Sum2): error at most about `eps·|Σxᵢ| + n²·eps²·Σ|xᵢ|`.
pub fn sum(xs: impl IntoIterator<Item = f64>) -> f64 {
    let mut s = 0.0;
    let mut c = 0.0;
    for x in xs {
        let (t, e) = two_sum(s, x);
        s = t;
        c += e;
    }
    s + c
}

/// Compensated dot product `Σ aᵢ·bᵢ` (Dot2).
///
/// # Panics
/// If the slices differ in length (a caller bug).
pub fn dot(a: &[f64], b: &[f64]) -> f64 {
    assert_eq!(a.len(), b.len(), "dot: slices of different length");
    // Long slices in range take the vectorizing form (same accuracy, other summation order).
    let (hi, lo) = if a.len() >= 64 && max_abs(a) < SPLIT_SAFE && max_abs(b) < SPLIT_SAFE {
        dot_split_lanes(a, b)
    } else {
        dot_split(a.iter().copied().zip(b.iter().copied()))
    };
    hi + lo
}

/// Compensated `Σ aᵢ·bᵢ` over pairs, returned unrounded as `(hi, lo)` with `|lo| ≤ ulp(hi)/2`:
/// `hi + lo` carries about twice the working precision, for callers that must not round yet.
pub fn dot_split(pairs: impl IntoIterator<Item = (f64, f64)>) -> (f64, f64) {
    let mut s = 0.0;
    let mut c = 0.0;
    for (x, y) in pairs {
        let (p, ep) = two_prod(x, y);
        let (t, es) = two_sum(s, p);
        s = t;
        c += ep + es;
    }
    two_sum(s, c)
}

/// `‖v‖₂` as `peak·√Σ(vᵢ/peak)²`, free of overflow and underflow in the squares.
pub fn scaled_norm(v: impl Iterator<Item = f64> + Clone) -> f64 {
    let peak = v.clone().fold(0.0_f64, |m, x| m.max(x.abs()));
    if peak == 0.0 || !peak.is_finite() {
        return peak;
    }
    peak * v.map(|x| (x / peak).powi(2)).sum::<f64>().sqrt()
}

/// `2^round(log₂ x)`, so that dividing by it is exact; 1 for zero or non-finite `x`.
/// Clamped to the normal range so that the scale itself is finite and non-zero.
pub fn power_of_two_near(x: f64) -> f64 {
    if x == 0.0 || !x.is_finite() {
        1.0
    } else {
        2f64.powi((x.log2().round() as i32).clamp(-1022, 1023))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn int_pow_gives_the_bits_of_powi() {
        let mut v = 0.173_f64;
        for _ in 0..2000 {
            v = (v * 7.31 + 0.917).fract() * 41.0 - 20.5;
            for k in 0..=10u32 {
                let (a, b) = (int_pow(v, k), v.powi(k as i32));
                assert!(a.to_bits() == b.to_bits(), "{v}^{k}: {a} vs {b}");
            }
        }
        assert_eq!(int_pow(-0.0, 3).to_bits(), (-0.0f64).powi(3).to_bits());
        assert_eq!(int_pow(f64::INFINITY, 0), 1.0);
    }

    #[test]
    fn sum_keeps_the_small_terms_that_plain_summation_loses() {
        // 1e16 + 1 - 1e16 is exactly 1; plain left-to-right summation gives 0.
        let xs = [1e16, 1.0, -1e16];
        assert_eq!(xs.iter().sum::<f64>(), 0.0);
        assert_eq!(sum(xs), 1.0);
    }

    #[test]
    fn dot_is_exact_when_the_true_result_is_representable() {
        // (1e8+1)² − (1e8)² − 2e8 = 1 exactly; the naive dot product loses the 1.
        let a = [1e8 + 1.0, 1e8, 1e8];
        let b = [1e8 + 1.0, -1e8, -2.0];
        assert_eq!(dot(&a, &b), 1.0);
    }

    #[test]
    fn dot_split_keeps_what_rounding_to_one_double_drops() {
        // 2^53 + 1 is not representable: the sum rounds to 2^53 and the 1 stays in `lo`.
        let (hi, lo) = dot_split([(2f64.powi(53), 1.0), (1.0, 1.0)]);
        assert_eq!((hi, lo), (2f64.powi(53), 1.0));
    }

    #[test]
    fn the_split_product_is_exactly_the_fused_one() {
        // Both are error-free: for any inputs in range they must agree bit for bit.
        let mut v = 0.618_033_988_749_894_9_f64;
        for k in 0..2000 {
            v = (v * 3.7).fract() + 1e-3;
            let a = v * 10f64.powi(k % 61 - 30);
            let b = (1.0 - v) * 10f64.powi(30 - k % 47);
            assert_eq!(two_prod_split(a, b), two_prod(a, b), "{a} × {b}");
        }
    }

    #[test]
    fn lane_dot_is_as_exact_as_the_sequential_one() {
        let a = [1e8 + 1.0, 1e8, 1e8, 3.0, 1e16, -1e16, 0.5];
        let b = [1e8 + 1.0, -1e8, -2.0, 1.0, 1.0, 1.0, 2.0];
        let (hi, lo) = dot_split_lanes(&a, &b);
        assert_eq!(hi + lo, 5.0);
        let (shi, slo) = dot_split(a.iter().copied().zip(b.iter().copied()));
        assert_eq!(hi + lo, shi + slo);
    }

    #[test]
    fn power_of_two_scaling_is_exact() {
        assert_eq!(power_of_two_near(3.0), 4.0);
        assert_eq!(power_of_two_near(0.0), 1.0);
        assert_eq!(
            1.1 / power_of_two_near(1000.0) * power_of_two_near(1000.0),
            1.1
        );
        assert!(power_of_two_near(1.7e308).is_finite());
    }

    #[test]
    fn scaled_norm_survives_values_near_the_limits() {
        assert_eq!(scaled_norm([3.0, 4.0].into_iter()), 5.0);
        assert!(scaled_norm([1e200, 1e200].into_iter()).is_finite());
        assert!(scaled_norm([1e-200, 1e-200].into_iter()) > 0.0);
    }

    #[test]
    fn two_prod_recovers_the_rounding_error_of_a_product() {
        let (p, e) = two_prod(0.1, 0.1);
        assert_eq!(p, 0.1 * 0.1);
        assert!(e != 0.0 && e.abs() < 1e-17);
    }
}

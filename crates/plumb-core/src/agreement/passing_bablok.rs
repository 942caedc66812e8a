//! Passing–Bablok regression (Passing & Bablok 1983, J. Clin. Chem. Clin. Biochem. 21:709–720):
//! the slope is a shifted median of the pairwise slopes, which treats x and y alike.

use rayon::prelude::*;

use super::cusum::{cusum_linearity, Linearity};
use super::slope_rank::{PairSlopes, Tuning};
use super::{check_level, check_pairs, AgreementError};
use crate::association::kendall_tau_b;
use crate::distributions;

/// Largest n accepted by [`passing_bablok_brute`] (it stores n(n−1)/2 slopes: 64 MB at 4 000).
pub const PASSING_BABLOK_BRUTE_MAX_N: usize = 4_000;

/// A Passing–Bablok line `y = a + b·x` with x the reference method and y the new one.
#[derive(Debug, Clone, PartialEq)]
pub struct PassingBablok {
    /// `b`, the shifted median of the kept slopes `S₍₁₎ ≤ … ≤ S₍N₎`: `S₍(N+1)/2+K₎` for odd N,
    /// `½(S₍N/2+K₎ + S₍N/2+1+K₎)` for even N.
    pub slope: f64,
    /// `a = median{yᵢ − b·xᵢ}`.
    pub intercept: f64,
    /// Confidence level of the interval.
    pub level: f64,
    /// The interval of slope and intercept, or why it is not defined.
    pub interval: Result<SlopeInterval, IntervalUndefined>,
    /// Pairs of values, n.
    pub n: usize,
    /// Slopes kept, N: all pairs but identical points and slopes of exactly −1.
    pub slopes: u64,
    /// Kept slopes below −1, K (including the −∞ of equal-x pairs).
    pub below_minus_one: u64,
    /// Slopes of exactly −1 left out.
    pub minus_one: u64,
    /// The cusum check of linearity.
    pub linearity: Linearity,
    /// Kendall's τ between x and y: the method assumes a positive association.
    pub association: AssociationCheck,
}

/// The confidence interval of slope and intercept.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SlopeInterval {
    /// `b_L = S₍M₁+K₎` with `C = z_{1−(1−γ)/2}·√(n(n−1)(2n+5)/18)` and `M₁ = round((N − C)/2)`.
    pub slope_low: f64,
    /// `b_U = S₍M₂+K₎`, `M₂ = N − M₁ + 1`.
    pub slope_high: f64,
    /// `a_L = median{yᵢ − b_U·xᵢ}`.
    pub intercept_low: f64,
    /// `a_U = median{yᵢ − b_L·xᵢ}`.
    pub intercept_high: f64,
}

/// Why the interval is not defined.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum IntervalUndefined {
    /// Too few slopes for this level: `M₁ < 1` or `M₂ + K > N`.
    TooFewSlopes {
        /// `M₁ = round((N − C)/2)`.
        m1: i64,
        /// `M₂ + K`, the rank of the upper end.
        upper_rank: i64,
        /// Slopes kept, N.
        slopes: u64,
    },
    /// An end of the slope interval is infinite (pairs sharing x); the intercept has no bound.
    Unbounded,
}

/// Kendall's τ-b between the two columns.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AssociationCheck {
    /// τ-b (see [`kendall_tau_b`]).
    pub tau: f64,
    /// Its two-sided p-value.
    pub p_value: f64,
    /// `true` unless τ > 0 with p < 0.05: the positive association the method assumes is in
    /// doubt, and the line should be read with care.
    pub doubtful: bool,
}

/// Slope counts that fix which order statistics are wanted.
struct Counts {
    kept: u64,
    below: u64,
    minus_one: u64,
}

/// Passing–Bablok regression of `y` (new method) on `x` (reference method) at confidence
/// `level` (e.g. 0.95).
///
/// Slopes `Sᵢⱼ = (yⱼ − yᵢ)/(xⱼ − xᵢ)` over pairs `i < j` in row order. Identical points are
/// left out, and so are slopes exactly −1 as computed in f64. A pair with `xᵢ = xⱼ` and
/// `yᵢ ≠ yⱼ` counts as +∞ when `yⱼ > yᵢ` and −∞ otherwise (the paper's convention as recalled).
/// With N slopes kept and K of them below −1, see [`PassingBablok`] and [`SlopeInterval`] for
/// the slope, intercept and interval; `M₁` is rounded to the nearest integer, halves away
/// from zero (C is irrational for n ≥ 2, so halves do not arise in practice).
///
/// The order statistics are selected without forming every slope (see the `slope_rank`
/// module): O(n log n) per count, a few dozen counts, seeded sampling, so the result is
/// reproducible and the same as [`passing_bablok_brute`]'s (the one assumption, about slopes
/// exactly tied in exact arithmetic, is stated in that module).
///
/// # Errors
/// Fewer than 3 pairs, a non-finite value, a constant column, a level outside (0, 1), no
/// slope left, a shifted median past the slopes, or an infinite slope.
pub fn passing_bablok(x: &[f64], y: &[f64], level: f64) -> Result<PassingBablok, AgreementError> {
    passing_bablok_tuned(x, y, level, Tuning::for_n(x.len()))
}

/// [`passing_bablok`] with explicit window sizes (small ones force the narrowing in tests).
pub(super) fn passing_bablok_tuned(
    x: &[f64],
    y: &[f64],
    level: f64,
    tuning: Tuning,
) -> Result<PassingBablok, AgreementError> {
    validate(x, y, level)?;
    let pairs = PairSlopes::new(x, y, tuning);
    let (below_finite, minus_one) = pairs.minus_one();
    let eq = pairs.equal_x;
    let n = x.len() as u64;
    let counts = Counts {
        kept: n * (n - 1) / 2 - eq.identical - minus_one,
        below: eq.down + below_finite,
        minus_one,
    };
    let (below, e) = (counts.below, counts.minus_one);
    finish(x, y, level, counts, |ranks| {
        // Kept rank → rank among all slopes (the −1s sit just after the K below) → value.
        let at = |r: u64| -> Result<u64, f64> {
            let all = if r <= below { r } else { r + e };
            if all <= eq.down {
                Err(f64::NEG_INFINITY)
            } else if all > eq.down + pairs.finite {
                Err(f64::INFINITY)
            } else {
                Ok(all - eq.down)
            }
        };
        // Neighbouring finite ranks (the two middle slopes) are selected together.
        let mut tasks: Vec<(u64, u64)> = Vec::new();
        for &r in ranks {
            if let Ok(f) = at(r) {
                match tasks.last_mut() {
                    Some(t) if f == t.1 + 1 && t.1 == t.0 => t.1 = f,
                    _ => tasks.push((f, f)),
                }
            }
        }
        let found: Vec<Vec<f64>> = tasks
            .par_iter()
            .map(|&(a, b)| pairs.select(a, b, 0x5EED_0000 ^ a))
            .collect();
        ranks
            .iter()
            .map(|&r| match at(r) {
                Err(v) => v,
                Ok(f) => {
                    let (i, t) = tasks
                        .iter()
                        .enumerate()
                        .find(|(_, t)| t.0 <= f && f <= t.1)
                        .expect("every finite rank has a task");
                    found[i][(f - t.0) as usize]
                }
            })
            .collect()
    })
}

/// Passing–Bablok by forming, sorting and indexing all n(n−1)/2 slopes: the reference for
/// tests and benchmarks of [`passing_bablok`], limited to [`PASSING_BABLOK_BRUTE_MAX_N`] pairs.
///
/// # Errors
/// As [`passing_bablok`], and more than [`PASSING_BABLOK_BRUTE_MAX_N`] pairs.
pub fn passing_bablok_brute(
    x: &[f64],
    y: &[f64],
    level: f64,
) -> Result<PassingBablok, AgreementError> {
    validate(x, y, level)?;
    let n = x.len();
    if n > PASSING_BABLOK_BRUTE_MAX_N {
        return Err(AgreementError::TooLarge {
            n,
            max: PASSING_BABLOK_BRUTE_MAX_N,
        });
    }
    let mut slopes = Vec::with_capacity(n * (n - 1) / 2);
    let mut minus_one = 0u64;
    for i in 0..n {
        for j in i + 1..n {
            let (dx, dy) = (x[j] - x[i], y[j] - y[i]);
            let s = if dx == 0.0 {
                if dy == 0.0 {
                    continue;
                }
                if dy > 0.0 {
                    f64::INFINITY
                } else {
                    f64::NEG_INFINITY
                }
            } else {
                dy / dx
            };
            if s == -1.0 {
                minus_one += 1;
            } else {
                slopes.push(s);
            }
        }
    }
    slopes.sort_unstable_by(f64::total_cmp);
    let counts = Counts {
        kept: slopes.len() as u64,
        below: slopes.partition_point(|&s| s < -1.0) as u64,
        minus_one,
    };
    finish(x, y, level, counts, |ranks| {
        ranks.iter().map(|&r| slopes[r as usize - 1]).collect()
    })
}

fn validate(x: &[f64], y: &[f64], level: f64) -> Result<(), AgreementError> {
    check_pairs(x, y, 3)?;
    check_level("confidence level", level)?;
    for (column, v) in [("x", x), ("y", y)] {
        if v.iter().all(|&a| a == v[0]) {
            return Err(AgreementError::Constant {
                column,
                value: v[0],
            });
        }
    }
    Ok(())
}

/// Everything after the slope counts: ranks, the order statistics (from `select`, given
/// 1-based ranks among the kept slopes), intercepts, the interval and the checks.
fn finish(
    x: &[f64],
    y: &[f64],
    level: f64,
    counts: Counts,
    select: impl FnOnce(&[u64]) -> Vec<f64>,
) -> Result<PassingBablok, AgreementError> {
    let Counts {
        kept,
        below,
        minus_one,
    } = counts;
    if kept == 0 {
        return Err(AgreementError::NoSlopes);
    }
    let mut ranks = if kept % 2 == 1 {
        vec![kept.div_ceil(2) + below]
    } else {
        vec![kept / 2 + below, kept / 2 + 1 + below]
    };
    if ranks.iter().any(|&r| r > kept) {
        return Err(AgreementError::ShiftOutOfRange {
            slopes: kept,
            below_minus_one: below,
        });
    }
    let middle = ranks.len();
    let nf = x.len() as f64;
    let z = distributions::normal_upper_quantile(0.5 * (1.0 - level));
    let c = z * (nf * (nf - 1.0) * (2.0 * nf + 5.0) / 18.0).sqrt();
    let m1 = ((kept as f64 - c) / 2.0).round() as i64;
    let m2 = kept as i64 - m1 + 1;
    let upper_rank = m2 + below as i64;
    let defined = m1 >= 1 && upper_rank <= kept as i64;
    if defined {
        ranks.extend([(m1 + below as i64) as u64, upper_rank as u64]);
    }
    let values = select(&ranks);
    let slope = if middle == 1 {
        values[0]
    } else {
        0.5 * (values[0] + values[1])
    };
    if !slope.is_finite() {
        return Err(AgreementError::VerticalLine);
    }
    let intercept = median_offset(x, y, slope);
    let interval = if !defined {
        Err(IntervalUndefined::TooFewSlopes {
            m1,
            upper_rank,
            slopes: kept,
        })
    } else {
        let (lo, hi) = (values[middle], values[middle + 1]);
        if lo.is_finite() && hi.is_finite() {
            Ok(SlopeInterval {
                slope_low: lo,
                slope_high: hi,
                intercept_low: median_offset(x, y, hi),
                intercept_high: median_offset(x, y, lo),
            })
        } else {
            Err(IntervalUndefined::Unbounded)
        }
    };
    let association = match kendall_tau_b(x, y) {
        Ok(a) => AssociationCheck {
            tau: a.r,
            p_value: a.p_value,
            doubtful: !(a.r > 0.0 && a.p_value < 0.05),
        },
        Err(_) => AssociationCheck {
            tau: f64::NAN,
            p_value: f64::NAN,
            doubtful: true,
        },
    };
    Ok(PassingBablok {
        slope,
        intercept,
        level,
        interval,
        n: x.len(),
        slopes: kept,
        below_minus_one: below,
        minus_one,
        linearity: cusum_linearity(x, y, intercept, slope),
        association,
    })
}

/// `median{yᵢ − b·xᵢ}`.
fn median_offset(x: &[f64], y: &[f64], b: f64) -> f64 {
    let mut v: Vec<f64> = x.iter().zip(y).map(|(xi, yi)| yi - b * xi).collect();
    let (n, m) = (v.len(), v.len() / 2);
    let (lower, &mut mid, _) = v.select_nth_unstable_by(m, f64::total_cmp);
    if n % 2 == 1 {
        mid
    } else {
        0.5 * (mid + lower.iter().copied().fold(f64::NEG_INFINITY, f64::max))
    }
}

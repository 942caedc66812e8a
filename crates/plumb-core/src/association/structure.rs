//! Structure a straight line misses: a pair whose distance correlation stands well above |r|
//! (a ring, a V, a curve that turns back on itself), looked for over every pair of a set of
//! columns within a work budget.

use rayon::prelude::*;

use super::matrix::{complete_pairs, DISTANCE_SEED};
use super::{
    distance_correlation, distance_correlation_coefficient, pearson, DISTANCE_PERMUTATIONS,
};

/// How far distance correlation must stand above |r| for the pair to be a candidate. For a
/// straight-line relation with normal scatter dCor sits at or a little below |r| (r = 0.6:
/// dCor ≈ 0.57), so a gap this large takes a shape the line cannot follow; a ring, the
/// flattest such shape, gives about 0.19 against |r| ≈ 0. A choice of this project, no source.
pub const STRUCTURE_GAP: f64 = 0.15;
/// A candidate is flagged when its permutation p-value of distance correlation is at most
/// this (small samples inflate dCor even without any dependence). Unadjusted across pairs:
/// the flag is a cue to look at the pair, not a finding (dCor has little power against a
/// ring: the field survey's, 160 rows, gives p ≈ 0.03). A choice of this project, no source.
pub const STRUCTURE_ALPHA: f64 = 0.05;
/// Work a scan may do, in distance terms `|xᵢ − xⱼ|·|yᵢ − yⱼ|` (about a second on one core
/// of a current laptop). A choice of this project, no source.
pub const STRUCTURE_BUDGET: u64 = 400_000_000;
/// Passes over the n² distances one coefficient takes: two row-mean passes, two distance
/// variances and the distance covariance.
const COEFFICIENT_PASSES: u64 = 5;
/// Passes one permutation test takes: the coefficient and one covariance per permutation.
const PERMUTATION_PASSES: u64 = COEFFICIENT_PASSES + DISTANCE_PERMUTATIONS as u64;

/// Pearson r and distance correlation of one pair, on its complete rows.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StructureCheck {
    /// Pearson r.
    pub r: f64,
    /// Distance correlation (see [`distance_correlation`]).
    pub dcor: f64,
    /// Permutation p-value of dCor, computed only for candidates the budget reached.
    pub p_value: Option<f64>,
    /// Complete pairs used.
    pub n: usize,
}

impl StructureCheck {
    /// The coefficients of `x` and `y`, no permutations; `None` where either is undefined (a
    /// constant column, fewer than 3 pairs, more than [`super::DISTANCE_MAX_N`] pairs).
    pub fn of(x: &[f64], y: &[f64]) -> Option<Self> {
        let r = pearson(x, y, 0.95).ok()?.r;
        let dcor = distance_correlation_coefficient(x, y)?;
        Some(Self {
            r,
            dcor,
            p_value: None,
            n: x.len(),
        })
    }

    /// `dCor − |r|`.
    pub fn gap(&self) -> f64 {
        self.dcor - self.r.abs()
    }

    /// Whether the gap reaches [`STRUCTURE_GAP`] (worth a permutation test).
    pub fn is_candidate(&self) -> bool {
        self.gap() >= STRUCTURE_GAP
    }

    /// The flag: `dCor − |r| ≥` [`STRUCTURE_GAP`] and permutation `p ≤` [`STRUCTURE_ALPHA`].
    pub fn flagged(&self) -> bool {
        self.is_candidate() && self.p_value.is_some_and(|p| p <= STRUCTURE_ALPHA)
    }

    /// Runs the seeded permutation test of dCor (the matrix's seed).
    fn confirm(&mut self, x: &[f64], y: &[f64]) {
        self.p_value = distance_correlation(x, y, DISTANCE_SEED)
            .ok()
            .map(|a| a.p_value);
    }
}

/// [`StructureCheck::of`] with the permutation test run when the pair is a candidate.
pub fn structure_check(x: &[f64], y: &[f64]) -> Option<StructureCheck> {
    let mut c = StructureCheck::of(x, y)?;
    if c.is_candidate() {
        c.confirm(x, y);
    }
    Some(c)
}

/// The checks of every pair of a set of columns.
#[derive(Debug, Clone, PartialEq)]
pub enum StructureScan {
    /// Done: a symmetric grid (`None` on the diagonal and where undefined).
    Done {
        /// The checks.
        cells: Vec<Vec<Option<StructureCheck>>>,
        /// Candidates whose permutation test the budget did not reach (never flagged).
        unconfirmed: usize,
        /// Pairs with more complete rows than distance correlation takes
        /// ([`super::DISTANCE_MAX_N`]): not checked, and not charged to the budget.
        too_large: usize,
    },
    /// Not done: the coefficients alone would exceed the budget.
    Skipped {
        /// Distance terms the coefficients would take.
        cost: u64,
        /// The budget.
        budget: u64,
    },
}

impl StructureScan {
    /// The check of columns `i` and `j`, if done and defined.
    pub fn cell(&self, i: usize, j: usize) -> Option<&StructureCheck> {
        match self {
            Self::Done { cells, .. } => cells.get(i)?.get(j)?.as_ref(),
            Self::Skipped { .. } => None,
        }
    }
}

/// Checks every pair of `columns` on its complete rows (both cells finite; NaN marks a missing
/// cell) within
/// `budget` distance terms: the coefficients cost `5·n²` a pair and run only when all of them
/// fit; then candidates are tested, largest gap first, at `(5 + R)·n²` each
/// (`R =` [`DISTANCE_PERMUTATIONS`]) while the budget lasts.
pub fn structure_scan(columns: &[&[f64]], budget: u64) -> StructureScan {
    let k = columns.len();
    let mut complete = vec![vec![0usize; k]; k];
    for i in 0..k {
        for j in i + 1..k {
            let n = complete_count(columns[i], columns[j]) as usize;
            complete[i][j] = n;
            complete[j][i] = n;
        }
    }
    structure_scan_counted(columns, &complete, budget)
}

/// [`structure_scan`] with each pair's complete rows already counted (`complete[i][j]`, as a
/// correlation matrix of the same columns holds them): a wide table then costs no pass over
/// its rows before the budget is checked.
pub fn structure_scan_counted(
    columns: &[&[f64]],
    complete: &[Vec<usize>],
    budget: u64,
) -> StructureScan {
    let k = columns.len();
    let pairs: Vec<(usize, usize)> = (0..k)
        .flat_map(|i| (i + 1..k).map(move |j| (i, j)))
        .collect();
    let counts: Vec<u64> = pairs.iter().map(|&(i, j)| complete[i][j] as u64).collect();
    let fits = |n: u64| n <= super::DISTANCE_MAX_N as u64;
    let too_large = counts.iter().filter(|&&n| !fits(n)).count();
    let cost = counts
        .iter()
        .filter(|&&n| fits(n))
        .fold(0u64, |s, &n| s.saturating_add(COEFFICIENT_PASSES * n * n));
    if cost > budget {
        return StructureScan::Skipped { cost, budget };
    }
    let mut checks: Vec<Option<StructureCheck>> = pairs
        .par_iter()
        .zip(&counts)
        .map(|(&(i, j), &n)| {
            if !fits(n) {
                return None;
            }
            let (x, y) = complete_pairs(columns[i], columns[j]);
            StructureCheck::of(&x, &y)
        })
        .collect();
    let (chosen, unconfirmed) = within_budget(&checks, &counts, budget - cost);
    let tested: Vec<(usize, StructureCheck)> = chosen
        .par_iter()
        .filter_map(|&p| {
            let (i, j) = pairs[p];
            let (x, y) = complete_pairs(columns[i], columns[j]);
            let mut c = checks[p]?;
            c.confirm(&x, &y);
            Some((p, c))
        })
        .collect();
    for (p, c) in tested {
        checks[p] = Some(c);
    }
    let mut cells = vec![vec![None; k]; k];
    for (&(i, j), c) in pairs.iter().zip(checks) {
        cells[i][j] = c;
        cells[j][i] = c;
    }
    StructureScan::Done {
        cells,
        unconfirmed,
        too_large,
    }
}

/// The candidates to test, largest gap first, while `left` lasts; and how many were left out.
fn within_budget(
    checks: &[Option<StructureCheck>],
    counts: &[u64],
    mut left: u64,
) -> (Vec<usize>, usize) {
    let mut candidates: Vec<usize> = (0..checks.len())
        .filter(|&p| checks[p].is_some_and(|c| c.is_candidate()))
        .collect();
    let gap = |p: usize| checks[p].map_or(0.0, |c| c.gap());
    candidates.sort_by(|&a, &b| gap(b).total_cmp(&gap(a)));
    let mut chosen = Vec::new();
    let mut unconfirmed = 0;
    for p in candidates {
        let cost = PERMUTATION_PASSES * counts[p] * counts[p];
        if cost <= left {
            left -= cost;
            chosen.push(p);
        } else {
            unconfirmed += 1;
        }
    }
    (chosen, unconfirmed)
}

fn complete_count(a: &[f64], b: &[f64]) -> u64 {
    a.iter()
        .zip(b)
        .filter(|(x, y)| x.is_finite() && y.is_finite())
        .count() as u64
}

#[cfg(test)]
mod tests {

    #[test]
    fn counts_given_or_worked_out_give_the_same_scan() {
        let cols = columns();
        let refs: Vec<&[f64]> = cols.iter().map(Vec::as_slice).collect();
        let m = crate::association::correlation_matrix(
            &refs,
            crate::association::Method::Pearson,
            crate::association::Adjustment::None,
            None,
        );
        assert_eq!(
            structure_scan_counted(&refs, &m.n, STRUCTURE_BUDGET),
            structure_scan(&refs, STRUCTURE_BUDGET)
        );
    }

    #[test]
    fn pairs_too_large_for_distance_correlation_are_counted_not_claimed() {
        let n = super::super::DISTANCE_MAX_N + 1;
        let a: Vec<f64> = (0..n).map(|i| i as f64).collect();
        let b: Vec<f64> = (0..n).map(|i| ((i * 7) % 13) as f64).collect();
        let StructureScan::Done {
            cells, too_large, ..
        } = structure_scan(&[&a, &b], 1)
        else {
            panic!("a pair too large costs nothing, so the scan is done");
        };
        assert_eq!(too_large, 1);
        assert!(cells[0][1].is_none(), "not checked");
    }

    use super::*;
    use rand::{Rng, SeedableRng};
    use rand_chacha::ChaCha8Rng;

    fn grid(n: usize) -> Vec<f64> {
        (0..n)
            .map(|i| -1.0 + 2.0 * i as f64 / (n - 1) as f64)
            .collect()
    }

    #[test]
    fn fires_on_a_curve_that_r_misses() {
        // A parabola over a symmetric range: r is 0 by symmetry, the dependence is exact.
        let x = grid(41);
        let y: Vec<f64> = x.iter().map(|v| v * v).collect();
        let c = structure_check(&x, &y).expect("defined");
        assert!(c.r.abs() < 1e-9, "r {}", c.r);
        assert!(c.dcor > 0.4, "dCor {}", c.dcor);
        assert!(c.flagged(), "{c:?}");
    }

    #[test]
    fn fires_on_a_noisy_ring() {
        let mut rng = ChaCha8Rng::seed_from_u64(5);
        let (x, y): (Vec<f64>, Vec<f64>) = (0..160)
            .map(|_| {
                let a = rng.random_range(0.0..std::f64::consts::TAU);
                (
                    a.cos() + rng.random_range(-0.1..0.1),
                    a.sin() + rng.random_range(-0.1..0.1),
                )
            })
            .unzip();
        let c = structure_check(&x, &y).expect("defined");
        assert!(c.r.abs() < 0.15 && c.flagged(), "{c:?}");
    }

    #[test]
    fn stays_quiet_on_a_straight_line_and_on_noise() {
        let mut rng = ChaCha8Rng::seed_from_u64(11);
        let x = grid(60);
        let line: Vec<f64> = x
            .iter()
            .map(|v| 2.0 * v + 1.0 + rng.random_range(-0.3..0.3))
            .collect();
        let c = structure_check(&x, &line).expect("defined");
        assert!(c.r > 0.9 && !c.flagged(), "{c:?}");
        for seed in 0..12 {
            let mut rng = ChaCha8Rng::seed_from_u64(seed);
            let a: Vec<f64> = (0..30).map(|_| rng.random_range(0.0..1.0)).collect();
            let b: Vec<f64> = (0..30).map(|_| rng.random_range(0.0..1.0)).collect();
            let c = structure_check(&a, &b).expect("defined");
            assert!(!c.flagged(), "seed {seed}: {c:?}");
        }
    }

    fn columns() -> Vec<Vec<f64>> {
        let x = grid(41);
        vec![
            x.clone(),
            x.iter().map(|&v| v * v).collect(),
            x.iter().map(|&v| 3.0 * v - 1.0).collect(),
        ]
    }

    #[test]
    fn a_scan_is_symmetric_and_flags_only_the_curve() {
        let cols = columns();
        let refs: Vec<&[f64]> = cols.iter().map(Vec::as_slice).collect();
        let scan = structure_scan(&refs, STRUCTURE_BUDGET);
        let flagged = |i, j| scan.cell(i, j).is_some_and(StructureCheck::flagged);
        assert!(flagged(0, 1) && flagged(1, 0) && flagged(2, 1));
        assert!(!flagged(0, 2), "a straight line");
        assert!(scan.cell(0, 0).is_none(), "nothing on the diagonal");
        assert_eq!(scan.cell(0, 1).map(|c| c.n), Some(41));
    }

    #[test]
    fn the_budget_skips_the_scan_or_leaves_candidates_unconfirmed() {
        let cols = columns();
        let refs: Vec<&[f64]> = cols.iter().map(Vec::as_slice).collect();
        let coefficients = 3 * COEFFICIENT_PASSES * 41 * 41;
        assert_eq!(
            structure_scan(&refs, coefficients - 1),
            StructureScan::Skipped {
                cost: coefficients,
                budget: coefficients - 1
            }
        );
        let StructureScan::Done {
            cells, unconfirmed, ..
        } = structure_scan(&refs, coefficients)
        else {
            panic!("the coefficients fit the budget");
        };
        assert_eq!(
            unconfirmed, 2,
            "both curve pairs are candidates, none tested"
        );
        assert!(cells.iter().flatten().flatten().all(|c| !c.flagged()));
    }
}

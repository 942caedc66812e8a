//! The correlation matrix of many columns, pairwise complete, with adjusted p-values.

/// Seed of the permutation p-values of distance correlation in a matrix.
pub const DISTANCE_SEED: u64 = 0x5EED_D15C;

use rayon::prelude::*;

use super::{
    adjust_p_values, average_ranks, distance_correlation, kendall_tau_b, pearson,
    pearson_from_moments, spearman, trend_guard, Adjustment, Association, Pairwise,
};
use crate::moments::CoMoments;

/// Which coefficient fills the matrix.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Method {
    /// Pearson's r.
    Pearson,
    /// Spearman's ρ.
    Spearman,
    /// Kendall's τ-b.
    Kendall,
    /// Distance correlation, with a seeded permutation p-value.
    Distance,
}

impl Method {
    /// Lower-case name used in output.
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Pearson => "pearson",
            Self::Spearman => "spearman",
            Self::Kendall => "kendall",
            Self::Distance => "distance",
        }
    }

    /// The coefficient of one pair.
    pub fn compute(self, x: &[f64], y: &[f64]) -> Pairwise {
        match self {
            Self::Pearson => pearson(x, y, 0.95),
            Self::Spearman => spearman(x, y),
            Self::Kendall => kendall_tau_b(x, y),
            Self::Distance => distance_correlation(x, y, DISTANCE_SEED),
        }
    }
}

/// Square matrices over `k` columns; `None` where a cell is undefined (see `reason`).
#[derive(Debug, Clone, PartialEq)]
pub struct CorrelationMatrix {
    /// The coefficient.
    pub r: Vec<Vec<Option<f64>>>,
    /// Unadjusted two-sided p-value (`None` on the diagonal).
    pub p_value: Vec<Vec<Option<f64>>>,
    /// p-value adjusted across the `n_tests` off-diagonal pairs.
    pub p_adjusted: Vec<Vec<Option<f64>>>,
    /// Complete pairs used.
    pub n: Vec<Vec<usize>>,
    /// 95% interval of the coefficient where the method gives one (Pearson: Fisher's z).
    pub ci: Vec<Vec<Option<(f64, f64)>>>,
    /// Why a cell is undefined (`None` where defined).
    pub reason: Vec<Vec<Option<String>>>,
    /// Pairs tested (defined off-diagonal cells, each counted once).
    pub n_tests: usize,
    /// With an order column: Pearson r of first differences (see [`super::TrendGuard`]).
    pub r_differenced: Option<Vec<Vec<Option<f64>>>>,
    /// With an order column: Pearson r after a linear trend on the order is removed from each.
    pub r_detrended: Option<Vec<Vec<Option<f64>>>>,
}

/// Most columns a matrix is computed for: k columns make k² cells (1000 columns: a million
/// cells, about 136 MB held ([`MatrixSize::bytes`]), and several times that as pretty JSON).
/// Wider tables must name the columns to compare. A choice of this project, no source.
pub const MATRIX_MAX_COLUMNS: usize = 1000;

/// What a matrix over `k` columns would cost, estimated before it is computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct MatrixSize {
    /// Columns.
    pub columns: usize,
    /// Cells, k².
    pub cells: u64,
    /// Distinct pairs, k(k − 1)/2.
    pub pairs: u64,
    /// Bytes the filled matrix holds: cells × the size of one cell's coefficient, p-values,
    /// count, interval, reason and trend guards (texts of reasons not counted).
    pub bytes: u64,
}

impl MatrixSize {
    /// The estimate for `k` columns.
    pub fn of(k: usize) -> Self {
        let k = k as u64;
        let cell = 3 * size_of::<Option<f64>>()
            + size_of::<usize>()
            + size_of::<Option<(f64, f64)>>()
            + size_of::<Option<String>>()
            + 2 * size_of::<Option<f64>>();
        Self {
            columns: k as usize,
            cells: k.saturating_mul(k),
            pairs: k.saturating_mul(k.saturating_sub(1)) / 2,
            bytes: k.saturating_mul(k).saturating_mul(cell as u64),
        }
    }

    /// Whether the matrix is within [`MATRIX_MAX_COLUMNS`].
    pub fn is_allowed(&self) -> bool {
        self.columns <= MATRIX_MAX_COLUMNS
    }
}

/// Fills the matrix with `method` over pairwise-complete rows (a row counts for a pair when
/// both of its cells are finite; NaN marks a missing cell) and adjusts the p-values of all defined pairs
/// (when more than one pair is tested). With `order`, also fills the trend guards, on rows
/// where the order is known too.
pub fn correlation_matrix(
    columns: &[&[f64]],
    method: Method,
    adjust: Adjustment,
    order: Option<&[f64]>,
) -> CorrelationMatrix {
    let k = columns.len();
    let guard_cells = || Some(vec![vec![None; k]; k]);
    let mut m = CorrelationMatrix {
        r: vec![vec![None; k]; k],
        p_value: vec![vec![None; k]; k],
        p_adjusted: vec![vec![None; k]; k],
        n: vec![vec![0; k]; k],
        ci: vec![vec![None; k]; k],
        reason: vec![vec![None; k]; k],
        n_tests: 0,
        r_differenced: order.and(guard_cells()),
        r_detrended: order.and(guard_cells()),
    };
    let moments = complete_moments(columns, method);
    let mut tested = Vec::new();
    for i in 0..k {
        m.n[i][i] = columns[i].iter().filter(|v| v.is_finite()).count();
        m.r[i][i] = Some(1.0);
        for j in i + 1..k {
            // A column against its own ordering variable is a trend by definition: the
            // order column itself gets no guard, so no shared-trend cue can name it.
            if let Some(t) = order.filter(|t| !is_order(columns[i], t) && !is_order(columns[j], t))
            {
                fill_guards(&mut m, i, j, columns[i], columns[j], t);
            }
            let (n, result) = pair_cell(columns, method, moments.as_ref(), i, j);
            m.n[i][j] = n;
            m.n[j][i] = n;
            match result {
                Ok(a) => {
                    for (a_, b_) in [(i, j), (j, i)] {
                        m.r[a_][b_] = Some(a.r);
                        m.p_value[a_][b_] = Some(a.p_value);
                        m.ci[a_][b_] = a.ci;
                    }
                    tested.push((i, j, a.p_value));
                }
                Err(why) => {
                    m.reason[i][j] = Some(why.to_string());
                    m.reason[j][i] = Some(why.to_string());
                }
            }
        }
    }
    adjust_all(&mut m, &tested, adjust);
    m
}

/// Complete columns under Pearson or Spearman: the co-moments of every column at once (of the
/// values, or of each column's ranks, ranked once), from one blocked pass.
fn complete_moments(columns: &[&[f64]], method: Method) -> Option<CoMoments> {
    match method {
        Method::Pearson => CoMoments::of_complete(columns),
        Method::Spearman => complete_values(columns).map(|mut values| {
            values.par_iter_mut().for_each(|v| *v = average_ranks(v));
            let refs: Vec<&[f64]> = values.iter().map(Vec::as_slice).collect();
            CoMoments::of(&refs)
        }),
        _ => None,
    }
}

/// The rows used and the coefficient of columns `i` and `j`: from the shared co-moments when
/// there are any, else from the pair's complete rows.
fn pair_cell(
    columns: &[&[f64]],
    method: Method,
    moments: Option<&CoMoments>,
    i: usize,
    j: usize,
) -> (usize, Pairwise) {
    match moments {
        Some(mo) => (
            mo.n() as usize,
            // Spearman's p is Pearson's t approximation on the ranks, with no interval.
            pearson_from_moments(mo, i, j, 0.95).map(|a| match method {
                Method::Spearman => Association { ci: None, ..a },
                _ => a,
            }),
        ),
        None => {
            let (x, y) = complete_pairs(columns[i], columns[j]);
            (x.len(), method.compute(&x, &y))
        }
    }
}

/// Adjusts the p-values of every tested pair together (when more than one was tested).
fn adjust_all(m: &mut CorrelationMatrix, tested: &[(usize, usize, f64)], adjust: Adjustment) {
    m.n_tests = tested.len();
    let raw: Vec<f64> = tested.iter().map(|t| t.2).collect();
    let method = if tested.len() > 1 {
        adjust
    } else {
        Adjustment::None
    };
    for ((i, j, _), p) in tested.iter().zip(adjust_p_values(&raw, method)) {
        m.p_adjusted[*i][*j] = Some(p);
        m.p_adjusted[*j][*i] = Some(p);
    }
}

fn fill_guards(m: &mut CorrelationMatrix, i: usize, j: usize, a: &[f64], b: &[f64], t: &[f64]) {
    let finite = |v: &f64| v.is_finite().then_some(*v);
    let ((x, y), order): ((Vec<f64>, Vec<f64>), Vec<f64>) = a
        .iter()
        .zip(b)
        .zip(t)
        .filter_map(|((x, y), t)| Some(((finite(x)?, finite(y)?), finite(t)?)))
        .unzip();
    let g = trend_guard(&x, &y, &order);
    for (cells, value) in [
        (&mut m.r_differenced, g.r_differenced),
        (&mut m.r_detrended, g.r_detrended),
    ] {
        if let Some(cells) = cells {
            cells[i][j] = value;
            cells[j][i] = value;
        }
    }
}

/// Whether `column` holds the same cells as the row order `t` (it is the order column).
fn is_order(column: &[f64], t: &[f64]) -> bool {
    column.len() == t.len()
        && column
            .iter()
            .zip(t)
            .all(|(a, b)| a.to_bits() == b.to_bits() || (a.is_nan() && b.is_nan()))
}

impl CorrelationMatrix {
    /// Whether columns `i` and `j` move together mostly through a drift they share along the
    /// row order ([`super::drifts_together`] on this cell's coefficient and guards); never for
    /// the order column itself, which has no guards.
    pub fn drifts_together(&self, i: usize, j: usize) -> bool {
        let guard = |g: &Option<Vec<Vec<Option<f64>>>>| g.as_ref().and_then(|g| g[i][j]);
        i != j
            && super::drifts_together(
                self.r[i][j],
                guard(&self.r_differenced),
                guard(&self.r_detrended),
            )
    }
}

/// The columns as plain values when every cell of every column is finite.
fn complete_values(columns: &[&[f64]]) -> Option<Vec<Vec<f64>>> {
    columns
        .iter()
        .map(|c| c.iter().all(|v| v.is_finite()).then(|| c.to_vec()))
        .collect()
}

/// The rows where both cells are finite.
pub(super) fn complete_pairs(a: &[f64], b: &[f64]) -> (Vec<f64>, Vec<f64>) {
    a.iter()
        .zip(b)
        .filter(|(x, y)| x.is_finite() && y.is_finite())
        .map(|(x, y)| (*x, *y))
        .unzip()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn complete_columns_take_the_one_pass_path_with_the_same_answers() {
        let a: Vec<f64> = (0..500).map(|i| f64::from(i).sin()).collect();
        let b: Vec<f64> = (0..500)
            .map(|i| f64::from(i).cos() + 0.001 * f64::from(i))
            .collect();
        let c: Vec<f64> = (0..500).map(|i| f64::from(i % 7)).collect();
        for method in [Method::Pearson, Method::Spearman] {
            same_with_and_without_a_gap(&a, &b, &c, method);
        }
    }

    fn same_with_and_without_a_gap(a: &[f64], b: &[f64], c: &[f64], method: Method) {
        let fast = correlation_matrix(&[a, b, c], method, Adjustment::Holm, None);
        // One missing cell far from the others forces the pairwise path on nearly the same rows.
        let mut c_gap = c.to_vec();
        c_gap.push(f64::NAN);
        let (mut a2, mut b2) = (a.to_vec(), b.to_vec());
        a2.push(0.5);
        b2.push(0.5);
        let slow = correlation_matrix(&[&a2, &b2, &c_gap], method, Adjustment::Holm, None);
        for i in 0..3 {
            for j in 0..3 {
                if i != j && (i == 2 || j == 2) {
                    let (f, s) = (fast.r[i][j].expect("r"), slow.r[i][j].expect("r"));
                    assert!((f - s).abs() < 1e-12, "{i},{j}: {f} vs {s}");
                    assert_eq!(fast.n[i][j], slow.n[i][j]);
                    assert_eq!(fast.ci[i][j].is_some(), slow.ci[i][j].is_some());
                    let (fp, sp) = (
                        fast.p_value[i][j].expect("p"),
                        slow.p_value[i][j].expect("p"),
                    );
                    assert!(
                        (fp - sp).abs() <= 1e-9 * sp.max(1e-300),
                        "{i},{j}: p {fp} vs {sp}"
                    );
                }
            }
        }
        assert_eq!(fast.n_tests, 3);
    }

    #[test]
    fn the_order_column_never_drifts_with_anything() {
        // Irregular steps in the order, so its first differences vary and a guard could be
        // computed for it; two series that climb with it share the trend.
        let t: Vec<f64> = (0..40)
            .map(|i| f64::from(i) + 0.4 * f64::from(i % 3))
            .collect();
        let a: Vec<f64> = t
            .iter()
            .enumerate()
            .map(|(i, v)| v + (i as f64 * 1.7).sin())
            .collect();
        let b: Vec<f64> = t
            .iter()
            .enumerate()
            .map(|(i, v)| 2.0 * v + (i as f64 * 0.9 + 1.0).cos())
            .collect();
        let m = correlation_matrix(&[&t, &a, &b], Method::Pearson, Adjustment::Holm, Some(&t));
        assert!(m.drifts_together(1, 2), "the two series share the trend");
        for j in 0..3 {
            assert!(
                !m.drifts_together(0, j) && !m.drifts_together(j, 0),
                "order with {j}"
            );
            assert_eq!(m.r_differenced.as_ref().expect("guards")[0][j], None);
        }
        assert!(!m.drifts_together(1, 1), "never on the diagonal");
    }

    #[test]
    fn matrix_is_symmetric_and_counts_its_tests() {
        let a = [1.0, 2.0, 3.0, 4.0, f64::NAN];
        let b = [2.0, 1.0, 4.0, 3.0, 5.0];
        let c = [7.0; 5];
        let m = correlation_matrix(&[&a, &b, &c], Method::Pearson, Adjustment::Holm, None);
        assert_eq!(m.r[0][1], m.r[1][0]);
        assert_eq!(m.n[0][1], 4);
        assert_eq!(m.n_tests, 1, "pairs with the constant column are undefined");
        assert!(m.reason[0][2]
            .as_deref()
            .is_some_and(|r| r.contains("does not vary")));
        assert_eq!(
            m.p_adjusted[0][1], m.p_value[0][1],
            "one test: nothing to adjust"
        );
    }

    #[test]
    fn the_size_estimate_grows_as_k_squared_and_the_cap_is_on_columns() {
        let small = MatrixSize::of(10);
        assert_eq!((small.cells, small.pairs), (100, 45));
        let wide = MatrixSize::of(20_000);
        assert_eq!(wide.cells, 400_000_000);
        assert_eq!(wide.bytes, small.bytes * 4_000_000);
        assert!(
            wide.bytes > 10_000_000_000,
            "20 000 columns need tens of GB"
        );
        assert!(MatrixSize::of(MATRIX_MAX_COLUMNS).is_allowed());
        assert!(!MatrixSize::of(MATRIX_MAX_COLUMNS + 1).is_allowed());
        assert_eq!(
            MatrixSize::of(usize::MAX).cells,
            u64::MAX,
            "saturates, no overflow"
        );
    }
}

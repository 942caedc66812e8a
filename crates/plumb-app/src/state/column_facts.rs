//! What the columns screen shows of each column beyond its type and range: the mean, the
//! standard deviation and a small histogram of a numeric column (computed once, when the file
//! is read), and whether a text column could name the rows.

use plumb_data::{Column, ColumnValues, Numbers};

/// Most bars of a column's small histogram.
pub const MAX_BINS: usize = 20;

/// Mean, standard deviation and histogram of a numeric column's finite values.
#[derive(Debug, Clone, PartialEq)]
pub struct NumericFacts {
    /// Finite values.
    pub n: usize,
    /// Their mean `x̄ = Σxᵢ / n` (`plumb_core::describe::mean`).
    pub mean: f64,
    /// Their standard deviation `s = √(Σ(xᵢ − x̄)² / (n − 1))` (NaN below two values).
    pub sd: f64,
    /// Equal-width bins over `[low, high]`.
    pub bins: Bins,
}

/// Counts of values in equal-width bins.
#[derive(Debug, Clone, PartialEq)]
pub struct Bins {
    /// Left edge of the first bin (the smallest value).
    pub low: f64,
    /// Right edge of the last bin (the largest value).
    pub high: f64,
    /// Values per bin.
    pub counts: Vec<u32>,
}

impl NumericFacts {
    /// The facts of `values` (`None` without a finite value).
    pub fn of(values: &Numbers) -> Option<Self> {
        let all = values.as_nan_missing();
        // A complete column is read where it lies; only one with gaps is copied.
        let finite: std::borrow::Cow<'_, [f64]> = if all.iter().all(|v| v.is_finite()) {
            all.into()
        } else {
            all.iter().copied().filter(|v| v.is_finite()).collect()
        };
        if finite.is_empty() {
            return None;
        }
        let n = finite.len();
        let sd = if n < 2 {
            f64::NAN
        } else {
            plumb_core::describe::root_sum_sq_dev(&finite, None) / ((n - 1) as f64).sqrt()
        };
        Some(Self {
            n,
            mean: plumb_core::describe::mean(&finite, None),
            sd,
            bins: Bins::of(&finite),
        })
    }
}

impl Bins {
    /// Sturges' number of bins, `k = ⌈log₂ n⌉ + 1` (at most [`MAX_BINS`]), of equal width
    /// `(max − min) / k`; value `x` falls in bin `⌊(x − min) / width⌋`, the largest in the
    /// last. All values equal: one bin. `values` are finite and not empty.
    pub fn of(values: &[f64]) -> Self {
        let (low, high) = values
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &v| {
                (lo.min(v), hi.max(v))
            });
        let sturges = (values.len() as f64).log2().ceil() as usize + 1;
        let k = if high > low {
            sturges.clamp(1, MAX_BINS)
        } else {
            1
        };
        let mut counts = vec![0u32; k];
        let width = (high - low) / k as f64;
        for &v in values {
            let i = if width > 0.0 {
                (((v - low) / width) as usize).min(k - 1)
            } else {
                0
            };
            counts[i] = counts[i].saturating_add(1);
        }
        Self { low, high, counts }
    }
}

/// The facts of each column, in file order (`None` for text and empty columns).
pub fn facts_of(columns: &[Column]) -> Vec<Option<NumericFacts>> {
    columns
        .iter()
        .map(|c| match &c.values {
            ColumnValues::Numeric(v) => NumericFacts::of(v),
            ColumnValues::Text { .. } => None,
        })
        .collect()
}

/// The column suggested to name the rows: the leftmost text column whose every cell is filled
/// and different from the others (`Q001`, `W17`, a sample code). A numeric column is never
/// suggested (run numbers and readings look alike), though the analyst may choose one.
pub fn suggested_id(columns: &[Column]) -> Option<String> {
    columns.iter().find_map(|c| match &c.values {
        ColumnValues::Text { values, .. } if !values.is_empty() => {
            // Every row filled, and as many distinct texts as rows.
            (values.missing() == 0 && values.level_count() == values.len()).then(|| c.name.clone())
        }
        _ => None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bins_follow_sturges_and_count_every_value_once() {
        // 8 values: k = ⌈log₂ 8⌉ + 1 = 4 bins of width (8 − 0)/4 = 2 over [0, 8] (by hand):
        // [0,2): 0, 1; [2,4): 2, 3; [4,6): 5; [6,8]: 7, 8, 8.
        let b = Bins::of(&[0.0, 1.0, 2.0, 3.0, 5.0, 7.0, 8.0, 8.0]);
        assert_eq!(b.counts, [2, 2, 1, 3]);
        assert_eq!((b.low, b.high), (0.0, 8.0));
        let same = Bins::of(&[4.0; 5]);
        assert_eq!(same.counts, [5]);
        let many: Vec<f64> = (0..1_000_000).map(f64::from).collect();
        let b = Bins::of(&many);
        assert_eq!(b.counts.len(), MAX_BINS, "capped");
        assert_eq!(
            b.counts.iter().map(|&c| c as usize).sum::<usize>(),
            many.len()
        );
    }

    #[test]
    fn mean_and_sd_skip_gaps() {
        // 2, 4, 4, 4, 5, 5, 7, 9: mean 5, Σ(x − 5)² = 32, s = √(32/7) (by hand).
        let v = [2.0, 4.0, 4.0, 4.0, 5.0, 5.0, 7.0, 9.0].map(Some);
        let mut with_gap = v.to_vec();
        with_gap.push(None);
        let f = NumericFacts::of(&with_gap.into_iter().collect()).expect("values");
        assert_eq!(f.n, 8);
        assert!((f.mean - 5.0).abs() < 1e-15);
        assert!((f.sd - (32.0_f64 / 7.0).sqrt()).abs() < 1e-14);
        assert!(NumericFacts::of(&[None, None].into_iter().collect()).is_none());
        let one = [Some(3.0)].into_iter().collect();
        assert!(NumericFacts::of(&one).expect("one").sd.is_nan());
    }

    fn text(name: &str, cells: &[Option<&str>]) -> Column {
        Column {
            name: name.into(),
            values: ColumnValues::Text {
                values: cells.iter().map(|c| c.map(str::to_string)).collect(),
                first_text_row: 1,
                first_text: String::new(),
                text_count: cells.len(),
            },
        }
    }

    #[test]
    fn the_id_suggested_is_the_first_complete_text_column_without_repeats() {
        let site = text("site", &[Some("a"), Some("a"), Some("b")]);
        let gap = text("tag", &[Some("x"), None, Some("z")]);
        let code = text("code", &[Some("Q1"), Some("Q2"), Some("Q3")]);
        let reading = Column {
            name: "reading".into(),
            values: ColumnValues::Numeric([Some(1.0), Some(2.0), Some(3.0)].into_iter().collect()),
        };
        let columns = [reading, site, gap, code];
        assert_eq!(suggested_id(&columns).as_deref(), Some("code"));
        assert_eq!(
            suggested_id(&columns[..3]),
            None,
            "no complete distinct text"
        );
    }
}

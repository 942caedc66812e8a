//! Weights of calibration readings from the data: 1/x, 1/x², 1/y², or the inverse variance of
//! the replicates at each level.

use std::collections::BTreeMap;

use super::CalibrationError;

/// A rule giving each reading its weight from its own x and y (or from its level's replicates).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum WeightRule {
    /// `wᵢ = 1/xᵢ`: the variance grows in proportion to x.
    InverseX,
    /// `wᵢ = 1/xᵢ²`: the standard deviation grows in proportion to x (constant relative error).
    InverseX2,
    /// `wᵢ = 1/yᵢ²`: as 1/x², judged on the reading.
    InverseY2,
    /// `wᵢ = 1/s²ⱼ`, `s²ⱼ = Σ(y − ȳⱼ)²/(nⱼ − 1)` over the readings at xᵢ's level j.
    InverseLevelVariance,
}

impl WeightRule {
    /// Every rule, in the order tables show them.
    pub const ALL: [Self; 4] = [
        Self::InverseX,
        Self::InverseX2,
        Self::InverseY2,
        Self::InverseLevelVariance,
    ];

    /// The rule as written: `1/x`, `1/x²`, `1/y²`, `1/s²`.
    pub fn label(self) -> &'static str {
        match self {
            Self::InverseX => "1/x",
            Self::InverseX2 => "1/x²",
            Self::InverseY2 => "1/y²",
            Self::InverseLevelVariance => "1/s²",
        }
    }

    /// The rule's name on a command line: `1/x`, `1/x2`, `1/y2`, `1/s2`.
    pub fn key(self) -> &'static str {
        match self {
            Self::InverseX => "1/x",
            Self::InverseX2 => "1/x2",
            Self::InverseY2 => "1/y2",
            Self::InverseLevelVariance => "1/s2",
        }
    }

    /// Parses a key (or the label).
    pub fn parse(s: &str) -> Option<Self> {
        Self::ALL
            .into_iter()
            .find(|r| r.key() == s || r.label() == s)
    }

    /// Whether a row's weight depends on other rows (its level's replicates), so that
    /// leaving a row out changes the weights of others.
    pub fn uses_other_rows(self) -> bool {
        self == Self::InverseLevelVariance
    }
}

/// The weight of every reading under `rule`, from the readings' `x` and `y`.
///
/// # Errors
/// An x (or y) of zero or, for 1/x, a negative x — named by position; for 1/s², a level with
/// a single reading or readings that do not vary.
///
/// # Panics
/// If `x` and `y` differ in length (a caller bug).
pub fn rule_weights(rule: WeightRule, x: &[f64], y: &[f64]) -> Result<Vec<f64>, CalibrationError> {
    assert_eq!(x.len(), y.len(), "one x per y");
    let checked = |v: &[f64], f: fn(f64) -> f64, positive: bool| {
        v.iter()
            .enumerate()
            .map(|(i, &v)| {
                let bad = v == 0.0 || !v.is_finite() || (positive && v < 0.0);
                if bad {
                    Err(CalibrationError::BadWeightBase {
                        rule: rule.label(),
                        index: i,
                        value: v,
                    })
                } else {
                    Ok(f(v))
                }
            })
            .collect()
    };
    match rule {
        WeightRule::InverseX => checked(x, |v| 1.0 / v, true),
        WeightRule::InverseX2 => checked(x, |v| 1.0 / (v * v), false),
        WeightRule::InverseY2 => checked(y, |v| 1.0 / (v * v), false),
        WeightRule::InverseLevelVariance => {
            let levels = level_variances(x, y)?;
            Ok(x.iter().map(|v| 1.0 / levels[&key(*v)].1).collect())
        }
    }
}

/// Each distinct x (by exact value) with its reading count and the sample variance of its
/// readings.
///
/// # Errors
/// A level with one reading, or whose readings do not vary.
pub fn level_variances(
    x: &[f64],
    y: &[f64],
) -> Result<BTreeMap<Key, (usize, f64)>, CalibrationError> {
    let mut groups: BTreeMap<Key, Vec<usize>> = BTreeMap::new();
    for (i, v) in x.iter().enumerate() {
        groups.entry(key(*v)).or_default().push(i);
    }
    let mut out = BTreeMap::new();
    for (k, rows) in groups {
        let n = rows.len();
        if n < 2 {
            return Err(CalibrationError::UnreplicatedLevel {
                level: x[rows[0]],
                index: rows[0],
            });
        }
        let mean = rows.iter().map(|&i| y[i]).sum::<f64>() / n as f64;
        let var =
            crate::accurate::sum(rows.iter().map(|&i| (y[i] - mean).powi(2))) / (n - 1) as f64;
        if var.is_nan() || var <= 0.0 {
            return Err(CalibrationError::NoSpreadAtLevel {
                level: x[rows[0]],
                index: rows[0],
            });
        }
        out.insert(k, (n, var));
    }
    Ok(out)
}

/// A level's x as an ordered key (−0 and 0 are one level).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub struct Key(i64);

impl Key {
    /// The x this key stands for.
    pub fn value(self) -> f64 {
        let bits = if self.0 < 0 {
            self.0 ^ i64::MAX
        } else {
            self.0
        };
        f64::from_bits(bits as u64)
    }
}

/// Total-order key of an f64 (−0.0 taken as 0.0).
pub fn key(v: f64) -> Key {
    let bits = (v + 0.0).to_bits() as i64;
    Key(if bits < 0 { bits ^ i64::MAX } else { bits })
}

/// The weight of one reading at any x, for inverse prediction: given the standards' `x` and
/// their weights `w`, the variance factor `1/w` is averaged per level and interpolated
/// linearly in x between levels (held at the end values beyond them); the weight at x is its
/// reciprocal. Used for a weights column and for 1/s², where no formula in x exists.
#[derive(Debug, Clone, PartialEq)]
pub struct WeightProfile {
    points: Vec<(f64, f64)>,
}

impl WeightProfile {
    /// From the standards' x and weights.
    ///
    /// # Panics
    /// If the slices differ in length or are empty (a caller bug).
    pub fn new(x: &[f64], w: &[f64]) -> Self {
        assert!(!x.is_empty() && x.len() == w.len(), "one weight per x");
        let mut sums: BTreeMap<Key, (f64, usize)> = BTreeMap::new();
        for (&xi, &wi) in x.iter().zip(w) {
            let e = sums.entry(key(xi)).or_insert((0.0, 0));
            e.0 += 1.0 / wi;
            e.1 += 1;
        }
        Self {
            points: sums
                .into_iter()
                .map(|(k, (s, n))| (k.value(), s / n as f64))
                .collect(),
        }
    }

    /// The weight of one reading at `x`.
    pub fn weight_at(&self, x: f64) -> f64 {
        let p = &self.points;
        let var = match p.iter().position(|&(xi, _)| xi >= x) {
            Some(0) => p[0].1,
            None => p[p.len() - 1].1,
            Some(k) => {
                let ((x0, v0), (x1, v1)) = (p[k - 1], p[k]);
                v0 + (v1 - v0) * (x - x0) / (x1 - x0)
            }
        };
        1.0 / var
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rules_give_the_weights_their_names_say() {
        let x = [1.0, 2.0, 2.0, 4.0, 4.0, 1.0];
        let y = [0.5, 1.0, 1.2, 2.0, 2.4, 0.7];
        assert_eq!(
            rule_weights(WeightRule::InverseX, &x, &y).expect("defined"),
            vec![1.0, 0.5, 0.5, 0.25, 0.25, 1.0]
        );
        assert_eq!(
            rule_weights(WeightRule::InverseX2, &x, &y).expect("defined")[3],
            1.0 / 16.0
        );
        assert_eq!(
            rule_weights(WeightRule::InverseY2, &x, &y).expect("defined")[0],
            4.0
        );
        // 1/s² by hand: level 1 {0.5, 0.7} s² = 0.02; level 2 {1.0, 1.2} 0.02; level 4
        // {2.0, 2.4} 0.08.
        let w = rule_weights(WeightRule::InverseLevelVariance, &x, &y).expect("replicated");
        for (got, want) in w.iter().zip([50.0, 50.0, 50.0, 12.5, 12.5, 50.0]) {
            assert!((got / want - 1.0).abs() < 1e-12, "{w:?}");
        }
    }

    #[test]
    fn a_blank_standard_is_named_when_a_rule_divides_by_it() {
        let x = [0.0, 1.0, 2.0];
        let y = [0.01, 1.0, 2.0];
        assert_eq!(
            rule_weights(WeightRule::InverseX, &x, &y),
            Err(CalibrationError::BadWeightBase {
                rule: "1/x",
                index: 0,
                value: 0.0
            })
        );
        assert!(matches!(
            rule_weights(WeightRule::InverseLevelVariance, &x, &y),
            Err(CalibrationError::UnreplicatedLevel { index: 0, .. })
        ));
    }

    #[test]
    fn profiles_interpolate_the_variance_between_levels() {
        let p = WeightProfile::new(&[1.0, 1.0, 3.0], &[1.0, 1.0, 0.25]);
        // Variance factor 1 at x = 1 and 4 at x = 3 → 2.5 at x = 2 (by hand).
        assert!((p.weight_at(2.0) - 0.4).abs() < 1e-15);
        assert_eq!(p.weight_at(0.0), 1.0);
        assert_eq!(p.weight_at(9.0), 0.25);
        for v in [-2.5, -0.0, 0.0, 1e-300, 7.25] {
            assert_eq!(key(v).value(), v + 0.0);
        }
        assert!(key(-1.0) < key(0.0) && key(0.0) < key(1e-300));
    }
}

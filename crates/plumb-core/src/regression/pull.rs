//! How strongly each row pulls a fit, by its Cook's distance `D`, in three classes shared by
//! the workbench's influence view and the summary's chart.

#[cfg(test)]
use super::Flags;
use super::{CaseInfluence, InfluenceFlag};
use crate::distributions::f_median;

/// A row's class by Cook's distance.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum Pull {
    /// Neither flagged nor strong.
    Ordinary = 0,
    /// Flagged by the influence rule of [`super::influence`] (`InfluenceFlag::LargeCooksDistance`).
    Flagged = 1,
    /// `D ≥ F₀.₅(p, n − p)`: leaving the row out moves the estimates to the edge of their
    /// 50 % confidence region (Cook, *Detection of influential observation in linear
    /// regression*, Technometrics 19, 1977).
    Strong = 2,
}

/// The strong class's threshold for `n` rows and `p` terms: the median of `F(p, n − p)`;
/// `NaN` when `n ≤ p` or `p = 0`.
pub fn strong_pull_from(n: usize, p: usize) -> f64 {
    if n > p && p > 0 {
        f_median(p as f64, (n - p) as f64)
    } else {
        f64::NAN
    }
}

/// The class of `case` given the strong threshold `strong_from` ([`strong_pull_from`]).
pub fn pull_of(case: &CaseInfluence, strong_from: f64) -> Pull {
    if case.cooks_distance >= strong_from {
        Pull::Strong
    } else if case.flags.contains(&InfluenceFlag::LargeCooksDistance) {
        Pull::Flagged
    } else {
        Pull::Ordinary
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn case(d: f64, flagged: bool) -> CaseInfluence {
        let flags: &[InfluenceFlag] = if flagged {
            &[InfluenceFlag::LargeCooksDistance]
        } else {
            &[]
        };
        CaseInfluence {
            leverage: 0.1,
            studentized_external: 1.0,
            cooks_distance: d,
            flags: Flags::of(flags),
            ..CaseInfluence::default()
        }
    }

    #[test]
    fn classes_follow_the_flag_and_the_f_median() {
        // scipy.stats.f.median(2, 10) = 0.7434917749851752 (scipy 1.14.1, this repository's venv).
        let cut = strong_pull_from(12, 2);
        assert!((cut - 0.743_491_774_985_175_2).abs() < 1e-9);
        assert_eq!(pull_of(&case(0.3, true), cut), Pull::Flagged);
        assert_eq!(pull_of(&case(0.75, true), cut), Pull::Strong);
        assert_eq!(pull_of(&case(0.74, false), cut), Pull::Ordinary);
        assert_eq!(pull_of(&case(f64::NAN, false), cut), Pull::Ordinary);
        assert!(strong_pull_from(2, 2).is_nan());
        assert_eq!(
            pull_of(&case(5.0, false), strong_pull_from(2, 2)),
            Pull::Ordinary
        );
    }
}

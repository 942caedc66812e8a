//! Case diagnostics of a least-squares fit: leverage, studentized residuals, Cook's distance,
//! DFFITS and the flags per case (seven numbers and a byte), DFBETAS as one `n × p` array when
//! asked for, and the normal quantiles for a residual Q-Q check.

use super::design::Design;
use super::inference::LinearFit;
use super::solve::factor;
use super::FitOptions;
use crate::{distributions, Result};

/// Leverage above `2p/n` is flagged. Common practice, no source.
pub const LEVERAGE_FLAG_FACTOR: f64 = 2.0;
/// Cook's distance above `4/n` is flagged (common practice, no source), up to
/// [`COOKS_FLAG_ROWS_CAP`] rows: see [`cooks_flag_cut`].
pub const COOKS_FLAG_NUMERATOR: f64 = 4.0;
/// From this many rows up the Cook's-distance cut stays at `4/1000`. Our own choice, no source:
/// at average leverage `p/n`, `D ≈ t²/n`, so `4/n` flags every row with `|t|` above about 2 —
/// one row in twenty of a well-behaved fit, thousands of rows in a large file, most rows of a
/// heavy-tailed one — while `4/1000` in a large file flags only rows that shift the fit many
/// times more than a typical row does.
pub const COOKS_FLAG_ROWS_CAP: usize = 1000;
/// |Externally studentized residual| above 3 is flagged. Common practice, no source.
pub const STUDENTIZED_FLAG: f64 = 3.0;

/// The Cook's distance above which a row of a fit to `n` rows is flagged:
/// `4/min(n, 1000)` ([`COOKS_FLAG_NUMERATOR`], [`COOKS_FLAG_ROWS_CAP`]).
pub fn cooks_flag_cut(n: usize) -> f64 {
    COOKS_FLAG_NUMERATOR / n.clamp(1, COOKS_FLAG_ROWS_CAP) as f64
}

/// Diagnostics of one observation. With weights, residuals are the weighted `√wᵢ·eᵢ`.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct CaseInfluence {
    /// Fitted value `ŷᵢ`.
    pub fitted: f64,
    /// Residual `eᵢ = yᵢ − ŷᵢ`.
    pub residual: f64,
    /// Leverage `hᵢᵢ = ‖row i of Q₁‖²`, the diagonal of the hat matrix `W^{1/2}X(XᵀWX)⁻¹XᵀW^{1/2}`.
    pub leverage: f64,
    /// Internally studentized residual `rᵢ = √wᵢ eᵢ / (s√(1 − hᵢᵢ))`, `s² = RSS/(n − p)`.
    pub studentized_internal: f64,
    /// Externally studentized residual `tᵢ = √wᵢ eᵢ / (s₍ᵢ₎√(1 − hᵢᵢ))`, with
    /// `s₍ᵢ₎² = ((n − p)s² − wᵢeᵢ²/(1 − hᵢᵢ)) / (n − p − 1)`.
    pub studentized_external: f64,
    /// Cook's distance `Dᵢ = rᵢ² hᵢᵢ / (p(1 − hᵢᵢ))`.
    pub cooks_distance: f64,
    /// `DFFITSᵢ = tᵢ √(hᵢᵢ/(1 − hᵢᵢ))`.
    pub dffits: f64,
    /// Which rule-of-thumb thresholds the case crosses (see the constants of this module);
    /// an undefined (NaN) measure crosses none.
    pub flags: Flags,
}

/// The thresholds a case crosses, as a set of [`InfluenceFlag`]s in one byte (a case of a
/// ten-million-row fit must not carry a vector of its own).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Flags(u8);

impl Flags {
    /// The set of `flags`.
    pub fn of(flags: &[InfluenceFlag]) -> Self {
        Self(flags.iter().fold(0, |bits, f| bits | f.bit()))
    }

    /// Whether `flag` is in the set.
    pub fn contains(&self, flag: &InfluenceFlag) -> bool {
        self.0 & flag.bit() != 0
    }

    /// Whether no threshold is crossed.
    pub fn is_empty(&self) -> bool {
        self.0 == 0
    }

    /// The flags in the set, in [`InfluenceFlag::ALL`] order.
    pub fn iter(&self) -> impl Iterator<Item = InfluenceFlag> + '_ {
        InfluenceFlag::ALL.into_iter().filter(|f| self.contains(f))
    }

    fn insert(&mut self, flag: InfluenceFlag) {
        self.0 |= flag.bit();
    }
}

/// `DFBETASᵢⱼ = (β̂ⱼ − β̂₍ᵢ₎ⱼ) / (s₍ᵢ₎√Cⱼⱼ)`, `C = (XᵀWX)⁻¹`, with
/// `β̂ − β̂₍ᵢ₎ = C xᵢ wᵢ eᵢ / (1 − hᵢᵢ)`: one value per case and term, held as one row-major
/// `n × p` array ([`influence_with_dfbetas`]).
#[derive(Debug, Clone, PartialEq)]
pub struct Dfbetas {
    terms: usize,
    values: Vec<f64>,
}

impl Dfbetas {
    /// The values of case `i`, one per term.
    pub fn row(&self, i: usize) -> &[f64] {
        &self.values[i * self.terms..(i + 1) * self.terms]
    }

    /// Terms per case.
    pub fn terms(&self) -> usize {
        self.terms
    }
}

/// A threshold crossed by a case.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum InfluenceFlag {
    /// `hᵢᵢ > 2p/n`.
    HighLeverage,
    /// `Dᵢ > 4/min(n, 1000)` ([`cooks_flag_cut`]).
    LargeCooksDistance,
    /// `|tᵢ| > 3`.
    LargeResidual,
}

impl InfluenceFlag {
    /// Every flag, in the order output lists them.
    pub const ALL: [Self; 3] = [
        Self::HighLeverage,
        Self::LargeCooksDistance,
        Self::LargeResidual,
    ];

    fn bit(self) -> u8 {
        match self {
            Self::HighLeverage => 1,
            Self::LargeCooksDistance => 2,
            Self::LargeResidual => 4,
        }
    }

    /// Name used in output.
    pub fn as_str(self) -> &'static str {
        match self {
            Self::HighLeverage => "high-leverage",
            Self::LargeCooksDistance => "large-cooks-distance",
            Self::LargeResidual => "large-residual",
        }
    }
}

/// Diagnostics of every observation of `fit` (which must come from the same `design`, `y`
/// and `weights`). Cost O(np²): the weighted working basis is factored once more.
///
/// # Errors
/// The same rank errors as the fit (which would have failed first).
pub fn influence(
    design: &Design,
    weights: Option<&[f64]>,
    fit: &LinearFit,
    options: &FitOptions,
) -> Result<Vec<CaseInfluence>> {
    Ok(cases(design, weights, fit, options, false)?.0)
}

/// [`influence`] and the DFBETAS of every case, from the same factorization (a p × p product
/// more per case).
///
/// # Errors
/// The same rank errors as the fit (which would have failed first).
pub fn influence_with_dfbetas(
    design: &Design,
    weights: Option<&[f64]>,
    fit: &LinearFit,
    options: &FitOptions,
) -> Result<(Vec<CaseInfluence>, Dfbetas)> {
    let (cases, values) = cases(design, weights, fit, options, true)?;
    Ok((
        cases,
        Dfbetas {
            terms: design.n_terms(),
            values,
        },
    ))
}

/// The case diagnostics, and the DFBETAS (row-major) when `with_dfbetas`; rows on all cores.
fn cases(
    design: &Design,
    weights: Option<&[f64]>,
    fit: &LinearFit,
    options: &FitOptions,
    with_dfbetas: bool,
) -> Result<(Vec<CaseInfluence>, Vec<f64>)> {
    use rayon::prelude::*;
    let n = design.n_rows();
    let p = design.n_terms();
    let f = factor(design, weights, options.rank_tolerance)?;
    let q = f.qr.q();
    let df = (n - p) as f64;
    let s2 = fit.anova.ss_residual / df;
    let s = s2.sqrt();
    let (lev_cut, cook_cut) = (
        LEVERAGE_FLAG_FACTOR * p as f64 / n as f64,
        cooks_flag_cut(n),
    );
    // Row i of Q₁ read in place, and what leaving row i out does to the spread.
    let case = |i: usize| {
        let h = (0..p).fold(0.0, |acc, j| acc + q[(i, j)] * q[(i, j)]);
        let r = f.root_w[i] * fit.residuals[i];
        let one_minus_h = 1.0 - h;
        // Leaving a row out needs a residual degree of freedom to spare, and a row of
        // leverage 1 cannot be left out at all: those measures are then undefined (NaN).
        let s_i = if df > 1.0 && one_minus_h > 1e-12 {
            (((df * s2) - r * r / one_minus_h) / (df - 1.0))
                .max(0.0)
                .sqrt()
        } else {
            f64::NAN
        };
        (h, r, one_minus_h, s_i)
    };
    let cases = (0..n)
        .into_par_iter()
        .map(|i| {
            let (h, r, one_minus_h, s_i) = case(i);
            let internal = r / (s * one_minus_h.sqrt());
            let external = r / (s_i * one_minus_h.sqrt());
            let cooks = internal * internal * h / (p as f64 * one_minus_h);
            let mut flags = Flags::default();
            if h > lev_cut {
                flags.insert(InfluenceFlag::HighLeverage);
            }
            if cooks > cook_cut {
                flags.insert(InfluenceFlag::LargeCooksDistance);
            }
            if external.abs() > STUDENTIZED_FLAG {
                flags.insert(InfluenceFlag::LargeResidual);
            }
            CaseInfluence {
                fitted: fit.fitted[i],
                residual: fit.residuals[i],
                leverage: h,
                studentized_internal: internal,
                studentized_external: external,
                cooks_distance: cooks,
                dffits: external * (h / one_minus_h).sqrt(),
                flags,
            }
        })
        .collect();
    let mut dfbetas = vec![0.0; if with_dfbetas { n * p } else { 0 }];
    if with_dfbetas {
        let cov_sd: Vec<f64> = (0..p).map(|j| f.m.row(j).norm_squared().sqrt()).collect();
        dfbetas.par_chunks_mut(p).enumerate().for_each(|(i, out)| {
            // C xᵢ √wᵢ = M·q̃ᵢ with q̃ᵢ the row of Q₁ (Q₁ = W^{1/2}Z P R⁻¹); so
            // Δβ = M qᵢ rᵢ/(1 − h).
            let (_, r, one_minus_h, s_i) = case(i);
            let scale = r / one_minus_h;
            for (j, o) in out.iter_mut().enumerate() {
                let shift = (0..p).fold(0.0, |acc, l| acc + f.m[(j, l)] * q[(i, l)]) * scale;
                *o = shift / (s_i * cov_sd[j]);
            }
        });
    }
    Ok((cases, dfbetas))
}

/// Normal quantiles for a Q-Q check of `n` sorted residuals, by Blom's plotting positions
/// `Φ⁻¹((i − 3/8)/(n + 1/4))`, `i = 1..n` (Blom, *Statistical Estimates and Transformed
/// Beta-Variables*, 1958).
pub fn normal_scores(n: usize) -> Vec<f64> {
    use rayon::prelude::*;
    (1..=n)
        .into_par_iter()
        .map(|i| {
            let prob = (i as f64 - 0.375) / (n as f64 + 0.25);
            -distributions::normal_upper_quantile(prob)
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::regression::fit;
    use approx::assert_relative_eq;

    fn line() -> (Design, Vec<f64>) {
        let x = [1.0, 2.0, 3.0, 4.0, 5.0, 10.0];
        let y = vec![1.1, 1.9, 3.2, 3.9, 5.1, 7.0];
        (Design::linear(&[("x", &x)], true), y)
    }

    #[test]
    fn the_cooks_cut_is_4_over_n_up_to_1000_rows_and_holds_there() {
        // The rule as stated (common practice for 4/n, our own cap): worked by hand.
        assert_relative_eq!(cooks_flag_cut(8), 0.5);
        assert_relative_eq!(cooks_flag_cut(1000), 0.004);
        assert_relative_eq!(cooks_flag_cut(2_000_000), 0.004);
        // A large well-behaved fit: 4/n would flag about one row in twenty (|t| ≳ 2); the
        // held cut flags none of these 5000 rows (x evenly spread, y = x plus a bounded
        // deterministic wobble of at most 2.4 residual SDs).
        let n = 5000;
        let x: Vec<f64> = (0..n).map(|i| i as f64 / n as f64).collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(i, v)| v + 0.01 * ((i * 7919 % 101) as f64 / 50.0 - 1.0))
            .collect();
        let d = Design::linear(&[("x", &x)], true);
        let opts = FitOptions::default();
        let f = fit(&d, &y, None, &opts).expect("fits");
        let cases = influence(&d, None, &f, &opts).expect("influence");
        let old_rule = cases
            .iter()
            .filter(|c| c.cooks_distance > 4.0 / n as f64)
            .count();
        assert!(old_rule > n / 50, "4/n would flag {old_rule} rows");
        assert!(cases
            .iter()
            .all(|c| !c.flags.contains(&InfluenceFlag::LargeCooksDistance)));
    }

    #[test]
    fn leverage_sums_to_p_and_matches_the_simple_formula() {
        // Simple regression: hᵢ = 1/n + (xᵢ − x̄)²/Sxx (textbook identity).
        let (d, y) = line();
        let f = fit(&d, &y, None, &FitOptions::default()).expect("fits");
        let cases = influence(&d, None, &f, &FitOptions::default()).expect("influence");
        let x = &d.columns()[1];
        let mean = x.iter().sum::<f64>() / 6.0;
        let sxx: f64 = x.iter().map(|v| (v - mean).powi(2)).sum();
        for (c, xi) in cases.iter().zip(x.iter()) {
            assert_relative_eq!(
                c.leverage,
                1.0 / 6.0 + (xi - mean).powi(2) / sxx,
                max_relative = 1e-13
            );
        }
        assert_relative_eq!(
            cases.iter().map(|c| c.leverage).sum::<f64>(),
            2.0,
            max_relative = 1e-13
        );
        assert!(cases[5].flags.contains(&InfluenceFlag::HighLeverage));
    }

    #[test]
    fn flags_are_a_set() {
        let f = Flags::of(&[InfluenceFlag::LargeResidual, InfluenceFlag::HighLeverage]);
        assert!(
            f.contains(&InfluenceFlag::HighLeverage)
                && !f.contains(&InfluenceFlag::LargeCooksDistance)
        );
        assert_eq!(
            f.iter().collect::<Vec<_>>(),
            [InfluenceFlag::HighLeverage, InfluenceFlag::LargeResidual]
        );
        assert!(Flags::default().is_empty() && !f.is_empty());
        assert!(
            std::mem::size_of::<CaseInfluence>() <= 64,
            "seven numbers and a byte"
        );
    }

    #[test]
    fn dfbetas_and_external_residuals_agree_with_deleting_the_row() {
        // Refit without each row and compare with the closed forms.
        let (d, y) = line();
        let opts = FitOptions::default();
        let f = fit(&d, &y, None, &opts).expect("fits");
        let (cases, dfbetas) = influence_with_dfbetas(&d, None, &f, &opts).expect("influence");
        assert_eq!(
            influence(&d, None, &f, &opts).expect("influence"),
            cases,
            "the same cases with or without DFBETAS"
        );
        assert_eq!(dfbetas.terms(), 2);
        for i in 0..y.len() {
            let keep: Vec<usize> = (0..y.len()).filter(|&k| k != i).collect();
            let x: Vec<f64> = keep.iter().map(|&k| d.columns()[1][k]).collect();
            let yy: Vec<f64> = keep.iter().map(|&k| y[k]).collect();
            let g = fit(&Design::linear(&[("x", &x)], true), &yy, None, &opts).expect("refit");
            let s_i = g.residual_std_error;
            for j in 0..2 {
                let se = f.covariance[(j, j)].sqrt() / f.residual_std_error;
                let expected =
                    (f.coefficients[j].estimate - g.coefficients[j].estimate) / (s_i * se);
                assert_relative_eq!(
                    dfbetas.row(i)[j],
                    expected,
                    max_relative = 1e-9,
                    epsilon = 1e-12
                );
            }
            let predicted =
                g.coefficients[0].estimate + g.coefficients[1].estimate * d.columns()[1][i];
            // The deleted residual yᵢ − ŷ₍ᵢ₎ has variance σ²/(1 − hᵢᵢ).
            let t = (y[i] - predicted) * (1.0 - cases[i].leverage).sqrt() / s_i;
            assert_relative_eq!(cases[i].studentized_external, t, max_relative = 1e-9);
        }
    }

    #[test]
    fn leave_one_out_measures_are_undefined_without_a_spare_degree_of_freedom() {
        let d = Design::linear(&[("x", &[1.0, 2.0, 3.0])], true);
        let f = fit(&d, &[1.0, 2.2, 2.9], None, &FitOptions::default()).expect("fits");
        let cases = influence(&d, None, &f, &FitOptions::default()).expect("influence");
        for c in &cases {
            assert!(
                c.studentized_external.is_nan() && c.dffits.is_nan(),
                "{c:?}"
            );
            assert!(!c.flags.contains(&InfluenceFlag::LargeResidual));
        }
    }

    #[test]
    fn normal_scores_are_symmetric() {
        let z = normal_scores(5);
        assert_relative_eq!(z[0], -z[4], max_relative = 1e-14);
        assert_eq!(z[2], 0.0);
    }
}

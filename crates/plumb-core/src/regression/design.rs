//! Model terms and the design matrix they make.

use std::sync::Arc;

use crate::{accurate, CoreError, Result};

/// The intercept term's name.
pub const INTERCEPT: &str = "intercept";
/// Its name when a column is itself called `intercept`.
pub const INTERCEPT_ALIAS: &str = "(intercept)";

/// Whether a coefficient's name is the intercept's (either form).
pub fn is_intercept_name(name: &str) -> bool {
    name == INTERCEPT || name == INTERCEPT_ALIAS
}

/// Highest polynomial degree accepted for a single predictor.
pub const MAX_DEGREE: u32 = 10;

/// What a column of the design matrix stands for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TermKind {
    /// The constant column of ones.
    Intercept,
    /// A predictor as given.
    Linear,
    /// A predictor raised to a power `k ≥ 2`.
    Power(u32),
}

impl TermKind {
    /// The power of the predictor this term carries: 0 for the intercept, 1 for a predictor as given.
    pub fn power(self) -> u32 {
        match self {
            Self::Intercept => 0,
            Self::Linear => 1,
            Self::Power(k) => k,
        }
    }
}

/// The value of a polynomial in one predictor, `ŷ(x) = Σⱼ βⱼ·x^{j+s}` with `s = 0` when the
/// model has an intercept (so `β₀` is the constant) and `s = 1` through the origin; evaluated
/// by Horner's rule, `x^s·(β₀ + x·(β₁ + x·(…)))`.
pub fn polynomial_value(coefficients: &[f64], intercept: bool, x: f64) -> f64 {
    let inner = coefficients.iter().rev().fold(0.0, |acc, &b| acc * x + b);
    if intercept {
        inner
    } else {
        inner * x
    }
}

/// One named column of the design matrix.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Term {
    /// Display name: `intercept`, the predictor's name, or `name^k`.
    pub name: String,
    /// What the column stands for.
    pub kind: TermKind,
}

/// The design matrix `X`, stored by column, with one [`Term`] per column.
#[derive(Debug, Clone, PartialEq)]
pub struct Design {
    n_rows: usize,
    terms: Vec<Term>,
    /// Shared where they are the caller's own values (see [`Design::linear_shared`]).
    columns: Vec<Arc<[f64]>>,
    /// For a polynomial in one predictor, the column holding that predictor's values (its
    /// linear term; the solver then works in a shifted and scaled variable, see `solve`).
    polynomial_source: Option<usize>,
}

impl Design {
    /// An empty design for `n_rows` observations, with the intercept column if asked.
    pub fn new(n_rows: usize, intercept: bool) -> Self {
        let mut design = Self {
            n_rows,
            terms: Vec::new(),
            columns: Vec::new(),
            polynomial_source: None,
        };
        if intercept {
            design.push(
                Term {
                    name: INTERCEPT.into(),
                    kind: TermKind::Intercept,
                },
                std::iter::repeat_n(1.0, n_rows).collect::<Arc<[f64]>>(),
            );
        }
        design
    }

    /// `[1] x₁ … x_k`: an intercept (if asked) and each predictor as given.
    ///
    /// # Panics
    /// If a predictor's length differs from the others (a caller bug).
    pub fn linear(predictors: &[(&str, &[f64])], intercept: bool) -> Self {
        use rayon::prelude::*;
        // The copies on all cores (at millions of rows, mostly fresh pages).
        let copies: Vec<(&str, Arc<[f64]>)> = predictors
            .par_iter()
            .map(|&(name, x)| (name, Arc::from(x)))
            .collect();
        Self::linear_shared(&copies, intercept)
    }

    /// [`Design::linear`] on columns the caller already holds in `Arc`s: the design shares
    /// them instead of copying.
    ///
    /// # Panics
    /// If a predictor's length differs from the others (a caller bug).
    pub fn linear_shared(predictors: &[(&str, Arc<[f64]>)], intercept: bool) -> Self {
        let n_rows = predictors.first().map_or(0, |(_, x)| x.len());
        let mut design = Self::new(n_rows, intercept);
        for (name, x) in predictors {
            design.push(
                Term {
                    name: (*name).to_string(),
                    kind: TermKind::Linear,
                },
                Arc::clone(x),
            );
        }
        design
    }

    /// `[1] x x² … x^degree` for one predictor, `1 ≤ degree ≤` [`MAX_DEGREE`].
    ///
    /// # Errors
    /// [`CoreError::InvalidOption`] for a degree outside that range.
    pub fn polynomial(name: &str, x: &[f64], degree: u32, intercept: bool) -> Result<Self> {
        Self::polynomial_shared(name, Arc::from(x), degree, intercept)
    }

    /// [`Design::polynomial`] on a predictor the caller holds in an `Arc`: its linear term
    /// shares it.
    ///
    /// # Errors
    /// As [`Design::polynomial`].
    pub fn polynomial_shared(
        name: &str,
        x: Arc<[f64]>,
        degree: u32,
        intercept: bool,
    ) -> Result<Self> {
        if !(1..=MAX_DEGREE).contains(&degree) {
            return Err(CoreError::InvalidOption(format!(
                "polynomial degree {degree} is outside 1..={MAX_DEGREE}"
            )));
        }
        let mut design = Self::new(x.len(), intercept);
        // The predictor itself is the linear term's column (`x.powi(1)` is `x`): no copy.
        design.polynomial_source = Some(design.columns.len());
        for k in 1..=degree {
            let (term_name, kind) = if k == 1 {
                (name.to_string(), TermKind::Linear)
            } else {
                (format!("{name}^{k}"), TermKind::Power(k))
            };
            let column: Arc<[f64]> = if k == 1 {
                Arc::clone(&x)
            } else {
                x.iter().map(|&v| accurate::int_pow(v, k)).collect()
            };
            design.push(
                Term {
                    name: term_name,
                    kind,
                },
                column,
            );
        }
        Ok(design)
    }

    /// Appends a column.
    ///
    /// # Panics
    /// If the column's length is not the design's row count (a caller bug).
    /// Term names stay unambiguous: a column called `intercept` renames the intercept term to
    /// `(intercept)`, and any other repeated name gets a `′` until it is unique.
    pub fn push(&mut self, mut term: Term, column: impl Into<Arc<[f64]>>) {
        let column = column.into();
        assert_eq!(
            column.len(),
            self.n_rows,
            "column length differs from design"
        );
        if term.kind != TermKind::Intercept && term.name == INTERCEPT {
            if let Some(i) = self
                .terms
                .iter_mut()
                .find(|t| t.kind == TermKind::Intercept)
            {
                i.name = INTERCEPT_ALIAS.into();
            }
        }
        while self.terms.iter().any(|t| t.name == term.name) {
            term.name.push('′');
        }
        self.terms.push(term);
        self.columns.push(column);
    }

    /// Number of observations.
    pub fn n_rows(&self) -> usize {
        self.n_rows
    }

    /// Number of terms (columns), `p`.
    pub fn n_terms(&self) -> usize {
        self.terms.len()
    }

    /// The terms, in column order.
    pub fn terms(&self) -> &[Term] {
        &self.terms
    }

    /// The columns, in term order.
    pub fn columns(&self) -> &[Arc<[f64]>] {
        &self.columns
    }

    /// Whether the first term is the intercept.
    pub fn has_intercept(&self) -> bool {
        self.terms
            .first()
            .is_some_and(|t| t.kind == TermKind::Intercept)
    }

    /// The predictor's values when this is a polynomial in one predictor.
    pub fn polynomial_source(&self) -> Option<&[f64]> {
        self.polynomial_source.map(|k| &*self.columns[k])
    }

    /// Row `i` of `X`.
    pub fn row(&self, i: usize) -> impl Iterator<Item = f64> + '_ {
        self.columns.iter().map(move |c| c[i])
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn polynomial_values_with_and_without_an_intercept() {
        // 1 + 2x + 3x² at x = 2 is 17; through the origin 2x + 3x² at x = 2 is 16 (by hand).
        assert_eq!(polynomial_value(&[1.0, 2.0, 3.0], true, 2.0), 17.0);
        assert_eq!(polynomial_value(&[2.0, 3.0], false, 2.0), 16.0);
        assert_eq!(polynomial_value(&[], true, 5.0), 0.0);
    }

    #[test]
    fn polynomial_terms_are_named_by_power() {
        let d = Design::polynomial("dose", &[1.0, 2.0, 3.0], 3, true).expect("valid degree");
        let names: Vec<_> = d.terms().iter().map(|t| t.name.as_str()).collect();
        assert_eq!(names, ["intercept", "dose", "dose^2", "dose^3"]);
    }

    #[test]
    fn a_column_called_intercept_leaves_the_names_unambiguous() {
        let (a, cubes) = ([1.0, 2.0, 3.0], [1.0, 8.0, 27.0]);
        let d = Design::linear(&[("intercept", &a), ("b", &a), ("b", &cubes)], true);
        let names: Vec<&str> = d.terms().iter().map(|t| t.name.as_str()).collect();
        assert_eq!(names, ["(intercept)", "intercept", "b", "b′"]);
        assert_eq!(d.terms()[0].kind, TermKind::Intercept);
        assert_eq!(*d.columns()[3], [1.0, 8.0, 27.0]);
    }

    #[test]
    fn degree_outside_the_range_is_refused() {
        assert!(Design::polynomial("x", &[1.0], 11, true).is_err());
        assert!(Design::polynomial("x", &[1.0], 0, true).is_err());
    }
}

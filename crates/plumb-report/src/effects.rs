//! What each exclusion does to the answer: the fit before and after, one exclusion at a time
//! and all together.

use plumb_data::analysis::{analyze, FitRequest, Wanted};
use plumb_data::Table;

use crate::Result;

/// Headline numbers of one fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Headline {
    /// R².
    pub r_squared: f64,
    /// The first non-intercept coefficient (the slope of a line).
    pub slope: f64,
    /// Its two-sided p-value.
    pub slope_p: f64,
}

/// Before and after for one exclusion (or all of them).
#[derive(Debug, Clone, PartialEq)]
pub struct Effect {
    /// Rows concerned.
    pub rows: Vec<usize>,
    /// The fit with these rows in (the other exclusions applied).
    pub before: Headline,
    /// The fit with every exclusion applied.
    pub after: Headline,
}

fn headline(table: &Table, request: &FitRequest, exclude: Vec<usize>) -> Result<Headline> {
    let mut r = request.clone();
    r.exclude = exclude;
    let a = analyze(table, &r, Wanted::default())?;
    // The first term that is not the intercept, by kind (a column may be called `intercept`).
    let j = a
        .rows
        .design
        .terms()
        .iter()
        .position(|t| t.kind != plumb_core::regression::TermKind::Intercept)
        .unwrap_or(0);
    let fit = a.fit;
    let slope = &fit.coefficients[j];
    Ok(Headline {
        r_squared: fit.r_squared,
        slope: slope.estimate,
        slope_p: slope.p_value,
    })
}

/// Effects of each excluded row, then of all together (the last entry). Empty without exclusions.
///
/// # Errors
/// If a fit with some rows put back fails (it would then have failed without them too).
pub fn exclusion_effects(table: &Table, request: &FitRequest) -> Result<Vec<Effect>> {
    let mut rows = request.exclude.clone();
    rows.sort_unstable();
    rows.dedup();
    if rows.is_empty() {
        return Ok(Vec::new());
    }
    let after = headline(table, request, rows.clone())?;
    let mut effects = Vec::new();
    for &row in &rows {
        let others: Vec<usize> = rows.iter().copied().filter(|&r| r != row).collect();
        effects.push(Effect {
            rows: vec![row],
            before: headline(table, request, others)?,
            after,
        });
    }
    if rows.len() > 1 {
        effects.push(Effect {
            before: headline(table, request, Vec::new())?,
            rows,
            after,
        });
    }
    Ok(effects)
}

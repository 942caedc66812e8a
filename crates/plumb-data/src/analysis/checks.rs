//! The assumption checks of a fit, on the rows it used: constant spread, independence along a
//! row order (when one is named), and normal residuals.

use plumb_core::checks::{
    anderson_darling, breusch_pagan, durbin_watson, shapiro_wilk, sign_runs, BreuschPagan,
    Normality, SignRuns, SHAPIRO_WILK_MAX_N,
};

use super::{Analysis, AnalysisError};
use crate::table::Table;

/// Which normality test was run.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum NormalityTest {
    /// Shapiro–Wilk (Royston's approximation), for n ≤ 5000.
    ShapiroWilk,
    /// Anderson–Darling with the D'Agostino–Stephens p-value, above that.
    AndersonDarling,
}

impl NormalityTest {
    /// Its name.
    pub fn name(self) -> &'static str {
        match self {
            Self::ShapiroWilk => "Shapiro–Wilk",
            Self::AndersonDarling => "Anderson–Darling",
        }
    }

    /// Its key in machine-readable output.
    pub fn key(self) -> &'static str {
        match self {
            Self::ShapiroWilk => "shapiro-wilk",
            Self::AndersonDarling => "anderson-darling",
        }
    }
}

/// Checks along the rows' order.
#[derive(Debug, Clone, PartialEq)]
pub struct OrderChecks {
    /// The column that orders the rows.
    pub column: String,
    /// Durbin–Watson `d` of the residuals in that order.
    pub durbin_watson: Result<f64, String>,
    /// The runs of residual signs in that order.
    pub runs: Result<SignRuns, String>,
}

/// The checks of one fit. The residuals checked are `√wᵢ·eᵢ` (the plain residuals when the fit
/// is not weighted), on the scale the model is fitted on.
#[derive(Debug, Clone, PartialEq)]
pub struct Checks {
    /// Studentized Breusch–Pagan against the fitted values.
    pub spread: Result<BreuschPagan, String>,
    /// Along the row order, when an order column is named (or the file's row order).
    pub order: Option<OrderChecks>,
    /// The normality test run (by n) and its result.
    pub normality: (NormalityTest, Result<Normality, String>),
}

/// Where the rows' order comes from.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub enum RowOrder {
    /// No order: the order checks are skipped (rows of a table are not always a sequence).
    #[default]
    None,
    /// The rows as they stand in the file.
    File,
    /// Sorted by this numeric column (ties keep file order).
    Column(String),
}

/// The checks of `analysis`, with the rows taken in `order` for the Durbin–Watson statistic
/// and the runs of signs.
///
/// # Errors
/// An order column that is not numeric or not in the file.
pub fn assumption_checks(
    table: &Table,
    analysis: &Analysis,
    order: &RowOrder,
) -> Result<Checks, AnalysisError> {
    let fit = &analysis.fit;
    let w = analysis.rows.weights();
    let scaled: Vec<f64> = fit
        .residuals
        .iter()
        .enumerate()
        .map(|(i, e)| e * w.map_or(1.0, |w| w[i].sqrt()))
        .collect();
    let test = if scaled.len() <= SHAPIRO_WILK_MAX_N {
        NormalityTest::ShapiroWilk
    } else {
        NormalityTest::AndersonDarling
    };
    // The two checks are independent: side by side on two cores.
    let (spread, normal) = rayon::join(
        || breusch_pagan(&scaled, &[&fit.fitted]).map_err(|e| e.to_string()),
        || match test {
            NormalityTest::ShapiroWilk => shapiro_wilk(&scaled),
            NormalityTest::AndersonDarling => anderson_darling(&scaled),
        },
    );
    let order = match order {
        RowOrder::None => None,
        RowOrder::File => Some(order_checks("file row order", &scaled)),
        RowOrder::Column(name) => {
            let values = table.numeric(name)?;
            let rows = &analysis.rows.selection.rows;
            let mut idx: Vec<usize> = (0..rows.len()).collect();
            // Rows whose order value is missing go last, in file order.
            let key = |i: usize| values.get(rows[i] - 1).unwrap_or(f64::INFINITY);
            idx.sort_by(|&a, &b| key(a).total_cmp(&key(b)));
            let ordered: Vec<f64> = idx.iter().map(|&i| scaled[i]).collect();
            Some(order_checks(name, &ordered))
        }
    };
    Ok(Checks {
        spread,
        order,
        normality: (test, normal.map_err(|e| e.to_string())),
    })
}

fn order_checks(column: &str, ordered: &[f64]) -> OrderChecks {
    OrderChecks {
        column: column.to_string(),
        durbin_watson: durbin_watson(ordered).map_err(|e| e.to_string()),
        runs: sign_runs(ordered).map_err(|e| e.to_string()),
    }
}

//! The assumption checks as cues: the number, whether it flags, what it means for the
//! intervals and what to try.

use plumb_data::analysis::Checks;

use crate::text::{fixed, p_clause, sig};

/// A check's p-value below this flags it. Common practice, no source.
pub const CHECK_ALPHA: f64 = 0.05;
/// A Durbin–Watson `d` outside `[DW_LOW, 4 − DW_LOW]` flags neighbouring residuals that
/// follow (or alternate with) each other. Common practice, no source.
pub const DW_LOW: f64 = 1.5;

/// One check, said.
#[derive(Debug, Clone, PartialEq)]
pub struct CheckCue {
    /// What is checked, in a few words.
    pub topic: &'static str,
    /// The figures: statistic, df, p.
    pub figures: String,
    /// Whether the check flags a problem.
    pub flagged: bool,
    /// What it means for the intervals and what to try (flagged), or that nothing was seen.
    pub meaning: String,
}

/// The cues of `checks`, in the order spread, sequence, normality.
pub fn check_cues(checks: &Checks) -> Vec<CheckCue> {
    let mut out = vec![spread(checks)];
    if let Some(o) = &checks.order {
        let dw = o.durbin_watson.as_ref().ok();
        let runs = o.runs.as_ref().ok();
        let figures = match (dw, runs) {
            (Some(d), Some(r)) => format!(
                "Durbin–Watson d {} (lag-one correlation about {}); {} runs of residual signs where {} were expected, {}",
                fixed(*d, 3),
                fixed(1.0 - d / 2.0, 2),
                r.runs,
                fixed(r.expected, 1),
                p_clause(r.p_value)
            ),
            _ => o
                .durbin_watson
                .as_ref()
                .err()
                .or(o.runs.as_ref().err())
                .cloned()
                .unwrap_or_default(),
        };
        let flagged = dw.is_some_and(|d| !(DW_LOW..=4.0 - DW_LOW).contains(d))
            || runs.is_some_and(|r| r.p_value < CHECK_ALPHA);
        out.push(CheckCue {
            topic: "sequence",
            figures: format!("along {}: {figures}", o.column),
            flagged,
            meaning: if flagged {
                format!("Neighbouring residuals along {} are related (drift, carry-over or a cycle): the standard errors assume independent rows and understate the uncertainty. Plot the residuals against {}, randomize the run order, or model the drift.", o.column, o.column)
            } else {
                "No sign that neighbouring residuals follow each other.".into()
            },
        });
    }
    out.push(normality(checks));
    out
}

fn spread(checks: &Checks) -> CheckCue {
    match &checks.spread {
        Ok(b) => {
            let flagged = b.p_value < CHECK_ALPHA;
            CheckCue {
                topic: "spread",
                figures: format!(
                    "Breusch–Pagan (studentized) LM {} on {} df against the fitted values, {}",
                    fixed(b.statistic, 3),
                    b.df,
                    p_clause(b.p_value)
                ),
                flagged,
                meaning: if flagged {
                    "The spread of the residuals changes along the fit: intervals and p-values assume an even spread, so they are too narrow where it is large and too wide where it is small. Weight the fit (1/x or 1/x² when the spread grows with concentration; compare the weightings side by side) or transform the response.".into()
                } else {
                    "No sign that the spread changes along the fit.".into()
                },
            }
        }
        Err(why) => CheckCue {
            topic: "spread",
            figures: why.clone(),
            flagged: false,
            meaning: "Not checked.".into(),
        },
    }
}

fn normality(checks: &Checks) -> CheckCue {
    let (test, result) = &checks.normality;
    match result {
        Ok(n) => {
            let flagged = n.p_value < CHECK_ALPHA;
            let stat = match test {
                plumb_data::analysis::NormalityTest::ShapiroWilk => "W",
                plumb_data::analysis::NormalityTest::AndersonDarling => "A²",
            };
            CheckCue {
                topic: "normality",
                figures: format!(
                    "{} {stat} {}, {}",
                    test.name(),
                    fixed(n.statistic, 4),
                    if n.p_is_bound {
                        // A bound from a table of critical values: the p lies below it.
                        format!("p < {}", sig(n.p_value, 3))
                    } else {
                        p_clause(n.p_value)
                    }
                ),
                flagged,
                meaning: if flagged {
                    "The residuals do not look normal: t-based intervals and p-values are then approximate, the more so with few rows. Look for outliers or a skew in the quantile view; a transform of the response may help.".into()
                } else {
                    "No sign that the residuals depart from normal.".into()
                },
            }
        }
        Err(why) => CheckCue {
            topic: "normality",
            figures: format!("{}: {why}", test.name()),
            flagged: false,
            meaning: "Not checked.".into(),
        },
    }
}

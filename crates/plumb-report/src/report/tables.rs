//! The summary's CSVs: every statistic at full precision, and the exclusion log.

use std::fmt::Write as _;

use plumb_core::regression::NestedComparison;
use plumb_data::analysis::{transform_name, Analysis};

use super::page::reason_of;
use super::Beside;
use crate::effects::Effect;
use crate::session::Exclusion;
use crate::text::{csv, exact};

/// Every statistic of the fit, one per line: `section,name,term,value` (full precision);
/// then the response's scale, the Box–Cox estimate, the group tests and slopes, and the other
/// model's figures with the partial F, where there are such.
pub fn statistics_csv(outcome: &Analysis, beside: Option<&Beside>) -> String {
    let fit = &outcome.fit;
    let mut out = String::from("section,name,term,value\n");
    let mut row = |section: &str, name: &str, term: &str, v: String| {
        let _ = writeln!(out, "{},{},{},{}", csv(section), csv(name), csv(term), v);
    };
    row("rows", "used", "", fit.n.to_string());
    row(
        "rows",
        "dropped",
        "",
        outcome.rows.selection.dropped.len().to_string(),
    );
    row(
        "rows",
        "excluded",
        "",
        outcome.rows.selection.excluded.len().to_string(),
    );
    row(
        "fit",
        "r_squared",
        fit.r_squared_kind.as_str(),
        exact(fit.r_squared),
    );
    row("fit", "adj_r_squared", "", exact(fit.adj_r_squared));
    row(
        "fit",
        "residual_std_error",
        "",
        exact(fit.residual_std_error),
    );
    row("fit", "df_residual", "", fit.anova.df_residual.to_string());
    row(
        "fit",
        "f_statistic",
        "",
        fit.anova.f_statistic.map_or_else(String::new, exact),
    );
    row(
        "fit",
        "f_p_value",
        "",
        fit.anova.f_p_value.map_or_else(String::new, exact),
    );
    row("fit", "aic", "", exact(fit.aic));
    row("fit", "bic", "", exact(fit.bic));
    for c in &fit.coefficients {
        for (name, v) in [
            ("estimate", c.estimate),
            ("std_error", c.std_error),
            ("t", c.t),
            ("p_value", c.p_value),
            ("ci_low", c.ci_low),
            ("ci_high", c.ci_high),
        ] {
            row("coefficient", name, &c.term, exact(v));
        }
        row(
            "coefficient",
            "standardized",
            &c.term,
            c.standardized.map_or_else(String::new, exact),
        );
    }
    model_parts(&mut row, outcome);
    if let Some(Ok(c)) = beside.map(|b| &b.comparison) {
        for (name, f) in [("this", &c.current), ("other", &c.kept)] {
            row("comparison", "response_scale", name, csv(&f.response));
            row("comparison", "n", name, f.n.to_string());
            row("comparison", "r_squared", name, exact(f.r_squared));
            row("comparison", "adj_r_squared", name, exact(f.adj_r_squared));
            row(
                "comparison",
                "residual_std_error",
                name,
                exact(f.residual_std_error),
            );
            row("comparison", "aic", name, exact(f.aic));
            row("comparison", "bic", name, exact(f.bic));
        }
        if let Some(n) = &c.nested {
            nested(&mut row, "comparison", "partial_f", n);
        }
    }
    out
}

type Row<'a> = dyn FnMut(&str, &str, &str, String) + 'a;

fn model_parts(row: &mut Row<'_>, outcome: &Analysis) {
    let scale = outcome.rows.response_transform;
    if !scale.is_identity() {
        row("scale", "response", "", csv(&transform_name(scale)));
    }
    if let Some(b) = &outcome.rows.boxcox {
        row("box_cox", "lambda", "", exact(b.lambda));
        row(
            "box_cox",
            "ci_low",
            "",
            b.interval.0.map_or_else(String::new, exact),
        );
        row(
            "box_cox",
            "ci_high",
            "",
            b.interval.1.map_or_else(String::new, exact),
        );
    }
    if let Some(g) = &outcome.groups {
        nested(row, "groups", "equal_slopes", &g.equal_slopes);
        nested(row, "groups", "common_line", &g.common_line);
        for r in &g.table {
            row("group_slope", "n", &r.level, r.n.to_string());
            row("group_slope", "estimate", &r.level, exact(r.slope.estimate));
            row(
                "group_slope",
                "std_error",
                &r.level,
                exact(r.slope.std_error),
            );
            row("group_slope", "ci_low", &r.level, exact(r.slope.ci_low));
            row("group_slope", "ci_high", &r.level, exact(r.slope.ci_high));
        }
    }
}

fn nested(row: &mut Row<'_>, section: &str, name: &str, n: &NestedComparison) {
    row(section, name, "f_statistic", exact(n.f_statistic));
    row(section, name, "df_num", n.df_num.to_string());
    row(section, name, "df_den", n.df_den.to_string());
    row(section, name, "p_value", exact(n.p_value));
}

/// The exclusion log with the before/after numbers of each exclusion and of all together.
pub fn exclusions_csv(effects: &[Effect], log: &[Exclusion]) -> String {
    let mut out = String::from("rows,reason,recorded_at,r_squared_before,r_squared_after,slope_before,slope_after,slope_p_before,slope_p_after\n");
    for e in effects {
        let rows: Vec<String> = e.rows.iter().map(ToString::to_string).collect();
        let (reason, at) = match e.rows.as_slice() {
            [row] => reason_of(log, *row).map_or((String::new(), String::new()), |x| {
                (x.reason.clone(), x.at.clone().unwrap_or_default())
            }),
            _ => ("all exclusions together".to_string(), String::new()),
        };
        let _ = writeln!(
            out,
            "{},{},{},{},{},{},{},{},{}",
            csv(&rows.join(" ")),
            csv(&reason),
            csv(&at),
            exact(e.before.r_squared),
            exact(e.after.r_squared),
            exact(e.before.slope),
            exact(e.after.slope),
            exact(e.before.slope_p),
            exact(e.after.slope_p)
        );
    }
    out
}

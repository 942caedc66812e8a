//! JSON of a model's parts beyond its columns, in `plumb fit --format json`: the response's
//! scale, the Box–Cox estimate, the groups' tests and table, the curves per level, and the
//! comparison with a second model.

use plumb_core::regression::NestedComparison;
use plumb_data::analysis::{Analysis, Comparison, FitFigures, FitRequest};
use serde_json::{json, Value};

/// The keys `response_scale`, `box_cox`, `groups`, `curves` and `comparison` (absent ones left
/// out).
pub fn keys(
    outcome: &Analysis,
    request: &FitRequest,
    comparison: Option<&Comparison>,
) -> serde_json::Map<String, Value> {
    let mut out = serde_json::Map::new();
    out.insert(
        "response_scale".into(),
        Value::String(outcome.response_label(&request.y)),
    );
    if let Some(b) = &outcome.rows.boxcox {
        out.insert(
            "box_cox".into(),
            json!({
                "lambda": b.lambda, "ci_low": b.interval.0, "ci_high": b.interval.1,
                "level": b.level, "log_likelihood": b.log_likelihood,
            }),
        );
    }
    if let Some(g) = &outcome.groups {
        let table: Vec<Value> = g
            .table
            .iter()
            .map(|r| {
                json!({
                    "level": r.level, "n": r.n, "slope": r.slope.estimate,
                    "std_error": r.slope.std_error, "p_value": r.slope.p_value,
                    "ci_low": r.slope.ci_low, "ci_high": r.slope.ci_high,
                })
            })
            .collect();
        out.insert(
            "groups".into(),
            json!({
                "column": g.column,
                "reference": g.table.first().map(|r| r.level.clone()),
                "predictor": g.predictor,
                "equal_slopes": nested(&g.equal_slopes),
                "common_line": nested(&g.common_line),
                "table": table,
            }),
        );
    }
    if let Some(e) = outcome.extras.as_ref().filter(|e| e.curves.len() > 1) {
        let curves: Vec<Value> = e
            .curves
            .iter()
            .map(|c| {
                let pick = |f: fn(&plumb_core::regression::BandPoint) -> f64| {
                    c.points.iter().map(f).collect::<Vec<f64>>()
                };
                json!({
                    "level": c.level, "x": pick(|b| b.x), "fitted": pick(|b| b.fitted),
                    "mean_low": pick(|b| b.mean_low), "mean_high": pick(|b| b.mean_high),
                })
            })
            .collect();
        out.insert("curves".into(), Value::Array(curves));
    }
    if let Some(c) = comparison {
        out.insert(
            "comparison".into(),
            json!({
                "other": figures(&c.kept),
                "this": figures(&c.current),
                "partial_f": c.nested.as_ref().map(nested),
                "note": c.note,
            }),
        );
    }
    out
}

fn nested(c: &NestedComparison) -> Value {
    json!({
        "f_statistic": c.f_statistic, "df_num": c.df_num, "df_den": c.df_den,
        "p_value": c.p_value, "delta_r_squared": c.delta_r_squared,
        "delta_aic": c.delta_aic, "delta_bic": c.delta_bic,
    })
}

fn figures(f: &FitFigures) -> Value {
    json!({
        "response_scale": f.response, "terms": f.terms, "n": f.n, "r_squared": f.r_squared,
        "adj_r_squared": f.adj_r_squared, "residual_std_error": f.residual_std_error,
        "aic": f.aic, "bic": f.bic,
    })
}

//! The JSON contract of `plumb fit --format json`: one object on standard output.
//!
//! Numbers are written with the shortest representation that reads back to the same f64;
//! a value that is not finite (for example t when the fit is exact) is written as `null`.

use plumb_core::regression::Coefficient;
use plumb_data::analysis::{Analysis, FitRequest, PairExtras};
use plumb_data::Table;
use serde::Serialize;

#[derive(Serialize)]
struct FitJson<'a> {
    data: &'a str,
    response: &'a str,
    predictors: &'a [String],
    weights: Option<&'a str>,
    weight_rule: Option<&'static str>,
    intercept: bool,
    degree: u32,
    level: f64,
    n: usize,
    n_dropped: usize,
    dropped_rows: Vec<DroppedJson<'a>>,
    excluded_rows: &'a [usize],
    df_model: usize,
    df_residual: usize,
    r_squared: f64,
    r_squared_kind: &'static str,
    adj_r_squared: f64,
    residual_std_error: f64,
    f_statistic: Option<f64>,
    f_p_value: Option<f64>,
    anova: AnovaJson,
    log_likelihood: f64,
    aic: f64,
    bic: f64,
    condition_number: f64,
    coefficients: Vec<CoefficientJson<'a>>,
    vif: Option<Vec<VifJson<'a>>>,
}

#[derive(Serialize)]
struct VifJson<'a> {
    term: &'a str,
    vif: f64,
}

#[derive(Serialize)]
struct DroppedJson<'a> {
    row: usize,
    column: &'a str,
    reason: &'static str,
}

#[derive(Serialize)]
struct AnovaJson {
    ss_model: f64,
    ss_residual: f64,
    ss_total: f64,
    ms_model: Option<f64>,
    ms_residual: f64,
}

#[derive(Serialize)]
pub(crate) struct CoefficientJson<'a> {
    term: &'a str,
    estimate: f64,
    std_error: f64,
    t: f64,
    p_value: f64,
    ci_low: f64,
    ci_high: f64,
    standardized: Option<f64>,
}

impl<'a> From<&'a Coefficient> for CoefficientJson<'a> {
    fn from(c: &'a Coefficient) -> Self {
        Self {
            term: &c.term,
            estimate: c.estimate,
            std_error: c.std_error,
            t: c.t,
            p_value: c.p_value,
            ci_low: c.ci_low,
            ci_high: c.ci_high,
            standardized: c.standardized,
        }
    }
}

pub fn render(
    table: &Table,
    request: &FitRequest,
    outcome: &Analysis,
    extras: Option<&PairExtras>,
    model: serde_json::Map<String, serde_json::Value>,
) -> serde_json::Result<String> {
    let fit = &outcome.fit;
    let sel = &outcome.rows.selection;
    let data = table.source().to_str().unwrap_or("(path is not UTF-8)");
    let json = FitJson {
        data,
        response: &request.y,
        predictors: &request.x,
        weights: request.weights.as_deref(),
        weight_rule: request.weight_rule.map(|r| r.key()),
        intercept: request.intercept,
        degree: request.degree,
        level: fit.level,
        n: fit.n,
        n_dropped: sel.dropped.len(),
        dropped_rows: sel
            .dropped
            .iter()
            .map(|d| DroppedJson {
                row: d.row,
                column: &d.column,
                reason: d.reason.as_str(),
            })
            .collect(),
        excluded_rows: &sel.excluded,
        df_model: fit.anova.df_model,
        df_residual: fit.anova.df_residual,
        r_squared: fit.r_squared,
        r_squared_kind: fit.r_squared_kind.as_str(),
        adj_r_squared: fit.adj_r_squared,
        residual_std_error: fit.residual_std_error,
        f_statistic: fit.anova.f_statistic,
        f_p_value: fit.anova.f_p_value,
        anova: AnovaJson {
            ss_model: fit.anova.ss_model,
            ss_residual: fit.anova.ss_residual,
            ss_total: fit.anova.ss_total,
            ms_model: fit.anova.ms_model,
            ms_residual: fit.anova.ms_residual,
        },
        log_likelihood: fit.log_likelihood,
        aic: fit.aic,
        bic: fit.bic,
        condition_number: fit.condition_number,
        coefficients: fit.coefficients.iter().map(CoefficientJson::from).collect(),
        vif: outcome.vif.as_ref().map(|v| {
            fit.coefficients
                .iter()
                .zip(v)
                .filter_map(|(c, f)| f.map(|vif| VifJson { term: &c.term, vif }))
                .collect()
        }),
    };
    let mut value = serde_json::to_value(&json)?;
    if let Some(map) = value.as_object_mut() {
        if let Some(extras) = extras {
            map.extend(crate::fit_extras_json::extras(extras));
        }
        map.extend(model);
    }
    let mut text = serde_json::to_string_pretty(&value)?;
    text.push('\n');
    Ok(text)
}

//! JSON of what `plumb fit` adds beside the least-squares table: overlays, cues, z-units, VIF.

use plumb_data::analysis::{PairExtras, RobustFit};
use serde_json::{json, Value};

/// The extra keys (`robust`, `loess`, `cues`, `z_units`); absent ones are left out.
pub fn extras(extras: &PairExtras) -> serde_json::Map<String, Value> {
    let mut out = serde_json::Map::new();
    if let Some(robust) = &extras.robust {
        out.insert(
            "robust".into(),
            match robust {
                Ok(RobustFit::TheilSen(t)) => json!({
                    "method": "theil-sen", "slope": t.slope, "intercept": t.intercept,
                    "slope_ci_low": t.slope_low, "slope_ci_high": t.slope_high, "n": t.n,
                }),
                Ok(RobustFit::Deming(d)) => json!({
                    "method": "deming", "lambda": d.lambda, "slope": d.slope, "intercept": d.intercept,
                    "slope_se": d.slope_se, "intercept_se": d.intercept_se, "n": d.n,
                }),
                Err(e) => json!({ "undefined": e.to_string() }),
            },
        );
    }
    if let Some(loess) = &extras.loess {
        out.insert(
            "loess".into(),
            match loess {
                Ok(l) => json!({ "span": l.span, "degree": l.degree, "r_squared": l.r_squared, "x": l.x, "fitted": l.fitted }),
                Err(e) => json!({ "undefined": e.to_string() }),
            },
        );
    }
    if let Some(c) = &extras.cues {
        out.insert(
            "cues".into(),
            json!({
                "r": c.r,
                "linear_r_squared": c.linear_r_squared,
                "curve_r_squared": c.curve_r_squared,
                "distance_correlation": c.distance_correlation.map(|d| d.0),
                "distance_correlation_p": c.distance_correlation.map(|d| d.1),
                "grid_independence_p": c.grid_independence.map(|g| g.2),
                "nonlinear": c.nonlinear,
                "most_influential_index": c.most_influential,
                "r_without_most_influential": c.r_without_most_influential,
                "driven_by_one_point": c.driven_by_one_point,
            }),
        );
    }
    if !extras.degrees.is_empty() {
        let ladder: Vec<Value> = extras
            .degrees
            .iter()
            .map(|d| {
                json!({
                    "degree": d.degree,
                    "r_squared": d.fit.r_squared,
                    "adj_r_squared": d.fit.adj_r_squared,
                    "aic": d.fit.aic,
                    "bic": d.fit.bic,
                    "versus_previous": d.versus_previous.map(|c| json!({
                        "delta_r_squared": c.delta_r_squared, "f_statistic": c.f_statistic,
                        "df_num": c.df_num, "df_den": c.df_den, "p_value": c.p_value,
                    })),
                })
            })
            .collect();
        out.insert("degree_comparison".into(), Value::Array(ladder));
    }
    if !extras.bands.is_empty() {
        let pick = |f: fn(&plumb_core::regression::BandPoint) -> f64| {
            extras.bands.iter().map(f).collect::<Vec<f64>>()
        };
        out.insert(
            "bands".into(),
            json!({
                "x": pick(|b| b.x), "fitted": pick(|b| b.fitted),
                "mean_low": pick(|b| b.mean_low), "mean_high": pick(|b| b.mean_high),
                "predict_low": pick(|b| b.predict_low), "predict_high": pick(|b| b.predict_high),
            }),
        );
    }
    if let Some(a) = &extras.read_at {
        let p = a.point;
        out.insert(
            "at".into(),
            json!({
                "x": p.x, "fitted": p.fitted, "mean_low": p.mean_low, "mean_high": p.mean_high,
                "predict_low": p.predict_low, "predict_high": p.predict_high,
                "z_x": a.z_x, "expected_z_y": a.expected_z_y,
            }),
        );
    }
    if let Some(z) = &extras.z_view {
        out.insert("z_units".into(), json!({ "slope": z.slope, "slope_squared": z.slope_squared, "shrinkage_toward_mean": z.shrinkage() }));
    }
    out
}

//! JSON of what `plumb fit` adds beside the least-squares table: overlays, cues, the degree
//! ladder, bands, the fit read at one x, z-units.

use plumb_core::regression::BandPoint;
use plumb_data::analysis::{PairExtras, RobustFit};
use serde_json::{json, Value};

/// The extra keys (`robust`, `loess`, `cues`, `degree_comparison`, `bands`, `at`, `z_units`);
/// absent ones are left out.
pub fn extras(extras: &PairExtras) -> serde_json::Map<String, Value> {
    let keys = [
        ("robust", robust(extras)),
        ("loess", loess(extras)),
        ("cues", cues(extras)),
        ("degree_comparison", ladder(extras)),
        ("bands", bands(extras)),
        ("at", read_at(extras)),
        ("z_units", z_units(extras)),
    ];
    keys.into_iter()
        .filter_map(|(k, v)| v.map(|v| (k.to_string(), v)))
        .collect()
}

fn robust(extras: &PairExtras) -> Option<Value> {
    Some(match extras.robust.as_ref()? {
        Ok(RobustFit::TheilSen(t)) => json!({
            "method": "theil-sen", "slope": t.slope, "intercept": t.intercept,
            "slope_ci_low": t.slope_low, "slope_ci_high": t.slope_high, "n": t.n,
        }),
        Ok(RobustFit::Deming(d)) => json!({
            "method": "deming", "lambda": d.lambda, "slope": d.slope, "intercept": d.intercept,
            "slope_se": d.slope_se, "intercept_se": d.intercept_se, "n": d.n,
        }),
        Err(e) => json!({ "undefined": e.to_string() }),
    })
}

fn loess(extras: &PairExtras) -> Option<Value> {
    Some(match extras.loess.as_ref()? {
        Ok(l) => {
            json!({ "span": l.span, "degree": l.degree, "r_squared": l.r_squared, "x": l.x, "fitted": l.fitted })
        }
        Err(e) => json!({ "undefined": e.to_string() }),
    })
}

fn cues(extras: &PairExtras) -> Option<Value> {
    let c = extras.cues.as_ref()?;
    Some(json!({
        "r": c.r,
        "linear_r_squared": c.linear_r_squared,
        "curve_r_squared": c.curve_r_squared,
        "distance_correlation": c.distance_correlation.map(|d| d.0),
        "distance_correlation_p": c.distance_correlation.map(|d| d.1),
        "grid_independence_p": c.grid_independence.map(|g| g.2),
        "grid_independence": c.grid_independence.map(|(chi2, df, p)| json!({
            "chi_square": chi2, "df": df, "p_value": p,
        })),
        "nonlinear": c.nonlinear,
        "most_influential_index": c.most_influential,
        "r_without_most_influential": c.r_without_most_influential,
        "driven_by_one_point": c.driven_by_one_point,
    }))
}

fn ladder(extras: &PairExtras) -> Option<Value> {
    if extras.degrees.is_empty() {
        return None;
    }
    let rungs = extras.degrees.iter().map(|d| {
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
    });
    Some(Value::Array(rungs.collect()))
}

fn bands(extras: &PairExtras) -> Option<Value> {
    if extras.bands().is_empty() {
        return None;
    }
    let pick = |f: fn(&BandPoint) -> f64| extras.bands().iter().map(f).collect::<Vec<f64>>();
    Some(json!({
        "x": pick(|b| b.x), "fitted": pick(|b| b.fitted),
        "mean_low": pick(|b| b.mean_low), "mean_high": pick(|b| b.mean_high),
        "predict_low": pick(|b| b.predict_low), "predict_high": pick(|b| b.predict_high),
    }))
}

fn read_at(extras: &PairExtras) -> Option<Value> {
    let a = extras.read_at.as_ref()?;
    let p = a.point;
    Some(json!({
        "x": p.x, "fitted": p.fitted, "mean_low": p.mean_low, "mean_high": p.mean_high,
        "predict_low": p.predict_low, "predict_high": p.predict_high,
        "z_x": a.z_x, "expected_z_y": a.expected_z_y,
    }))
}

fn z_units(extras: &PairExtras) -> Option<Value> {
    let z = extras.z_view.as_ref()?;
    Some(
        json!({ "slope": z.slope, "slope_squared": z.slope_squared, "shrinkage_toward_mean": z.shrinkage() }),
    )
}

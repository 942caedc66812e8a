//! `plumb calibrate`: fit the standards, read the unknowns back, and say how far the line can
//! be trusted (limits, lack of fit, weightings, checks).

use std::fmt::Write;

use plumb_core::calibration::{Interval, ReadBack};
use plumb_data::analysis::{
    analyze, assumption_checks, calibrate, calibration_ready, Analysis, CalibrationReport,
    CalibrationRequest, Checks, FitRequest, Wanted,
};
use plumb_data::Table;
use plumb_report::text::{count, fixed, num, p as pval, plural};
use plumb_report::wording;
use plumb_report::wording::numbers as words;
use serde_json::{json, Value};

use crate::cli::{CalibrateArgs, Format};

pub fn run(args: &CalibrateArgs) -> anyhow::Result<String> {
    let mut columns = args.model.columns();
    columns.extend(args.order.order.iter().cloned());
    let table = plumb_data::load(&args.load.data, &args.load.options_for(columns))?;
    let request = args.model.request(&table).map_err(anyhow::Error::msg)?;
    calibration_ready(&request)?;
    let unknowns = args.unknowns.read(&request.y, &args.load.options())?;
    let analysis = analyze(&table, &request, Wanted::default())?;
    let wanted = CalibrationRequest {
        unknowns,
        sigma: args.sigma.source(),
    };
    let report = calibrate(&request, &analysis, &wanted)?;
    let checks = assumption_checks(&table, &analysis, &args.order.row_order())?;
    Ok(match args.format {
        Format::Json => {
            let mut text = serde_json::to_string_pretty(&to_json(
                &table, &request, &analysis, &report, &checks,
            ))?;
            text.push('\n');
            text
        }
        Format::Text => render(&table, &request, &analysis, &report, &checks),
    })
}

fn to_json(
    table: &Table,
    request: &FitRequest,
    a: &Analysis,
    r: &CalibrationReport,
    checks: &Checks,
) -> Value {
    let fit = &a.fit;
    json!({
        "data": table.source().to_str().unwrap_or("(path is not UTF-8)"),
        "response": request.y,
        "predictor": request.x[0],
        "degree": request.degree,
        "intercept": request.intercept,
        "weighting": r.weighting,
        "level": fit.level,
        "n": fit.n,
        "excluded_rows": a.rows.selection.excluded,
        "range": [r.range.0, r.range.1],
        "coefficients": fit.coefficients.iter().map(|c| json!({
            "term": c.term, "estimate": c.estimate, "std_error": c.std_error,
        })).collect::<Vec<_>>(),
        "r_squared": fit.r_squared,
        "residual_std_error": fit.residual_std_error,
        "df_residual": fit.anova.df_residual,
        "unknowns": r.unknowns.iter().map(|(u, rb)| {
            let mut v = json!({ "name": u.name, "readings": u.readings });
            match rb {
                Ok(rb) => extend(&mut v, read_back_json(rb, r.limits.as_ref().ok())),
                Err(e) => extend(&mut v, json!({ "undefined": e })),
            }
            v
        }).collect::<Vec<_>>(),
        "limits": limits_json(&r.limits),
        "limits_other_sigma": limits_json(&r.other_limits),
        "lack_of_fit": match &r.lack_of_fit {
            Ok(l) => json!({
                "levels": l.levels, "pure_error_ss": l.pure_error_ss, "pure_error_df": l.pure_error_df,
                "lack_of_fit_ss": l.lack_of_fit_ss, "lack_of_fit_df": l.lack_of_fit_df,
                "f_statistic": l.f, "p_value": l.p_value,
            }),
            Err(e) => json!({ "undefined": e }),
        },
        "weightings": r.weightings.iter().map(|w| match &w.outcome {
            Ok(f) => json!({
                "weighting": w.label, "r_squared": f.r_squared,
                "sum_abs_relative_error_pct": f.sum_abs_relative_error,
                "max_abs_relative_error_pct": f.max_abs_relative_error,
                "spread_ratio": f.spread_ratio, "spread_p_value": f.spread_p,
            }),
            Err(e) => json!({ "weighting": w.label, "undefined": e }),
        }).collect::<Vec<_>>(),
        "checks": crate::checks_out::json(checks),
    })
}

fn extend(v: &mut Value, more: Value) {
    if let (Some(a), Value::Object(b)) = (v.as_object_mut(), more) {
        a.extend(b);
    }
}

fn read_back_json(
    rb: &ReadBack,
    limits: Option<&plumb_core::calibration::DetectionLimits>,
) -> Value {
    let exact = match rb.exact {
        Interval::Bounded { low, high } => json!({ "kind": "bounded", "low": low, "high": high }),
        Interval::Open { low, high } => json!({ "kind": "open", "low": low, "high": high }),
        Interval::Unbounded { outside_of } => {
            json!({ "kind": "unbounded", "outside_of": outside_of.map(|(a, b)| [a, b]) })
        }
    };
    json!({
        "mean_reading": rb.reading, "replicates": rb.replicates, "x": rb.x,
        "outside_range": rb.outside_range, "std_error": rb.std_error,
        "below_detection": limits.is_some_and(|l| rb.x < l.detection),
        "below_quantitation": limits.is_some_and(|l| rb.x < l.quantitation),
        "approx_low": rb.approximate.0, "approx_high": rb.approximate.1, "exact": exact,
    })
}

fn limits_json(l: &Result<plumb_core::calibration::DetectionLimits, String>) -> Value {
    match l {
        Ok(l) => json!({
            "sigma_source": l.source.label(), "sigma": l.sigma, "slope": l.slope,
            "sigma_at_lowest_standard": l.at_lowest_standard,
            "detection": l.detection, "quantitation": l.quantitation,
        }),
        Err(e) => json!({ "undefined": e }),
    }
}

fn render(
    table: &Table,
    request: &FitRequest,
    a: &Analysis,
    r: &CalibrationReport,
    checks: &Checks,
) -> String {
    let mut out = String::new();
    // Writing to a String cannot fail.
    let _ = write_curve(&mut out, table, request, a, r);
    let _ = write_unknowns(&mut out, r, a.fit.level);
    let _ = write_limits_and_fit(&mut out, r);
    let _ = write_weightings(&mut out, r);
    let _ = crate::checks_out::write(&mut out, checks);
    let _ = writeln!(out, "  note: {}", wording::line(&wording::FIT_CAUTIONS));
    out
}

fn write_curve(
    out: &mut String,
    table: &Table,
    request: &FitRequest,
    a: &Analysis,
    r: &CalibrationReport,
) -> std::fmt::Result {
    let fit = &a.fit;
    let terms = plumb_report::text::equation_terms(fit);
    writeln!(out, "{}", table.source().display())?;
    writeln!(
        out,
        "  calibration   {} = {}   (weights: {})",
        request.y,
        terms.join(" + "),
        r.weighting
    )?;
    let coefs: Vec<String> = fit
        .coefficients
        .iter()
        .enumerate()
        .map(|(j, c)| format!("b{j} {} ± {}", num(c.estimate), num(c.std_error)))
        .collect();
    writeln!(out, "                {}", coefs.join(", "))?;
    writeln!(
        out,
        "  standards     {} from {} to {} ({} left out by you); R² {}{}, {} {}",
        plural(fit.n, "reading", "readings"),
        num(r.range.0),
        num(r.range.1),
        count(a.rows.selection.excluded.len()),
        num(fit.r_squared),
        if r.weighting == "none" {
            ""
        } else {
            " (weighted)"
        },
        words::TYPICAL_MISS,
        words::typical_miss(fit.residual_std_error, fit.anova.df_residual)
    )?;
    writeln!(out)
}

fn write_unknowns(out: &mut String, r: &CalibrationReport, level: f64) -> std::fmt::Result {
    if r.unknowns.is_empty() {
        return writeln!(
            out,
            "  unknowns      none given (--unknown NAME=READINGS or --unknowns-file FILE)\n"
        );
    }
    writeln!(
        out,
        "  unknowns read back ({} intervals; first-order: x̂ ± t × standard error; band: where the prediction band holds the reading)",
        words::level(level)
    )?;
    writeln!(
        out,
        "    {:<14} {:>3} {:>12} {:>12} {:>17}   {:<27} band",
        "sample",
        "m",
        "mean reading",
        "x̂",
        words::STANDARD_ERROR,
        "first-order"
    )?;
    for (u, rb) in &r.unknowns {
        match rb {
            Ok(rb) => {
                writeln!(
                    out,
                    "    {:<14} {:>3} {:>12} {:>12} {:>17}   {:<27} {}",
                    u.name,
                    rb.replicates,
                    num(rb.reading),
                    num(rb.x),
                    num(rb.std_error),
                    format!("{} to {}", num(rb.approximate.0), num(rb.approximate.1)),
                    wording::calibration::interval(&rb.exact)
                )?;
                if rb.outside_range {
                    writeln!(
                        out,
                        "    {:<14} {}",
                        "",
                        wording::calibration::OUTSIDE_RANGE
                    )?;
                }
            }
            Err(e) => writeln!(out, "    {:<14} {e}", u.name)?,
        }
    }
    writeln!(out)
}

fn write_limits_and_fit(out: &mut String, r: &CalibrationReport) -> std::fmt::Result {
    match (&r.limits, &r.other_limits) {
        (Ok(l), other) => {
            writeln!(out, "  limits        {}", wording::calibration::limits(l))?;
            if let Ok(o) = other {
                writeln!(
                    out,
                    "                with the other σ: {}",
                    wording::calibration::limits(o)
                )?;
            }
            writeln!(
                out,
                "                {}",
                wording::calibration::LIMITS_CAUTION
            )?;
        }
        (Err(e), _) => writeln!(out, "  limits        {e}")?,
    }
    match &r.lack_of_fit {
        Ok(l) => writeln!(
            out,
            "  lack of fit   {} levels: lack-of-fit SS {} ({} df) against pure error {} ({} df); {}{}",
            l.levels,
            num(l.lack_of_fit_ss),
            l.lack_of_fit_df,
            num(l.pure_error_ss),
            l.pure_error_df,
            words::f_figures(l.f, l.lack_of_fit_df, l.pure_error_df, l.p_value),
            if l.p_value < wording::CHECK_ALPHA {
                ": the curve misses the level means by more than the replicates scatter; try another degree or look for a bad standard"
            } else {
                ""
            }
        )?,
        Err(e) => writeln!(out, "  lack of fit   {e}")?,
    }
    writeln!(out)
}

fn write_weightings(out: &mut String, r: &CalibrationReport) -> std::fmt::Result {
    writeln!(
        out,
        "  weightings side by side (back-calculated standards' relative error; spread of weighted residuals, upper half over lower)"
    )?;
    writeln!(
        out,
        "    {:<12} {:>10} {:>11} {:>11} {:>8} {:>9}",
        "weights", "R²", "Σ|RE| %", "max|RE| %", "spread", "spread p"
    )?;
    for w in &r.weightings {
        match &w.outcome {
            Ok(f) => writeln!(
                out,
                "    {:<12} {:>10} {:>11} {:>11} {:>8} {:>9}",
                w.label,
                num(f.r_squared),
                fixed(f.sum_abs_relative_error, 2),
                fixed(f.max_abs_relative_error, 2),
                fixed(f.spread_ratio, 2),
                f.spread_p.map_or_else(|| "—".into(), pval)
            )?,
            Err(e) => writeln!(out, "    {:<12} {e}", w.label)?,
        }
    }
    writeln!(out)
}

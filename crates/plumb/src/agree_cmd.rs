//! `plumb agree`: two methods on the same samples — the Passing–Bablok and Deming lines
//! against the line of identity, and the limits of agreement of their differences.

use std::fmt::Write;

use plumb_core::agreement::{AgreementLimits, DifferenceScale, PassingBablok};
use plumb_data::analysis::{agree, AgreementReport, AgreementRequest, DemingLine};
use plumb_data::Table;
use plumb_report::text::{count, fixed, num, p_clause, plural};
use plumb_report::wording;
use plumb_report::wording::numbers as words;
use serde_json::{json, Value};

use crate::cli::{AgreeArgs, Format};

pub fn run(args: &AgreeArgs) -> anyhow::Result<String> {
    let columns = vec![args.reference.clone(), args.test.clone()];
    let table = plumb_data::load(&args.load.data, &args.load.options_for(columns))?;
    if !(args.deming_ratio.is_finite() && args.deming_ratio > 0.0) {
        anyhow::bail!(
            "--deming-ratio {} must be a positive number (1 means equal error in both methods)",
            args.deming_ratio
        );
    }
    let request = AgreementRequest {
        reference: args.reference.clone(),
        test: args.test.clone(),
        exclude: match &args.exclude {
            Some(r) => r
                .within(table.n_rows(), table.source())
                .map_err(anyhow::Error::msg)?,
            None => Vec::new(),
        },
        level: args.level,
        deming_ratio: args.deming_ratio,
        percent: args.percent,
        ..AgreementRequest::default()
    };
    let report = agree(&table, &request)?;
    Ok(match args.format {
        Format::Json => {
            let mut text = serde_json::to_string_pretty(&to_json(&table, &request, &report))?;
            text.push('\n');
            text
        }
        Format::Text => render(&table, &request, &report),
    })
}

fn to_json(table: &Table, request: &AgreementRequest, r: &AgreementReport) -> Value {
    json!({
        "data": table.source().to_str().unwrap_or("(path is not UTF-8)"),
        "reference": request.reference,
        "test": request.test,
        "level": r.level,
        "n": r.selection.rows.len(),
        "excluded_rows": r.selection.excluded,
        "n_dropped": r.selection.dropped.len(),
        "passing_bablok": match &r.passing_bablok {
            Ok(pb) => pb_json(pb),
            Err(e) => json!({ "undefined": e }),
        },
        "deming": match &r.deming {
            Ok(d) => deming_json(d),
            Err(e) => json!({ "undefined": e }),
        },
        "differences": match &r.limits {
            Ok(l) => limits_json(l),
            Err(e) => json!({ "undefined": e }),
        },
    })
}

fn pb_json(pb: &PassingBablok) -> Value {
    let interval = match &pb.interval {
        Ok(i) => json!({
            "slope_low": i.slope_low, "slope_high": i.slope_high,
            "intercept_low": i.intercept_low, "intercept_high": i.intercept_high,
        }),
        Err(e) => json!({ "undefined": format!("{e:?}") }),
    };
    let l = &pb.linearity;
    json!({
        "slope": pb.slope, "intercept": pb.intercept, "interval": interval,
        "slopes": pb.slopes, "below_minus_one": pb.below_minus_one, "minus_one": pb.minus_one,
        "linearity": { "statistic": l.statistic, "bound": l.bound, "p_value": l.p_value,
            "above": l.above, "below": l.below, "deviates": l.deviates },
        "kendall_tau": pb.association.tau, "kendall_p_value": pb.association.p_value,
        "association_doubtful": pb.association.doubtful,
    })
}

fn deming_json(d: &DemingLine) -> Value {
    json!({
        "lambda": d.fit.lambda, "slope": d.fit.slope, "intercept": d.fit.intercept,
        "slope_se": d.fit.slope_se, "intercept_se": d.fit.intercept_se,
        "slope_low": d.slope_interval.0, "slope_high": d.slope_interval.1,
        "intercept_low": d.intercept_interval.0, "intercept_high": d.intercept_interval.1,
    })
}

fn limits_json(l: &AgreementLimits) -> Value {
    json!({
        "scale": match l.scale { DifferenceScale::Absolute => "test - reference", DifferenceScale::PercentOfMean => "percent of mean" },
        "bias": l.bias, "sd": l.sd, "multiplier": l.multiplier,
        "lower": l.lower, "upper": l.upper,
        "bias_low": l.bias_interval.0, "bias_high": l.bias_interval.1,
        "lower_low": l.lower_interval.0, "lower_high": l.lower_interval.1,
        "upper_low": l.upper_interval.0, "upper_high": l.upper_interval.1,
        "proportional": l.proportional.map(|p| json!({
            "intercept": p.intercept, "slope": p.slope, "slope_se": p.slope_std_error,
            "t": p.t, "p_value": p.p_value, "df": p.df,
        })),
    })
}

fn render(table: &Table, request: &AgreementRequest, r: &AgreementReport) -> String {
    let mut out = String::new();
    // Writing to a String cannot fail.
    let _ = write_head(&mut out, table, request, r);
    let _ = write_lines(&mut out, r);
    let _ = write_differences(&mut out, r);
    let _ = writeln!(out, "  note: {}", wording::line(&wording::FIT_CAUTIONS));
    out
}

fn write_head(
    out: &mut String,
    table: &Table,
    request: &AgreementRequest,
    r: &AgreementReport,
) -> std::fmt::Result {
    writeln!(out, "{}", table.source().display())?;
    writeln!(
        out,
        "  methods    {} (new) against {} (established), {}; {} dropped for gaps; {} excluded by you",
        request.test,
        request.reference,
        plural(r.selection.rows.len(), "sample", "samples"),
        count(r.selection.dropped.len()),
        count(r.selection.excluded.len())
    )?;
    writeln!(
        out,
        "  agreement would be a slope of 1 and an intercept of 0; {} intervals\n",
        words::level(r.level)
    )
}

fn write_lines(out: &mut String, r: &AgreementReport) -> std::fmt::Result {
    match &r.passing_bablok {
        Ok(pb) => {
            let ends = match &pb.interval {
                Ok(i) => (
                    format!("{} to {}", num(i.slope_low), num(i.slope_high)),
                    format!("{} to {}", num(i.intercept_low), num(i.intercept_high)),
                ),
                Err(e) => (format!("undefined ({e:?})"), "undefined".into()),
            };
            writeln!(
                out,
                "  Passing–Bablok   slope {} ({}), intercept {} ({})",
                num(pb.slope),
                ends.0,
                num(pb.intercept),
                ends.1
            )?;
            writeln!(
                out,
                "                   {}",
                wording::agreement::verdict(pb)
            )?;
            let l = &pb.linearity;
            writeln!(
                out,
                "                   linearity: largest cusum {} against {} ({}){}",
                fixed(l.statistic, 3),
                fixed(l.bound, 3),
                p_clause(l.p_value),
                if l.deviates {
                    format!(". {}", wording::agreement::NOT_STRAIGHT)
                } else {
                    String::new()
                }
            )?;
            writeln!(
                out,
                "                   Kendall τ {} ({}){}",
                fixed(pb.association.tau, 3),
                p_clause(pb.association.p_value),
                if pb.association.doubtful {
                    format!(". {}", wording::agreement::NOT_RISING_TOGETHER)
                } else {
                    String::new()
                }
            )?;
        }
        Err(e) => writeln!(out, "  Passing–Bablok   {e}")?,
    }
    match &r.deming {
        Ok(d) => writeln!(
            out,
            "  Deming (λ = {})  slope {} ({} to {}), intercept {} ({} to {}); {} (jackknife) {} and {}",
            num(d.fit.lambda),
            num(d.fit.slope),
            num(d.slope_interval.0),
            num(d.slope_interval.1),
            num(d.fit.intercept),
            num(d.intercept_interval.0),
            num(d.intercept_interval.1),
            words::STANDARD_ERROR,
            num(d.fit.slope_se),
            num(d.fit.intercept_se)
        )?,
        Err(e) => writeln!(out, "  Deming           {e}")?,
    }
    writeln!(out)
}

fn write_differences(out: &mut String, r: &AgreementReport) -> std::fmt::Result {
    let l = match &r.limits {
        Ok(l) => l,
        Err(e) => return writeln!(out, "  differences      {e}\n"),
    };
    let unit = match l.scale {
        DifferenceScale::Absolute => "new − established",
        DifferenceScale::PercentOfMean => "(new − established) as % of the pair's mean",
    };
    writeln!(out, "  differences      {unit}, against the pair's mean")?;
    writeln!(
        out,
        "    bias           {} ({} to {}), SD {}",
        num(l.bias),
        num(l.bias_interval.0),
        num(l.bias_interval.1),
        num(l.sd)
    )?;
    writeln!(
        out,
        "    limits         {} ({} to {}) and {} ({} to {}): bias ± {}·SD",
        num(l.lower),
        num(l.lower_interval.0),
        num(l.lower_interval.1),
        num(l.upper),
        num(l.upper_interval.0),
        num(l.upper_interval.1),
        fixed(l.multiplier, 4)
    )?;
    if let Some(p) = &l.proportional {
        writeln!(
            out,
            "    with the level slope {} per unit of the mean ({} {}, {})",
            num(p.slope),
            words::STANDARD_ERROR,
            num(p.slope_std_error),
            p_clause(p.p_value)
        )?;
    }
    if let Some(note) = wording::agreement::proportional(l) {
        writeln!(out, "    {note}")?;
    }
    writeln!(out)
}

//! The readable layout of `plumb fit`: the model and its rows, the headline (the share of
//! variation explained, the typical miss, the whole-model test), the term table, the variance
//! split, and the cautions. Its words are those of `plumb_report::wording::numbers`, which the
//! workbench and the summary read too.

use std::fmt::Write;

use plumb_core::regression::LinearFit;
use plumb_data::analysis::{Analysis, FitRequest, PairExtras, RobustFit};
use plumb_data::Table;
use plumb_report::text::{count, fixed, num, p as pval, p_clause, sig};
use plumb_report::wording;
use plumb_report::wording::numbers::{self as words, Headline};

/// Condition number above which the text output warns that the terms nearly coincide.
/// Common practice, no source: around 1e8 half of double precision's digits are at risk.
const CONDITION_WARNING: f64 = 1e8;

pub fn render(
    table: &Table,
    request: &FitRequest,
    outcome: &Analysis,
    extras: Option<&PairExtras>,
    model: &str,
) -> String {
    let mut out = String::new();
    // Writing to a String cannot fail.
    let _ = write_header(&mut out, table, request, outcome);
    let _ = write_headline(&mut out, request, outcome);
    let _ = write_coefficients(&mut out, &outcome.fit);
    let _ = write_variance_split(&mut out, &outcome.fit);
    let _ = write_rows_and_inflation(&mut out, outcome);
    if let Some(e) = extras {
        let _ = write_extras(&mut out, request, outcome, e);
    }
    out.push_str(model);
    let _ = write_cautions(&mut out, table, outcome);
    out
}

fn write_extras(
    out: &mut String,
    request: &FitRequest,
    o: &Analysis,
    e: &PairExtras,
) -> std::fmt::Result {
    write_z_units(out, request, o, e)?;
    write_overlays(out, e)?;
    write_ladder_and_cues(out, o, e)?;
    writeln!(out)
}

/// The pair in z-units and the fit read at one x.
fn write_z_units(
    out: &mut String,
    request: &FitRequest,
    o: &Analysis,
    e: &PairExtras,
) -> std::fmt::Result {
    if let Some(z) = &e.z_view {
        // The slope in z-units is r only for the plain, unweighted straight line.
        let is_the_line = o.fit.coefficients.len() == 2
            && request.intercept
            && request.weights.is_none()
            && request.weight_rule.is_none();
        let x = request.x.first().map_or("x", String::as_str);
        let y = o.response_label(&request.y);
        for (k, line) in words::z_units(z, x, &y, is_the_line).iter().enumerate() {
            let label = if k == 0 { "in z-units" } else { "" };
            writeln!(out, "  {label:<21}{line}")?;
        }
    }
    if let Some(a) = &e.read_at {
        let p = a.point;
        let label = format!("at x = {}", num(p.x));
        writeln!(
            out,
            "  {label:<21}fitted {}; mean in [{}, {}]; a new reading in [{}, {}]",
            num(p.fitted),
            num(p.mean_low),
            num(p.mean_high),
            num(p.predict_low),
            num(p.predict_high)
        )?;
        writeln!(out, "                       x is {} SD from its mean; expected {} SD on y (toward the mean by {})", sig(a.z_x, 3), sig(a.expected_z_y, 3), sig(a.z_x.abs() - a.expected_z_y.abs(), 3))?;
    }
    Ok(())
}

/// The overlay line and the LOESS smooth.
fn write_overlays(out: &mut String, e: &PairExtras) -> std::fmt::Result {
    match &e.robust {
        Some(Ok(RobustFit::TheilSen(t))) => writeln!(
            out,
            "  Theil–Sen line       slope {} [{}, {}], intercept {}",
            num(t.slope),
            num(t.slope_low),
            num(t.slope_high),
            num(t.intercept)
        )?,
        Some(Ok(RobustFit::Deming(d))) => writeln!(
            out,
            "  Deming line (λ = {})  slope {} ± {}, intercept {} ± {} (± jackknife standard error)",
            d.lambda,
            num(d.slope),
            num(d.slope_se),
            num(d.intercept),
            num(d.intercept_se)
        )?,
        Some(Err(why)) => writeln!(out, "  overlay line         {why}")?,
        None => {}
    }
    match &e.loess {
        Some(Ok(l)) => writeln!(
            out,
            "  LOESS (span {})     R² {}",
            num(l.span),
            num(l.r_squared)
        )?,
        Some(Err(why)) => writeln!(out, "  LOESS                {why}")?,
        None => {}
    }
    Ok(())
}

/// The polynomial ladder and the cues.
fn write_ladder_and_cues(out: &mut String, o: &Analysis, e: &PairExtras) -> std::fmt::Result {
    if e.degrees.len() > 1 {
        let steps: Vec<String> = e
            .degrees
            .iter()
            .skip(1)
            .filter_map(|d| {
                d.versus_previous.map(|c| {
                    format!(
                        "degree {}: R² up by {}, partial F {} ({})",
                        d.degree,
                        sig(c.delta_r_squared, 3),
                        sig(c.f_statistic, 4),
                        p_clause(c.p_value)
                    )
                })
            })
            .collect();
        writeln!(out, "  adding powers        {}", steps.join("; "))?;
    }
    if let Some(c) = &e.cues {
        let rows = &o.rows.selection.rows;
        for cue in wording::pair_cues(c, |i| rows.get(i).copied()) {
            writeln!(out, "  cue: {}", cue.text)?;
        }
    }
    Ok(())
}

/// The model line and the row account.
fn write_header(
    out: &mut String,
    table: &Table,
    request: &FitRequest,
    o: &Analysis,
) -> std::fmt::Result {
    let fit = &o.fit;
    let sel = &o.rows.selection;
    let terms = plumb_report::text::equation_terms(fit);
    let weighting = plumb_data::analysis::weighting_label(request);
    let method = if weighting == "none" {
        "least squares".to_string()
    } else {
        format!("weighted least squares, weights {weighting}")
    };
    writeln!(out, "{}", table.source().display())?;
    writeln!(
        out,
        "  model   {} = {}   ({method})",
        o.response_label(&request.y),
        terms.join(" + ")
    )?;
    writeln!(
        out,
        "  rows    {} used of {}; {} dropped for gaps; {} excluded by you{}",
        count(fit.n),
        count(table.n_rows()),
        count(sel.dropped.len()),
        count(sel.excluded.len()),
        if sel.excluded.is_empty() {
            String::new()
        } else {
            format!(" ({})", join_rows(&sel.excluded))
        }
    )?;
    writeln!(out)
}

/// R² in a sentence, then adjusted R², the typical miss and the whole-model test, and the
/// information criteria.
fn write_headline(out: &mut String, request: &FitRequest, o: &Analysis) -> std::fmt::Result {
    let fit = &o.fit;
    let label = o.response_label(&request.y);
    let weighted = request.weights.is_some() || request.weight_rule.is_some();
    let kinds = words::r_squared_kinds(&label, &request.y, weighted);
    let h = Headline::of_fit(fit, &label, kinds);
    writeln!(out, "  {}: {}", h.r_squared(), h.share())?;
    for line in h.lines() {
        writeln!(out, "    {:<20}{}", line.label, line.figures)?;
    }
    writeln!(
        out,
        "    {:<20}AIC {}, BIC {}, log-likelihood {}",
        "to compare models",
        fixed(fit.aic, 3),
        fixed(fit.bic, 3),
        fixed(fit.log_likelihood, 3)
    )?;
    writeln!(out)
}

/// The term table.
fn write_coefficients(out: &mut String, fit: &LinearFit) -> std::fmt::Result {
    let interval = words::interval(fit.level);
    writeln!(
        out,
        "  {:<18} {:>14} {:>17} {:>9} {:>10}   {:<29} {:>9}",
        "term",
        words::VALUE,
        words::STANDARD_ERROR,
        "t",
        "p",
        interval,
        "z-units"
    )?;
    for c in &fit.coefficients {
        writeln!(
            out,
            "  {:<18} {:>14} {:>17} {:>9} {:>10}   {:<29} {:>9}",
            c.term,
            num(c.estimate),
            num(c.std_error),
            sig(c.t, 4),
            pval(c.p_value),
            words::interval_ends(c.ci_low, c.ci_high, 6),
            c.standardized.map_or_else(|| "—".into(), |v| sig(v, 4)),
        )?;
    }
    writeln!(out)
}

/// The split of the total sum of squares.
fn write_variance_split(out: &mut String, fit: &LinearFit) -> std::fmt::Result {
    writeln!(
        out,
        "  variance split          sum of squares    df      mean square"
    )?;
    let a = &fit.anova;
    writeln!(
        out,
        "    explained by model  {:>16}  {:>4}  {:>15}",
        num(a.ss_model),
        a.df_model,
        a.ms_model.map_or_else(|| "—".into(), num)
    )?;
    writeln!(
        out,
        "    left in residuals   {:>16}  {:>4}  {:>15}",
        num(a.ss_residual),
        a.df_residual,
        num(a.ms_residual)
    )?;
    let total = if fit.r_squared_kind == plumb_core::regression::RSquaredKind::Centered {
        "total, around mean"
    } else {
        "total, around zero"
    };
    writeln!(
        out,
        "    {total:<20}{:>16}  {:>4}",
        num(a.ss_total),
        a.df_model + a.df_residual
    )
}

/// The rows dropped for gaps and the variance inflation of each predictor.
fn write_rows_and_inflation(out: &mut String, o: &Analysis) -> std::fmt::Result {
    let sel = &o.rows.selection;
    if !sel.dropped.is_empty() {
        writeln!(out)?;
        let listed: Vec<String> = sel
            .dropped
            .iter()
            .take(12)
            .map(|d| format!("{} ({} {})", d.row, d.column, d.reason.as_str()))
            .collect();
        let more = sel.dropped.len().saturating_sub(12);
        writeln!(
            out,
            "  dropped rows: {}{}",
            listed.join(", "),
            if more > 0 {
                format!(" and {} more", count(more))
            } else {
                String::new()
            }
        )?;
    }
    if let Some(vif) = &o.vif {
        let parts: Vec<String> = o
            .fit
            .coefficients
            .iter()
            .zip(vif)
            .filter_map(|(c, v)| v.map(|v| format!("{} {}", c.term, sig(v, 3))))
            .collect();
        writeln!(out, "\n  variance inflation    {}", parts.join(", "))?;
    }
    writeln!(out)
}

fn write_cautions(out: &mut String, table: &Table, o: &Analysis) -> std::fmt::Result {
    let (fit, sel) = (&o.fit, &o.rows.selection);
    if fit.condition_number > CONDITION_WARNING {
        writeln!(
            out,
            "  warning: the terms nearly coincide (condition number {}); estimates may be unstable",
            sig(fit.condition_number, 3)
        )?;
    }
    if !sel.excluded.is_empty() {
        writeln!(
            out,
            "  note: rows were excluded by hand; record a reason for each with the results."
        )?;
    }
    writeln!(out, "  note: {}", wording::line(&wording::FIT_CAUTIONS))?;
    for note in table.notes() {
        writeln!(out, "  note: {note}")?;
    }
    Ok(())
}

fn join_rows(rows: &[usize]) -> String {
    rows.iter()
        .map(ToString::to_string)
        .collect::<Vec<_>>()
        .join(", ")
}

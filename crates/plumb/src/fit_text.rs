//! The readable layout of `plumb fit`: a model line, the coefficient table, fit quality,
//! the variance split, the row account, and the cautions.

use std::fmt::Write;

use plumb_core::regression::LinearFit;
use plumb_data::analysis::{Analysis, FitRequest, PairExtras, RobustFit};
use plumb_data::Table;
use plumb_report::text::{fixed, num, p as pval};
use plumb_report::wording;

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
    let _ = write_coefficients(&mut out, &outcome.fit);
    let _ = write_quality(&mut out, &outcome.fit);
    let _ = write_variance_split(&mut out, &outcome.fit);
    let _ = write_rows_and_inflation(&mut out, outcome);
    if let Some(e) = extras {
        let _ = write_extras(&mut out, outcome, e);
    }
    out.push_str(model);
    let _ = write_cautions(&mut out, table, outcome);
    out
}

fn write_extras(out: &mut String, o: &Analysis, e: &PairExtras) -> std::fmt::Result {
    write_z_units(out, e)?;
    write_overlays(out, e)?;
    write_ladder_and_cues(out, o, e)?;
    writeln!(out)
}

/// The pair in z-units and the fit read at one x.
fn write_z_units(out: &mut String, e: &PairExtras) -> std::fmt::Result {
    if let Some(z) = &e.z_view {
        writeln!(out, "  in z-units           slope {} (= r), slope² {} (= R² of the line); a unit z SDs out on x is expected {}·z SDs out on y", fixed(z.slope, 4), fixed(z.slope_squared, 4), fixed(z.slope, 3))?;
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
        writeln!(out, "                       x is {} SDs from its mean; expected {} SDs on y (toward the mean by {})", fixed(a.z_x, 3), fixed(a.expected_z_y, 3), fixed(a.z_x.abs() - a.expected_z_y.abs(), 3))?;
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
            "  Deming line (λ = {})  slope {} ± {} (jackknife SE), intercept {} ± {}",
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
        Some(Ok(l)) => writeln!(out, "  LOESS (span {})     R² {:.6}", l.span, l.r_squared)?,
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
                        "degree {}: ΔR² {:+.4}, partial F {} (p {})",
                        d.degree,
                        c.delta_r_squared,
                        fixed(c.f_statistic, 3),
                        pval(c.p_value)
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
        fit.n,
        table.n_rows(),
        sel.dropped.len(),
        sel.excluded.len(),
        if sel.excluded.is_empty() {
            String::new()
        } else {
            format!(" ({})", join_rows(&sel.excluded))
        }
    )?;
    writeln!(out)
}

/// The coefficient table.
fn write_coefficients(out: &mut String, fit: &LinearFit) -> std::fmt::Result {
    let pct = format!("{}% interval", fit.level * 100.0);
    writeln!(
        out,
        "  {:<18} {:>14} {:>12} {:>9} {:>11}   {:<29} {:>9}",
        "term", "estimate", "std. error", "t", "p", pct, "z-units"
    )?;
    for c in &fit.coefficients {
        writeln!(
            out,
            "  {:<18} {:>14} {:>12} {:>9} {:>11}   [{:>12}, {:>12}] {:>9}",
            c.term,
            num(c.estimate),
            num(c.std_error),
            fixed(c.t, 3),
            pval(c.p_value),
            num(c.ci_low),
            num(c.ci_high),
            c.standardized.map_or_else(|| "—".into(), |v| fixed(v, 4)),
        )?;
    }
    writeln!(out)
}

/// R², adjusted R², σ̂, the overall F and the information criteria.
fn write_quality(out: &mut String, fit: &LinearFit) -> std::fmt::Result {
    writeln!(out, "  how well it fits")?;
    writeln!(
        out,
        "    R² ({})          {:.6}",
        fit.r_squared_kind.as_str(),
        fit.r_squared
    )?;
    writeln!(out, "    adjusted R²           {:.6}", fit.adj_r_squared)?;
    writeln!(
        out,
        "    scatter about fit σ̂   {}  ({} df)",
        num(fit.residual_std_error),
        fit.anova.df_residual
    )?;
    if let (Some(f), Some(p)) = (fit.anova.f_statistic, fit.anova.f_p_value) {
        writeln!(
            out,
            "    overall F             {}  on {} and {} df, p {}",
            fixed(f, 4),
            fit.anova.df_model,
            fit.anova.df_residual,
            pval(p)
        )?;
    }
    writeln!(
        out,
        "    AIC {}   BIC {}   log-likelihood {}",
        fixed(fit.aic, 3),
        fixed(fit.bic, 3),
        fixed(fit.log_likelihood, 3)
    )?;
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
    let total = format!("total ({})", fit.r_squared_kind.as_str());
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
                format!(" and {more} more")
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
            .filter_map(|(c, v)| v.map(|v| format!("{} {}", c.term, fixed(v, 2))))
            .collect();
        writeln!(out, "\n  variance inflation    {}", parts.join(", "))?;
    }
    writeln!(out)
}

fn write_cautions(out: &mut String, table: &Table, o: &Analysis) -> std::fmt::Result {
    let (fit, sel) = (&o.fit, &o.rows.selection);
    if fit.condition_number > CONDITION_WARNING {
        writeln!(out, "  warning: the terms nearly coincide (condition number {:.2e}); estimates may be unstable", fit.condition_number)?;
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

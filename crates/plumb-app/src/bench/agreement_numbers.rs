//! The method comparison's numbers: the Passing–Bablok line with its interval and checks, the
//! Deming line, and the bias and limits of agreement of the differences.

use eframe::egui::{self, RichText};
use plumb_core::agreement::AgreementLimits;
use plumb_data::analysis::AgreementReport;
use plumb_report::text::{fixed, num, p_clause};
use plumb_report::wording;
use plumb_report::wording::numbers as words;

use super::Scene;
use crate::action::{Action, Actions};

/// Draws the comparison's numbers and its settings.
pub fn agreement_ui(scene: &Scene<'_>, ui: &mut egui::Ui) -> Actions {
    let spec = &scene.pair.spec;
    ui.label(RichText::new("Method comparison").strong());
    ui.label(format!(
        "{} (new) against {} (established); agreement is slope 1, intercept 0",
        spec.y,
        spec.x0()
    ));
    let out = settings_ui(scene, ui);
    let report = scene
        .bench
        .diagnostics()
        .filter(|d| d.spec == *spec)
        .and_then(|d| d.agreement.as_ref());
    match report {
        None => {
            ui.spinner();
        }
        Some(Err(e)) => {
            ui.colored_label(ui.visuals().warn_fg_color, e);
        }
        Some(Ok(r)) => {
            lines_ui(r, ui);
            ui.separator();
            match &r.limits {
                Ok(l) => differences_ui(l, ui),
                Err(e) => {
                    ui.weak(e);
                }
            }
        }
    }
    out
}

fn settings_ui(scene: &Scene<'_>, ui: &mut egui::Ui) -> Actions {
    let reading = scene.bench.reading();
    let mut o = reading.agreement;
    ui.horizontal(|ui| {
        ui.checkbox(&mut o.percent, "differences as % of the mean")
            .on_hover_text("When the spread of the differences grows with the level, express each as a percentage of the pair's mean");
        let l = ui.label("Deming λ");
        ui.add(
            egui::DragValue::new(&mut o.deming_ratio)
                .range(0.01..=100.0)
                .speed(0.05)
                .custom_formatter(|v, _| plumb_report::text::num(v)),
        )
        .labelled_by(l.id)
        .on_hover_text("Var(error of the new method)/Var(error of the established one); 1 when both are alike");
    });
    if o == reading.agreement {
        return Actions::none();
    }
    let mut next = reading.clone();
    next.agreement = o;
    Actions::from(Action::SetReading(next))
}

fn lines_ui(r: &AgreementReport, ui: &mut egui::Ui) {
    let pct = words::level(r.level);
    let warn = ui.visuals().warn_fg_color;
    match &r.passing_bablok {
        Ok(pb) => {
            ui.label(RichText::new(format!("Passing–Bablok ({pct} intervals)")).strong())
                .on_hover_text("A shifted median of all pairwise slopes: robust, and it treats both methods alike");
            match &pb.interval {
                Ok(i) => {
                    ui.label(format!(
                        "slope {} ({} to {})",
                        num(pb.slope),
                        num(i.slope_low),
                        num(i.slope_high)
                    ));
                    ui.label(format!(
                        "intercept {} ({} to {})",
                        num(pb.intercept),
                        num(i.intercept_low),
                        num(i.intercept_high)
                    ));
                }
                Err(_) => {
                    ui.label(format!(
                        "slope {}, intercept {} (no interval with so few pairs)",
                        num(pb.slope),
                        num(pb.intercept)
                    ));
                }
            }
            ui.label(wording::agreement::verdict(pb));
            let l = &pb.linearity;
            let lin = format!(
                "linearity: largest cusum {} against {} ({})",
                fixed(l.statistic, 3),
                fixed(l.bound, 3),
                p_clause(l.p_value)
            );
            if l.deviates {
                ui.colored_label(warn, lin);
                ui.label(wording::agreement::NOT_STRAIGHT);
            } else {
                ui.label(lin);
            }
            let tau = format!(
                "Kendall τ {} ({})",
                fixed(pb.association.tau, 3),
                p_clause(pb.association.p_value)
            );
            if pb.association.doubtful {
                ui.colored_label(warn, tau);
                ui.label(wording::agreement::NOT_RISING_TOGETHER);
            } else {
                ui.label(tau);
            }
        }
        Err(e) => {
            ui.colored_label(warn, format!("Passing–Bablok: {e}"));
        }
    }
    match &r.deming {
        Ok(d) => {
            ui.label(RichText::new(format!("Deming (λ = {})", num(d.fit.lambda))).strong());
            ui.label(format!(
                "slope {} ({} to {}), intercept {} ({} to {})",
                num(d.fit.slope),
                num(d.slope_interval.0),
                num(d.slope_interval.1),
                num(d.fit.intercept),
                num(d.intercept_interval.0),
                num(d.intercept_interval.1)
            ))
            .on_hover_text("Intervals from jackknife standard errors and t on n − 2 df");
        }
        Err(e) => {
            ui.weak(format!("Deming: {e}"));
        }
    }
}

fn differences_ui(l: &AgreementLimits, ui: &mut egui::Ui) {
    let pct = words::level(l.confidence);
    ui.label(RichText::new(format!("Differences (new − established), {pct} intervals")).strong());
    ui.label(
        RichText::new(format!("bias {}   limits {} and {}", num(l.bias), num(l.lower), num(l.upper)))
            .size(16.0),
    )
    .on_hover_text(format!(
        "bias: the mean difference; limits: bias ± {}·SD, where about {} of differences should fall",
        fixed(l.multiplier, 3),
        pct
    ));
    ui.label(format!(
        "bias {} to {}; lower limit {} to {}; upper limit {} to {}; SD {}",
        num(l.bias_interval.0),
        num(l.bias_interval.1),
        num(l.lower_interval.0),
        num(l.lower_interval.1),
        num(l.upper_interval.0),
        num(l.upper_interval.1),
        num(l.sd)
    ));
    if let Some(prop) = &l.proportional {
        ui.label(format!(
            "slope of the differences on the level {} ({})",
            num(prop.slope),
            p_clause(prop.p_value)
        ));
    }
    if let Some(note) = wording::agreement::proportional(l) {
        ui.colored_label(ui.visuals().warn_fg_color, note);
    }
}

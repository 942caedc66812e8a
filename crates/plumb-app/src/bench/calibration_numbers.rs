//! The calibration's numbers: unknowns read back with both intervals, the limits with the
//! choice of σ, lack of fit, and the weightings side by side (each can be adopted).

use eframe::egui::{self, RichText};
use plumb_core::calibration::Interval;
use plumb_core::calibration::SigmaSource;
use plumb_data::analysis::{parse_unknowns, CalibrationReport};
use plumb_report::text::{fixed, num, p, plural, sig};
use plumb_report::wording;
use plumb_report::wording::numbers as words;

use super::{BenchUi, Scene};
use crate::action::{Action, Actions};

/// The panel's own state: the unknowns being typed and the second file's fields.
#[derive(Debug, Default)]
pub struct UnknownsUi {
    /// One sample per line: a name and its readings.
    pub text: String,
    /// A second file of unknowns.
    pub file: String,
    /// Its readings' column (blank: the response's name).
    pub reading: String,
    /// Its samples' column (blank: each row a sample).
    pub sample: String,
    /// The unknowns the text was last filled from (a session's or a file's unknowns appear in
    /// the field, ready to edit).
    shown: Vec<plumb_data::analysis::Unknown>,
}

impl UnknownsUi {
    /// Writes `unknowns` into the field when they changed outside it.
    fn follow(&mut self, unknowns: &[plumb_data::analysis::Unknown]) {
        if self.shown != unknowns {
            self.text = unknowns
                .iter()
                .map(|u| {
                    let r: Vec<String> = u.readings.iter().map(ToString::to_string).collect();
                    format!("{} {}", u.name.replace(' ', "_"), r.join(" "))
                })
                .collect::<Vec<_>>()
                .join("\n");
            self.shown = unknowns.to_vec();
        }
    }
}

/// Draws the calibration's numbers.
pub fn calibration_ui(scene: &Scene<'_>, own: &mut BenchUi, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    ui.label(RichText::new("Calibration").strong());
    let report = scene
        .bench
        .diagnostics()
        .filter(|d| d.spec == scene.pair.spec)
        .and_then(|d| d.calibration.as_ref());
    match report {
        None => {
            ui.spinner();
        }
        Some(Err(e)) => {
            ui.colored_label(ui.visuals().warn_fg_color, e);
        }
        Some(Ok(r)) => {
            ui.label(format!(
                "weights: {}; standards from {} to {}",
                r.weighting,
                num(r.range.0),
                num(r.range.1)
            ));
            unknowns_table_ui(ui, r, scene.pair.spec.level, scene.pair.spec.x0());
        }
    }
    out.extend(unknowns_editor_ui(scene, &mut own.unknowns, ui));
    if let Some(Ok(r)) = report {
        ui.separator();
        out.extend(limits_ui(scene, r, ui));
        ui.separator();
        lack_of_fit_ui(r, ui);
        ui.separator();
        out.extend(weightings_ui(scene, r, ui));
    }
    out
}

fn unknowns_table_ui(ui: &mut egui::Ui, r: &CalibrationReport, level: f64, x: &str) {
    if r.unknowns.is_empty() {
        ui.weak("No unknowns yet: type them below, one sample per line.");
        return;
    }
    let pct = words::level(level);
    ui.label(RichText::new(format!("Unknowns read back ({pct} intervals)")).strong())
        .on_hover_text("The interval holds the concentrations whose prediction band takes in the mean reading (Fieller's interval for a line); it may be lopsided or unbounded. Hover a row for the replicates, the mean reading, the standard error and the first-order interval x̂ ± t × standard error.");
    let warn = ui.visuals().warn_fg_color;
    let limits = r.limits.as_ref().ok();
    egui::Grid::new("unknowns").striped(true).show(ui, |ui| {
        for h in ["sample", x, "interval"] {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for (u, rb) in &r.unknowns {
            ui.label(&u.name);
            match rb {
                Ok(rb) => {
                    let detail = format!(
                        "{}, mean {}; {} {}; first-order {} to {}",
                        plural(rb.replicates, "reading", "readings"),
                        num(rb.reading),
                        words::STANDARD_ERROR,
                        num(rb.std_error),
                        num(rb.approximate.0),
                        num(rb.approximate.1)
                    );
                    let notes = wording::calibration::unknown_notes(rb, limits);
                    let value = sig(rb.x, 4);
                    let shown = if notes.is_empty() {
                        ui.label(value)
                    } else {
                        ui.colored_label(warn, value)
                    };
                    shown.on_hover_text(format!("{}\n{detail}\n{}", num(rb.x), notes.join("\n")));
                    let band = match rb.exact {
                        Interval::Bounded { low, high } => {
                            format!("{} to {}", sig(low, 4), sig(high, 4))
                        }
                        ref other => wording::calibration::interval(other),
                    };
                    ui.label(band)
                        .on_hover_text(wording::calibration::interval(&rb.exact));
                }
                Err(e) => {
                    ui.colored_label(warn, "—").on_hover_text(e.as_str());
                    ui.colored_label(warn, e);
                }
            }
            ui.end_row();
        }
    });
    for (u, rb) in &r.unknowns {
        if let Ok(rb) = rb {
            for note in wording::calibration::unknown_notes(rb, limits) {
                ui.colored_label(warn, format!("{}: {note}", u.name));
            }
        }
    }
}

fn unknowns_editor_ui(scene: &Scene<'_>, own: &mut UnknownsUi, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    own.follow(scene.bench.reading().unknowns());
    let label = ui.label("Unknowns (a name, then its readings; one sample per line):");
    ui.add(
        egui::TextEdit::multiline(&mut own.text)
            .desired_rows(3)
            .hint_text("A7 0.412 0.418\nB2 0.305")
            .desired_width(f32::INFINITY),
    )
    .labelled_by(label.id);
    let reading = scene.bench.reading();
    ui.horizontal(|ui| {
        if ui
            .button("Read these back")
            .on_hover_text("Read the samples typed above off the calibration")
            .clicked()
        {
            match parse_unknowns(&own.text) {
                Ok(unknowns) => {
                    let mut next = reading.clone();
                    next.calibration.unknowns = unknowns;
                    out.push(Action::SetReading(next));
                }
                Err(e) => out.push(Action::fail(format!("unknowns: {e}"))),
            }
        }
        if !reading.unknowns().is_empty() && ui.button("Clear").clicked() {
            let mut next = reading.clone();
            next.calibration.unknowns.clear();
            out.push(Action::SetReading(next));
        }
    });
    ui.horizontal_wrapped(|ui| {
        let l = ui.label("or from a file:");
        ui.add(egui::TextEdit::singleline(&mut own.file).desired_width(160.0))
            .labelled_by(l.id);
        let l = ui.label("readings in");
        ui.add(
            egui::TextEdit::singleline(&mut own.reading)
                .hint_text(scene.pair.spec.y.as_str())
                .desired_width(90.0),
        )
        .labelled_by(l.id);
        let l = ui.label("samples named by");
        ui.add(
            egui::TextEdit::singleline(&mut own.sample)
                .hint_text("each row")
                .desired_width(90.0),
        )
        .labelled_by(l.id);
        if ui
            .button("Read file")
            .on_hover_text(
                "Read the unknowns' readings from a second file: replicates share a sample name",
            )
            .clicked()
        {
            let column = |s: &str| (!s.trim().is_empty()).then(|| s.trim().to_string());
            out.push(Action::ReadUnknowns {
                path: own.file.trim().into(),
                reading: column(&own.reading).unwrap_or_else(|| scene.pair.spec.y.clone()),
                sample: column(&own.sample),
            });
        }
    });
    out
}

fn limits_ui(scene: &Scene<'_>, r: &CalibrationReport, ui: &mut egui::Ui) -> Actions {
    let reading = scene.bench.reading();
    let mut sigma = reading.sigma();
    ui.horizontal(|ui| {
        ui.label(RichText::new("Limits").strong());
        ui.label("σ from");
        ui.radio_value(&mut sigma, SigmaSource::ResidualSd, "residual standard deviation")
            .on_hover_text("The residual standard deviation of the line (of one reading at the lowest standard when weighted)");
        ui.radio_value(&mut sigma, SigmaSource::InterceptSe, "intercept's standard error")
            .on_hover_text("The standard error of the line's intercept");
    });
    match &r.limits {
        Ok(l) => {
            ui.label(
                RichText::new(format!(
                    "LOD {}   LOQ {}",
                    num(l.detection),
                    num(l.quantitation)
                ))
                .strong(),
            )
            .on_hover_text("3.3σ/S and 10σ/S (ICH Q2(R1)), in the standards' units");
            ui.label(wording::calibration::limits(l));
            if let Ok(o) = &r.other_limits {
                ui.weak(format!(
                    "with the other σ: {}",
                    wording::calibration::limits(o)
                ));
            }
            if let Some(note) = wording::calibration::limits_below_standards(l, r.range.0) {
                ui.colored_label(ui.visuals().warn_fg_color, note);
            }
            ui.weak(wording::calibration::LIMITS_CAUTION);
        }
        Err(e) => {
            ui.weak(e);
        }
    }
    if sigma == reading.sigma() {
        return Actions::none();
    }
    let mut next = reading.clone();
    next.calibration.sigma = sigma;
    Actions::from(Action::SetReading(next))
}

fn lack_of_fit_ui(r: &CalibrationReport, ui: &mut egui::Ui) {
    ui.label(RichText::new("Lack of fit").strong())
        .on_hover_text("Do the level means sit on the curve as closely as the replicates scatter about them? A small p says the shape misses.");
    match &r.lack_of_fit {
        Ok(l) => {
            let text = format!(
                "{} levels: {}",
                l.levels,
                words::f_figures(l.f, l.lack_of_fit_df, l.pure_error_df, l.p_value)
            );
            if l.p_value < wording::CHECK_ALPHA {
                ui.colored_label(ui.visuals().warn_fg_color, text);
            } else {
                ui.label(text);
            }
            ui.weak(format!(
                "lack-of-fit SS {}, pure error SS {}",
                num(l.lack_of_fit_ss),
                num(l.pure_error_ss)
            ));
        }
        Err(e) => {
            ui.weak(e);
        }
    }
}

fn weightings_ui(scene: &Scene<'_>, r: &CalibrationReport, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    ui.label(RichText::new("Weightings side by side").strong())
        .on_hover_text("The same calibration under each weighting. Σ|RE|: the standards read back on the line, their relative errors summed (smaller is better). spread: weighted residuals' spread in the upper half of the standards over the lower half (near 1 is even). p: Breusch–Pagan of the weighted residuals against x.");
    let current = &r.weighting;
    egui::Grid::new("weightings").striped(true).show(ui, |ui| {
        for h in ["weights", "R²", "Σ|RE| %", "spread", "p", ""] {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for w in &r.weightings {
            ui.label(&w.label);
            match &w.outcome {
                Ok(f) => {
                    ui.label(num(f.r_squared));
                    ui.label(fixed(f.sum_abs_relative_error, 1));
                    ui.label(fixed(f.spread_ratio, 2));
                    ui.label(f.spread_p.map_or_else(|| "—".into(), p));
                    if w.label == *current {
                        ui.weak("in use");
                    } else if let Some(spec) = adopt(scene, &w.label) {
                        if ui
                            .small_button("use")
                            .on_hover_text("Refit with this weighting")
                            .clicked()
                        {
                            out.push(Action::OpenPair(spec));
                        }
                    }
                }
                Err(e) => {
                    ui.weak(e);
                }
            }
            ui.end_row();
        }
    });
    out
}

/// The model on the bench with the weighting labelled `label` (`None` for a weights column:
/// that is chosen in the model's controls).
fn adopt(scene: &Scene<'_>, label: &str) -> Option<crate::state::pair::FitSpec> {
    let mut spec = scene.pair.spec.clone();
    if label == "none" {
        spec.weights = None;
        spec.weight_rule = None;
        return Some(spec);
    }
    let rule = plumb_core::calibration::WeightRule::parse(label)?;
    spec.weights = None;
    spec.weight_rule = Some(rule);
    Some(spec)
}

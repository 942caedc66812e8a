//! The numbers that belong to the model's parts beyond its columns: the scale R² is on, the
//! Box–Cox estimate, the grouping factor's tests and table, the fit kept for comparison beside
//! the current one, and the button that adopts the degree the polynomial ladder supports.

use eframe::egui::{self, RichText};
use plumb_data::analysis::{Comparison, FitFigures, GroupTests, POWER_STEP_P};
use plumb_report::text::{count, fixed, num};
use plumb_report::wording;
use plumb_report::wording::numbers as words;

use super::Scene;
use crate::action::{Action, Actions};
use crate::state::diagnostics::Diagnostics;

/// The scale line and the Box–Cox estimate (nothing for a response as measured).
pub fn scale_ui(ui: &mut egui::Ui, scene: &Scene<'_>, d: Option<&Diagnostics>) {
    let y = &scene.pair.spec.y;
    let label = scene.pair.model.response_transform.label(y);
    if let Some(note) = wording::scale_note(&label, y) {
        ui.label(note);
    }
    if let Some(b) = d.and_then(|d| d.boxcox) {
        ui.label(format!("Box–Cox {}", wording::box_cox(&b)))
            .on_hover_text("λ maximizes the profile likelihood of the model on the rows in use; the live numbers hold λ while you exclude or drag and follow it once the diagnostics are in");
    }
}

/// The grouping factor's tests and the groups' own slopes.
pub fn groups_ui(ui: &mut egui::Ui, g: &GroupTests) {
    let reference = g.table.first().map_or("—", |r| r.level.as_str());
    ui.label(RichText::new(format!("Groups by {} (reference {reference})", g.column)).strong());
    ui.label(format!(
        "equal slopes of {}: {}",
        g.predictor,
        wording::f_test(&g.equal_slopes)
    ))
    .on_hover_text("One common slope against a slope per group; a small p says the slopes differ");
    ui.label(format!("one common line: {}", wording::f_test(&g.common_line)))
        .on_hover_text("One line for every group against a line per group; a small p says the groups need lines of their own");
    egui::Grid::new("group-table").striped(true).show(ui, |ui| {
        for h in ["level", "rows", "slope", words::STANDARD_ERROR, "interval"] {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for r in &g.table {
            ui.label(&r.level);
            ui.label(count(r.n));
            ui.label(num(r.slope.estimate));
            ui.label(num(r.slope.std_error));
            ui.label(words::interval_ends(r.slope.ci_low, r.slope.ci_high, 4));
            ui.end_row();
        }
    });
}

/// The comparison: a button to keep the current fit, or the kept fit beside the current one.
pub fn comparison_ui(ui: &mut egui::Ui, scene: &Scene<'_>, d: Option<&Diagnostics>) -> Actions {
    let mut out = Actions::none();
    let Some(kept) = scene.bench.kept() else {
        if ui
            .button("Keep this fit to compare")
            .on_hover_text("Hold this model's numbers and curve; change the model and both are shown, with the F test when one model is inside the other")
            .clicked()
        {
            out.push(Action::KeepForComparison(true));
        }
        return out;
    };
    ui.horizontal(|ui| {
        ui.label(RichText::new("Beside the kept fit").strong());
        if ui
            .small_button("stop comparing")
            .on_hover_text("Let go of the kept fit")
            .clicked()
        {
            out.push(Action::KeepForComparison(false));
        }
    });
    ui.weak(format!("kept: {}", kept.describe()));
    match d.and_then(|d| d.kept.as_ref()).filter(|k| k.spec == *kept) {
        None => {
            ui.spinner();
        }
        Some(k) => match &k.comparison {
            Ok(c) => figures_ui(ui, c),
            Err(e) => {
                ui.colored_label(ui.visuals().error_fg_color, format!("no comparison: {e}"));
            }
        },
    }
    out
}

/// One figure of a fit, as shown.
type Figure = fn(&FitFigures) -> String;

fn figures_ui(ui: &mut egui::Ui, c: &Comparison) {
    let rows: [(&str, Figure); 6] = [
        ("rows", |f| count(f.n)),
        ("R²", |f| num(f.r_squared)),
        ("adjusted R²", |f| num(f.adj_r_squared)),
        (words::TYPICAL_MISS, |f| {
            format!("± {}", num(f.residual_std_error))
        }),
        ("AIC", |f| fixed(f.aic, 2)),
        ("BIC", |f| fixed(f.bic, 2)),
    ];
    egui::Grid::new("comparison-table")
        .striped(true)
        .show(ui, |ui| {
            for h in ["", "kept", "current"] {
                ui.label(RichText::new(h).strong());
            }
            ui.end_row();
            for (name, value) in rows {
                ui.label(name);
                ui.label(value(&c.kept));
                ui.label(value(&c.current));
                ui.end_row();
            }
        });
    if c.kept.response != c.current.response {
        ui.weak(format!(
            "R² and the typical miss are on {} (kept) and {} (current): not comparable",
            c.kept.response, c.current.response
        ));
    }
    match &c.nested {
        Some(n) => {
            ui.label(format!("partial F: {}", wording::f_test(n)))
                .on_hover_text("The smaller model against the larger on the same rows: a small p says the extra terms explain more than chance would");
        }
        None => {
            ui.weak(wording::NOT_NESTED_HINT);
        }
    }
    ui.weak(&c.note);
}

/// The button that adopts the degree the ladder supports (keeping the current fit beside it
/// when nothing is kept yet), or nothing when the current degree is already there.
pub fn degree_button_ui(ui: &mut egui::Ui, scene: &Scene<'_>, d: &Diagnostics) -> Actions {
    let mut out = Actions::none();
    let spec = &scene.pair.spec;
    let Some(e) = &d.extras else { return out };
    let suggested = e.suggested_degree();
    if suggested <= spec.degree || d.spec != *spec {
        return out;
    }
    let keep = scene.bench.kept().is_none();
    let text = if keep {
        format!("Fit degree {suggested} (keep this fit to compare)")
    } else {
        format!("Fit degree {suggested}")
    };
    if ui
        .button(text)
        .on_hover_text(format!("Each power up to {suggested} adds more than chance would (partial F p below {POWER_STEP_P})"))
        .clicked()
    {
        if keep {
            out.push(Action::KeepForComparison(true));
        }
        let mut next = spec.clone();
        next.degree = suggested;
        out.push(Action::OpenPair(next));
    }
    out
}

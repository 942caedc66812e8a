//! The model's controls: the response and its scale, the predictors (added and removed, each
//! with its scale), the degree, the intercept, the weights and a grouping factor with its
//! reference level and optional slopes per level. A changed model is an action.

use eframe::egui;
use plumb_core::calibration::WeightRule;
use plumb_core::regression::Transform;
use plumb_data::analysis::{Factor, ResponseScale};

use crate::action::Action;
use crate::state::dataset::Dataset;
use crate::state::pair::FitSpec;

/// The response's scales offered, with their names.
const RESPONSE_SCALES: [(ResponseScale, &str); 6] = [
    (ResponseScale::Identity, "as measured"),
    (ResponseScale::Fixed(Transform::Ln), "ln"),
    (ResponseScale::Fixed(Transform::Log10), "log10"),
    (ResponseScale::Fixed(Transform::Sqrt), "sqrt"),
    (ResponseScale::Fixed(Transform::Reciprocal), "1/y"),
    (ResponseScale::BoxCox, "Box–Cox (λ fitted)"),
];

/// A predictor's scales offered.
const X_SCALES: [(Transform, &str); 5] = [
    (Transform::Identity, "as measured"),
    (Transform::Ln, "ln"),
    (Transform::Log10, "log10"),
    (Transform::Sqrt, "sqrt"),
    (Transform::Reciprocal, "1/x"),
];

/// Draws the model's controls for `current` (or the first two numeric columns when nothing
/// is on the bench); returns the new model when the analyst changed it.
pub fn model_ui(current: Option<&FitSpec>, data: &Dataset, ui: &mut egui::Ui) -> Option<Action> {
    let start = current.cloned().or_else(|| {
        (data.numeric.len() >= 2).then(|| FitSpec::line(&data.numeric[1], &data.numeric[0]))
    })?;
    let mut s = start.clone();
    // Each label keeps to its control when the row wraps in a narrow window.
    ui.horizontal(|ui| response_ui(&mut s, data, ui));
    predictors_ui(&mut s, data, ui);
    ui.horizontal(|ui| {
        ui.add_enabled_ui(s.x.len() == 1, |ui| {
            ui.label("degree:");
            ui.add(
                egui::DragValue::new(&mut s.degree).range(1..=plumb_core::regression::MAX_DEGREE),
            )
            .on_hover_text(
                "1 = straight line; 2, 3, … = polynomial in the predictor (one predictor only)",
            );
        })
    });
    if s.x.len() > 1 {
        s.degree = 1;
    }
    ui.checkbox(&mut s.intercept, "intercept")
        .on_hover_text("Off: the fit is forced through the origin (R² is then uncentred)");
    ui.horizontal(|ui| weights_ui(&mut s, data, ui));
    factor_ui(&mut s, data, ui);
    let changed = current.is_none_or(|c| *c != s);
    changed.then_some(Action::OpenPair(s))
}

fn response_ui(s: &mut FitSpec, data: &Dataset, ui: &mut egui::Ui) {
    column_choice(
        ui,
        "response-y",
        "y:",
        &mut s.y,
        &data.numeric,
        "The response: the column to be explained",
    );
    let label = RESPONSE_SCALES
        .iter()
        .find(|(r, _)| *r == s.response)
        .map_or("scale", |(_, n)| n);
    egui::ComboBox::from_id_salt("y-scale")
        .selected_text(label)
        .show_ui(ui, |ui| {
            for (r, name) in RESPONSE_SCALES {
                ui.selectable_value(&mut s.response, r, name);
            }
        })
        .response
        .on_hover_text("The response's scale: the fit, R² and the residuals are on it; curves are drawn back in the response's units");
}

fn predictors_ui(s: &mut FitSpec, data: &Dataset, ui: &mut egui::Ui) {
    let mut remove = None;
    for k in 0..s.x.len() {
        let label = if k == 0 {
            "x:".to_string()
        } else {
            format!("x{}:", k + 1)
        };
        let tip = if k == 0 {
            "The first predictor: the scatter's horizontal axis"
        } else {
            "Another predictor of the model"
        };
        ui.horizontal(|ui| {
            column_choice(
                ui,
                &format!("predictor-{k}"),
                &label,
                &mut s.x[k],
                &data.numeric,
                tip,
            );
            scale_ui(s, k, ui);
            if k > 0
                && ui
                    .small_button("×")
                    .on_hover_text(format!("Take {} out of the model", s.x[k]))
                    .clicked()
            {
                remove = Some(k);
            }
        });
    }
    if let Some(k) = remove {
        let gone = s.x.remove(k);
        s.x_transforms.retain(|(c, _)| *c != gone);
    }
    let unused: Vec<&String> = data
        .numeric
        .iter()
        .filter(|c| **c != s.y && !s.x.contains(c))
        .collect();
    if !unused.is_empty() {
        let mut added: Option<String> = None;
        egui::ComboBox::from_id_salt("add-predictor")
            .selected_text("+ predictor")
            .show_ui(ui, |ui| {
                for c in unused {
                    if ui.selectable_label(false, c).clicked() {
                        added = Some(c.clone());
                    }
                }
            })
            .response
            .on_hover_text("Add a predictor to the model (with several, the scatter shows the first; the added-variable view shows each one's own part)");
        s.x.extend(added);
    }
}

fn scale_ui(s: &mut FitSpec, k: usize, ui: &mut egui::Ui) {
    let column = s.x[k].clone();
    let mut t = s
        .x_transforms
        .iter()
        .find(|(c, _)| *c == column)
        .map_or(Transform::Identity, |(_, t)| *t);
    let label = X_SCALES
        .iter()
        .find(|(x, _)| *x == t)
        .map_or("scale", |(_, n)| n);
    egui::ComboBox::from_id_salt(("x-scale", k))
        .selected_text(label)
        .width(64.0)
        .show_ui(ui, |ui| {
            for (x, name) in X_SCALES {
                ui.selectable_value(&mut t, x, name);
            }
        })
        .response
        .on_hover_text(format!("The scale {column} enters the model on"));
    s.x_transforms.retain(|(c, _)| *c != column);
    if !t.is_identity() {
        s.x_transforms.push((column, t));
    }
}

/// The weights: none, a rule on x and y (one predictor), or a column.
#[derive(Debug, Clone, PartialEq)]
enum WeightChoice {
    None,
    Rule(WeightRule),
    Column(String),
}

fn weights_ui(s: &mut FitSpec, data: &Dataset, ui: &mut egui::Ui) {
    let label = ui.label("weights:");
    let mut choice = match (&s.weights, s.weight_rule) {
        (Some(c), _) => WeightChoice::Column(c.clone()),
        (None, Some(r)) => WeightChoice::Rule(r),
        (None, None) => WeightChoice::None,
    };
    let shown = match &choice {
        WeightChoice::None => "none".to_string(),
        WeightChoice::Rule(r) => r.label().to_string(),
        WeightChoice::Column(c) => c.clone(),
    };
    egui::ComboBox::from_id_salt("weights")
        .selected_text(shown)
        .show_ui(ui, |ui| {
            ui.selectable_value(&mut choice, WeightChoice::None, "none");
            if s.x.len() == 1 {
                for r in WeightRule::ALL {
                    ui.selectable_value(&mut choice, WeightChoice::Rule(r), r.label())
                        .on_hover_text(rule_tip(r));
                }
            }
            for c in &data.numeric {
                ui.selectable_value(&mut choice, WeightChoice::Column(c.clone()), c);
            }
        })
        .response
        .labelled_by(label.id)
        .on_hover_text("Weighted least squares: a rule on x and y (1/x, 1/x², 1/y², 1/s² of the replicates at each x) or a column of positive weights; R² and everything else are then weighted");
    (s.weights, s.weight_rule) = match choice {
        WeightChoice::None => (None, None),
        WeightChoice::Rule(r) => (None, Some(r)),
        WeightChoice::Column(c) => (Some(c), None),
    };
}

fn rule_tip(r: WeightRule) -> &'static str {
    match r {
        WeightRule::InverseX => "Variance grows in proportion to x",
        WeightRule::InverseX2 => "Standard deviation grows in proportion to x (constant relative error)",
        WeightRule::InverseY2 => "As 1/x², judged on each reading",
        WeightRule::InverseLevelVariance => "The inverse variance of the replicate readings at each x (needs replicates at every level)",
    }
}

fn factor_ui(s: &mut FitSpec, data: &Dataset, ui: &mut egui::Ui) {
    if data.groups.is_empty() {
        return;
    }
    let label = ui.label("group by:");
    let mut column = s.factor.as_ref().map(|f| f.column.clone());
    egui::ComboBox::from_id_salt("factor")
        .selected_text(column.clone().unwrap_or_else(|| "nothing".into()))
        .show_ui(ui, |ui| {
            ui.selectable_value(&mut column, None, "nothing");
            for (g, _) in &data.groups {
                ui.selectable_value(&mut column, Some(g.clone()), g);
            }
        })
        .response
        .labelled_by(label.id)
        .on_hover_text("A text column entering the model: an indicator term per level against the reference level, so each group's line can sit at its own height");
    if column != s.factor.as_ref().map(|f| f.column.clone()) {
        s.factor = column.map(|c| Factor {
            column: c,
            reference: None,
            separate_slopes: false,
        });
    }
    let Some(f) = &mut s.factor else { return };
    let levels = data
        .groups
        .iter()
        .find(|(g, _)| *g == f.column)
        .map(|(_, l)| l.clone())
        .unwrap_or_default();
    let reference = ui.label("reference:");
    egui::ComboBox::from_id_salt("reference-level")
        .selected_text(
            f.reference
                .clone()
                .unwrap_or_else(|| levels.first().cloned().unwrap_or_default()),
        )
        .show_ui(ui, |ui| {
            for l in &levels {
                ui.selectable_value(&mut f.reference, Some(l.clone()), l);
            }
        })
        .response
        .labelled_by(reference.id)
        .on_hover_text("The reference level: the others' terms measure how far they sit from it");
    ui.checkbox(&mut f.separate_slopes, "own slopes")
        .on_hover_text("A slope of its own per level for the first predictor; the numbers then test whether the slopes differ");
}

fn column_choice(
    ui: &mut egui::Ui,
    id: &str,
    label: &str,
    value: &mut String,
    names: &[String],
    tip: &str,
) {
    let label = ui.label(label);
    egui::ComboBox::from_id_salt(id)
        .selected_text(value.clone())
        .show_ui(ui, |ui| {
            for n in names {
                ui.selectable_value(value, n.clone(), n);
            }
        })
        .response
        .labelled_by(label.id)
        .on_hover_text(tip);
}

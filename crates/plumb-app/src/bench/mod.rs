//! The pair bench: the controls, the four linked views (scatter, residuals, influence,
//! quantiles), the numbers and the exclusion ledger. Every panel reads the workbench's state
//! and returns actions; what the pointer is doing, the text being typed and the density images
//! are the bench's own UI state ([`BenchUi`]).

mod added;
mod agreement_numbers;
mod calibration_numbers;
mod controls;
mod differences;
mod influence;
mod key;
mod lab_layers;
mod ledger;
mod model_editor;
mod model_numbers;
mod numbers;
mod pointer;
mod points;
mod quantiles;
mod reason;
mod residuals;
mod scatter;
mod view;
mod weightings;

use eframe::egui::{self, Vec2};
use egui_plot::{Plot, PlotTransform};
use plumb_report::wording;

use crate::action::Actions;
use crate::density::{Bounds, DensityTextures};
use crate::state::marks::Marks;
use crate::state::pair::PairRows;
use crate::state::reading::BenchMode;
use crate::state::{BenchModel, State};

pub use numbers::{coefficient_table, TermRow};
pub use reason::reason_prompt_ui;

use numbers::SortKey;
use pointer::Pointer;

/// Below this window width the numbers and the ledger share one side panel (as tabs), so the
/// views keep their room.
const THREE_COLUMNS_FROM: f32 = 1400.0;

/// What the bench keeps between frames apart from the workbench's state.
#[derive(Default)]
pub struct BenchUi {
    /// The pointer: its mode, hover, pick, drag and lasso.
    pub pointer: Pointer,
    /// Density images of the views.
    pub textures: DensityTextures,
    /// Rows typed into the ledger's field.
    pub row_field: String,
    /// Influence table order.
    pub sort: SortKey,
    /// Show the z-units view in the numbers.
    pub z_units: bool,
    /// The side panel's tab when the numbers and the ledger share it.
    pub ledger_tab: bool,
    /// The term whose added-variable view takes the scatter's place (`None`: the scatter).
    pub added_term: Option<String>,
    /// The calibration's unknowns being typed.
    pub unknowns: calibration_numbers::UnknownsUi,
    scatter_transform: Option<PlotTransform>,
}

impl BenchUi {
    /// Screen transform of the scatter in the last frame.
    pub fn scatter_transform(&self) -> Option<PlotTransform> {
        self.scatter_transform
    }
}

/// What every panel of the bench reads.
pub struct Scene<'a> {
    /// The pair's rows and values.
    pub pair: &'a PairRows,
    /// The analyst's marks.
    pub marks: &'a Marks,
    /// The bench's model (live numbers, diagnostics, colouring).
    pub bench: &'a BenchModel,
    /// The file's numeric columns.
    pub columns: &'a [String],
    /// Names of the rows (the ID column chosen on the columns screen): `names.label(row)`.
    pub names: crate::state::roles::RowNames<'a>,
    /// The co-movement map (its notes on the pair join the cues).
    pub map: &'a crate::state::map::MapModel,
}

/// Draws the bench.
pub fn bench_ui(state: &State, own: &mut BenchUi, ui: &mut egui::Ui) -> Actions {
    let Some(loaded) = state.loaded() else {
        return Actions::none();
    };
    let bench = state.bench();
    let mut out = controls::controls_ui(bench, &loaded.dataset, &mut own.pointer.mode, ui);
    let Some(pair) = bench.pair() else {
        if !bench.is_opening() {
            ui.label("Choose a response (y) and a predictor (x) above, or click a cell of the co-movement map.");
        }
        return out;
    };
    own.pointer.follow(bench.serial());
    let scene = Scene {
        pair,
        marks: state.marks(),
        bench,
        columns: &loaded.dataset.numeric,
        names: state.row_names(),
        map: state.map(),
    };
    if scene.marks.is_hypothetical() {
        out.extend(controls::what_if_banner_ui(scene.marks.moved.len(), ui));
    }
    out.extend(side_panels_ui(
        &scene,
        own,
        loaded.dataset.table.n_rows(),
        ui,
    ));
    egui::Panel::bottom("cautions").show(ui, |ui| {
        ui.weak(wording::line(&wording::FIT_CAUTIONS));
    });
    let views = egui::CentralPanel::default().show(ui, |ui| views_ui(&scene, own, ui));
    out.extend(views.inner);
    own.pointer.end_frame();
    out
}

/// The numbers (left) and the ledger (right); in a narrow window, one panel with two tabs.
fn side_panels_ui(
    scene: &Scene<'_>,
    own: &mut BenchUi,
    n_rows: usize,
    ui: &mut egui::Ui,
) -> Actions {
    let wide = ui.ctx().content_rect().width() >= THREE_COLUMNS_FROM;
    if wide {
        let numbers = egui::Panel::left("numbers")
            .resizable(true)
            .default_size(360.0)
            .size_range(240.0..=520.0)
            .show(ui, |ui| numbers::numbers_ui(scene, own, ui));
        let ledger = egui::Panel::right("ledger")
            .resizable(true)
            .default_size(270.0)
            .size_range(220.0..=480.0)
            .show(ui, |ui| ledger::ledger_ui(scene, own, n_rows, ui));
        let mut out = numbers.inner;
        out.extend(ledger.inner);
        return out;
    }
    egui::Panel::left("numbers-and-ledger")
        .resizable(true)
        .default_size(320.0)
        .size_range(240.0..=380.0)
        .show(ui, |ui| {
            ui.horizontal(|ui| {
                ui.selectable_value(&mut own.ledger_tab, false, "Numbers");
                let n = scene.marks.excluded.len();
                ui.selectable_value(&mut own.ledger_tab, true, format!("Ledger ({n})"));
            });
            ui.separator();
            if own.ledger_tab {
                ledger::ledger_ui(scene, own, n_rows, ui)
            } else {
                numbers::numbers_ui(scene, own, ui)
            }
        })
        .inner
}

/// The share of the views' width the left column takes (the scatter over its residuals).
const LEFT_SHARE: f32 = 0.6;
/// The share of the left column's height the scatter takes; its residual strip has the rest.
const SCATTER_SHARE: f32 = 0.6;

/// The rectangles of the views inside the views' area `avail`, by the bench's mode.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ViewSizes {
    /// The scatter (or added-variable view), title and key included.
    pub scatter: Vec2,
    /// The residual strip under the scatter (a fit or a calibration), or the differences
    /// beside it (two methods).
    pub residuals: Vec2,
    /// Each of the right column's views: influence and quantiles (a fit), or each weighting
    /// (a calibration, three of them).
    pub side: Vec2,
}

impl ViewSizes {
    /// Splits `avail`: a fit or a calibration puts the scatter over its residual strip on the
    /// left (same x axis) and the influence and quantile views (or the weightings) stacked on
    /// the right; two methods put the scatter and the differences side by side, full height.
    pub fn of(avail: Vec2, mode: BenchMode, gap: f32) -> Self {
        let (w, h) = ((avail.x - gap).max(320.0), avail.y.max(280.0));
        if mode == BenchMode::Agreement {
            let half = Vec2::new((w - gap) / 2.0, h);
            return Self {
                scatter: half,
                residuals: half,
                side: Vec2::ZERO,
            };
        }
        // A narrow window keeps the right column wide enough for its axes.
        let share = if w < 760.0 {
            LEFT_SHARE - 0.05
        } else {
            LEFT_SHARE
        };
        let left = (w * share).floor();
        let right = w - left - gap;
        // A low window gives the strip a larger share: its axes need room too.
        let top = (h * if h < 520.0 {
            SCATTER_SHARE - 0.05
        } else {
            SCATTER_SHARE
        })
        .floor();
        let stacked = if mode == BenchMode::Calibration {
            3.0
        } else {
            2.0
        };
        Self {
            scatter: Vec2::new(left, top),
            residuals: Vec2::new(left, h - top - gap),
            side: Vec2::new(right, ((h - gap * (stacked - 1.0)) / stacked).floor()),
        }
    }
}

/// Runs `f` in a box of exactly `size`: what it draws never pushes the next view aside, and a
/// view fills what its headers leave (`ui.available_size()` inside).
fn boxed(ui: &mut egui::Ui, size: Vec2, f: &mut dyn FnMut(&mut egui::Ui) -> Actions) -> Actions {
    ui.allocate_ui_with_layout(size, egui::Layout::top_down(egui::Align::Min), |ui| {
        ui.set_min_size(size);
        ui.set_max_size(size);
        f(ui)
    })
    .inner
}

/// The views of the bench's mode (see [`ViewSizes::of`]).
fn views_ui(scene: &Scene<'_>, own: &mut BenchUi, ui: &mut egui::Ui) -> Actions {
    let gap = ui.spacing().item_spacing.x;
    let mode = scene.bench.reading().mode;
    let sizes = ViewSizes::of(ui.available_size(), mode, gap);
    let mut out = Actions::none();
    ui.horizontal_top(|ui| {
        if mode == BenchMode::Agreement {
            out.extend(boxed(ui, sizes.scatter, &mut |ui| {
                top_left_ui(scene, own, ui)
            }));
            out.extend(boxed(ui, sizes.residuals, &mut |ui| {
                differences::differences_ui(scene, own, ui, ui.available_size())
            }));
            return;
        }
        ui.vertical(|ui| {
            out.extend(boxed(ui, sizes.scatter, &mut |ui| {
                top_left_ui(scene, own, ui)
            }));
            out.extend(boxed(ui, sizes.residuals, &mut |ui| {
                residuals::residuals_ui(scene, own, ui)
            }));
        });
        ui.vertical(|ui| {
            if mode == BenchMode::Calibration {
                out.extend(weightings::weightings_ui(scene, own, ui, sizes.side));
                return;
            }
            out.extend(boxed(ui, sizes.side, &mut |ui| {
                influence::influence_ui(scene, own, ui)
            }));
            out.extend(boxed(ui, sizes.side, &mut |ui| {
                quantiles::quantiles_ui(scene, own, ui)
            }));
        });
    });
    out
}

/// The scatter, or with several terms the added-variable view the analyst picks.
fn top_left_ui(scene: &Scene<'_>, own: &mut BenchUi, ui: &mut egui::Ui) -> Actions {
    let terms = added::terms(scene);
    if own.added_term.as_ref().is_some_and(|t| !terms.contains(t)) && !scene.bench.is_busy() {
        own.added_term = None;
    }
    if terms.is_empty() && own.added_term.is_none() {
        return scatter::scatter_ui(scene, own, ui, true);
    }
    let scatter_name = format!("{} against {}", scene.pair.spec.y, scene.pair.spec.x0());
    ui.horizontal(|ui| {
        let shown = own
            .added_term
            .as_ref()
            .map_or_else(|| scatter_name.clone(), |t| format!("added-variable: {t}"));
        egui::ComboBox::from_id_salt("top-left-view")
            .selected_text(shown)
            .show_ui(ui, |ui| {
                ui.selectable_value(&mut own.added_term, None, &scatter_name);
                for t in &terms {
                    ui.selectable_value(
                        &mut own.added_term,
                        Some(t.clone()),
                        format!("added-variable: {t}"),
                    );
                }
            })
            .response
            .on_hover_text("The scatter against the first predictor, or one term's added-variable view: its slope is that term's coefficient in the whole model. With several predictors the fit is not a curve in the first one alone, so the scatter shows no curve.");
    });
    match own.added_term.clone() {
        Some(t) => added::added_ui(scene, own, ui, ui.available_size(), &t),
        None => scatter::scatter_ui(scene, own, ui, false),
    }
}

/// A dense view starts at its data's extent (plus a margin): its density image would
/// otherwise feed back into the automatic bounds.
fn dense_bounds(plot: Plot<'_>, b: Bounds) -> Plot<'_> {
    let (mx, my) = ((b.x_max - b.x_min) * 0.04, (b.y_max - b.y_min) * 0.04);
    plot.default_x_bounds(b.x_min - mx, b.x_max + mx)
        .default_y_bounds(b.y_min - my, b.y_max + my)
}

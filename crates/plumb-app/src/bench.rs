//! The pair bench: the pair's controls, the four linked views, the numbers and the ledger.

use std::sync::Arc;

use eframe::egui::{self, RichText};

use crate::app::Workbench;
use crate::cloud::Cloud;
use crate::dataset::Dataset;
use crate::derived::{compute, Diagnostics, Input, Overlays};
use crate::jobs::Job;
use crate::marks::Marks;
use crate::pair::{Pair, PairSpec};
use crate::{palette, WorkbenchError};

/// What a press on a point does.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PointerMode {
    /// A click leaves the row out (or puts it back).
    Exclude,
    /// A drag moves the point to a hypothetical position.
    Move,
    /// A drag draws a loop; the rows inside are left out.
    Lasso,
}

/// How the influence table is sorted.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SortKey {
    /// Cook's distance, largest first.
    Cook,
    /// Leverage, largest first.
    Leverage,
    /// |externally studentized residual|, largest first.
    Residual,
}

/// A reason being written for rows just excluded.
#[derive(Debug, Clone, PartialEq)]
pub struct Prompt {
    /// Data rows.
    pub rows: Vec<usize>,
    /// The text so far.
    pub text: String,
}

/// State of the bench.
pub struct Bench {
    pair: Option<Pair>,
    /// Overlays asked for.
    pub overlays: Overlays,
    /// Text column colouring the points.
    pub group_by: Option<String>,
    pub(crate) groups: Option<Arc<[Option<usize>]>>,
    pub(crate) levels: Vec<String>,
    diag: Option<Arc<Diagnostics>>,
    job: Option<Job<Diagnostics>>,
    stale: bool,
    /// Entry under the pointer in any view (drawn highlighted in all).
    pub hovered: Option<usize>,
    pub(crate) hovered_next: Option<usize>,
    /// Entry picked in the influence table.
    pub selected: Option<usize>,
    /// What a press on a point does.
    pub pointer: PointerMode,
    pub(crate) drag: Option<usize>,
    pub(crate) lasso: Vec<[f64; 2]>,
    /// Show the z-units view in the numbers.
    pub standardized: bool,
    /// Influence table order.
    pub sort: SortKey,
    /// The scatter's points at their file positions.
    pub(crate) scatter: Cloud,
    pub(crate) textures: std::collections::HashMap<&'static str, crate::plots::DensityTexture>,
    /// Changes with the marks (keys the scatter's density image).
    pub(crate) marks_generation: u64,
    /// Changes with each new set of diagnostics (keys the other views' density images).
    pub(crate) diag_generation: u64,
    /// Counts pairs opened (keys the views' zoom memory).
    pub(crate) serial: u64,
    pub(crate) row_field: String,
    pub(crate) prompt: Option<Prompt>,
    /// Screen transform of the scatter in the last frame (lets tests aim at a point).
    pub scatter_transform: Option<egui_plot::PlotTransform>,
}

impl Default for Bench {
    fn default() -> Self {
        Self {
            pair: None,
            overlays: Overlays::default(),
            group_by: None,
            groups: None,
            levels: Vec::new(),
            diag: None,
            job: None,
            stale: false,
            hovered: None,
            hovered_next: None,
            selected: None,
            pointer: PointerMode::Exclude,
            drag: None,
            lasso: Vec::new(),
            standardized: false,
            sort: SortKey::Cook,
            scatter: Cloud::default(),
            textures: Default::default(),
            marks_generation: 0,
            diag_generation: 0,
            serial: 0,
            row_field: String::new(),
            prompt: None,
            scatter_transform: None,
        }
    }
}

impl Bench {
    /// The pair on the bench.
    pub fn pair(&self) -> Option<&Pair> {
        self.pair.as_ref()
    }

    /// The latest diagnostics (possibly for an earlier state while a newer one computes).
    pub fn diagnostics(&self) -> Option<&Arc<Diagnostics>> {
        self.diag.as_ref()
    }

    /// The live numbers of the pair on the bench.
    pub fn summary(&self) -> Option<Result<plumb_core::regression::LiveSummary, String>> {
        self.pair
            .as_ref()
            .map(|p| p.summary().clone().map_err(|e| e.to_string()))
    }

    /// Whether diagnostics are being computed or are out of date.
    pub fn is_busy(&self) -> bool {
        self.job.is_some() || self.stale
    }

    /// The reason prompt, if open.
    pub fn prompt(&self) -> Option<&Prompt> {
        self.prompt.as_ref()
    }

    /// Puts `spec` on the bench under `marks`.
    ///
    /// # Errors
    /// Columns that cannot be fitted.
    pub fn open(
        &mut self,
        data: &Dataset,
        spec: PairSpec,
        marks: &Marks,
    ) -> Result<(), WorkbenchError> {
        let mut pair = Pair::new(&data.table, spec)?;
        pair.apply(marks);
        self.scatter = Cloud::new(
            pair.x.iter().copied().zip(pair.y.iter().copied()).collect(),
            (0..pair.rows.len()).collect(),
        );
        self.pair = Some(pair);
        self.serial += 1;
        self.diag = None;
        self.hovered = None;
        self.selected = None;
        self.regroup(data);
        self.touch();
        Ok(())
    }

    /// Recomputes the group level of each entry after the colouring column changed.
    pub(crate) fn regroup(&mut self, data: &Dataset) {
        let (Some(pair), Some(name)) = (&self.pair, &self.group_by) else {
            self.groups = None;
            self.levels.clear();
            return;
        };
        let by_row = data.group_of_rows(name);
        self.levels = data
            .groups
            .iter()
            .find(|(n, _)| n == name)
            .map(|(_, l)| l.clone())
            .unwrap_or_default();
        self.groups = by_row.map(|g| pair.rows.iter().map(|&r| g[r - 1]).collect());
        self.touch();
    }

    /// Marks the diagnostics out of date.
    pub(crate) fn touch(&mut self) {
        self.stale = true;
        self.marks_generation += 1;
    }

    /// Applies changed marks to the live fit (immediately) and queues the diagnostics.
    pub fn apply(&mut self, marks: &Marks) {
        if let Some(p) = &mut self.pair {
            if p.differs(marks) {
                p.apply(marks);
                self.touch();
            } else {
                // Only reasons changed: keep the numbers, note the new text.
                p.apply(marks);
            }
        }
    }

    /// Picks up finished diagnostics and starts a new computation when needed.
    pub fn poll(&mut self, data: &Dataset, marks: &Marks, ctx: &egui::Context) {
        if let Some(d) = self.job.as_mut().and_then(Job::poll) {
            self.job = None;
            self.diag = Some(Arc::new(d));
            self.diag_generation += 1;
        }
        if self.stale && self.job.is_none() {
            if let Some(pair) = &self.pair {
                self.stale = false;
                let input = Input::of(&data.table, pair, marks, self.overlays, self.groups.clone());
                let ctx = ctx.clone();
                self.job = Some(Job::spawn(
                    move |_| compute(&input),
                    move || ctx.request_repaint(),
                ));
            }
        }
    }
}

/// Draws the bench.
pub fn show(wb: &mut Workbench, ui: &mut egui::Ui) {
    let Some(loaded) = wb.loaded.clone() else {
        return;
    };
    controls(wb, &loaded.dataset, ui);
    if wb.bench.pair.is_none() {
        ui.label("Choose a response (y) and a predictor (x) above, or click a cell of the co-movement map.");
        return;
    }
    if wb.marks().is_hypothetical() {
        what_if_banner(wb, ui);
    }
    egui::Panel::left("numbers")
        .resizable(true)
        .default_size(385.0)
        .size_range(240.0..=520.0)
        .show(ui, |ui| crate::numbers::show(wb, ui));
    egui::Panel::right("ledger")
        .resizable(true)
        .default_size(270.0)
        .size_range(220.0..=480.0)
        .show(ui, |ui| crate::ledger::show(wb, ui));
    egui::Panel::bottom("cautions").show(ui, |ui| {
        ui.weak("Association is not causation. Every exclusion needs a documented reason. Follow your laboratory's validation protocol and local regulations before acting on these numbers.");
    });
    egui::CentralPanel::default().show(ui, |ui| crate::plots::show(wb, ui));
    wb.bench.hovered = wb.bench.hovered_next.take().or(wb.bench.drag);
}

fn what_if_banner(wb: &mut Workbench, ui: &mut egui::Ui) {
    let n = wb.marks().moved.len();
    let mut clear = false;
    egui::Frame::new()
        .fill(palette::WHAT_IF)
        .inner_margin(6.0)
        .show(ui, |ui| {
            ui.horizontal(|ui| {
                ui.label(
                    RichText::new(format!(
                        "WHAT-IF: {n} point(s) moved. The numbers below are hypothetical; the data file is unchanged."
                    ))
                    .color(egui::Color32::BLACK)
                    .strong(),
                );
                clear = ui
                    .button("Clear what-if moves")
                    .on_hover_text("Put every moved point back where the data file has it")
                    .clicked();
            });
        });
    if clear {
        let mut m = wb.marks().clone();
        m.moved.clear();
        wb.set_marks(m, true);
    }
}

fn controls(wb: &mut Workbench, data: &Dataset, ui: &mut egui::Ui) {
    let current = wb.bench.pair.as_ref().map(|p| p.spec.clone());
    let mut spec = current.clone().or_else(|| {
        (data.numeric.len() >= 2).then(|| PairSpec::line(&data.numeric[1], &data.numeric[0]))
    });
    let mut regroup = false;
    ui.horizontal_wrapped(|ui| {
        if let Some(s) = &mut spec {
            column_choice(ui, "response-y", "y:", &mut s.y, &data.numeric, "The response: the column to be explained");
            column_choice(ui, "predictor-x", "x:", &mut s.x, &data.numeric, "The predictor");
            ui.label("degree:");
            ui.add(egui::DragValue::new(&mut s.degree).range(1..=plumb_core::regression::MAX_DEGREE))
                .on_hover_text("1 = straight line; 2, 3, … = polynomial in x");
            ui.checkbox(&mut s.intercept, "intercept")
                .on_hover_text("Off: the line is forced through the origin (R² is then uncentred)");
        }
        ui.separator();
        let o = &mut wb.bench.overlays;
        let before = *o;
        ui.checkbox(&mut o.theil_sen, "Theil–Sen").on_hover_text("Median of pairwise slopes: resists outliers in y");
        ui.checkbox(&mut o.deming, "Deming").on_hover_text("Errors in both x and y (equal variances)");
        ui.checkbox(&mut o.loess, "LOESS").on_hover_text("Local regression: shows the shape without assuming one");
        if o.loess {
            ui.add(egui::Slider::new(&mut o.loess_span, 0.1..=1.0).text("span"))
                .on_hover_text("Share of the rows in each local fit");
        }
        if *o != before {
            wb.bench.touch();
        }
        if !data.groups.is_empty() {
            ui.separator();
            ui.label("colour by:");
            let old = wb.bench.group_by.clone();
            egui::ComboBox::from_id_salt("group-by")
                .selected_text(wb.bench.group_by.clone().unwrap_or_else(|| "nothing".into()))
                .show_ui(ui, |ui| {
                    ui.selectable_value(&mut wb.bench.group_by, None, "nothing");
                    for (g, _) in &data.groups {
                        ui.selectable_value(&mut wb.bench.group_by, Some(g.clone()), g);
                    }
                })
                .response
                .on_hover_text("Colour the points by a text column and fit a line per group");
            regroup = old != wb.bench.group_by;
        }
        ui.separator();
        ui.label("pointer:");
        let p = &mut wb.bench.pointer;
        ui.radio_value(p, PointerMode::Exclude, "click excludes")
            .on_hover_text("Click a point to leave it out (click again to put it back); you are asked for a reason");
        ui.radio_value(p, PointerMode::Lasso, "lasso excludes")
            .on_hover_text("Drag a loop around points in the scatter to leave them all out");
        ui.radio_value(p, PointerMode::Move, "drag moves (what-if)")
            .on_hover_text("Drag a point to see what the numbers would be if it sat there; the data file is never changed");
    });
    if regroup {
        wb.bench.regroup(data);
    }
    if let Some(s) = spec {
        if Some(&s) != current.as_ref() {
            wb.open_pair(s);
        }
    }
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

//! The workbench window: its state, the panels' own UI state, and the frame loop — poll the
//! background jobs, draw every panel from read-only state, then apply the actions the panels
//! returned, in order, in one place ([`Workbench::apply`]).

mod apply;
mod keys;

use std::path::PathBuf;

use eframe::egui;

use crate::action::Actions;
use crate::bench::BenchUi;
use crate::screens::{chrome, columns, map, one_pass};
use crate::state::jobs::Waker;
use crate::state::{Screen, State};

/// What the panels keep between frames that is not the workbench's state: text being typed,
/// the pointer's mode and what it is over, plot zoom, and cached images.
#[derive(Default)]
struct Panels {
    columns: columns::ColumnsUi,
    map: map::MapUi,
    bench: BenchUi,
    one_pass: one_pass::OnePassUi,
    /// The text of the reason prompt.
    reason: String,
}

/// The desktop workbench.
pub struct Workbench {
    state: State,
    panels: Panels,
    title: String,
}

impl Default for Workbench {
    fn default() -> Self {
        Self::new(crate::state::settings::config_dir())
    }
}

/// The workbench reads as its state (`wb.marks()`, `wb.bench()`, …); only
/// [`Workbench::apply`] changes it.
impl std::ops::Deref for Workbench {
    type Target = State;

    fn deref(&self) -> &State {
        &self.state
    }
}

impl Workbench {
    /// A workbench with no file open, keeping its settings in `config` (`None`: nowhere).
    pub fn new(config: Option<PathBuf>) -> Self {
        Self {
            state: State::new(config),
            panels: Panels::default(),
            title: String::new(),
        }
    }

    /// Gives the workbench the window's context before the first frame (so background jobs
    /// started from the command line can wake the window).
    pub fn set_context(&mut self, ctx: egui::Context) {
        self.state.waker = Waker::new(ctx);
    }

    /// Caps the memory a load may take (bytes); a data file that would need more is offered
    /// the one-pass view instead. `None`: what the system reports available.
    pub fn set_memory_limit(&mut self, limit: Option<u64>) {
        self.state.doc.memory_limit = limit;
    }

    /// Leaves the pending question unanswered and gone (a screenshot shows the file asked for,
    /// not last run's recovery question).
    pub fn dismiss_question(&mut self) {
        self.state.ask = None;
    }

    /// Picks up finished background work and applies what a finished file dialog asks for
    /// (programs without a window call this instead of drawing frames).
    pub fn poll(&mut self) {
        if let Some((purpose, path)) = self.state.poll() {
            self.apply(crate::action::Action::picked(purpose, path));
        }
    }

    /// Polls until background work is done or `limit` has passed (tests and programs
    /// without a window); true if it is done.
    pub fn settle(&mut self, limit: std::time::Duration) -> bool {
        let start = std::time::Instant::now();
        loop {
            self.poll();
            if let Some(line) = self.state.one_pass.as_mut().and_then(|s| s.settle(limit)) {
                self.state.say(line);
            }
            if !self.state.is_busy() {
                return true;
            }
            if start.elapsed() > limit {
                return false;
            }
            std::thread::sleep(std::time::Duration::from_millis(5));
        }
    }

    /// Screen transform of the scatter in the last frame (lets tests aim at a point).
    pub fn scatter_transform(&self) -> Option<egui_plot::PlotTransform> {
        self.panels.bench.scatter_transform()
    }

    /// Draws one frame of the whole workbench into `ui` (the window's root), then applies
    /// what the panels asked for.
    pub fn show(&mut self, ui: &mut egui::Ui) {
        let ctx = ui.ctx().clone();
        if !self.state.waker.is_set() {
            self.state.waker = Waker::new(ctx.clone());
        }
        self.poll();
        if self.state.is_busy() || self.state.doc.has_dialog() {
            // Jobs wake the loop when they finish; this also covers jobs started before the
            // window existed.
            ctx.request_repaint_after(std::time::Duration::from_millis(100));
        }
        let actions = self.draw(ui, &ctx);
        if !actions.is_empty() {
            ctx.request_repaint();
        }
        for action in actions.into_vec() {
            self.apply(action);
        }
        self.update_title(&ctx);
    }

    fn draw(&mut self, ui: &mut egui::Ui, ctx: &egui::Context) -> Actions {
        let Self { state, panels, .. } = self;
        let mut actions = keys::shortcuts(ctx);
        actions.extend(chrome::top_bar_ui(state, ui));
        actions.extend(chrome::status_bar_ui(state, ui));
        let screen = egui::CentralPanel::default().show(ui, |ui| match state.screen() {
            Screen::Columns => columns::columns_ui(state, &mut panels.columns, ui),
            Screen::Map => map::map_ui(state, &mut panels.map, ui),
            Screen::Bench => crate::bench::bench_ui(state, &mut panels.bench, ui),
            Screen::OnePass => one_pass::one_pass_ui(state.one_pass(), &mut panels.one_pass, ui),
        });
        actions.extend(screen.inner);
        actions.extend(crate::bench::reason_prompt_ui(
            state.bench().prompt(),
            &mut panels.reason,
            ctx,
        ));
        actions.extend(chrome::questions_ui(state.ask(), ctx));
        actions
    }

    fn update_title(&mut self, ctx: &egui::Context) {
        let t = self.state.window_title();
        if t != self.title {
            ctx.send_viewport_cmd(egui::ViewportCommand::Title(t.clone()));
            self.title = t;
        }
    }
}

impl eframe::App for Workbench {
    fn ui(&mut self, ui: &mut egui::Ui, _frame: &mut eframe::Frame) {
        self.show(ui);
    }

    fn on_exit(&mut self, _gl: Option<&eframe::glow::Context>) {
        if !self.state.has_unsaved_changes() {
            self.state.discard_recovery();
        }
    }
}

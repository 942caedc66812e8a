//! Opening the window: options from the command line, the native window, and the screenshot
//! mode that renders one frame to a PNG and exits.

use std::path::PathBuf;
use std::sync::mpsc;
use std::sync::Arc;
use std::time::{Duration, Instant};

use eframe::egui;

use crate::action::Action;
use crate::error::WorkbenchError;
use crate::state::pair::FitSpec;
use crate::state::Screen;
use crate::workbench::Workbench;

/// How the window starts.
#[derive(Debug, Clone, Default)]
pub struct Launch {
    /// A data file or session to open.
    pub data: Option<PathBuf>,
    /// A pair to open on the bench (response, predictor).
    pub pair: Option<(String, String)>,
    /// Rows to exclude at start (1-based), recorded with a reason saying so.
    pub exclude: Vec<usize>,
    /// Screen to show first.
    pub screen: Option<Screen>,
    /// Render to this PNG and exit.
    pub screenshot: Option<PathBuf>,
    /// Window size in points.
    pub size: Option<(f32, f32)>,
    /// Colours (default: follow the system).
    pub theme: Option<egui::ThemePreference>,
    /// Overlays on the scatter.
    pub overlays: crate::state::diagnostics::Overlays,
    /// Text column colouring the points.
    pub colour_by: Option<String>,
    /// Read `data` in the one-pass view (for files too large to load) instead of loading it.
    pub one_pass: bool,
    /// Weights of the pair from a rule on x and y.
    pub weight_rule: Option<plumb_core::calibration::WeightRule>,
    /// What the bench reads beside the fit (its mode, the calibration's unknowns).
    pub reading: Option<crate::state::reading::Reading>,
}

/// Longest wait for the data and diagnostics before a screenshot is taken anyway.
const SCREENSHOT_PATIENCE: Duration = Duration::from_secs(60);

struct Shooter {
    path: PathBuf,
    started: Instant,
    settled_frames: u32,
    requested: bool,
    rx: Option<mpsc::Receiver<Arc<egui::ColorImage>>>,
    result: Arc<std::sync::Mutex<Option<Result<(), String>>>>,
}

struct Window {
    wb: Workbench,
    shooter: Option<Shooter>,
    pending: Option<Launch>,
}

impl eframe::App for Window {
    fn ui(&mut self, ui: &mut egui::Ui, _frame: &mut eframe::Frame) {
        if self.pending.is_some() && !self.wb.is_loading() {
            if let Some(launch) = self.pending.take() {
                // A failed load leaves nothing to apply to; its message is on the status line.
                if self.wb.loaded().is_some() {
                    apply_after_load(&mut self.wb, launch);
                }
            }
        }
        self.wb.show(ui);
        if let Some(s) = &mut self.shooter {
            shoot(&self.wb, s, ui.ctx());
        }
    }

    fn on_exit(&mut self, gl: Option<&eframe::glow::Context>) {
        eframe::App::on_exit(&mut self.wb, gl);
    }

    /// A screenshot shows the screen as it stands, not wherever the X server happened to put
    /// the pointer: pointer moves are dropped, so no tooltip or read-out lands in the picture.
    fn raw_input_hook(&mut self, _ctx: &egui::Context, raw_input: &mut egui::RawInput) {
        if self.shooter.is_some() {
            raw_input.events.retain(|e| {
                !matches!(e, egui::Event::PointerMoved(_) | egui::Event::MouseMoved(_))
            });
            raw_input.events.push(egui::Event::PointerGone);
        }
    }
}

/// Once the file is in: the pair, the exclusions and the screen asked for, as the actions an
/// analyst would take.
fn apply_after_load(wb: &mut Workbench, launch: Launch) {
    if let Some(reading) = &launch.reading {
        wb.apply(Action::SetReading(reading.clone()));
    }
    if let Some((y, x)) = &launch.pair {
        wb.apply(Action::OpenPair(FitSpec {
            weight_rule: launch.weight_rule,
            ..FitSpec::line(y, x)
        }));
        if wb.bench().spec().is_some() {
            wb.apply(Action::Show(Screen::Bench));
        }
    }
    wb.apply(Action::SetOverlays(launch.overlays));
    wb.apply(Action::ColourBy(launch.colour_by.clone()));
    let n_rows = wb.loaded().map_or(0, |l| l.dataset.table.n_rows());
    let (rows, missing): (Vec<usize>, Vec<usize>) =
        launch.exclude.iter().partition(|&&r| r <= n_rows);
    if !rows.is_empty() {
        wb.apply(Action::Exclude {
            rows,
            reason: Some("excluded from the command line (--exclude)".into()),
        });
    }
    if let (Some(first), Some(last)) = (missing.first(), missing.last()) {
        wb.apply(Action::fail(format!(
            "--exclude named {} the file does not have ({first} to {last}); it has {} data rows",
            plumb_report::text::plural(missing.len(), "row", "rows"),
            plumb_report::text::count(n_rows)
        )));
    }
    if let Some(s) = launch.screen {
        wb.apply(Action::Show(s));
    }
}

fn shoot(wb: &Workbench, s: &mut Shooter, ctx: &egui::Context) {
    let ready = !wb.is_busy();
    s.settled_frames = if ready { s.settled_frames + 1 } else { 0 };
    let patience_over = s.started.elapsed() > SCREENSHOT_PATIENCE;
    if !s.requested && (s.settled_frames >= 5 || patience_over) {
        let (tx, rx) = mpsc::channel();
        let ctx2 = ctx.clone();
        ctx.request_screenshot(move |image| {
            let _ = tx.send(image);
            ctx2.request_repaint();
        });
        s.rx = Some(rx);
        s.requested = true;
    }
    if let Some(image) = s.rx.as_ref().and_then(|rx| rx.try_recv().ok()) {
        let outcome = save_png(&image, &s.path);
        *s.result
            .lock()
            .unwrap_or_else(std::sync::PoisonError::into_inner) = Some(outcome);
        ctx.send_viewport_cmd(egui::ViewportCommand::Close);
    }
    ctx.request_repaint_after(Duration::from_millis(50));
}

fn save_png(image: &egui::ColorImage, path: &std::path::Path) -> Result<(), String> {
    let [w, h] = image.size;
    let bytes: Vec<u8> = image.pixels.iter().flat_map(|c| c.to_array()).collect();
    let buffer = image::RgbaImage::from_raw(w as u32, h as u32, bytes)
        .ok_or("screenshot buffer has the wrong size")?;
    let mut png = Vec::new();
    buffer
        .write_to(
            &mut std::io::Cursor::new(&mut png),
            image::ImageOutputFormat::Png,
        )
        .map_err(|e| e.to_string())?;
    plumb_report::write_atomically(path, &png).map_err(|e| e.to_string())
}

/// Opens the window and runs until it is closed (or the screenshot is written).
///
/// # Errors
/// The window system failed, or the screenshot could not be written.
pub fn run(launch: Launch) -> Result<(), WorkbenchError> {
    let (w, h) = launch.size.unwrap_or((1440.0, 900.0));
    let options = eframe::NativeOptions {
        viewport: egui::ViewportBuilder::default()
            .with_inner_size([w, h])
            .with_min_inner_size([900.0, 600.0])
            .with_title("Plumbline")
            .with_app_id("plumbline")
            .with_drag_and_drop(true),
        ..Default::default()
    };
    let result = Arc::new(std::sync::Mutex::new(None));
    let shooter = launch.screenshot.clone().map(|path| Shooter {
        path,
        started: Instant::now(),
        settled_frames: 0,
        requested: false,
        rx: None,
        result: Arc::clone(&result),
    });
    let app_launch = launch.clone();
    eframe::run_native(
        "plumbline",
        options,
        Box::new(move |cc| {
            let mut wb = Workbench::default();
            if shooter.is_some() {
                wb.dismiss_question();
            }
            wb.set_context(cc.egui_ctx.clone());
            if let Some(t) = app_launch.theme {
                cc.egui_ctx.set_theme(t);
            }
            let pending = match &app_launch.data {
                Some(d) if app_launch.one_pass => {
                    wb.apply(Action::OpenOnePass {
                        path: d.clone(),
                        pair: app_launch.pair.clone(),
                    });
                    None
                }
                Some(d) => {
                    wb.apply(Action::Open(d.clone()));
                    Some(app_launch)
                }
                None => Some(app_launch),
            };
            Ok(Box::new(Window {
                wb,
                shooter,
                pending,
            }))
        }),
    )
    .map_err(|e| WorkbenchError::Window(e.to_string()))?;
    let outcome = result
        .lock()
        .unwrap_or_else(std::sync::PoisonError::into_inner)
        .take();
    match (launch.screenshot, outcome) {
        (None, _) => Ok(()),
        (Some(_), Some(Ok(()))) => Ok(()),
        (Some(p), Some(Err(e))) => Err(WorkbenchError::Report(format!("{}: {e}", p.display()))),
        (Some(p), None) => Err(WorkbenchError::Report(format!(
            "{}: the window closed before a screenshot was taken",
            p.display()
        ))),
    }
}

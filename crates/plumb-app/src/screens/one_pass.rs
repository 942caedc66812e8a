//! The one-pass view of a file too large to load: the pair's choice, the passes' progress,
//! the density image with the least-squares line, and the line's numbers.

use eframe::egui::{self, RichText, Vec2};
use egui_plot::{Line, PlotPoints};
use plumb_report::text::{count, num};
use plumb_report::wording;
use plumb_report::wording::numbers::Headline;

use crate::action::{Action, Actions};
use crate::axes;
use crate::bench::{coefficient_table, TermRow};
use crate::density::texture::{colour_image, image_over};
use crate::palette;
use crate::state::one_pass::{OnePass, PassOutcome};
use crate::state::sample_draw::{SAMPLE_ROWS, SAMPLE_SEED};

/// What the view keeps between frames: the density image of the last result.
#[derive(Default)]
pub struct OnePassUi {
    texture: Option<(u64, egui::TextureHandle)>,
}

/// Draws the view.
pub fn one_pass_ui(view: Option<&OnePass>, own: &mut OnePassUi, ui: &mut egui::Ui) -> Actions {
    let Some(view) = view else {
        ui.label("No file is open in the one-pass view.");
        return Actions::none();
    };
    ui.heading(format!(
        "One-pass view — {}",
        view.path
            .file_name()
            .map_or_else(String::new, |n| n.to_string_lossy().into_owned())
    ));
    ui.label(format!(
        "{:.0} MB read in pieces and never held in memory: the line and the density of the points come from two passes over the file. Rows cannot be excluded or inspected here; a random sample of them can be, on the pair bench.",
        view.bytes as f64 / 1e6
    ));
    let mut out = sample_row_ui(view, ui);
    out.extend(controls_ui(view, ui));
    if let Some(e) = &view.error {
        ui.colored_label(ui.visuals().error_fg_color, e);
    }
    let Some(outcome) = &view.outcome else {
        if !view.is_busy() && view.error.is_none() {
            ui.label("Choose y and x; the passes start at once.");
        }
        return out;
    };
    let avail = ui.available_size();
    ui.horizontal_top(|ui| {
        let plot_size = Vec2::new((avail.x * 0.62).max(300.0), avail.y.max(300.0));
        plot_ui(view, outcome, own, ui, plot_size);
        // The numbers keep to what the plot leaves, wrapping instead of running off the window.
        let rest = (avail.x - plot_size.x - 2.0 * ui.spacing().item_spacing.x).max(200.0);
        ui.vertical(|ui| {
            ui.set_max_width(rest);
            numbers_ui(outcome, &view.y, &view.x, ui);
        });
    });
    out
}

/// The button that draws a seeded random sample onto the bench, or the draw's progress.
fn sample_row_ui(view: &OnePass, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    ui.horizontal_wrapped(|ui| {
        if let Some(draw) = view.sampling() {
            let share = if view.bytes > 0 {
                draw.bytes_read() as f32 / view.bytes as f32
            } else {
                0.0
            };
            ui.add(
                egui::ProgressBar::new(share)
                    .desired_width(220.0)
                    .text(format!("drawing the sample: {:.0} MB", draw.bytes_read() as f64 / 1e6)),
            );
            if ui.button("Stop").on_hover_text("Stop drawing the sample").clicked() {
                out.push(Action::OnePassStop);
            }
            return;
        }
        let label = format!(
            "Open a random sample of {} rows on the bench",
            count(SAMPLE_ROWS)
        );
        let go = ui
            .add_enabled(!view.is_busy(), egui::Button::new(label))
            .on_hover_text(format!(
                "Reads the file once more and keeps {} rows drawn at random (all of them if it has fewer; seed {SAMPLE_SEED}, so the same rows every time), then opens them with every column on the pair bench, labelled as a sample, with y = {} and x = {}. Its work cannot be saved as a session of the file.",
                count(SAMPLE_ROWS),
                view.y,
                view.x
            ))
            .on_disabled_hover_text("Wait for the passes to finish, or stop them");
        if go.clicked() {
            out.push(Action::OnePassSample);
        }
    });
    ui.weak("Save session and Write summary are off in this view and for a sample: a session reproduces its numbers from the whole file held in memory, which neither has.");
    out
}

fn controls_ui(view: &OnePass, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    ui.horizontal(|ui| {
        let (mut y, mut x) = (view.y.clone(), view.x.clone());
        for (label, value) in [("y:", &mut y), ("x:", &mut x)] {
            let l = ui.label(label);
            egui::ComboBox::from_id_salt(label)
                .selected_text(value.as_str())
                .show_ui(ui, |ui| {
                    for c in &view.numeric {
                        ui.selectable_value(value, c.clone(), c);
                    }
                })
                .response
                .labelled_by(l.id);
        }
        let changed = (&y, &x) != (&view.y, &view.x);
        if view.is_busy() {
            out.extend(progress_ui(view, ui));
        } else if ui
            .button("Read again")
            .on_hover_text("Run both passes again")
            .clicked()
        {
            out.push(Action::OnePassPair {
                y: y.clone(),
                x: x.clone(),
            });
        }
        if changed {
            out.push(Action::OnePassPair { y, x });
        }
    });
    out
}

fn progress_ui(view: &OnePass, ui: &mut egui::Ui) -> Actions {
    let (read, pass) = view.progress();
    let share = if view.bytes > 0 {
        read as f32 / view.bytes as f32
    } else {
        0.0
    };
    ui.add(
        egui::ProgressBar::new(share)
            .desired_width(220.0)
            .text(format!("pass {pass} of 2: {:.0} MB", read as f64 / 1e6)),
    );
    let stop = ui
        .button("Stop")
        .on_hover_text("Stop reading the file")
        .clicked();
    Actions::from(stop.then_some(Action::OnePassStop))
}

fn plot_ui(view: &OnePass, o: &PassOutcome, own: &mut OnePassUi, ui: &mut egui::Ui, size: Vec2) {
    let visuals = ui.visuals().clone();
    if own
        .texture
        .as_ref()
        .is_none_or(|(g, _)| *g != view.generation)
    {
        let texture = ui.ctx().load_texture(
            "one-pass-density",
            colour_image(&o.density, &visuals),
            egui::TextureOptions::NEAREST,
        );
        own.texture = Some((view.generation, texture));
    }
    let b = o.density.bounds;
    let line = &o.line;
    let ends = [b.x_min, b.x_max].map(|x| [x, line.intercept.estimate + line.slope.estimate * x]);
    axes::plot("one-pass-plot", size, (&view.x, &view.y))
        .allow_drag(true)
        .show(ui, |pu| {
            if let Some((_, t)) = &own.texture {
                pu.image(image_over(t, &b));
            }
            pu.line(
                Line::new("least-squares line", PlotPoints::from(ends.to_vec()))
                    .color(palette::fit(&visuals))
                    .width(2.0),
            );
        });
}

fn numbers_ui(o: &PassOutcome, y: &str, x: &str, ui: &mut egui::Ui) {
    let l = &o.line;
    // The same headline and words as the bench and `plumb fit`.
    let head = Headline::of_line(l, y);
    ui.label(RichText::new(head.r_squared()).heading())
        .on_hover_text(head.r_squared_means());
    ui.label(head.share());
    ui.label(format!("Pearson r {}", num(l.r)));
    for line in head.lines() {
        ui.label(format!("{} {}", line.label, line.figures))
            .on_hover_text(line.means);
    }
    ui.separator();
    let rows: Vec<TermRow> = [&l.intercept, &l.slope]
        .iter()
        .map(|c| TermRow {
            term: c.term.clone(),
            value: c.estimate,
            std_error: c.std_error,
            p: c.p_value,
            interval: (c.ci_low, c.ci_high),
        })
        .collect();
    coefficient_table(ui, "one-pass-model", &rows, 0.95);
    ui.separator();
    rows_ui(o, y, x, ui);
    ui.add_space(8.0);
    ui.weak(wording::line(&[
        wording::NOT_CAUSATION,
        wording::FOLLOW_PROTOCOL,
    ]));
}

fn rows_ui(o: &PassOutcome, y: &str, x: &str, ui: &mut egui::Ui) {
    let (l, s) = (&o.line, &o.summary);
    ui.label(format!(
        "{} rows used of {} in the file; {} left out for gaps",
        count(l.n as usize),
        count(s.rows),
        count(s.dropped_count)
    ));
    if !s.dropped.is_empty() {
        let rows: Vec<String> = s
            .dropped
            .iter()
            .take(8)
            .map(|d| format!("{} ({} {})", d.row, d.column, d.reason.as_str()))
            .collect();
        ui.weak(format!("first left out: {}", rows.join(", ")));
    }
    ui.label(format!(
        "{x} from {} to {}; {y} from {} to {}",
        num(l.x_range.0),
        num(l.x_range.1),
        num(l.y_range.0),
        num(l.y_range.1)
    ));
    if l.residual_pass {
        ui.weak("the residuals were summed in the second pass (the line explains nearly all)");
    }
}

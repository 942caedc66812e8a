//! The map's keys: the colour scale as a bar from −1 through 0 to +1, and the marks its cells
//! carry for the map's notes. The marks are drawn here for the cells too, so the key and the
//! grid cannot disagree.

use eframe::egui::{self, Color32, Pos2, Rect, Sense, Stroke, Vec2};
use plumb_core::association::{StructureScan, STRUCTURE_ALPHA, STRUCTURE_GAP};
use plumb_report::text::{count, plural, sig};

use crate::palette;
use crate::state::map::{MapNote, MapResult};

/// The marks a cell can carry, one per kind of note.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Mark {
    /// A filled corner wedge at the top right: both columns drift along the row order.
    Drift,
    /// A ring at the top left: structure a straight line misses.
    Ring,
}

impl Mark {
    /// The mark of a note.
    pub(super) fn of(note: &MapNote) -> Self {
        match note {
            MapNote::SharedTrend { .. } => Self::Drift,
            MapNote::MissedStructure { .. } => Self::Ring,
        }
    }

    /// Draws the mark in cell `rect` in `ink`.
    pub(super) fn paint(self, painter: &egui::Painter, rect: Rect, ink: Color32) {
        let s = (rect.width() * 0.3).clamp(6.0, 14.0);
        match self {
            Self::Drift => {
                let (x, y) = (rect.right() - 1.0, rect.top() + 1.0);
                let points = vec![Pos2::new(x - s, y), Pos2::new(x, y), Pos2::new(x, y + s)];
                painter.add(egui::Shape::convex_polygon(points, ink, Stroke::NONE));
            }
            Self::Ring => {
                let radius = (s * 0.4).max(3.5);
                let centre = Pos2::new(rect.left() + radius + 2.5, rect.top() + radius + 2.5);
                painter.circle_stroke(centre, radius, Stroke::new(1.8, ink));
            }
        }
    }
}

/// Width of the colour bar.
const BAR_W: f32 = 220.0;
/// Height of the colour bar.
const BAR_H: f32 = 12.0;

/// The colour scale: a bar with ticks at −1, −0.5, 0, +0.5 and +1, and what each end means.
pub(super) fn colour_key_ui(ui: &mut egui::Ui, coefficient: &str) {
    ui.label(egui::RichText::new(format!("Colour: {coefficient}")).strong());
    let visuals = ui.visuals().clone();
    let (rect, _) = ui.allocate_exact_size(Vec2::new(BAR_W + 24.0, BAR_H + 34.0), Sense::hover());
    let bar = Rect::from_min_size(rect.min + Vec2::new(12.0, 0.0), Vec2::new(BAR_W, BAR_H));
    let painter = ui.painter_at(rect);
    let steps = 88;
    for s in 0..steps {
        let t0 = s as f32 / steps as f32;
        let r = -1.0 + 2.0 * (f64::from(s) + 0.5) / f64::from(steps);
        let x = bar.left() + t0 * BAR_W;
        painter.rect_filled(
            Rect::from_min_max(
                Pos2::new(x, bar.top()),
                Pos2::new(x + BAR_W / steps as f32 + 0.5, bar.bottom()),
            ),
            0.0,
            palette::diverging(r, &visuals),
        );
    }
    let ink = visuals.text_color();
    painter.rect_stroke(
        bar,
        0.0,
        Stroke::new(1.0, visuals.weak_text_color()),
        egui::StrokeKind::Outside,
    );
    let font = egui::FontId::proportional(11.0);
    for (v, text) in [
        (-1.0, "−1"),
        (-0.5, "−0.5"),
        (0.0, "0"),
        (0.5, "+0.5"),
        (1.0, "+1"),
    ] {
        let x = bar.left() + (v + 1.0) / 2.0 * BAR_W;
        painter.line_segment(
            [Pos2::new(x, bar.bottom()), Pos2::new(x, bar.bottom() + 4.0)],
            Stroke::new(1.0, ink),
        );
        painter.text(
            Pos2::new(x, bar.bottom() + 5.0),
            egui::Align2::CENTER_TOP,
            text,
            font.clone(),
            ink,
        );
    }
    let weak = visuals.weak_text_color();
    let y = bar.bottom() + 20.0;
    painter.text(
        Pos2::new(bar.left(), y),
        egui::Align2::LEFT_TOP,
        "move opposite",
        font.clone(),
        weak,
    );
    painter.text(
        Pos2::new(bar.center().x, y),
        egui::Align2::CENTER_TOP,
        "unrelated",
        font.clone(),
        weak,
    );
    painter.text(
        Pos2::new(bar.right(), y),
        egui::Align2::RIGHT_TOP,
        "move together",
        font,
        weak,
    );
    ui.horizontal(|ui| {
        swatch(ui, palette::undefined_cell(&visuals), None);
        ui.weak("undefined (hover for why)");
    });
}

/// The marks' key, and how far the check for structure r misses got.
pub(super) fn marks_key_ui(ui: &mut egui::Ui, r: &MapResult, drawn: bool) {
    ui.label(egui::RichText::new("Marks on cells").strong());
    let neutral = palette::diverging(0.0, ui.visuals());
    let ink = palette::ink_on(neutral);
    let order = r.key.order.as_deref();
    ui.horizontal(|ui| {
        swatch(ui, neutral, Some((Mark::Drift, ink)));
        match order {
            Some(o) => ui.label(format!("shared drift: the pair's link fades along {o}")),
            None => ui.weak("shared drift: choose a row order to look for it"),
        };
    });
    ui.horizontal(|ui| {
        swatch(ui, neutral, Some((Mark::Ring, ink)));
        ui.label("structure r misses: distance correlation well above |r|");
    })
    .response
    .on_hover_text(format!(
        "Flagged when dCor − |r| ≥ {} and dCor's permutation p ≤ {}, not adjusted for the number of pairs: a cue to look at the pair, not a finding (r: Pearson, on the pair's complete rows)",
        sig(STRUCTURE_GAP, 2),
        sig(STRUCTURE_ALPHA, 2)
    ));
    ui.weak(structure_status(&r.structure, r.matrix.n_tests));
    if !drawn {
        ui.weak("Cells are too small for marks here: the flagged pairs are listed below.");
    }
}

/// What the structure check covered.
fn structure_status(scan: &StructureScan, pairs: usize) -> String {
    match scan {
        StructureScan::Done {
            unconfirmed,
            too_large,
            ..
        } => {
            let checked = pairs.saturating_sub(*too_large);
            let mut s = format!(
                "Structure checked on {} of {}.",
                count(checked),
                plural(pairs, "pair", "pairs")
            );
            if *too_large > 0 {
                s.push_str(&format!(
                    " {} more than {} complete rows, too many for distance correlation: open the pair on the bench to look at it.",
                    if *too_large == 1 { "1 pair has".to_string() } else { format!("{} pairs have", count(*too_large)) },
                    count(plumb_core::association::DISTANCE_MAX_N)
                ));
            }
            if *unconfirmed > 0 {
                s.push_str(&format!(
                    " {} not tested for want of time (a work budget): leave columns out to test them.",
                    plural(*unconfirmed, "candidate pair was", "candidate pairs were")
                ));
            }
            s.push_str(&format!(
                " A ring is a cue to open the pair and look, not a finding: its permutation p (≤ {STRUCTURE_ALPHA}) is not adjusted across the pairs, so with many pairs some rings can come by chance."
            ));
            s
        }
        StructureScan::Skipped { cost, budget } => format!(
            "Structure check skipped: these pairs need {}× the work budget of distance correlation. Leave columns out to bring it within.",
            sig(*cost as f64 / *budget as f64, 2)
        ),
    }
}

/// A small cell-like square, with a mark on it.
fn swatch(ui: &mut egui::Ui, fill: Color32, mark: Option<(Mark, Color32)>) {
    let (rect, _) = ui.allocate_exact_size(Vec2::splat(22.0), Sense::hover());
    ui.painter().rect_filled(rect, 0.0, fill);
    ui.painter().rect_stroke(
        rect,
        0.0,
        Stroke::new(1.0, ui.visuals().weak_text_color()),
        egui::StrokeKind::Inside,
    );
    if let Some((m, ink)) = mark {
        m.paint(ui.painter(), rect, ink);
    }
}

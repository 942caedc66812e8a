//! The key of a view, drawn as a row of small swatches with their names above the plot — never
//! on the data. What the scatter's key lists is worked out from the bench's state before the
//! plot is drawn ([`scatter_keys`]), with the same colours and strokes the layers use.

use eframe::egui::{self, Color32, Sense, Stroke, Vec2};
use plumb_data::analysis::RobustFit;

use super::Scene;
use crate::palette;
use crate::state::reading::BenchMode;

/// How a key entry is drawn.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Swatch {
    /// A filled dot (rows, a group's rows).
    Dot(Color32),
    /// A hollow ring (excluded rows).
    Ring(Color32),
    /// A solid line of this width.
    Line(Color32, f32),
    /// A dashed line (long dashes).
    Dashed(Color32),
    /// A dotted line.
    Dotted(Color32),
    /// A shaded band.
    Band(Color32),
    /// A dot whose size stands for a quantity (`r`: radius in points).
    Sized(Color32, f32),
}

/// One entry of a key.
#[derive(Debug, Clone, PartialEq)]
pub struct Key {
    /// What is drawn.
    pub swatch: Swatch,
    /// Its name.
    pub name: String,
}

impl Key {
    fn new(swatch: Swatch, name: impl Into<String>) -> Self {
        Self {
            swatch,
            name: name.into(),
        }
    }
}

/// Width of a swatch in points.
const SWATCH: f32 = 22.0;

/// Draws `keys` as one wrapped row of entries, each a swatch with its name as one piece (a
/// row break never parts a name from its swatch), named for assistive technology and tests.
pub fn key_row_ui(ui: &mut egui::Ui, keys: &[Key]) {
    ui.horizontal_wrapped(|ui| {
        ui.spacing_mut().item_spacing.x = 12.0;
        for k in keys {
            entry_ui(ui, k);
        }
    });
}

fn entry_ui(ui: &mut egui::Ui, k: &Key) {
    let font = egui::TextStyle::Small.resolve(ui.style());
    let ink = ui.visuals().text_color();
    let galley = ui.painter().layout_no_wrap(k.name.clone(), font, ink);
    let h = galley
        .size()
        .y
        .max(ui.text_style_height(&egui::TextStyle::Small));
    let size = Vec2::new(SWATCH + 4.0 + galley.size().x, h);
    let (rect, response) = ui.allocate_exact_size(size, Sense::hover());
    let swatch = egui::Rect::from_min_size(rect.min, Vec2::new(SWATCH, h));
    swatch_paint(ui.painter(), swatch, k.swatch);
    let at = egui::pos2(
        swatch.right() + 4.0,
        rect.center().y - galley.size().y / 2.0,
    );
    ui.painter().galley(at, galley, ink);
    response.widget_info(|| egui::WidgetInfo::labeled(egui::Role::Label, true, &k.name));
}

fn swatch_paint(p: &egui::Painter, rect: egui::Rect, swatch: Swatch) {
    let h = rect.height();
    let (l, r, c) = (rect.left() + 2.0, rect.right() - 2.0, rect.center());
    match swatch {
        Swatch::Dot(col) => {
            p.circle_filled(c, 3.0, col);
        }
        Swatch::Ring(col) => {
            p.circle_stroke(c, 4.0, Stroke::new(1.2, col));
        }
        Swatch::Sized(col, radius) => {
            p.circle_filled(c, radius.min(h / 2.0), col);
        }
        Swatch::Line(col, w) => {
            p.line_segment(
                [egui::pos2(l, c.y), egui::pos2(r, c.y)],
                Stroke::new(w, col),
            );
        }
        Swatch::Dashed(col) => {
            let pts = [egui::pos2(l, c.y), egui::pos2(r, c.y)];
            p.extend(egui::Shape::dashed_line(
                &pts,
                Stroke::new(1.5, col),
                5.0,
                3.0,
            ));
        }
        Swatch::Dotted(col) => {
            let pts = [egui::pos2(l, c.y), egui::pos2(r, c.y)];
            p.extend(egui::Shape::dotted_line(&pts, col, 3.0, 0.9));
        }
        Swatch::Band(col) => {
            let band = egui::Rect::from_center_size(c, Vec2::new(r - l, h * 0.55));
            p.rect_filled(band, 1.0, col);
        }
    }
}

/// What the scatter shows, in the order it is drawn: rows (or each group's rows), excluded and
/// moved rows when there are any, the fitted line or curve with its bands, the overlays, the
/// kept fit, and the lab's layers. Group levels are named with their column, so that a level
/// can never be mistaken for an overlay.
pub fn scatter_keys(scene: &Scene<'_>, v: &egui::Visuals) -> Vec<Key> {
    let mut keys = Vec::new();
    let colouring = scene.bench.colouring();
    let mode = scene.bench.reading().mode;
    match &colouring.column {
        Some(col) if !colouring.levels.is_empty() => {
            for (k, level) in colouring.levels.iter().enumerate() {
                keys.push(Key::new(
                    Swatch::Dot(palette::group(k)),
                    format!("{col}: {level}"),
                ));
            }
        }
        _ => keys.push(Key::new(Swatch::Dot(palette::point(v)), "rows")),
    }
    if !scene.marks.excluded.is_empty() {
        keys.push(Key::new(Swatch::Ring(palette::excluded(v)), "excluded"));
    }
    if !scene.marks.moved.is_empty() {
        keys.push(Key::new(Swatch::Ring(palette::WHAT_IF), "moved (what-if)"));
    }
    let d = scene.bench.diagnostics();
    if mode == BenchMode::Agreement {
        keys.push(Key::new(
            Swatch::Dashed(palette::identity(v)),
            "line of identity",
        ));
        if let Some(Ok(a)) = d.and_then(|d| d.agreement.as_ref()) {
            if a.passing_bablok.is_ok() {
                keys.push(Key::new(
                    Swatch::Line(palette::fit(v), 2.0),
                    "Passing–Bablok",
                ));
            }
            if a.deming.is_ok() {
                keys.push(Key::new(Swatch::Dashed(palette::deming(v)), "Deming"));
            }
        }
        return keys;
    }
    let fit_colour = palette::fit_line(v, colouring.column.is_some());
    let grouped_model = scene.pair.model.levels.is_some();
    if scene.pair.spec.x.len() == 1 && !grouped_model {
        keys.push(Key::new(Swatch::Line(fit_colour, 2.0), "least squares"));
    }
    if d.and_then(|d| d.extras.as_ref())
        .is_some_and(|e| e.bands().len() > 1)
    {
        let c = palette::fit(v);
        keys.push(Key::new(
            Swatch::Band(c.gamma_multiply(0.3)),
            "95 % band of the line",
        ));
        keys.push(Key::new(
            Swatch::Dashed(c.gamma_multiply(0.7)),
            "95 % band of a new reading",
        ));
    }
    if let Some(d) = d {
        overlay_keys(&mut keys, d, v);
        if d.kept.as_ref().is_some_and(|k| !k.curves.is_empty()) {
            keys.push(Key::new(Swatch::Dashed(palette::kept(v)), "kept fit"));
        }
        if mode == BenchMode::Calibration
            && d.calibration
                .as_ref()
                .is_some_and(|c| c.as_ref().is_ok_and(|c| !c.unknowns.is_empty()))
        {
            keys.push(Key::new(
                Swatch::Dot(palette::unknown(v)),
                "unknowns read back",
            ));
        }
    }
    keys
}

fn overlay_keys(
    keys: &mut Vec<Key>,
    d: &crate::state::diagnostics::Diagnostics,
    v: &egui::Visuals,
) {
    if let Some(e) = &d.extras {
        if let Some(Ok(RobustFit::TheilSen(_))) = &e.robust {
            keys.push(Key::new(Swatch::Dashed(palette::theil_sen(v)), "Theil–Sen"));
        }
        if let Some(Ok(_)) = &e.loess {
            keys.push(Key::new(Swatch::Line(palette::loess(v), 1.5), "LOESS"));
        }
    }
    if let Some(Ok(_)) = &d.deming {
        keys.push(Key::new(Swatch::Dotted(palette::deming(v)), "Deming"));
    }
}

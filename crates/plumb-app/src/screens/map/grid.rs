//! The grid of cells: coloured by the coefficient, with its value and the complete pairs
//! behind it when there is room, the marks of the map's notes, and the column names (cut short
//! with an ellipsis when long, the full name on hover). A grid too large for the panel scrolls.

use eframe::egui::{self, Color32, FontId, Pos2, Rect, Sense, Vec2};
use plumb_report::text::{aligned, count, num, p_clause};

use super::key::Mark;
use super::MapUi;
use crate::palette;
use crate::state::map::MapResult;

/// Below this many points a side, cells are painted as one image instead of one shape each
/// (a 1000-column map is a million cells).
const IMAGE_BELOW_PX: f32 = 4.0;
/// Below this many points a side, column names are left off (they would overlap).
const NAMES_FROM_PX: f32 = 8.0;
/// With up to this many columns a cell is never smaller than [`MIN_CELL`]: the grid scrolls.
const SCROLL_UP_TO: usize = 80;
/// Smallest cell of a scrolling grid: names stay readable.
const MIN_CELL: f32 = 18.0;
/// Largest cell.
const MAX_CELL: f32 = 76.0;
/// Widest name area; longer names are cut short.
const LABEL_MAX: f32 = 150.0;
/// The value is printed in cells from this size.
const VALUE_FROM_PX: f32 = 30.0;
/// The complete pairs are printed under the value from this size.
const COUNT_FROM_PX: f32 = 46.0;
/// Marks are drawn on cells from this size.
pub(super) const MARKS_FROM_PX: f32 = 9.0;

/// Where the cells are.
#[derive(Clone, Copy)]
struct Frame {
    origin: Pos2,
    cell: f32,
}

impl Frame {
    fn rect(&self, a: usize, b: usize) -> Rect {
        Rect::from_min_size(
            self.origin + Vec2::new(b as f32 * self.cell, a as f32 * self.cell),
            Vec2::splat(self.cell),
        )
    }
}

/// The cell size for `k` columns in `avail` with names `label_w` wide.
fn cell_size(k: usize, avail: Vec2, label_w: f32) -> f32 {
    let fit = ((avail.x - label_w).min(avail.y - label_w) / k as f32).min(MAX_CELL);
    if k <= SCROLL_UP_TO {
        fit.max(MIN_CELL)
    } else {
        fit.max(0.25)
    }
}

/// The grid; returns the clicked pair (row column, column column) and whether marks were drawn.
pub(super) fn grid_ui(
    ui: &mut egui::Ui,
    r: &MapResult,
    order: &[usize],
    own: &mut MapUi,
) -> (Option<(usize, usize)>, bool) {
    let k = order.len();
    let avail = ui.available_size() - Vec2::splat(14.0);
    let widest = |font: &FontId| {
        order
            .iter()
            .map(|&i| text_width(ui, &r.columns[i], font))
            .fold(0.0, f32::max)
    };
    let estimate = (widest(&FontId::proportional(12.0)) + 10.0).min(LABEL_MAX);
    let cell = cell_size(k, avail, estimate);
    let font = FontId::proportional((cell * 0.7).clamp(9.0, 12.5));
    let label_w = if cell >= NAMES_FROM_PX {
        (widest(&font) + 10.0).min(LABEL_MAX)
    } else {
        4.0
    };
    let marks = cell >= MARKS_FROM_PX;
    let clicked = egui::ScrollArea::both()
        .id_salt("map-grid")
        .auto_shrink([true, true])
        .show(ui, |ui| {
            let size = Vec2::splat(label_w + cell * k as f32);
            let (response, painter) = ui.allocate_painter(size, Sense::click());
            let frame = Frame {
                origin: response.rect.min + Vec2::splat(label_w),
                cell,
            };
            if cell >= NAMES_FROM_PX {
                names_ui(ui, &painter, r, order, frame, (&font, label_w));
            }
            if cell < IMAGE_BELOW_PX {
                let texture = grid_image(ui, r, order, own);
                painter.image(
                    texture.id(),
                    Rect::from_min_size(frame.origin, Vec2::splat(cell * k as f32)),
                    Rect::from_min_max(Pos2::ZERO, Pos2::new(1.0, 1.0)),
                    Color32::WHITE,
                );
            } else {
                cells(ui, &painter, r, order, frame, marks);
            }
            hover(ui, &painter, response, r, order, frame)
        })
        .inner;
    (clicked, marks)
}

/// The hovered cell outlined, with its numbers; the clicked pair off the diagonal.
fn hover(
    ui: &egui::Ui,
    painter: &egui::Painter,
    response: egui::Response,
    r: &MapResult,
    order: &[usize],
    frame: Frame,
) -> Option<(usize, usize)> {
    let pointer = response.hover_pos()?;
    let rel = pointer - frame.origin;
    if rel.x < 0.0 || rel.y < 0.0 {
        return None;
    }
    let (a, b) = ((rel.y / frame.cell) as usize, (rel.x / frame.cell) as usize);
    if a >= order.len() || b >= order.len() {
        return None;
    }
    let (i, j) = (order[a], order[b]);
    painter.rect_stroke(
        frame.rect(a, b),
        0.0,
        egui::Stroke::new(2.0, ui.visuals().strong_text_color()),
        egui::StrokeKind::Inside,
    );
    let clicked = response.clicked();
    response.on_hover_text_at_pointer(cell_text(r, i, j));
    (clicked && i != j).then_some((i, j))
}

/// Everything the map knows about cell (i, j), for its hover text.
pub(super) fn cell_text(r: &MapResult, i: usize, j: usize) -> String {
    let m = &r.matrix;
    let (a, b) = (&r.columns[i], &r.columns[j]);
    if i == j {
        return format!("{a}\n{} values", m.n[i][i]);
    }
    let mut s = format!("{a} and {b}\n");
    match m.r[i][j] {
        Some(v) => {
            s.push_str(&format!("{} = {}\n", r.key.method.as_str(), num(v)));
            s.push_str(&format!("n = {} complete pairs\n", count(m.n[i][j])));
            if let Some(pv) = m.p_value[i][j] {
                s.push_str(&format!("{}\n", p_clause(pv)));
            }
            if let Some(pa) = m.p_adjusted[i][j] {
                s.push_str(&format!(
                    "adjusted: {} (over {} pairs)\n",
                    p_clause(pa),
                    count(m.n_tests)
                ));
            }
            for (g, what) in [
                (&m.r_differenced, "r of first differences"),
                (&m.r_detrended, "r after removing the trend"),
            ] {
                if let Some(Some(d)) = g.as_ref().map(|g| g[i][j]) {
                    s.push_str(&format!("{what} = {}\n", num(d)));
                }
            }
            if let Some(c) = r.structure.cell(i, j) {
                s.push_str(&format!("distance correlation = {}\n", num(c.dcor)));
            }
        }
        None => {
            s.push_str(&format!("n = {} complete pairs\n", count(m.n[i][j])));
            s.push_str(m.reason[i][j].as_deref().unwrap_or("undefined"));
            s.push('\n');
        }
    }
    for note in r.notes(i, j) {
        s.push_str(&format!("\n{}: {}\n", note.label(), note.text(a, b)));
    }
    s.push_str("click to open this pair");
    s
}

fn text_width(ui: &egui::Ui, text: &str, font: &FontId) -> f32 {
    ui.painter()
        .layout_no_wrap(text.to_string(), font.clone(), Color32::WHITE)
        .size()
        .x
}

/// `name` cut short with an ellipsis to fit `max` points (whole when it fits).
fn fitted(ui: &egui::Ui, name: &str, font: &FontId, max: f32) -> String {
    if text_width(ui, name, font) <= max {
        return name.to_string();
    }
    let chars: Vec<char> = name.chars().collect();
    let (mut lo, mut hi) = (0, chars.len());
    while lo < hi {
        let mid = (lo + hi).div_ceil(2);
        let cut: String = chars[..mid].iter().collect::<String>() + "…";
        if text_width(ui, &cut, font) <= max {
            lo = mid;
        } else {
            hi = mid - 1;
        }
    }
    chars[..lo].iter().collect::<String>() + "…"
}

/// The column names along the left and (turned) along the top, each with its full name on
/// hover.
fn names_ui(
    ui: &egui::Ui,
    painter: &egui::Painter,
    r: &MapResult,
    order: &[usize],
    frame: Frame,
    (font, label_w): (&FontId, f32),
) {
    let ink = ui.visuals().text_color();
    let room = label_w - 8.0;
    for (a, &i) in order.iter().enumerate() {
        let name = &r.columns[i];
        let shown = fitted(ui, name, font, room);
        let along = (a as f32 + 0.5) * frame.cell;
        let left = Pos2::new(frame.origin.x - 4.0, frame.origin.y + along);
        painter.text(left, egui::Align2::RIGHT_CENTER, &shown, font.clone(), ink);
        let galley = painter.layout_no_wrap(shown, font.clone(), ink);
        let at = Pos2::new(
            frame.origin.x + along - galley.size().y / 2.0,
            frame.origin.y - 4.0,
        );
        painter.add(
            egui::epaint::TextShape::new(at, galley, ink).with_angle(-std::f32::consts::FRAC_PI_2),
        );
        let row_band = Rect::from_min_max(
            Pos2::new(
                frame.origin.x - label_w,
                frame.origin.y + a as f32 * frame.cell,
            ),
            Pos2::new(frame.origin.x, frame.origin.y + (a + 1) as f32 * frame.cell),
        );
        let column_band = Rect::from_min_max(
            Pos2::new(
                frame.origin.x + a as f32 * frame.cell,
                frame.origin.y - label_w,
            ),
            Pos2::new(frame.origin.x + (a + 1) as f32 * frame.cell, frame.origin.y),
        );
        for (band, side) in [(row_band, "row"), (column_band, "column")] {
            let id = ui.scope_id().with(("map-name", side, a));
            let tip = format!("{name}\n{} values", r.matrix.n[i][i]);
            ui.interact(band, id, Sense::hover()).on_hover_text(tip);
        }
    }
}

/// The fill of cell (i, j): neutral on the diagonal (it says nothing, so it must not read as
/// a hit), grey where undefined.
fn cell_fill(r: &MapResult, i: usize, j: usize, visuals: &egui::Visuals) -> Color32 {
    if i == j {
        visuals.faint_bg_color
    } else {
        r.matrix.r[i][j].map_or(palette::undefined_cell(visuals), |v| {
            palette::diverging(v, visuals)
        })
    }
}

/// The cells as shapes: the value and the complete pairs when there is room, and the marks.
fn cells(
    ui: &egui::Ui,
    painter: &egui::Painter,
    r: &MapResult,
    order: &[usize],
    frame: Frame,
    marks: bool,
) {
    let cell = frame.cell;
    let value_font = FontId::proportional((cell * 0.28).clamp(9.0, 14.0));
    let count_font = FontId::proportional((cell * 0.2).clamp(8.0, 10.5));
    for (a, &i) in order.iter().enumerate() {
        for (b, &j) in order.iter().enumerate() {
            let rect = frame.rect(a, b);
            let fill = cell_fill(r, i, j, ui.visuals());
            painter.rect_filled(rect.shrink(0.5), 0.0, fill);
            let ink = if i == j {
                ui.visuals().weak_text_color()
            } else {
                palette::ink_on(fill)
            };
            let counted = cell >= COUNT_FROM_PX;
            if cell >= VALUE_FROM_PX && i != j {
                let value = r.matrix.r[i][j].map_or_else(|| "—".to_string(), |v| aligned(v, 2));
                let at = rect.center()
                    - Vec2::new(0.0, if counted { cell * 0.04 } else { -cell * 0.08 });
                painter.text(
                    at,
                    egui::Align2::CENTER_CENTER,
                    value,
                    value_font.clone(),
                    ink,
                );
            }
            if counted {
                let at = rect.center() + Vec2::new(0.0, cell * if i == j { 0.0 } else { 0.24 });
                let text = format!("n {}", count(r.matrix.n[i][j]));
                painter.text(
                    at,
                    egui::Align2::CENTER_CENTER,
                    text,
                    count_font.clone(),
                    ink.gamma_multiply(0.85),
                );
            }
            if marks && i != j {
                for note in r.notes(i, j) {
                    Mark::of(&note).paint(painter, rect.shrink(0.5), ink);
                }
            }
        }
    }
}

/// The cells as one image, one pixel a cell, made once per map, order and theme.
fn grid_image(
    ui: &egui::Ui,
    r: &MapResult,
    order: &[usize],
    own: &mut MapUi,
) -> egui::TextureHandle {
    let key = (r.generation, own.by_similarity, ui.visuals().dark_mode);
    if let Some((k, t)) = &own.image {
        if *k == key {
            return t.clone();
        }
    }
    let k = order.len();
    let pixels = order
        .iter()
        .flat_map(|&i| order.iter().map(move |&j| (i, j)))
        .map(|(i, j)| cell_fill(r, i, j, ui.visuals()))
        .collect();
    let image = egui::ColorImage::new([k, k], pixels);
    let texture = ui
        .ctx()
        .load_texture("map-grid", image, egui::TextureOptions::NEAREST);
    own.image = Some((key, texture.clone()));
    texture
}

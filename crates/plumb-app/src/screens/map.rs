//! The co-movement map: a coefficient for every pair of numeric columns, drawn as a grid of
//! coloured cells, with the raw and adjusted p-values on hover, and the strongest pairs listed
//! beside it. A click opens the pair on the bench.

use eframe::egui::{self, Color32, Pos2, Rect, RichText, Sense, Vec2};
use plumb_core::association::{Adjustment, Method};
use plumb_report::text::{num, p};
use plumb_report::wording;

use crate::action::{Action, Actions};
use crate::palette;
use crate::state::map::{MapKey, MapResult};
use crate::state::pair::FitSpec;
use crate::state::{Screen, State};

/// Below this many points a side, cells are painted as one image instead of one shape each
/// (a 1000-column map is a million cells).
const IMAGE_BELOW_PX: f32 = 4.0;
/// Below this many points a side, column names are left off (they would overlap).
const NAMES_FROM_PX: f32 = 8.0;

/// What the screen keeps between frames.
pub struct MapUi {
    /// Order cells by similarity (else by file order).
    pub by_similarity: bool,
    /// The dense grid as an image, for (map generation, by similarity, dark).
    image: Option<((u64, bool, bool), egui::TextureHandle)>,
}

impl Default for MapUi {
    fn default() -> Self {
        Self {
            by_similarity: true,
            image: None,
        }
    }
}

/// Draws the screen.
pub fn map_ui(state: &State, own: &mut MapUi, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    let Some(loaded) = state.loaded() else {
        return out;
    };
    let numeric = &loaded.dataset.numeric;
    if numeric.len() < 2 {
        ui.label("The map needs at least two numeric columns.");
        return out;
    }
    if let Some(why) = crate::state::map::MapModel::refused(&loaded.dataset) {
        ui.label(format!(
            "No map: {why}. Open a pair from the columns screen, or load an extract with \
             fewer columns."
        ));
        return out;
    }
    let map = state.map();
    out.push_some(controls_ui(map.key(), own, numeric, ui));
    let Some(result) = map.result() else {
        ui.horizontal(|ui| {
            ui.spinner();
            ui.label("computing the map…");
        });
        return out;
    };
    if map.is_busy() {
        ui.horizontal(|ui| {
            ui.spinner();
            ui.weak("updating…");
        });
    }
    ui.label(testing_note(result));
    let order: Vec<usize> = if own.by_similarity {
        result.similarity.clone()
    } else {
        (0..result.columns.len()).collect()
    };
    let chosen = ui
        .horizontal_top(|ui| {
            let clicked = grid_ui(ui, result, &order, own);
            let listed = ui.vertical(|ui| strongest_ui(ui, result)).inner;
            clicked.or(listed)
        })
        .inner;
    ui.weak(format!(
        "{} Open a pair to look at it.",
        wording::line(&wording::MAP_CAUTIONS)
    ));
    if let Some((i, j)) = chosen {
        out.push(Action::OpenPair(FitSpec::line(
            &result.columns[i],
            &result.columns[j],
        )));
        out.push(Action::Show(Screen::Bench));
    }
    out
}

/// The coefficient, adjustment, grouping and row-order choices; a changed key is an action.
fn controls_ui(
    current: &MapKey,
    own: &mut MapUi,
    numeric: &[String],
    ui: &mut egui::Ui,
) -> Option<Action> {
    let mut key = current.clone();
    ui.horizontal_wrapped(|ui| {
        ui.label("Coefficient:");
        for (m, name, tip) in [
            (Method::Pearson, "Pearson r", "Linear association"),
            (Method::Spearman, "Spearman ρ", "Monotone association (ranks)"),
            (Method::Kendall, "Kendall τ-b", "Rank concordance, tie-corrected"),
        ] {
            ui.radio_value(&mut key.method, m, name).on_hover_text(tip);
        }
        ui.separator();
        ui.label("Adjust p for many pairs:");
        for (a, name, tip) in [
            (Adjustment::Holm, "Holm", "Holm's step-down: controls the chance of any false hit"),
            (Adjustment::BenjaminiHochberg, "Benjamini–Hochberg", "Controls the expected share of false hits"),
            (Adjustment::None, "none", "Raw p-values: with many pairs some will be small by chance"),
        ] {
            ui.radio_value(&mut key.adjust, a, name).on_hover_text(tip);
        }
        ui.separator();
        ui.checkbox(&mut own.by_similarity, "group similar columns")
            .on_hover_text("Order the columns so that those moving together sit together (average-linkage clustering on 1 − |r|); off: file order");
        ui.separator();
        ui.label("Row order:");
        egui::ComboBox::from_id_salt("order-column")
            .selected_text(key.order.clone().unwrap_or_else(|| "none".into()))
            .show_ui(ui, |ui| {
                ui.selectable_value(&mut key.order, None, "none");
                for c in numeric {
                    ui.selectable_value(&mut key.order, Some(c.clone()), c);
                }
            })
            .response
            .on_hover_text("A time or run-order column: each pair is also correlated on first differences and after removing a linear trend, to expose drifts shared by both columns");
    });
    (key != *current).then_some(Action::MapSettings(key))
}

fn testing_note(r: &MapResult) -> String {
    let how = match r.key.adjust {
        Adjustment::Holm => "p adjusted by Holm's step-down",
        Adjustment::BenjaminiHochberg => "p adjusted by Benjamini–Hochberg",
        Adjustment::None => "p NOT adjusted — expect chance hits",
    };
    format!(
        "{} pairs tested with {}; {how} over all {}.",
        r.matrix.n_tests,
        method_name(r.key.method),
        r.matrix.n_tests
    )
}

fn method_name(m: Method) -> &'static str {
    match m {
        Method::Pearson => "Pearson r",
        Method::Spearman => "Spearman ρ",
        Method::Kendall => "Kendall τ-b",
        Method::Distance => "distance correlation",
    }
}

fn cell_text(r: &MapResult, i: usize, j: usize) -> String {
    let m = &r.matrix;
    let mut s = format!("{} and {}\n", r.columns[i], r.columns[j]);
    match m.r[i][j] {
        Some(v) => {
            s.push_str(&format!(
                "{} = {}  (n = {})\n",
                r.key.method.as_str(),
                num(v),
                m.n[i][j]
            ));
            if let Some(pv) = m.p_value[i][j] {
                s.push_str(&format!("p = {}\n", p(pv)));
            }
            if let Some(pa) = m.p_adjusted[i][j] {
                s.push_str(&format!(
                    "adjusted p = {} (over {} pairs)\n",
                    p(pa),
                    m.n_tests
                ));
            }
            if let Some(Some(d)) = m.r_differenced.as_ref().map(|g| g[i][j]) {
                s.push_str(&format!("r of first differences = {}\n", num(d)));
            }
            if let Some(Some(d)) = m.r_detrended.as_ref().map(|g| g[i][j]) {
                s.push_str(&format!("r after removing the trend = {}\n", num(d)));
            }
        }
        None => s.push_str(m.reason[i][j].as_deref().unwrap_or("undefined")),
    }
    if i != j {
        s.push_str("click to open this pair");
    }
    s
}

/// The grid of cells; returns the clicked pair (row column, column column).
fn grid_ui(
    ui: &mut egui::Ui,
    r: &MapResult,
    order: &[usize],
    own: &mut MapUi,
) -> Option<(usize, usize)> {
    let k = order.len();
    let label_w = 120.0;
    let side = (ui.available_height() - label_w - 40.0)
        .min(ui.available_width() * 0.6 - label_w)
        .clamp(160.0, 900.0);
    let cell = side / k as f32;
    let (response, painter) =
        ui.allocate_painter(Vec2::new(label_w + side, label_w + side), Sense::click());
    let origin = response.rect.min + Vec2::new(label_w, label_w);
    let font = egui::FontId::proportional((cell * 0.32).clamp(8.0, 13.0));
    if cell >= NAMES_FROM_PX {
        names(
            &painter,
            r,
            order,
            (origin, cell),
            &font,
            ui.visuals().text_color(),
        );
    }
    if cell < IMAGE_BELOW_PX {
        let texture = grid_image(ui, r, order, own);
        painter.image(
            texture.id(),
            Rect::from_min_size(origin, Vec2::splat(side)),
            Rect::from_min_max(Pos2::ZERO, Pos2::new(1.0, 1.0)),
            Color32::WHITE,
        );
    } else {
        cells(ui, &painter, r, order, (origin, cell), &font);
    }
    let pointer = response.hover_pos()?;
    let rel = pointer - origin;
    if rel.x < 0.0 || rel.y < 0.0 {
        return None;
    }
    let (a, b) = ((rel.y / cell) as usize, (rel.x / cell) as usize);
    if a >= k || b >= k {
        return None;
    }
    let (i, j) = (order[a], order[b]);
    painter.rect_stroke(
        Rect::from_min_size(
            origin + Vec2::new(b as f32 * cell, a as f32 * cell),
            Vec2::splat(cell),
        ),
        0.0,
        egui::Stroke::new(2.0, ui.visuals().strong_text_color()),
        egui::StrokeKind::Inside,
    );
    let clicked = response.clicked();
    response.on_hover_text_at_pointer(cell_text(r, i, j));
    (clicked && i != j).then_some((i, j))
}

/// The column names along the left and (turned) along the top.
fn names(
    painter: &egui::Painter,
    r: &MapResult,
    order: &[usize],
    (origin, cell): (Pos2, f32),
    font: &egui::FontId,
    ink: Color32,
) {
    for (a, &i) in order.iter().enumerate() {
        let name = &r.columns[i];
        painter.text(
            Pos2::new(origin.x - 4.0, origin.y + (a as f32 + 0.5) * cell),
            egui::Align2::RIGHT_CENTER,
            name,
            font.clone(),
            ink,
        );
        let galley = painter.layout_no_wrap(name.clone(), font.clone(), ink);
        let at = Pos2::new(
            origin.x + (a as f32 + 0.5) * cell - galley.size().y / 2.0,
            origin.y - 4.0,
        );
        painter.add(
            egui::epaint::TextShape::new(at, galley, ink).with_angle(-std::f32::consts::FRAC_PI_2),
        );
    }
}

/// The fill of cell (i, j): neutral on the diagonal (it says nothing, so it must not read as
/// a hit), grey where undefined.
fn cell_fill(r: &MapResult, i: usize, j: usize, visuals: &egui::Visuals) -> Color32 {
    if i == j {
        visuals.faint_bg_color
    } else {
        r.matrix.r[i][j].map_or(Color32::GRAY, palette::diverging)
    }
}

/// The cells as shapes, with their values when there is room.
fn cells(
    ui: &egui::Ui,
    painter: &egui::Painter,
    r: &MapResult,
    order: &[usize],
    (origin, cell): (Pos2, f32),
    font: &egui::FontId,
) {
    for (a, &i) in order.iter().enumerate() {
        for (b, &j) in order.iter().enumerate() {
            let rect = Rect::from_min_size(
                origin + Vec2::new(b as f32 * cell, a as f32 * cell),
                Vec2::splat(cell),
            );
            let fill = cell_fill(r, i, j, ui.visuals());
            painter.rect_filled(rect.shrink(0.5), 0.0, fill);
            let value = r.matrix.r[i][j].filter(|_| i != j && cell >= 26.0);
            if let Some(v) = value {
                painter.text(
                    rect.center(),
                    egui::Align2::CENTER_CENTER,
                    format!("{v:.2}"),
                    font.clone(),
                    palette::ink_on(fill),
                );
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

/// The strongest pairs as buttons (readable by screen readers and tests too).
fn strongest_ui(ui: &mut egui::Ui, r: &MapResult) -> Option<(usize, usize)> {
    let m = &r.matrix;
    let k = r.columns.len();
    let mut pairs: Vec<(usize, usize, f64)> = (0..k)
        .flat_map(|i| (i + 1..k).map(move |j| (i, j)))
        .filter_map(|(i, j)| m.r[i][j].map(|v| (i, j, v)))
        .collect();
    pairs.sort_by(|a, b| b.2.abs().total_cmp(&a.2.abs()));
    ui.label(RichText::new("Strongest pairs").strong());
    let mut chosen = None;
    egui::Grid::new("strongest").striped(true).show(ui, |ui| {
        for h in ["pair", "coefficient", "adjusted p", ""] {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for &(i, j, v) in pairs.iter().take(12) {
            let label = format!("{} and {}", r.columns[i], r.columns[j]);
            if ui.button(&label).on_hover_text(cell_text(r, i, j)).clicked() {
                chosen = Some((i, j));
            }
            ui.label(num(v));
            ui.label(m.p_adjusted[i][j].or(m.p_value[i][j]).map_or("—".into(), p));
            let shared = m
                .r_differenced
                .as_ref()
                .and_then(|g| g[i][j])
                .is_some_and(|d| d.abs() < 0.5 * v.abs());
            if shared {
                ui.colored_label(ui.visuals().warn_fg_color, "shared trend?")
                    .on_hover_text("The first differences move together much less than the levels: both columns may simply drift with the row order");
            } else {
                ui.label("");
            }
            ui.end_row();
        }
    });
    chosen
}

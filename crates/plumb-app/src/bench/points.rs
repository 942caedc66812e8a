//! The point layer every view of the bench shares: included rows as markers (or a density
//! image when there are many), excluded rows as hollow rings, the focus ring; finding the row
//! under the pointer; its tooltip; and what a click on it asks for.

use std::collections::HashSet;

use eframe::egui::{self, Color32};
use egui_plot::{PlotTransform, PlotUi, Points};
use plumb_report::text::num;

use super::pointer::{Pointer, PointerMode};
use super::Scene;
use crate::action::Action;
use crate::density::DensityTextures;
use crate::palette;
use crate::state::cloud::Cloud;
use crate::state::marks::Marks;
use crate::state::pair::PairRows;

/// Hover radius in points (screen units).
pub const HOVER_RADIUS: f64 = 7.0;

/// The pair's marked rows at their current positions: excluded rows (hollow rings), moved
/// rows still included (drawn on top, whatever the density), and the entries of both, which
/// the base cloud of file positions must not draw.
#[derive(Debug, Clone, Default)]
pub struct Marked {
    /// Excluded rows.
    pub excluded: Cloud,
    /// Moved rows that are still in the fit.
    pub moved: Cloud,
    /// Entries of both.
    pub skip: HashSet<usize>,
}

impl Marked {
    /// The marked rows of `pair` under `marks`.
    pub fn of(pair: &PairRows, marks: &Marks) -> Self {
        let out: Vec<usize> = marks
            .excluded
            .keys()
            .filter_map(|&r| pair.index_of(r))
            .collect();
        let moved: Vec<usize> = marks
            .moved
            .keys()
            .filter_map(|&r| pair.index_of(r))
            .filter(|e| !out.contains(e))
            .collect();
        let cloud = |es: &[usize]| {
            Cloud::new(
                es.iter().map(|&e| pair.point(e, marks)).collect(),
                es.to_vec(),
            )
        };
        Self {
            excluded: cloud(&out),
            moved: cloud(&moved),
            skip: out.iter().chain(&moved).copied().collect(),
        }
    }
}

/// What one view draws as points.
pub struct Layer<'a> {
    /// Which view (keys its density image).
    pub view: &'static str,
    /// Included rows.
    pub cloud: &'a Cloud,
    /// Group level of each entry and the levels' names, if the points are coloured.
    pub groups: Option<(&'a [Option<usize>], &'a [String])>,
    /// Excluded rows (hollow rings).
    pub excluded: &'a Cloud,
    /// Entries of `cloud` not to draw (drawn elsewhere: excluded or moved).
    pub skip: &'a HashSet<usize>,
    /// Rows drawn as markers on top whatever the density (moved, included).
    pub extra: &'a Cloud,
    /// The hovered or selected row.
    pub focus: Option<(f64, f64)>,
    /// Changes whenever the points do (keys the density image).
    pub generation: u64,
}

impl Layer<'_> {
    /// The entries drawn as markers, at their positions (all but the skipped ones, then the
    /// extra ones); empty when the view draws a density image instead.
    pub fn markers(&self) -> Vec<(usize, (f64, f64))> {
        if self.cloud.is_dense() {
            return self
                .extra
                .entries
                .iter()
                .copied()
                .zip(self.extra.points.iter().copied())
                .collect();
        }
        self.cloud
            .entries
            .iter()
            .zip(&self.cloud.points)
            .filter(|(e, _)| !self.skip.contains(e))
            .chain(self.extra.entries.iter().zip(&self.extra.points))
            .map(|(&e, &p)| (e, p))
            .collect()
    }
}

/// Draws the layer's rows as markers (or a density image when there are many), the excluded
/// rows as hollow rings, and the focus ring.
pub fn points_layer(
    pu: &mut PlotUi<'_>,
    layer: &Layer<'_>,
    textures: &mut DensityTextures,
    visuals: &egui::Visuals,
) {
    let markers = layer.markers();
    if layer.cloud.is_dense() {
        let skipped = layer
            .skip
            .iter()
            .filter_map(|&e| layer.cloud.position_of(e));
        textures.draw(
            pu,
            layer.view,
            &layer.cloud.points,
            skipped,
            layer.generation,
            visuals,
        );
    }
    match layer.groups {
        Some((level_of, names)) if !layer.cloud.is_dense() => {
            grouped_markers(pu, &markers, level_of, names);
        }
        _ => {
            let pts: Vec<[f64; 2]> = markers.iter().map(|(_, (x, y))| [*x, *y]).collect();
            // Unnamed: plain points need no legend entry (the legend keeps to lines and keys).
            let alpha = palette::marker_alpha(layer.cloud.points.len());
            pu.points(
                Points::new("", pts)
                    .color(palette::point(visuals).gamma_multiply(alpha))
                    .radius(2.5)
                    .filled(true)
                    .allow_hover(false),
            );
        }
    }
    rings(pu, layer, visuals);
}

fn grouped_markers(
    pu: &mut PlotUi<'_>,
    markers: &[(usize, (f64, f64))],
    level_of: &[Option<usize>],
    names: &[String],
) {
    let mut by_level: std::collections::BTreeMap<Option<usize>, Vec<[f64; 2]>> = Default::default();
    for &(e, (x, y)) in markers {
        by_level.entry(level_of[e]).or_default().push([x, y]);
    }
    for (level, pts) in by_level {
        let (colour, name) = match level {
            Some(l) => (palette::group(l), names.get(l).cloned().unwrap_or_default()),
            None => (Color32::GRAY, "(no group)".to_string()),
        };
        pu.points(
            Points::new(name, pts)
                .color(colour)
                .radius(3.0)
                .filled(true)
                .allow_hover(false),
        );
    }
}

fn rings(pu: &mut PlotUi<'_>, layer: &Layer<'_>, visuals: &egui::Visuals) {
    if !layer.excluded.points.is_empty() {
        let pts: Vec<[f64; 2]> = layer.excluded.points.iter().map(|&(x, y)| [x, y]).collect();
        pu.points(
            Points::new("excluded", pts)
                .color(palette::excluded(visuals))
                .radius(4.5)
                .filled(false)
                .allow_hover(false),
        );
    }
    if let Some((x, y)) = layer.focus {
        pu.points(
            Points::new("", vec![[x, y]])
                .color(palette::focus(visuals))
                .radius(7.0)
                .filled(false)
                .allow_hover(false),
        );
    }
}

/// What a view showed and where the pointer was.
pub struct Shown {
    /// The view's transform from data to screen.
    pub transform: PlotTransform,
    /// The view's response (hover, clicks, drags).
    pub response: egui::Response,
    /// The pair entry under the pointer.
    pub hovered: Option<usize>,
}

/// The hover radius in data units along each axis.
pub fn radius(transform: &PlotTransform) -> (f64, f64) {
    (
        HOVER_RADIUS / transform.dpos_dvalue_x().abs(),
        HOVER_RADIUS / transform.dpos_dvalue_y().abs(),
    )
}

/// The entry under the pointer, searching `clouds` in order.
pub fn hovered_entry(
    response: &egui::Response,
    transform: &PlotTransform,
    clouds: &[&Cloud],
) -> Option<usize> {
    let pos = response.hover_pos()?;
    let v = transform.value_from_position(pos);
    let (rx, ry) = radius(transform);
    clouds.iter().find_map(|c| c.nearest(v.x, v.y, rx, ry))
}

/// The scatter entry (at its current position) within the hover radius of screen point `pos`.
pub fn nearest_at(
    transform: &PlotTransform,
    pos: egui::Pos2,
    pair: &PairRows,
    marks: &Marks,
) -> Option<usize> {
    let v = transform.value_from_position(pos);
    let (rx, ry) = radius(transform);
    (0..pair.rows.len())
        .map(|i| {
            let (x, y) = pair.point(i, marks);
            (i, ((x - v.x) / rx).powi(2) + ((y - v.y) / ry).powi(2))
        })
        .filter(|&(_, d)| d <= 1.0)
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(i, _)| i)
}

/// A view's title, with what it shows on hover.
pub fn title_ui(ui: &mut egui::Ui, text: &str, tip: &str) {
    ui.label(egui::RichText::new(text).strong())
        .on_hover_text(tip);
}

/// What a click on pair entry `e` asks for: put it back if it is out, else leave it out.
pub fn toggle(scene: &Scene<'_>, e: usize) -> Action {
    let row = scene.pair.rows[e];
    if scene.marks.excluded.contains_key(&row) {
        Action::PutBack(vec![row])
    } else {
        Action::Exclude {
            rows: vec![row],
            reason: None,
        }
    }
}

/// Row number and values of the hovered row; records the hover for the other views.
pub fn tooltip_ui(scene: &Scene<'_>, pointer: &mut Pointer, shown: &Shown) {
    let Some(e) = shown.hovered else { return };
    pointer.hovered_next = Some(e);
    let text = tooltip_text(scene, pointer.mode, e);
    shown.response.clone().on_hover_text_at_pointer(text);
}

/// The tooltip of pair entry `e`: its row, values, diagnostics and what a click does.
pub fn tooltip_text(scene: &Scene<'_>, mode: PointerMode, e: usize) -> String {
    let (pair, marks) = (scene.pair, scene.marks);
    let row = pair.rows[e];
    let (x, y) = pair.point(e, marks);
    let mut text = format!(
        "{}\n{} = {}\n{} = {}",
        scene.names.label(row),
        pair.spec.x0(),
        num(x),
        pair.spec.y,
        num(y)
    );
    if marks.moved.contains_key(&row) {
        text.push_str(&format!(
            "\n(moved, what-if; file has {}, {})",
            num(pair.x[e]),
            num(pair.y[e])
        ));
    }
    if let Some(note) = marks.excluded.get(&row) {
        text.push_str(&format!("\nEXCLUDED: {}", note.reason));
    }
    if let Some(d) = scene.bench.diagnostics() {
        if let Some(c) = d
            .included
            .binary_search(&e)
            .ok()
            .and_then(|k| d.cases.get(k))
        {
            // The fitted value from the fit's coefficients, on the model's scale as the
            // residual is.
            let fitted = d
                .fit
                .as_ref()
                .ok()
                .and_then(|f| crate::state::views::against_fit(pair, marks, f, e))
                .map_or(f64::NAN, |(yhat, _)| yhat);
            text.push_str(&format!(
                "\nfitted {}  residual {}\nleverage {}  Cook's D {}\nstudentized {}",
                num(fitted),
                num(c.residual),
                num(c.leverage),
                num(c.cooks_distance),
                num(c.studentized_external)
            ));
        }
    }
    text.push_str(match mode {
        PointerMode::Exclude if marks.excluded.contains_key(&row) => "\nclick: put back",
        PointerMode::Exclude => "\nclick: exclude",
        PointerMode::Move => "\ndrag: move y (what-if; Shift: x too)",
        PointerMode::Lasso => "",
    });
    text
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::state::cloud::DENSITY_FROM;
    use crate::state::marks::Note;
    use crate::state::pair::{FitSpec, Pair};

    fn pair(n: usize) -> (tempfile::TempDir, Pair) {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("d.csv");
        let text: String = std::iter::once("x,y\n".to_string())
            .chain((0..n).map(|i| format!("{i},{}\n", (i * 37 % 101) as f64 * 0.1 + i as f64)))
            .collect();
        std::fs::write(&path, text).expect("write");
        let t = plumb_data::load(&path, &Default::default()).expect("load");
        (dir, Pair::new(&t, FitSpec::line("y", "x")).expect("pair"))
    }

    fn test_layer<'a>(pair: &'a Pair, marked: &'a Marked) -> Layer<'a> {
        Layer {
            view: "test",
            cloud: &pair.points,
            groups: None,
            excluded: &marked.excluded,
            skip: &marked.skip,
            extra: &marked.moved,
            focus: None,
            generation: 0,
        }
    }

    fn marks() -> Marks {
        let mut m = Marks::default();
        m.excluded.insert(
            3,
            Note {
                reason: "r".into(),
                at: String::new(),
            },
        );
        m.moved.insert(5, (100.0, -7.0));
        m.moved.insert(3, (50.0, 50.0));
        m
    }

    #[test]
    fn excluded_rows_are_rings_moved_rows_are_drawn_where_they_were_moved() {
        let (_dir, pair) = pair(12);
        let m = marks();
        let marked = Marked::of(&pair, &m);
        assert_eq!(*marked.excluded.entries, [2], "data row 3 is entry 2");
        assert_eq!(
            marked.excluded.points,
            vec![(50.0, 50.0)],
            "at its moved place"
        );
        assert_eq!(*marked.moved.entries, [4], "row 5 moved and still in");
        let layer = test_layer(&pair, &marked);
        let drawn = layer.markers();
        assert_eq!(drawn.len(), 11, "12 rows, one excluded");
        assert!(drawn.iter().all(|(e, _)| *e != 2));
        assert_eq!(
            drawn.iter().filter(|(e, _)| *e == 4).count(),
            1,
            "drawn once"
        );
        assert!(drawn.contains(&(4, (100.0, -7.0))));
    }

    #[test]
    fn a_dense_view_draws_only_the_moved_rows_as_markers() {
        let (_dir, pair) = pair(DENSITY_FROM + 10);
        assert!(pair.points.is_dense());
        let m = marks();
        let marked = Marked::of(&pair, &m);
        let layer = test_layer(&pair, &marked);
        assert_eq!(layer.markers(), vec![(4, (100.0, -7.0))]);
        let b = pair.points.bounds.expect("bounds");
        assert_eq!((b.x_min, b.x_max), (0.0, (DENSITY_FROM + 9) as f64));
    }
}

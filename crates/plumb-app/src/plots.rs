//! The four linked views of a pair: scatter with the fit, residuals against fitted values,
//! leverage against studentized residuals (with Cook's distance contours), and the normal
//! quantiles of the residuals. The row under the pointer in any view is ringed in all of them.

use eframe::egui::{self, Color32, Vec2};
use egui_plot::{
    FilledArea, Line, LineStyle, Plot, PlotImage, PlotPoint, PlotPoints, PlotTransform, PlotUi,
    Points,
};
use plumb_data::analysis::RobustFit;
use plumb_report::text::num;

use crate::app::Workbench;
use crate::bench::PointerMode;
use crate::cloud::Cloud;
use crate::density::{bin, Bounds};
use crate::palette;

/// Hover radius in points (screen units).
const HOVER_RADIUS: f64 = 7.0;
/// Cells across a density image (its height follows the view's aspect).
const DENSITY_CELLS: usize = 512;

/// A density image cached until the view's bounds or data change.
pub struct DensityTexture {
    key: (u64, [u64; 4]),
    texture: egui::TextureHandle,
}

/// What a view showed and where the pointer was.
struct Shown {
    transform: PlotTransform,
    response: egui::Response,
    hovered: Option<usize>,
}

/// Draws the 2×2 grid of views.
pub fn show(wb: &mut Workbench, ui: &mut egui::Ui) {
    // The scatter gets the larger share: it is where points are picked.
    let avail = ui.available_size();
    let (w, h) = ((avail.x - 12.0).max(320.0), (avail.y - 52.0).max(280.0));
    let top = h * 0.56;
    ui.horizontal(|ui| {
        ui.vertical(|ui| scatter(wb, ui, Vec2::new(w * 0.58, top)));
        ui.vertical(|ui| residuals(wb, ui, Vec2::new(w * 0.42, top)));
    });
    let bottom = Vec2::new(w / 2.0, h - top);
    ui.horizontal(|ui| {
        ui.vertical(|ui| leverage(wb, ui, bottom));
        ui.vertical(|ui| quantiles(wb, ui, bottom));
    });
}

/// A view's plot. Its memory (zoom, pan) is keyed by the pair, so a new pair starts fitted to
/// its own data. A dense view starts at its data's extent: its density image would otherwise
/// feed back into the automatic bounds.
fn plot(
    id: (&'static str, u64),
    size: Vec2,
    labels: (&str, &str),
    pan: bool,
    dense_bounds: Option<Bounds>,
) -> Plot<'static> {
    let (x_label, y_label) = labels;
    let mut p = Plot::new(id);
    if let Some(b) = dense_bounds {
        let (mx, my) = ((b.x_max - b.x_min) * 0.04, (b.y_max - b.y_min) * 0.04);
        p = p
            .default_x_bounds(b.x_min - mx, b.x_max + mx)
            .default_y_bounds(b.y_min - my, b.y_max + my);
    }
    p.width(size.x)
        .height(size.y)
        .x_axis_label(x_label.to_string())
        .y_axis_label(y_label.to_string())
        .show_x(false)
        .show_y(false)
        .allow_drag(pan)
        .allow_double_click_reset(true)
}

/// What one view draws as points.
struct Layer<'a> {
    /// Included rows.
    cloud: &'a Cloud,
    /// Group level of each entry and the levels' names, if the points are coloured.
    groups: Option<(&'a [Option<usize>], &'a [String])>,
    /// Excluded rows (hollow rings).
    excluded: &'a Cloud,
    /// Entries of `cloud` not to draw (drawn elsewhere: excluded or moved).
    skip: &'a std::collections::HashSet<usize>,
    /// Rows drawn as markers on top whatever the density (moved, included).
    extra: &'a Cloud,
    /// The hovered or selected row.
    focus: Option<(f64, f64)>,
    /// Changes whenever the points do (keys the density image).
    generation: u64,
}

/// Draws the layer's rows as markers (or a density image when there are many), the excluded
/// rows as hollow rings, and the focus ring.
fn points_layer(
    pu: &mut PlotUi<'_>,
    layer: &Layer<'_>,
    visuals: &egui::Visuals,
    density: &mut Option<DensityTexture>,
) {
    let Layer {
        cloud,
        groups,
        excluded,
        skip,
        extra,
        focus,
        generation,
    } = *layer;
    let shown = || {
        cloud
            .points
            .iter()
            .zip(&cloud.entries)
            .filter(|(_, e)| !skip.contains(e))
            .chain(extra.points.iter().zip(&extra.entries))
    };
    if cloud.is_dense() {
        density_image(pu, cloud, skip, density, generation, visuals);
        let pts: Vec<[f64; 2]> = extra.points.iter().map(|&(x, y)| [x, y]).collect();
        pu.points(
            Points::new("moved", pts)
                .color(palette::point(visuals))
                .radius(3.0)
                .filled(true)
                .allow_hover(false),
        );
    } else if let Some((level_of, names)) = groups {
        let mut by_level: std::collections::BTreeMap<Option<usize>, Vec<[f64; 2]>> =
            Default::default();
        for (&(x, y), &e) in shown() {
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
    } else {
        let pts: Vec<[f64; 2]> = shown().map(|(&(x, y), _)| [x, y]).collect();
        pu.points(
            Points::new("rows", pts)
                .color(palette::point(visuals))
                .radius(2.5)
                .filled(true)
                .allow_hover(false),
        );
    }
    if !excluded.points.is_empty() {
        let pts: Vec<[f64; 2]> = excluded.points.iter().map(|&(x, y)| [x, y]).collect();
        pu.points(
            Points::new("excluded", pts)
                .color(palette::excluded(visuals))
                .radius(4.5)
                .filled(false)
                .allow_hover(false),
        );
    }
    if let Some((x, y)) = focus {
        pu.points(
            Points::new("", vec![[x, y]])
                .color(palette::focus(visuals))
                .radius(7.0)
                .filled(false)
                .allow_hover(false),
        );
    }
}

fn density_image(
    pu: &mut PlotUi<'_>,
    cloud: &Cloud,
    skip: &std::collections::HashSet<usize>,
    slot: &mut Option<DensityTexture>,
    generation: u64,
    visuals: &egui::Visuals,
) {
    let b = pu.plot_bounds();
    let bounds = Bounds {
        x_min: b.min()[0],
        x_max: b.max()[0],
        y_min: b.min()[1],
        y_max: b.max()[1],
    };
    let key = (
        generation,
        [
            bounds.x_min.to_bits(),
            bounds.x_max.to_bits(),
            bounds.y_min.to_bits(),
            bounds.y_max.to_bits(),
        ],
    );
    if slot.as_ref().is_none_or(|t| t.key != key) {
        let frame = pu.transform().frame();
        let aspect = (frame.height() / frame.width().max(1.0)).clamp(0.1, 10.0);
        let h = ((DENSITY_CELLS as f32 * aspect) as usize).max(16);
        let mut d = bin(cloud.points.iter().copied(), bounds, DENSITY_CELLS, h);
        if !skip.is_empty() {
            // Skipped entries are positions in the cloud (the scatter's base cloud lists every
            // entry in order); they are few, so they are taken out rather than filtered.
            d.remove(skip.iter().filter_map(|&e| cloud.points.get(e).copied()));
        }
        let scale = (f64::from(d.max.max(1))).ln_1p();
        let pixels: Vec<Color32> = d
            .counts
            .iter()
            .map(|&c| palette::density((f64::from(c).ln_1p() / scale) as f32, visuals))
            .collect();
        let image = egui::ColorImage::new([d.width, d.height], pixels);
        let texture = pu
            .ctx()
            .load_texture("density", image, egui::TextureOptions::NEAREST);
        *slot = Some(DensityTexture { key, texture });
    }
    if let Some(t) = slot {
        pu.image(PlotImage::new(
            "density",
            t.texture.id(),
            PlotPoint::new(
                (bounds.x_min + bounds.x_max) / 2.0,
                (bounds.y_min + bounds.y_max) / 2.0,
            ),
            Vec2::new(
                (bounds.x_max - bounds.x_min) as f32,
                (bounds.y_max - bounds.y_min) as f32,
            ),
        ));
    }
}

/// Excluded rows and moved (included) rows at their current positions, and the set of both.
fn marked_clouds(
    pair: &crate::pair::PairRows,
    marks: &crate::marks::Marks,
) -> (Cloud, Cloud, std::collections::HashSet<usize>) {
    let entries = |rows: &mut dyn Iterator<Item = usize>| -> Vec<usize> {
        rows.filter_map(|r| pair.index_of(r)).collect()
    };
    let out = entries(&mut marks.excluded.keys().copied());
    let moved: Vec<usize> = entries(&mut marks.moved.keys().copied())
        .into_iter()
        .filter(|e| !out.contains(e))
        .collect();
    let cloud = |es: &[usize]| {
        Cloud::new(
            es.iter().map(|&e| pair.point(e, marks)).collect(),
            es.to_vec(),
        )
    };
    let skip = out.iter().chain(&moved).copied().collect();
    (cloud(&out), cloud(&moved), skip)
}

/// The hover radius in data units along each axis.
fn radius(transform: &PlotTransform) -> (f64, f64) {
    (
        HOVER_RADIUS / transform.dpos_dvalue_x().abs(),
        HOVER_RADIUS / transform.dpos_dvalue_y().abs(),
    )
}

/// The entry under the pointer, searching `clouds` in order.
fn hovered_entry(
    shown: &egui::Response,
    transform: &PlotTransform,
    clouds: &[&Cloud],
) -> Option<usize> {
    let pos = shown.hover_pos()?;
    let v = transform.value_from_position(pos);
    let (rx, ry) = radius(transform);
    clouds.iter().find_map(|c| c.nearest(v.x, v.y, rx, ry))
}

fn title(ui: &mut egui::Ui, text: &str, tip: &str) {
    ui.label(egui::RichText::new(text).strong())
        .on_hover_text(tip);
}

fn scatter(wb: &mut Workbench, ui: &mut egui::Ui, size: Vec2) {
    let Some(pair) = wb.bench.pair().map(crate::pair::Pair::rows) else {
        return;
    };
    let marks = wb.marks().clone();
    title(ui, &format!("{} against {}", pair.spec.y, pair.spec.x), "The rows with the fitted line or curve, its confidence band (shaded) and prediction band (dashed). Hollow rings are excluded rows.");
    let visuals = ui.visuals().clone();
    // The base cloud holds every row at its file position (indexed once per pair); excluded
    // and moved rows are few, so they are drawn from small clouds of their own.
    let (excluded, moved, skip) = marked_clouds(&pair, &marks);
    let included = &wb.bench.scatter;
    let focus_entry = wb.bench.hovered.or(wb.bench.selected);
    let focus = focus_entry.map(|e| pair.point(e, &marks));
    let groups = wb.bench.groups.clone();

    let summary = wb.bench.summary().and_then(Result::ok);
    let diag = wb.bench.diagnostics().cloned();
    let (x_lo, x_hi) = included.bounds.map_or((0.0, 0.0), |b| (b.x_min, b.x_max));
    let mut slot = wb.bench.textures.remove("scatter");
    let generation = wb.bench.marks_generation;
    let pointer = wb.bench.pointer;
    let lasso = wb.bench.lasso.clone();
    let levels = wb.bench.levels.clone();
    let resp = plot(
        ("scatter", wb.bench.serial),
        size,
        (&pair.spec.x, &pair.spec.y),
        pointer == PointerMode::Exclude,
        included.is_dense().then_some(included.bounds).flatten(),
    )
    .legend(egui_plot::Legend::default().position(egui_plot::Corner::RightTop))
    .show(ui, |pu| {
        if let Some(d) = &diag {
            bands(pu, d, &visuals);
            overlays(pu, d, &visuals, x_lo, x_hi, &levels);
        }

        let layer = Layer {
            cloud: included,
            groups: groups.as_deref().map(|g| (g, levels.as_slice())),
            excluded: &excluded,
            skip: &skip,
            extra: &moved,
            focus,
            generation,
        };
        points_layer(pu, &layer, &visuals, &mut slot);
        if let Some(s) = &summary {
            if x_hi > x_lo {
                let spec = pair.spec.clone();
                let curve: PlotPoints = (0..=120)
                    .map(|k| {
                        let x = x_lo + (x_hi - x_lo) * f64::from(k) / 120.0;
                        let first = i32::from(!spec.intercept);
                        let y: f64 = s
                            .estimates
                            .iter()
                            .enumerate()
                            .map(|(j, b)| b * x.powi(j as i32 + first))
                            .sum();
                        [x, y]
                    })
                    .collect();
                pu.line(
                    Line::new("least squares", curve)
                        .color(palette::fit(&visuals))
                        .width(2.0)
                        .allow_hover(false),
                );
            }
        }
        if lasso.len() > 1 {
            pu.line(
                Line::new("", PlotPoints::from(lasso.clone()))
                    .color(palette::focus(&visuals))
                    .style(LineStyle::dashed_dense())
                    .allow_hover(false),
            );
        }
        *pu.transform()
    });
    if let Some(s) = slot {
        wb.bench.textures.insert("scatter", s);
    }
    let hovered =
        hovered_entry(&resp.response, &resp.transform, &[&excluded, &moved]).or_else(|| {
            let pos = resp.response.hover_pos()?;
            let v = resp.transform.value_from_position(pos);
            included.nearest_except(v.x, v.y, radius(&resp.transform), &skip)
        });
    let shown = Shown {
        hovered,
        transform: resp.inner,
        response: resp.response,
    };
    wb.bench.scatter_transform = Some(shown.transform);
    scatter_interaction(wb, &shown, &pair, &marks);
    tooltip(wb, &shown);
}

fn scatter_interaction(
    wb: &mut Workbench,
    shown: &Shown,
    pair: &crate::pair::PairRows,
    marks: &crate::marks::Marks,
) {
    let r = &shown.response;
    let value_at = |pos: egui::Pos2| shown.transform.value_from_position(pos);
    match wb.bench.pointer {
        PointerMode::Exclude => {
            if r.clicked() {
                if let Some(e) = shown.hovered {
                    wb.toggle_entry(e);
                }
            }
        }
        PointerMode::Move => {
            if r.drag_started() {
                let origin = r.ctx.input(|i| i.pointer.press_origin());
                wb.bench.drag = origin
                    .and_then(|o| nearest_at(&shown.transform, o, wb))
                    .or(shown.hovered);
            }
            if let (Some(e), Some(pos)) = (wb.bench.drag, r.interact_pointer_pos()) {
                if r.dragged() {
                    let v = value_at(pos);
                    let mut m = marks.clone();
                    m.moved.insert(pair.rows[e], (v.x, v.y));
                    wb.set_marks(m, false);
                }
            }
            // The button's release ends the drag wherever the pointer is (it may have left the
            // view, or the release may come with the pointer leaving the window).
            let released = r.drag_stopped() || !r.ctx.input(|i| i.pointer.primary_down());
            if released {
                if let Some(e) = wb.bench.drag.take() {
                    // The whole drag becomes one undo step.
                    let m = wb.marks().clone();
                    if let Some(&(x, y)) = m.moved.get(&pair.rows[e]) {
                        wb.say(format!(
                            "row {} moved to ({}, {}): hypothetical",
                            pair.rows[e],
                            num(x),
                            num(y)
                        ));
                    }
                    wb.set_marks(m, true);
                }
            }
        }
        PointerMode::Lasso => {
            if let Some(pos) = r.interact_pointer_pos() {
                if r.drag_started() {
                    wb.bench.lasso.clear();
                }
                if r.dragged() {
                    let v = value_at(pos);
                    wb.bench.lasso.push([v.x, v.y]);
                }
            }
            if r.drag_stopped() {
                let ring = std::mem::take(&mut wb.bench.lasso);
                let rows: Vec<usize> = (0..pair.rows.len())
                    .filter(|&i| !pair.is_excluded(i, marks))
                    .filter(|&i| {
                        let (x, y) = pair.point(i, marks);
                        ring.len() > 2 && crate::density::inside(&ring, x, y)
                    })
                    .map(|i| pair.rows[i])
                    .collect();
                if !rows.is_empty() {
                    wb.exclude_rows(&rows);
                }
            }
        }
    }
}

/// The scatter entry (at its current position) within the hover radius of screen point `pos`.
pub(crate) fn nearest_at(
    transform: &PlotTransform,
    pos: egui::Pos2,
    wb: &Workbench,
) -> Option<usize> {
    let v = transform.value_from_position(pos);
    let rx = HOVER_RADIUS / transform.dpos_dvalue_x().abs();
    let ry = HOVER_RADIUS / transform.dpos_dvalue_y().abs();
    let pair = wb.bench.pair()?;
    let marks = wb.marks();
    (0..pair.rows.len())
        .map(|i| {
            let (x, y) = pair.point(i, marks);
            (i, ((x - v.x) / rx).powi(2) + ((y - v.y) / ry).powi(2))
        })
        .filter(|&(_, d)| d <= 1.0)
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(i, _)| i)
}

fn bands(pu: &mut PlotUi<'_>, d: &crate::derived::Diagnostics, v: &egui::Visuals) {
    let Some(extras) = &d.extras else { return };
    let b = &extras.bands;
    if b.len() < 2 {
        return;
    }
    let xs: Vec<f64> = b.iter().map(|p| p.x).collect();
    let lo: Vec<f64> = b.iter().map(|p| p.mean_low).collect();
    let hi: Vec<f64> = b.iter().map(|p| p.mean_high).collect();
    let c = palette::fit(v);
    pu.add(
        FilledArea::new("confidence band", &xs, &lo, &hi)
            .fill_color(c.gamma_multiply(0.22))
            .allow_hover(false),
    );
    for f in [0, 1] {
        let name = "prediction band";
        let pts: PlotPoints = b
            .iter()
            .map(|p| {
                [
                    p.x,
                    if f == 0 {
                        p.predict_low
                    } else {
                        p.predict_high
                    },
                ]
            })
            .collect();
        pu.line(
            Line::new(name, pts)
                .color(c.gamma_multiply(0.7))
                .style(LineStyle::dashed_loose())
                .allow_hover(false),
        );
    }
}

fn overlays(
    pu: &mut PlotUi<'_>,
    d: &crate::derived::Diagnostics,
    v: &egui::Visuals,
    x_lo: f64,
    x_hi: f64,
    levels: &[String],
) {
    let straight =
        |a: f64, b: f64| -> PlotPoints { vec![[x_lo, a + b * x_lo], [x_hi, a + b * x_hi]].into() };
    let ink = v.text_color();
    if let Some(extras) = &d.extras {
        if let Some(Ok(RobustFit::TheilSen(t))) = &extras.robust {
            pu.line(
                Line::new("Theil–Sen", straight(t.intercept, t.slope))
                    .color(ink)
                    .style(LineStyle::dashed_dense())
                    .allow_hover(false),
            );
        }
        if let Some(Ok(l)) = &extras.loess {
            let pts: PlotPoints = l.x.iter().zip(&l.fitted).map(|(&x, &y)| [x, y]).collect();
            pu.line(
                Line::new("LOESS", pts)
                    .color(palette::loess(v))
                    .width(1.5)
                    .allow_hover(false),
            );
        }
    }
    if let Some(Ok(dm)) = &d.deming {
        pu.line(
            Line::new("Deming", straight(dm.intercept, dm.slope))
                .color(ink)
                .style(LineStyle::dotted_dense())
                .allow_hover(false),
        );
    }
    for g in &d.group_lines {
        let name = levels.get(g.level).cloned().unwrap_or_default();
        pu.line(
            Line::new(name, straight(g.intercept, g.slope))
                .color(palette::group(g.level))
                .width(1.2)
                .allow_hover(false),
        );
    }
}

fn residuals(wb: &mut Workbench, ui: &mut egui::Ui, size: Vec2) {
    title(ui, "Residuals against fitted values", "A pattern (curve, funnel) means the model misses structure. Hollow rings: excluded rows against the current fit.");
    diagnostic_view(
        wb,
        ui,
        size,
        &View {
            id: "residuals",
            x_label: "fitted value",
            y_label: "residual",
            pick: |v| (&v.residual, Some(&v.excluded_residuals)),
        },
        |pu, _, v| {
            pu.hline(
                egui_plot::HLine::new("zero", 0.0)
                    .color(v.weak_text_color())
                    .allow_hover(false),
            );
        },
    );
}

fn leverage(wb: &mut Workbench, ui: &mut egui::Ui, size: Vec2) {
    title(ui, "Leverage against studentized residual", "Far right: unusual x. Far up or down: unusual y for its x. Curves: Cook's distance 0.5 and 1 (beyond them one row moves the fit a lot).");
    let p = wb.bench.pair().map_or(2, |p| p.terms.len()) as f64;
    diagnostic_view(
        wb,
        ui,
        size,
        &View {
            id: "leverage",
            x_label: "leverage (hat value)",
            y_label: "studentized residual (internal)",
            pick: |v| (&v.leverage, None),
        },
        move |pu, cloud, v| {
            let h_max = cloud
                .points
                .iter()
                .map(|q| q.0)
                .fold(0.0_f64, f64::max)
                .max(0.05);
            for (d, style) in [
                (0.5, LineStyle::dashed_loose()),
                (1.0, LineStyle::dashed_dense()),
            ] {
                for sign in [1.0, -1.0] {
                    // Cook's D = r²·h / (p·(1 − h))  ⇒  r = ±√(D·p·(1 − h)/h).
                    let pts: PlotPoints = (1..=80)
                        .map(|k| {
                            let h = h_max * 1.05 * f64::from(k) / 80.0;
                            [h, sign * (d * p * (1.0 - h) / h).sqrt()]
                        })
                        .filter(|q| q[1].abs() < 6.0)
                        .collect();
                    pu.line(
                        Line::new(format!("Cook's D = {d}"), pts)
                            .color(v.weak_text_color())
                            .style(style)
                            .allow_hover(false),
                    );
                }
            }
        },
    );
}

fn quantiles(wb: &mut Workbench, ui: &mut egui::Ui, size: Vec2) {
    title(ui, "Normal quantiles of residuals", "Points on the diagonal: residuals look normal. Bends at the ends: heavy or light tails; a lone point off the line: an outlier.");
    diagnostic_view(
        wb,
        ui,
        size,
        &View {
            id: "quantiles",
            x_label: "expected normal score",
            y_label: "studentized residual (external)",
            pick: |v| (&v.quantile, None),
        },
        |pu, cloud, v| {
            let m = cloud
                .points
                .iter()
                .map(|q| q.0.abs())
                .fold(1.0_f64, f64::max);
            pu.line(
                Line::new("y = x", vec![[-m, -m], [m, m]])
                    .color(v.weak_text_color())
                    .allow_hover(false),
            );
        },
    );
}

/// One diagnostic view: its id, axis names and which points of the diagnostics it shows.
struct View {
    id: &'static str,
    x_label: &'static str,
    y_label: &'static str,
    pick: fn(&crate::derived::Views) -> (&Cloud, Option<&Cloud>),
}

fn diagnostic_view(
    wb: &mut Workbench,
    ui: &mut egui::Ui,
    size: Vec2,
    view: &View,
    guides: impl FnOnce(&mut PlotUi<'_>, &Cloud, &egui::Visuals),
) {
    let View {
        id,
        x_label,
        y_label,
        pick,
    } = *view;
    let Some(d) = wb.bench.diagnostics().cloned() else {
        ui.add_sized(size, egui::Spinner::new());
        return;
    };
    let visuals = ui.visuals().clone();
    let (cloud, excluded) = pick(&d.views);
    let empty = Cloud::default();
    let excluded = excluded.unwrap_or(&empty);
    let focus = wb
        .bench
        .hovered
        .or(wb.bench.selected)
        .and_then(|e| cloud.position_of(e).or_else(|| excluded.position_of(e)));
    let mut slot = wb.bench.textures.remove(id);
    let generation = wb.bench.diag_generation;
    let empty_set = std::collections::HashSet::new();
    let resp = plot(
        (id, wb.bench.serial),
        size,
        (x_label, y_label),
        true,
        cloud.is_dense().then_some(cloud.bounds).flatten(),
    )
    .show(ui, |pu| {
        guides(pu, cloud, &visuals);
        let layer = Layer {
            cloud,
            groups: None,
            excluded,
            skip: &empty_set,
            extra: &empty,
            focus,
            generation,
        };
        points_layer(pu, &layer, &visuals, &mut slot);
    });
    if let Some(s) = slot {
        wb.bench.textures.insert(id, s);
    }
    let shown = Shown {
        hovered: hovered_entry(&resp.response, &resp.transform, &[cloud, excluded]),
        transform: resp.transform,
        response: resp.response,
    };
    if shown.response.clicked() {
        if let Some(e) = shown.hovered {
            wb.bench.selected = Some(e);
            if wb.bench.pointer == PointerMode::Exclude {
                wb.toggle_entry(e);
            }
        }
    }
    tooltip(wb, &shown);
}

/// Row number and values of the hovered row, and records the hover for the other views.
fn tooltip(wb: &mut Workbench, shown: &Shown) {
    let Some(e) = shown.hovered else { return };
    wb.bench.hovered_next = Some(e);
    let Some(pair) = wb.bench.pair() else { return };
    let marks = wb.marks();
    let row = pair.rows[e];
    let (x, y) = pair.point(e, marks);
    let mut text = format!(
        "row {row}\n{} = {}\n{} = {}",
        pair.spec.x,
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
    if let Some(d) = wb.bench.diagnostics() {
        if let Ok(k) = d.included.binary_search(&e) {
            if let Some(c) = d.cases.get(k) {
                text.push_str(&format!(
                    "\nfitted {}  residual {}\nleverage {}  Cook's D {}\nstudentized {}",
                    num(c.fitted),
                    num(c.residual),
                    num(c.leverage),
                    num(c.cooks_distance),
                    num(c.studentized_external)
                ));
            }
        }
    }
    let click = match wb.bench.pointer {
        PointerMode::Exclude if marks.excluded.contains_key(&row) => "\nclick: put back",
        PointerMode::Exclude => "\nclick: exclude",
        PointerMode::Move => "\ndrag: move (what-if)",
        PointerMode::Lasso => "",
    };
    text.push_str(click);
    shown.response.clone().on_hover_text_at_pointer(text);
}

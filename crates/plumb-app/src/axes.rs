//! Plot frames with readable axes: every axis gets three to five labelled ticks at round
//! values (1, 2 or 5 times a power of ten), whatever the view's size, labelled with as many
//! decimals as the step needs.

use eframe::egui::{self, Vec2};
use egui_plot::{AxisHints, GridInput, GridMark, Plot};

/// Fewest and most labelled ticks on an axis.
pub const TICKS: (usize, usize) = (3, 5);
/// Room left right of a plot, so that the last x tick's label is never cut at the edge.
const RIGHT_ROOM: f32 = 14.0;
/// Width kept for every y axis's tick labels, so that views stacked on one x axis line up.
pub const Y_AXIS_WIDTH: f32 = 56.0;
/// Room each label needs along the axis, in points (x: a number's width; y: its height).
const LABEL_ROOM: (f64, f64) = (64.0, 28.0);

/// Round tick values inside `[lo, hi]`: the largest step of 1, 2.5, 2 or 5 × 10ᵏ that gives
/// between [`TICKS`]`.0` and `most` ticks (or, when none does, the largest giving at least
/// three). Returns the ticks and the step.
pub fn ticks(lo: f64, hi: f64, most: usize) -> (Vec<f64>, f64) {
    if !(lo.is_finite() && hi.is_finite()) || hi <= lo {
        return (Vec::new(), 1.0);
    }
    let most = most.max(TICKS.0) as i64;
    let count = |s: f64| ((hi / s).floor() - (lo / s).ceil()) as i64 + 1;
    let top = 10f64.powf((hi - lo).log10().ceil());
    let steps = (0..8).flat_map(|k| {
        let base = top / 10f64.powi(k);
        [1.0, 0.5, 0.25, 0.2].map(|m| m * base)
    });
    let mut fallback = None;
    for step in steps {
        let n = count(step);
        if n >= TICKS.0 as i64 {
            if n <= most {
                return (at_steps(lo, hi, step), step);
            }
            fallback.get_or_insert(step);
        }
    }
    let step = fallback.unwrap_or(top / 1e8);
    (at_steps(lo, hi, step), step)
}

fn at_steps(lo: f64, hi: f64, step: f64) -> Vec<f64> {
    let first = (lo / step).ceil() as i64;
    let last = (hi / step).floor() as i64;
    (first..=last).map(|k| k as f64 * step).collect()
}

/// Decimals that show every multiple of `step` exactly (0.25 → 2, 0.5 → 1, 20 → 0).
fn decimals_of(step: f64) -> usize {
    (0..10)
        .find(|&d| {
            let scaled = step * 10f64.powi(d as i32);
            (scaled - scaled.round()).abs() <= 1e-6 * scaled
        })
        .unwrap_or(10)
}

/// A tick's label: fixed-point with the decimals the step needs; scientific, with as many
/// digits as tell neighbouring ticks apart, when the step is very large or very small. A value
/// within rounding of zero is written as zero (never `-0`).
pub fn label(value: f64, step: f64) -> String {
    let value = if value.abs() < step.abs() * 1e-9 {
        0.0
    } else {
        value
    };
    if !(1e-4..1e5).contains(&step) {
        let order = |v: f64| v.abs().log10().floor();
        let digits = (order(value.abs().max(step)) - order(step) + 1.0).max(2.0);
        return plumb_report::text::sig(value, digits as u32);
    }
    let decimals = decimals_of(step);
    format!("{value:.decimals$}")
}

/// A value under the pointer, written to about a thousandth of the view's `span`: enough to
/// read a point off, no digits the screen cannot resolve.
pub fn readout(value: f64, span: f64) -> String {
    if !(value.is_finite() && span.is_finite() && span > 0.0) {
        return "—".into();
    }
    let resolution = span / 1000.0;
    if !(1e-6..1e7).contains(&resolution) || value.abs() >= 1e9 {
        let digits = (value.abs().max(resolution).log10() - resolution.log10()).ceil() + 1.0;
        return plumb_report::text::sig(value, digits.clamp(2.0, 12.0) as u32);
    }
    let decimals = (-resolution.log10().floor()).max(0.0) as usize;
    let text = format!("{value:.decimals$}");
    if text
        .trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.')
    {
        text.trim_start_matches('-').to_string()
    } else {
        text
    }
}

/// Writes the pointer's position in data units in the top-left corner of a hovered plot.
pub fn readout_ui(ui: &egui::Ui, response: &egui::Response, transform: &egui_plot::PlotTransform) {
    let Some(pos) = response.hover_pos() else {
        return;
    };
    let v = transform.value_from_position(pos);
    let b = transform.bounds();
    let text = format!(
        "x {}   y {}",
        readout(v.x, b.width()),
        readout(v.y, b.height())
    );
    let frame = transform.frame();
    let font = egui::TextStyle::Small.resolve(ui.style());
    let painter = ui.painter().with_clip_rect(*frame);
    let galley = painter.layout_no_wrap(text, font, ui.visuals().text_color());
    let at = frame.left_top() + Vec2::new(6.0, 4.0);
    let back = egui::Rect::from_min_size(at, galley.size()).expand(3.0);
    painter.rect_filled(
        back,
        3.0,
        ui.visuals().extreme_bg_color.gamma_multiply(0.85),
    );
    painter.galley(at, galley, ui.visuals().text_color());
}

/// Names a plot for assistive technology (and for the tests that find it): `name`.
pub fn name_plot(response: &egui::Response, name: &str) {
    response.widget_info(|| egui::WidgetInfo::labeled(egui::Role::Figure, true, name));
}

/// The ticks of a horizontal axis `points` long over `[lo, hi]`: as many as the labels have
/// room for, between [`TICKS`]`.0` and [`TICKS`]`.1` (the vertical axis asks the same of its
/// own length with its own room).
pub fn ticks_for(lo: f64, hi: f64, points: f32) -> (Vec<f64>, f64) {
    ticks(lo, hi, most_for(f64::from(points), LABEL_ROOM.0))
}

fn most_for(points: f64, room: f64) -> usize {
    ((points / room).floor() as usize).clamp(TICKS.0, TICKS.1)
}

/// The grid spacer of one axis: [`ticks`] for the axis' length in points.
fn spacer(room: f64) -> impl Fn(GridInput) -> Vec<GridMark> {
    move |input: GridInput| {
        let (lo, hi) = input.bounds;
        // `base_step_size` is the data span of 8 points (egui_plot's default grid spacing).
        let points = (hi - lo) / input.base_step_size * 8.0;
        let (values, step) = ticks(lo, hi, most_for(points, room));
        values
            .into_iter()
            .map(|value| GridMark {
                value,
                step_size: step,
            })
            .collect()
    }
}

/// A plot of `size` with both axes labelled and ticked, no pointer read-out of its own, and
/// the zoom reset by a double click. `id` keys its zoom memory.
pub fn plot<'a>(id: impl egui::AsIdSalt, size: Vec2, (x, y): (&str, &str)) -> Plot<'a> {
    let formatter =
        |mark: GridMark, _: &std::ops::RangeInclusive<f64>| label(mark.value, mark.step_size);
    Plot::new(id)
        .width((size.x - RIGHT_ROOM).max(60.0))
        .height(size.y)
        .custom_x_axes(vec![AxisHints::new_x()
            .label(x.to_string())
            .formatter(formatter)
            .label_spacing(24.0..=32.0)])
        .custom_y_axes(vec![AxisHints::new_y()
            .label(y.to_string())
            .formatter(formatter)
            .label_spacing(12.0..=16.0)])
        .x_grid_spacer(spacer(LABEL_ROOM.0))
        .y_grid_spacer(spacer(LABEL_ROOM.1))
        .y_axis_min_width(Y_AXIS_WIDTH)
        .show_x(false)
        .show_y(false)
        .allow_double_click_reset(true)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_range_gets_three_to_five_round_ticks() {
        for (lo, hi) in [
            (0.0, 1.0),
            (-0.003, 0.117),
            (0.032, 0.197),
            (848.0, 852.0),
            (-6.2, 14.9),
            (1e6, 1.000_01e6),
            (17.0, 81.0),
            (0.0, 0.05),
        ] {
            let (t, step) = ticks(lo, hi, 5);
            assert!(
                (3..=5).contains(&t.len()),
                "[{lo}, {hi}]: {t:?} (step {step})"
            );
            assert!(
                t.iter().all(|v| (lo..=hi).contains(v)),
                "[{lo}, {hi}]: {t:?}"
            );
            let m = step / 10f64.powf(step.log10().floor());
            assert!(
                [1.0, 2.0, 2.5, 5.0].iter().any(|r| (m - r).abs() < 1e-9),
                "round step: {step}"
            );
            let labels: Vec<String> = t.iter().map(|&v| label(v, step)).collect();
            let mut distinct = labels.clone();
            distinct.dedup();
            assert_eq!(distinct, labels, "labels tell the ticks apart");
        }
    }

    #[test]
    fn a_small_view_asks_for_three_and_gets_three() {
        let (t, step) = ticks(0.0, 100.0, 3);
        assert_eq!(t, vec![0.0, 50.0, 100.0], "step {step}");
        assert!(ticks(1.0, 1.0, 5).0.is_empty());
        assert!(ticks(f64::NAN, 1.0, 5).0.is_empty());
    }

    #[test]
    fn the_readout_resolves_a_thousandth_of_the_view() {
        assert_eq!(readout(12.345678, 10.0), "12.35");
        assert_eq!(readout(12.345678, 1000.0), "12");
        assert_eq!(readout(-0.0004, 1.0), "0.000", "no minus sign on a zero");
        assert_eq!(readout(0.5, 0.001), "0.500000");
        let big: f64 = readout(2.5e9, 1e9).parse().expect("a number");
        assert!((big - 2.5e9).abs() <= 1e6, "{big}");
        assert_eq!(readout(f64::NAN, 1.0), "—");
        assert_eq!(readout(1.0, 0.0), "—");
    }

    #[test]
    fn labels_use_the_decimals_of_the_step() {
        assert_eq!(label(0.5, 0.5), "0.5");
        assert_eq!(label(1.0, 0.5), "1.0");
        assert_eq!(label(20.0, 20.0), "20");
        assert_eq!(label(0.05, 0.025), "0.050");
        assert_eq!(label(0.75, 0.25), "0.75");
        assert_eq!(label(-1e-17, 0.1), "0.0");
        assert_eq!(label(2_000_000.0, 1_000_000.0), "2e6");
        assert_eq!(label(1_000_002.5, 2.5), "1000002.5");
    }
}

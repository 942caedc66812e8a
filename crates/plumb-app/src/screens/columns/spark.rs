//! A column's small histogram drawn inline: a strip of bars, one per bin.

use eframe::egui::{self, Rect, Sense, Vec2};
use plumb_report::text::num;

use crate::state::column_facts::Bins;

/// Size of the strip in points.
const STRIP: Vec2 = Vec2::new(80.0, 18.0);

/// Paints `bins` as bars in a strip of [`STRIP`] size, each bar's height its count over the
/// largest count; the hover text gives the range and the counts.
pub fn histogram_strip(ui: &mut egui::Ui, bins: &Bins) {
    let (rect, response) = ui.allocate_exact_size(STRIP, Sense::hover());
    if ui.is_rect_visible(rect) {
        let colour = ui.visuals().widgets.inactive.fg_stroke.color;
        for (bar, _) in bars(rect, &bins.counts) {
            ui.painter().rect_filled(bar, 0.0, colour);
        }
        ui.painter().hline(
            rect.x_range(),
            rect.bottom(),
            (1.0, colour.gamma_multiply(0.5)),
        );
    }
    let total: u64 = bins.counts.iter().map(|&c| u64::from(c)).sum();
    response.on_hover_text(format!(
        "{total} values in {} equal bins from {} to {}; counts {}",
        bins.counts.len(),
        num(bins.low),
        num(bins.high),
        bins.counts
            .iter()
            .map(u32::to_string)
            .collect::<Vec<_>>()
            .join(" ")
    ));
}

/// The bar of each bin inside `rect` (a one-point gap between bars when there is room), with
/// its count; an empty bin has no height.
fn bars(rect: Rect, counts: &[u32]) -> Vec<(Rect, u32)> {
    let top = counts.iter().copied().max().unwrap_or(0).max(1) as f32;
    let w = rect.width() / counts.len().max(1) as f32;
    let gap = if w >= 3.0 { 1.0 } else { 0.0 };
    counts
        .iter()
        .enumerate()
        .map(|(i, &c)| {
            let h = rect.height() * c as f32 / top;
            let left = rect.left() + i as f32 * w;
            let bar = Rect::from_min_max(
                egui::pos2(left, rect.bottom() - h),
                egui::pos2(left + w - gap, rect.bottom()),
            );
            (bar, c)
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bars_fill_the_strip_in_proportion_to_their_counts() {
        let rect = Rect::from_min_size(egui::pos2(0.0, 0.0), STRIP);
        let b = bars(rect, &[2, 4, 0, 1]);
        assert_eq!(b.len(), 4);
        assert_eq!(b[1].0.height(), STRIP.y, "the largest count is full height");
        assert_eq!(b[0].0.height(), STRIP.y / 2.0);
        assert_eq!(b[2].0.height(), 0.0);
        assert!(b
            .iter()
            .all(|(r, _)| r.bottom() == STRIP.y && r.right() <= STRIP.x));
        assert_eq!(b[3].0.left(), 60.0, "equal widths");
    }
}

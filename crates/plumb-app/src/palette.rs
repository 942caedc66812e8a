//! Colours. Marks differ by shape as well as colour (excluded rows are hollow rings), so the
//! views read in grayscale and for colour-blind analysts.

use eframe::egui::{Color32, Visuals};

/// Colour of group level `k` (the summary's charts use the same set,
/// [`plumb_report::charts::GROUP_RGB`]).
pub fn group(k: usize) -> Color32 {
    let (r, g, b) = plumb_report::charts::group_rgb(k);
    Color32::from_rgb(r, g, b)
}

/// The fit kept for comparison (drawn dashed beside the current one).
pub fn kept(v: &Visuals) -> Color32 {
    if v.dark_mode {
        Color32::from_rgb(0x9F, 0xD8, 0x8A)
    } else {
        Color32::from_rgb(0x2E, 0x6B, 0x1F)
    }
}

/// Included points.
pub fn point(v: &Visuals) -> Color32 {
    if v.dark_mode {
        Color32::from_rgb(0xB8, 0xC4, 0xD0)
    } else {
        Color32::from_rgb(0x2F, 0x3B, 0x48)
    }
}

/// The fitted line or curve.
pub fn fit(v: &Visuals) -> Color32 {
    if v.dark_mode {
        Color32::from_rgb(0x5F, 0xC8, 0xE8)
    } else {
        Color32::from_rgb(0x0B, 0x5C, 0x8A)
    }
}

/// The hovered or selected row, in every view.
pub fn focus(v: &Visuals) -> Color32 {
    if v.dark_mode {
        Color32::from_rgb(0xFF, 0xB3, 0x47)
    } else {
        Color32::from_rgb(0xC2, 0x41, 0x0C)
    }
}

/// Excluded rows (hollow rings).
pub fn excluded(v: &Visuals) -> Color32 {
    if v.dark_mode {
        Color32::from_rgb(0xE0, 0x7A, 0x7A)
    } else {
        Color32::from_rgb(0xA3, 0x1F, 0x1F)
    }
}

/// The unknowns read back off a calibration (a hue the fit, the groups and the focus do not
/// use).
pub fn unknown(v: &Visuals) -> Color32 {
    if v.dark_mode {
        Color32::from_rgb(0xD4, 0x9B, 0xF0)
    } else {
        Color32::from_rgb(0x6A, 0x1B, 0x9A)
    }
}

/// The LOESS curve (a hue the group colours do not use).
pub fn loess(v: &Visuals) -> Color32 {
    if v.dark_mode {
        Color32::from_rgb(0xC3, 0x9B, 0xF0)
    } else {
        Color32::from_rgb(0x6A, 0x3D, 0x9A)
    }
}

/// Background of the hypothetical banner.
pub const WHAT_IF: Color32 = Color32::from_rgb(0xF2, 0xC1, 0x4E);

/// Diverging scale for a coefficient in [−1, 1] on the co-movement map. Light mode: dark blue
/// through a pale neutral to dark brown-orange, lightness falling with |r|. Dark mode: from a
/// shade just off the panel (so near-zero cells stay calm instead of glaring) to a light blue
/// and a light orange, lightness rising with |r|. Either way strength reads in grayscale and
/// the sign from the hue (and the number printed in the cell).
pub fn diverging(r: f64, v: &Visuals) -> Color32 {
    let (neg, mid, pos) = if v.dark_mode {
        let [pr, pg, pb, _] = v.panel_fill.to_array();
        let lift = |c: u8| f32::from(c) + (255.0 - f32::from(c)) * 0.07;
        (
            [88.0, 156.0, 232.0],
            [lift(pr), lift(pg), lift(pb)],
            [236.0, 140.0, 74.0],
        )
    } else {
        (
            [24.0, 64.0, 132.0],
            [242.0, 240.0, 235.0],
            [128.0, 52.0, 12.0],
        )
    };
    let t = r.clamp(-1.0, 1.0) as f32;
    let end = if t < 0.0 { neg } else { pos };
    let a = t.abs().powf(0.8);
    let mix = |k: usize| (mid[k] + (end[k] - mid[k]) * a).round() as u8;
    Color32::from_rgb(mix(0), mix(1), mix(2))
}

/// A map cell whose coefficient is undefined: a flat grey apart from the scale's ends.
pub fn undefined_cell(v: &Visuals) -> Color32 {
    if v.dark_mode {
        Color32::from_gray(72)
    } else {
        Color32::from_gray(176)
    }
}

/// Black or white, whichever reads on `background`.
pub fn ink_on(background: Color32) -> Color32 {
    let [r, g, b, _] = background.to_array();
    let luma = 0.299 * f32::from(r) + 0.587 * f32::from(g) + 0.114 * f32::from(b);
    if luma > 140.0 {
        Color32::BLACK
    } else {
        Color32::WHITE
    }
}

/// Density ramp for `t` in [0, 1] (0 = empty cell, transparent).
pub fn density(t: f32, v: &Visuals) -> Color32 {
    if t <= 0.0 {
        return Color32::TRANSPARENT;
    }
    let base = point(v);
    let alpha = (40.0 + 215.0 * t.clamp(0.0, 1.0).sqrt()).round() as u8;
    Color32::from_rgba_unmultiplied(base.r(), base.g(), base.b(), alpha)
}

/// The pooled fitted line: the fit's blue, or the text's ink when the points are coloured by
/// group (the group colours include blues, and the pooled line must not read as a group's).
pub fn fit_line(v: &Visuals, grouped: bool) -> Color32 {
    if grouped {
        v.strong_text_color()
    } else {
        fit(v)
    }
}

/// The Theil–Sen line (long dashes): a warm brown, apart from the group colours.
pub fn theil_sen(v: &Visuals) -> Color32 {
    if v.dark_mode {
        Color32::from_rgb(0xD9, 0xA7, 0x7E)
    } else {
        Color32::from_rgb(0x7A, 0x4A, 0x1E)
    }
}

/// The Deming line (dotted): a slate grey-green, apart from Theil–Sen and the groups.
pub fn deming(v: &Visuals) -> Color32 {
    if v.dark_mode {
        Color32::from_rgb(0x9F, 0xB8, 0xAD)
    } else {
        Color32::from_rgb(0x3D, 0x57, 0x4C)
    }
}

/// The line of identity (y = x) in the method comparison: the text's ink, softened, so it
/// reads in both themes without competing with the fitted lines.
pub fn identity(v: &Visuals) -> Color32 {
    v.text_color().gamma_multiply(0.6)
}

/// Opacity of plain markers among `n` points: opaque up to a few hundred, fading towards a
/// quarter at the density image's threshold, so that a crowd shows where it is thick instead
/// of merging into one blot.
pub fn marker_alpha(n: usize) -> f32 {
    ((400.0 / n.max(1) as f32).powf(0.45)).clamp(0.25, 1.0)
}

/// Influence classes by Cook's distance, from ordinary to strong.
pub fn influence(class: usize, v: &Visuals) -> Color32 {
    match (class, v.dark_mode) {
        (0, _) => point(v),
        (1, true) => Color32::from_rgb(0xF2, 0xB7, 0x5B),
        (1, false) => Color32::from_rgb(0xB3, 0x6B, 0x00),
        (_, true) => Color32::from_rgb(0xFF, 0x7A, 0x59),
        (_, false) => Color32::from_rgb(0xB0, 0x24, 0x0C),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn luma(c: Color32) -> f32 {
        let [r, g, b, _] = c.to_array();
        0.299 * f32::from(r) + 0.587 * f32::from(g) + 0.114 * f32::from(b)
    }

    #[test]
    fn diverging_scale_darkens_with_strength_on_both_sides() {
        let v = Visuals::light();
        let mut last = luma(diverging(0.0, &v));
        for k in 1..=10 {
            let r = f64::from(k) / 10.0;
            let (pos, neg) = (luma(diverging(r, &v)), luma(diverging(-r, &v)));
            assert!(pos < last && neg < last + 30.0, "r = {r}");
            assert!(
                (pos - neg).abs() < 40.0,
                "equal strength reads alike in grayscale at {r}"
            );
            last = pos;
        }
        assert_eq!(ink_on(diverging(0.0, &v)), Color32::BLACK);
        assert_eq!(ink_on(diverging(-1.0, &v)), Color32::WHITE);
    }

    #[test]
    fn in_dark_mode_near_zero_stays_near_the_panel_and_strength_brightens() {
        let v = Visuals::dark();
        let panel = luma(v.panel_fill);
        assert!(luma(diverging(0.0, &v)) - panel < 25.0, "calm, not white");
        assert!(luma(diverging(0.05, &v)) - panel < 40.0);
        let mut last = luma(diverging(0.0, &v));
        for k in 1..=10 {
            let r = f64::from(k) / 10.0;
            let (pos, neg) = (luma(diverging(r, &v)), luma(diverging(-r, &v)));
            assert!(pos > last && neg > last - 30.0, "r = {r}");
            assert!((pos - neg).abs() < 40.0, "alike in grayscale at {r}");
            last = pos;
        }
        assert_ne!(undefined_cell(&v), diverging(0.0, &v));
    }
}

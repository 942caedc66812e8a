//! Density images as textures, one per view, rebuilt only when what they show changes (the
//! view's bounds, or the points: each view passes a key that changes with them).

use std::collections::HashMap;

use eframe::egui::{self, Color32};
use egui_plot::{PlotImage, PlotPoint, PlotUi};

use super::{bin, Bounds, Density};
use crate::palette;

/// Cells across a view's density image (its height follows the view's aspect).
pub const DENSITY_CELLS: usize = 512;

struct Cached {
    key: (u64, [u64; 4]),
    texture: egui::TextureHandle,
}

/// The density textures of the views, by view.
#[derive(Default)]
pub struct DensityTextures {
    cached: HashMap<&'static str, Cached>,
}

impl DensityTextures {
    /// Draws `points` (minus `skipped`, which are few) as a density image over the plot's
    /// current bounds; rebins only when the bounds or `generation` changed.
    pub fn draw(
        &mut self,
        pu: &mut PlotUi<'_>,
        view: &'static str,
        points: &[(f64, f64)],
        skipped: impl Iterator<Item = (f64, f64)>,
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
        let key = (generation, bounds_key(&bounds));
        let fresh = self.cached.get(view).is_some_and(|c| c.key == key);
        if !fresh {
            let frame = pu.transform().frame();
            let aspect = (frame.height() / frame.width().max(1.0)).clamp(0.1, 10.0);
            let height = ((DENSITY_CELLS as f32 * aspect) as usize).max(16);
            let mut d = bin(points.iter().copied(), bounds, DENSITY_CELLS, height);
            d.remove(skipped);
            let texture = pu.ctx().load_texture(
                view,
                colour_image(&d, visuals),
                egui::TextureOptions::NEAREST,
            );
            self.cached.insert(view, Cached { key, texture });
        }
        if let Some(c) = self.cached.get(view) {
            pu.image(image_over(&c.texture, &bounds));
        }
    }
}

/// A density as pixels: lightness by `ln(1 + count)` relative to the fullest cell.
pub fn colour_image(d: &Density, visuals: &egui::Visuals) -> egui::ColorImage {
    let scale = f64::from(d.max.max(1)).ln_1p();
    let pixels: Vec<Color32> = d
        .counts
        .iter()
        .map(|&c| palette::density((f64::from(c).ln_1p() / scale) as f32, visuals))
        .collect();
    egui::ColorImage::new([d.width, d.height], pixels)
}

/// The plot item that shows `texture` stretched over `bounds`.
pub fn image_over(texture: &egui::TextureHandle, bounds: &Bounds) -> PlotImage {
    PlotImage::new(
        "density",
        texture.id(),
        PlotPoint::new(
            (bounds.x_min + bounds.x_max) / 2.0,
            (bounds.y_min + bounds.y_max) / 2.0,
        ),
        egui::Vec2::new(bounds.width() as f32, bounds.height() as f32),
    )
}

fn bounds_key(b: &Bounds) -> [u64; 4] {
    [
        b.x_min.to_bits(),
        b.x_max.to_bits(),
        b.y_min.to_bits(),
        b.y_max.to_bits(),
    ]
}

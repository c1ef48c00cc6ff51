//! Heat maps of a value over two axes: drawn as one texture inside a plot, with our
//! own colour ramp ("tide": dark ink through sea green and sand to paper, lightness
//! rising steadily), a colour bar whose axis carries the tick labels, and a level
//! contour found by marching squares on the grid.

use egui::{Color32, ColorImage, TextureHandle, TextureOptions};
use egui_plot::{Line, LineStyle, Plot, PlotImage, PlotPoint, PlotPoints, Points};

/// Smallest Q* − 1 the colour scale shows (rounding of the propagation lies below).
pub const FLOOR: f64 = 1e-16;

/// Colour of the contour lines: the figure layer's, so app and files agree.
pub const CONTOUR_COLOUR: Color32 = Color32::from_rgb(
    quenchless_figures::colour::CONTOUR[0],
    quenchless_figures::colour::CONTOUR[1],
    quenchless_figures::colour::CONTOUR[2],
);

/// The colour of t in [0, 1] on the one colour map of every heat map (the figure
/// layer's "tide"; NaN gives mid grey, the "no value" colour).
pub fn tide(t: f64) -> Color32 {
    let [r, g, b] = quenchless_figures::colour::tide(t);
    Color32::from_rgb(r, g, b)
}

pub use quenchless_figures::grid::{HeatGrid, contour};

/// The grid as an image: one pixel per cell, top row = largest y, colours from the
/// value range `range` (NaN cells grey).
pub fn grid_image(grid: &HeatGrid, range: (f64, f64)) -> ColorImage {
    let (nx, ny) = (grid.xs.len(), grid.ys.len());
    let span = (range.1 - range.0).max(f64::MIN_POSITIVE);
    let mut pixels = Vec::with_capacity(nx * ny);
    for row in (0..ny).rev() {
        for ix in 0..nx {
            pixels.push(tide((grid.at(ix, row) - range.0) / span));
        }
    }
    ColorImage::new([nx.max(1), ny.max(1)], pixels)
}

/// What one heat-map plot shows.
#[derive(Debug, Clone, Copy)]
pub struct HeatStyle<'a> {
    /// Plot id salt.
    pub id: &'a str,
    /// Axis labels.
    pub x_label: &'a str,
    /// Axis labels.
    pub y_label: &'a str,
    /// Label of the colour bar's axis (the value).
    pub value_label: &'a str,
    /// A level to draw as a contour, and its legend name.
    pub contour: Option<(f64, &'a str)>,
    /// A point to mark (x, y) and its legend name.
    pub mark: Option<([f64; 2], &'a str)>,
    /// Height, points.
    pub height: f32,
}

/// A heat map with its texture (rebuilt only when the grid or range changes).
#[derive(Default)]
pub struct HeatTexture {
    key: Option<(usize, u64, (u64, u64))>,
    texture: Option<TextureHandle>,
    bar: Option<TextureHandle>,
}

impl std::fmt::Debug for HeatTexture {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("HeatTexture").field("key", &self.key).finish_non_exhaustive()
    }
}

fn fingerprint(values: &[f64]) -> u64 {
    values.iter().fold(0xcbf2_9ce4_8422_2325_u64, |h, v| (h ^ v.to_bits()).wrapping_mul(0x0100_0000_01b3))
}

impl HeatTexture {
    /// Draws the map and its colour bar side by side; `range` is the value range of
    /// the colours. Returns the plot's screen rectangle.
    pub fn ui(&mut self, ui: &mut egui::Ui, grid: &HeatGrid, range: (f64, f64), style: &HeatStyle<'_>) -> egui::Rect {
        let key = (grid.xs.len(), fingerprint(&grid.values), (range.0.to_bits(), range.1.to_bits()));
        if self.key != Some(key) || self.texture.is_none() {
            let image = grid_image(grid, range);
            self.texture = Some(ui.ctx().load_texture(format!("{}-map", style.id), image, TextureOptions::NEAREST));
            self.key = Some(key);
        }
        let bar = self.bar.get_or_insert_with(|| {
            let pixels: Vec<Color32> = (0..256).rev().map(|k| tide(f64::from(k) / 255.0)).collect();
            ui.ctx().load_texture("tide-colour-bar", ColorImage::new([1, 256], pixels), TextureOptions::LINEAR)
        });
        let (dx, dy) = grid.cell();
        let (x0, x1) = (grid.xs.first().copied().unwrap_or(0.0), grid.xs.last().copied().unwrap_or(1.0));
        let (y0, y1) = (grid.ys.first().copied().unwrap_or(0.0), grid.ys.last().copied().unwrap_or(1.0));
        let centre = PlotPoint::new(0.5 * (x0 + x1), 0.5 * (y0 + y1));
        let size = egui::vec2((x1 - x0 + dx) as f32, (y1 - y0 + dy) as f32);
        let segments = style.contour.map(|(level, _)| contour(grid, level)).unwrap_or_default();
        let bar_width = 96.0;
        let mut rect = egui::Rect::NOTHING;
        ui.horizontal(|ui| {
            let w = (ui.available_width() - bar_width - 12.0).max(120.0);
            let texture = self.texture.as_ref().map(TextureHandle::id);
            let resp = Plot::new(("heat-map", style.id))
                .x_axis_formatter(crate::units::axis_ticks)
                .y_axis_formatter(crate::units::axis_ticks)
                .width(w)
                .height(style.height)
                .x_axis_label(style.x_label)
                .y_axis_label(style.y_label)
                .legend(egui_plot::Legend::default())
                .allow_scroll(false)
                .show(ui, |pui| {
                    if let Some(t) = texture {
                        pui.image(PlotImage::new("", t, centre, size).allow_hover(false));
                    }
                    if let Some((_, name)) = style.contour {
                        for s in &segments {
                            pui.line(
                                Line::new(name, PlotPoints::new(vec![s[0], s[1]]))
                                    .color(CONTOUR_COLOUR)
                                    .width(2.0)
                                    .allow_hover(false),
                            );
                        }
                    }
                    if let Some((p, name)) = style.mark {
                        pui.points(
                            Points::new(name, vec![p])
                                .shape(egui_plot::MarkerShape::Cross)
                                .radius(7.0)
                                .color(Color32::from_rgb(230, 40, 140)),
                        );
                    }
                });
            rect = resp.response.rect;
            let (lo, hi) = range;
            let span = if hi > lo { hi - lo } else { 1.0 };
            let bar_id = bar.id();
            Plot::new(("colour-bar", style.id))
                .y_axis_formatter(crate::units::axis_ticks)
                .width(bar_width)
                .height(style.height)
                .show_axes([false, true])
                .show_grid([false, true])
                .y_axis_label(style.value_label)
                .allow_drag(false)
                .allow_zoom(false)
                .allow_scroll(false)
                .allow_boxed_zoom(false)
                .allow_double_click_reset(false)
                .show_x(false)
                .default_x_bounds(0.0, 1.0)
                .default_y_bounds(lo, lo + span)
                .show(ui, |pui| {
                    pui.image(
                        PlotImage::new("", bar_id, PlotPoint::new(0.5, lo + 0.5 * span), [1.0, span as f32])
                            .allow_hover(false),
                    );
                    if let Some((level, _)) = style.contour
                        && level >= lo
                        && level <= lo + span
                    {
                        pui.line(
                            Line::new("", PlotPoints::new(vec![[0.0, level], [1.0, level]]))
                                .color(CONTOUR_COLOUR)
                                .width(2.0)
                                .style(LineStyle::Solid),
                        );
                    }
                });
        });
        rect
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tide_gets_lighter_from_low_to_high() {
        // Perceptual order, approximated by Rec. 709 luma (common practice, no source).
        let luma = |c: Color32| 0.2126 * f64::from(c.r()) + 0.7152 * f64::from(c.g()) + 0.0722 * f64::from(c.b());
        let mut last = -1.0;
        for k in 0..=100 {
            let l = luma(tide(f64::from(k) / 100.0));
            assert!(l > last, "luma falls at {k}");
            last = l;
        }
    }

    #[test]
    fn contour_of_a_plane_is_the_straight_level_line() {
        // v = x + y on [0, 1]²: the level 1 is the line x + y = 1 (exact for linear data).
        let xs: Vec<f64> = (0..11).map(|k| f64::from(k) / 10.0).collect();
        let grid = HeatGrid {
            xs: xs.clone(),
            ys: xs.clone(),
            values: xs.iter().flat_map(|y| xs.iter().map(move |x| x + y)).collect(),
        };
        let segs = contour(&grid, 1.0);
        assert!(!segs.is_empty());
        for s in segs {
            for p in s {
                assert!((p[0] + p[1] - 1.0).abs() < 1e-12, "{p:?}");
            }
        }
        assert!(contour(&grid, 5.0).is_empty(), "no level above the data");
    }
}

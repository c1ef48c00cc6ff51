//! Heat maps of a value over two axes: drawn as one texture inside a plot, with our
//! own colour ramp ("tide": dark ink through sea green and sand to paper, lightness
//! rising steadily), a colour bar whose axis carries the tick labels, and a level
//! contour found by marching squares on the grid.

use egui::{Color32, ColorImage, TextureHandle, TextureOptions};
use egui_plot::{Line, LineStyle, Plot, PlotImage, PlotPoint, PlotPoints, Points};

/// Smallest Q* − 1 the colour scale shows (rounding of the propagation lies below).
pub const FLOOR: f64 = 1e-16;

/// Stops of the "tide" colour ramp, low to high (sRGB).
const TIDE: [[f32; 3]; 5] =
    [[14.0, 24.0, 40.0], [24.0, 82.0, 100.0], [70.0, 146.0, 120.0], [200.0, 190.0, 118.0], [248.0, 242.0, 226.0]];

/// Colour of the contour lines.
pub const CONTOUR_COLOUR: Color32 = Color32::from_rgb(236, 96, 32);

/// The colour of t in [0, 1] (clamped; NaN gives mid grey, the "no value" colour).
pub fn tide(t: f64) -> Color32 {
    if t.is_nan() {
        return Color32::from_gray(128);
    }
    let x = t.clamp(0.0, 1.0) as f32 * (TIDE.len() - 1) as f32;
    let k = (x.floor() as usize).min(TIDE.len() - 2);
    let f = x - k as f32;
    let c = |i: usize| TIDE[k][i] + (TIDE[k + 1][i] - TIDE[k][i]) * f;
    Color32::from_rgb(c(0) as u8, c(1) as u8, c(2) as u8)
}

/// A value on a rectangular grid: `values[iy * xs.len() + ix]`, NaN where undefined.
#[derive(Debug, Clone, PartialEq)]
pub struct HeatGrid {
    /// Column coordinates (increasing), plot units.
    pub xs: Vec<f64>,
    /// Row coordinates (increasing), plot units.
    pub ys: Vec<f64>,
    /// Values, row by row (y outer).
    pub values: Vec<f64>,
}

impl HeatGrid {
    fn at(&self, ix: usize, iy: usize) -> f64 {
        self.values.get(iy * self.xs.len() + ix).copied().unwrap_or(f64::NAN)
    }

    /// The finite range of the values, if any.
    pub fn range(&self) -> Option<(f64, f64)> {
        let finite = self.values.iter().copied().filter(|v| v.is_finite());
        let (lo, hi) = finite.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| (a.min(v), b.max(v)));
        (lo <= hi).then_some((lo, hi))
    }

    /// The colour range: the finite range widened to at least one decade, or
    /// (-16, 0) when nothing is finite.
    pub fn colour_range(&self) -> (f64, f64) {
        self.range().map_or((-16.0, 0.0), |(lo, hi)| if hi > lo { (lo, hi) } else { (lo - 1.0, hi + 1.0) })
    }

    /// Width and height of one cell, plot units.
    fn cell(&self) -> (f64, f64) {
        let step = |v: &[f64]| if v.len() > 1 { (v[v.len() - 1] - v[0]) / (v.len() - 1) as f64 } else { 1.0 };
        (step(&self.xs), step(&self.ys))
    }
}

/// Line segments of the contour `value = level` (marching squares with linear
/// interpolation along cell edges; cells with an undefined corner are skipped).
pub fn contour(grid: &HeatGrid, level: f64) -> Vec<[[f64; 2]; 2]> {
    let mut out = Vec::new();
    let (nx, ny) = (grid.xs.len(), grid.ys.len());
    if nx < 2 || ny < 2 || !level.is_finite() {
        return out;
    }
    for iy in 0..ny - 1 {
        for ix in 0..nx - 1 {
            // Corners counter-clockwise from bottom-left.
            let corners = [(ix, iy), (ix + 1, iy), (ix + 1, iy + 1), (ix, iy + 1)];
            let v = corners.map(|(x, y)| grid.at(x, y));
            if v.iter().any(|x| !x.is_finite()) {
                continue;
            }
            let p = corners.map(|(x, y)| [grid.xs[x], grid.ys[y]]);
            let mut crossings: Vec<[f64; 2]> = Vec::with_capacity(4);
            for e in 0..4 {
                let (a, b) = (e, (e + 1) % 4);
                if (v[a] < level) != (v[b] < level) {
                    let f = (level - v[a]) / (v[b] - v[a]);
                    crossings.push([p[a][0] + f * (p[b][0] - p[a][0]), p[a][1] + f * (p[b][1] - p[a][1])]);
                }
            }
            match crossings.len() {
                2 => out.push([crossings[0], crossings[1]]),
                4 => {
                    // A saddle: the mean of the corners decides which pairs join.
                    let centre_below = v.iter().sum::<f64>() / 4.0 < level;
                    let below0 = v[0] < level;
                    if centre_below == below0 {
                        out.push([crossings[0], crossings[3]]);
                        out.push([crossings[1], crossings[2]]);
                    } else {
                        out.push([crossings[0], crossings[1]]);
                        out.push([crossings[2], crossings[3]]);
                    }
                }
                _ => {}
            }
        }
    }
    out
}

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

//! The one figure layer of Quenchless: line plots and heat maps written as SVG or PNG
//! (by the plotters crate) for talks and papers, from the app's figure exports and the
//! command line's `--plot` alike. Every figure has a title without paths, axes with
//! readable ticks and units, its legend or colour bar outside the data, the one colour
//! map ([`colour::tide`]) and range rule ([`grid::HeatGrid::colour_range`]) of every heat
//! map, and the one number formatter ([`number`]). PNG text is drawn with egui's bundled
//! Ubuntu Light, so no system font library is needed.

pub mod colour;
pub mod grid;
pub mod number;

use grid::{HeatGrid, contour};
use number::{label_step, tick_label};
use plotters::coord::Shift;
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use std::path::Path;
use std::sync::OnceLock;

pub use grid::HeatGrid as Grid;

/// A figure that could not be written.
#[derive(Debug, thiserror::Error)]
pub enum FigureError {
    /// The file name ends in neither .svg nor .png.
    #[error("{0}: the file must end in .svg or .png")]
    Format(String),
    /// Nothing to draw.
    #[error("{0}: nothing to draw ({1})")]
    Empty(String, String),
    /// The drawing or the file failed.
    #[error("{0}: {1}")]
    Draw(String, String),
}

/// One curve of a line figure, in pieces (gaps where its quantity is undefined).
#[derive(Debug, Clone, PartialEq)]
pub struct Series {
    /// Legend name; `None` keeps it out of the legend (a helper line).
    pub name: Option<String>,
    /// sRGB colour.
    pub colour: [u8; 3],
    /// Pieces of (x, y).
    pub pieces: Vec<Vec<(f64, f64)>>,
    /// Drawn dashed (for example the stretches where the trap inverts).
    pub dashed: bool,
}

/// A line figure.
#[derive(Debug, Clone, PartialEq)]
pub struct LineFigure {
    /// Title (no paths).
    pub title: String,
    /// x axis label with its unit.
    pub x_label: String,
    /// y axis label with its unit.
    pub y_label: String,
    /// The curves.
    pub series: Vec<Series>,
    /// A note under the legend (what dashed pieces mean), if any.
    pub note: Option<String>,
}

/// A heat map.
#[derive(Debug, Clone, PartialEq)]
pub struct HeatFigure {
    /// Title (no paths).
    pub title: String,
    /// x axis label with its unit.
    pub x_label: String,
    /// y axis label with its unit.
    pub y_label: String,
    /// The colour bar's label (the value and its unit or transform).
    pub value_label: String,
    /// The values.
    pub grid: HeatGrid,
    /// A level drawn as a contour, and its legend name.
    pub contour: Option<(f64, String)>,
    /// A point marked with a cross, and its legend name.
    pub mark: Option<((f64, f64), String)>,
}

/// Size of line figures and heat maps, pixels (PNG) or user units (SVG).
const SIZE: (u32, u32) = (1200, 600);
/// Width kept for the legend or the colour bar, right of the data.
const SIDE: u32 = 250;
const FONT: &str = "sans-serif";
/// Legend key of the marked point (drawn as a cross, not a line).
const MARK: [u8; 3] = [255, 255, 255];

/// Registers the embedded font once (PNG text; SVG names the family and the viewer
/// draws it).
fn font() -> Result<(), String> {
    static DONE: OnceLock<Result<(), String>> = OnceLock::new();
    DONE.get_or_init(|| {
        plotters::style::register_font(FONT, FontStyle::Normal, epaint_default_fonts::UBUNTU_LIGHT)
            .map_err(|_| "the embedded font could not be read".to_string())
    })
    .clone()
}

enum Kind {
    Svg,
    Png,
}

fn kind(path: &Path) -> Result<Kind, FigureError> {
    match path.extension().and_then(|e| e.to_str()).map(str::to_ascii_lowercase).as_deref() {
        Some("svg") => Ok(Kind::Svg),
        Some("png") => Ok(Kind::Png),
        _ => Err(FigureError::Format(path.display().to_string())),
    }
}

fn rgb([r, g, b]: [u8; 3]) -> RGBColor {
    RGBColor(r, g, b)
}

/// Something drawn on any plotters canvas.
trait Drawn {
    fn draw_on<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String>;
}

/// Writes `fig` on an SVG or PNG canvas, by the file's extension: first to a hidden
/// file beside it, renamed over `path` once complete, so a failed write never leaves
/// half a figure (nor destroys the old one).
fn write(path: &Path, fig: &impl Drawn) -> Result<(), FigureError> {
    let at = |e: String| FigureError::Draw(path.display().to_string(), e);
    font().map_err(at)?;
    let kind = kind(path)?;
    let name = path.file_name().map_or_else(|| "figure".into(), |n| n.to_string_lossy().into_owned());
    let ext = if matches!(kind, Kind::Svg) { "svg" } else { "png" };
    let partial = path.with_file_name(format!(".{name}.partial.{ext}"));
    let drawn = match kind {
        Kind::Svg => {
            let root = SVGBackend::new(&partial, SIZE).into_drawing_area();
            fig.draw_on(&root).and_then(|()| root.present().map_err(|e| e.to_string()))
        }
        Kind::Png => {
            let mut buf = vec![255_u8; (SIZE.0 * SIZE.1 * 3) as usize];
            let drawn = {
                let root = BitMapBackend::with_buffer(&mut buf, SIZE).into_drawing_area();
                fig.draw_on(&root).and_then(|()| root.present().map_err(|e| e.to_string()))
            };
            drawn.and_then(|()| {
                image::save_buffer_with_format(
                    &partial,
                    &buf,
                    SIZE.0,
                    SIZE.1,
                    image::ExtendedColorType::Rgb8,
                    image::ImageFormat::Png,
                )
                .map_err(|e| e.to_string())
            })
        }
    };
    let done = drawn.and_then(|()| std::fs::rename(&partial, path).map_err(|e| e.to_string()));
    if done.is_err() {
        let _ = std::fs::remove_file(&partial);
    }
    done.map_err(at)
}

struct Lines<'a>(&'a LineFigure, (f64, f64), (f64, f64));

impl Drawn for Lines<'_> {
    fn draw_on<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        draw_lines(root, self.0, self.1, self.2)
    }
}

impl Drawn for HeatFigure {
    fn draw_on<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        draw_heat(root, self)
    }
}

/// The data range of the pieces, widened a little, and never empty.
fn bounds(series: &[Series]) -> Option<((f64, f64), (f64, f64))> {
    let pts = series.iter().flat_map(|s| s.pieces.iter().flatten()).filter(|(x, y)| x.is_finite() && y.is_finite());
    let (mut x0, mut x1, mut y0, mut y1) = (f64::INFINITY, f64::NEG_INFINITY, f64::INFINITY, f64::NEG_INFINITY);
    for &(x, y) in pts {
        (x0, x1, y0, y1) = (x0.min(x), x1.max(x), y0.min(y), y1.max(y));
    }
    if x0 > x1 {
        return None;
    }
    let widen = |a: f64, b: f64, pad: f64| {
        if b > a {
            (a - pad * (b - a), b + pad * (b - a))
        } else {
            let d = if a == 0.0 { 1.0 } else { 0.05 * a.abs() };
            (a - d, b + d)
        }
    };
    Some((widen(x0, x1, 0.0), widen(y0, y1, 0.05)))
}

/// A line figure as SVG or PNG (by the extension of `path`).
pub fn save_lines(fig: &LineFigure, path: &Path) -> Result<(), FigureError> {
    let Some(((x0, x1), (y0, y1))) = bounds(&fig.series) else {
        return Err(FigureError::Empty(path.display().to_string(), "no finite point in any curve".into()));
    };
    write(path, &Lines(fig, (x0, x1), (y0, y1)))
}

/// The data area of a figure: title, axes with their labels and tick numbers, and
/// (for line figures) a light grid.
fn axes<'a, DB: DrawingBackend>(
    plot: &'a DrawingArea<DB, Shift>,
    [title, x_label, y_label]: [&str; 3],
    (x0, x1): (f64, f64),
    (y0, y1): (f64, f64),
    grid: bool,
) -> Result<ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>, String> {
    let e = |e: DrawingAreaErrorKind<DB::ErrorType>| e.to_string();
    let mut chart = ChartBuilder::on(plot)
        .caption(title, (FONT, 26))
        .margin(16)
        .x_label_area_size(56)
        .y_label_area_size(100)
        .build_cartesian_2d(x0..x1, y0..y1)
        .map_err(e)?;
    let (sx, sy) = (label_step(x1 - x0, 7), label_step(y1 - y0, 7));
    let x_fmt = |v: &f64| tick_label(*v, sx);
    let y_fmt = |v: &f64| tick_label(*v, sy);
    let mut mesh = chart.configure_mesh();
    mesh.x_desc(x_label)
        .y_desc(y_label)
        .x_labels(7)
        .y_labels(7)
        .x_label_formatter(&x_fmt)
        .y_label_formatter(&y_fmt)
        .label_style((FONT, 18))
        .axis_desc_style((FONT, 20))
        .light_line_style(RGBColor(236, 236, 236))
        .bold_line_style(RGBColor(212, 212, 212));
    if !grid {
        mesh.disable_mesh();
    }
    mesh.draw().map_err(e)?;
    Ok(chart)
}

fn draw_lines<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    fig: &LineFigure,
    (x0, x1): (f64, f64),
    (y0, y1): (f64, f64),
) -> Result<(), String> {
    let e = |e: DrawingAreaErrorKind<DB::ErrorType>| e.to_string();
    root.fill(&WHITE).map_err(e)?;
    let (w, _) = root.dim_in_pixel();
    let (plot, side) = root.split_horizontally(w - SIDE);
    let mut chart = axes(&plot, [&fig.title, &fig.x_label, &fig.y_label], (x0, x1), (y0, y1), true)?;
    for s in &fig.series {
        let style = ShapeStyle::from(&rgb(s.colour)).stroke_width(3);
        for piece in &s.pieces {
            if s.dashed {
                chart.draw_series(DashedLineSeries::new(piece.iter().copied(), 10, 6, style)).map_err(e)?;
            } else {
                chart.draw_series(LineSeries::new(piece.iter().copied(), style)).map_err(e)?;
            }
        }
    }
    // The legend beside the data, once per named curve.
    let mut y = 60;
    let mut named: Vec<(&str, [u8; 3], bool)> = Vec::new();
    for s in &fig.series {
        if let Some(n) = &s.name
            && !named.iter().any(|(m, c, _)| *m == n.as_str() && *c == s.colour)
        {
            named.push((n, s.colour, s.dashed));
        }
    }
    for (name, colour, dashed) in named {
        let style = ShapeStyle::from(&rgb(colour)).stroke_width(3);
        let line = if dashed { vec![(8, y), (20, y)] } else { vec![(8, y), (40, y)] };
        side.draw(&PathElement::new(line, style)).map_err(e)?;
        if dashed {
            side.draw(&PathElement::new(vec![(28, y), (40, y)], style)).map_err(e)?;
        }
        side.draw(&Text::new(shorten(name, 22), (48, y - 10), (FONT, 18))).map_err(e)?;
        y += 28;
    }
    if let Some(note) = &fig.note {
        let mut line_y = y + 8;
        for line in wrap(note, 26) {
            side.draw(&Text::new(line, (8, line_y), (FONT, 16).into_font().color(&RGBColor(90, 90, 90)))).map_err(e)?;
            line_y += 22;
        }
    }
    Ok(())
}

/// A heat map with its colour bar as SVG or PNG (by the extension of `path`).
pub fn save_heat(fig: &HeatFigure, path: &Path) -> Result<(), FigureError> {
    let g = &fig.grid;
    if g.xs.is_empty() || g.ys.is_empty() || g.values.len() != g.xs.len() * g.ys.len() {
        return Err(FigureError::Empty(
            path.display().to_string(),
            format!("{} x {} grid with {} values", g.xs.len(), g.ys.len(), g.values.len()),
        ));
    }
    write(path, fig)
}

fn draw_heat<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, fig: &HeatFigure) -> Result<(), String> {
    let e = |e: DrawingAreaErrorKind<DB::ErrorType>| e.to_string();
    root.fill(&WHITE).map_err(e)?;
    let g = &fig.grid;
    let (dx, dy) = g.cell();
    let (x0, x1) = (g.xs[0] - 0.5 * dx, g.xs[g.xs.len() - 1] + 0.5 * dx);
    let (y0, y1) = (g.ys[0] - 0.5 * dy, g.ys[g.ys.len() - 1] + 0.5 * dy);
    let (lo, hi) = g.colour_range();
    let (w, _) = root.dim_in_pixel();
    let (plot, side) = root.split_horizontally(w - SIDE);
    let mut chart = axes(&plot, [&fig.title, &fig.x_label, &fig.y_label], (x0, x1), (y0, y1), false)?;
    let span = (hi - lo).max(f64::MIN_POSITIVE);
    let cells = (0..g.ys.len()).flat_map(|iy| (0..g.xs.len()).map(move |ix| (ix, iy)));
    chart
        .draw_series(cells.map(|(ix, iy)| {
            let (x, y) = (g.xs[ix], g.ys[iy]);
            let c = colour::tide((g.at(ix, iy) - lo) / span);
            Rectangle::new([(x - 0.5 * dx, y - 0.5 * dy), (x + 0.5 * dx, y + 0.5 * dy)], rgb(c).filled())
        }))
        .map_err(e)?;
    let mut legend: Vec<(String, [u8; 3])> = Vec::new();
    if let Some((level, name)) = &fig.contour {
        let style = ShapeStyle::from(&rgb(colour::CONTOUR)).stroke_width(3);
        let segments = contour(g, *level);
        chart
            .draw_series(segments.iter().map(|[a, b]| PathElement::new(vec![(a[0], a[1]), (b[0], b[1])], style)))
            .map_err(e)?;
        legend.push((name.clone(), colour::CONTOUR));
    }
    if let Some(((x, y), name)) = &fig.mark {
        let white = ShapeStyle::from(&WHITE).stroke_width(3);
        chart.draw_series(std::iter::once(Cross::new((*x, *y), 9, white))).map_err(e)?;
        legend.push((name.clone(), MARK));
    }
    // The colour bar with its numbers, right of the map.
    let (bar, rest) = side.split_vertically(SIZE.1 - 120);
    let mut cb = ChartBuilder::on(&bar)
        .margin_top(60)
        .margin_bottom(40)
        .margin_right(10)
        .y_label_area_size(70)
        .build_cartesian_2d(0.0..1.0, lo..hi)
        .map_err(e)?;
    let sv = label_step(hi - lo, 7);
    cb.configure_mesh()
        .disable_mesh()
        .disable_x_axis()
        .y_labels(7)
        .y_label_formatter(&|v| tick_label(*v, sv))
        .y_desc(&fig.value_label)
        .label_style((FONT, 16))
        .axis_desc_style((FONT, 18))
        .draw()
        .map_err(e)?;
    let steps = 120;
    cb.draw_series((0..steps).map(|k| {
        let a = lo + (hi - lo) * f64::from(k) / f64::from(steps);
        let b = lo + (hi - lo) * f64::from(k + 1) / f64::from(steps);
        Rectangle::new([(0.25, a), (0.85, b)], rgb(colour::tide((f64::from(k) + 0.5) / f64::from(steps))).filled())
    }))
    .map_err(e)?;
    let mut y = 20;
    for (name, c) in &legend {
        if *c == MARK {
            rest.draw(&Cross::new((24, y), 7, ShapeStyle::from(&RGBColor(40, 40, 40)).stroke_width(3))).map_err(e)?;
        } else {
            rest.draw(&PathElement::new(vec![(8, y), (40, y)], ShapeStyle::from(&rgb(*c)).stroke_width(3)))
                .map_err(e)?;
        }
        rest.draw(&Text::new(shorten(name, 22), (48, y - 10), (FONT, 16))).map_err(e)?;
        y += 28;
    }
    Ok(())
}

/// A name cut to `n` characters with an ellipsis.
fn shorten(name: &str, n: usize) -> String {
    if name.chars().count() <= n {
        name.to_string()
    } else {
        format!("{}…", name.chars().take(n - 1).collect::<String>())
    }
}

/// Words wrapped to lines of at most `n` characters.
fn wrap(text: &str, n: usize) -> Vec<String> {
    let mut lines = vec![String::new()];
    for word in text.split_whitespace() {
        let last = lines.last_mut().map_or(0, |l| l.chars().count());
        if last > 0 && last + 1 + word.chars().count() > n {
            lines.push(String::new());
        }
        if let Some(l) = lines.last_mut() {
            if !l.is_empty() {
                l.push(' ');
            }
            l.push_str(word);
        }
    }
    lines
}

//! Pictures of robustness and noise maps: a PNG raster (no text) and an SVG with axes,
//! a colour bar and the tolerance contour. Colour encodes log10(Q* - 1), or
//! log10(E/E_ad - 1) for a noise map.

use crate::CommandError;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::design::{NoiseMap, RobustnessMap};
use quenchless_physics::ramp::{Ramp, RampShape};
use quenchless_profile::storage::write_atomically;
use std::fmt::Write;
use std::path::Path;

/// The app's colour map ("tide", dark = frictionless to pale = strongly excited): one
/// colour map for the CLI's figures and the app's heat maps.
fn colour(t: f64) -> [u8; 3] {
    let [r, g, b, _] = quenchless_app::heatmap::tide(t).to_array();
    [r, g, b]
}

/// A map ready to draw: `ny` rows of `nx` cells, row 0 at the bottom.
struct HeatMap {
    nx: usize,
    ny: usize,
    /// log10 of the excess of every cell.
    level: Vec<f64>,
    /// Cells within tolerance.
    inside: Vec<bool>,
    /// Axis ends and names.
    x: (f64, f64, &'static str),
    y: (f64, f64, &'static str),
    title: String,
    contour: String,
}

impl HeatMap {
    fn of_robustness(map: &RobustnessMap, tol: f64, title: &str) -> Self {
        let n = map.calibration_errors.len();
        let (emax, dmax) = (map.calibration_errors[n - 1] * 100.0, map.duration_errors[n - 1] * 100.0);
        Self {
            nx: n,
            ny: n,
            level: map.q_star_minus_one.iter().map(|e| e.max(1e-16).log10()).collect(),
            inside: map.q_star_minus_one.iter().map(|&e| e <= tol).collect(),
            x: (-emax, emax, "calibration error e (%)"),
            y: (-dmax, dmax, "duration error d (%)"),
            title: format!("Robustness of {}: log10(Q* - 1)", xml(title)),
            contour: format!("white line: Q* - 1 = {tol:e}"),
        }
    }

    fn of_noise(map: &NoiseMap, tol: f64, title: &str) -> Self {
        let n = map.dephasing_rates.len();
        Self {
            nx: n,
            ny: map.amplitude_psds.len(),
            level: map.energy_ratio_minus_one.iter().map(|e| e.max(1e-16).log10()).collect(),
            inside: map.energy_ratio_minus_one.iter().map(|&e| e <= tol).collect(),
            x: (0.0, map.dephasing_rates[n - 1], "dephasing rate (1/s)"),
            y: (0.0, map.amplitude_psds[map.amplitude_psds.len() - 1], "amplitude-noise density S (s)"),
            title: format!("Noise on {}: log10(E / E_adiabatic - 1)", xml(title)),
            contour: format!("white line: E / E_adiabatic - 1 = {tol:e}"),
        }
    }

    /// The colour range.
    fn range(&self) -> (f64, f64) {
        let lo = self.level.iter().copied().fold(f64::INFINITY, f64::min).max(-16.0);
        let hi = self.level.iter().copied().fold(f64::NEG_INFINITY, f64::max).max(lo + 1.0);
        (lo, hi)
    }

    fn edge_right(&self, k: usize) -> bool {
        (k % self.nx) + 1 < self.nx && self.inside[k] != self.inside[k + 1]
    }

    fn edge_up(&self, k: usize) -> bool {
        k / self.nx + 1 < self.ny && self.inside[k] != self.inside[k + self.nx]
    }
}

fn tick(v: f64) -> String {
    if v == 0.0 || (0.1..1000.0).contains(&v.abs()) { format!("{v:+.1}") } else { format!("{v:.2e}") }
}

/// PNG: the map (cells scaled to about 512 px), a white tolerance contour, and a
/// colour bar on the right.
fn write_png(m: &HeatMap, path: &Path) -> Result<(), CommandError> {
    let s = (512 / m.nx.max(m.ny)).max(1) as u32;
    let (sw, sh) = (s * m.nx as u32, s * m.ny as u32);
    let (w, h) = (sw + 40, sh);
    let (lo, hi) = m.range();
    let mut img = image::RgbImage::from_pixel(w, h, image::Rgb([255, 255, 255]));
    for iy in 0..m.ny {
        for ix in 0..m.nx {
            let k = iy * m.nx + ix;
            let c = colour((m.level[k] - lo) / (hi - lo));
            let (er, eu) = (m.edge_right(k), m.edge_up(k));
            for dy in 0..s {
                for dx in 0..s {
                    // Row 0 of the map at the bottom.
                    let y = sh - 1 - (iy as u32 * s + dy);
                    let px = if (er && dx == s - 1) || (eu && dy == s - 1) { [255, 255, 255] } else { c };
                    img.put_pixel(ix as u32 * s + dx, y, image::Rgb(px));
                }
            }
        }
    }
    for y in 0..h {
        let c = colour(1.0 - f64::from(y) / f64::from(h - 1));
        for x in sw + 12..sw + 32 {
            img.put_pixel(x, y, image::Rgb(c));
        }
    }
    let mut bytes = Vec::new();
    img.write_to(&mut std::io::Cursor::new(&mut bytes), image::ImageFormat::Png).map_err(CommandError::from)?;
    write_atomically(path, &bytes)?;
    Ok(())
}

/// SVG at publication size (about 16 x 13 cm) with axes, colour bar and contour.
fn write_svg(m: &HeatMap, path: &Path) -> Result<(), CommandError> {
    let (x0, y0, side) = (90.0, 40.0, 400.0);
    let (cw, ch) = (side / m.nx as f64, side / m.ny as f64);
    let (lo, hi) = m.range();
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="610" height="500" viewBox="0 0 610 500" font-family="sans-serif" font-size="13">"#
    );
    let _ = writeln!(s, r#"<rect width="610" height="500" fill="white"/>"#);
    let _ =
        writeln!(s, r#"<text x="{}" y="24" text-anchor="middle" font-size="14">{}</text>"#, x0 + side / 2.0, m.title);
    let mut d = String::new();
    for iy in 0..m.ny {
        for ix in 0..m.nx {
            let k = iy * m.nx + ix;
            let [r, g, b] = colour((m.level[k] - lo) / (hi - lo));
            let (x, y) = (x0 + ix as f64 * cw, y0 + side - (iy + 1) as f64 * ch);
            let _ = writeln!(
                s,
                r#"<rect x="{x:.3}" y="{y:.3}" width="{:.3}" height="{:.3}" fill="rgb({r},{g},{b})"/>"#,
                cw + 0.05,
                ch + 0.05
            );
            // Tolerance contour along cell edges.
            if m.edge_right(k) {
                let _ = write!(d, "M{:.3} {:.3}V{:.3}", x + cw, y, y + ch);
            }
            if m.edge_up(k) {
                let _ = write!(d, "M{x:.3} {y:.3}H{:.3}", x + cw);
            }
        }
    }
    let _ = writeln!(s, r#"<path d="{d}" stroke="white" stroke-width="2" fill="none"/>"#);
    let _ = writeln!(s, r#"<rect x="{x0}" y="{y0}" width="{side}" height="{side}" fill="none" stroke="black"/>"#);
    for frac in [0.0, 0.5, 1.0] {
        let (vx, vy) = (m.x.0 + frac * (m.x.1 - m.x.0), m.y.0 + frac * (m.y.1 - m.y.0));
        let x = x0 + frac * side;
        let y = y0 + side - frac * side;
        let _ = writeln!(
            s,
            r#"<line x1="{x}" y1="{}" x2="{x}" y2="{}" stroke="black"/><text x="{x}" y="{}" text-anchor="middle">{}</text>"#,
            y0 + side,
            y0 + side + 5.0,
            y0 + side + 20.0,
            tick(vx)
        );
        let _ = writeln!(
            s,
            r#"<line x1="{}" y1="{y}" x2="{x0}" y2="{y}" stroke="black"/><text x="{}" y="{}" text-anchor="end">{}</text>"#,
            x0 - 5.0,
            x0 - 8.0,
            y + 4.0,
            tick(vy)
        );
    }
    let _ =
        writeln!(s, r#"<text x="{}" y="{}" text-anchor="middle">{}</text>"#, x0 + side / 2.0, y0 + side + 40.0, m.x.2);
    let _ = writeln!(
        s,
        r#"<text x="20" y="{}" text-anchor="middle" transform="rotate(-90 20 {})">{}</text>"#,
        y0 + side / 2.0,
        y0 + side / 2.0,
        m.y.2
    );
    let bx = x0 + side + 30.0;
    for k in 0..100 {
        let [r, g, b] = colour(1.0 - f64::from(k) / 99.0);
        let _ = writeln!(
            s,
            r#"<rect x="{bx}" y="{:.2}" width="20" height="{:.2}" fill="rgb({r},{g},{b})"/>"#,
            y0 + side * f64::from(k) / 100.0,
            side / 100.0 + 0.05
        );
    }
    for frac in [0.0, 0.5, 1.0] {
        let val = hi - frac * (hi - lo);
        let _ = writeln!(s, r#"<text x="{}" y="{}">{val:.1}</text>"#, bx + 26.0, y0 + frac * side + 4.0);
    }
    let _ = writeln!(s, r#"<text x="{x0}" y="{}" font-size="11">{}</text>"#, y0 + side + 58.0, m.contour);
    let _ = writeln!(s, "</svg>");
    write_atomically(path, s.as_bytes())?;
    Ok(())
}

/// PNG of a robustness map with the tolerance contour.
pub fn write_map_png(map: &RobustnessMap, tol: f64, path: &Path) -> Result<(), CommandError> {
    write_png(&HeatMap::of_robustness(map, tol, ""), path)
}

/// SVG of a robustness map.
pub fn write_map_svg(map: &RobustnessMap, tol: f64, title: &str, path: &Path) -> Result<(), CommandError> {
    write_svg(&HeatMap::of_robustness(map, tol, title), path)
}

/// PNG of a noise map with the tolerance contour.
pub fn write_noise_png(map: &NoiseMap, tol: f64, path: &Path) -> Result<(), CommandError> {
    write_png(&HeatMap::of_noise(map, tol, ""), path)
}

/// SVG of a noise map.
pub fn write_noise_svg(map: &NoiseMap, tol: f64, title: &str, path: &Path) -> Result<(), CommandError> {
    write_svg(&HeatMap::of_noise(map, tol, title), path)
}

/// SVG of a ramp: omega/2 pi (kHz) against time (us), with omega² < 0 stretches drawn
/// at zero and shaded, about 16 x 10 cm.
pub fn write_ramp_svg(ramp: &Ramp, title: &str, path: &Path) -> Result<(), CommandError> {
    let (x0, y0, w, h) = (80.0, 40.0, 480.0, 260.0);
    let times = ramp.grid_with_breakpoints(1500);
    // Held ramps: draw each hold as a flat step (value just before and at each break).
    let mut pts: Vec<(f64, f64)> = Vec::with_capacity(2 * times.len());
    let nu = |t: f64| ramp.omega2(t).max(0.0).sqrt() / TWO_PI / 1e3;
    for (k, &t) in times.iter().enumerate() {
        if ramp.is_piecewise_constant() && k > 0 {
            pts.push((t, nu(0.5 * (times[k - 1] + t))));
        }
        pts.push((t, nu(t)));
    }
    let tau = ramp.duration();
    let (nu_i, nu_f) = (ramp.omega_initial() / TWO_PI / 1e3, ramp.omega_final() / TWO_PI / 1e3);
    let top = pts.iter().map(|p| p.1).fold(nu_i.max(nu_f), f64::max) * 1.1;
    // The trap before and after the ramp, over 8 % of its duration each side.
    let (t_lo, t_hi) = (-0.08 * tau, 1.08 * tau);
    let (sx, sy) = (w / ((t_hi - t_lo) * 1e6), h / top);
    let px = |t: f64| x0 + (t - t_lo) * 1e6 * sx;
    let py = |v: f64| y0 + h - v * sy;
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="600" height="360" viewBox="0 0 600 360" font-family="sans-serif" font-size="13">"#
    );
    let _ = writeln!(s, r#"<rect width="600" height="360" fill="white"/>"#);
    let _ =
        writeln!(s, r#"<text x="{}" y="24" text-anchor="middle" font-size="14">{}</text>"#, x0 + w / 2.0, xml(title));
    for (i, &t) in times.iter().enumerate().skip(1) {
        if ramp.omega2(0.5 * (times[i - 1] + t)) < 0.0 {
            let _ = writeln!(
                s,
                r#"<rect x="{:.2}" y="{y0}" width="{:.2}" height="{h}" fill="rgb(236,200,200)"/>"#,
                px(times[i - 1]),
                px(t) - px(times[i - 1])
            );
        }
    }
    let mut d = String::new();
    for (k, (t, v)) in pts.iter().enumerate() {
        let _ = write!(d, "{}{:.2} {:.2}", if k == 0 { "M" } else { "L" }, px(*t), py(*v));
    }
    let _ = writeln!(s, r#"<path d="{d}" stroke="rgb(28,86,138)" stroke-width="2" fill="none"/>"#);
    let (first, last) = (pts.first().map_or(nu_i, |p| p.1), pts.last().map_or(nu_f, |p| p.1));
    let _ = writeln!(
        s,
        r#"<path d="M{:.2} {:.2}H{:.2}V{:.2}M{:.2} {:.2}V{:.2}H{:.2}" stroke="rgb(120,120,120)" stroke-width="1.5" stroke-dasharray="4 3" fill="none"/>"#,
        px(t_lo),
        py(nu_i),
        px(0.0),
        py(first),
        px(tau),
        py(last),
        py(nu_f),
        px(t_hi)
    );
    let _ = writeln!(s, r#"<rect x="{x0}" y="{y0}" width="{w}" height="{h}" fill="none" stroke="black"/>"#);
    for frac in [0.0, 0.25, 0.5, 0.75, 1.0] {
        let (t, v) = (frac * tau * 1e6, frac * top);
        let (x, yb, y) = (px(frac * tau), y0 + h, y0 + h - frac * h);
        let _ = writeln!(
            s,
            r#"<line x1="{x:.2}" y1="{yb}" x2="{x:.2}" y2="{}" stroke="black"/><text x="{x:.2}" y="{}" text-anchor="middle">{t:.3}</text>"#,
            yb + 5.0,
            yb + 20.0
        );
        let _ = writeln!(
            s,
            r#"<line x1="{}" y1="{y:.2}" x2="{x0}" y2="{y:.2}" stroke="black"/><text x="{}" y="{:.2}" text-anchor="end">{v:.1}</text>"#,
            x0 - 5.0,
            x0 - 8.0,
            y + 4.0
        );
    }
    let _ = writeln!(s, r#"<text x="{}" y="{}" text-anchor="middle">t (µs)</text>"#, x0 + w / 2.0, y0 + h + 40.0);
    let _ = writeln!(
        s,
        r#"<text x="22" y="{}" text-anchor="middle" transform="rotate(-90 22 {})">trap frequency ω/2π (kHz)</text>"#,
        y0 + h / 2.0,
        y0 + h / 2.0
    );
    let _ = writeln!(
        s,
        r#"<text x="{x0}" y="{}" font-size="11">dashed: the trap before and after the ramp; shaded: ω² &lt; 0 (inverted, drawn at 0)</text>"#,
        y0 + h + 58.0
    );
    let _ = writeln!(s, "</svg>");
    write_atomically(path, s.as_bytes())?;
    Ok(())
}

fn xml(s: &str) -> String {
    s.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;").replace('"', "&quot;")
}

//! Pictures of robustness maps: a PNG raster (no text) and an SVG with axes, a colour
//! bar and the tolerance contour. Colour encodes log10(Q* - 1).

use crate::CommandError;
use quenchless_physics::design::RobustnessMap;
use quenchless_profile::storage::write_atomically;
use std::fmt::Write;
use std::path::Path;

/// Colour stops of the map, from "frictionless" (dark) to "strongly excited" (pale).
const STOPS: [[f64; 3]; 5] =
    [[18.0, 22.0, 58.0], [28.0, 86.0, 138.0], [38.0, 158.0, 148.0], [178.0, 208.0, 108.0], [250.0, 238.0, 196.0]];

fn colour(t: f64) -> [u8; 3] {
    let t = t.clamp(0.0, 1.0) * (STOPS.len() - 1) as f64;
    let i = (t.floor() as usize).min(STOPS.len() - 2);
    let f = t - i as f64;
    let mut c = [0u8; 3];
    for k in 0..3 {
        c[k] = (STOPS[i][k] + f * (STOPS[i + 1][k] - STOPS[i][k])).round() as u8;
    }
    c
}

/// log10(Q* - 1) of every point and the colour range.
fn levels(map: &RobustnessMap) -> (Vec<f64>, f64, f64) {
    let v: Vec<f64> = map.q_star.iter().map(|q| (q - 1.0).max(1e-16).log10()).collect();
    let lo = v.iter().copied().fold(f64::INFINITY, f64::min).max(-16.0);
    let hi = v.iter().copied().fold(f64::NEG_INFINITY, f64::max).max(lo + 1.0);
    (v, lo, hi)
}

fn inside(map: &RobustnessMap, tol: f64, k: usize) -> bool {
    map.q_star[k] - 1.0 <= tol
}

/// PNG: the map (cells scaled to about 512 px), a white tolerance contour, and a
/// colour bar on the right.
pub fn write_map_png(map: &RobustnessMap, tol: f64, path: &Path) -> Result<(), CommandError> {
    let n = map.calibration_errors.len();
    let s = (512 / n).max(1) as u32;
    let side = s * n as u32;
    let (w, h) = (side + 40, side);
    let (v, lo, hi) = levels(map);
    let mut img = image::RgbImage::from_pixel(w, h, image::Rgb([255, 255, 255]));
    for i_d in 0..n {
        for i_c in 0..n {
            let k = i_d * n + i_c;
            let c = colour((v[k] - lo) / (hi - lo));
            let edge = (i_c + 1 < n && inside(map, tol, k) != inside(map, tol, k + 1))
                || (i_d + 1 < n && inside(map, tol, k) != inside(map, tol, k + n));
            for dy in 0..s {
                for dx in 0..s {
                    // Row 0 of the map (most negative duration error) at the bottom.
                    let y = side - 1 - (i_d as u32 * s + dy);
                    let px = if edge && (dx == s - 1 || dy == s - 1) { [255, 255, 255] } else { c };
                    img.put_pixel(i_c as u32 * s + dx, y, image::Rgb(px));
                }
            }
        }
    }
    for y in 0..h {
        let c = colour(1.0 - f64::from(y) / f64::from(h - 1));
        for x in side + 12..side + 32 {
            img.put_pixel(x, y, image::Rgb(c));
        }
    }
    let mut bytes = Vec::new();
    img.write_to(&mut std::io::Cursor::new(&mut bytes), image::ImageFormat::Png).map_err(CommandError::from)?;
    write_atomically(path, &bytes)?;
    Ok(())
}

/// SVG at publication size (about 16 x 13 cm) with axes, colour bar and contour.
pub fn write_map_svg(map: &RobustnessMap, tol: f64, title: &str, path: &Path) -> Result<(), CommandError> {
    let n = map.calibration_errors.len();
    let (x0, y0, side) = (80.0, 40.0, 400.0);
    let cell = side / n as f64;
    let (v, lo, hi) = levels(map);
    let (emax, dmax) = (map.calibration_errors[n - 1] * 100.0, map.duration_errors[n - 1] * 100.0);
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="600" height="500" viewBox="0 0 600 500" font-family="sans-serif" font-size="13">"#
    );
    let _ = writeln!(s, r#"<rect width="600" height="500" fill="white"/>"#);
    let _ = writeln!(
        s,
        r#"<text x="{}" y="24" text-anchor="middle" font-size="14">Robustness of {}: log10(Q* - 1)</text>"#,
        x0 + side / 2.0,
        xml(title)
    );
    for i_d in 0..n {
        for i_c in 0..n {
            let k = i_d * n + i_c;
            let [r, g, b] = colour((v[k] - lo) / (hi - lo));
            let (x, y) = (x0 + i_c as f64 * cell, y0 + side - (i_d + 1) as f64 * cell);
            let _ = writeln!(
                s,
                r#"<rect x="{x:.3}" y="{y:.3}" width="{:.3}" height="{:.3}" fill="rgb({r},{g},{b})"/>"#,
                cell + 0.05,
                cell + 0.05
            );
        }
    }
    // Tolerance contour along cell edges.
    let mut d = String::new();
    for i_d in 0..n {
        for i_c in 0..n {
            let k = i_d * n + i_c;
            let (x, y) = (x0 + i_c as f64 * cell, y0 + side - (i_d + 1) as f64 * cell);
            if i_c + 1 < n && inside(map, tol, k) != inside(map, tol, k + 1) {
                let _ = write!(d, "M{:.3} {:.3}V{:.3}", x + cell, y, y + cell);
            }
            if i_d + 1 < n && inside(map, tol, k) != inside(map, tol, k + n) {
                let _ = write!(d, "M{x:.3} {y:.3}H{:.3}", x + cell);
            }
        }
    }
    let _ = writeln!(s, r#"<path d="{d}" stroke="white" stroke-width="2" fill="none"/>"#);
    let _ = writeln!(s, r#"<rect x="{x0}" y="{y0}" width="{side}" height="{side}" fill="none" stroke="black"/>"#);
    for (frac, label_e, label_d) in [(0.0, -emax, -dmax), (0.5, 0.0, 0.0), (1.0, emax, dmax)] {
        let x = x0 + frac * side;
        let y = y0 + side - frac * side;
        let _ = writeln!(
            s,
            r#"<line x1="{x}" y1="{}" x2="{x}" y2="{}" stroke="black"/><text x="{x}" y="{}" text-anchor="middle">{label_e:+.1}</text>"#,
            y0 + side,
            y0 + side + 5.0,
            y0 + side + 20.0
        );
        let _ = writeln!(
            s,
            r#"<line x1="{}" y1="{y}" x2="{x0}" y2="{y}" stroke="black"/><text x="{}" y="{}" text-anchor="end">{label_d:+.1}</text>"#,
            x0 - 5.0,
            x0 - 8.0,
            y + 4.0
        );
    }
    let _ = writeln!(
        s,
        r#"<text x="{}" y="{}" text-anchor="middle">calibration error e (%)</text>"#,
        x0 + side / 2.0,
        y0 + side + 40.0
    );
    let _ = writeln!(
        s,
        r#"<text x="20" y="{}" text-anchor="middle" transform="rotate(-90 20 {})">duration error d (%)</text>"#,
        y0 + side / 2.0,
        y0 + side / 2.0
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
    let _ =
        writeln!(s, r#"<text x="{}" y="{}" font-size="11">white line: Q* - 1 = {tol:e}</text>"#, x0, y0 + side + 58.0);
    let _ = writeln!(s, "</svg>");
    write_atomically(path, s.as_bytes())?;
    Ok(())
}

fn xml(s: &str) -> String {
    s.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;").replace('"', "&quot;")
}

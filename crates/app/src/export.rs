//! Exports: CSV waveforms through the profile crate (with provenance lines), plots as
//! hand-written SVG at publication size, and PNG crops of window screenshots.

use crate::compute::{CandidateOutcome, Curve};
use crate::units::sci;
use egui_plot::PlotPoint;
use quenchless_physics::limits::ViolationKind;
use quenchless_physics::ramp::Ramp;
use quenchless_profile::Study;
use quenchless_profile::waveform::{ExportColumns, write_waveform};
use std::fmt::Write as _;
use std::path::Path;

/// The caution shown before the first export of a session.
pub const SAFETY_CAUTION: &str = "Exported waveforms can drive high-voltage trap electrodes and high-power lasers. \
Before playing one, check it against your apparatus limits and interlocks, and follow your local laser and \
electrical safety rules and your lab's licensed practice. Quenchless flags ramps that break the limits stated \
in the study; it never clips them, and it knows nothing about limits you have not stated.";

/// Provenance lines written as `#` comments at the top of an exported waveform.
pub fn provenance(study: &Study, name: &str, outcome: &CandidateOutcome, rate: f64) -> Vec<String> {
    let r = &outcome.evaluation.report;
    let t = &study.trap;
    let opt = |v: Option<f64>, unit: &str| v.map_or_else(|| "not stated".to_string(), |x| format!("{} {unit}", sci(x)));
    let mut lines = vec![
        format!("written by Quenchless {}", env!("CARGO_PKG_VERSION")),
        format!("study: {}", study.name),
        format!("candidate: {name} ({})", outcome.ramp.family_name()),
        format!("sample rate: {} samples/s", sci(rate)),
        format!(
            "verdict: Q* - 1 = {} with tolerance {} -> {}",
            sci(r.q_star - 1.0),
            sci(r.tolerance),
            if r.energy_diagonal { "energy-diagonal" } else { "NOT energy-diagonal" }
        ),
        format!(
            "stated limits: lowest {}, highest {}, slew {}",
            opt(t.lowest_frequency_hz, "Hz"),
            opt(t.highest_frequency_hz, "Hz"),
            opt(t.slew_limit_hz_per_s, "Hz/s")
        ),
        format!("min omega^2 = {} (rad/s)^2 at t = {} s", sci(r.min_omega2), sci(r.min_omega2_time_s)),
    ];
    if r.within_limits() {
        lines.push("limit check: passed (stated bounds and slew respected)".into());
    } else {
        for v in r.violations.iter().filter(|v| v.kind != ViolationKind::Inverted) {
            lines.push(format!(
                "limit check: FAILED, {} from {} s to {} s (worst {})",
                v.kind.describe(),
                sci(v.start),
                sci(v.end),
                sci(v.worst)
            ));
        }
    }
    if r.inverts() {
        lines.push("note: omega^2 <= 0 during the ramp (inverted trap); values are omega^2".into());
    }
    lines.push("check this waveform against apparatus limits and interlocks before use".into());
    lines
}

/// Writes one ramp as CSV; returns the number of rows.
pub fn export_waveform(
    path: &Path,
    ramp: &Ramp,
    rate: f64,
    columns: ExportColumns,
    provenance: &[String],
) -> Result<usize, String> {
    write_waveform(path, ramp, rate, columns, provenance).map_err(|e| e.to_string())
}

/// One series of an SVG plot.
pub struct SvgSeries<'a> {
    /// Legend name.
    pub name: &'a str,
    /// sRGB colour.
    pub colour: [u8; 3],
    /// Pieces of the curve.
    pub curve: &'a Curve,
    /// Dashed stroke.
    pub dashed: bool,
}

fn nice_ticks(lo: f64, hi: f64) -> Vec<f64> {
    let span = (hi - lo).abs().max(1e-300);
    let raw = span / 5.0;
    let mag = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 5.0, 10.0].iter().map(|m| m * mag).find(|s| *s >= raw).unwrap_or(10.0 * mag);
    let mut t = (lo / step).ceil() * step;
    let mut out = Vec::new();
    while t <= hi + 1e-9 * step && out.len() < 20 {
        out.push(if t.abs() < 1e-12 * step { 0.0 } else { t });
        t += step;
    }
    out
}

fn esc(s: &str) -> String {
    s.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;")
}

/// A plot as SVG, 160 mm × 100 mm (a journal column and a half), with axes, ticks,
/// labels and a legend.
pub fn plot_svg(title: &str, x_label: &str, y_label: &str, series: &[SvgSeries<'_>]) -> String {
    let (w, h) = (640.0_f64, 400.0_f64);
    let (l, r, t, b) = (70.0, 20.0, 34.0, 50.0);
    let pts = || series.iter().flat_map(|s| s.curve.iter().flatten());
    let (mut x0, mut x1, mut y0, mut y1) = (f64::INFINITY, f64::NEG_INFINITY, f64::INFINITY, f64::NEG_INFINITY);
    for p in pts() {
        x0 = x0.min(p.x);
        x1 = x1.max(p.x);
        y0 = y0.min(p.y);
        y1 = y1.max(p.y);
    }
    if !(x0.is_finite() && x1.is_finite()) {
        (x0, x1, y0, y1) = (0.0, 1.0, 0.0, 1.0);
    }
    if x1 - x0 <= 0.0 {
        x1 = x0 + 1.0;
    }
    let pad = ((y1 - y0).abs() * 0.05).max(1e-12 * y1.abs().max(1.0));
    (y0, y1) = (y0 - pad, y1 + pad);
    let sx = |x: f64| l + (x - x0) / (x1 - x0) * (w - l - r);
    let sy = |y: f64| h - b - (y - y0) / (y1 - y0) * (h - t - b);
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="160mm" height="100mm" viewBox="0 0 {w} {h}" font-family="sans-serif" font-size="12">"#
    );
    let _ = writeln!(s, r#"<rect width="{w}" height="{h}" fill="white"/>"#);
    let _ = writeln!(s, r#"<text x="{l}" y="20" font-size="14">{}</text>"#, esc(title));
    let _ = writeln!(
        s,
        r#"<rect x="{l}" y="{t}" width="{}" height="{}" fill="none" stroke="black"/>"#,
        w - l - r,
        h - t - b
    );
    for x in nice_ticks(x0, x1) {
        let px = sx(x);
        let _ = writeln!(
            s,
            r#"<line x1="{px:.1}" y1="{:.1}" x2="{px:.1}" y2="{:.1}" stroke="black"/><text x="{px:.1}" y="{:.1}" text-anchor="middle">{}</text>"#,
            h - b,
            h - b + 5.0,
            h - b + 18.0,
            sci_short(x)
        );
    }
    for y in nice_ticks(y0, y1) {
        let py = sy(y);
        let _ = writeln!(
            s,
            r#"<line x1="{:.1}" y1="{py:.1}" x2="{l}" y2="{py:.1}" stroke="black"/><text x="{:.1}" y="{:.1}" text-anchor="end">{}</text>"#,
            l - 5.0,
            l - 8.0,
            py + 4.0,
            sci_short(y)
        );
    }
    let _ = writeln!(
        s,
        r#"<text x="{:.1}" y="{:.1}" text-anchor="middle">{}</text>"#,
        l + (w - l - r) / 2.0,
        h - 12.0,
        esc(x_label)
    );
    let _ = writeln!(
        s,
        r#"<text transform="translate(16 {:.1}) rotate(-90)" text-anchor="middle">{}</text>"#,
        t + (h - t - b) / 2.0,
        esc(y_label)
    );
    for (k, ser) in series.iter().enumerate() {
        let [cr, cg, cb] = ser.colour;
        let dash = if ser.dashed { r#" stroke-dasharray="5 3""# } else { "" };
        for piece in ser.curve.iter().filter(|p| p.len() >= 2) {
            let d: Vec<String> = piece.iter().map(|p: &PlotPoint| format!("{:.2},{:.2}", sx(p.x), sy(p.y))).collect();
            let _ = writeln!(
                s,
                r#"<polyline fill="none" stroke="rgb({cr},{cg},{cb})" stroke-width="1.6"{dash} points="{}"/>"#,
                d.join(" ")
            );
        }
        let ly = t + 14.0 + 16.0 * k as f64;
        let _ = writeln!(
            s,
            r#"<line x1="{:.1}" y1="{ly:.1}" x2="{:.1}" y2="{ly:.1}" stroke="rgb({cr},{cg},{cb})" stroke-width="2"{dash}/><text x="{:.1}" y="{:.1}">{}</text>"#,
            w - r - 170.0,
            w - r - 150.0,
            w - r - 145.0,
            ly + 4.0,
            esc(ser.name)
        );
    }
    s.push_str("</svg>\n");
    s
}

fn sci_short(v: f64) -> String {
    let a = v.abs();
    if a != 0.0 && !(1e-2..1e4).contains(&a) { format!("{v:.1e}") } else { format!("{}", (v * 1e4).round() / 1e4) }
}

/// Crops a screenshot (physical pixels) to a rect in points and writes it as PNG.
pub fn save_png(
    image: &egui::ColorImage,
    crop: Option<egui::Rect>,
    pixels_per_point: f32,
    path: &Path,
) -> Result<(), String> {
    let [iw, ih] = image.size;
    let (x0, y0, x1, y1) = match crop {
        Some(r) => {
            let f = |v: f32, max: usize| ((v * pixels_per_point).round().max(0.0) as usize).min(max);
            (f(r.min.x, iw), f(r.min.y, ih), f(r.max.x, iw), f(r.max.y, ih))
        }
        None => (0, 0, iw, ih),
    };
    if x1 <= x0 || y1 <= y0 {
        return Err(format!("nothing to save: the area {x0}..{x1} × {y0}..{y1} px is empty"));
    }
    let mut buf = Vec::with_capacity((x1 - x0) * (y1 - y0) * 4);
    for y in y0..y1 {
        for x in x0..x1 {
            buf.extend_from_slice(&image.pixels[y * iw + x].to_array());
        }
    }
    image::save_buffer(path, &buf, (x1 - x0) as u32, (y1 - y0) as u32, image::ExtendedColorType::Rgba8)
        .map_err(|e| format!("{}: {e}", path.display()))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn svg_has_axes_legend_and_breaks_gaps() {
        let curve: Curve = vec![
            vec![PlotPoint::new(0.0, 1.0), PlotPoint::new(1.0, 2.0)],
            vec![PlotPoint::new(2.0, 1.5), PlotPoint::new(3.0, 0.5)],
        ];
        let svg = plot_svg(
            "energy <test>",
            "t [µs]",
            "H/ħω",
            &[SvgSeries { name: "a & b", colour: [1, 2, 3], curve: &curve, dashed: false }],
        );
        assert!(svg.starts_with("<svg"));
        assert_eq!(svg.matches("<polyline").count(), 2, "one polyline per piece, gaps kept");
        assert!(svg.contains("a &amp; b") && svg.contains("energy &lt;test&gt;"));
        assert!(svg.contains("160mm"));
    }

    #[test]
    fn png_crop_outside_image_is_an_error() {
        let img = egui::ColorImage::new([4, 4], vec![egui::Color32::RED; 16]);
        let dir = tempfile::tempdir().expect("temp dir");
        let p = dir.path().join("a.png");
        assert!(
            save_png(&img, Some(egui::Rect::from_min_max(egui::pos2(10.0, 10.0), egui::pos2(20.0, 20.0))), 1.0, &p)
                .is_err()
        );
        save_png(&img, Some(egui::Rect::from_min_max(egui::pos2(1.0, 1.0), egui::pos2(3.0, 3.0))), 1.0, &p)
            .expect("save");
        assert!(p.exists());
    }
}

//! Exports: CSV waveforms as the generator plays them (through the physics crate's one
//! sampling path and the profile crate's one header), plots as
//! hand-written SVG at publication size, and PNG crops of window screenshots.

use crate::compute::Curve;
use crate::error::{AppError, AppResult};
use egui_plot::PlotPoint;
use quenchless_physics::playback::{AssessmentSettings, Playback, PlaybackAssessment, assess_trap};
use quenchless_physics::{PropagationOptions, RampShape};
use quenchless_profile::header::{FileContent, HeaderFacts, header_lines};
use quenchless_profile::waveform::{ExportColumns, write_trap_table};
use quenchless_profile::{Study, convert};
use std::fmt::Write as _;
use std::path::Path;

/// A candidate as the study's generator plays it, judged and written with the one
/// header every file for the apparatus carries (the same path as the command line's
/// `export`). Refused when a stated limit is broken and `accept_broken_limits` is off.
pub fn export_played(
    study: &Study,
    index: usize,
    rate: f64,
    columns: ExportColumns,
    accept_broken_limits: bool,
    path: &Path,
) -> AppResult<(usize, PlaybackAssessment)> {
    let c = study.candidates.get(index).ok_or_else(|| format!("export: no candidate number {index}"))?;
    let ramp = convert::candidate_ramp(c, index).map_err(|e| AppError::from(e).during("export"))?;
    let (playback, unit, max_rate) = match &study.generator {
        Some(g) => (
            Playback { rate, ..convert::playback(g).map_err(|e| AppError::from(e).during("export"))? },
            g.drive.as_ref().map_or_else(|| "rad^2/s^2".to_string(), |d| d.unit.clone()),
            g.max_rate_per_s,
        ),
        None => (Playback::sample_and_hold(rate), "rad^2/s^2".to_string(), None),
    };
    let limits = convert::limits(&study.trap).map_err(|e| AppError::from(e).during("export"))?;
    let settings =
        AssessmentSettings { tolerance: study.tolerance, limits, max_rate, searches: false, ..Default::default() };
    let model = convert::trap_model(&study.trap).map_err(|e| AppError::from(e).during("export"))?;
    let others: Vec<_> = model.trap_axes().into_iter().skip(1).collect();
    let a = assess_trap(&ramp, &playback, &settings, &others, &PropagationOptions::default(), &|| false)
        .map_err(|e| AppError::from(e).during(format!("export: “{}” cannot be played at these settings", c.name)))?;
    if !a.within_limits() && !accept_broken_limits {
        return Err(AppError::Refused(format!(
            "export: “{}” breaks the stated limits as played; confirm to export it unchanged (it is never clipped)",
            c.name
        )));
    }
    let facts = HeaderFacts {
        study: Some(&study.name),
        candidate: &c.name,
        family: ramp.family_name(),
        playback: &playback,
        drive_unit: &unit,
        limits: &limits,
        assessment: &a,
        designed_duration_s: ramp.duration(),
        max_rate,
    };
    let trap = a.played.trap.as_ref().ok_or_else(|| AppError::from("the playing kept no table to write"))?;
    let rows = write_trap_table(path, trap, columns, &header_lines(&facts, FileContent::Trap))?;
    Ok((rows, a))
}

/// Words for a column layout.
pub fn columns_words(c: ExportColumns) -> &'static str {
    match c {
        ExportColumns::Si => "t[s], omega[rad/s] (omega² if the trap inverts)",
        ExportColumns::LabMicrosecondsKilohertz => "t[us], nu[kHz]",
        ExportColumns::Omega2 => "t[s], omega2[rad^2/s^2]",
    }
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

/// A plot as SVG, 160 mm × 80 mm (a journal column and a half), with axes, ticks,
/// labels and a legend to the right of the data (never over it): one entry per name,
/// and one "dashed: inverted" entry when any piece is dashed.
pub fn plot_svg(title: &str, x_label: &str, y_label: &str, series: &[SvgSeries<'_>]) -> String {
    let (w, h) = (800.0_f64, 400.0_f64);
    let (l, r, t, b) = (70.0, 200.0, 34.0, 50.0);
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
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="160mm" height="80mm" viewBox="0 0 {w} {h}" font-family="sans-serif" font-size="12">"#
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
    let mut named: Vec<&str> = Vec::new();
    for ser in series {
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
        // One legend entry per name (a candidate's inverted stretches are its dashed pieces).
        if named.contains(&ser.name) {
            continue;
        }
        named.push(ser.name);
        let ly = t + 14.0 + 16.0 * (named.len() - 1) as f64;
        legend_entry(&mut s, w - r + 12.0, ly, [cr, cg, cb], "", &shorten(ser.name, 24));
    }
    if series.iter().any(|x| x.dashed) {
        let ly = t + 14.0 + 16.0 * named.len() as f64;
        legend_entry(&mut s, w - r + 12.0, ly, [90, 90, 90], r#" stroke-dasharray="5 3""#, "dashed: inverted, ω² < 0");
    }
    s.push_str("</svg>\n");
    s
}

fn legend_entry(s: &mut String, x: f64, y: f64, [cr, cg, cb]: [u8; 3], dash: &str, name: &str) {
    let _ = writeln!(
        s,
        r#"<line x1="{x:.1}" y1="{y:.1}" x2="{:.1}" y2="{y:.1}" stroke="rgb({cr},{cg},{cb})" stroke-width="2"{dash}/><text x="{:.1}" y="{:.1}">{}</text>"#,
        x + 20.0,
        x + 25.0,
        y + 4.0,
        esc(name)
    );
}

/// A name cut to `n` characters with an ellipsis, so the legend stays inside the canvas.
fn shorten(name: &str, n: usize) -> String {
    if name.chars().count() <= n {
        name.to_string()
    } else {
        format!("{}…", name.chars().take(n - 1).collect::<String>())
    }
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

    /// A candidate drawn solid where the trap confines and dashed where it inverts has
    /// one legend entry, plus one entry explaining the dashes; every legend text starts
    /// right of the data frame and inside the canvas.
    #[test]
    fn svg_legend_lists_each_candidate_once_outside_the_data() {
        let solid: Curve = vec![vec![PlotPoint::new(0.0, 1.0), PlotPoint::new(1.0, 0.1)]];
        let dashed: Curve = vec![vec![PlotPoint::new(1.0, -0.1), PlotPoint::new(2.0, -1.0)]];
        let long = "a candidate with a very long descriptive name indeed";
        let series = [
            SvgSeries { name: long, colour: [1, 2, 3], curve: &solid, dashed: false },
            SvgSeries { name: long, colour: [1, 2, 3], curve: &dashed, dashed: true },
        ];
        let svg = plot_svg("trap frequency", "t [µs]", "ν [kHz]", &series);
        assert_eq!(svg.matches("a candidate with a very").count(), 1, "{svg}");
        assert!(svg.contains("dashed: inverted"));
        let frame_right = 800.0 - 200.0;
        for line in svg.lines().filter(|l| l.contains("<text x=")) {
            let x: f64 = line.split("<text x=\"").nth(1).and_then(|r| r.split('"').next()).unwrap().parse().unwrap();
            let after = &line[line.find("<text").unwrap()..];
            let text = after[after.find('>').unwrap() + 1..].trim_end_matches("</text>").replace("&lt;", "<");
            if text.starts_with("a candidate") || text.starts_with("dashed") {
                assert!(x > frame_right && x + 6.5 * text.chars().count() as f64 <= 800.0, "{line}");
            }
        }
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

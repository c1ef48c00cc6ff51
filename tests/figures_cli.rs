//! The command line's figures (`--plot`), read back: every text of an SVG sits inside
//! the canvas, numeric tick labels lie within the data's range, units are on the axes,
//! the title names the table or design and never a path; a PNG has axes and margins.
//! (Common practice for figures in talks and papers, no source.)
#![expect(clippy::unwrap_used, reason = "tests fail loudly")]

mod common;

use common::{root, run};

/// Each `<text>` element: its x, y and content.
fn texts(svg: &str) -> Vec<(f64, f64, String)> {
    let attr = |tag: &str, name: &str| -> f64 {
        tag.split(&format!(" {name}=\""))
            .nth(1)
            .and_then(|r| r.split('"').next())
            .and_then(|v| v.parse().ok())
            .unwrap_or(f64::NAN)
    };
    svg.split("<text")
        .skip(1)
        .filter_map(|t| {
            let (tag, rest) = t.split_once('>')?;
            let (content, _) = rest.split_once("</text>")?;
            Some((attr(tag, "x"), attr(tag, "y"), content.trim().to_string()))
        })
        .collect()
}

fn canvas(svg: &str) -> (f64, f64) {
    let head = svg.split_once('>').map_or(svg, |(h, _)| h);
    let get = |name: &str| {
        head.split(&format!(" {name}=\""))
            .nth(1)
            .and_then(|r| r.split('"').next())
            .and_then(|v| v.parse().ok())
            .unwrap()
    };
    (get("width"), get("height"))
}

fn check_svg(path: &std::path::Path, units: &[&str], x_range: (f64, f64)) {
    let svg = std::fs::read_to_string(path).unwrap();
    let (w, h) = canvas(&svg);
    let t = texts(&svg);
    assert!(t.len() > 8, "too few texts: {t:?}");
    for (x, y, s) in &t {
        assert!((0.0..=w).contains(x) && (0.0..=h).contains(y), "{s:?} at ({x}, {y}) is outside the {w} x {h} canvas");
        assert!(!s.contains("0000000"), "float noise: {s}");
    }
    let title = &t[0].2;
    assert!(!title.contains('/') && !title.contains(".csv"), "a path in the title: {title}");
    for u in units {
        assert!(t.iter().any(|(_, _, s)| s.contains(u)), "no {u} on the axes: {t:?}");
    }
    // The x ticks: numbers on the bottom row, within the data's range.
    let bottom =
        t.iter().filter_map(|(_, y, s)| s.parse::<f64>().ok().map(|v| (*y, v))).fold(f64::MIN, |m, (y, _)| m.max(y));
    let xs: Vec<f64> =
        t.iter().filter(|(_, y, _)| (*y - bottom).abs() < 1.0).filter_map(|(_, _, s)| s.parse().ok()).collect();
    assert!(xs.len() >= 3, "too few x tick labels: {xs:?}");
    let pad = 0.02 * (x_range.1 - x_range.0);
    assert!(xs.iter().all(|v| (x_range.0 - pad..=x_range.1 + pad).contains(v)), "x ticks {xs:?} outside {x_range:?}");
}

#[test]
fn cli_figures_have_axes_units_and_no_paths() {
    let dir = tempfile::tempdir().unwrap();
    let d = |n: &str| dir.path().join(n).to_string_lossy().into_owned();
    let wave = root().join("tests/reference/waveforms/hold_steps.csv");
    let w = wave.to_string_lossy().into_owned();
    for plot in ["map.svg", "map.png"] {
        let o = run(&["sweep", "--waveform", &w, "--hold", "--grid", "12", "--out", &d("map.csv"), "--plot", &d(plot)]);
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    }
    check_svg(&dir.path().join("map.svg"), &["[%]", "Q*"], (-5.0, 5.0));
    for plot in ["noise.svg", "noise.png"] {
        let o = run(&[
            "sweep-noise",
            "--waveform",
            &w,
            "--hold",
            "--max-dephasing",
            "1e4",
            "--max-amplitude-psd",
            "1e-8",
            "--grid",
            "6",
            "--out",
            &d("noise.csv"),
            "--plot",
            &d(plot),
        ]);
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    }
    check_svg(&dir.path().join("noise.svg"), &["[1/s]", "[s]"], (0.0, 1e4));
    for plot in ["ramp.svg", "ramp.png"] {
        let o = run(&["design", "shortcut", "--from", "100kHz", "--to", "25kHz", "--time", "3us", "--plot", &d(plot)]);
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    }
    // The ramp figure spans the trap before and after (8 % of the duration each side).
    check_svg(&dir.path().join("ramp.svg"), &["[µs]", "[kHz]"], (-0.24, 3.24));
    // PNGs have axes and margins: a white margin round the figure, a dark axis line at
    // the left of the data (the image crate decodes the file).
    for png in ["map.png", "noise.png", "ramp.png"] {
        let img = image::open(dir.path().join(png)).unwrap().to_rgb8();
        let (w, h) = img.dimensions();
        assert_eq!((w, h), (1200, 600), "{png}");
        let white = |x: u32, y: u32| img.get_pixel(x, y).0.iter().all(|c| *c > 240);
        assert!((0..h).all(|y| white(2, y)) && (0..w).all(|x| white(x, 2)), "{png}: no margin");
        let axis = (40..300).any(|x| (h / 4..3 * h / 4).all(|y| img.get_pixel(x, y).0.iter().all(|c| *c < 120)));
        assert!(axis, "{png}: no y axis line");
    }
}

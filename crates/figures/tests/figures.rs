//! The figure layer's files: what a reader of a talk or a paper needs is in them (title,
//! axis labels with units, tick numbers, the legend once per curve beside the data, a
//! colour bar with numbers), checked by reading the files back with independent
//! libraries (the `image` crate decodes the PNG; the SVG is read as text).

use quenchless_figures::grid::HeatGrid;
use quenchless_figures::{FigureError, HeatFigure, LineFigure, Series, save_heat, save_lines};

/// The text of every `<text>` element of an SVG, trimmed.
fn texts(svg: &str) -> Vec<String> {
    svg.split("<text")
        .skip(1)
        .filter_map(|t| t.split_once('>'))
        .filter_map(|(_, rest)| rest.split_once("</text>"))
        .map(|(t, _)| t.trim().to_string())
        .collect()
}

fn lines() -> LineFigure {
    let wave: Vec<(f64, f64)> =
        (0..200).map(|k| (f64::from(k) * 0.1, (f64::from(k) * 0.1).sin() * 50.0 + 60.0)).collect();
    LineFigure {
        title: "Trap frequency of a test ramp".into(),
        x_label: "time t [µs]".into(),
        y_label: "ν [kHz]".into(),
        series: vec![
            Series {
                name: Some("first candidate".into()),
                colour: [30, 90, 160],
                pieces: vec![wave.clone()],
                dashed: false,
            },
            Series { name: None, colour: [30, 90, 160], pieces: vec![wave[..50].to_vec()], dashed: true },
            Series {
                name: Some("second".into()),
                colour: [200, 80, 40],
                pieces: vec![wave[..80].to_vec(), wave[120..].to_vec()],
                dashed: false,
            },
        ],
        note: Some("dashed: where the trap inverts".into()),
    }
}

fn heat() -> HeatFigure {
    let xs: Vec<f64> = (0..21).map(|k| -5.0 + 0.5 * f64::from(k)).collect();
    let ys = xs.clone();
    let values = ys.iter().flat_map(|y| xs.iter().map(move |x| -8.0 + (x + y).abs())).collect();
    HeatFigure {
        title: "Robustness of a test ramp".into(),
        x_label: "calibration error e [%]".into(),
        y_label: "duration error d [%]".into(),
        value_label: "log10(Q* - 1)".into(),
        grid: HeatGrid { xs, ys, values },
        contour: Some((-3.0, "tolerance".into())),
        mark: Some(((0.0, 0.0), "as designed".into())),
    }
}

#[test]
fn an_svg_line_figure_has_its_words_and_one_legend_entry_per_curve() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("lines.svg");
    save_lines(&lines(), &p).unwrap();
    let svg = std::fs::read_to_string(&p).unwrap();
    assert!(svg.starts_with("<svg") || svg.contains("<svg"), "not an SVG");
    let t = texts(&svg);
    for words in ["Trap frequency of a test ramp", "time t [µs]", "ν [kHz]"] {
        assert!(t.iter().any(|x| x == words), "missing {words:?} in {t:?}");
    }
    assert!(t.iter().any(|x| x.starts_with("dashed: where the")), "no note in {t:?}");
    assert_eq!(t.iter().filter(|x| *x == "first candidate").count(), 1, "one legend entry per candidate");
    assert_eq!(t.iter().filter(|x| *x == "second").count(), 1);
    // Tick numbers with no float noise.
    assert!(t.iter().any(|x| x == "10" || x == "10.0"), "no tick label 10 in {t:?}");
    assert!(!t.iter().any(|x| x.contains("0000000")), "float noise in a label: {t:?}");
    // No half-written file is left beside it.
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
}

#[test]
fn a_png_line_figure_is_a_picture_with_text_beside_the_data() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("lines.png");
    save_lines(&lines(), &p).unwrap();
    let img = image::open(&p).unwrap().to_rgb8();
    assert_eq!(img.dimensions(), (1200, 600));
    let dark = |x0: u32, x1: u32, y0: u32, y1: u32| {
        (x0..x1)
            .flat_map(|x| (y0..y1).map(move |y| (x, y)))
            .filter(|&(x, y)| img.get_pixel(x, y).0.iter().all(|c| *c < 160))
            .count()
    };
    // Text of the title (drawn with the embedded font), and of the legend right of the data.
    assert!(dark(300, 900, 0, 40) > 50, "no title drawn");
    assert!(dark(1000, 1200, 30, 200) > 50, "no legend drawn");
}

#[test]
fn a_heat_map_has_a_colour_bar_with_numbers_and_its_legend() {
    let dir = tempfile::tempdir().unwrap();
    for ext in ["svg", "png"] {
        let p = dir.path().join(format!("map.{ext}"));
        save_heat(&heat(), &p).unwrap();
        if ext == "svg" {
            let svg = std::fs::read_to_string(&p).unwrap();
            let t = texts(&svg);
            for words in
                ["Robustness of a test ramp", "calibration error e [%]", "log10(Q* - 1)", "tolerance", "as designed"]
            {
                assert!(t.iter().any(|x| x == words), "missing {words:?} in {t:?}");
            }
            // The colour bar runs over the value range -8..2 with numbers on it.
            let numbers: Vec<f64> = t.iter().filter_map(|x| x.parse().ok()).collect();
            assert!(
                numbers.iter().any(|v| (*v + 8.0).abs() < 1e-9) && numbers.iter().any(|v| (*v - 2.0).abs() < 1e-9),
                "colour bar numbers missing: {t:?}"
            );
        } else {
            let img = image::open(&p).unwrap().to_rgb8();
            assert_eq!(img.dimensions(), (1200, 600));
        }
    }
}

#[test]
fn bad_figure_requests_are_refused_by_name() {
    let dir = tempfile::tempdir().unwrap();
    let e = save_lines(&lines(), &dir.path().join("lines.pdf")).unwrap_err();
    assert!(matches!(e, FigureError::Format(_)) && e.to_string().contains("must end in .svg or .png"), "{e}");
    let empty = LineFigure { series: Vec::new(), ..lines() };
    let e = save_lines(&empty, &dir.path().join("empty.svg")).unwrap_err();
    assert!(e.to_string().contains("nothing to draw"), "{e}");
    let mut bad = heat();
    bad.grid.values.pop();
    assert!(save_heat(&bad, &dir.path().join("bad.png")).is_err());
}

use quenchless_physics::constants::TWO_PI;
use quenchless_physics::ramp::{Ramp, RampShape, SampledColumn, SampledReading};
use quenchless_profile::waveform::{ExportColumns, parse_waveform, read_waveform, write_waveform};
use std::path::Path;

fn p() -> &'static Path {
    Path::new("test.csv")
}

#[test]
fn plain_si_headers() {
    let t = parse_waveform("# a comment\nt,omega\n0,1000\n1e-6,2000\n", p()).unwrap();
    assert_eq!(t.column, SampledColumn::Omega);
    assert_eq!(t.times_s, vec![0.0, 1e-6]);
    assert_eq!(t.comments, vec!["a comment".to_string()]);
    let t = parse_waveform("t,omega2\n0,1e6\n# mid comment\n1e-6,-5e5\n2e-6,4e6\n", p()).unwrap();
    assert_eq!(t.column, SampledColumn::Omega2);
    assert_eq!(t.values, vec![1e6, -5e5, 4e6]);
}

/// Expected values from omega = 2 pi nu and the SI prefixes (BIPM SI Brochure, 9th
/// edition, 2019).
#[test]
fn lab_unit_headers() {
    let t = parse_waveform("t[us],nu[kHz]\n0,100\n2.5,50\n", p()).unwrap();
    assert!((t.times_s[1] - 2.5e-6).abs() < 1e-20);
    assert!((t.values[0] - TWO_PI * 100e3).abs() < 1e-9);
    let t = parse_waveform("t[ns],nu[MHz]\n0,1\n10,2\n", p()).unwrap();
    assert!((t.values[1] - TWO_PI * 2e6).abs() < 1e-6);
    let t = parse_waveform("t[µs],omega2[rad^2/s^2]\n0,1\n1,2\n", p()).unwrap();
    assert_eq!(t.column, SampledColumn::Omega2);
}

#[test]
fn bad_waveforms_name_line_and_column() {
    let cases = [
        ("", "no header"),
        ("# only a comment\n", "no header"),
        ("0,1\n1,2\n", "missing header"),
        ("time,omega\n0,1\n1,2\n", "unknown time column"),
        ("t,freq\n0,1\n1,2\n", "unknown value column"),
        ("t,omega\n0,abc\n1,2\n", "test.csv:2:3: value \"abc\""),
        ("t,omega\n0,NaN\n1,2\n", "not finite"),
        ("t,omega\n0,inf\n1,2\n", "not finite"),
        ("t,omega\n0,1\n0,2\n", "test.csv:3:1: time 0"),
        ("t,omega\n0,1\n1,-2\n", "must be > 0"),
        ("t,omega\n0,1\n", "at least 2 data rows"),
        ("t,omega\n0,1,3\n1,2\n", "expected 2 columns"),
        ("t[ks],omega\n0,1\n1,2\n", "unknown time column"),
        ("t,omega2\n0,-1\n1,2\n", "first and last rows"),
    ];
    for (text, needle) in cases {
        let e = parse_waveform(text, p()).unwrap_err().to_string();
        assert!(e.contains(needle), "input {text:?}: {e}");
    }
}

/// The reference waveforms of tests/reference parse and give the end frequencies the
/// QuTiP script used (the first and last rows).
#[test]
fn reference_waveforms_parse() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../tests/reference/waveforms");
    for f in ["expand_smooth.csv", "compress_inverted.csv", "hold_steps.csv"] {
        let t = read_waveform(&dir.join(f)).unwrap();
        let r = t.to_ramp(SampledReading::Linear, &dir.join(f)).unwrap();
        assert!(r.duration() > 0.0);
    }
}

/// Export then import returns the ramp's values at the rows (a round trip through our
/// own writer and reader; no external source).
#[test]
fn export_round_trip() {
    use quenchless_physics::ramp::{Ramp, ShortcutRamp};
    let dir = tempfile::tempdir().unwrap();
    let wi = TWO_PI * 100e3;
    for (ramp, cols) in [
        (Ramp::Shortcut(ShortcutRamp::new(wi, 0.25 * wi, 20e-6).unwrap()), ExportColumns::LabMicrosecondsKilohertz),
        (Ramp::Shortcut(ShortcutRamp::new(wi, 0.25 * wi, 1e-6).unwrap()), ExportColumns::Si),
    ] {
        let path = dir.path().join("out.csv");
        let rows = write_waveform(&path, &ramp, 1e8, cols, &["provenance line".into()]).unwrap();
        let t = read_waveform(&path).unwrap();
        assert_eq!(t.times_s.len(), rows);
        assert_eq!(t.comments[0], "provenance line");
        for (tt, v) in t.times_s.iter().zip(&t.values) {
            let w2 = if t.column == SampledColumn::Omega2 { *v } else { v * v };
            assert!((w2 - ramp.omega2(*tt)).abs() <= 1e-9 * wi * wi, "t={tt}");
        }
    }
    // A ramp that inverts cannot be written as a frequency column.
    let inv = Ramp::Shortcut(ShortcutRamp::new(wi, 0.25 * wi, 1e-6).unwrap());
    let e = write_waveform(&dir.path().join("x.csv"), &inv, 1e8, ExportColumns::LabMicrosecondsKilohertz, &[])
        .unwrap_err()
        .to_string();
    assert!(e.contains("inverts"), "{e}");
}

/// A comment line can state the trap before and after the table (no external source: a
/// rule of our own format); a malformed one is an error that names its line.
#[test]
fn end_frequencies_comment_is_read() {
    let text = "# played\n# end_frequencies_rad_s: 6.0e5, 2.0e5\nt,omega2\n0,3.0e11\n1e-6,5.0e10\n";
    let t = parse_waveform(text, Path::new("ends.csv")).unwrap();
    assert_eq!(t.end_frequencies_rad_s, Some((6.0e5, 2.0e5)));
    let Ramp::Sampled(r) = t.to_ramp(SampledReading::Hold, Path::new("ends.csv")).unwrap() else {
        panic!("a table is a sampled ramp")
    };
    assert_eq!(r.end_frequencies(), Some((6.0e5, 2.0e5)));
    let bad = "# end_frequencies_rad_s: 6.0e5\nt,omega\n0,1\n1,2\n";
    let e = parse_waveform(bad, Path::new("bad.csv")).unwrap_err().to_string();
    assert!(e.starts_with("bad.csv:1:") && e.contains("two frequencies"), "{e}");
}

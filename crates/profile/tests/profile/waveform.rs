use quenchless_physics::constants::TWO_PI;
use quenchless_physics::ramp::{Ramp, RampShape, SampledColumn, SampledReading};
use quenchless_profile::waveform::{ExportColumns, parse_waveform, read_waveform, significant15, write_trap_table};
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

/// A written trap table reads back to the played rows and says how it is read (a round
/// trip through our own writer and reader; no external source).
#[test]
fn trap_table_round_trip() {
    use quenchless_physics::playback::{Playback, play};
    use quenchless_physics::ramp::{Ramp, ShortcutRamp};
    let dir = tempfile::tempdir().unwrap();
    let wi = TWO_PI * 100e3;
    for (ramp, cols) in [
        (Ramp::Shortcut(ShortcutRamp::new(wi, 0.25 * wi, 20e-6).unwrap()), ExportColumns::LabMicrosecondsKilohertz),
        (Ramp::Shortcut(ShortcutRamp::new(wi, 0.25 * wi, 1e-6).unwrap()), ExportColumns::Si),
    ] {
        let trap = play(&ramp, &Playback::sample_and_hold(1e8), 1e-3).unwrap();
        let path = dir.path().join("out.csv");
        let rows = write_trap_table(&path, &trap, cols, &["provenance line".into()]).unwrap();
        let t = read_waveform(&path).unwrap();
        assert_eq!(t.times_s.len(), rows);
        assert_eq!(t.comments[0], "provenance line");
        assert_eq!(t.reading, Some(SampledReading::Hold));
        assert_eq!(t.end_frequencies_rad_s, trap.end_frequencies());
        for ((tt, v), (t0, w0)) in t.times_s.iter().zip(&t.values).zip(trap.times().iter().zip(trap.omega2_rows())) {
            let w2 = if t.column == SampledColumn::Omega2 { *v } else { v * v };
            // Lab columns carry 15 significant digits.
            assert!((w2 - w0).abs() <= 1e-13 * wi * wi && (tt - t0).abs() <= 1e-14 * 20e-6, "t={tt}");
        }
    }
    // A trap that inverts cannot be written as a frequency column.
    let inv = Ramp::Shortcut(ShortcutRamp::new(wi, 0.25 * wi, 1e-6).unwrap());
    let trap = play(&inv, &Playback::sample_and_hold(1e8), 1e-3).unwrap();
    let e = write_trap_table(&dir.path().join("x.csv"), &trap, ExportColumns::LabMicrosecondsKilohertz, &[])
        .unwrap_err()
        .to_string();
    assert!(e.contains("inverts"), "{e}");
}

/// Lab-unit columns print 15 significant digits, so a unit conversion's last-digit
/// noise does not reach the file (IEEE 754 doubles hold 15 to 17; from memory).
#[test]
fn lab_columns_have_fifteen_significant_digits() {
    assert_eq!(significant15(0.049_999_999_999_999_996), "5e-2");
    assert_eq!(significant15(100.0), "1e2");
    assert_eq!(significant15(-1.234_567_890_123_456_7), "-1.23456789012346");
    assert_eq!(significant15(0.0), "0");
    assert_eq!(significant15(25.000_000_000_000_004), "2.5e1");
}

/// A file that states its reading is read that way; a conflicting request is refused
/// with the reason (a rule of our own format; no external source).
#[test]
fn the_stated_reading_wins_and_a_conflict_is_refused() {
    let held = parse_waveform("# reading: hold\nt,omega\n0,1\n1,2\n", p()).unwrap();
    assert_eq!(held.reading(false, "--hold").unwrap(), SampledReading::Hold);
    assert_eq!(held.reading(true, "--hold").unwrap(), SampledReading::Hold);
    let linear = parse_waveform("# reading: linear\nt,omega\n0,1\n1,2\n", p()).unwrap();
    assert_eq!(linear.reading(false, "--hold").unwrap(), SampledReading::Linear);
    let e = linear.reading(true, "--hold").unwrap_err().to_string();
    assert!(e.contains("--hold") && e.contains("reading: linear"), "{e}");
    let plain = parse_waveform("t,omega\n0,1\n1,2\n", p()).unwrap();
    assert_eq!(plain.reading(false, "--hold").unwrap(), SampledReading::Linear);
    assert_eq!(plain.reading(true, "--hold").unwrap(), SampledReading::Hold);
    let e = parse_waveform("# reading: cubic\nt,omega\n0,1\n1,2\n", p()).unwrap_err().to_string();
    assert!(e.contains("test.csv:1:") && e.contains("reading: hold"), "{e}");
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

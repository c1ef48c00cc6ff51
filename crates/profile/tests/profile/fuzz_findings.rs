//! Inputs the fuzz targets (fuzz/) or their seeds broke, kept as regression tests: each
//! error must name the place, the value and what is allowed, and the input must now
//! pass the fuzz target's own check. No external source: properties of our own formats.

use quenchless_profile::fuzzing::{WAVEFORM_PATH, check_units, check_waveform};
use quenchless_profile::parse_waveform;
use quenchless_profile::units::{Quantity, parse_quantity};
use std::path::Path;

/// The error text of a waveform that must be refused; the input also passes the fuzz
/// target's check (the error is well formed, nothing panics).
fn waveform_error(text: &str) -> String {
    check_waveform(text.as_bytes()).unwrap_or_else(|broken| panic!("{text:?}: {broken}"));
    parse_waveform(text, Path::new(WAVEFORM_PATH)).map(|_| ()).expect_err(text).to_string()
}

fn assert_names_all(e: &str, needles: &[&str]) {
    for n in needles {
        assert!(e.contains(n), "{n:?} missing from: {e}");
    }
}

/// Seed "5%" as a frequency: the "not a number" error listed no unit.
#[test]
fn fuzz_finding_not_a_number_names_the_units() {
    check_units(b"5%").unwrap();
    let e = parse_quantity("5%", Quantity::Frequency).unwrap_err().to_string();
    assert_names_all(&e, &["\"5%\"", "not a number", "frequency unit", "Hz, kHz, MHz, GHz"]);
}

/// A finite number times its unit's factor overflowed: "1e308GHz" was accepted as inf.
#[test]
fn fuzz_finding_frequency_overflow_is_refused() {
    check_units(b"1e308GHz").unwrap();
    let e = parse_quantity("1e308GHz", Quantity::Frequency).unwrap_err().to_string();
    assert_names_all(&e, &["\"1e308GHz\"", "1e308 GHz", "largest finite frequency", "at most 1.79", "e299 GHz"]);
    // The largest value that fits is still read.
    assert!(parse_quantity("1.7e299 GHz", Quantity::Frequency).unwrap().is_finite());
}

/// Fuzzer crash (waveform_csv): omega = 2 pi * 4e306 rad/s squared to inf, so the
/// ramp's rate at t = 0 was inf.
#[test]
fn fuzz_finding_omega_whose_square_overflows() {
    let e = waveform_error("t[ms],nu[Hz]\n0,500\n1,400e304\n2,300\n");
    assert_names_all(&e, &["fuzz-input.csv:3:3:", "400e304", "data row 2", "allowed 1e-30 to 1e30 rad/s"]);
}

/// omega so small that omega² underflows to 0 (initial frequency 0).
#[test]
fn omega_whose_square_underflows_is_refused() {
    let e = waveform_error("t,omega\n0,1e-200\n1,1\n");
    assert_names_all(&e, &["fuzz-input.csv:2:3:", "1e-200", "data row 1", "allowed 1e-30 to 1e30 rad/s"]);
}

/// Linear interpolation between ±1.7e308 (rad/s)² overflowed to -inf.
#[test]
fn omega2_beyond_range_is_refused() {
    let e = waveform_error("t,omega2\n0,1\n1,1.7e308\n2,-1.7e308\n3,1\n");
    assert_names_all(&e, &["fuzz-input.csv:3:3:", "1.7e308", "data row 2", "allowed -1e60 to 1e60 (rad/s)²"]);
}

/// End rows of an omega² column need omega² >= (1e-30 rad/s)², as an omega column does.
#[test]
fn omega2_end_rows_below_range_are_refused() {
    let e = waveform_error("t,omega2\n0,1e-320\n1,1\n");
    assert_names_all(&e, &["omega² in data row 1", "1e-320", ">= 1e-60 (rad/s)²", "first and last rows"]);
}

/// Times ±1e308 s: the span after shifting to start at 0 was inf.
#[test]
fn times_beyond_range_are_refused() {
    let e = waveform_error("t,omega\n-1e308,1\n1e308,2\n");
    assert_names_all(&e, &["fuzz-input.csv:2:1:", "-1e308", "data row 1", "allowed |t| <= 1e30 s"]);
}

/// Rows 1e-30 s apart at t ~ 1e20 s coincide once the table starts at 0 (the ramp's
/// last breakpoint fell on its end).
#[test]
fn rows_that_coincide_after_the_shift_are_refused() {
    let e = waveform_error("t,omega\n-1e20,1\n0,1\n1e-30,1\n");
    assert_names_all(&e, &["fuzz-input.csv:4:1:", "1e-30", "data row 3", "at least 1e-30 s apart"]);
}

/// Found by reading the study fuzz target's output: candidate ramps inside a study whose
/// values overflow omega² or the duration were accepted and evaluated to infinity. They
/// are now refused with the field, the value and the engine's working range.
#[test]
fn study_ramps_outside_the_working_range_are_refused() {
    let cases = [
        (
            r#"Study(format_version: 2, candidates: [CandidateRamp(name: "w", ramp: Waveform(times_s: [0.0, 1.0], values: [1e200, 1.0]))])"#,
            "1e30 rad/s",
        ),
        (
            r#"Study(format_version: 2, candidates: [CandidateRamp(name: "w", ramp: Waveform(times_s: [-1e308, 1e308], values: [1.0, 1.0]))])"#,
            "1e30 s",
        ),
        (
            r#"Study(format_version: 2, candidates: [CandidateRamp(name: "l", ramp: Linear(from_hz: 1e300, to_hz: 1.0, duration_s: 1.0))])"#,
            "1e30 rad/s",
        ),
        (
            r#"Study(format_version: 2, candidates: [CandidateRamp(name: "s", ramp: Shortcut(from_hz: 1e3, to_hz: 2e3, duration_s: 1e40))])"#,
            "1e30 s",
        ),
    ];
    for (text, allowed) in cases {
        let e = quenchless_profile::parse_study(text, Path::new("range.ron")).expect_err(text).to_string();
        assert_names_all(&e, &["range.ron", "candidates[0]", allowed]);
    }
}

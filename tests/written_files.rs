//! End-to-end tests of the files written for the apparatus: every writer (`export`,
//! `play --out`, `--drive-out`, `--codes-out`, `design --waveform-out`) writes the same
//! header, states how the file is read and what was checked, and what it contains is
//! what was judged. The physics behind the numbers is checked in the physics crate's
//! tests; here the files are checked against the command's own report.

#![expect(clippy::unwrap_used, reason = "helpers of tests fail loudly on bad fixtures")]

mod common;

use common::{fails_with, json, run, sample, write};
use std::path::Path;

/// A study of our own: a 100 -> 25 kHz expansion on a bipolar 16-bit drive, with a
/// highest frequency that the "overshoot" holds break and a shortcut so short that its
/// trap inverts.
const STUDY: &str = r#"Study(
    format_version: 2,
    name: "Writer checks",
    trap: TrapSpec(start_frequency_hz: 100000.0, end_frequency_hz: 25000.0, highest_frequency_hz: Some(110000.0)),
    initial_state: Thermal(occupation: 0.0),
    tolerance: 0.001,
    candidates: [
        CandidateRamp(name: "overshoot", visible: true, ramp: Holds(from_hz: 100000.0, to_hz: 25000.0, holds: [
            HoldSpec(signed_frequency_hz: 130000.0, duration_s: 1.0e-6),
            HoldSpec(signed_frequency_hz: 25000.0, duration_s: 2.0e-6),
        ])),
        CandidateRamp(name: "inverting shortcut", visible: true,
            ramp: Shortcut(from_hz: 100000.0, to_hz: 25000.0, duration_s: 1.5e-6)),
    ],
    generator: Some(GeneratorSpec(
        sample_rate_per_s: 1.0e8,
        bits: Some(16),
        drive: Some(DriveSpec(unit: "V",
            calibration: FrequencySquared(reference_frequency_hz: 100000.0, drive_at_reference: 1.0),
            full_scale_low: -16.0, full_scale_high: 16.0, can_go_negative: true)),
    )),
)"#;

fn header(text: &str) -> Vec<&str> {
    text.lines().take_while(|l| l.starts_with('#')).collect()
}

/// Every file: provenance, timing and end semantics, settings, checks, caution.
fn common_header(text: &str, what: &str) {
    let h = header(text).join("\n");
    for needle in [
        "# written by quenchless",
        "study: Writer checks",
        "N = round(duration x rate)",
        "before t = 0 the generator holds the initial level",
        "the generator must hold it",
        "generator: 1e8 samples/s",
        "16 bits over -16 to 16 V",
        "Q*: designed",
        "trap left on:",
        "stated limits: lowest not stated, highest 110 kHz",
        "verdict:",
        "CAUTION: this waveform drives real apparatus",
        "high-voltage trap electrodes",
        "licensed practice",
    ] {
        assert!(h.contains(needle), "{what}: no {needle:?} in\n{h}");
    }
    for internal in ["Some(", "None", "Omega2 {", "{ rms"] {
        assert!(!h.contains(internal), "{what}: internals {internal:?} in\n{h}");
    }
}

fn writers(dir: &Path, study: &str, name: &str) -> Vec<(String, String)> {
    let f = |n: &str| dir.join(n).to_string_lossy().into_owned();
    let (trap, omega2, drive, codes) = (f("trap.csv"), f("played.csv"), f("drive.csv"), f("codes.csv"));
    let o = run(&["export", study, "--ramp", name, "--out", &trap]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let o = run(&["play", study, "--ramp", name, "--out", &omega2, "--drive-out", &drive, "--codes-out", &codes]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    [("export", trap), ("play --out", omega2), ("play --drive-out", drive), ("play --codes-out", codes)]
        .into_iter()
        .map(|(w, p)| (w.to_string(), std::fs::read_to_string(p).unwrap()))
        .collect()
}

#[test]
fn every_writer_names_a_broken_limit_in_its_header() {
    let dir = tempfile::tempdir().unwrap();
    let study = write(dir.path(), "s.ron", STUDY);
    for (writer, text) in writers(dir.path(), &study, "overshoot") {
        common_header(&text, &writer);
        let h = header(&text).join("\n");
        assert!(h.contains("LIMIT BROKEN: above the highest frequency from 0 ns to"), "{writer}:\n{h}");
        // The 130 kHz hold, its drive (proportional to nu²) rounded to one of 65536 codes
        // over -16 to 16 V: within half a code, 9.4 Hz here (our own arithmetic).
        assert!(h.contains("(worst 130.008128 kHz)"), "{writer}: worst value as a frequency:\n{h}");
        assert!(h.contains("verdict: BREAKS LIMITS"), "{writer}:\n{h}");
    }
    // On screen too, before anything is written.
    let o = run(&["export", &study, "--ramp", "overshoot", "--out", &dir.path().join("x.csv").to_string_lossy()]);
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("CAUTION") && err.contains("LIMIT BROKEN"), "{err}");
}

#[test]
fn every_writer_says_where_the_trap_inverts() {
    let dir = tempfile::tempdir().unwrap();
    let study = write(dir.path(), "s.ron", STUDY);
    for (writer, text) in writers(dir.path(), &study, "inverting shortcut") {
        common_header(&text, &writer);
        let h = header(&text).join("\n");
        assert!(h.contains("INVERTS: the played trap is inverted (omega^2 <= 0) from"), "{writer}:\n{h}");
        assert!(h.contains("inverts"), "{writer}");
    }
    // design --waveform-out says so too, with the same header (no study: no limits).
    let out = dir.path().join("design.csv");
    let o = run(&[
        "design",
        "shortcut",
        "--from",
        "100kHz",
        "--to",
        "25kHz",
        "--time",
        "1.5us",
        "--waveform-out",
        out.to_str().unwrap(),
        "--rate",
        "1e8",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = std::fs::read_to_string(&out).unwrap();
    let h = header(&text).join("\n");
    for needle in ["# written by quenchless", "INVERTS:", "N = round(duration x rate)", "CAUTION:", "# reading: hold"] {
        assert!(h.contains(needle), "design: no {needle:?} in\n{h}");
    }
    assert!(text.contains("t[s],omega2[rad^2/s^2]"), "an inverted trap is written as omega²");
    assert!(String::from_utf8_lossy(&o.stderr).contains("INVERTS"));
}

/// The files are what was judged: each omega table read back by its stated reading
/// gives the played Q*, and the drive and code files hold N + 1 samples whose last is
/// the final level (the drive of the trap left on).
#[test]
fn written_files_are_the_judged_waveform() {
    let dir = tempfile::tempdir().unwrap();
    let study = write(dir.path(), "s.ron", STUDY);
    let v = json(&["play", &study, "--ramp", "inverting shortcut", "--json"]);
    let played = v["played_q_star"].as_f64().unwrap();
    let n = v["samples"].as_u64().unwrap() as usize;
    let files = writers(dir.path(), &study, "inverting shortcut");
    for name in ["trap.csv", "played.csv"] {
        let e = json(&["eval", "--waveform", dir.path().join(name).to_str().unwrap(), "--json"]);
        let q = e["q_star"].as_f64().unwrap();
        assert!((q - played).abs() < 1e-12, "{name}: {q} vs played {played}");
        // The stated reading is honoured; a conflicting request would be refused, and
        // asking for the stated one is fine.
        assert!(run(&["eval", "--waveform", dir.path().join(name).to_str().unwrap(), "--hold"]).status.success());
    }
    let left_on = v["omega_left_on_rad_s"].as_f64().unwrap();
    // drive = 1 V at 100 kHz, proportional to omega².
    let gain = 1.0 / (2.0 * std::f64::consts::PI * 1e5f64).powi(2);
    for (writer, text) in &files[2..] {
        let rows: Vec<&str> = text.lines().filter(|l| !l.starts_with('#')).skip(1).collect();
        assert_eq!(rows.len(), n + 1, "{writer}");
        let last = rows[n].split(',').next_back().unwrap();
        let level = if writer.ends_with("codes-out") {
            -16.0 + last.parse::<f64>().unwrap() * 32.0 / 65535.0
        } else {
            last.parse::<f64>().unwrap()
        };
        assert!((level / gain).sqrt() - left_on < 1e-9 * left_on, "{writer}: final level {level} V");
    }
}

/// A file that says it is read linearly refuses --hold, with the reason.
#[test]
fn a_conflicting_reading_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let w = write(dir.path(), "w.csv", "# reading: linear\nt,omega\n0,600000\n1e-5,200000\n");
    fails_with(&["eval", "--waveform", &w, "--hold"], "reading: linear");
    fails_with(&["play", "--waveform", &w, "--hold", "--rate", "1e8"], "reading: linear");
}

/// `play` answers every candidate of every sample study with exit 0: failing designs
/// are played and reported with their searches skipped and the reason given.
#[test]
fn play_answers_every_sample_candidate() {
    for file in ["ion_compression_tight.ron", "single_ion_engine.ron", "tweezer_expansion.ron"] {
        let p = sample(file);
        let all = json(&["eval", p.to_str().unwrap(), "--json"]);
        for c in all.as_array().unwrap() {
            let name = c["name"].as_str().unwrap();
            let v = json(&["play", p.to_str().unwrap(), "--ramp", name, "--json"]);
            assert_eq!(v["schema_version"], 2);
            let verdict = v["verdict"].as_str().unwrap();
            assert!(["pass", "fail", "breaks-limits"].contains(&verdict), "{file}/{name}: {verdict}");
            if v["designed_q_star"].as_f64().unwrap() - 1.0 > v["tolerance"].as_f64().unwrap() {
                assert!(v["min_rate_per_s"].is_null(), "{file}/{name}");
                assert!(v["min_rate_note"].as_str().unwrap().contains("design itself fails"), "{file}/{name}");
            } else {
                assert!(v["min_rate_per_s"].as_f64().is_some(), "{file}/{name}: {v}");
            }
        }
    }
    // Searches end the command never: 4 bits on the passing shortcut.
    let p = sample("ion_compression_tight.ron");
    let v = json(&["play", p.to_str().unwrap(), "--ramp", "shortcut 120 ns", "--bits", "4", "--json"]);
    assert_eq!(v["verdict"], "fail");
    // A candidate that truly cannot be played is refused with the reason: the inverted
    // shortcut on a drive that cannot go negative.
    fails_with(&["play", p.to_str().unwrap(), "--ramp", "shortcut 120 ns", "--unipolar"], "cannot go negative");
}

//! The trap model end to end: every axis in `eval`, the worst axis in `play` and in the
//! header of every written file, and the anharmonic check (`trap-check`) against the
//! harmonic identities and the moment engine.

#![expect(clippy::unwrap_used, reason = "tests fail loudly")]

mod common;

use common::{fails_with, json, run, sample};

fn tweezer() -> String {
    sample("tweezer_two_axes.ron").to_string_lossy().into_owned()
}

#[test]
fn eval_reports_every_axis_and_the_worst() {
    let p = tweezer();
    let v = json(&["eval", &p, "--ramp", "shortcut 5 us", "--json"]);
    // Today's keys stay those of the reference (radial) axis.
    assert_eq!(v["verdict"], "pass");
    assert!(v["q_star_minus_one"].as_f64().unwrap() < 1e-12);
    // The axial axis of a paraxial beam: omega_z²/omega_r² = w0²/(2 zR²), zR = pi w0²/lambda
    // (Gaussian-beam optics, e.g. Saleh and Teich, Fundamentals of Photonics, ch. 3).
    let axes = v["axes"].as_array().unwrap();
    assert_eq!(axes.len(), 2);
    let (w0, lambda) = (8e-7_f64, 8.5e-7_f64);
    let z_r = std::f64::consts::PI * w0 * w0 / lambda;
    let ratio = (w0 * w0 / (2.0 * z_r * z_r)).sqrt();
    let wi = axes[1]["omega_initial_rad_s"].as_f64().unwrap();
    assert!(
        (wi / (std::f64::consts::TAU * 100e3) - ratio).abs() < 1e-12,
        "axial/radial {}",
        wi / (std::f64::consts::TAU * 100e3)
    );
    assert_eq!(axes[1]["name"], "axial");
    assert_eq!(axes[1]["verdict"], "fail");
    assert_eq!(v["trap_verdict"], "fail");
    assert_eq!(v["worst_axis"], "axial");
    // A one-axis study keeps its verdict and gets a one-entry array.
    let one = json(&["eval", &sample("tweezer_expansion.ron").to_string_lossy(), "--ramp", "shortcut 15 us", "--json"]);
    assert_eq!(one["axes"].as_array().unwrap().len(), 1);
    assert_eq!(one["trap_verdict"], one["verdict"]);
}

#[test]
fn the_header_of_a_written_file_gives_the_worst_axis() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("release.csv");
    let o = run(&["export", &tweezer(), "--ramp", "shortcut 5 us", "--out", &out.to_string_lossy()]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = std::fs::read_to_string(&out).unwrap();
    let verdict = text.lines().find(|l| l.starts_with("# verdict:")).unwrap();
    assert!(verdict.contains("FAIL") && verdict.contains("the axial axis"), "{verdict}");
    assert!(text.lines().any(|l| l.starts_with("# axis axial: Q* designed")), "no axial line in the header");
    let p = json(&["play", &tweezer(), "--ramp", "shortcut 5 us", "--json"]);
    assert_eq!(p["trap_verdict"], "fail");
    assert_eq!(p["worst_axis"], "axial");
    let axial = &p["other_axes"][0];
    let designed = axial["designed_q_star_minus_one"].as_f64().unwrap();
    let e = json(&["eval", &tweezer(), "--ramp", "shortcut 5 us", "--json"]);
    let evaluated = e["axes"][1]["q_star_minus_one"].as_f64().unwrap();
    assert!((designed - evaluated).abs() < 1e-9 * evaluated, "{designed} vs {evaluated}");
    // At 100 MS/s the axial axis is played as designed to well within the tolerance.
    let played = axial["played_q_star_minus_one"].as_f64().unwrap();
    assert!((played - designed).abs() < 1e-3, "{played} vs {designed}");
}

#[test]
fn a_harmonic_check_through_the_wavefunction_solver_matches_husimi() {
    // Through the split-step solver (never routed to the moment engine), a harmonic
    // well's energy ratio is Husimi's Q* and its ground fidelity sqrt(2/(1 + Q*))
    // (K. Husimi, Prog. Theor. Phys. 9, 381 (1953)), for any gain and offset.
    let p = tweezer();
    for (gain, offset) in [("1", "0Hz"), ("0.3", "-5kHz"), ("0.05", "2kHz")] {
        let args = [
            "trap-check",
            &p,
            "--ramp",
            "shortcut 5 us",
            "--shape",
            "harmonic",
            "--gain",
            gain,
            &format!("--offset={offset}"),
            "--json",
        ];
        let c = json(&args);
        let q = c["harmonic_q_star"].as_f64().unwrap();
        let r = c["energy_ratio"].as_f64().unwrap();
        let f = c["ground_fidelity"].as_f64().unwrap();
        assert!((r - q).abs() < 1e-8, "gain {gain}: energy ratio {r} vs Q* {q}");
        assert!((f - (2.0 / (1.0 + q)).sqrt()).abs() < 1e-8, "gain {gain}: fidelity {f}");
        assert!(c["error_estimate"].as_f64().unwrap() < 1e-8);
    }
}

#[test]
fn the_harmonic_q_star_of_an_axis_is_evals() {
    // The anharmonic check's harmonic figure and eval's axis figure come from two code
    // paths (the check's own Magnus run and the axis ramp of the moment engine).
    let p = tweezer();
    let c = json(&["trap-check", &p, "--ramp", "shortcut 5 us", "--json"]);
    let e = json(&["eval", &p, "--ramp", "shortcut 5 us", "--json"]);
    for (i, name) in ["radial", "axial"].iter().enumerate() {
        assert_eq!(c["axes"][i]["name"], *name);
        let a = c["axes"][i]["harmonic_q_star"].as_f64().unwrap();
        let b = e["axes"][i]["q_star"].as_f64().unwrap();
        assert!((a - b).abs() < 1e-10 * b, "{name}: {a} vs {b}");
    }
    assert_eq!(c["worst_axis"], "axial");
    // The worked example of the real-trap issue (independent values: energy ratio
    // 1.00056044026, ground fidelity 0.99988186073 from a 20,001-row table; the
    // analytic ramp differs by ~4e-10, the table's interpolation).
    let radial = &c["axes"][0];
    assert!((radial["energy_ratio"].as_f64().unwrap() - 1.000_560_440_26).abs() < 1e-8);
    assert!((radial["ground_fidelity"].as_f64().unwrap() - 0.999_881_860_73).abs() < 1e-8);
}

fn with<'a>(base: &[&'a str], extra: &[&'a str]) -> Vec<&'a str> {
    [base, extra].concat()
}

#[test]
fn bad_trap_check_inputs_exit_2_with_a_message() {
    let p = tweezer();
    let base = ["trap-check", p.as_str(), "--ramp", "shortcut 5 us"];
    fails_with(&with(&base, &["--shape", "gaussian"]), "--length: required with --shape gaussian");
    fails_with(
        &with(&base, &["--shape", "harmonic", "--length", "800nm"]),
        "--length: not allowed with --shape harmonic",
    );
    fails_with(&with(&base, &["--shape", "gaussian", "--length", "800"]), "a length needs a unit");
    fails_with(&with(&base, &["--shape", "gaussian", "--length", "800nm", "--mass", "87"]), "a mass needs a unit");
    fails_with(&with(&base, &["--shape", "gaussian", "--length", "800nm", "--mass", "-87u"]), "mass > 0");
    fails_with(&with(&base, &["--length", "800nm"]), "--length: allowed only with --shape");
    fails_with(&with(&base, &["--shape", "harmonic", "--gain", "0"]), "axis gain");
    fails_with(&["trap-check", "--waveform", "x.csv"], "");
}

//! The engine against an independent density-matrix propagation in a truncated Fock
//! basis made with QuTiP (J. R. Johansson, P. D. Nation, F. Nori, Comput. Phys. Commun.
//! 184, 1234 (2013)): tests/reference/qutip_reference.py wrote
//! tests/reference/qutip_reference.json; .ci/run re-derives it. Errors are judged
//! relative to H at 1e-6 (the bar; the agreement is far better).

#![expect(clippy::unwrap_used, reason = "helpers of tests fail loudly on bad fixtures")]

use quenchless_physics::constants::HBAR;
use quenchless_physics::cycle::{OttoCycle, WorkStroke};
use quenchless_physics::ramp::{LinearRamp, Ramp, RampShape, SampledReading};
use quenchless_physics::{Bath, EvaluationSettings, Moments, Noise, PropagationOptions, evaluate};
use quenchless_profile::read_waveform;
use serde_json::Value;
use std::path::PathBuf;

const TOL: f64 = 1e-6;

fn reference() -> (PathBuf, Value) {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/reference");
    let text = std::fs::read_to_string(dir.join("qutip_reference.json")).unwrap();
    (dir, serde_json::from_str(&text).unwrap())
}

fn f(v: &Value, k: &str) -> f64 {
    v[k].as_f64().unwrap_or_else(|| panic!("key {k}"))
}

#[test]
fn ramps_agree_with_qutip() {
    let (dir, r) = reference();
    let ramps = r["ramps"].as_array().unwrap();
    assert!(ramps.len() >= 3);
    let mut inverted = false;
    for case in ramps {
        let path = dir.join(case["waveform"].as_str().unwrap());
        let reading = if case["reading"] == "hold" { SampledReading::Hold } else { SampledReading::Linear };
        let ramp = read_waveform(&path).unwrap().to_ramp(reading, &path).unwrap();
        inverted |= ramp.min_omega2().0 < 0.0;
        let (wi, wf) = (ramp.omega_initial(), ramp.omega_final());
        assert!((wi / f(case, "omega_initial_rad_s") - 1.0).abs() < 1e-12);
        let s0 = Moments::thermal_occupation(wi, f(case, "initial_occupation")).unwrap();
        let ev = evaluate(&ramp, &s0, &EvaluationSettings::default()).unwrap();
        let end = ev.trajectory.last().unwrap().moments.energy_picture(wf);
        let q = HBAR * wi;
        let h = f(case, "energy_quanta");
        for (name, got, want) in
            [("H", end.h / q, h), ("L", end.l / q, f(case, "l_quanta")), ("C", end.c / q, f(case, "c_quanta"))]
        {
            assert!((got - want).abs() <= TOL * h, "{}: {name} = {got} vs QuTiP {want}", case["name"]);
        }
        assert!(
            (ev.report.q_star - f(case, "energy_ratio")).abs() <= TOL * f(case, "energy_ratio"),
            "{}",
            case["name"]
        );
    }
    assert!(inverted, "one reference waveform has omega² < 0 mid-ramp");
}

#[test]
fn otto_cycle_agrees_with_qutip() {
    let (_, r) = reference();
    let c = &r["cycles"][0];
    let bath = |b: &Value| Bath::with_occupation(f(b, "omega_rad_s"), f(b, "occupation"), f(b, "rate_per_s")).unwrap();
    let (hot, cold) = (bath(&c["hot"]), bath(&c["cold"]));
    assert_eq!(c["expansion"]["kind"], "linear");
    let (wh, wc) = (hot.omega(), cold.omega());
    let cycle = OttoCycle {
        hot,
        hot_time: f(&c["hot"], "time_s"),
        expansion: WorkStroke::Ramp(Ramp::Linear(LinearRamp::new(wh, wc, f(&c["expansion"], "time_s")).unwrap())),
        cold,
        cold_time: f(&c["cold"], "time_s"),
        compression: WorkStroke::Ramp(Ramp::Linear(LinearRamp::new(wc, wh, f(&c["compression"], "time_s")).unwrap())),
        noise: Noise::NONE,
    };
    let rep = cycle.analyse(&PropagationOptions::default()).unwrap();
    let fig = rep.figures.expect("stable");
    let scale = f(&c["corners"][0], "energy_quanta");
    for (got, want) in fig.corners.iter().zip(c["corners"].as_array().unwrap()) {
        assert_eq!(got.label, want["label"].as_str().unwrap());
        assert!((got.omega_rad_s / f(want, "omega_rad_s") - 1.0).abs() < 1e-12);
        for (g, k) in [(got.energy_quanta, "energy_quanta"), (got.l_quanta, "l_quanta"), (got.c_quanta, "c_quanta")] {
            assert!((g - f(want, k)).abs() <= TOL * scale, "{}: {k} {g} vs QuTiP {}", got.label, f(want, k));
        }
    }
    for (g, k) in [
        (fig.work_out_quanta, "work_out_quanta"),
        (fig.heat_hot_quanta, "heat_hot_quanta"),
        (fig.heat_cold_quanta, "heat_cold_quanta"),
    ] {
        assert!((g - f(c, k)).abs() <= TOL * scale, "{k}: {g} vs QuTiP {}", f(c, k));
    }
}

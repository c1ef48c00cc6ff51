use approx::assert_relative_eq;
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::propagate::{fundamental_between, q_star_from_fundamental};
use quenchless_physics::ramp::{
    LinearRamp, PiecewiseConstantRamp, Ramp, RampShape, SampledColumn, SampledRamp, SampledReading, Segment,
    SplineRamp, SplineShape, SplineSpace,
};
use quenchless_physics::{EvaluationSettings, Moments, PropagationOptions, evaluate};

use super::W_100K;

/// Sudden quench: Q* = (omega_i² + omega_f²)/(2 omega_i omega_f).
/// Source: K. Husimi, Prog. Theor. Phys. 9, 381 (1953); S. Deffner and E. Lutz,
/// Phys. Rev. E 77, 021128 (2008).
#[test]
fn sudden_quench_q_star_matches_husimi() {
    for (wi, wf) in [(W_100K, 0.3 * W_100K), (W_100K, 2.5 * W_100K), (W_100K, 0.01 * W_100K)] {
        // A jump to omega_f followed by a hold at omega_f: the hold only rotates
        // the state in the final trap, so Q* is that of the bare quench.
        let ramp = Ramp::PiecewiseConstant(
            PiecewiseConstantRamp::new(wi, wf, vec![Segment { omega2: wf * wf, duration: 3.7e-6 }]).unwrap(),
        );
        let q = q_star(&ramp, &PropagationOptions::default()).unwrap();
        let expected = (wi * wi + wf * wf) / (2.0 * wi * wf);
        assert_relative_eq!(q, expected, max_relative = 1e-12);
    }
}

/// A held table and the equivalent piecewise-constant ramp are the same exact
/// product of step matrices (consistency of two exact paths; no external source).
#[test]
fn held_table_equals_piecewise_constant() {
    let n = 300;
    let dt = 0.05e-6;
    let times: Vec<f64> = (0..n).map(|k| k as f64 * dt).collect();
    let omegas: Vec<f64> = (0..n).map(|k| W_100K * (1.0 - 0.6 * (k as f64 / (n - 1) as f64))).collect();
    let held =
        Ramp::Sampled(SampledRamp::new(times, omegas.clone(), SampledColumn::Omega, SampledReading::Hold).unwrap());
    let segs = omegas[..n - 1].iter().map(|w| Segment { omega2: w * w, duration: dt }).collect();
    let pc = Ramp::PiecewiseConstant(PiecewiseConstantRamp::new(omegas[0], omegas[n - 1], segs).unwrap());
    let opts = PropagationOptions::default();
    let (a, _) = fundamental_between(&held, 0.0, held.duration(), &opts).unwrap();
    let (b, _) = fundamental_between(&pc, 0.0, pc.duration(), &opts).unwrap();
    for (x, y) in [(a.a, b.a), (a.b * W_100K, b.b * W_100K), (a.c / W_100K, b.c / W_100K), (a.d, b.d)] {
        assert!((x - y).abs() < 1e-12, "{x} vs {y}");
    }
}

/// The fundamental matrix of every unitary stroke has det = 1 (Liouville's theorem
/// for x'' = -omega² x; textbook, from memory).
#[test]
fn determinant_is_one_for_every_family() {
    let wi = W_100K;
    let wf = 0.4 * W_100K;
    let tau = 8e-6;
    let ramps = vec![
        Ramp::Linear(LinearRamp::new(wi, wf, tau).unwrap()),
        Ramp::Spline(
            SplineRamp::new(
                vec![0.0, 2e-6, 5e-6, tau],
                vec![wi, 0.8 * wi, 0.2 * wi, wf],
                SplineShape::Monotone,
                SplineSpace::Omega,
                true,
            )
            .unwrap(),
        ),
        Ramp::Spline(
            SplineRamp::new(
                vec![0.0, 3e-6, tau],
                vec![wi, 0.1 * wi, wf],
                SplineShape::Smooth,
                SplineSpace::LogOmega,
                false,
            )
            .unwrap(),
        ),
    ];
    for r in &ramps {
        let (m, _) = fundamental_between(r, 0.0, r.duration(), &PropagationOptions::default()).unwrap();
        assert!((m.det() - 1.0).abs() < 1e-12, "{}: det {}", r.family_name(), m.det());
        let q = q_star_from_fundamental(&m, wi, wf);
        assert!(q >= 1.0 - 1e-12, "Q* >= 1 (Husimi 1953): {q}");
    }
}

/// The monotone spline stays between neighbouring knot values (the shape-preserving
/// property of Fritsch and Carlson, SIAM J. Numer. Anal. 17, 238 (1980)).
#[test]
fn monotone_spline_does_not_overshoot() {
    let t = vec![0.0, 1e-6, 2e-6, 3e-6, 4e-6];
    let w = vec![1.0e6, 0.3e6, 0.29e6, 0.9e6, 0.5e6];
    let s = SplineRamp::new(t.clone(), w.clone(), SplineShape::Monotone, SplineSpace::Omega, false).unwrap();
    for k in 0..4 {
        let (lo, hi) = (w[k].min(w[k + 1]), w[k].max(w[k + 1]));
        for j in 0..=100 {
            let x = t[k] + (t[k + 1] - t[k]) * f64::from(j) / 100.0;
            let v = s.omega2(x).sqrt();
            assert!(v >= lo * (1.0 - 1e-12) && v <= hi * (1.0 + 1e-12), "t={x} omega={v} outside [{lo}, {hi}]");
        }
    }
}

/// Inverted stretches are marked and quantities needing omega are undefined there.
#[test]
fn inverted_stretch_has_no_quanta() {
    let w = W_100K;
    let segs = vec![
        Segment { omega2: w * w, duration: 1e-6 },
        Segment { omega2: -0.3 * w * w, duration: 0.5e-6 },
        Segment { omega2: w * w, duration: 1e-6 },
    ];
    let ramp = Ramp::PiecewiseConstant(PiecewiseConstantRamp::new(w, w, segs).unwrap());
    let ev = evaluate(&ramp, &Moments::ground(w).unwrap(), &EvaluationSettings::default()).unwrap();
    let inv: Vec<_> = ev.trajectory.iter().filter(|p| p.omega2 <= 0.0).collect();
    assert!(!inv.is_empty());
    assert!(inv.iter().all(|p| p.energy_quanta.is_none() && p.mu.is_none() && p.c_quanta.is_none()));
    assert!(ev.report.violations.iter().any(|v| v.kind == quenchless_physics::ViolationKind::Inverted));
    assert!(ev.report.inverts());
}

/// Bad input names the parameter, the value and the range.
#[test]
fn bad_ramp_input_is_named() {
    let e = LinearRamp::new(W_100K, -1.0, 1e-6).unwrap_err().to_string();
    assert!(e.contains("final frequency") && e.contains("-1"), "{e}");
    let e = SampledRamp::new(vec![0.0, 1.0, 1.0], vec![1.0, 1.0, 1.0], SampledColumn::Omega, SampledReading::Linear)
        .unwrap_err()
        .to_string();
    assert!(e.contains("row 3"), "{e}");
    let e = SampledRamp::new(vec![0.0, 1.0], vec![1.0, -1.0], SampledColumn::Omega, SampledReading::Linear)
        .unwrap_err()
        .to_string();
    assert!(e.contains("omega in row 2"), "{e}");
}

/// The row lookup of a uniform table (computed from t, O(1)) agrees with a plain
/// binary search over the row times (common practice, no source) at row times, between
/// rows, outside the table and for a table uniform only to 1e-9.
#[test]
fn uniform_row_lookup_matches_a_binary_search() {
    use quenchless_physics::ramp::{SampledColumn, SampledReading};
    let n = 1001;
    let dt = 3.7e-9;
    let times: Vec<f64> = (0..n).map(|k| (k as f64 + 4e-10 * ((k * 7919) % 13) as f64 / 13.0) * dt).collect();
    let values: Vec<f64> = (0..n).map(|k| W_100K * (1.0 + 1e-3 * k as f64)).collect();
    let ramp = SampledRamp::new(times.clone(), values, SampledColumn::Omega, SampledReading::Linear).unwrap();
    assert!(ramp.uniform_step().is_some(), "uniform to 1e-9");
    let search = |t: f64| times.partition_point(|&x| x <= t).clamp(1, n - 1) - 1;
    let mut probes = vec![-1.0, -0.0, f64::NAN, 1.0, times[n - 1], times[n - 1] * 2.0];
    for &t in &times {
        probes.extend([t, t + 0.5 * dt, t - 1e-3 * dt, t + 1e-3 * dt]);
    }
    for t in probes {
        assert_eq!(ramp.row_index(t), search(t), "t = {t:e}");
    }
}

//! Every axis one control moves: each axis is its own oscillator with omega_axis² =
//! gain omega² + offset, so its Q* follows from Husimi's closed form (K. Husimi, Prog.
//! Theor. Phys. 9, 381 (1953)) on the axis's own frequencies.

use quenchless_physics::axes::{TrapAxis, evaluate_axes, occupation_on_axis, worst_axis};
use quenchless_physics::diagnostics::{q_star, q_star_minus_one};
use quenchless_physics::ramp::{
    AxisLaw, PiecewiseConstantRamp, PolynomialRamp, Ramp, RampShape, Segment, ShortcutRamp,
};
use quenchless_physics::state::{bose_einstein, temperature_of_occupation};
use quenchless_physics::{EvaluationSettings, PropagationOptions, TrapLimits};

use super::W_100K;

/// Husimi's Q* of a sudden quench wi -> w1, a hold of time t at w1, a sudden quench
/// to wf: M = [[cos th, sin th / w1], [-w1 sin th, cos th]], th = w1 t, and
/// Q* = [wi²(wf² b² + d²) + (wf² a² + c²)] / (2 wi wf) (Husimi 1953).
fn husimi_one_hold(wi: f64, w1: f64, t: f64, wf: f64) -> f64 {
    let th = w1 * t;
    let (a, b, c, d) = (th.cos(), th.sin() / w1, -w1 * th.sin(), th.cos());
    (wi * wi * (wf * wf * b * b + d * d) + (wf * wf * a * a + c * c)) / (2.0 * wi * wf)
}

#[test]
fn an_axis_of_a_hold_sequence_matches_husimis_closed_form_on_its_own_frequencies() {
    let (wi, w1, wf, t) = (W_100K, 0.6 * W_100K, 0.25 * W_100K, 1.3e-6);
    let ramp = Ramp::PiecewiseConstant(
        PiecewiseConstantRamp::new(wi, wf, vec![Segment { omega2: w1 * w1, duration: t }]).unwrap(),
    );
    // A tweezer-like axis (gain 0.05) and a Paul-trap radial axis (omega_r² = omega_p²
    // - omega_z²/2, gain -1/2, offset omega_p²).
    let wp2 = (3.0 * W_100K).powi(2);
    for law in
        [AxisLaw::new(0.05, 0.0).unwrap(), AxisLaw::new(-0.5, wp2).unwrap(), AxisLaw::new(2.0, -0.1 * wi * wi).unwrap()]
    {
        let axis = ramp.on_axis(law).unwrap();
        let f = |w: f64| (law.gain * w * w + law.offset_omega2).sqrt();
        let expected = husimi_one_hold(f(wi), f(w1), t, f(wf));
        assert!((axis.omega_initial() - f(wi)).abs() < 1e-9 * f(wi));
        assert!((axis.omega_final() - f(wf)).abs() < 1e-9 * f(wf));
        let q = q_star(&axis, &PropagationOptions::default()).unwrap();
        assert!((q - expected).abs() < 1e-12 * expected, "gain {}: Q* {q} vs Husimi {expected}", law.gain);
    }
}

#[test]
fn an_axis_of_a_polynomial_ramp_is_the_polynomial_with_scaled_coefficients() {
    // omega² = sum a_k (t/tau)^k, so gain omega² + offset is the polynomial with
    // coefficients gain a_k and gain a_0 + offset: two independent code paths (the
    // axis walker and the polynomial family) must agree.
    let wi2 = W_100K * W_100K;
    let coeffs = vec![wi2, -1.6 * wi2, 0.9 * wi2, -0.2375 * wi2];
    let tau = 4e-6;
    let ramp = Ramp::Polynomial(PolynomialRamp::new(coeffs.clone(), tau).unwrap());
    let (g, c) = (0.045, 0.02 * wi2);
    let axis = ramp.on_axis(AxisLaw::new(g, c).unwrap()).unwrap();
    let mut scaled: Vec<f64> = coeffs.iter().map(|a| g * a).collect();
    scaled[0] += c;
    let direct = Ramp::Polynomial(PolynomialRamp::new(scaled, tau).unwrap());
    let opts = PropagationOptions::with_accuracy(1e-13).unwrap();
    let (a, b) = (q_star_minus_one(&axis, &opts).unwrap(), q_star_minus_one(&direct, &opts).unwrap());
    assert!(a > 1e-3, "the axis is far from adiabatic: {a:e}");
    assert!((a - b).abs() < 1e-10 * b, "axis walker {a:e} vs polynomial {b:e}");
}

#[test]
fn the_shortcut_for_one_axis_is_not_one_for_an_axis_at_a_fixed_ratio() {
    // Worked example of the real-trap issue (checked independently there): the invariant
    // shortcut 100 -> 25 kHz in 5 us (Chen et al., PRL 104, 063002 (2010)) ends the
    // radial axis energy-diagonal, and an axis with omega_axis² = 0.045 omega² at
    // Q* = 2.01 (two digits stated).
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 5e-6).unwrap());
    let axes = [
        TrapAxis { name: "radial".into(), law: AxisLaw::IDENTITY, limits: TrapLimits::default() },
        TrapAxis { name: "axial".into(), law: AxisLaw::new(0.045, 0.0).unwrap(), limits: TrapLimits::default() },
    ];
    let reports = evaluate_axes(&ramp, 0.0, &axes, &EvaluationSettings::default()).unwrap();
    assert!(reports[0].report.q_star_minus_one < 1e-10);
    assert!((reports[1].report.q_star - 2.01).abs() < 0.005, "axial Q* {}", reports[1].report.q_star);
    assert_eq!(worst_axis(&reports), Some(1));
    assert_eq!(reports[1].verdict, "fail");
    assert_eq!(reports[0].verdict, "pass");
}

#[test]
fn every_axis_starts_at_the_reference_axis_temperature() {
    // Bose-Einstein occupation at one temperature (any statistical-mechanics text).
    for (n_ref, ratio) in [(0.3, 0.2121), (2.0, 1.7), (1e-3, 0.05), (40.0, 0.5)] {
        let t = temperature_of_occupation(W_100K, n_ref).unwrap();
        let expected = bose_einstein(ratio * W_100K, t).unwrap();
        let n = occupation_on_axis(W_100K, n_ref, ratio * W_100K).unwrap();
        assert!((n - expected).abs() < 1e-12 * expected.max(1e-300), "N {n_ref}, ratio {ratio}: {n} vs {expected}");
    }
    assert!(occupation_on_axis(W_100K, 0.0, 0.3 * W_100K).unwrap().abs() < f64::MIN_POSITIVE);
}

#[test]
fn an_axis_without_a_trap_at_the_ends_is_refused() {
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 5e-6).unwrap());
    // omega_axis² = omega² - (50 kHz)² has no trap after the ramp (25 kHz).
    let law = AxisLaw::new(1.0, -(0.5 * W_100K).powi(2)).unwrap();
    let e = ramp.on_axis(law).unwrap_err().to_string();
    assert!(e.contains("after the ramp"), "{e}");
    assert!(AxisLaw::new(0.0, 0.0).is_err());
    assert!(AxisLaw::new(f64::NAN, 0.0).is_err());
}

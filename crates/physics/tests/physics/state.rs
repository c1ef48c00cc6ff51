use approx::assert_relative_eq;
use quenchless_physics::constants::{BOLTZMANN, HBAR, TWO_PI};
use quenchless_physics::ramp::{Ramp, ShortcutRamp, SplineRamp, SplineShape, SplineSpace};
use quenchless_physics::state::bose_einstein;
use quenchless_physics::{EvaluationSettings, Moments, evaluate};

use super::W_100K;

/// Bose-Einstein occupation at high temperature: nbar = x⁻¹ - 1/2 + x/12 - x³/720 + ...
/// with x = hbar omega / k_B T (the Laurent series of 1/(e^x - 1), Bernoulli numbers;
/// Abramowitz and Stegun, Handbook of Mathematical Functions (1964), 23.1.1).
#[test]
fn bose_einstein_matches_series() {
    let omega = TWO_PI * 1e6;
    let t = 1e-3;
    let x = HBAR * omega / (BOLTZMANN * t);
    let series = 1.0 / x - 0.5 + x / 12.0 - x.powi(3) / 720.0 + x.powi(5) / 30240.0;
    assert_relative_eq!(bose_einstein(omega, t).unwrap(), series, max_relative = 1e-12);
    assert!(bose_einstein(omega, 0.0).unwrap().abs() < f64::MIN_POSITIVE, "exactly zero at T = 0");
}

/// Entropy of a thermal state: S/k_B = (n+1) ln(n+1) - n ln n (ideal Bose mode;
/// e.g. Landau and Lifshitz, Statistical Physics, from memory).
#[test]
fn thermal_entropy() {
    for n in [0.0, 0.01, 0.5, 3.0, 250.0] {
        let s = Moments::thermal_occupation(W_100K, n).unwrap().entropy();
        let expected = if n == 0.0 { 0.0 } else { (n + 1.0) * (n + 1.0_f64).ln() - n * n.ln() };
        assert!((s - expected).abs() < 1e-9 * expected.max(1.0), "n = {n}: {s} vs {expected}");
    }
}

/// The Casimir invariant K = XY - D² is conserved by every unitary stroke; rounding
/// grows like eps XY, so the drift is judged relative to XY (Rezek and Kosloff 2006, from memory).
/// Entropy, a function of K, is unchanged too.
#[test]
fn casimir_conserved_on_unitary_strokes() {
    let wi = W_100K;
    let ramps = [
        Ramp::Shortcut(ShortcutRamp::new(wi, 0.1 * wi, 0.12 * std::f64::consts::TAU / wi).unwrap()),
        Ramp::Spline(
            SplineRamp::new(
                vec![0.0, 1e-6, 2e-6, 6e-6],
                vec![wi, 0.05 * wi, 1.5 * wi, 0.3 * wi],
                SplineShape::Smooth,
                SplineSpace::Omega,
                false,
            )
            .unwrap(),
        ),
    ];
    for ramp in &ramps {
        let s0 = Moments::squeezed(wi, 2.0, 1.1, 0.3).unwrap();
        let ev = evaluate(ramp, &s0, &EvaluationSettings::default()).unwrap();
        let k0 = s0.casimir();
        for p in &ev.trajectory {
            let xy = p.moments.x * p.moments.y;
            assert!(
                (p.casimir - k0).abs() <= 1e-10 * xy,
                "{}: t={:e} drift {:e} (XY {:e})",
                ramp.family_name(),
                p.t,
                p.casimir - k0,
                xy
            );
        }
        assert!(
            (ev.report.entropy_final - ev.report.entropy_initial).abs() < 1e-8 * ev.report.entropy_initial.max(1.0)
        );
    }
}

/// Coherence ratio of a squeezed state: sqrt(L² + C²)/H = tanh 2r (the squeeze maps
/// H -> H cosh 2r with coherence H sinh 2r; su(1,1) algebra, Kosloff and Rezek, Entropy 19, 136 (2017)).
#[test]
fn squeezed_state_coherence() {
    let s = Moments::squeezed(W_100K, 0.0, 0.35, 1.0).unwrap();
    let e = s.energy_picture(W_100K);
    assert_relative_eq!(e.l.hypot(e.c) / e.h, (0.7f64).tanh(), max_relative = 1e-12);
    assert_relative_eq!(s.casimir(), 0.25 * HBAR * HBAR, max_relative = 1e-12);
}

#[test]
fn uncertainty_violation_is_rejected() {
    let g = Moments::ground(W_100K).unwrap();
    let e = Moments::new(g.x * 0.5, g.y, 0.0).unwrap_err().to_string();
    assert!(e.contains("uncertainty"), "{e}");
}

//! Property tests over random valid ramps and states (proptest). The invariants are
//! those of Rezek and Kosloff 2006, Husimi 1953 and Kosloff and Rezek 2017: Casimir conservation on unitary strokes
//! (judged relative to XY), Q* >= 1 (Husimi 1953), coherence ratio in [0, 1) where
//! omega² > 0, entropy unchanged by unitary strokes, monotone thermalisation, and the
//! limit cycle as a fixed point of the cycle map. Q* - 1 is checked against Husimi's
//! formula evaluated directly in the test (K. Husimi, Prog. Theor. Phys. 9, 381 (1953)).

use proptest::prelude::*;
use quenchless_physics::cycle::{OttoCycle, WorkStroke};
use quenchless_physics::propagate::fundamental_between;
use quenchless_physics::ramp::{ConstantMuRamp, Ramp, RampShape, ShortcutRamp, SplineRamp, SplineShape, SplineSpace};
use quenchless_physics::{Bath, EvaluationSettings, Moments, Noise, PropagationOptions, evaluate};

use super::W_100K;

fn spline_ramp() -> impl Strategy<Value = Ramp> {
    (3usize..8, prop::collection::vec(0.02f64..3.0, 8), 0.3f64..3.0, any::<bool>(), any::<bool>(), 1.0f64..20.0)
        .prop_map(|(n, ratios, end, smooth, log, periods)| {
            let tau = periods * std::f64::consts::TAU / W_100K;
            let times: Vec<f64> = (0..n).map(|k| tau * k as f64 / (n - 1) as f64).collect();
            let mut omegas: Vec<f64> = (0..n).map(|k| W_100K * ratios[k]).collect();
            omegas[0] = W_100K;
            omegas[n - 1] = W_100K * end;
            let shape = if smooth { SplineShape::Smooth } else { SplineShape::Monotone };
            let space = if log { SplineSpace::LogOmega } else { SplineSpace::Omega };
            Ramp::Spline(SplineRamp::new(times, omegas, shape, space, false).unwrap())
        })
}

fn shortcut_ramp() -> impl Strategy<Value = Ramp> {
    // Short durations force omega² < 0 and strong squeezing mid-ramp.
    (0.05f64..5.0, 0.08f64..4.0).prop_map(|(periods, ratio)| {
        let tau = periods * std::f64::consts::TAU / W_100K;
        Ramp::Shortcut(ShortcutRamp::new(W_100K, ratio * W_100K, tau).unwrap())
    })
}

fn any_ramp() -> impl Strategy<Value = Ramp> {
    prop_oneof![spline_ramp(), shortcut_ramp()]
}

fn constant_mu_ramp() -> impl Strategy<Value = Ramp> {
    // mu of either sign, from near-adiabatic to sudden-like; expansions and compressions.
    (0.1f64..3.0, 1e-3f64..0.5).prop_map(|(ratio, mu)| {
        let mu = if ratio < 1.0 { -mu } else { mu };
        Ramp::ConstantMu(ConstantMuRamp::with_mu(W_100K, ratio * W_100K, mu).unwrap())
    })
}

fn state() -> impl Strategy<Value = Moments> {
    (0.0f64..10.0, -1.5f64..1.5, 0.0f64..6.3).prop_map(|(n, r, phi)| Moments::squeezed(W_100K, n, r, phi).unwrap())
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 40, ..ProptestConfig::default() })]

    #[test]
    fn unitary_invariants_hold(ramp in any_ramp(), s0 in state()) {
        let settings = EvaluationSettings { samples: 101, ..EvaluationSettings::default() };
        let ev = evaluate(&ramp, &s0, &settings).unwrap();
        prop_assert!(ev.report.q_star >= 1.0 - 1e-12, "Q* = {}", ev.report.q_star);
        let k0 = s0.casimir();
        for p in &ev.trajectory {
            let xy = p.moments.x * p.moments.y;
            prop_assert!((p.casimir - k0).abs() <= 1e-10 * xy, "Casimir drift {:e} vs XY {:e}", p.casimir - k0, xy);
            if let Some(c) = p.coherence_ratio {
                prop_assert!((0.0..1.0).contains(&c), "coherence ratio {c}");
            }
        }
        let ds = (ev.report.entropy_final - ev.report.entropy_initial).abs();
        prop_assert!(ds <= 1e-7 * ev.report.entropy_initial.max(1.0), "entropy changed by {ds:e}");
    }

    #[test]
    fn thermalisation_moves_energy_toward_equilibrium(s0 in state(), nbar in 0.0f64..20.0, rate in 1e2f64..1e6) {
        let bath = Bath::with_occupation(W_100K, nbar, rate).unwrap();
        let e0 = s0.energy_picture(W_100K);
        let heq = bath.equilibrium_energy();
        let mut prev = (e0.h - heq).abs();
        for k in 1..12 {
            let v = bath.stroke(f64::from(k) * 0.3 / rate, &Noise::NONE).unwrap().apply(&nalgebra::Vector3::new(e0.h, e0.l, e0.c));
            let d = (v[0] - heq).abs();
            prop_assert!(d <= prev * (1.0 + 1e-14));
            prev = d;
        }
    }

    #[test]
    fn limit_cycle_is_a_fixed_point(tau_h in 5e-6f64..60e-6, tau_c in 5e-6f64..60e-6, ramp_t in 2e-6f64..20e-6, nh in 0.5f64..8.0, nc in 0.0f64..0.5) {
        let (wh, wc) = (W_100K, 0.45 * W_100K);
        let c = OttoCycle {
            hot: Bath::with_occupation(wh, nh, 3e4).unwrap(),
            hot_time: tau_h,
            expansion: WorkStroke::Ramp(Ramp::Shortcut(ShortcutRamp::new(wh, wc, ramp_t).unwrap())),
            cold: Bath::with_occupation(wc, nc, 3e4).unwrap(),
            cold_time: tau_c,
            compression: WorkStroke::Ramp(Ramp::Shortcut(ShortcutRamp::new(wc, wh, ramp_t).unwrap())),
            noise: Noise::NONE,
        };
        let rep = c.analyse(&PropagationOptions::default()).unwrap();
        prop_assert!(rep.stable);
        let f = rep.figures.unwrap();
        prop_assert!(f.residual < 1e-10, "residual {:e}", f.residual);
    }

    /// Q* - 1 is reported without cancellation: never below zero, equal to
    /// 1 + Q* to the last bit, and where Husimi's Q* - 1 is well conditioned (above 1e-6)
    /// equal to it computed directly from the fundamental matrix. For a thermal start
    /// the friction work is (omega_f/omega_i) (n + 1/2) (Q* - 1) >= 0 and the entropy
    /// is unchanged (Rezek and Kosloff, New J. Phys. 8, 83 (2006)).
    #[test]
    fn q_star_minus_one_has_no_rounding_leak(
        ramp in prop_oneof![any_ramp(), constant_mu_ramp()],
        n in 0.0f64..10.0,
    ) {
        let s0 = Moments::thermal_occupation(W_100K, n).unwrap();
        let settings = EvaluationSettings { samples: 21, ..EvaluationSettings::default() };
        let r = evaluate(&ramp, &s0, &settings).unwrap().report;
        prop_assert!(r.q_star_minus_one >= 0.0, "Q* - 1 = {:e}", r.q_star_minus_one);
        prop_assert!(r.q_star.to_bits() == (1.0 + r.q_star_minus_one).to_bits());
        let (m, _) = fundamental_between(&ramp, 0.0, ramp.duration(), &settings.propagation).unwrap();
        let (wi, wf) = (ramp.omega_initial(), ramp.omega_final());
        let husimi = (wi * wi * (wf * wf * m.b * m.b + m.d * m.d) + wf * wf * m.a * m.a + m.c * m.c) / (2.0 * wi * wf);
        let direct = husimi - 1.0;
        if direct > 1e-6 {
            prop_assert!((r.q_star_minus_one / direct - 1.0).abs() < 1e-7, "{:e} vs {direct:e}", r.q_star_minus_one);
        } else {
            prop_assert!((r.q_star_minus_one - direct).abs() < 1e-13, "{:e} vs {direct:e}", r.q_star_minus_one);
        }
        let friction = wf / wi * (n + 0.5) * r.q_star_minus_one;
        prop_assert!(r.friction_work_quanta >= 0.0);
        prop_assert!((r.friction_work_quanta - friction).abs() <= 1e-12 * friction.max(1e-300));
        prop_assert!(r.entropy_final.to_bits() == r.entropy_initial.to_bits());
    }
}

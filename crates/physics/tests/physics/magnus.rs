//! Order of the Magnus step: 4th with the commutator, 2nd without (S. Blanes,
//! F. Casas, J. A. Oteo, J. Ros, Phys. Rep. 470, 151 (2009)); the exact reference is
//! the constant-mu closed form (Rezek and Kosloff, New J. Phys. 8, 83 (2006)).

use quenchless_physics::Moments;
use quenchless_physics::propagate::{GAUSS_NODES, Mat2, constant_mu_moment_map, magnus2_step, magnus4_step};
use quenchless_physics::ramp::{ConstantMuRamp, RampShape};

use super::W_100K;

fn error_with_steps(n: usize, fourth: bool) -> f64 {
    let wi = W_100K;
    let wf = 0.25 * W_100K;
    let ramp = ConstantMuRamp::with_mu(wi, wf, -0.7).unwrap();
    let tau = ramp.duration();
    let h = tau / n as f64;
    let mut m = Mat2::IDENTITY;
    for k in 0..n {
        let t = k as f64 * h;
        let w1 = ramp.omega2(t + GAUSS_NODES[0] * h);
        let w2 = ramp.omega2(t + GAUSS_NODES[1] * h);
        let s = if fourth { magnus4_step(w1, w2, h) } else { magnus2_step(w1, w2, h) };
        m = s.mul(&m);
    }
    let s0 = Moments::thermal_occupation(wi, 1.0).unwrap();
    let exact = s0.mapped(&constant_mu_moment_map(&ramp, 0.0, tau)).energy_picture(wf);
    let got = s0.mapped(&m.moment_map()).energy_picture(wf);
    ((exact.h - got.h).abs().max((exact.l - got.l).abs()).max((exact.c - got.c).abs())) / exact.h
}

#[test]
fn magnus4_converges_at_fourth_order() {
    let e1 = error_with_steps(100, true);
    let e2 = error_with_steps(200, true);
    let order = (e1 / e2).log2();
    assert!((order - 4.0).abs() < 0.3, "observed order {order} ({e1:e} -> {e2:e})");
}

#[test]
fn dropping_the_commutator_falls_to_second_order() {
    let e1 = error_with_steps(100, false);
    let e2 = error_with_steps(200, false);
    let order = (e1 / e2).log2();
    assert!((order - 2.0).abs() < 0.3, "observed order {order}");
}

/// A step whose error estimate overflows ends with an error instead of looping: found
/// by the app's random-interaction test (a 120 -> 30 kHz shortcut stretched to about
/// 1e297 s). The shortcut here is inside the working range but long enough that
/// omega t overflows the step's entire functions (no external source: robustness).
#[test]
fn an_overflowing_step_is_an_error_not_a_hang() {
    use quenchless_physics::ramp::{LinearRamp, Ramp};
    use quenchless_physics::{PropagationOptions, diagnostics::q_star};
    let ramp = Ramp::Linear(LinearRamp::new(1e29, 1e-29, 1e29).unwrap());
    let r = q_star(&ramp, &PropagationOptions { max_steps: 10_000, ..PropagationOptions::default() });
    let e = r.expect_err("the step overflows").to_string();
    assert!(e.contains("overflowed"), "{e}");
}

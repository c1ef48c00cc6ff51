//! Constant adiabatic speed: closed forms of Y. Rezek and R. Kosloff, New J. Phys. 8,
//! 83 (2006) (also R. Kosloff and Y. Rezek, Entropy 19, 136 (2017)).

use approx::assert_relative_eq;
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::propagate::{constant_mu_moment_map, fundamental_between};
use quenchless_physics::ramp::{ConstantMuRamp, Ramp, RampShape};
use quenchless_physics::{Moments, PropagationOptions};

use super::W_100K;

/// Relative agreement of closed form and adaptive Magnus (both at their limits).
const TOL_MAP: f64 = 1e-9;

fn compare_closed_form_with_magnus(mu: f64, wf: f64) {
    let wi = W_100K;
    let r = ConstantMuRamp::with_mu(wi, wf, mu).unwrap();
    let closed = constant_mu_moment_map(&r, 0.0, r.duration());
    let ramp = Ramp::ConstantMu(r);
    let opts = PropagationOptions { accuracy: 1e-12, ..PropagationOptions::default() };
    let (m, _) = fundamental_between(&ramp, 0.0, ramp.duration(), &opts).unwrap();
    // Compare on a squeezed start so that every matrix entry matters.
    let s0 = Moments::squeezed(wi, 0.7, 0.4, 0.9).unwrap();
    let a = s0.mapped(&closed).energy_picture(wf);
    let b = s0.mapped(&m.moment_map()).energy_picture(wf);
    for (x, y) in [(a.h, b.h), (a.l, b.l), (a.c, b.c)] {
        assert!((x - y).abs() <= TOL_MAP * a.h, "mu = {mu}: {x:e} vs {y:e} (H = {:e})", a.h);
    }
}

/// Closed form vs direct integration in all three regimes and just beside |mu| = 2.
#[test]
fn closed_form_matches_direct_integration_in_all_regimes() {
    for mu in [0.3, 1.2, 1.999_999, 2.0, 2.000_001, 3.5] {
        compare_closed_form_with_magnus(mu, 3.0 * W_100K);
        compare_closed_form_with_magnus(-mu, W_100K / 3.0);
    }
}

/// The single formula is smooth across the exceptional point |mu| = 2: Q* just
/// below, at and above agree to first order in the offset (no lost digits).
#[test]
fn no_loss_of_digits_at_exceptional_point() {
    let wi = W_100K;
    let wf = 0.2 * W_100K;
    let q = |mu: f64| {
        q_star(&Ramp::ConstantMu(ConstantMuRamp::with_mu(wi, wf, mu).unwrap()), &PropagationOptions::default()).unwrap()
    };
    let (below, at, above) = (q(-2.0 + 1e-9), q(-2.0), q(-2.0 - 1e-9));
    assert!((below - at).abs() < 1e-7 * at && (above - at).abs() < 1e-7 * at);
    // At |mu| = 2: exp(N theta) = I + theta N + theta² N²/2 (Jordan block), so for a
    // diagonal start Q* = 1 + mu² theta²/2 (Rezek and Kosloff 2006).
    let theta = (wf / wi).ln() / -2.0;
    assert_relative_eq!(at, 1.0 + 4.0 * theta * theta / 2.0, max_relative = 1e-13);
}

/// Q* = 1 + mu² (1 - cos(Om theta))/Om², Om = sqrt(4 - mu²), |mu| < 2.
#[test]
fn q_star_closed_form_below_two() {
    let wi = W_100K;
    for (mu, wf) in [(0.2, 5.0 * wi), (1.1, 1.7 * wi), (-0.9, 0.3 * wi)] {
        let ramp = Ramp::ConstantMu(ConstantMuRamp::with_mu(wi, wf, mu).unwrap());
        let theta: f64 = (wf / wi).ln() / mu;
        let om = (4.0 - mu * mu).sqrt();
        let expected = 1.0 + mu * mu * (1.0 - (om * theta).cos()) / (om * om);
        let q = q_star(&ramp, &PropagationOptions::default()).unwrap();
        assert_relative_eq!(q, expected, max_relative = 1e-12);
    }
}

/// Frictionless when Om |theta| = 2 pi k: |mu| = 2/sqrt(1 + r²), r = 2 pi k/|ln(wf/wi)|.
#[test]
fn frictionless_condition_gives_q_star_one() {
    let wi = W_100K;
    for (ratio, k) in [(0.1, 1), (0.1, 3), (4.0, 1), (4.0, 2)] {
        let wf = ratio * wi;
        let r = 2.0 * std::f64::consts::PI * f64::from(k) / ratio.ln().abs();
        let mu = (2.0 / (1.0 + r * r).sqrt()).copysign(wf - wi);
        let ramp = Ramp::ConstantMu(ConstantMuRamp::with_mu(wi, wf, mu).unwrap());
        let q = q_star(&ramp, &PropagationOptions::default()).unwrap();
        assert!((q - 1.0).abs() < 1e-10, "ratio {ratio}, k {k}: Q* - 1 = {:e}", q - 1.0);
    }
}

/// Check value computed from the frictionless condition of Rezek and Kosloff, New J.
/// Phys. 8, 83 (2006): omega_i = 1, omega_f = 0.1, k = 1 gives mu = -0.68818, tau = 13.0780/omega_i.
#[test]
fn frictionless_check_value() {
    let r = 2.0 * std::f64::consts::PI / 10f64.ln();
    let mu = -2.0 / (1.0 + r * r).sqrt();
    assert!((mu + 0.68818).abs() < 5e-6);
    let ramp = ConstantMuRamp::with_mu(1.0, 0.1, mu).unwrap();
    assert!((ramp.duration() - 13.0780).abs() < 5e-5, "{}", ramp.duration());
}

/// The adaptive Magnus propagation meets the requested accuracy on Q*, judged against
/// the closed form Q* = 1 + mu² (1 - cos(Om theta))/Om² (Rezek and Kosloff 2006).
#[test]
fn adaptive_magnus_meets_requested_accuracy() {
    use quenchless_physics::propagate::q_star_from_fundamental;
    let wi = W_100K;
    for (mu, wf) in [(-0.9, 0.2 * wi), (0.4, 6.0 * wi), (-1.7, 0.05 * wi)] {
        let ramp = Ramp::ConstantMu(ConstantMuRamp::with_mu(wi, wf, mu).unwrap());
        let theta: f64 = (wf / wi).ln() / mu;
        let om = (4.0 - mu * mu).sqrt();
        let exact = 1.0 + mu * mu * (1.0 - (om * theta).cos()) / (om * om);
        for acc in [1e-6, 1e-8, 1e-10, 1e-12] {
            let (m, _) =
                fundamental_between(&ramp, 0.0, ramp.duration(), &PropagationOptions::with_accuracy(acc).unwrap())
                    .unwrap();
            let q = q_star_from_fundamental(&m, wi, wf);
            assert!(
                (q - exact).abs() <= acc * exact,
                "mu {mu}, accuracy {acc:e}: error {:e}",
                (q - exact).abs() / exact
            );
        }
    }
}

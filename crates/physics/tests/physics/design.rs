//! Design on demand, against the closed forms of PHYSICS.md sections 5, 8 and 9.

use approx::assert_relative_eq;
use quenchless_physics::PropagationOptions;
use quenchless_physics::design::{
    RobustnessGrid, frictionless_constant_mu, nearest_frictionless_order, robustness_map, shortcut_for_duration,
    shortest_shortcut_above, time_optimal_holds,
};
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::propagate::{Mat2, constant_step, q_star_from_fundamental};
use quenchless_physics::ramp::{Ramp, RampShape, SampledColumn, SampledRamp, SampledReading};
use std::sync::atomic::AtomicBool;

use super::W_100K;

/// Rezek and Kosloff, New J. Phys. 8, 83 (2006): frictionless constant mu; check value
/// of PHYSICS.md section 5 (omega_i = 1, omega_f = 0.1, k = 1: mu = -0.68818,
/// tau = 13.0780/omega_i).
#[test]
fn constant_mu_synthesis() {
    let d = frictionless_constant_mu(1.0, 0.1, 1).unwrap();
    assert!((d.mu + 0.68818).abs() < 5e-6 && (d.duration - 13.0780).abs() < 5e-5);
    for (wf, k) in [(0.1 * W_100K, 1), (0.1 * W_100K, 4), (3.0 * W_100K, 2)] {
        let d = frictionless_constant_mu(W_100K, wf, k).unwrap();
        let q = q_star(&Ramp::ConstantMu(d.ramp.clone()), &PropagationOptions::default()).unwrap();
        assert!((q - 1.0).abs() < 1e-10, "k={k}: Q*-1 = {:e}", q - 1.0);
        let back = nearest_frictionless_order(W_100K, wf, d.duration * 1.01).unwrap();
        assert_eq!(back.order, k);
    }
}

/// The shortest shortcut above a floor sits on the floor (Chen et al. 2010 ansatz).
#[test]
fn shortest_shortcut_touches_the_floor() {
    let wi = W_100K;
    let wf = 0.2 * W_100K;
    for floor in [0.0, -0.5 * wf * wf, 0.5 * wf * wf] {
        let d = shortest_shortcut_above(wi, wf, floor).unwrap();
        assert!((d.min_omega2 - floor).abs() <= 1e-6 * wf * wf, "floor {floor:e}: {:e}", d.min_omega2);
        let shorter = shortcut_for_duration(wi, wf, d.duration * 0.999).unwrap();
        assert!(shorter.min_omega2 < floor);
        let q = q_star(&Ramp::Shortcut(d.ramp), &PropagationOptions::default()).unwrap();
        assert!((q - 1.0).abs() < 1e-10);
    }
}

/// Bounds equal to the end frequencies: tau = (phi/2)(1/omega_c + 1/omega_h),
/// cos phi = (omega_h² + omega_c²)/(omega_h + omega_c)² (PHYSICS.md section 8; compare
/// Salamon et al. 2009).
#[test]
fn bang_bang_matches_closed_form_and_ends_diagonal() {
    let (wh, wc) = (W_100K, 0.3 * W_100K);
    let phi = ((wh * wh + wc * wc) / ((wh + wc) * (wh + wc))).acos();
    let tau = 0.5 * phi * (1.0 / wc + 1.0 / wh);
    for (wi, wf) in [(wh, wc), (wc, wh)] {
        let d = time_optimal_holds(wi, wf, wc * wc, wh * wh).unwrap();
        assert_relative_eq!(d.duration, tau, max_relative = 1e-12);
        let q = q_star(&Ramp::PiecewiseConstant(d.ramp.clone()), &PropagationOptions::default()).unwrap();
        assert!((q - 1.0).abs() < 1e-10, "Q* - 1 = {:e}", q - 1.0);
    }
    // Expansion: phi/(2 omega_c) at omega_c first, then phi/(2 omega_h) at omega_h.
    let d = time_optimal_holds(wh, wc, wc * wc, wh * wh).unwrap();
    assert_relative_eq!(d.segments[0].duration, phi / (2.0 * wc), max_relative = 1e-12);
    // Wider bounds (an inverted first hold) are faster and still frictionless.
    let wide = time_optimal_holds(wh, wc, -0.5 * wc * wc, 2.0 * wh * wh).unwrap();
    assert!(wide.duration < tau);
    let q = q_star(&Ramp::PiecewiseConstant(wide.ramp), &PropagationOptions::default()).unwrap();
    assert!((q - 1.0).abs() < 1e-10);
}

fn q_of_holds(holds: &[(f64, f64)], wi: f64, wf: f64) -> f64 {
    let m = holds.iter().fold(Mat2::IDENTITY, |m, &(w2, t)| constant_step(w2, t).mul(&m));
    q_star_from_fundamental(&m, wi, wf)
}

/// No two- or three-hold protocol within the bounds and shorter than the time-optimal
/// one ends with coherence ratio below 1e-6 (Q* - 1 below 5e-13): a grid search over
/// hold values and durations refined by coordinate descent on Q*.
#[test]
fn no_shorter_hold_protocol_is_frictionless() {
    let (wh, wc) = (W_100K, 0.3 * W_100K);
    let (lo, hi) = (wc * wc, wh * wh);
    let best = time_optimal_holds(wh, wc, lo, hi).unwrap().duration;
    let budget = 0.995 * best;
    let levels = [lo, 0.5 * (lo + hi), hi];
    let mut min_q = f64::INFINITY;
    for &a in &levels {
        for &b in &levels {
            for &c in &levels {
                for three in [false, true] {
                    // Durations as fractions of the budget.
                    let n = 24;
                    for i in 1..n {
                        for j in 1..n - i + usize::from(!three) {
                            let mut f = [i as f64 / n as f64, j as f64 / n as f64, 0.0];
                            if three {
                                f[2] = 1.0 - f[0] - f[1];
                                if f[2] <= 0.0 {
                                    continue;
                                }
                            }
                            let eval = |f: &[f64; 3]| {
                                let mut h = vec![(a, f[0] * budget), (b, f[1] * budget)];
                                if three {
                                    h.push((c, f[2] * budget));
                                }
                                if f.iter().any(|&x| x < 0.0) || f.iter().sum::<f64>() > 1.0 {
                                    return f64::INFINITY;
                                }
                                q_of_holds(&h, wh, wc)
                            };
                            let mut q = eval(&f);
                            let mut step = 0.5 / n as f64;
                            for _ in 0..30 {
                                for k in 0..if three { 3 } else { 2 } {
                                    for s in [step, -step] {
                                        let mut g = f;
                                        g[k] += s;
                                        let qg = eval(&g);
                                        if qg < q {
                                            q = qg;
                                            f = g;
                                        }
                                    }
                                }
                                step *= 0.7;
                            }
                            min_q = min_q.min(q);
                        }
                    }
                }
            }
        }
    }
    let coherence = (1.0 - 1.0 / (min_q * min_q)).sqrt();
    assert!(coherence > 1e-6, "a shorter protocol reached coherence {coherence:e}");
}

/// A robustness map of a frictionless held waveform: Q* = 1 at the centre (no error),
/// Q* >= 1 everywhere (Husimi 1953), and the map is symmetric in neither axis in general.
#[test]
fn robustness_map_of_a_held_shortcut() {
    let d = shortcut_for_duration(W_100K, 0.25 * W_100K, 10e-6).unwrap();
    let ramp = Ramp::Shortcut(d.ramp);
    let n = 2001;
    let times: Vec<f64> = (0..n).map(|k| ramp.duration() * f64::from(k) / f64::from(n - 1)).collect();
    let values: Vec<f64> = times.iter().map(|&t| ramp.omega2(t)).collect();
    let w = SampledRamp::new(times, values, SampledColumn::Omega2, SampledReading::Linear).unwrap();
    let grid = RobustnessGrid { calibration: 0.05, duration: 0.05, points: 5 };
    let map =
        robustness_map(&w, &grid, &PropagationOptions::with_accuracy(1e-9).unwrap(), &|_| {}, &AtomicBool::new(false))
            .unwrap();
    assert_eq!(map.q_star.len(), 25);
    let centre = map.q_star[2 * 5 + 2];
    assert!((centre - 1.0).abs() < 1e-6, "centre {centre}");
    assert!(map.q_star.iter().all(|&q| q >= 1.0 - 1e-12));
    assert!(map.q_star[0] > centre);
    // Cancelling stops the work.
    let cancelled = robustness_map(&w, &grid, &PropagationOptions::default(), &|_| {}, &AtomicBool::new(true));
    assert!(cancelled.is_err());
}

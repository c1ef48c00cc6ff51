//! Design on demand, against closed forms: constant mu (Rezek and Kosloff 2006),
//! time-optimal holds (Salamon et al. 2009) and the invariant shortcut (Chen et al. 2010).

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
/// of the frictionless condition of Rezek and Kosloff 2006 (omega_i = 1, omega_f = 0.1, k = 1: mu = -0.68818,
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
/// cos phi = (omega_h² + omega_c²)/(omega_h + omega_c)² (derived from the frictionless
/// condition of the two holds; compare Salamon et al. 2009).
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
    let map = robustness_map(
        &w,
        &grid,
        &[],
        &PropagationOptions::with_accuracy(1e-9).unwrap(),
        &|_| {},
        &AtomicBool::new(false),
    )
    .unwrap();
    assert_eq!(map.q_star_minus_one.len(), 25);
    let centre = map.q_star_minus_one[2 * 5 + 2];
    assert!(centre < 1e-6, "centre {centre}");
    assert!(map.q_star_minus_one.iter().all(|&e| e >= 0.0), "Q* >= 1 (Husimi's bound)");
    assert!(map.q_star_minus_one[0] > centre);
    // Cancelling stops the work.
    let cancelled = robustness_map(&w, &grid, &[], &PropagationOptions::default(), &|_| {}, &AtomicBool::new(true));
    assert!(cancelled.is_err());
}

/// A 10-knot spline (8 free knots) between 100 and 25 kHz in 20 µs, geometric start.
fn start_spline(tau: f64) -> quenchless_physics::ramp::SplineRamp {
    use quenchless_physics::ramp::{SplineRamp, SplineShape, SplineSpace};
    let (wi, wf) = (W_100K, 0.25 * W_100K);
    let n = 10;
    let times: Vec<f64> = (0..n).map(|k| tau * f64::from(k) / f64::from(n - 1)).collect();
    let omegas: Vec<f64> = (0..n).map(|k| wi * (wf / wi).powf(f64::from(k) / f64::from(n - 1))).collect();
    SplineRamp::new(times, omegas, SplineShape::Smooth, SplineSpace::LogOmega, true).unwrap()
}

/// Spline optimisation drives Q* - 1 below 1e-6 with the end knots and knot times
/// fixed. Q* is Husimi's (K. Husimi, Prog. Theor. Phys. 9, 381 (1953)); the result is
/// re-checked here at a much tighter integration accuracy than the search used.
#[test]
fn spline_optimisation_reaches_the_target() {
    use quenchless_physics::design::{SplineTargets, optimise_spline};
    let start = start_spline(20e-6);
    let search = PropagationOptions::with_accuracy(1e-9).unwrap();
    let fit = optimise_spline(&start, &SplineTargets::default(), &search, &|_, _| {}, &AtomicBool::new(false)).unwrap();
    assert!(fit.start_q_star_minus_one > 1e-3, "the start is already frictionless");
    assert!(fit.reached && fit.iterations > 0 && fit.evaluations > fit.iterations);
    let tight = PropagationOptions::with_accuracy(1e-13).unwrap();
    let q = q_star(&Ramp::Spline(fit.ramp.clone()), &tight).unwrap();
    assert!(q - 1.0 < 1.01e-6, "re-checked Q* - 1 = {:e}", q - 1.0);
    assert_relative_eq!(q - 1.0, fit.q_star_minus_one, max_relative = 1e-4);
    assert_eq!(fit.ramp.times(), start.times());
    // The end knots are kept bit for bit.
    assert_eq!(fit.ramp.omegas()[0].to_bits(), start.omegas()[0].to_bits());
    assert_eq!(fit.ramp.omegas()[9].to_bits(), start.omegas()[9].to_bits());
    // Cancelling stops the search.
    let e = optimise_spline(&start, &SplineTargets::default(), &search, &|_, _| {}, &AtomicBool::new(true));
    assert!(matches!(e, Err(quenchless_physics::PhysicsError::Cancelled)), "{e:?}");
}

/// With bounds and a slew limit the optimised ramp keeps to them, checked on a grid 12
/// times finer than the search's (common practice, no source: limits are a lab's).
#[test]
fn spline_optimisation_keeps_to_the_limits() {
    use quenchless_physics::design::{SplineTargets, optimise_spline};
    use quenchless_physics::limits::{TrapLimits, find_violations};
    let start = start_spline(20e-6);
    let limits = TrapLimits::new(Some(0.22 * W_100K), Some(1.02 * W_100K), Some(0.2 * W_100K / 1e-6)).unwrap();
    let targets = SplineTargets { limits, ..SplineTargets::default() };
    let opts = PropagationOptions::with_accuracy(1e-9).unwrap();
    let fit = optimise_spline(&start, &targets, &opts, &|_, _| {}, &AtomicBool::new(false)).unwrap();
    assert!(fit.reached && fit.within_limits, "{fit:?}");
    let ramp = Ramp::Spline(fit.ramp);
    let grid = ramp.grid_with_breakpoints(5001);
    let broken = find_violations(&ramp, &limits, &grid);
    assert!(broken.is_empty(), "{broken:?}");
}

/// Robust design: starting from the nominal optimum, minimising the worst Q* over a
/// +-3 % calibration band never ends worse over that band than the nominal optimum,
/// and the reported worst case is the maximum over the band's scaled ramps.
#[test]
fn robust_spline_design_lowers_the_worst_case() {
    use quenchless_physics::design::{SplineTargets, optimise_spline, scaled_spline};
    let opts = PropagationOptions::with_accuracy(1e-9).unwrap();
    let nominal =
        optimise_spline(&start_spline(20e-6), &SplineTargets::default(), &opts, &|_, _| {}, &AtomicBool::new(false))
            .unwrap();
    let band = 0.03;
    let worst_of = |s: &quenchless_physics::ramp::SplineRamp| {
        [-band, 0.0, band]
            .iter()
            .map(|&e| q_star(&Ramp::Spline(scaled_spline(s, e).unwrap()), &opts).unwrap())
            .fold(f64::NEG_INFINITY, f64::max)
    };
    let before = worst_of(&nominal.ramp);
    let targets = SplineTargets {
        calibration_band: Some(band),
        band_points: 3,
        max_iterations: 1200,
        ..SplineTargets::default()
    };
    let robust = optimise_spline(&nominal.ramp, &targets, &opts, &|_, _| {}, &AtomicBool::new(false)).unwrap();
    let after = 1.0 + robust.worst_q_star_minus_one.expect("robust design reports the worst case");
    assert_relative_eq!(after, worst_of(&robust.ramp), max_relative = 1e-12);
    assert!(after - 1.0 < 0.9 * (before - 1.0), "worst Q* - 1 {:e} -> {:e}", before - 1.0, after - 1.0);
}

/// Designing for the whole trap: with a second axis (omega_axis² = omega²/4, a slower
/// axis that the reference's optimum leaves excited) the optimiser's figure is the worst
/// axis's, re-checked axis by axis, and it ends below the worst axis of the optimum
/// found for the reference axis alone (each axis its own oscillator: Husimi 1953).
#[test]
fn spline_optimisation_can_bring_down_the_worst_axis() {
    use quenchless_physics::design::{SplineTargets, optimise_spline};
    use quenchless_physics::ramp::AxisLaw;
    let opts = PropagationOptions::with_accuracy(1e-10).unwrap();
    let slow = AxisLaw::new(0.25, 0.0).unwrap();
    let worst = |s: &quenchless_physics::ramp::SplineRamp| {
        let r = Ramp::Spline(s.clone());
        let a = quenchless_physics::diagnostics::q_star_minus_one(&r, &opts).unwrap();
        let b = quenchless_physics::diagnostics::q_star_minus_one(&r.on_axis(slow).unwrap(), &opts).unwrap();
        a.max(b)
    };
    let start = start_spline(20e-6);
    let alone = SplineTargets { target: 1e-7, max_iterations: 1500, ..SplineTargets::default() };
    let reference = optimise_spline(&start, &alone, &opts, &|_, _| {}, &AtomicBool::new(false)).unwrap();
    let both = SplineTargets { other_axes: vec![slow], ..alone };
    let trap = optimise_spline(&start, &both, &opts, &|_, _| {}, &AtomicBool::new(false)).unwrap();
    assert_relative_eq!(trap.q_star_minus_one, worst(&trap.ramp), max_relative = 1e-9);
    assert!(
        trap.q_star_minus_one < worst(&reference.ramp),
        "worst axis {:e} (targeted) vs {:e} (reference alone)",
        trap.q_star_minus_one,
        worst(&reference.ramp)
    );
}

/// Otto cycle with ideal adiabatic strokes and partial thermalisation: the limit cycle
/// has hot-corner energy E1 with E1 (1 - (1-a)(1-b)) = a E_h + (1-a) b E_c / r, and work
/// W = (1 - r) a b (E_h - E_c / r) / (1 - (1-a)(1-b)), a = 1 - exp(-G t_h),
/// b = 1 - exp(-G t_c), r = omega_c/omega_h (the linear limit cycle of T. Feldmann and
/// R. Kosloff, Phys. Rev. E 61, 4774 (2000), from memory). Maximising the power over
/// the split at a fixed total time: the found power matches this closed form, and
/// moving time between the two contacts lowers it.
#[test]
fn cycle_split_optimum_matches_the_closed_form() {
    use quenchless_physics::bath::Bath;
    use quenchless_physics::cycle::{OttoCycle, WorkStroke};
    use quenchless_physics::design::{CycleTuning, StrokeFamily, optimise_cycle};
    use quenchless_physics::noise::Noise;
    let (wh, wc) = (2.0 * W_100K, 1.4 * W_100K);
    let g = 2e5;
    let hot = Bath::with_occupation(wh, 3.0, g).unwrap();
    let cold = Bath::with_occupation(wc, 0.5, g).unwrap();
    let ideal = |time| WorkStroke::IdealAdiabatic { time };
    let template = OttoCycle {
        hot,
        hot_time: 5e-6,
        expansion: ideal(2e-6),
        cold,
        cold_time: 15e-6,
        compression: ideal(2e-6),
        noise: Noise::NONE,
    };
    let total = 24e-6;
    let least = 1e-6;
    let tuning = CycleTuning {
        family: StrokeFamily::IdealAdiabatic,
        total_time: Some(total),
        min_stroke_time: least,
        ..CycleTuning::default()
    };
    let opts = PropagationOptions::default();
    let best = optimise_cycle(&template, &tuning, &opts, &|_, _| {}, &AtomicBool::new(false)).unwrap();
    let r = wc / wh;
    let (eh, ec) = (hot.equilibrium_energy(), cold.equilibrium_energy());
    let power = |th: f64, tc: f64| {
        let (a, b) = (1.0 - (-g * th).exp(), 1.0 - (-g * tc).exp());
        (1.0 - r) * a * b * (eh - ec / r) / (1.0 - (1.0 - a) * (1.0 - b)) / total
    };
    let [th, te, tc, tk] = best.stroke_times;
    assert_relative_eq!(th + te + tc + tk, total, max_relative = 1e-12);
    assert_relative_eq!(best.power_w, power(th, tc), max_relative = 1e-9);
    let dt = 1e-3 * total;
    assert!(power(th + dt, tc - dt) < best.power_w && power(th - dt, tc + dt) < best.power_w);
    assert!(best.power_w > best.start_power_w);
    // Equal coupling rates: the optimal contacts are equal, and the ideal strokes sit
    // on the stated shortest time (shorter would only raise the power).
    assert!((th - tc).abs() < 2e-3 * total && te + tk < 2.0 * least + 1e-3 * total, "{:?}", best.stroke_times);
    assert!(te >= least && tk >= least);
    let unbounded = CycleTuning { min_stroke_time: 0.0, ..tuning };
    let refused = optimise_cycle(&template, &unbounded, &opts, &|_, _| {}, &AtomicBool::new(false)).unwrap_err();
    assert!(refused.to_string().contains("no finite optimum"), "{refused}");
}

/// In the high-temperature limit the frequency ratio of maximum work approaches
/// sqrt(T_c/T_h), so the efficiency at maximum power is 1 - sqrt(T_c/T_h)
/// (H. S. Leff, Am. J. Phys. 55, 602 (1987)).
#[test]
fn optimal_ratio_approaches_leff_at_high_temperature() {
    use quenchless_physics::bath::Bath;
    use quenchless_physics::constants::{BOLTZMANN, HBAR};
    use quenchless_physics::cycle::{OttoCycle, WorkStroke};
    use quenchless_physics::design::{CycleTuning, StrokeFamily, optimise_cycle};
    use quenchless_physics::noise::Noise;
    let wh = 2.0 * W_100K;
    // k T_h = 400 hbar omega_h, T_c = T_h / 3: occupations of hundreds of quanta.
    let th = 400.0 * HBAR * wh / BOLTZMANN;
    let tc = th / 3.0;
    let hot = Bath::with_temperature(wh, th, 2e5).unwrap();
    let cold = Bath::with_temperature(0.8 * wh, tc, 2e5).unwrap();
    let ideal = |time| WorkStroke::IdealAdiabatic { time };
    let template = OttoCycle {
        hot,
        hot_time: 20e-6,
        expansion: ideal(1e-6),
        cold,
        cold_time: 20e-6,
        compression: ideal(1e-6),
        noise: Noise::NONE,
    };
    let tuning = CycleTuning {
        family: StrokeFamily::IdealAdiabatic,
        total_time: Some(42e-6),
        vary_ratio: true,
        min_stroke_time: 1e-6,
        ..CycleTuning::default()
    };
    let best = optimise_cycle(&template, &tuning, &PropagationOptions::default(), &|_, _| {}, &AtomicBool::new(false))
        .unwrap();
    let leff = (tc / th).sqrt();
    assert!((best.ratio - leff).abs() < 2e-3, "ratio {} vs {leff}", best.ratio);
    let ca = best.curzon_ahlborn.unwrap();
    assert_relative_eq!(ca, 1.0 - leff, max_relative = 1e-12);
    assert!((best.efficiency.unwrap() - ca).abs() < 2e-3, "{:?} vs {ca}", best.efficiency);
    assert_relative_eq!(best.otto_efficiency, 1.0 - best.ratio, max_relative = 1e-12);
}

/// With shortcut strokes and a lowest frequency, the power-optimal cycle keeps its
/// strokes above that frequency (a frictionless stroke would otherwise shrink to
/// nothing through an ever deeper inversion).
#[test]
fn cycle_optimum_keeps_to_the_trap_limits() {
    use quenchless_physics::bath::Bath;
    use quenchless_physics::cycle::{OttoCycle, WorkStroke};
    use quenchless_physics::design::{CycleTuning, StrokeFamily, optimise_cycle};
    use quenchless_physics::limits::{TrapLimits, find_violations};
    use quenchless_physics::noise::Noise;
    let (wh, wc) = (2.0 * W_100K, 1.4 * W_100K);
    let hot = Bath::with_occupation(wh, 3.0, 2e5).unwrap();
    let cold = Bath::with_occupation(wc, 0.5, 2e5).unwrap();
    let sc = |a, b| WorkStroke::Ramp(Ramp::Shortcut(quenchless_physics::ramp::ShortcutRamp::new(a, b, 5e-6).unwrap()));
    let template = OttoCycle {
        hot,
        hot_time: 10e-6,
        expansion: sc(wh, wc),
        cold,
        cold_time: 10e-6,
        compression: sc(wc, wh),
        noise: Noise::NONE,
    };
    let limits = TrapLimits::new(Some(0.5 * W_100K), None, None).unwrap();
    let tuning = CycleTuning { family: StrokeFamily::Shortcut, limits, ..CycleTuning::default() };
    let best = optimise_cycle(&template, &tuning, &PropagationOptions::default(), &|_, _| {}, &AtomicBool::new(false))
        .unwrap();
    assert!(best.power_w > best.start_power_w);
    for s in [&best.cycle.expansion, &best.cycle.compression] {
        let WorkStroke::Ramp(r) = s else { panic!("shortcut strokes expected") };
        let grid = r.grid_with_breakpoints(4001);
        let v = find_violations(r, &limits, &grid);
        assert!(v.is_empty(), "{v:?}");
        assert!(r.min_omega2().0 >= (0.5 * W_100K).powi(2) * (1.0 - 1e-3), "min omega² {:e}", r.min_omega2().0);
    }
}

/// Noise-strength map: without noise the energy ratio is Husimi's Q* (thermal start);
/// with amplitude noise alone on a constant trap it is exp(omega² S t / 2) (Savard,
/// O'Hara and Thomas, Phys. Rev. A 56, R1095 (1997), in the two-sided convention of the
/// noise module).
#[test]
fn noise_map_matches_q_star_and_the_savard_rate() {
    use quenchless_physics::design::{NoiseGrid, noise_map};
    use quenchless_physics::ramp::LinearRamp;
    let opts = PropagationOptions::default();
    let s0 = quenchless_physics::Moments::thermal_occupation(W_100K, 2.0).unwrap();
    let lin = Ramp::Linear(LinearRamp::new(W_100K, 0.3 * W_100K, 8e-6).unwrap());
    let grid = NoiseGrid { max_dephasing: 1e4, max_amplitude_psd: 1e-9, points: 3 };
    let map = noise_map(&lin, &s0, &grid, &opts, &|_| {}, &AtomicBool::new(false)).unwrap();
    assert_eq!(map.energy_ratio_minus_one.len(), 9);
    assert_relative_eq!(map.energy_ratio_minus_one[0], q_star(&lin, &opts).unwrap() - 1.0, max_relative = 1e-6);
    assert!(map.energy_ratio_minus_one[8] > map.energy_ratio_minus_one[0]);
    let t = 50e-6;
    let hold = Ramp::Linear(LinearRamp::new(W_100K, W_100K, t).unwrap());
    let s = 1e-9;
    let grid = NoiseGrid { max_dephasing: 1.0, max_amplitude_psd: s, points: 2 };
    let map = noise_map(&hold, &s0, &grid, &opts, &|_| {}, &AtomicBool::new(false)).unwrap();
    let savard = (W_100K * W_100K * s * t / 2.0).exp();
    // Index 2: amplitude S, no dephasing. Corrections are of order S omega.
    let ratio = 1.0 + map.energy_ratio_minus_one[2];
    assert!((ratio / savard - 1.0).abs() < 1e-3, "{ratio} vs {savard}");
    let cancelled = noise_map(&hold, &s0, &grid, &opts, &|_| {}, &AtomicBool::new(true));
    assert!(cancelled.is_err());
}

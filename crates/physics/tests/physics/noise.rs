use quenchless_physics::ramp::{LinearRamp, Ramp};
use quenchless_physics::{EvaluationSettings, Moments, Noise, evaluate};

use super::W_100K;

/// Intensity-noise heating: a thermal state's energy grows as exp(omega² S t / 2)
/// with S the two-sided fractional spectral density (T. A. Savard, K. M. O'Hara,
/// J. E. Thomas, Phys. Rev. A 56, R1095 (1997): rate pi² nu² S_1(2 nu), S_1 = 2 S).
#[test]
fn amplitude_noise_heats_at_savard_rate() {
    let w = W_100K;
    let s = 1e-4 / w; // weak noise: S omega = 1e-4
    let rate = w * w * s / 2.0;
    let t = 1.0 / rate;
    let ramp = Ramp::Linear(LinearRamp::new(w, w, t).unwrap());
    let settings =
        EvaluationSettings { noise: Noise::new(0.0, s).unwrap(), samples: 11, ..EvaluationSettings::default() };
    let ev = evaluate(&ramp, &Moments::thermal_occupation(w, 3.0).unwrap(), &settings).unwrap();
    assert!(ev.report.q_star_is_energy_ratio);
    let expected = 1.0f64.exp();
    // The rate is the average over the fast 2 omega oscillation; corrections are of
    // order S omega.
    assert!((ev.report.q_star / expected - 1.0).abs() < 1e-3, "{} vs {expected}", ev.report.q_star);
}

/// Dephasing leaves H alone and makes L, C decay as exp(-gamma t) (pure
/// dephasing in the energy basis; Rezek and Kosloff 2006, from memory).
#[test]
fn dephasing_decays_coherence_only() {
    let w = W_100K;
    let g = 2e4;
    let t = 40e-6;
    let ramp = Ramp::Linear(LinearRamp::new(w, w, t).unwrap());
    let settings =
        EvaluationSettings { noise: Noise::new(g, 0.0).unwrap(), samples: 3, ..EvaluationSettings::default() };
    let s0 = Moments::squeezed(w, 0.5, 0.5, 0.2).unwrap();
    let ev = evaluate(&ramp, &s0, &settings).unwrap();
    let e0 = s0.energy_picture(w);
    let ef = ev.trajectory.last().unwrap().moments.energy_picture(w);
    assert!((ef.h / e0.h - 1.0).abs() < 1e-9);
    let ratio = ef.l.hypot(ef.c) / e0.l.hypot(e0.c);
    assert!((ratio / (-g * t).exp() - 1.0).abs() < 1e-8, "{ratio}");
}

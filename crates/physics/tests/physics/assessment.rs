//! The one playback assessment: the sampling rule, the final level, Q* in the trap left
//! on, and searches that hold on their grid. The independent check is a plain loop of
//! exact held-step rotations (the constant-omega² solution of x'' = -omega² x, cos/sin,
//! cosh/sinh or free flight; textbook mechanics, from memory) and the Husimi Q* formula
//! (K. Husimi, Prog. Theor. Phys. 9, 381 (1953)); it shares no code with the engine.
#![expect(clippy::float_cmp, reason = "whole period counts and exact end levels are compared exactly on purpose")]

use quenchless_physics::constants::TWO_PI;
use quenchless_physics::design::time_optimal_holds;
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::playback::{
    AssessmentSettings, Jitter, Playback, PlaybackAssessment, SamplePoint, assess, periods, play,
};
use quenchless_physics::ramp::{LinearRamp, Ramp, ShortcutRamp};
use quenchless_physics::{PropagationOptions, RampShape};

use super::W_100K;

const TOL: f64 = 1e-3;

fn judged(ramp: &Ramp, pb: &Playback, settings: AssessmentSettings) -> PlaybackAssessment {
    assess(ramp, pb, &settings, &PropagationOptions::default(), &|| false).unwrap()
}

fn no_search() -> AssessmentSettings {
    AssessmentSettings { searches: false, ..AssessmentSettings::default() }
}

/// Exact step of x'' = -w2 x over h as [[a, b], [c, d]].
fn held_step(w2: f64, h: f64) -> [[f64; 2]; 2] {
    if w2 > 0.0 {
        let w = w2.sqrt();
        let (s, c) = (w * h).sin_cos();
        [[c, s / w], [-w * s, c]]
    } else if w2 < 0.0 {
        let k = (-w2).sqrt();
        let (s, c) = ((k * h).sinh(), (k * h).cosh());
        [[c, s / k], [k * s, c]]
    } else {
        [[1.0, h], [0.0, 1.0]]
    }
}

fn times(a: [[f64; 2]; 2], b: [[f64; 2]; 2]) -> [[f64; 2]; 2] {
    [
        [a[0][0] * b[0][0] + a[0][1] * b[1][0], a[0][0] * b[0][1] + a[0][1] * b[1][1]],
        [a[1][0] * b[0][0] + a[1][1] * b[1][0], a[1][0] * b[0][1] + a[1][1] * b[1][1]],
    ]
}

/// Q* of held levels `w2[k]` on [t_k, t_k+1) from omega_i to omega_f (Husimi 1953).
fn husimi_of_holds(edges: &[f64], w2: &[f64], wi: f64, wf: f64) -> f64 {
    let mut m = [[1.0, 0.0], [0.0, 1.0]];
    for (k, &v) in w2.iter().enumerate() {
        m = times(held_step(v, edges[k + 1] - edges[k]), m);
    }
    // Columns: Ys (x(0)=1, x'(0)=0) and Xs (x(0)=0, x'(0)=1).
    let (ys, ysd, xs, xsd) = (m[0][0], m[1][0], m[0][1], m[1][1]);
    (wi * wi * (wf * wf * xs * xs + xsd * xsd) + (wf * wf * ys * ys + ysd * ysd)) / (2.0 * wi * wf)
}

/// The samples of plain sample-and-hold, taken here by the stated rule: N = round(tau R),
/// sample k at k/R or (k + 1/2)/R.
fn samples_by_the_rule(ramp: &Ramp, rate: f64, point: SamplePoint) -> (Vec<f64>, Vec<f64>) {
    let tau = ramp.duration();
    let n = (tau * rate + 0.5).floor().max(1.0) as usize;
    let edges: Vec<f64> = (0..=n).map(|k| k as f64 / rate).collect();
    let w2 = (0..n)
        .map(|k| {
            let t = match point {
                SamplePoint::Left => k as f64 / rate,
                SamplePoint::Midpoint => (k as f64 + 0.5) / rate,
            };
            ramp.omega2(t.min(tau))
        })
        .collect();
    (edges, w2)
}

fn bang_bang() -> Ramp {
    // The time-optimal hold sequence 100 -> 25 kHz between 20 and 120 kHz.
    let k = TWO_PI * 1e3;
    Ramp::PiecewiseConstant(
        time_optimal_holds(100.0 * k, 25.0 * k, (20.0 * k).powi(2), (120.0 * k).powi(2)).unwrap().ramp,
    )
}

#[test]
fn independent_held_rotations_reproduce_the_played_q_star() {
    let ramps = [
        Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 1.3e-6).unwrap()), // inverts mid-ramp
        Ramp::Linear(LinearRamp::new(W_100K, 0.4 * W_100K, 7.77e-6).unwrap()),
        bang_bang(),
    ];
    for ramp in &ramps {
        // tau R is not a whole number at these rates.
        for rate in [3.3e7, 1.0e8, 2.17e8] {
            for point in [SamplePoint::Left, SamplePoint::Midpoint] {
                let a = judged(ramp, &Playback { point, ..Playback::sample_and_hold(rate) }, no_search());
                let (edges, w2) = samples_by_the_rule(ramp, rate, point);
                let q = husimi_of_holds(&edges, &w2, ramp.omega_initial(), ramp.omega_final());
                assert!(
                    (a.played_q_star() - q).abs() < 1e-12,
                    "{} at {rate:e} {point:?}: engine {} vs loop {q}",
                    ramp.family_name(),
                    a.played_q_star()
                );
                assert_eq!(a.played.periods, w2.len());
                assert!((a.played.played_duration_s - w2.len() as f64 / rate).abs() < 1e-20);
            }
        }
    }
}

/// N = round(tau R), half up: the duration as played is N/R.
#[test]
fn the_duration_as_played_is_a_whole_number_of_periods() {
    assert_eq!(periods(311.4e-8, 1e8), 311.0);
    assert_eq!(periods(311.5e-8 + 1e-18, 1e8), 312.0);
    assert_eq!(periods(311.6e-8, 1e8), 312.0);
    assert_eq!(periods(1e-12, 1e8), 1.0);
    let ramp = Ramp::Linear(LinearRamp::new(W_100K, 0.5 * W_100K, 3.116e-6).unwrap());
    let a = judged(&ramp, &Playback::sample_and_hold(1e8), no_search());
    assert_eq!(a.played.periods, 312);
    assert!((a.played.played_duration_s - 3.12e-6).abs() < 1e-18);
}

/// Sample N is the final level, quantised like every other: the trap left on is the one
/// that level gives, and Q* is taken in it (Husimi 1953 with omega_f the trap left on).
#[test]
fn the_final_level_is_the_last_sample_and_q_star_is_taken_in_the_trap_it_leaves_on() {
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 5e-6).unwrap());
    let top = 1.2 * W_100K * W_100K;
    let pb = Playback { quantisation: Some((10, -top, top)), ..Playback::sample_and_hold(1e8) };
    let a = judged(&ramp, &pb, no_search());
    let s = a.played.samples.as_ref().expect("kept for the writers");
    let n = s.periods();
    assert_eq!(n, 500);
    assert_eq!(s.drive.len(), n + 1);
    let codes = s.codes.as_ref().expect("quantised");
    assert_eq!(codes.len(), n + 1);
    // Straight-binary transfer (common practice, no source): the final code is
    // round((omega_f² - low) / step).
    let step = 2.0 * top / 1023.0;
    let wf2 = ramp.omega_final().powi(2);
    assert_eq!(codes[n], ((wf2 + top) / step).round() as u32);
    let left_on2 = -top + f64::from(codes[n]) * step;
    assert!((a.played.omega_left_on - left_on2.sqrt()).abs() < 1e-9 * W_100K);
    assert!((a.final_frequency_error() - (left_on2.sqrt() / ramp.omega_final() - 1.0)).abs() < 1e-15);
    assert!(a.final_frequency_error().abs() > 1e-4, "10 bits leave a visible error");
    let start2 = -top + f64::from(s.code_before.expect("quantised")) * step;
    let levels: Vec<f64> = codes[..n].iter().map(|&c| -top + f64::from(c) * step).collect();
    let q = husimi_of_holds(&s.times, &levels, start2.sqrt(), left_on2.sqrt());
    assert!((a.played_q_star() - q).abs() < 1e-12, "engine {} vs loop {q}", a.played_q_star());
}

/// With a low-pass the final level is held until the output has settled within
/// 1e-3 x tolerance of it (a first-order filter relaxes as exp(-t/t_lp): standard
/// circuit theory, from memory), so the table runs past N/R by a few time constants.
#[test]
fn a_low_pass_output_is_followed_until_it_settles() {
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 5e-6).unwrap());
    let t_lp = 50e-9;
    let a = judged(&ramp, &Playback { low_pass: Some(t_lp), ..Playback::sample_and_hold(1e8) }, no_search());
    let tail = a.played.settled_at_s() - a.played.played_duration_s;
    // The gap at N/R is a fraction of omega_f² at most, so ln(1/(1e-3 TOL)) time
    // constants, about 14, are enough; more than 5 are needed.
    assert!(tail > 5.0 * t_lp && tail < 16.0 * t_lp, "tail {tail:e} s");
    let v = a.played.trap.as_ref().expect("kept").omega2_rows();
    let target = a.played.omega_left_on.powi(2);
    assert!((v[v.len() - 2] - target).abs() < 2e-3 * TOL * target);
    assert_eq!(v[v.len() - 1], target);
}

/// The smallest rate holds on its grid: on the time-optimal hold sequence, whose Q* - 1
/// oscillates with the rate, every grid rate from R* up to the ceiling passes and the
/// next one below fails (the definition of the search; no external source).
#[test]
fn the_smallest_rate_holds_on_its_grid_for_a_hold_sequence() {
    let ramp = bang_bang();
    let pb = Playback::sample_and_hold(1e8);
    let settings = AssessmentSettings { max_rate: Some(1e9), ..AssessmentSettings::default() };
    let a = judged(&ramp, &pb, settings);
    let r = a.rate_search.expect("searched");
    let min = r.min_rate.expect("a rate passes");
    assert_eq!(r.ceiling, 1e9);
    let excess = |rate: f64| {
        q_star(
            &Ramp::Sampled(play(&ramp, &Playback::sample_and_hold(rate), TOL).unwrap()),
            &PropagationOptions::default(),
        )
        .unwrap()
            - 1.0
    };
    let mut rate = r.ceiling;
    let mut checked = 0;
    while rate >= min * (1.0 - 1e-12) {
        assert!(excess(rate) <= TOL, "grid rate {rate:e} fails above R* = {min:e}");
        rate /= r.grid_ratio;
        checked += 1;
    }
    // Every passing grid rate and the first failure were played; the walk plays two
    // rates at once, so one more past the failure may have been played and discarded.
    assert!(r.plays == checked + 1 || r.plays == checked + 2, "{checked} passing rates: {r:?}");
    assert!(excess(rate) > TOL, "the walk stopped at a failure: {rate:e}");
}

/// The bit-depth search: every depth from b* to 32 passes and b* - 1 fails.
#[test]
fn the_smallest_bit_depth_holds_for_every_depth_above_it() {
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 5e-6).unwrap());
    let top = 1.2 * W_100K * W_100K;
    let pb = Playback { quantisation: Some((16, 0.0, top)), allows_negative: true, ..Playback::sample_and_hold(1e8) };
    let a = judged(&ramp, &pb, AssessmentSettings { tolerance: 1e-6, ..AssessmentSettings::default() });
    let b = a.bits_search.expect("searched");
    let min = b.min_bits.expect("some depth passes");
    let excess = |bits: u32| {
        let p = Playback { quantisation: Some((bits, 0.0, top)), ..pb.clone() };
        q_star(&Ramp::Sampled(play(&ramp, &p, 1e-6).unwrap()), &PropagationOptions::default()).unwrap() - 1.0
    };
    for bits in min..=32 {
        assert!(excess(bits) <= 1e-6, "{bits} bits");
    }
    assert!(excess(min - 1) > 1e-6);
    assert_eq!(b.plays as u32, 32 - min + 2);
}

/// Searches never fail the call: a design that fails the tolerance is played and
/// reported with its searches skipped, and the rate search's ceiling stops where the
/// clock jitter would exceed an eighth of a period (the rule of the jitter model).
#[test]
fn searches_are_skipped_or_capped_and_never_fail() {
    let linear = Ramp::Linear(LinearRamp::new(W_100K, 0.25 * W_100K, 1e-6).unwrap());
    let top = 1.2 * W_100K * W_100K;
    let pb = Playback { quantisation: Some((4, 0.0, top)), ..Playback::sample_and_hold(1e8) };
    let a = judged(&linear, &pb, AssessmentSettings::default());
    assert!(!a.energy_diagonal());
    let (r, b) = (a.rate_search.expect("reported"), a.bits_search.expect("reported"));
    assert!(r.min_rate.is_none() && r.note.contains("design itself fails"), "{r:?}");
    assert!(b.min_bits.is_none() && b.note.contains("design itself fails"), "{b:?}");
    let shortcut = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 5e-6).unwrap());
    let jittery = Playback { jitter: Some(Jitter { rms: 1e-10, seed: 3 }), ..Playback::sample_and_hold(1e8) };
    let settings = AssessmentSettings { max_rate: Some(1e10), jitter_trials: 2, ..AssessmentSettings::default() };
    let a = judged(&shortcut, &jittery, settings);
    let r = a.rate_search.expect("searched");
    assert!((r.ceiling - 1.0 / (8.0 * 1e-10)).abs() < 1.0, "{r:?}");
    assert!(r.note.contains("eighth of a period"), "{r:?}");
}

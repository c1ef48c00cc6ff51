//! Playback as the generator plays it. Expected orders are those of the sampling rules
//! (left rectangle rule first order, midpoint rule second order; standard numerical
//! analysis, from memory), measured against the engine's own Magnus propagation of the
//! designed ramp (checked elsewhere against closed forms).

use quenchless_physics::diagnostics::q_star;
use quenchless_physics::playback::{
    DriveCalibration, Jitter, Playback, SamplePoint, drive_samples, jitter_q_star, play, play_through,
};
use quenchless_physics::propagate::stroke_map;
use quenchless_physics::ramp::{LinearRamp, PiecewiseConstantRamp, Ramp, Segment, ShortcutRamp};
use quenchless_physics::{Moments, Noise, PropagationOptions, RampShape};

use super::W_100K;

/// Verdict tolerance of these tests (sets how far the output must settle).
const TOL: f64 = 1e-6;

/// Q* - 1 of the ramp as played (the played table carries the designed end frequencies).
fn played_excess(ramp: &Ramp, pb: &Playback) -> f64 {
    q_star(&Ramp::Sampled(play(ramp, pb, TOL).unwrap()), &PropagationOptions::default()).unwrap() - 1.0
}

/// Errors of the played ramp against the designed one: (end state (H, L, C) relative
/// to H from a thermal start, Q*).
fn played_error(ramp: &Ramp, rate: f64, point: SamplePoint) -> (f64, f64) {
    let opts = PropagationOptions::with_accuracy(1e-13).unwrap();
    let pb = Playback { point, ..Playback::sample_and_hold(rate) };
    let table = play(ramp, &pb, TOL).unwrap();
    let played = Ramp::Sampled(table.clone());
    let s0 = Moments::thermal_occupation(W_100K, 1.0).unwrap();
    let wf = ramp.omega_final();
    let end = |r: &Ramp| s0.mapped(&stroke_map(r, &Noise::NONE, &opts).unwrap().moments).energy_picture(wf);
    let (a, b) = (end(ramp), end(&played));
    let state = (a.h - b.h).abs().max((a.l - b.l).abs()).max((a.c - b.c).abs()) / a.h;
    (state, (q_star(&Ramp::Sampled(table), &opts).unwrap() - q_star(ramp, &opts).unwrap()).abs())
}

/// The end state converges at first order for a left hold and at second order for a
/// midpoint hold. Q* converges at second order for both: a left hold is a midpoint
/// hold of the ramp delayed by half a sample, and a delay spent in the initial trap
/// does not change Q* (it only rotates the energy-diagonal start).
#[test]
fn hold_playback_converges_at_first_and_second_order() {
    let ramp = Ramp::Linear(LinearRamp::new(W_100K, 0.4 * W_100K, 12e-6).unwrap());
    for (point, order) in [(SamplePoint::Left, 1.0), (SamplePoint::Midpoint, 2.0)] {
        let (e1, q1) = played_error(&ramp, 2e7, point);
        let (e2, q2) = played_error(&ramp, 4e7, point);
        let (e3, q3) = played_error(&ramp, 8e7, point);
        let (o1, o2) = ((e1 / e2).log2(), (e2 / e3).log2());
        assert!(
            (o1 - order).abs() < 0.2 && (o2 - order).abs() < 0.2,
            "{point:?}: state orders {o1}, {o2} ({e1:e}, {e2:e}, {e3:e})"
        );
        let (p1, p2) = ((q1 / q2).log2(), (q2 / q3).log2());
        assert!((p1 - 2.0).abs() < 0.2 && (p2 - 2.0).abs() < 0.2, "{point:?}: Q* orders {p1}, {p2}");
    }
}

#[test]
fn a_drive_that_cannot_go_negative_refuses_an_inverted_trap() {
    let tau = 0.15 * std::f64::consts::TAU / W_100K;
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.1 * W_100K, tau).unwrap());
    let pb = Playback { allows_negative: false, ..Playback::sample_and_hold(1e10) };
    let e = play(&ramp, &pb, TOL).unwrap_err().to_string();
    assert!(e.contains("cannot go negative"), "{e}");
    assert!(play(&ramp, &Playback::sample_and_hold(1e10), TOL).is_ok());
}

#[test]
fn quantisation_errors_shrink_with_bits_and_out_of_range_is_flagged() {
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 12e-6).unwrap());
    let full = (0.0, 1.2 * W_100K * W_100K);
    let err = |bits: u32| {
        let pb = Playback {
            quantisation: Some((bits, full.0, full.1)),
            point: SamplePoint::Midpoint,
            ..Playback::sample_and_hold(2e8)
        };
        played_excess(&ramp, &pb)
    };
    let (e8, e16) = (err(8), err(16));
    assert!(e16 < e8 && e16 < 1e-6, "8 bits {e8:e}, 16 bits {e16:e}");
    let narrow = Playback { quantisation: Some((12, 0.0, 0.5 * W_100K * W_100K)), ..Playback::sample_and_hold(2e8) };
    let e = play(&ramp, &narrow, TOL).unwrap_err().to_string();
    assert!(e.contains("not clipped"), "{e}");
}

#[test]
fn a_fast_low_pass_changes_little_and_a_slow_one_a_lot() {
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 12e-6).unwrap());
    let q = |tf: f64| {
        let pb = Playback { low_pass: Some(tf), point: SamplePoint::Midpoint, ..Playback::sample_and_hold(1e8) };
        played_excess(&ramp, &pb)
    };
    let (fast, slow) = (q(1e-10), q(1e-6));
    assert!(fast < 1e-6, "fast filter {fast:e}");
    assert!(slow > 100.0 * fast, "slow filter {slow:e}");
}

/// A straight-line DAC transfer: code = round((drive - low) / (high - low) (2^N - 1)),
/// and the output level low + code (high - low) / (2^N - 1) (the usual unipolar
/// straight-binary convention; common practice, no source).
#[test]
fn dac_codes_follow_the_straight_binary_transfer() {
    let w = W_100K;
    // A constant trap at 60 % of the full scale's omega², and a 10-bit DAC over [0, 2 w²].
    let ramp = Ramp::Linear(LinearRamp::new(w, w, 1e-6).unwrap());
    let (lo, hi) = (0.0, 2.0 * w * w);
    let pb = Playback { quantisation: Some((10, lo, hi)), ..Playback::sample_and_hold(1e7) };
    let s = drive_samples(&ramp, &pb).unwrap();
    let codes = s.codes.expect("quantised");
    // Ten samples and the final level.
    assert_eq!(codes.len(), 11);
    let expected = ((w * w - lo) / (hi - lo) * 1023.0).round() as u32; // 511.5 rounds to 512
    assert!(codes.iter().all(|&c| c == expected), "{codes:?} vs {expected}");
    assert!(s.drive.iter().all(|&d| (d - (lo + f64::from(expected) * (hi - lo) / 1023.0)).abs() < 1e-9 * hi));
}

/// A measured calibration table changes nothing when it is exact and nothing is
/// quantised: the trap sees the designed omega² (no external source: the table and its
/// inverse must compose to the identity). Outside the table, or for omega² < 0, the
/// drive is refused with the table's range named.
#[test]
fn calibration_tables_invert_exactly_and_refuse_what_they_do_not_cover() {
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 12e-6).unwrap());
    // A drive linear in omega (e.g. an rf amplitude), read linearly between rows.
    let omega: Vec<f64> = (0..=40).map(|k| W_100K * (0.05 + 0.03 * f64::from(k))).collect();
    let drive: Vec<f64> = omega.iter().map(|w| 0.2 + 3.0 * w / W_100K).collect();
    let table = DriveCalibration::Table { omega, drive };
    let pb = Playback { point: SamplePoint::Midpoint, ..Playback::sample_and_hold(1e8) };
    let plain = play(&ramp, &pb, TOL).unwrap();
    let via = play(&ramp, &Playback { calibration: table.clone(), ..pb.clone() }, TOL).unwrap();
    for (a, b) in plain.values().iter().zip(via.values()) {
        assert!((a - b).abs() <= 1e-12 * a.abs().max(W_100K * W_100K), "{a} vs {b}");
    }
    let inverting =
        Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.1 * W_100K, 0.15 * std::f64::consts::TAU / W_100K).unwrap());
    let e = play(&inverting, &Playback { calibration: table, ..Playback::sample_and_hold(1e10) }, TOL)
        .unwrap_err()
        .to_string();
    assert!(e.contains("calibration table") && e.contains("inverted"), "{e}");
}

/// A slew-limited output stage moves at its limit until it reaches the new level: a
/// jump of Delta in drive at slew S takes Delta / S (kinematics, no source needed), so
/// exactly the first floor(Delta / (S dt)) periods end short of the level, and the
/// held omega² rises monotonically from omega_i² to omega_f².
#[test]
fn slew_limit_spreads_a_jump_over_the_expected_periods() {
    let (wi, wf) = (W_100K, 0.5 * W_100K);
    let ramp = Ramp::PiecewiseConstant(
        PiecewiseConstantRamp::new(wi, wf, vec![Segment { omega2: wf * wf, duration: 10e-6 }]).unwrap(),
    );
    let rate = 1e7;
    let delta = wi * wi - wf * wf;
    let slew = delta / 0.73e-6; // 7.3 sample periods to complete the jump
    let p = play_through(&ramp, &Playback { slew: Some(slew), ..Playback::sample_and_hold(rate) }, TOL).unwrap();
    assert_eq!(p.slew_limited_periods, 7);
    let v = p.trap.as_ref().expect("kept").values();
    assert!(v.windows(2).all(|w| w[1] <= w[0] + 1e-9 * delta), "not monotone");
    assert!(v[0] < wi * wi && v[0] > wf * wf);
    assert!((v[v.len() - 2] - wf * wf).abs() < 1e-9 * delta);
    // The first sub-step holds the exact mean of a line falling at the slew rate.
    let h = 1.0 / rate / quenchless_physics::playback::ANALOG_SUBSTEPS as f64;
    assert!((v[0] - (wi * wi - 0.5 * slew * h)).abs() < 1e-9 * delta, "{}", v[0]);
    // A slew limit far above what the ramp needs changes nothing.
    let smooth = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 12e-6).unwrap());
    let pb = Playback { point: SamplePoint::Midpoint, ..Playback::sample_and_hold(1e8) };
    let a = played_excess(&smooth, &pb);
    let b = played_excess(&smooth, &Playback { slew: Some(1e30), ..pb.clone() });
    assert!((a - b).abs() < 1e-9, "{a:e} vs {b:e}");
}

/// White clock jitter of rms sigma perturbs the played omega² at first order in
/// sigma, so the mean extra Q* - 1 over realisations grows as sigma² (second-order
/// perturbation of a frictionless end state; from memory). Zero jitter changes nothing.
#[test]
fn clock_jitter_heats_as_its_rms_squared() {
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 12e-6).unwrap());
    let opts = PropagationOptions::default();
    let pb = Playback { point: SamplePoint::Midpoint, ..Playback::sample_and_hold(2e8) };
    let base = played_excess(&ramp, &pb);
    let zero = Playback { jitter: Some(Jitter { rms: 0.0, seed: 7 }), ..pb.clone() };
    assert!((played_excess(&ramp, &zero) - base).abs() < 1e-15);
    let extra = |rms: f64| {
        let j = Playback { jitter: Some(Jitter { rms, seed: 11 }), ..pb.clone() };
        jitter_q_star(&ramp, &j, 48, TOL, &opts).unwrap().mean_q_star_minus_one - base
    };
    let (e1, e2) = (extra(1e-10), extra(2e-10));
    assert!(e1 > 0.0, "jitter should heat: {e1:e}");
    let ratio = e2 / e1;
    assert!((ratio - 4.0).abs() < 1.2, "extra excess {e1:e} -> {e2:e}, ratio {ratio}");
    let too_much = Playback { jitter: Some(Jitter { rms: 1e-9, seed: 1 }), ..pb };
    let e = play(&ramp, &too_much, TOL).unwrap_err().to_string();
    assert!(e.contains("eighth of the sample period"), "{e}");
}

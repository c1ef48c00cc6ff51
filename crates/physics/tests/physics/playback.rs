//! Playback as the generator plays it. Expected orders are those of the sampling rules
//! (left rectangle rule first order, midpoint rule second order; standard numerical
//! analysis, from memory), measured against the engine's own Magnus propagation of the
//! designed ramp (checked elsewhere against closed forms).

use quenchless_physics::diagnostics::q_star;
use quenchless_physics::playback::{Playback, SamplePoint, play};
use quenchless_physics::propagate::stroke_map;
use quenchless_physics::ramp::{LinearRamp, Ramp, ShortcutRamp};
use quenchless_physics::{Moments, Noise, PropagationOptions, RampShape};

use super::W_100K;

/// Q* - 1 of the ramp as played (the played table carries the designed end frequencies).
fn played_excess(ramp: &Ramp, pb: &Playback) -> f64 {
    q_star(&Ramp::Sampled(play(ramp, pb).unwrap()), &PropagationOptions::default()).unwrap() - 1.0
}

/// Errors of the played ramp against the designed one: (end state (H, L, C) relative
/// to H from a thermal start, Q*).
fn played_error(ramp: &Ramp, rate: f64, point: SamplePoint) -> (f64, f64) {
    let opts = PropagationOptions::with_accuracy(1e-13).unwrap();
    let pb = Playback { point, ..Playback::sample_and_hold(rate) };
    let table = play(ramp, &pb).unwrap();
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
    let e = play(&ramp, &pb).unwrap_err().to_string();
    assert!(e.contains("cannot go negative"), "{e}");
    assert!(play(&ramp, &Playback::sample_and_hold(1e10)).is_ok());
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
    let e = play(&ramp, &narrow).unwrap_err().to_string();
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

/// The minimum-rate and minimum-bits searches return settings that pass while a
/// slightly coarser one fails (consistency of the search with `play`).
#[test]
fn minimum_rate_and_bits_are_tight() {
    use quenchless_physics::playback::{minimum_bits, minimum_rate};
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W_100K, 0.25 * W_100K, 12e-6).unwrap());
    let opts = PropagationOptions::default();
    let tol = 1e-6;
    let pb = Playback { point: SamplePoint::Left, ..Playback::sample_and_hold(1e6) };
    let r = minimum_rate(&ramp, &pb, tol, 1e6, 1e11, &opts).unwrap().expect("a rate passes");
    let q = |rate: f64| played_excess(&ramp, &Playback { rate, ..pb });
    assert!(q(r) <= tol && q(r / 1.05) > tol, "rate {r:e}: {:e} / {:e}", q(r), q(r / 1.05));
    let pbq = Playback { quantisation: Some((8, 0.0, 1.1 * W_100K * W_100K)), ..Playback::sample_and_hold(4.0 * r) };
    let b = minimum_bits(&ramp, &pbq, tol, &opts).unwrap().expect("some depth passes");
    let qb =
        |bits: u32| played_excess(&ramp, &Playback { quantisation: Some((bits, 0.0, 1.1 * W_100K * W_100K)), ..pbq });
    assert!(qb(b) <= tol && qb(b - 1) > tol, "bits {b}");
}

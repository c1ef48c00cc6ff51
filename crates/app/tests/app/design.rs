//! The "Design & hardware" page: synthesis adds frictionless candidates, playback and
//! the maps run on workers (finish, cancel), bad inputs are refused by name.

use crate::harness::app_harness;
use egui::{Key, Modifiers};
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable as _;
use quenchless_app::QuenchlessApp;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::diagnostics::{q_star, q_star_minus_one};
use quenchless_physics::playback::{Playback, play};
use quenchless_physics::propagate::PropagationOptions;
use quenchless_physics::ramp::Ramp;
use quenchless_profile::convert;
use quenchless_profile::study::RampSpec;
use std::time::{Duration, Instant};

/// Q* − 1 of a closed-form frictionless ramp, propagated: rounding only.
const FRICTIONLESS: f64 = 1e-9;

fn design_page() -> Harness<'static, QuenchlessApp> {
    let mut h = app_harness();
    click(&mut h, "Design & hardware");
    h
}

/// Runs frames until no design job is left (at most 60 s).
fn wait(h: &mut Harness<'_, QuenchlessApp>) {
    let t0 = Instant::now();
    while h.state_mut().design_panel().busy() {
        assert!(t0.elapsed() < Duration::from_mins(1), "a design job did not finish in a minute");
        std::thread::sleep(Duration::from_millis(10));
        h.run_ok();
    }
    h.run_ok();
}

/// Scrolls a widget into view, then clicks it (through AccessKit, as assistive
/// technology does: a scroll still easing or a progress line being redrawn cannot move
/// the widget from under the click).
fn click(h: &mut Harness<'_, QuenchlessApp>, label: &str) {
    h.get_by_label(label).scroll_to_me();
    h.run_ok();
    h.get_by_label(label).click_accesskit();
    h.run_ok();
}

fn type_into(h: &mut Harness<'_, QuenchlessApp>, label: &str, text: &str) {
    h.get_by_label(label).scroll_to_me();
    h.run_ok();
    h.get_by_label(label).focus();
    h.run_ok();
    h.key_press_modifiers(Modifiers::COMMAND, Key::A);
    h.get_by_label(label).type_text(text);
    h.key_press(Key::Enter);
    h.run_ok();
}

fn choose_method(h: &mut Harness<'_, QuenchlessApp>, option: &str) {
    click(h, "synthesis method");
    h.get_by_label(option).click();
    h.run_ok();
}

fn q_minus_1(h: &Harness<'_, QuenchlessApp>, i: usize) -> f64 {
    let c = &h.state().study().candidates[i];
    let ramp = convert::candidate_ramp(c, i).expect("valid candidate");
    q_star_minus_one(&ramp, &PropagationOptions::default()).expect("propagates")
}

#[test]
fn time_optimal_holds_are_added_frictionless_in_one_undo_step() {
    let mut h = design_page();
    let n = h.state().study().candidates.len();
    choose_method(&mut h, "time-optimal holds between two bounds");
    // Bounds at the end frequencies: the three-jump protocol.
    type_into(&mut h, "Lowest bound (signed frequency)", "30 kHz");
    type_into(&mut h, "Highest bound", "120 kHz");
    click(&mut h, "Add as a candidate");
    let s = h.state().study().clone();
    assert_eq!(s.candidates.len(), n + 1);
    assert_eq!(h.state().selected(), n, "the new candidate is selected");
    let RampSpec::Holds { holds, .. } = &s.candidates[n].ramp else { panic!("a holds ramp") };
    // Frictionless bang-bang (three jumps): P. Salamon, K. H. Hoffmann, Y. Rezek,
    // R. Kosloff, Phys. Chem. Chem. Phys. 11, 1027 (2009).
    assert!(q_minus_1(&h, n) < FRICTIONLESS, "Q* − 1 = {}", q_minus_1(&h, n));
    // Its time: tau = (phi/2)(1/omega_c + 1/omega_h), cos phi = (omega_h² + omega_c²)/(omega_h + omega_c)²
    // (same source; the time-optimal pair of holds of P. Salamon et al., Phys. Chem. Chem. Phys. 11, 1027 (2009)).
    let (wh, wc) = (TWO_PI * 120e3, TWO_PI * 30e3);
    let phi = ((wh * wh + wc * wc) / (wh + wc).powi(2)).acos();
    let tau: f64 = holds.iter().map(|x| x.duration_s).sum();
    assert!((tau - 0.5 * phi * (1.0 / wc + 1.0 / wh)).abs() < 1e-12 * tau, "tau = {tau}");
    assert!(h.query_by_label_contains("total time").is_some(), "the total time is shown");
    // One undo step removes it again.
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_ok();
    assert_eq!(h.state().study().candidates.len(), n);
}

#[test]
fn constant_mu_and_shortcut_designs_are_frictionless() {
    let mut h = design_page();
    choose_method(&mut h, "constant μ, frictionless order k");
    type_into(&mut h, "Order k", "3");
    click(&mut h, "Add as a candidate");
    let i = h.state().selected();
    assert!(matches!(h.state().study().candidates[i].ramp, RampSpec::ConstantMu { .. }));
    // Constant-mu ramps with Om |theta| = 2 pi k end energy-diagonal: Y. Rezek and
    // R. Kosloff, New J. Phys. 8, 83 (2006).
    assert!(q_minus_1(&h, i) < FRICTIONLESS, "constant mu: Q* − 1 = {}", q_minus_1(&h, i));
    choose_method(&mut h, "invariant shortcut of a duration");
    type_into(&mut h, "Wanted duration", "3 us");
    assert!(
        h.query_by_label_contains("inverts the trap").is_some(),
        "a 3 µs shortcut from 120 to 30 kHz must warn that the trap inverts"
    );
    click(&mut h, "Add as a candidate");
    let j = h.state().selected();
    assert_ne!(i, j);
    // Invariant-based shortcuts are frictionless at any duration: X. Chen, A. Ruschhaupt,
    // S. Schmidt, A. del Campo, D. Guéry-Odelin, J. G. Muga, PRL 104, 063002 (2010).
    assert!(q_minus_1(&h, j) < FRICTIONLESS, "shortcut: Q* − 1 = {}", q_minus_1(&h, j));
    assert!(h.state().study().candidates[j].name.contains("shortcut"));
}

#[test]
fn a_bad_order_is_named_and_nothing_is_added() {
    let mut h = design_page();
    choose_method(&mut h, "constant μ, frictionless order k");
    let before = h.state().study().clone();
    type_into(&mut h, "Order k", "2.5");
    assert!(h.query_by_label_contains("Order k: \"2.5\": expected a whole number").is_some(), "named error shown");
    assert!((h.state_mut().design_panel().synthesis.order - 1.0).abs() < f64::EPSILON, "the old order stays");
    type_into(&mut h, "Order k", "-1");
    assert!(h.query_by_label_contains("must be > 0").is_some(), "the field refuses -1 by name");
    // An order beyond the closed form's range: the design names it and cannot be added.
    h.state_mut().design_panel().synthesis.order = 1e6;
    h.run_ok();
    assert!(h.query_by_label_contains("order k = 1000000 is not allowed").is_some(), "named error shown");
    click(&mut h, "Add as a candidate");
    assert_eq!(h.state().study(), &before, "nothing was added");
}

fn play_with(
    h: &mut Harness<'_, QuenchlessApp>,
    rate: &str,
    midpoint: bool,
) -> quenchless_app::panels::playback::PlayResult {
    type_into(h, "Sample rate [samples/s]", rate);
    let on = h.state_mut().design_panel().playback.settings.midpoint_samples;
    if on != midpoint {
        click(h, "take each sample at the middle of its period (else at its start)");
    }
    click(h, "Play it");
    wait(h);
    h.state_mut().design_panel().playback.result.clone().expect("a result").expect("plays")
}

#[test]
fn playback_is_exact_for_holds_on_sample_edges_and_converges_otherwise() {
    let mut h = design_page();
    h.state_mut().select(4); // the demo's two holds, 10 µs each
    h.run_ok();
    // Midpoint samples of holds whose switches fall on sample edges (100 ns here) read
    // every hold exactly, so the played table is the design (common practice, no source).
    let r = play_with(&mut h, "1e7", true);
    assert!(
        (r.assessment.played_q_star() - r.assessment.designed_q_star()).abs() < 1e-12 * r.assessment.designed_q_star(),
        "{r:?}"
    );
    assert!(
        (r.assessment.designed_q_star_minus_one - q_minus_1(&h, 4)).abs() < 1e-12,
        "designed Q* is the physics crate's"
    );
    // A smooth ramp: the played Q* approaches the designed one as the rate grows, at
    // least linearly in the sample period (rectangle and midpoint rules; common
    // practice, no source).
    h.state_mut().select(0);
    h.run_ok();
    for midpoint in [false, true] {
        let e: Vec<f64> = ["5e6", "1e7", "2e7"]
            .iter()
            .map(|rate| {
                let r = play_with(&mut h, rate, midpoint);
                assert!(r.assessment.played_q_star_minus_one >= 0.0, "Q* >= 1 (Husimi's bound)");
                (r.assessment.played_q_star_minus_one - r.assessment.designed_q_star_minus_one).abs()
            })
            .collect();
        assert!(e[0] / e[1] > 1.8 && e[1] / e[2] > 1.8, "midpoint {midpoint}: {e:?}");
    }
}

#[test]
fn the_smallest_rate_found_keeps_the_tolerance() {
    let mut h = design_page();
    h.state_mut().select(1); // the demo's invariant shortcut
    h.run_ok();
    let r = play_with(&mut h, "1e8", false);
    assert!(h.query_by_label_contains("smallest rate in tolerance").is_some());
    let search = r.assessment.rate_search.clone().expect("searched");
    let Some(rate) = search.min_rate else { panic!("a smallest rate: {search:?}") };
    // Checked against the physics crate directly: at that rate the played ramp keeps
    // the study's tolerance (the definition of the search; common practice, no source).
    let ramp = convert::candidate_ramp(&h.state().study().candidates[1], 1).expect("ramp");
    let q = q_star(
        &Ramp::Sampled(play(&ramp, &Playback::sample_and_hold(rate), 1e-3).expect("plays")),
        &PropagationOptions::default(),
    )
    .expect("q");
    assert!(q - 1.0 <= h.state().study().tolerance, "at {rate} samples/s Q* − 1 = {}", q - 1.0);
    assert!(rate < 1e8, "a 20 µs shortcut needs far less than 100 MHz for 1e-3: {rate}");
}

#[test]
fn a_drive_that_cannot_go_negative_refuses_an_inverted_ramp() {
    let mut h = design_page();
    choose_method(&mut h, "invariant shortcut of a duration");
    type_into(&mut h, "Wanted duration", "3 us");
    click(&mut h, "Add as a candidate");
    click(&mut h, "state the drive: unit, calibration, full scale");
    let before = h.state().study().clone();
    click(&mut h, "Play it");
    wait(&mut h);
    let r = h.state_mut().design_panel().playback.result.clone().expect("a result");
    let e = r.expect_err("an inverted trap cannot be played by a drive >= 0");
    // A typed error from the physics crate, shown in its words.
    assert!(matches!(e, quenchless_app::error::AppError::Physics(_)), "{e:?}");
    assert!(e.to_string().contains("cannot go negative"), "{e}");
    assert!(h.query_by_label_contains("cannot go negative").is_some(), "shown plainly");
    assert_eq!(h.state().study(), &before, "nothing changed");
}

#[test]
fn playback_settings_are_saved_into_the_study_as_one_step() {
    let mut h = design_page();
    type_into(&mut h, "Sample rate [samples/s]", "5e7");
    assert_eq!(h.state().study().generator.as_ref().map(|g| g.sample_rate_per_s), Some(100e6), "not saved yet");
    click(&mut h, "Save these settings into the study");
    assert_eq!(h.state().study().generator.as_ref().map(|g| g.sample_rate_per_s), Some(5e7));
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_ok();
    assert_eq!(h.state().study().generator.as_ref().map(|g| g.sample_rate_per_s), Some(100e6));
    let rate = h.state_mut().design_panel().playback.settings.sample_rate_per_s;
    assert!((rate - 100e6).abs() < 1e-6, "the settings follow the study's generator after undo: {rate}");
}

#[test]
fn robustness_map_finishes_and_its_centre_is_the_played_ramp() {
    let mut h = design_page();
    h.state_mut().select(1);
    h.state_mut().design_panel().robustness.points = 9;
    h.run_ok();
    click(&mut h, "Compute robustness map");
    wait(&mut h);
    let r = h.state_mut().design_panel().robustness.result.clone().expect("a result").expect("a map");
    assert_eq!(r.map.q_star_minus_one.len(), 81);
    // No error at the centre: the map's value is Q* of the played table itself
    // (definition of the map; common practice, no source).
    let ramp = convert::candidate_ramp(&h.state().study().candidates[1], 1).expect("ramp");
    let played = play(&ramp, &Playback::sample_and_hold(100e6), h.state().study().tolerance).expect("plays");
    let q = q_star_minus_one(&Ramp::Sampled(played), &PropagationOptions::default()).expect("q");
    let centre = r.centre_q_star_minus_one().expect("odd grid");
    assert!((centre - q).abs() < 1e-12 * q, "centre {centre} vs {q}");
    assert!(h.query_by_label_contains("of the grid within").is_some(), "the fraction is shown");
    assert!(r.map.q_star_minus_one.iter().all(|e| *e >= 0.0), "Q* >= 1 everywhere (Husimi's bound)");
}

#[test]
fn cancel_stops_the_robustness_map() {
    let mut h = design_page();
    // A long job: 121² points of a table played at 10 GHz (200 000 samples each).
    h.state_mut().design_panel().robustness.points = 121;
    h.state_mut().design_panel().playback.settings.sample_rate_per_s = 1e10;
    h.run_ok();
    click(&mut h, "Compute robustness map");
    assert!(h.state_mut().design_panel().robustness.job.is_some(), "the job runs");
    click(&mut h, "Cancel robustness map");
    assert!(
        h.state_mut().design_panel().robustness.job.as_ref().is_some_and(quenchless_app::worker::Job::is_cancelled),
        "the cancel button reached the job"
    );
    let t0 = Instant::now();
    wait(&mut h);
    assert!(t0.elapsed() < Duration::from_secs(10), "cancel took {:?}", t0.elapsed());
    match h.state_mut().design_panel().robustness.result.clone().expect("a result") {
        Err(e) => assert!(matches!(e, quenchless_app::error::AppError::Cancelled), "{e}"),
        Ok(r) => panic!("the map finished ({} points) instead of stopping", r.map.q_star_minus_one.len()),
    }
}

#[test]
fn noise_free_corner_of_the_noise_map_is_q_star() {
    let mut h = design_page();
    h.state_mut().select(0);
    h.state_mut().design_panel().noise.points = 3;
    h.run_ok();
    click(&mut h, "Noise: dephasing and amplitude noise");
    click(&mut h, "Compute noise map");
    wait(&mut h);
    let r = h.state_mut().design_panel().noise.result.clone().expect("a result").expect("a map");
    // For a thermal start, the final energy over the adiabatic one is Husimi's Q*
    // (K. Husimi, Prog. Theor. Phys. 9, 381 (1953)).
    let q = q_minus_1(&h, 0) + 1.0;
    let corner = 1.0 + r.map.energy_ratio_minus_one[0];
    assert!((corner - q).abs() < 1e-8 * q, "{corner} vs {q}");
    assert!(r.map.energy_ratio_minus_one.iter().all(|v| v.is_finite() && *v >= 0.0));
}

#[test]
fn spline_optimiser_reaches_its_target_and_replace_is_undoable() {
    let mut h = design_page();
    h.state_mut().select(2); // the demo's hand-drawn spline
    {
        let p = &mut h.state_mut().design_panel().spline;
        p.target = 1e-4;
        p.max_iterations = 1500.0;
    }
    h.run_ok();
    click(&mut h, "Spline optimiser: knots toward Q* = 1");
    let before = h.state().study().clone();
    let q0 = q_minus_1(&h, 2);
    click(&mut h, "Optimise the inner knots");
    wait(&mut h);
    let r = h.state_mut().design_panel().spline.result.clone().expect("a result").expect("fits");
    assert!(r.fit.reached, "target reached: {:?}", r.fit);
    click(&mut h, "Replace the knots of “hand-drawn spline”");
    // The physics crate's own propagation of the replaced candidate meets the target.
    let q1 = q_minus_1(&h, 2);
    assert!(q1 <= 1e-4 && q1 < q0, "Q* − 1 {q0} -> {q1}");
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_ok();
    assert_eq!(h.state().study(), &before, "one undo step brings the old knots back");
    click(&mut h, "Add it as a new candidate");
    assert_eq!(h.state().study().candidates.len(), before.candidates.len() + 1);
    assert!(h.state().study().candidates.last().is_some_and(|c| c.name.contains("optimised")));
}

#[test]
fn clock_jitter_spoils_the_played_ramp_quadratically() {
    let mut h = design_page();
    h.state_mut().select(1); // the demo's invariant shortcut at 100 MHz: 10 ns periods
    h.run_ok();
    click(&mut h, "Clock jitter (rms)");
    let mut mean = Vec::new();
    for rms in ["0.25 ns", "0.5 ns"] {
        type_into(&mut h, "Clock jitter (rms) value", rms);
        click(&mut h, "Play it");
        wait(&mut h);
        let r = h.state_mut().design_panel().playback.result.clone().expect("a result").expect("plays");
        let Some(j) = r.assessment.jitter else { panic!("jitter statistics: {:?}", r.assessment) };
        let (m, worst) = (j.mean_q_star_minus_one, j.worst_q_star_minus_one);
        assert!(worst >= m && m >= 0.0, "worst {worst} >= mean {m} >= 0");
        mean.push(m);
    }
    // White timing noise is a small random perturbation of the drive; Q* − 1 is
    // quadratic in it, so doubling the rms quadruples the mean excess (second-order
    // perturbation theory; common practice, no source).
    let ratio = mean[1] / mean[0];
    assert!((3.0..5.5).contains(&ratio), "ratio {ratio} ({mean:?})");
    assert!(h.query_by_label_contains("with jitter: mean Q* − 1").is_some());
}

/// A synthesised design that breaks the stated slew limit says so in the words of
/// every report, in the error colour, never as a plain figure; one within it does not.
/// The worst |d nu/dt| of the shortcut is found here by central differences of omega(t)
/// (common practice, no source), independently of the engine's limit check.
#[test]
fn a_design_that_breaks_the_slew_limit_says_so() {
    use quenchless_physics::ramp::RampShape as _;
    let mut h = design_page();
    let limit = h.state().study().trap.slew_limit_hz_per_s.expect("the demo states a slew limit");
    choose_method(&mut h, "invariant shortcut of a duration");
    for (duration, text) in [(1e-6, "1 us"), (20e-6, "20 us")] {
        type_into(&mut h, "Wanted duration", text);
        let ramp = quenchless_physics::ramp::ShortcutRamp::new(TWO_PI * 120e3, TWO_PI * 30e3, duration).unwrap();
        let dt = duration * 1e-5;
        let worst = (1..100_000)
            .map(|k| {
                let t = duration * f64::from(k) / 1e5;
                let w = |t: f64| ramp.omega2(t).max(0.0).sqrt() / TWO_PI;
                ((w(t + 0.5 * dt) - w(t - 0.5 * dt)) / dt).abs()
            })
            .fold(0.0, f64::max);
        let shown = h.query_all_by_label_contains("BREAKS LIMITS: faster than the slew limit").next().is_some();
        assert_eq!(shown, worst > limit, "{text}: worst {worst:e} Hz/s against {limit:e} Hz/s");
        assert_eq!(worst > limit, duration < 2e-6, "one case on each side of the limit");
    }
}

/// The Design page scales its defaults to the study: the wanted duration to the
/// study's first candidate (120 ns in the tight-compression sample, not 20 µs), and
/// the noise ranges so the tolerance contour falls inside the map (amplitude noise heats
/// at omega² S/2: T. A. Savard, K. M. O'Hara and J. E. Thomas, Phys. Rev. A 56, R1095
/// (1997)), neither saturated nor empty.
#[test]
fn design_defaults_follow_the_study() {
    use quenchless_app::AppOptions;
    let sample =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../../sample_profiles/ion_compression_tight.ron");
    let mut h = crate::harness::app_harness_with(AppOptions { open: Some(sample), ..AppOptions::default() });
    click(&mut h, "Design & hardware");
    let first = quenchless_app::edits::spec_duration(&h.state().study().candidates[0].ramp);
    assert!((h.state_mut().design_panel().synthesis.duration_s - first).abs() < 1e-18, "the study's time scale");
    assert!(first < 1e-6, "a sub-microsecond study: {first:e} s");

    let mut h = design_page();
    let tolerance = h.state().study().tolerance;
    let frictionless = (0..h.state().study().candidates.len())
        .find(|&i| q_minus_1(&h, i) < 1e-6)
        .expect("the demo has a frictionless candidate");
    h.state_mut().select(frictionless);
    h.state_mut().design_panel().noise.points = 9;
    h.run_ok();
    click(&mut h, "Noise: dephasing and amplitude noise");
    click(&mut h, "Compute noise map");
    wait(&mut h);
    let r = h.state_mut().design_panel().noise.result.clone().expect("a result").expect("a map");
    let inside = r.map.energy_ratio_minus_one.iter().filter(|e| **e <= tolerance).count() as f64
        / r.map.energy_ratio_minus_one.len() as f64;
    assert!((0.05..=0.95).contains(&inside), "{:.1} % of the map within tolerance", 100.0 * inside);
}

/// The drawn tolerance contour lies where the map crosses the tolerance: every
/// segment's ends sit on cell edges whose two grid values straddle log10(tolerance),
/// and the played ramp itself, re-evaluated at each segment's midpoint (every omega
/// scaled by 1 + e, the duration by 1 + d: the map's definition, common practice, no
/// source), is within the variation of its cell of the tolerance. The valley of a
/// held ramp follows (1 + e)(1 + d) = 1, where every phase omega t is unchanged.
#[test]
fn the_tolerance_contour_lies_where_the_map_crosses_the_tolerance() {
    use quenchless_app::heatmap::contour;
    use quenchless_physics::design::scaled_waveform;
    let mut h = design_page();
    h.state_mut().select(1);
    h.state_mut().design_panel().robustness.points = 21;
    h.state_mut().design_panel().robustness.calibration_percent = 12.0;
    h.state_mut().design_panel().robustness.duration_percent = 12.0;
    h.run_ok();
    click(&mut h, "Compute robustness map");
    wait(&mut h);
    let r = h.state_mut().design_panel().robustness.result.clone().expect("a result").expect("a map");
    let grid = r.grid();
    let level = r.tolerance.log10();
    let segments = contour(&grid, level);
    assert!(!segments.is_empty(), "the tolerance is crossed somewhere on this map");
    let ramp = convert::candidate_ramp(&h.state().study().candidates[1], 1).expect("ramp");
    let rate = h.state_mut().design_panel().playback.settings.sample_rate_per_s;
    let played = play(&ramp, &Playback::sample_and_hold(rate), r.tolerance).expect("plays");
    let (nx, dx, dy) = (grid.xs.len(), grid.xs[1] - grid.xs[0], grid.ys[1] - grid.ys[0]);
    let value = |ix: usize, iy: usize| grid.values[iy * nx + ix];
    for seg in segments.iter().step_by(3) {
        let mid = [0.5 * (seg[0][0] + seg[1][0]), 0.5 * (seg[0][1] + seg[1][1])];
        let ix = (((mid[0] - grid.xs[0]) / dx).floor() as usize).min(nx - 2);
        let iy = (((mid[1] - grid.ys[0]) / dy).floor() as usize).min(grid.ys.len() - 2);
        let corners = [value(ix, iy), value(ix + 1, iy), value(ix, iy + 1), value(ix + 1, iy + 1)];
        let (lo, hi) = corners.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| (a.min(v), b.max(v)));
        assert!(lo <= level && level <= hi, "segment {seg:?} in a cell that does not cross: {corners:?}");
        let scaled = scaled_waveform(&played, mid[0] / 100.0, mid[1] / 100.0).expect("scales");
        let here = q_star_minus_one(&Ramp::Sampled(scaled), &PropagationOptions::default()).expect("q").log10();
        assert!(
            (here - level).abs() <= (hi - lo) + 1e-9,
            "at e = {:.3} %, d = {:.3} %: log10(Q* - 1) = {here:.3}, tolerance {level:.3}, cell span {:.3}",
            mid[0],
            mid[1],
            hi - lo
        );
    }
}

//! The cycle page and its background power map.

use quenchless_app::panels::cycle::{MapJob, start_map};
use quenchless_app::{AppOptions, Quality, QuenchlessApp};
use quenchless_physics::design::StrokeTime;
use std::time::{Duration, Instant};

fn wait(app: &mut QuenchlessApp) {
    let t0 = Instant::now();
    while app.cycle_panel().job.is_some() && t0.elapsed() < Duration::from_secs(30) {
        app.cycle_panel().poll();
        std::thread::sleep(Duration::from_millis(5));
    }
}

#[test]
fn power_map_runs_off_thread_and_finishes() {
    let mut app = QuenchlessApp::headless(AppOptions::default());
    let study = app.study().clone();
    let p = app.cycle_panel();
    p.cells = 6;
    p.start(&study, None);
    assert!(p.job.is_some(), "{:?}", p.error);
    wait(&mut app);
    let m = app.cycle_panel().map.clone().expect("map finished");
    assert_eq!(m.power_w.len(), 36);
    assert!(m.power_w.iter().any(Result::is_ok), "some cells are stable");
}

#[test]
fn power_map_can_be_cancelled_and_refuses_equal_axes() {
    let study = quenchless_app::demo::demo_study();
    let job: MapJob =
        start_map(&study, (StrokeTime::HotContact, StrokeTime::ColdContact), (1e-6, 1e-4), (1e-6, 1e-4), 200, None)
            .expect("starts");
    job.cancel();
    assert!(
        start_map(&study, (StrokeTime::HotContact, StrokeTime::HotContact), (1e-6, 1e-4), (1e-6, 1e-4), 4, None)
            .is_err()
    );
}

#[test]
fn unstable_cycle_reports_no_figures() {
    let mut app = QuenchlessApp::headless(AppOptions::default());
    // No bath contact and sudden strokes with holds: the jumps pump energy in every
    // cycle for most holds, so there is no attracting limit cycle.
    let mut found = false;
    for k in 1..=12 {
        if let Some(c) = app.study_mut().cycle.as_mut() {
            c.hot.time_s = 0.0;
            c.cold.time_s = 0.0;
            c.expansion = quenchless_profile::StrokeSpec::Sudden { hold_s: 0.7e-6 * f64::from(k) };
            c.compression = quenchless_profile::StrokeSpec::Sudden { hold_s: 0.3e-6 * f64::from(k) };
        }
        let r = app.results(Quality::LIVE).cycle.clone().expect("has a cycle").expect("analyses");
        assert_eq!(r.stable, r.figures.is_some(), "figures exist exactly when stable");
        if r.spectral_radius > 1.0 + 1e-6 {
            assert!(!r.stable);
            found = true;
        }
    }
    assert!(found, "some hold gives a spectral radius above 1");
}

#[test]
fn cycle_optimiser_finds_a_split_inside_the_otto_bound_and_applies_it() {
    use egui_kittest::kittest::Queryable as _;
    use quenchless_physics::constants::{BOLTZMANN, HBAR, TWO_PI};
    let mut h = crate::harness::app_harness();
    h.get_by_label("Engine cycle").click();
    h.run_ok();
    h.state_mut().cycle_panel().tuning.max_iterations = 200.0;
    h.state_mut().cycle_panel().cells = 4;
    h.get_by_label("Find the split of most power").scroll_to_me();
    h.run_ok();
    h.get_by_label("Find the split of most power").click();
    h.run_ok();
    let t0 = Instant::now();
    while h.state_mut().cycle_panel().busy() && t0.elapsed() < Duration::from_mins(1) {
        std::thread::sleep(Duration::from_millis(10));
        h.run_ok();
    }
    let r = h.state_mut().cycle_panel().tuning.result.clone().expect("a result").expect("an optimum");
    let b = &r.best;
    assert!(b.power_w >= b.start_power_w, "no worse than the start: {} < {}", b.power_w, b.start_power_w);
    // The demo's baths: 120 kHz with n = 3, 30 kHz with n = 0.3.
    assert!((b.otto_efficiency - (1.0 - 30.0 / 120.0)).abs() < 1e-12, "1 − ω_c/ω_h");
    let temperature = |nu: f64, n: f64| HBAR * TWO_PI * nu / (BOLTZMANN * (1.0 + 1.0 / n).ln());
    let ca = 1.0 - (temperature(30e3, 0.3) / temperature(120e3, 3.0)).sqrt();
    // Curzon and Ahlborn, Am. J. Phys. 43, 22 (1975): 1 − sqrt(T_c/T_h), with the
    // Bose–Einstein temperature of each bath's occupation.
    assert!((b.curzon_ahlborn.expect("hot bath above zero") - ca).abs() < 1e-9, "{:?} vs {ca}", b.curzon_ahlborn);
    // Friction only lowers the efficiency below the ideal Otto value (Y. Rezek and
    // R. Kosloff, New J. Phys. 8, 83 (2006)).
    let eff = b.efficiency.expect("the demo's optimum is an engine");
    assert!(eff > 0.0 && eff <= b.otto_efficiency + 1e-9, "efficiency {eff}");
    assert!(h.query_by_label_contains("efficiency at maximum power").is_some());
    // Marked on the power map once one is computed.
    h.get_by_label("Compute power map").click();
    h.run_ok();
    while h.state_mut().cycle_panel().busy() && t0.elapsed() < Duration::from_mins(2) {
        std::thread::sleep(Duration::from_millis(10));
        h.run_ok();
    }
    assert!(h.query_by_label_contains("Pink cross").is_some(), "the optimum is marked on the map");
    // Applying it is one undo step.
    let before = h.state().study().clone();
    h.get_by_label("Apply this split to the cycle").scroll_to_me();
    h.run_ok();
    h.get_by_label("Apply this split to the cycle").click();
    h.run_ok();
    let cy = h.state().study().cycle.clone().expect("a cycle");
    assert!((cy.hot.time_s - b.stroke_times[0]).abs() < 1e-15 && (cy.cold.time_s - b.stroke_times[2]).abs() < 1e-15);
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    h.run_ok();
    assert_eq!(h.state().study(), &before);
}

/// Ticking "give a temperature" gives the same bath as a temperature, and unticking
/// gives the occupation back: T = hbar omega / (k_B ln(1 + 1/n)) (Bose-Einstein
/// statistics; the demo's hot bath is 120 kHz with n = 3).
#[test]
fn the_temperature_toggle_converts_the_bath_both_ways() {
    use egui_kittest::kittest::Queryable as _;
    use quenchless_physics::constants::{BOLTZMANN, HBAR, TWO_PI};
    use quenchless_profile::study::BathFilling;
    let mut h = crate::harness::app_harness();
    h.get_by_label("Engine cycle").click();
    h.run_ok();
    let filling = |h: &mut egui_kittest::Harness<'_, quenchless_app::QuenchlessApp>| {
        h.state().study().cycle.as_ref().expect("the demo has a cycle").hot.filling
    };
    assert_eq!(filling(&mut h), BathFilling::Occupation(3.0));
    h.get_by_label("Hot bath: give a temperature").scroll_to_me();
    h.run_ok();
    h.get_by_label("Hot bath: give a temperature").click();
    h.run_ok();
    let BathFilling::TemperatureK(t) = filling(&mut h) else { panic!("a temperature now: {:?}", filling(&mut h)) };
    let expected = HBAR * TWO_PI * 120e3 / (BOLTZMANN * (1.0f64 + 1.0 / 3.0).ln());
    assert!((t / expected - 1.0).abs() < 1e-12, "{t:e} K vs {expected:e} K");
    h.get_by_label("Hot bath: give a temperature").click();
    h.run_ok();
    let BathFilling::Occupation(n) = filling(&mut h) else { panic!("an occupation again") };
    assert!((n - 3.0).abs() < 1e-9, "n = {n}");
}

/// A long ramp (a 350 ms shortcut from 120 kHz to 30 kHz, 42,000 trap periods, about a
/// second of exact propagation) is drawn at once from its trap frequency while its
/// exact evaluation runs on a worker: the list and the verdict line
/// say "computing…" and show no Q* until then; the verdict that arrives is the exact
/// path's (Chen et al., PRL 104, 063002 (2010): the shortcut ends energy-diagonal).
#[test]
fn a_long_ramp_is_drawn_at_once_and_its_verdict_comes_from_the_exact_path() {
    use egui_kittest::kittest::Queryable as _;
    use quenchless_profile::study::RampSpec;
    let mut h = crate::harness::app_harness();
    {
        let app = h.state_mut();
        let s = app.study_mut();
        s.candidates[1].ramp = RampSpec::Shortcut { from_hz: 120e3, to_hz: 30e3, duration_s: 0.35 };
        app.select(1);
        app.commit_edit();
    }
    h.run_ok();
    let name = h.state().study().candidates[1].name.clone();
    assert!(
        h.query_by_label_contains("a long ramp: the curves drawn are a preview").is_some(),
        "the verdict line says the figures are coming"
    );
    assert!(h.query_by_label(&format!("computing… {name}")).is_some(), "the list says so too");
    let start = std::time::Instant::now();
    while h.state_mut().results(quenchless_app::Quality::SETTLED).candidates[1].is_refining() {
        assert!(start.elapsed().as_secs() < 60, "the exact evaluation never arrived");
        std::thread::sleep(std::time::Duration::from_millis(10));
    }
    h.run_ok();
    h.run_ok();
    let q = h.state_mut().results(quenchless_app::Quality::SETTLED).candidates[1]
        .ready()
        .expect("exact")
        .evaluation
        .report
        .q_star_minus_one;
    assert!(q.abs() < 1e-9, "Q* - 1 = {q}");
    assert!(h.query_by_label(&format!("PASS {name}")).is_some(), "the list shows the exact verdict");
    assert!(h.query_by_label_contains("curves drawn are a preview").is_none());
}

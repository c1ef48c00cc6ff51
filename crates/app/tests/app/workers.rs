//! The cycle page and its background power map.

use quenchless_app::panels::cycle::{MapJob, StrokeAxis, start_map};
use quenchless_app::{AppOptions, Quality, QuenchlessApp};
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
    assert!(m.power_w.iter().any(Option::is_some), "some cells are stable");
}

#[test]
fn power_map_can_be_cancelled_and_refuses_equal_axes() {
    let study = quenchless_app::demo::demo_study();
    let job: MapJob =
        start_map(&study, (StrokeAxis::HotContact, StrokeAxis::ColdContact), (1e-6, 1e-4), (1e-6, 1e-4), 200, None)
            .expect("starts");
    job.cancel();
    assert!(
        start_map(&study, (StrokeAxis::HotContact, StrokeAxis::HotContact), (1e-6, 1e-4), (1e-6, 1e-4), 4, None)
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

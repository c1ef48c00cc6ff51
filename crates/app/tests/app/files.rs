//! Saving, reopening, bad files, recovery and export refusals.

use crate::harness::{app_harness, app_harness_with};
use egui_kittest::kittest::Queryable as _;
use quenchless_app::{AppOptions, QuenchlessApp};
use quenchless_profile::waveform::ExportColumns;

#[test]
fn save_then_reopen_gives_the_same_study() {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("study.ron");
    let mut h = app_harness();
    h.get_by_label("Add candidate").click();
    h.run_ok();
    let edited = h.state().study().clone();
    assert!(h.state().is_dirty());
    h.state_mut().save_to(&path).expect("saves");
    assert!(!h.state().is_dirty());
    let mut other = app_harness();
    other.state_mut().open_file(&path).expect("reopens");
    other.run_ok();
    assert_eq!(other.state().study(), &edited);
    assert_eq!(other.state().path(), Some(path.as_path()));
}

#[test]
fn malformed_file_shows_error_and_keeps_study() {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("broken.ron");
    std::fs::write(&path, "(\n  format_version: 1,\n  name: \"x\",\n  tolerance: oops,\n)\n").expect("write");
    let opts = AppOptions { open: Some(path.clone()), ..AppOptions::default() };
    let mut h = app_harness_with(opts);
    let study = h.state().study().clone();
    assert_eq!(study, quenchless_app::demo::demo_study(), "the demo stays");
    let err = h.state().error().expect("an error is shown").to_string();
    assert!(err.contains("broken.ron") && err.contains(":4:"), "file and line named: {err}");
    assert!(h.query_by_label_contains("broken.ron").is_some(), "the error is on screen");
    // A bad value (not syntax) names the field.
    std::fs::write(&path, "(format_version: 1, tolerance: 5.0)").expect("write");
    let e = h.state_mut().open_file(&path).expect_err("tolerance 5 is out of range").to_string();
    assert!(e.contains("tolerance"), "{e}");
    assert_eq!(h.state().study(), &study);
}

#[test]
fn recovery_file_is_offered_on_start() {
    let dir = tempfile::tempdir().expect("temp dir");
    let rec = dir.path().join("recovery.ron");
    let mut s = quenchless_app::demo::demo_study();
    s.name = "unsaved work".into();
    quenchless_app::files::write_recovery(&rec, &s, None).expect("write");
    let mut h = app_harness_with(AppOptions { recovery_path: Some(rec.clone()), ..AppOptions::default() });
    assert!(h.state().has_prompt());
    h.get_by_label("Restore it").click();
    h.run_ok();
    assert_eq!(h.state().study().name, "unsaved work");
    assert!(h.state().is_dirty(), "restored work is not saved yet");
}

#[test]
fn export_needs_caution_and_flags_broken_limits() {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("w.csv");
    let mut app = QuenchlessApp::headless(AppOptions::default());
    assert!(app.export_candidate(0, &path, 1e6, ExportColumns::Si, false).is_err(), "caution first");
    app.acknowledge_caution();
    // Tighten the slew limit so the linear ramp breaks it.
    app.study_mut().trap.slew_limit_hz_per_s = Some(1e3);
    let e = app.export_candidate(0, &path, 1e6, ExportColumns::Si, false).expect_err("broken limits need consent");
    assert!(matches!(e, quenchless_app::error::AppError::Refused(_)), "{e:?}");
    assert!(e.to_string().contains("limits"), "{e}");
    let rows = app.export_candidate(0, &path, 1e6, ExportColumns::Si, true).expect("exports unchanged");
    assert!(rows >= 20);
    let text = std::fs::read_to_string(&path).expect("read");
    // The same header as the command line's files: the check failed, and the caution.
    assert!(text.starts_with("# written by quenchless"));
    assert!(text.contains("# LIMIT BROKEN: faster than the slew limit"), "the header says the check failed");
    assert!(text.contains("# verdict: BREAKS LIMITS"));
    assert!(text.contains(quenchless_profile::header::CAUTION));
    assert!(text.contains("# reading: hold"));
    // Opening another study asks for the caution again.
    let sample = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../../sample_profiles/tweezer_expansion.ron");
    app.open_file(&sample).expect("opens");
    assert!(app.export_candidate(0, &path, 1e6, ExportColumns::Si, true).is_err(), "caution again");
}

#[test]
fn import_waveform_adds_a_candidate() {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("ramp.csv");
    std::fs::write(&path, "# test\nt[us],nu[kHz]\n0,100\n5,60\n10,25\n").expect("write");
    let mut app = QuenchlessApp::headless(AppOptions::default());
    let n = app.study().candidates.len();
    let i = app.import_waveform(&path).expect("imports");
    assert_eq!(i, n);
    assert_eq!(app.study().candidates[i].name, "ramp");
    std::fs::write(&path, "t[us],nu[kHz]\n0,100\n0,60\n").expect("write");
    let e = app.import_waveform(&path).expect_err("times must increase").to_string();
    assert!(e.contains("ramp.csv"), "{e}");
}

#[test]
fn every_sample_profile_opens_and_draws_all_pages() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../../sample_profiles");
    let Ok(entries) = std::fs::read_dir(&dir) else { return };
    let mut h = app_harness();
    for e in entries.flatten() {
        let p = e.path();
        if p.extension().is_some_and(|x| x == "ron") {
            h.state_mut().open_file(&p).unwrap_or_else(|err| panic!("{}: {err}", p.display()));
            for page in [quenchless_app::Page::Compare, quenchless_app::Page::Cycle, quenchless_app::Page::Shape] {
                h.state_mut().show_page(page);
                h.run_ok();
            }
            assert!(h.state().error().is_none());
        }
    }
}

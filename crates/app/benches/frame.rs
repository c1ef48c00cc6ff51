//! The app's per-frame recompute: eight candidates and a cycle, at the quality used
//! while a knot is dragged. The budget is 4 ms per frame.

use criterion::{Criterion, criterion_group, criterion_main};
use quenchless_app::compute::{
    Quality, ResultCache, compute, compute_reusing, evaluate_candidate, preview_series, settings_of,
};
use quenchless_app::demo::{FAMILIES, demo_study};
use quenchless_app::edits::add_candidate;
use quenchless_profile::study::RampSpec;
use std::hint::black_box;

fn eight_candidates() -> quenchless_profile::Study {
    let mut s = demo_study();
    // The demo has six; add a polynomial and another spline to make eight.
    for f in ["polynomial", "spline"] {
        add_candidate(&mut s, f);
    }
    assert_eq!(s.candidates.len(), 8);
    assert!(FAMILIES.len() >= 7);
    s
}

fn frame(c: &mut Criterion) {
    let study = eight_candidates();
    let mut g = c.benchmark_group("frame");
    g.bench_function("recompute 8 candidates + cycle, live", |b| b.iter(|| compute(black_box(&study), Quality::LIVE)));
    // What a frame costs while a knot is dragged: one candidate changed since the
    // previous frame, the other seven and the cycle are reused.
    let before = compute(&study, Quality::LIVE);
    let mut dragged = study.clone();
    if let RampSpec::Spline { knots, .. } = &mut dragged.candidates[2].ramp {
        knots[2].frequency_hz *= 1.05;
    }
    g.bench_function("drag frame: 1 of 8 candidates changed, live", |b| {
        b.iter(|| compute_reusing(black_box(&dragged), Quality::LIVE, Some((&study, Quality::LIVE, &before))));
    });
    g.bench_function("recompute 8 candidates + cycle, settled", |b| {
        b.iter(|| compute(black_box(&study), Quality::SETTLED));
    });
    g.finish();
}

/// A 35 ms shortcut from 120 kHz to 30 kHz (4,200 trap periods) among the demo's
/// candidates: what its exact evaluation costs, and what a drag frame costs now that
/// the frame draws its preview and the exact path runs on a worker.
fn long_ramp(c: &mut Criterion) {
    let mut study = demo_study();
    study.candidates[1].ramp = RampSpec::Shortcut { from_hz: 120e3, to_hz: 30e3, duration_s: 35e-3 };
    let scale = quenchless_app::units::DisplayScale::new(&study.display, study.trap.start_frequency_hz);
    let mut g = c.benchmark_group("long ramp");
    g.sample_size(20);
    g.bench_function("exact evaluation of the 35 ms shortcut (the worker's job)", |b| {
        let settings = settings_of(&study, Quality::EXACT_OFF_THREAD).expect("settings");
        b.iter(|| evaluate_candidate(black_box(&study), 1, &settings, &scale));
    });
    g.bench_function("preview of the 35 ms shortcut (drawn in the frame)", |b| {
        b.iter(|| preview_series(black_box(&study), 1, &scale));
    });
    // A drag frame: the long ramp changes every frame (a new revision) and is drawn
    // from its preview, the other candidates are reused; no worker starts until the
    // handle is released.
    g.bench_function("drag frame with the long ramp changing", |b| {
        let mut cache = ResultCache::default();
        let mut revision = 0_u64;
        let mut dragged = study.clone();
        b.iter(|| {
            revision += 1;
            if let RampSpec::Shortcut { to_hz, .. } = &mut dragged.candidates[1].ramp {
                *to_hz = 30e3 + (revision % 100) as f64;
            }
            cache.get(black_box(&dragged), revision, Quality::LIVE).candidates.len()
        });
    });
    g.finish();
}

criterion_group!(benches, frame, long_ramp);
criterion_main!(benches);

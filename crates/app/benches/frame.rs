//! The app's per-frame recompute: eight candidates and a cycle, at the quality used
//! while a knot is dragged. The budget is 4 ms per frame.

use criterion::{Criterion, criterion_group, criterion_main};
use quenchless_app::compute::{Quality, compute, compute_reusing};
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

criterion_group!(benches, frame);
criterion_main!(benches);

//! Speed of the propagation kernels (figures in the closing notes and DEVELOPERS.md).
//! `cargo bench -p quenchless-physics`; in `cargo test --all-targets` each runs once.
#![expect(clippy::unwrap_used, reason = "benchmark inputs are fixed and valid")]

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::cycle::{OttoCycle, WorkStroke};
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::propagate::hold_uniform;
use quenchless_physics::ramp::{Ramp, SampledColumn, SampledRamp, SampledReading, ShortcutRamp};
use quenchless_physics::{Bath, Noise, PropagationOptions};
use std::hint::black_box;

const W: f64 = TWO_PI * 100e3;

/// Held samples of a smooth expansion at 1 GS/s: the generator's output.
fn held_samples(n: usize, from: f64, to: f64, tau: f64) -> (Vec<f64>, Vec<f64>) {
    let times: Vec<f64> = (0..n).map(|k| tau * k as f64 / (n - 1) as f64).collect();
    let omegas = times.iter().map(|t| from + (to - from) * (t / tau) * (t / tau) * (3.0 - 2.0 * t / tau)).collect();
    (times, omegas)
}

fn hold_kernel(c: &mut Criterion) {
    let n = 1_000_000;
    let dt = 1e-9;
    let omega2: Vec<f64> = (0..n)
        .map(|k| {
            let w = W * (1.0 - 0.75 * f64::from(k) / f64::from(n));
            w * w
        })
        .collect();
    let mut g = c.benchmark_group("sample-and-hold");
    g.throughput(Throughput::Elements(n as u64));
    g.bench_function("1e6 held samples", |b| b.iter(|| hold_uniform(black_box(&omega2), black_box(dt))));
    g.finish();
}

fn smooth_shortcut(c: &mut Criterion) {
    let ramp = Ramp::Shortcut(ShortcutRamp::new(W, 0.25 * W, 12e-6).unwrap());
    let opts = PropagationOptions::default();
    c.bench_function("shortcut ramp to 1e-10 on Q*", |b| b.iter(|| q_star(black_box(&ramp), &opts).unwrap()));
}

fn limit_cycle(c: &mut Criterion) {
    let (wh, wc) = (W, 0.4 * W);
    let n = 20_001;
    let (te, oe) = held_samples(n, wh, wc, 20e-6);
    let (tc, oc) = held_samples(n, wc, wh, 20e-6);
    let cycle = OttoCycle {
        hot: Bath::with_occupation(wh, 3.0, 3e4).unwrap(),
        hot_time: 40e-6,
        expansion: WorkStroke::Ramp(Ramp::Sampled(
            SampledRamp::new(te, oe, SampledColumn::Omega, SampledReading::Hold).unwrap(),
        )),
        cold: Bath::with_occupation(wc, 0.2, 3e4).unwrap(),
        cold_time: 40e-6,
        compression: WorkStroke::Ramp(Ramp::Sampled(
            SampledRamp::new(tc, oc, SampledColumn::Omega, SampledReading::Hold).unwrap(),
        )),
        noise: Noise::NONE,
    };
    let opts = PropagationOptions::default();
    c.bench_function("limit cycle, two 20001-sample held ramps", |b| {
        b.iter(|| cycle.analyse(black_box(&opts)).unwrap());
    });
}

fn robustness(c: &mut Criterion) {
    use quenchless_physics::design::{RobustnessGrid, robustness_map};
    use std::sync::atomic::AtomicBool;
    let (t, o) = held_samples(2000, W, 0.3 * W, 10e-6);
    let w = SampledRamp::new(t, o, SampledColumn::Omega, SampledReading::Hold).unwrap();
    let grid = RobustnessGrid::default();
    let opts = PropagationOptions::default();
    let mut g = c.benchmark_group("robustness");
    g.sample_size(10);
    g.bench_function("128 x 128 map of a 2000-sample held ramp", |b| {
        b.iter(|| robustness_map(black_box(&w), &grid, &[], &opts, &|_| {}, &AtomicBool::new(false)).unwrap());
    });
    g.finish();
}

fn spline_optimisation(c: &mut Criterion) {
    use quenchless_physics::design::{SplineTargets, optimise_spline};
    use quenchless_physics::ramp::{SplineRamp, SplineShape, SplineSpace};
    use std::sync::atomic::AtomicBool;
    // 10 knots (8 free) from 100 to 25 kHz in 20 us, geometric start (Q* - 1 = 1.3e-2).
    let (wi, wf, tau) = (W, 0.25 * W, 20e-6);
    let times: Vec<f64> = (0..10).map(|k| tau * f64::from(k) / 9.0).collect();
    let omegas: Vec<f64> = (0..10).map(|k| wi * (wf / wi).powf(f64::from(k) / 9.0)).collect();
    let start = SplineRamp::new(times, omegas, SplineShape::Smooth, SplineSpace::LogOmega, true).unwrap();
    let opts = PropagationOptions::with_accuracy(1e-9).unwrap();
    let mut g = c.benchmark_group("design");
    g.sample_size(10);
    g.bench_function("spline, 8 free knots to Q* - 1 < 1e-6", |b| {
        b.iter(|| {
            let fit = optimise_spline(
                black_box(&start),
                &SplineTargets::default(),
                &opts,
                &|_, _| {},
                &AtomicBool::new(false),
            )
            .unwrap();
            assert!(fit.reached);
            fit
        });
    });
    let robust = SplineTargets { calibration_band: Some(0.05), ..SplineTargets::default() };
    g.bench_function("spline, 8 free knots, worst Q* over +-5 % (5 points)", |b| {
        b.iter(|| optimise_spline(black_box(&start), &robust, &opts, &|_, _| {}, &AtomicBool::new(false)).unwrap());
    });
    g.finish();
}

fn cycle_optimisation(c: &mut Criterion) {
    use quenchless_physics::design::{CycleTuning, StrokeFamily, optimise_cycle};
    use quenchless_physics::limits::TrapLimits;
    use std::sync::atomic::AtomicBool;
    let (wh, wc) = (2.0 * W, 1.4 * W);
    let hot = Bath::with_occupation(wh, 3.0, 2e5).unwrap();
    let cold = Bath::with_occupation(wc, 0.5, 2e5).unwrap();
    let sc = |a, b| WorkStroke::Ramp(Ramp::Shortcut(ShortcutRamp::new(a, b, 5e-6).unwrap()));
    let template = OttoCycle {
        hot,
        hot_time: 10e-6,
        expansion: sc(wh, wc),
        cold,
        cold_time: 10e-6,
        compression: sc(wc, wh),
        noise: Noise::NONE,
    };
    let tuning = CycleTuning {
        family: StrokeFamily::Shortcut,
        limits: TrapLimits::new(Some(0.5 * W), None, None).unwrap(),
        ..CycleTuning::default()
    };
    let opts = PropagationOptions::default();
    let mut g = c.benchmark_group("design");
    g.sample_size(10);
    g.bench_function("cycle, shortcut strokes, free total time, lowest frequency", |b| {
        b.iter(|| optimise_cycle(black_box(&template), &tuning, &opts, &|_, _| {}, &AtomicBool::new(false)).unwrap());
    });
    g.finish();
}

/// The whole playback assessment of the time-optimal hold sequence 100 -> 25 kHz
/// (bounds 20 and 120 kHz) at 1e8 samples/s with 16 bits: play, designed and played
/// Q*, limits, the rate walk down from 1e9 samples/s and the bit-depth walk.
fn playback_assessment(c: &mut Criterion) {
    use quenchless_physics::design::time_optimal_holds;
    use quenchless_physics::playback::{AssessmentSettings, Playback, assess};
    let k = TWO_PI * 1e3;
    let ramp = Ramp::PiecewiseConstant(
        time_optimal_holds(100.0 * k, 25.0 * k, (20.0 * k).powi(2), (120.0 * k).powi(2)).unwrap().ramp,
    );
    let top = (130.0 * k).powi(2);
    let pb = Playback { quantisation: Some((16, 0.0, top)), ..Playback::sample_and_hold(1e8) };
    let settings = AssessmentSettings { max_rate: Some(1e9), ..AssessmentSettings::default() };
    let opts = PropagationOptions::default();
    let mut g = c.benchmark_group("playback");
    g.sample_size(10);
    g.bench_function("assess holds at 1e8/s, 16 bits, rate walk from 1e9/s", |b| {
        b.iter(|| assess(black_box(&ramp), &pb, &settings, &opts, &|| false).unwrap());
    });
    g.finish();
}

/// The long ramp of the speed target: a 35 ms shortcut 100 -> 25 kHz played at 1e8
/// samples/s (3.5 million samples), 16 bits, a 50 ns low-pass (8 held sub-steps per
/// sample, 28 million in all): one streamed play, and the whole assessment with the
/// rate and bit-depth searches.
fn long_playback(c: &mut Criterion) {
    use quenchless_physics::playback::{AssessmentSettings, Keep, Playback, assess, play_streaming};
    let k = TWO_PI * 1e3;
    let ramp = Ramp::Shortcut(ShortcutRamp::new(100.0 * k, 25.0 * k, 35e-3).unwrap());
    let top = (120.0 * k).powi(2);
    let pb = Playback { quantisation: Some((16, -top, top)), low_pass: Some(50e-9), ..Playback::sample_and_hold(1e8) };
    let settings = AssessmentSettings { keep_tables: false, ..AssessmentSettings::default() };
    let opts = PropagationOptions::default();
    let mut g = c.benchmark_group("long playback");
    g.sample_size(10);
    g.throughput(Throughput::Elements(28_000_000));
    g.bench_function("one play of 35 ms at 1e8/s, 16 bits, low-pass", |b| {
        b.iter(|| play_streaming(black_box(&ramp), &pb, 1e-3, &Keep::default()).unwrap().q_star_minus_one);
    });
    g.throughput(Throughput::Elements(1));
    g.bench_function("assess 35 ms at 1e8/s, 16 bits, low-pass, both searches", |b| {
        b.iter(|| assess(black_box(&ramp), &pb, &settings, &opts, &|| false).unwrap());
    });
    g.finish();
}

criterion_group!(
    benches,
    long_playback,
    playback_assessment,
    hold_kernel,
    smooth_shortcut,
    limit_cycle,
    robustness,
    spline_optimisation,
    cycle_optimisation
);
criterion_main!(benches);

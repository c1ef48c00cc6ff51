//! Speed of the anharmonic check (split-step Fourier wavefunction solver).
//! `cargo bench -p quenchless-physics --bench anharmonic`; in `cargo test --all-targets`
//! each runs once.
#![expect(clippy::unwrap_used, reason = "benchmark inputs are fixed and valid")]

use criterion::{Criterion, criterion_group, criterion_main};
use quenchless_physics::anharmonic::{AxisProblem, CheckSettings, WellShape, check_axis};
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::ramp::{LinearRamp, Ramp, ShortcutRamp};
use std::hint::black_box;

/// Rubidium-87, kg (86.909180527 u, u = 1.66053906660e-27 kg).
const RB87: f64 = 86.909_180_527 * 1.660_539_066_60e-27;

fn shortcut() -> Ramp {
    Ramp::Shortcut(ShortcutRamp::new(TWO_PI * 100e3, TWO_PI * 25e3, 5e-6).unwrap())
}

fn run(p: &AxisProblem) -> f64 {
    check_axis(p, &CheckSettings::default(), &mut |_| true).unwrap().energy_ratio
}

fn ground_state(c: &mut Criterion) {
    let ramp = shortcut();
    let p = AxisProblem {
        ramp: &ramp,
        gain: 1.0,
        offset_omega2: 0.0,
        mass_kg: RB87,
        well: WellShape::Gaussian { waist_m: 800e-9 },
        occupation: 0.0,
    };
    c.bench_function("ground state, Gaussian 800 nm, shortcut 5 us, to 1e-8", |b| b.iter(|| run(black_box(&p))));
}

fn thermal_mixtures(c: &mut Criterion) {
    let mut g = c.benchmark_group("thermal N = 1 (40+ levels), to 1e-8");
    g.sample_size(10);
    let ramp = shortcut();
    let gaussian = AxisProblem {
        ramp: &ramp,
        gain: 1.0,
        offset_omega2: 0.0,
        mass_kg: RB87,
        well: WellShape::Gaussian { waist_m: 1600e-9 },
        occupation: 1.0,
    };
    g.bench_function("Gaussian 1600 nm, shortcut 5 us", |b| b.iter(|| run(black_box(&gaussian))));
    let linear = Ramp::Linear(LinearRamp::new(TWO_PI * 100e3, TWO_PI * 25e3, 2e-6).unwrap());
    let harmonic = AxisProblem { ramp: &linear, well: WellShape::Harmonic, ..gaussian };
    g.bench_function("harmonic, linear 2 us (Q* = 1.94)", |b| b.iter(|| run(black_box(&harmonic))));
    g.finish();
}

criterion_group!(benches, ground_state, thermal_mixtures);
criterion_main!(benches);

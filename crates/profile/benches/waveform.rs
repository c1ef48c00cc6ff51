//! Reading a long waveform table (`cargo bench -p quenchless-profile`; in
//! `cargo test --all-targets` it runs once).

#![expect(clippy::unwrap_used, reason = "benchmark inputs are fixed and valid")]

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use quenchless_profile::waveform::parse_waveform;
use std::fmt::Write as _;
use std::hint::black_box;
use std::path::Path;

fn long_table(rows: usize) -> String {
    let w = std::f64::consts::TAU * 100e3;
    let mut text = String::from("# a 1 ms linear expansion\nt,omega\n");
    for k in 0..rows {
        let t = 1e-3 * k as f64 / (rows - 1) as f64;
        let _ = writeln!(text, "{t:e},{:e}", w * (1.0 - 0.75 * t / 1e-3));
    }
    text
}

fn read_table(c: &mut Criterion) {
    let text = long_table(200_001);
    let mut g = c.benchmark_group("waveform");
    g.throughput(Throughput::Elements(200_001));
    g.sample_size(20);
    g.bench_function("parse 200001 rows", |b| {
        b.iter(|| parse_waveform(black_box(&text), Path::new("bench.csv")).map(|t| t.times_s.len()));
    });
    g.finish();
}

/// What `quenchless eval --waveform` does with a table, without the process start:
/// read it, build the ramp (linear reading) and evaluate it (end map, 801-point
/// trajectory, limit checks on every row). 20,001 and 1,000,001 rows.
fn read_and_evaluate(c: &mut Criterion) {
    use quenchless_physics::ramp::SampledReading;
    use quenchless_physics::{EvaluationSettings, Moments, evaluate};
    let mut g = c.benchmark_group("waveform");
    g.sample_size(10);
    for rows in [20_001, 1_000_001] {
        let text = long_table(rows);
        g.throughput(Throughput::Elements(rows as u64));
        g.bench_function(format!("read and evaluate {rows} rows"), |b| {
            b.iter(|| {
                let table = parse_waveform(black_box(&text), Path::new("bench.csv")).unwrap();
                let ramp = table.to_ramp(SampledReading::Linear, Path::new("bench.csv")).unwrap();
                let start = Moments::ground(std::f64::consts::TAU * 100e3).unwrap();
                evaluate(&ramp, &start, &EvaluationSettings::default()).unwrap().report.q_star_minus_one
            });
        });
    }
    g.finish();
}

criterion_group!(benches, read_table, read_and_evaluate);
criterion_main!(benches);

//! Reading a long waveform table (`cargo bench -p quenchless-profile`; in
//! `cargo test --all-targets` it runs once).

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

criterion_group!(benches, read_table);
criterion_main!(benches);

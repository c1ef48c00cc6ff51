//! Times the engine on the three QuTiP reference waveforms (tests/reference/waveforms),
//! for the speed comparison with the QuTiP and SciPy scripts there.
#![expect(clippy::unwrap_used, reason = "a developer tool on fixed, valid inputs")]
use quenchless_physics::PropagationOptions;
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::ramp::{Ramp, SampledColumn, SampledRamp, SampledReading};
use std::time::Instant;

fn load(path: &str, reading: SampledReading) -> Ramp {
    let text = std::fs::read_to_string(path).unwrap();
    let mut lines = text.lines().filter(|l| !l.starts_with('#'));
    let header = lines.next().unwrap();
    let column = if header.ends_with("omega2") { SampledColumn::Omega2 } else { SampledColumn::Omega };
    let (mut t, mut v) = (Vec::new(), Vec::new());
    for l in lines {
        let mut c = l.split(',');
        t.push(c.next().unwrap().trim().parse().unwrap());
        v.push(c.next().unwrap().trim().parse().unwrap());
    }
    Ramp::Sampled(SampledRamp::new(t, v, column, reading).unwrap())
}

fn main() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/../../tests/reference/waveforms/");
    for (name, reading) in [
        ("expand_smooth", SampledReading::Linear),
        ("compress_inverted", SampledReading::Linear),
        ("hold_steps", SampledReading::Hold),
    ] {
        let ramp = load(&format!("{dir}{name}.csv"), reading);
        let opts = PropagationOptions::default();
        let n = 200;
        let start = Instant::now();
        let mut q = 0.0;
        for _ in 0..n {
            q = q_star(&ramp, &opts).unwrap();
        }
        let per = start.elapsed().as_secs_f64() / f64::from(n);
        println!("{name:<18} Q* = {q:.15}  {:.1} us per propagation", per * 1e6);
    }
}

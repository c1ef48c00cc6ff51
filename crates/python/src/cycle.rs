//! `quenchless.cycle`: an Otto cycle from keyword arguments, as the `cycle` flags
//! build it, analysed by the same engine call and reported by the profile crate's
//! `cycle_json`.

use crate::errors::{Failure, Outcome, guarded};
use crate::evaluate::propagation;
use crate::job;
use crate::json::to_python;
use pyo3::prelude::*;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::cycle::{OttoCycle, WorkStroke};
use quenchless_physics::ramp::{ConstantMuRamp, LinearRamp, Ramp, ShortcutRamp};
use quenchless_physics::{Bath, Noise};
use quenchless_profile::read_waveform;
use quenchless_profile::report::cycle_json;
use std::path::PathBuf;

fn need<T: Copy>(v: Option<T>, name: &str) -> Outcome<T> {
    v.ok_or_else(|| Failure::value(format!("{name} is required")))
}

fn rate(name: &str, g: f64) -> Outcome<f64> {
    if g.is_finite() && g >= 0.0 {
        Ok(g)
    } else {
        Err(Failure::value(format!("{name} {g}: allowed a finite rate >= 0 in 1/s")))
    }
}

/// One bath's arguments.
struct BathArgs {
    side: &'static str,
    occupation: Option<f64>,
    temp_k: Option<f64>,
    rate_per_s: Option<f64>,
}

fn bath(b: &BathArgs, omega: f64) -> Outcome<Bath> {
    let g = rate(&format!("{}_rate_per_s", b.side), need(b.rate_per_s, &format!("{}_rate_per_s", b.side))?)?;
    match (b.occupation, b.temp_k) {
        (Some(n), None) => {
            if !(n.is_finite() && n >= 0.0) {
                return Err(Failure::value(format!("{}_occupation {n}: allowed a finite number >= 0", b.side)));
            }
            Ok(Bath::with_occupation(omega, n, g)?)
        }
        (None, Some(t)) => Ok(Bath::with_temperature(omega, t, g)?),
        _ => Err(Failure::value(format!("give one of {0}_occupation or {0}_temp_k", b.side))),
    }
}

/// One work stroke's arguments.
struct StrokeArgs {
    name: &'static str,
    kind: Option<String>,
    time_s: Option<f64>,
    waveform: Option<PathBuf>,
}

fn stroke(s: &StrokeArgs, hold: bool, from: f64, to: f64) -> Outcome<WorkStroke> {
    if let Some(path) = &s.waveform {
        let table = read_waveform(path)?;
        let reading = table.reading(hold, "hold").map_err(|e| e.in_file(path))?;
        return Ok(WorkStroke::Ramp(table.to_ramp(reading, path)?));
    }
    let name = s.name;
    let Some(kind) = s.kind.as_deref() else {
        return Err(Failure::value(format!("{name} (a stroke kind) or {name}_waveform (a CSV file) is required")));
    };
    let needs_time =
        || s.time_s.ok_or_else(|| Failure::value(format!("{name}_time_s is required for {name}=\"{kind}\"")));
    let positive = |t: f64| {
        if t > 0.0 {
            Ok(t)
        } else {
            Err(Failure::value(format!("{name}_time_s {t}: allowed a time > 0 for {name}=\"{kind}\"")))
        }
    };
    Ok(match kind {
        "sudden" => WorkStroke::Sudden { hold: s.time_s.unwrap_or(0.0) },
        "adiabatic" => WorkStroke::IdealAdiabatic { time: needs_time()? },
        "linear" => WorkStroke::Ramp(Ramp::Linear(LinearRamp::new(from, to, positive(needs_time()?)?)?)),
        "shortcut" => WorkStroke::Ramp(Ramp::Shortcut(ShortcutRamp::new(from, to, positive(needs_time()?)?)?)),
        "constant-mu" => {
            WorkStroke::Ramp(Ramp::ConstantMu(ConstantMuRamp::with_duration(from, to, positive(needs_time()?)?)?))
        }
        other => {
            return Err(Failure::value(format!(
                "{name} \"{other}\": allowed \"linear\", \"sudden\", \"adiabatic\", \"shortcut\" or \"constant-mu\""
            )));
        }
    })
}

/// An Otto cycle from keyword arguments mirroring the ``quenchless cycle`` flags:
/// trap frequencies ``hot_freq_hz`` > ``cold_freq_hz`` (ordinary frequencies nu in
/// Hz, not omega); each bath by ``*_occupation`` (mean quanta at its frequency) or
/// ``*_temp_k`` (K), with coupling ``*_rate_per_s`` (Gamma, 1/s) and contact time
/// ``*_time_s`` (s); strokes ``expand`` and ``compress`` of kind ``"linear"``,
/// ``"sudden"``, ``"adiabatic"``, ``"shortcut"`` or ``"constant-mu"`` taking
/// ``*_time_s`` (s), or a CSV waveform ``*_waveform`` (read by sample-and-hold with
/// ``hold``). Returns the keys of ``cycle --json``.
#[pyfunction]
#[pyo3(signature = (*, hot_freq_hz=None, cold_freq_hz=None, hot_occupation=None, hot_temp_k=None,
    cold_occupation=None, cold_temp_k=None, hot_rate_per_s=None, cold_rate_per_s=None, hot_time_s=None,
    cold_time_s=None, expand=None, expand_time_s=None, expand_waveform=None, compress=None,
    compress_time_s=None, compress_waveform=None, hold=false, accuracy=None))]
pub fn cycle(
    py: Python<'_>,
    hot_freq_hz: Option<f64>,
    cold_freq_hz: Option<f64>,
    hot_occupation: Option<f64>,
    hot_temp_k: Option<f64>,
    cold_occupation: Option<f64>,
    cold_temp_k: Option<f64>,
    hot_rate_per_s: Option<f64>,
    cold_rate_per_s: Option<f64>,
    hot_time_s: Option<f64>,
    cold_time_s: Option<f64>,
    expand: Option<String>,
    expand_time_s: Option<f64>,
    expand_waveform: Option<PathBuf>,
    compress: Option<String>,
    compress_time_s: Option<f64>,
    compress_waveform: Option<PathBuf>,
    hold: bool,
    accuracy: Option<f64>,
) -> PyResult<Py<PyAny>> {
    guarded(|| {
        let hot = need(hot_freq_hz, "hot_freq_hz")?;
        let cold = need(cold_freq_hz, "cold_freq_hz")?;
        let (wh, wc) = (TWO_PI * hot, TWO_PI * cold);
        if wc.partial_cmp(&wh) != Some(std::cmp::Ordering::Less) {
            return Err(Failure::value(format!(
                "cold_freq_hz {cold} must be below hot_freq_hz {hot} (the expansion goes from the hot to the cold frequency)"
            ))
            .into());
        }
        let hot_bath =
            BathArgs { side: "hot", occupation: hot_occupation, temp_k: hot_temp_k, rate_per_s: hot_rate_per_s };
        let cold_bath =
            BathArgs { side: "cold", occupation: cold_occupation, temp_k: cold_temp_k, rate_per_s: cold_rate_per_s };
        let cycle = OttoCycle {
            hot: bath(&hot_bath, wh)?,
            hot_time: need(hot_time_s, "hot_time_s")?,
            expansion: stroke(
                &StrokeArgs { name: "expand", kind: expand, time_s: expand_time_s, waveform: expand_waveform },
                hold,
                wh,
                wc,
            )?,
            cold: bath(&cold_bath, wc)?,
            cold_time: need(cold_time_s, "cold_time_s")?,
            compression: stroke(
                &StrokeArgs { name: "compress", kind: compress, time_s: compress_time_s, waveform: compress_waveform },
                hold,
                wc,
                wh,
            )?,
            noise: Noise::NONE,
        };
        let opts = propagation(accuracy)?;
        let report = job::run(py, None, 0, move |_| Ok(cycle.analyse(&opts)?))?;
        to_python(py, &cycle_json(&report))
    })
}

//! `quenchless cycle`.

use super::propagation;
use crate::CommandError;
use crate::cli::{CycleArgs, StrokeKind};
use crate::flags::Given;
use crate::report::{cycle_json, cycle_text};
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::cycle::{OttoCycle, WorkStroke};
use quenchless_physics::ramp::{ConstantMuRamp, LinearRamp, Ramp, ShortcutRamp};
use quenchless_physics::{Bath, Noise};
use quenchless_profile::{convert, load_study, read_waveform};
use std::path::Path;

fn need<'a, T>(v: Option<&'a T>, flag: &str) -> Result<&'a T, CommandError> {
    v.ok_or_else(|| CommandError(format!("{flag} is required when no profile is given")))
}

fn rate(flag: &str, g: f64) -> Result<f64, CommandError> {
    if g.is_finite() && g >= 0.0 {
        Ok(g)
    } else {
        Err(CommandError(format!("{flag} {g}: allowed a finite rate >= 0 in 1/s")))
    }
}

fn bath(a: &CycleArgs, hot: bool, omega: f64) -> Result<Bath, CommandError> {
    let (side, occ, temp, g) = if hot {
        ("hot", a.hot_occupation, a.hot_temp.as_ref(), a.hot_rate)
    } else {
        ("cold", a.cold_occupation, a.cold_temp.as_ref(), a.cold_rate)
    };
    let g = rate(&format!("--{side}-rate"), *need(g.as_ref(), &format!("--{side}-rate"))?)?;
    match (occ, temp) {
        (Some(n), None) => {
            if !(n.is_finite() && n >= 0.0) {
                return Err(CommandError(format!("--{side}-occupation {n}: allowed a finite number >= 0")));
            }
            Ok(Bath::with_occupation(omega, n, g)?)
        }
        (None, Some(t)) => Ok(Bath::with_temperature(omega, t.si, g)?),
        _ => Err(CommandError(format!("give one of --{side}-occupation or --{side}-temp"))),
    }
}

fn stroke(
    kind: Option<StrokeKind>,
    time: Option<&Given>,
    wave: Option<&Path>,
    hold: bool,
    name: &str,
    from: f64,
    to: f64,
) -> Result<WorkStroke, CommandError> {
    if let Some(path) = wave {
        let table = read_waveform(path)?;
        let reading = table.reading(hold, "--hold").map_err(|e| e.in_file(path))?;
        let ramp = table.to_ramp(reading, path)?;
        return Ok(WorkStroke::Ramp(ramp));
    }
    let flag = format!("--{name}");
    let Some(kind) = kind else {
        return Err(CommandError(format!(
            "{flag} KIND or {flag}-waveform FILE.csv is required when no profile is given"
        )));
    };
    let tflag = format!("--{name}-time");
    let t = time.map(|t| t.si);
    let needs_time = || t.ok_or_else(|| CommandError(format!("{tflag} is required for {flag} {}", kind.name())));
    let positive = |t: f64| {
        if t > 0.0 {
            Ok(t)
        } else {
            let typed = time.map_or("", |t| t.typed.as_str());
            Err(CommandError(format!("{tflag} {typed}: allowed a time > 0 for {flag} {}", kind.name())))
        }
    };
    Ok(match kind {
        StrokeKind::Sudden => WorkStroke::Sudden { hold: t.unwrap_or(0.0) },
        StrokeKind::Adiabatic => WorkStroke::IdealAdiabatic { time: needs_time()? },
        StrokeKind::Linear => WorkStroke::Ramp(Ramp::Linear(LinearRamp::new(from, to, positive(needs_time()?)?)?)),
        StrokeKind::Shortcut => {
            WorkStroke::Ramp(Ramp::Shortcut(ShortcutRamp::new(from, to, positive(needs_time()?)?)?))
        }
        StrokeKind::ConstantMu => {
            WorkStroke::Ramp(Ramp::ConstantMu(ConstantMuRamp::with_duration(from, to, positive(needs_time()?)?)?))
        }
    })
}

fn from_flags(a: &CycleArgs) -> Result<OttoCycle, CommandError> {
    let hot = need(a.hot_freq.as_ref(), "--hot-freq")?;
    let cold = need(a.cold_freq.as_ref(), "--cold-freq")?;
    let (wh, wc) = (TWO_PI * hot.si, TWO_PI * cold.si);
    if wc >= wh {
        return Err(CommandError(format!(
            "--cold-freq {} must be below --hot-freq {} (the expansion goes from the hot to the cold frequency)",
            cold.typed, hot.typed
        )));
    }
    let hot_time = need(a.hot_time.as_ref(), "--hot-time")?.si;
    let cold_time = need(a.cold_time.as_ref(), "--cold-time")?.si;
    Ok(OttoCycle {
        hot: bath(a, true, wh)?,
        hot_time,
        expansion: stroke(a.expand, a.expand_time.as_ref(), a.expand_waveform.as_deref(), a.hold, "expand", wh, wc)?,
        cold: bath(a, false, wc)?,
        cold_time,
        compression: stroke(
            a.compress,
            a.compress_time.as_ref(),
            a.compress_waveform.as_deref(),
            a.hold,
            "compress",
            wc,
            wh,
        )?,
        noise: Noise::NONE,
    })
}

pub fn run(a: &CycleArgs) -> Result<(), CommandError> {
    let opts = propagation(a.accuracy)?;
    let mut axes_note = None;
    let (cycle, name) = if let Some(path) = &a.profile {
        let study = load_study(path)?;
        let model = convert::trap_model(&study.trap).map_err(|e| e.in_file(path))?;
        if model.is_multi_axis() {
            axes_note = Some(format!(
                "the cycle runs on the reference axis ({}) alone: the trap's other axes ({}) are not part of it yet",
                model.axes[0].axis.name,
                model.axes[1..].iter().map(|m| m.axis.name.as_str()).collect::<Vec<_>>().join(", ")
            ));
        }
        let Some(spec) = &study.cycle else {
            return Err(CommandError(format!(
                "{}: the study has no cycle (add a `cycle: Some((...))` section)",
                path.display()
            )));
        };
        (convert::cycle(&study, spec).map_err(|e| e.in_file(path))?, study.name.clone())
    } else {
        (from_flags(a)?, "cycle from flags".to_string())
    };
    let rep = cycle.analyse(&opts)?;
    if a.json {
        let mut v = cycle_json(&rep);
        if let (Some(note), serde_json::Value::Object(o)) = (&axes_note, &mut v) {
            o.insert("axes_note".into(), serde_json::json!(note));
        }
        println!("{}", serde_json::to_string_pretty(&v).map_err(CommandError::from)?);
    } else {
        print!("{}", cycle_text(&name, &rep));
        if let Some(note) = &axes_note {
            println!("  note: {note}");
        }
    }
    Ok(())
}

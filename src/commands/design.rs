//! `quenchless design`.

use super::propagation;
use crate::CommandError;
use crate::cli::{DesignKind, DesignOutput, EndFrequencies};
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::design::{
    frictionless_constant_mu, nearest_frictionless_order, shortcut_for_duration, shortest_shortcut_above,
    time_optimal_holds,
};
use quenchless_physics::diagnostics::q_star;
use quenchless_physics::{Ramp, RampShape};
use quenchless_profile::study::{CandidateRamp, HoldSpec, RampSpec, Study, TrapSpec};
use quenchless_profile::units::{Quantity, parse_quantity};
use quenchless_profile::{ExportColumns, save_study, write_waveform};
use serde_json::{Value, json};

fn frequency(flag: &str, text: &str) -> Result<f64, CommandError> {
    let nu = parse_quantity(text, Quantity::Frequency).map_err(|e| CommandError(format!("{flag} {e}")))?;
    if nu <= 0.0 {
        return Err(CommandError(format!("{flag} {text}: a trap frequency must be > 0")));
    }
    Ok(TWO_PI * nu)
}

/// (omega_i, omega_f) in rad/s from --from and --to.
fn end_omegas(ends: &EndFrequencies) -> Result<(f64, f64), CommandError> {
    Ok((frequency("--from", &ends.from)?, frequency("--to", &ends.to)?))
}

pub fn run(kind: &DesignKind) -> Result<(), CommandError> {
    let opts = propagation(None)?;
    let (ramp, spec, mut report, out, label) = match kind {
        DesignKind::ConstantMu { ends, order, near_time, out } => {
            let (wi, wf) = end_omegas(ends)?;
            let d = match (order, near_time) {
                (Some(k), _) => frictionless_constant_mu(wi, wf, *k)?,
                (None, Some(t)) => {
                    let t = parse_quantity(t, Quantity::Time).map_err(|e| CommandError(format!("--near-time {e}")))?;
                    nearest_frictionless_order(wi, wf, t)?
                }
                (None, None) => return Err(CommandError("give --order K or --near-time t".into())),
            };
            let spec = RampSpec::ConstantMu { from_hz: wi / TWO_PI, to_hz: wf / TWO_PI, duration_s: d.duration };
            let report = json!({"order": d.order, "mu": d.mu, "duration_s": d.duration});
            (Ramp::ConstantMu(d.ramp), spec, report, out, format!("constant mu, order {}", d.order))
        }
        DesignKind::Shortcut { ends, time, min_omega2, out } => {
            let (wi, wf) = end_omegas(ends)?;
            let d = match (time, min_omega2) {
                (Some(t), _) => {
                    let t = parse_quantity(t, Quantity::Time).map_err(|e| CommandError(format!("--time {e}")))?;
                    if t <= 0.0 {
                        return Err(CommandError(format!("--time {t}: a duration must be > 0")));
                    }
                    shortcut_for_duration(wi, wf, t)?
                }
                (None, Some(x)) => {
                    shortest_shortcut_above(wi, wf, *x).map_err(|e| CommandError(format!("--min-omega2 {x}: {e}")))?
                }
                (None, None) => return Err(CommandError("give --time t or --min-omega2 X".into())),
            };
            let spec = RampSpec::Shortcut { from_hz: wi / TWO_PI, to_hz: wf / TWO_PI, duration_s: d.duration };
            let report = json!({"duration_s": d.duration, "min_omega2": d.min_omega2, "inverts": d.inverts});
            if d.inverts {
                eprintln!(
                    "warning: this shortcut inverts the trap (omega² down to {:e} (rad/s)²); an optical trap cannot play it",
                    d.min_omega2
                );
            }
            (Ramp::Shortcut(d.ramp), spec, report, out, "shortcut".to_string())
        }
        DesignKind::BangBang { ends, min, max, out } => {
            let (wi, wf) = end_omegas(ends)?;
            let lo = parse_quantity(min, Quantity::Frequency).map_err(|e| CommandError(format!("--min {e}")))? * TWO_PI;
            let hi = frequency("--max", max)?;
            if lo < 0.0 {
                return Err(CommandError(format!("--min {min}: a frequency bound must be >= 0")));
            }
            let d =
                time_optimal_holds(wi, wf, lo * lo, hi * hi).map_err(|e| CommandError(format!("--min/--max: {e}")))?;
            let segments: Vec<Value> = d
                .segments
                .iter()
                .map(|s| json!({"omega_rad_s": s.omega2.max(0.0).sqrt(), "duration_s": s.duration}))
                .collect();
            let holds = d
                .segments
                .iter()
                .map(|s| HoldSpec {
                    signed_frequency_hz: s.omega2.abs().sqrt().copysign(s.omega2) / TWO_PI,
                    duration_s: s.duration,
                })
                .collect();
            let spec = RampSpec::Holds { from_hz: wi / TWO_PI, to_hz: wf / TWO_PI, holds };
            let report = json!({"duration_s": d.duration, "segments": segments});
            (Ramp::PiecewiseConstant(d.ramp), spec, report, out, "time-optimal holds".to_string())
        }
    };
    let q = q_star(&ramp, &opts)?;
    report["q_star"] = json!(q);
    write_outputs(&ramp, &spec, out, &label, q)?;
    if out.json {
        println!("{}", serde_json::to_string_pretty(&report).map_err(CommandError::from)?);
    } else {
        println!("{label}: {} -> {} kHz", ramp.omega_initial() / TWO_PI / 1e3, ramp.omega_final() / TWO_PI / 1e3);
        if let Value::Object(map) = &report {
            for (k, v) in map {
                println!("  {k:<12} {v}");
            }
        }
    }
    Ok(())
}

fn write_outputs(ramp: &Ramp, spec: &RampSpec, out: &DesignOutput, label: &str, q: f64) -> Result<(), CommandError> {
    if let Some(path) = &out.waveform_out {
        let rate = out.rate.ok_or_else(|| CommandError("--waveform-out needs --rate R (samples per second)".into()))?;
        if !(rate.is_finite() && rate > 0.0) {
            return Err(CommandError(format!("--rate {rate}: allowed a finite number of samples per second > 0")));
        }
        eprintln!("{}", super::export::CAUTION);
        let prov = vec![
            format!("written by quenchless {} (design: {label})", env!("CARGO_PKG_VERSION")),
            format!("designed Q* = {q:.12}, duration {:e} s, sampled at {rate:e} samples/s", ramp.duration()),
            "CAUTION: drives high-voltage / high-power laser hardware; check against apparatus limits and local safety rules".into(),
        ];
        write_waveform(path, ramp, rate, ExportColumns::Si, &prov)?;
    }
    if let Some(path) = &out.profile_out {
        let study = Study {
            name: format!("Designed: {label}"),
            trap: TrapSpec {
                start_frequency_hz: ramp.omega_initial() / TWO_PI,
                end_frequency_hz: ramp.omega_final() / TWO_PI,
                ..TrapSpec::default()
            },
            candidates: vec![CandidateRamp {
                name: label.to_string(),
                visible: true,
                colour: None,
                ramp: spec.clone(),
            }],
            ..Study::default()
        };
        save_study(&study, path)?;
    }
    Ok(())
}
